#pragma once
/// \file text_summary.hpp
/// Plain-text rendering of tables for the terminal: aligned columns, numbers with a fixed
/// number of significant digits (the files keep full precision), the caution at the end.

#include <cstddef>
#include <string>
#include <vector>

#include "safesite/report/run_info.hpp"
#include "safesite/report/tidy_table.hpp"

namespace safesite::report {

/// Options of the terminal rendering.
struct TextOptions {
    int significant_digits = 4;   ///< digits of doubles, 1 <= digits <= 17
    std::size_t max_rows = 20;    ///< rows shown per table; the rest are counted ("… 12 more")
};

/// One table as aligned plain text: a title line with the name, the header, the rows.
/// Text columns are left-aligned, numbers right-aligned; a missing cell shows as "-".
std::string render_table(const TidyTable& table, const TextOptions& options = {});

/// A short terminal summary: the model name and file, the seed, the given tables rendered
/// with render_table(), the warnings, and the caution.
std::string render_summary(const std::vector<TidyTable>& tables, const RunInfo& info,
                           const TextOptions& options = {});

}  // namespace safesite::report
