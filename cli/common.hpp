#pragma once
/// \file common.hpp
/// Helpers shared by the verbs: loading the model file, choosing tables to print, the run's
/// metadata.

#include <filesystem>
#include <optional>
#include <string>
#include <vector>

#include "safesite/report/run_info.hpp"
#include "safesite/report/tidy_table.hpp"
#include "safesite/spec/model_spec.hpp"

namespace safesite::cli {

/// Read and validate a model file (SpecError, exit 3, when it cannot be read or is invalid).
spec::ModelSpec load_model(const std::string& path);

/// Metadata of a run of `command` on `model` (the model file as the user named it), with the
/// model's own assumptions, then `assumptions`, then `warnings`.
report::RunInfo run_info(const std::string& command, const std::string& model_path,
                         const spec::ModelSpec& model, std::optional<std::uint64_t> seed,
                         const std::vector<std::string>& assumptions,
                         const std::vector<std::string>& warnings);

/// The tables among `tables` whose names are in `names` (in the order of `names`), skipping
/// absent and empty ones.
std::vector<report::TidyTable> pick_tables(const std::vector<report::TidyTable>& tables,
                                           const std::vector<std::string>& names);

/// The output folder: `--out` when given, else the model file's `[output] dir`.
std::filesystem::path output_dir(const std::string& out_option, const spec::ModelSpec& model);

/// The files a run on `model` reads: the model file and the data files it names.
std::vector<std::filesystem::path> input_files(const spec::ModelSpec& model);

/// Fail early (InputError, exit 3, naming the folder) when `dir` cannot be the output folder of
/// a run on `model`: call before any fitting (io::StagedFolder::check).
void check_output_folder(const std::filesystem::path& dir, const spec::ModelSpec& model);

}  // namespace safesite::cli
