// Fuzz target: the CSV reader (lib/src/io/csv_table.cpp) and its typed cell access.
#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <numeric>
#include <vector>

#include "fuzz_support.hpp"
#include "safesite/io/csv_table.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    using safesite::io::CsvTable;
    safesite::fuzz::expect_only_safesite_errors([&] {
        const CsvTable t = CsvTable::parse(safesite::fuzz::as_text(data, size), "fuzz.csv");
        for (const auto& name : t.header()) {
            (void)t.find(name);
            (void)t.locate(name);
        }
        // Every typed reading of every cell: each may refuse the cell with a DataError.
        for (std::size_t r = 0; r < t.rows(); ++r) {
            (void)t.line(r);
            for (std::size_t c = 0; c < t.columns(); ++c) {
                (void)t.line(r, c);
                (void)t.empty(r, c);
                (void)t.where(r, c).prefix();
                safesite::fuzz::expect_only_safesite_errors([&] { (void)t.text(r, c); });
                safesite::fuzz::expect_only_safesite_errors([&] { (void)t.real(r, c); });
                safesite::fuzz::expect_only_safesite_errors([&] { (void)t.integer(r, c); });
                safesite::fuzz::expect_only_safesite_errors([&] { (void)t.flag(r, c); });
                safesite::fuzz::expect_only_safesite_errors([&] { (void)t.optional_real(r, c); });
            }
        }
        // A resample with every row twice, reversed, then one cell replaced.
        std::vector<std::size_t> rows(t.rows());
        std::iota(rows.begin(), rows.end(), std::size_t{0});
        rows.insert(rows.end(), rows.rbegin(), rows.rend());
        CsvTable s = t.select_rows(rows);
        if (s.rows() > 0 && s.columns() > 0) s.set_cell(0, 0, "x");
        (void)t.require("plant");
    });
    return 0;
}
