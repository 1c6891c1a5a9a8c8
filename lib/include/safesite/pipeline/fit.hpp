#pragma once
/// \file fit.hpp
/// `safesite fit`: every vital rate fitted from the census (or taken as given), establishment
/// estimated, arrival fractions obtained, and the result bound into a PreparedModel for the
/// analyses (docs/methods/pipeline.md, "Vital rates and year handling", "Establishment").

#include <vector>

#include "safesite/census/census.hpp"
#include "safesite/pipeline/fit_result.hpp"
#include "safesite/report/tidy_table.hpp"
#include "safesite/spec/model_spec.hpp"

namespace safesite::pipeline {

/// Read the census of `model` (and the seed experiments when `[arrival] method =
/// "experiments"`) and fit. A model whose rates are all given and that names no census is
/// prepared without data (fixed_model.hpp).
///
/// \throws DataError when the census (or an experiment file) has errors (the reason is the
///         whole validation report); SpecError for model-file settings the data cannot
///         support (e.g. a formula naming an unknown column, located at the rate);
///         NumericalError when an estimate cannot be computed.
FitResult fit(const spec::ModelSpec& model);

/// Fit from a census already read and validated (e.g. by `check`, a simulation or a bootstrap
/// replicate); the seed experiments (method = experiments) are `experiments` when given, else
/// read from the model file's paths.
/// \throws UsageError when the census has validation errors.
FitResult fit(const spec::ModelSpec& model, const census::Census& census,
              const ExperimentData* experiments = nullptr);

/// A model whose rates are all given, without reading the census (prepare_fixed with the
/// given coefficients as `coefficients` rows). Errors as for prepare_fixed().
FitResult fit_given(const spec::ModelSpec& model);

/// The fit as tables: `coefficients`, `model_comparison`, `establishment`, and with the seed
/// experiments `trapping`, `hazards`, `retention_curve`, `arrival_chain` (arrival_fit.hpp).
std::vector<report::TidyTable> fit_tables(const FitResult& result);

}  // namespace safesite::pipeline
