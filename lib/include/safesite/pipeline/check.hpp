#pragma once
/// \file check.hpp
/// `safesite check`: read and validate the census of a model file (and, with `[arrival] method
/// = "experiments"`, the trapping trials and retention checks) and summarise them, without
/// fitting anything (issue 4 §1, §5; issue 5 §1–2).

#include <optional>
#include <string>
#include <vector>

#include "safesite/arrival/retention_data.hpp"
#include "safesite/arrival/trapping_data.hpp"
#include "safesite/census/census.hpp"
#include "safesite/census/transition_data.hpp"
#include "safesite/census/validation_report.hpp"
#include "safesite/report/tidy_table.hpp"
#include "safesite/spec/mesh_memory.hpp"
#include "safesite/spec/model_spec.hpp"

namespace safesite::pipeline {

/// The census as read, with every problem found and the counts.
struct CheckResult {
    std::string census_file;                 ///< as named in the model file
    std::vector<std::string> microsites;     ///< model labels, in order
    census::ValidationReport report;         ///< all problems (errors and warnings)
    census::CensusSummary summary;           ///< plants, years, transitions, recruits, gaps
    census::CensusOptions options;           ///< how the census was read (policies)
    /// The seed experiments as read (method = experiments only; a bad file throws DataError
    /// at its first problem, with file, line and column).
    std::optional<arrival::TrappingData> trapping;
    std::optional<arrival::RetentionData> retention;
    /// The memory the kernels need (one per transition year of the census and the pooled one;
    /// spec/mesh_memory.hpp), known when the census is valid.
    std::optional<spec::MeshMemory> memory;
    /// True when the census has no error (warnings allowed): fit and run may proceed.
    bool valid() const { return !report.has_errors(); }
};

/// Read and validate the census of `model` and summarise it. Problems in the data are
/// collected in `report` (never thrown), so that all are shown at once. With a valid census,
/// every formula is resolved against its tables (resolve_formulas) and the memory of the
/// kernels is estimated and held to its limit (spec::require_mesh_memory): both throw
/// SpecError, as fit would.
/// \throws SpecError (key data.census) when the model file names no census; DataError when
///         the file cannot be read as CSV or lacks a required column, and for the first
///         problem of an experiment file.
CheckResult check(const spec::ModelSpec& model);

/// Resolve every fitted formula of `model` (each rate's formula and candidates) against the
/// tables its fit will see (`transitions`, `plants`, `recruits` of `data`): every column with
/// its kind, and every level named in ref(). Runs before any fitting (check, fit, run).
/// \throws SpecError at the model file's line and key, the column pointing into the user's
///         formula text (spec::formula_error).
void resolve_formulas(const spec::ModelSpec& model, const census::TransitionData& data);

/// The same for the trapping and retention formulas of `[arrival]` against the experiments.
void resolve_arrival_formulas(const spec::ModelSpec& model,
                              const arrival::TrappingData& trapping,
                              const arrival::RetentionData& retention);

/// The check as tables: `census_years` (one row per census year), `census_microsites` (per
/// transition year and microsite: plants alive at t and recruits at t+1), `census_gaps`,
/// `problems` (one row per example of each problem), `census_policies` (per `[census]` policy
/// key: its value and how many rows it changed or refused); with the experiments also
/// `trapping_summary` (per form × seed type: neighbours, trials, seeds launched and trapped)
/// and `retention_summary` (per microsite × seed type: stations, seeds, checks, seeds seen to
/// leave, last check day).
std::vector<report::TidyTable> check_tables(const CheckResult& result);

}  // namespace safesite::pipeline
