// The program entry point only installs the signal handlers and forwards to safesite::cli::run
// (style guide 4.11).
#include <iostream>
#include <string>
#include <vector>

#include "app.hpp"

int main(int argc, char** argv) {
    safesite::cli::install_signal_handlers();
    std::vector<std::string> args(argv + 1, argv + argc);
    return safesite::cli::run(args, std::cout, std::cerr);
}
