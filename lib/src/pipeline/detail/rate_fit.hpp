#pragma once
// Fitting one vital rate of the model file: candidates by AIC, year handling none / fixed /
// random, GLM or mixed model, and the binding of the result to year and pooled kernels.

#include <functional>
#include <string>
#include <vector>

#include "safesite/pipeline/fit_result.hpp"
#include "safesite/pipeline/kernel_rates.hpp"
#include "safesite/spec/rate_spec.hpp"
#include "safesite/stats/table.hpp"

namespace safesite::pipeline::detail {

/// One rate, fitted (or given) and bound.
struct RateOutcome {
    RateSummary summary;
    std::vector<CoefficientRow> coefficients;
    std::vector<ComparisonRow> comparison;
    std::vector<std::string> warnings;
    /// The rate for the kernel of census year `label` (t → t+1).
    std::function<BoundRate(const std::string& label)> for_year;
    /// The rate for the pooled kernel.
    BoundRate pooled;
};

/// Fit `rate` on `data` (the rows the rate is fitted on, already selected: e.g. survivors for
/// growth). `layout` types the year factor. Throws SpecError (located at the rate) for a
/// family the requested model cannot take (e.g. year = "random" with gaussian-spread), and
/// the stats module's errors for bad formulas or data.
RateOutcome fit_rate(const spec::RateSpec& rate, const stats::Table& data,
                     const KernelLayout& layout);

/// A given (fixed-coefficient) rate, with an optional shift of its linear predictor in the
/// year `label` (0 for none). Throws SpecError located at the rate.
BoundRate fixed_rate(const spec::RateSpec& rate, const KernelLayout& layout, double shift,
                     const std::string& label);

/// The coefficient rows of a given rate (source "given").
std::vector<CoefficientRow> given_rows(const spec::RateSpec& rate);

}  // namespace safesite::pipeline::detail
