// Fuzz target: the trapping-trial reader (lib/src/arrival/trapping_data.cpp), then the
// regression table and the CSV writer on what it accepted. Growth forms are the demo's.
#include <cstddef>
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "fuzz_support.hpp"
#include "safesite/arrival/trapping_data.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    using namespace safesite::arrival;
    const std::vector<std::string> forms = {"cushion", "tussock"};
    std::optional<TrappingData> d;
    safesite::fuzz::expect_only_safesite_errors(
        [&] { d = parse_trapping(safesite::fuzz::as_text(data, size), forms, "trapping.csv"); });
    if (!d) return 0;
    safesite::fuzz::expect_only_safesite_errors([&] { (void)trapping_table(d->trials, forms); });
    // What the reader accepted, written out by our own writer, must read back whole: a refusal
    // (any exception) or a different count is a finding.
    const TrappingData again = parse_trapping(format_trapping_csv(d->trials), forms);
    if (again.trials.size() != d->trials.size()) __builtin_trap();
    return 0;
}
