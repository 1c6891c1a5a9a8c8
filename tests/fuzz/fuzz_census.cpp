// Fuzz target: the census reader and validator (lib/src/census). The first byte chooses the
// reading options (bits 0-1: size transform none/log/log1p/sqrt; bit 2: missing rows as
// "notfound"; bit 3: no seedling column); the rest is the census CSV. Microsites are the
// demo's (models/ridge.toml): gravel (bare), cushion, tussock.
#include <cstddef>
#include <cstdint>

#include "fuzz_support.hpp"
#include "safesite/census/census.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    using namespace safesite::census;
    if (size == 0) return 0;
    CensusOptions options;
    options.transform = static_cast<SizeTransform>(data[0] & 3u);
    options.missing_row = (data[0] & 4u) ? MissingRowPolicy::notfound : MissingRowPolicy::error;
    options.seedling_flag = (data[0] & 8u) == 0;
    options.microsites = {"gravel", "cushion", "tussock"};
    options.bare = 0;
    safesite::fuzz::expect_only_safesite_errors([&] {
        const auto table = safesite::io::CsvTable::parse(
            safesite::fuzz::as_text(data + 1, size - 1), "census.csv");
        const Census c = read_census(table, options);
        (void)c.report().render();
        (void)c.report().error_count();
        (void)c.report().warning_count();
        (void)c.neighbour_sizes_by_microsite();
        for (std::size_t i = 0; i < c.records().size(); ++i) (void)c.is_seedling_row(i);
        if (!c.valid()) throw c.report().to_error();
    });
    return 0;
}
