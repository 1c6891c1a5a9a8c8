#pragma once
/// \file model_comparison.hpp
/// Comparison of candidate models for one vital rate by AIC (Burnham & Anderson 2002, §2.9):
/// \f$\Delta_i = \mathrm{AIC}_i - \min_j \mathrm{AIC}_j\f$ and Akaike weights
/// \f$w_i = e^{-\Delta_i/2} / \sum_j e^{-\Delta_j/2}\f$.

#include <cstddef>
#include <string>
#include <vector>

#include "safesite/stats/glm.hpp"

namespace safesite::stats {

/// Candidates sorted by AIC (ties kept in input order).
struct ComparisonTable {
    struct Row {
        std::string label;       ///< caller's label (e.g. the formula)
        std::size_t index;       ///< position in the input
        double aic;
        double delta_aic;        ///< AIC − smallest AIC, ≥ 0
        double weight;           ///< Akaike weight, Σ = 1
        double loglik;
        int n_parameters;
        double deviance;
        std::size_t n;           ///< rows used
    };
    std::vector<Row> rows;
};

/// Compare fits of the same response on the same rows. Throws UsageError when the labels and
/// fits differ in number, the list is empty, or the fits used different numbers of rows
/// (AIC is not comparable then).
ComparisonTable compare_models(const std::vector<GlmFit>& fits,
                               const std::vector<std::string>& labels);

}  // namespace safesite::stats
