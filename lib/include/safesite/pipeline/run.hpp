#pragma once
/// \file run.hpp
/// `safesite run` and `safesite eval` as library calls: fit (or read the fixed model), then
/// every analysis; the results as the output tables of docs/formats.md ("Output tables").

#include <optional>
#include <vector>

#include "safesite/pipeline/analyse.hpp"
#include "safesite/pipeline/fit.hpp"
#include "safesite/pipeline/model_check.hpp"
#include "safesite/report/tidy_table.hpp"
#include "safesite/spec/model_spec.hpp"

namespace safesite::pipeline {

/// Everything a run computes.
struct RunResult {
    FitResult fit;
    AnalysisResult analysis;
    /// The census tables and seed experiments the fit used (for the model checks); empty
    /// when no data were read (`eval`, or a model without a census).
    std::optional<CheckData> data;
};

/// fit(model) then analyse(). Errors as for fit() and analyse().
RunResult run(const spec::ModelSpec& model);

/// A model whose rates are all given (`safesite eval`): prepare_fixed then analyse; no data
/// are read. Errors as for prepare_fixed() and analyse().
RunResult evaluate_fixed(const spec::ModelSpec& model);

/// Every output table of a run, in the order: coefficients, model_comparison, establishment,
/// (with the seed experiments: trapping, hazards, retention_curve, arrival_chain),
/// lambda, perturbation, stable_structure, reproductive_value, life_history_at_birth,
/// life_history_by_size, arrival, scenarios, sensitivities, break_even, diagnostics,
/// assumptions, then the model checks (`check_*`, model_check_tables; only `check_surfaces`
/// without data) (docs/formats.md).
std::vector<report::TidyTable> run_tables(const RunResult& result);

}  // namespace safesite::pipeline
