#pragma once
/// \file rate_spec.hpp
/// One vital rate as the model file describes it (`[rates.<name>]`, docs/formats.md).

#include <map>
#include <optional>
#include <string>
#include <vector>

#include "safesite/error.hpp"
#include "safesite/spec/formula_source.hpp"

namespace safesite::spec {

/// How census year enters a rate: not at all, as a fixed factor, or as a random intercept
/// (mixed model, issue 6).
enum class YearHandling { none, fixed, random };

/// A vital rate: a regression to fit, or fixed parameter values (a truth file, or a model
/// without data). Plain values, validated by the reader (style guide 4.8).
struct RateSpec {
    /// survival | growth | flowering | seeds | recruit_size.
    std::string name;
    /// binomial | poisson | negbin | gaussian | gaussian-spread (Gaussian with
    /// sd(x) = exp(g0 + g1·x)). Kept as text: stats owns the Family type.
    std::string family;
    /// logit | probit | cloglog (binomial); log (poisson, negbin); identity (gaussian,
    /// gaussian-spread). Filled with the canonical link when the file gives none.
    std::string link;
    /// Wilkinson–Rogers formula; its response is the rate's column (survived, size_next,
    /// flowered, seeds, size).
    std::string formula;
    /// Alternative formulas compared with `formula` by AIC (may be empty).
    std::vector<std::string> candidates;
    YearHandling year = YearHandling::none;
    /// Grouping factors for random intercepts (columns of the rate's table).
    std::vector<std::string> groups;
    /// Column with a random slope by year (only with year = random).
    std::optional<std::string> random_slope;
    /// gaussian-spread: the column x of the spread model (default "size").
    std::optional<std::string> spread;

    /// Fixed coefficients by design-matrix column name ("(Intercept)", "size",
    /// "microsite[cushion]", ...). Present ⇔ the rate is fixed (not fitted).
    std::optional<std::map<std::string, double>> coefficients;
    /// gaussian, fixed: constant residual SD, > 0.
    std::optional<double> sd;
    /// gaussian-spread, fixed: {g0, g1} of sd(x) = exp(g0 + g1·x).
    std::vector<double> spread_coefficients;
    /// negbin, fixed: dispersion θ > 0 (variance μ + μ²/θ).
    std::optional<double> theta;
    /// fixed, year = random: SD ≥ 0 of the year intercepts drawn by `simulate`.
    std::optional<double> year_sd;

    /// Where the table and its formula are in the model file (for later errors, e.g. a
    /// formula naming an unknown column: throw SpecError(formula_at, ...)).
    SourceLocation at;
    SourceLocation formula_at;
    /// Where `formula` and each of `candidates` stand in the file (errors at a character of
    /// the user's text: formula_error()).
    FormulaSource formula_source;
    std::vector<FormulaSource> candidate_sources;

    bool is_fixed() const noexcept { return coefficients.has_value(); }
};

/// The model-file spelling of year handling: "none", "fixed", "random".
const char* to_string(YearHandling y) noexcept;

}  // namespace safesite::spec
