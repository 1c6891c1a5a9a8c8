#include "app.hpp"

#include <exception>
#include <ostream>

#include "safesite/error.hpp"
#include "safesite/version.hpp"

namespace safesite::cli {

namespace {

constexpr const char* k_usage =
    "Usage: safesite <verb> [options]\n"
    "\n"
    "Verbs:\n"
    "  eval MODEL      evaluate a model file with fixed vital-rate parameters\n"
    "\n"
    "Run 'safesite <verb> --help' for the options of a verb.\n";

}  // namespace

int run(const std::vector<std::string>& args, std::ostream& out, std::ostream& err) {
    try {
        if (args.empty()) {
            err << k_usage;
            return exit_usage;
        }
        if (args[0] == "--help" || args[0] == "-h") {
            out << k_usage;
            return exit_ok;
        }
        if (args[0] == "--version") {
            out << "safesite " << version() << "\n";
            return exit_ok;
        }
        throw UsageError("unknown verb '" + args[0] + "'");
    } catch (const UsageError& e) {
        err << "safesite: error: " << e.what() << "\n" << k_usage;
        return exit_usage;
    } catch (const InputError& e) {
        err << "safesite: error: " << e.what() << "\n";
        return exit_input;
    } catch (const NumericalError& e) {
        err << "safesite: error: " << e.what() << "\n";
        return exit_numerical;
    } catch (const std::exception& e) {
        err << "safesite: error: internal: " << e.what() << "\n";
        return 1;
    }
}

}  // namespace safesite::cli
