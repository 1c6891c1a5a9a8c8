#pragma once
/// \file output_folder_reader.hpp
/// Reading an output folder back (docs/formats.md "Output folder"): the tables and metadata of
/// `summary.json` and the SVG files of `figures/`, for `safesite report DIR`.

#include <filesystem>
#include <vector>

#include "safesite/report/figures.hpp"
#include "safesite/report/run_info.hpp"
#include "safesite/report/tidy_table.hpp"

namespace safesite::report {

/// The contents of an output folder as written by write_output_folder() and write_figures().
struct OutputFolder {
    std::vector<TidyTable> tables;  ///< in the order of summary.json
    RunInfo info;                   ///< with `safesite_version` from summary.json
    std::vector<Figure> figures;    ///< figures/*.svg (see read_output_folder())
};

/// Read `<dir>/summary.json` and `<dir>/figures/*.svg`. JSON cells become cells by type:
/// null → missing (JSON has no NaN, so a non-finite decimal comes back missing), string →
/// text, integer → integer, other number → decimal. Figures are ordered as all_figures()
/// would draw them from the tables, then any other `.svg` by file name; a folder without
/// `figures/` has none.
/// \throws DataError naming summary.json when it is missing or unreadable, with line and
///         column for malformed JSON, or with the key (e.g. `tables[2].rows[0]`) for a
///         missing or wrongly typed entry; InputError naming a figure file that cannot be
///         read.
OutputFolder read_output_folder(const std::filesystem::path& dir);

/// Read the folder and write `<dir>/report.html` from it (write_html_report()), atomically,
/// and add it to the folder's list of files (io::StagedFolder::record); returns the path. \throws as read_output_folder() and write_html_report().
std::filesystem::path rerender_html_report(const std::filesystem::path& dir);

}  // namespace safesite::report
