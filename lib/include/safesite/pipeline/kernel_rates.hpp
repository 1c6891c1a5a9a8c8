#pragma once
/// \file kernel_rates.hpp
/// The vital rates of one kernel (one census year t → t+1, or the pooled "average year"),
/// bound and ready to be evaluated on a size mesh, and the layout of the microsite-split
/// kernel they feed (docs/methods/pipeline.md, "Kernels").
///
/// A rate is a prediction on new data: given a table whose rows are covariate values (size on
/// the kernel scale, microsite, seedling flag), it returns the mean response of each row on
/// the response scale and, for the Gaussian families, the residual SD. The fitting step
/// (fit.hpp) binds the year: a fixed year effect sets the `year` factor to the kernel's year,
/// a random year effect adds that year's conditional mode, the pooled kernel uses the fit
/// without year (fixed) or the fixed effects alone (random).

#include <functional>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "safesite/stats/table.hpp"

namespace safesite::pipeline {

/// A prediction per row of a covariate table (one value per row).
using TablePrediction = std::function<Eigen::VectorXd(const stats::Table&)>;

/// One vital rate bound to one kernel.
struct BoundRate {
    /// E[y | covariates] on the response scale: a probability for survival and flowering,
    /// seeds per flowering plant, mean size at t+1 (growth) or recruit size (recruit_size).
    TablePrediction mean;
    /// Gaussian families only: the residual SD per row (size units of the kernel scale, > 0).
    TablePrediction sd;
};

/// The five vital rates of one kernel, as named in the model file's `[rates.*]` tables.
struct KernelRates {
    std::string label;      ///< census year label t, or "pooled"
    BoundRate survival;     ///< s(z): on transitions; P(survived)
    BoundRate growth;       ///< g(z'|z) = N(mean(z), sd(z)²) on transitions of survivors
    BoundRate flowering;    ///< p(z)
    BoundRate seeds;        ///< b(z): seeds per flowering plant
    BoundRate recruit_size; ///< c_m(z') = N(mean_m, sd_m²) on the recruits table
};

/// Recruitment parameters (one entry per microsite): a_m and e_m.
struct RecruitmentParameters {
    Eigen::VectorXd arrival;        ///< a_m ∈ [0, 1], Σ a_m ≤ 1
    Eigen::VectorXd establishment;  ///< e_m ≥ 0
};

/// How plants in their first year are represented.
enum class JuvenileMode {
    /// No separate class; "juveniles" for the perturbation are plants below a size threshold.
    size_threshold,
    /// One first-year class per microsite: recruits enter it, its rates are evaluated with
    /// seedling = 1, its survivors join the established class of the same microsite
    /// (seedling = 0). Needs a census that flags seedlings.
    seedling_class,
};

/// The structure of the kernel (identical for every year).
struct KernelLayout {
    std::vector<std::string> microsites;  ///< labels in model-file order, M ≥ 1
    JuvenileMode juvenile = JuvenileMode::size_threshold;
    /// size_threshold mode: juveniles are plants with z < this (kernel scale). NaN = none.
    double juvenile_size_below = 0.0;
    /// Levels of the `year` factor the fitted models know (used to type the prediction table).
    std::vector<std::string> year_levels;

    /// Number of continuous classes: M, or 2M with a first-year class per microsite.
    std::size_t classes() const {
        return juvenile == JuvenileMode::seedling_class ? 2 * microsites.size()
                                                        : microsites.size();
    }
    /// Class of the established plants of microsite m (classes 0..M−1).
    std::size_t established_class(std::size_t m) const { return m; }
    /// Class of the first-year plants of microsite m (classes M..2M−1; seedling_class only).
    std::size_t juvenile_class(std::size_t m) const { return microsites.size() + m; }
};

/// The covariate table of one class on a set of sizes: columns `size` (the given values),
/// `microsite` (categorical, levels = layout.microsites), `seedling` (0/1) and `year`
/// (categorical with value `year`; levels = layout.year_levels, plus `year` if absent).
stats::Table covariate_table(const KernelLayout& layout, const Eigen::VectorXd& sizes,
                             std::size_t microsite, bool seedling, const std::string& year);

/// The rate as it predicts in kernel `label`, wherever it is used: the `year` column of the
/// covariate table is set to `label` before predicting (rates with year effects read it). Used
/// to put one year's rate into another kernel (the year-to-year decomposition).
BoundRate pin_year(const BoundRate& rate, const std::string& label);

}  // namespace safesite::pipeline
