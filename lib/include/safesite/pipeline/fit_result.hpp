#pragma once
/// \file fit_result.hpp
/// What `fit` returns: the vital-rate regressions as plain rows (coefficients, model
/// comparison), establishment and arrival, and the PreparedModel that `analyse` runs on.

#include <cstddef>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "safesite/pipeline/arrival_fit.hpp"
#include "safesite/pipeline/establishment.hpp"
#include "safesite/pipeline/prepared_model.hpp"

namespace safesite::pipeline {

/// One parameter of one fitted (or given) regression; see docs/formats.md, `coefficients`.
struct CoefficientRow {
    static constexpr double nan = std::numeric_limits<double>::quiet_NaN();
    std::string rate;           ///< survival | growth | flowering | seeds | recruit_size |
                                ///< trapping | retention
    std::string model;          ///< all | years | pooled
    std::string year_handling;  ///< none | fixed | random
    std::string source;         ///< fitted | given
    std::string term;           ///< design column or dispersion parameter name
    double estimate = nan;
    double std_error = nan;
    double statistic = nan;
    double p_value = nan;
};

/// One candidate formula of one rate; see docs/formats.md, `model_comparison`.
struct ComparisonRow {
    std::string rate;
    std::string model;          ///< all | years
    std::string formula;
    double aic = 0.0;
    double delta_aic = 0.0;
    double weight = 0.0;
    bool chosen = false;
    int parameters = 0;
    double log_likelihood = 0.0;
};

/// A short description of one rate's fit.
struct RateSummary {
    std::string rate;
    std::string family;
    std::string link;
    std::string formula;        ///< the chosen formula (with `+ year` for year = fixed)
    std::string year_handling;
    bool given = false;         ///< fixed coefficients, not fitted
    std::size_t observations = 0;  ///< rows used by the fit of the year kernels
};

/// Everything `fit` produces.
struct FitResult {
    std::vector<RateSummary> rates;
    std::vector<CoefficientRow> coefficients;
    std::vector<ComparisonRow> comparison;
    /// Establishment estimated from the census (empty `rows` when given in the model file).
    EstablishmentEstimate establishment;
    bool establishment_given = false;
    /// The fitted seed experiments and their arrival chain (`[arrival] method =
    /// "experiments"`); empty when the arrival fractions are given.
    std::optional<ArrivalFit> arrival;
    /// The model ready for `analyse`: bound rates of every kernel, a, e, settings.
    PreparedModel model;
    std::vector<std::string> warnings;
};

}  // namespace safesite::pipeline
