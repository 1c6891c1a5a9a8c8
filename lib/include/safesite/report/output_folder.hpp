#pragma once
/// \file output_folder.hpp
/// Writers for the output folder of a run (design.md section 6, docs/formats.md "Outputs"):
/// every table as `<dir>/<name>.csv` (RFC 4180) and all tables, with the run's metadata and
/// the caution, as `<dir>/summary.json`. Every file is written to a temporary file in `dir`
/// and then renamed over the target (io::write_file_atomic), so a reader never sees a
/// half-written file.

#include <filesystem>
#include <string>
#include <vector>

#include "safesite/io/staged_folder.hpp"
#include "safesite/report/run_info.hpp"
#include "safesite/report/tidy_table.hpp"

namespace safesite::report {

/// The table as RFC 4180 CSV text: a header row, then one line per row, LF line ends. A field
/// is quoted when it holds a comma, a quote, CR or LF, or begins or ends with a space; a quote
/// inside a quoted field is doubled. \throws UsageError when check_table() fails.
std::string to_csv(const TidyTable& table);

/// The summary as JSON text (2-space indent, keys in a fixed order, trailing newline):
/// `{"safesite_version", "command", "model": {"file", "name"}, "seed", "caution",
///   "assumptions", "warnings", "tables": [{"name", "columns", "rows"}...]}`.
/// Numbers are the same binary doubles as in the CSV files.
/// \throws UsageError when a table fails check_table() or two tables share a name.
std::string to_summary_json(const std::vector<TidyTable>& tables, const RunInfo& info);

/// Write one table as `<dir>/<name>.csv` atomically (`dir` is created when absent); returns
/// the path. \throws UsageError for an invalid table; InputError (key "out") when the folder
/// cannot be created or the file cannot be written.
std::filesystem::path write_csv(const std::filesystem::path& dir, const TidyTable& table);

/// Write one file of an output folder atomically (io::write_file_atomic); a failure becomes an
/// InputError naming the path with key "out" (the output folder is an input of the command).
void write_output_file(const std::filesystem::path& path, const std::string& content);

/// Create the output folder `dir` (and its parents) when missing.
/// \throws InputError (key "out") naming the folder when it cannot be created.
void ensure_output_folder(const std::filesystem::path& dir);

/// Write the tables into `dir`: creates `dir` (and parents) when absent, writes every table as
/// `<dir>/<name>.csv`, then `<dir>/summary.json`. Existing files of the same names are
/// replaced; other files in `dir` are left alone. Returns the paths written, in order. A run
/// writes into the temporary folder of an io::StagedFolder (output_folder_rules()) and
/// commits it, so that the output folder is replaced all or nothing.
/// \throws UsageError for invalid or duplicate table names; InputError (key "out") when the
///         folder cannot be created or a file cannot be written.
std::vector<std::filesystem::path> write_output_folder(const std::filesystem::path& dir,
                                                       const std::vector<TidyTable>& tables,
                                                       const RunInfo& info);

/// The rules of io::StagedFolder for an output folder of a run with these input files (model
/// file, data files): a folder written before `.safesite-output` existed is recognised by its
/// summary.json and may be replaced when it holds only files safesite writes (`*.csv`,
/// `summary.json`, `report.html`, `figures/*.svg`).
io::StagedFolderRules output_folder_rules(std::vector<std::filesystem::path> inputs);

}  // namespace safesite::report
