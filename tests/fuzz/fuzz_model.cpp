// Fuzz target: the TOML model-file reader (lib/src/spec, through toml++).
//
// A broken internal check of toml++ is answered with a SpecError at the spot
// (lib/src/spec/detail/checked_toml.hpp); the known ones have their own words, any other gets
// the general "cannot go on" reason, which this target treats as a finding so that a new kind
// is looked at (and given its words and a regression test) rather than passing unseen.
#include <cstddef>
#include <cstdint>
#include <string_view>

#include "fuzz_support.hpp"
#include "safesite/census/census.hpp"
#include "safesite/spec/model_spec.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    try {
        const auto spec = safesite::spec::parse_model_spec(safesite::fuzz::as_text(data, size),
                                                           "models/fuzz.toml");
        (void)safesite::spec::to_census_options(spec);
    } catch (const safesite::SpecError& e) {
        constexpr std::string_view unknown_check = "TOML syntax: the TOML reader cannot go on";
        if (std::string_view(e.reason()).substr(0, unknown_check.size()) == unknown_check)
            __builtin_trap();
    } catch (const safesite::Error&) {
    }
    return 0;
}
