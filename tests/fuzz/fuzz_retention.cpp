// Fuzz target: the retention-check reader (lib/src/arrival/retention_data.cpp), then the
// intervals and their regression table on what it accepted. Microsites are the demo's. No
// write-and-read-back as for trapping trials: the writer keeps 10 significant digits of a day,
// so days closer than that (never in field data) would read back as not increasing.
#include <cstddef>
#include <cstdint>
#include <string>
#include <vector>

#include "fuzz_support.hpp"
#include "safesite/arrival/retention_data.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    using namespace safesite::arrival;
    const std::vector<std::string> microsites = {"gravel", "cushion", "tussock"};
    safesite::fuzz::expect_only_safesite_errors([&] {
        const RetentionData d =
            parse_retention(safesite::fuzz::as_text(data, size), microsites, "retention.csv");
        (void)interval_table(retention_intervals(d.checks), microsites);
    });
    return 0;
}
