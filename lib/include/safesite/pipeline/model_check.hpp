#pragma once
/// \file model_check.hpp
/// Model checking (docs/methods/model-checking.md): the fitted vital rates against the census
/// they were fitted to, per microsite, and the pooled kernel's surfaces, as tidy tables whose
/// names start with `check_` (docs/formats.md, "Model-checking tables"). The figures
/// (report/model_check_figures.hpp) are drawn from these tables alone.
///
/// The small rules behind the tables (binning, Wilson intervals, Blom positions, subsampling,
/// downsampling of surfaces) are exposed for their tests.

#include <cstddef>
#include <cstdint>
#include <optional>
#include <vector>

#include "safesite/census/transition_data.hpp"
#include "safesite/pipeline/analysis_result.hpp"
#include "safesite/pipeline/arrival_fit.hpp"
#include "safesite/pipeline/fit_result.hpp"
#include "safesite/report/tidy_table.hpp"

namespace safesite::pipeline {

/// A proportion with its Wilson score interval.
struct WilsonInterval {
    double proportion = 0.0;  ///< k / n
    double lower = 0.0;
    double upper = 0.0;
};

/// The Wilson (1927) score interval for k successes in n trials at normal quantile z
/// (default z_{0.975}, a 95 % interval):
/// \f[ \frac{k + z^2/2}{n + z^2} \pm \frac{z\sqrt{n}}{n + z^2}\sqrt{\hat p (1 - \hat p) + z^2/(4n)} \f]
/// with \f$\hat p = k/n\f$. \pre 0 <= k <= n, n >= 1.
WilsonInterval wilson_interval(std::int64_t k, std::int64_t n, double z = 1.959963984540054);

/// Number of equal-count size bins for n plants: \f$B = \min(15, \max(1, \lfloor n/30 \rfloor))\f$
/// — at least 30 plants a bin (a Wilson half-width of at most about 0.17), at most 15 bins.
std::size_t equal_count_bin_count(std::size_t n);

/// Equal-count bins of n values sorted ascending: the bin of sorted position i is
/// \f$\lfloor i B / n \rfloor\f$ (bin sizes differ by at most one). Returns the bin per
/// sorted position.
std::vector<std::size_t> equal_count_bins(std::size_t n, std::size_t bins);

/// Blom (1958) plotting positions \f$p_i = (i - 3/8)/(n + 1/4)\f$, i = 1..n.
std::vector<double> blom_positions(std::size_t n);

/// Standard normal quantiles Φ⁻¹ of the Blom positions of n points (Boost.Math).
std::vector<double> normal_scores(std::size_t n);

/// The deterministic subsample of n rows kept when n > max: the rows
/// \f$\lfloor (j + 1/2)\, n / m \rfloor\f$, j = 0..m−1 with m = max (evenly spread over the
/// census order); all rows 0..n−1 when n <= max.
std::vector<std::size_t> subsample_rows(std::size_t n, std::size_t max);

/// Points kept per microsite (and stage) in the scatter tables (check_growth, check_seeds).
inline constexpr std::size_t k_max_scatter_points = 2000;

/// Sturges (1926) histogram bins: \f$\lceil \log_2 n \rceil + 1\f$ (1 for n <= 1).
std::size_t sturges_bins(std::size_t n);

/// Stride of the downsampling of kernel surfaces: mesh nodes are grouped in runs of s
/// consecutive nodes, \f$s = \lceil n / m \rceil\f$ with
/// \f$m = \min(50, \max(5, \lfloor\sqrt{20000 / \text{blocks}}\rfloor))\f$, so that a block has
/// at most 50×50 cells and a surface at most about 20 000 cells over its non-empty blocks.
std::size_t surface_stride(std::size_t n, std::size_t blocks);

/// The data the checks compare the fits with: the census' regression tables and, with
/// `[arrival] method = "experiments"`, the seed experiments as read.
struct CheckData {
    census::TransitionData census;
    std::optional<ExperimentData> experiments;
};

/// The model-checking tables (docs/formats.md, "Model-checking tables"), in this order:
/// `check_binned`, `check_curves`, `check_growth`, `check_seeds`, `check_recruit_sizes`,
/// (with the seed experiments: `check_trapping`, `check_trapping_curve`, `check_retention`),
/// `check_size_distribution` — these need `data` — then `check_surfaces` (the pooled kernel,
/// its sensitivity and elasticity, downsampled), which needs only the fit.
/// Without `data` only `check_surfaces` is made.
/// \throws as the kernel and eigen routines of analyse() (the pooled kernel is rebuilt).
std::vector<report::TidyTable> model_check_tables(const FitResult& fit,
                                                  const AnalysisResult& analysis,
                                                  const CheckData* data);

}  // namespace safesite::pipeline
