// Fuzz target: the retention-check reader (lib/src/arrival/retention_data.cpp), then the
// intervals and their regression table on what it accepted. Microsites are the demo's.
#include <cstddef>
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "fuzz_support.hpp"
#include "safesite/arrival/retention_data.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    using namespace safesite::arrival;
    const std::vector<std::string> microsites = {"gravel", "cushion", "tussock"};
    std::optional<RetentionData> d;
    safesite::fuzz::expect_only_safesite_errors([&] {
        d = parse_retention(safesite::fuzz::as_text(data, size), microsites, "retention.csv");
    });
    if (!d) return 0;
    safesite::fuzz::expect_only_safesite_errors(
        [&] { (void)interval_table(retention_intervals(d->checks), microsites); });
    // What the reader accepted, written out by our own writer, must read back whole: a refusal
    // (any exception) or a different count is a finding.
    const RetentionData again = parse_retention(format_retention_csv(d->checks), microsites);
    if (again.checks.size() != d->checks.size()) __builtin_trap();
    return 0;
}
