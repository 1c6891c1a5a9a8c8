#pragma once
/// \file bootstrap.hpp
/// Confidence intervals by the nonparametric bootstrap (`[uncertainty] replicates > 0`;
/// docs/methods/pipeline.md, "Confidence intervals"): resample the data, refit every model,
/// rebuild the kernels, reanalyse, and read intervals off the replicate distribution.
///
/// Resampling units (cases resampled with replacement; Efron & Tibshirani 1993 ch. 6;
/// Davison & Hinkley 1997 §3.8 for clustered data):
/// - census: whole plant histories, within the cohort of the plant's first census year, so
///   every cohort keeps its size and every plant its own sequence of records;
/// - trapping trials: whole neighbours (all their trials), within growth form;
/// - retention checks: whole stations (all their seeds), within microsite.
/// A unit drawn k times enters k times under distinct ids ("<id>#<k>").
///
/// Every replicate r draws from its own stream, seeded by (seed, r), and its results are kept
/// at index r: the intervals do not depend on the number of threads.

#include <cstddef>
#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include "safesite/pipeline/run.hpp"
#include "safesite/report/tidy_table.hpp"
#include "safesite/spec/model_spec.hpp"

namespace safesite::pipeline {

/// Settings of a bootstrap.
struct BootstrapOptions {
    std::size_t replicates = 0;  ///< B ≥ 2
    std::uint64_t seed = 1;      ///< every replicate's stream derives from (seed, r)
    double level = 0.95;         ///< 0 < level < 1, two-sided
    unsigned threads = 0;        ///< worker threads; 0: the machine's hardware threads
    /// Called after each replicate (failed ones included) with the number done so far and B:
    /// 1, 2, …, B in this order, one call at a time (under a lock; from whichever thread
    /// finished the replicate). For a progress display; it must not throw and should be quick.
    /// Empty: not called.
    std::function<void(std::size_t done, std::size_t total)> progress;
};

/// One quantity's interval.
struct BootstrapInterval {
    std::string quantity;  ///< lambda | arrival | establishment | scenario_lambda |
                           ///< scenario_delta_lambda | juvenile_elasticity | trapping | hazard
    std::string kernel;    ///< a census year, `pooled`, or empty (chain quantities)
    std::string target;    ///< microsite, scenario name, or empty
    double estimate = 0.0; ///< the value of the run on the original data
    double lower = 0.0;    ///< percentile interval, type-7 quantile at (1 − level)/2
    double upper = 0.0;    ///< … and at (1 + level)/2
    double std_error = 0.0;///< SD of the replicate values
    std::size_t replicates = 0;  ///< replicates with a finite value
};

/// What a bootstrap returns.
struct BootstrapResult {
    std::size_t requested = 0;  ///< B
    std::size_t failed = 0;     ///< replicates whose refit or analysis threw
    double level = 0.95;
    std::vector<BootstrapInterval> intervals;
    /// Replicate values, `values[r][q]` for replicate r and the quantity of intervals[q]
    /// (NaN for a failed replicate or a value it did not produce).
    std::vector<std::vector<double>> values;
    std::vector<std::string> warnings;  ///< e.g. the first failure reasons
};

/// Bootstrap the run `baseline` of `model` (which must read a census: `[data] census`).
/// Replicates refit with the model file's settings on resampled data, on the baseline's mesh;
/// break-even, the mesh check and the survival perturbations are not recomputed.
/// \throws UsageError for B < 2, a level outside (0, 1), or a model without a census;
///         DataError as reading the census and experiment files.
BootstrapResult bootstrap(const spec::ModelSpec& model, const RunResult& baseline,
                          const BootstrapOptions& options);

/// Quantile of type 7 (linear interpolation between order statistics; Hyndman & Fan 1996) of
/// the finite values of `x` at probability p in [0, 1]; NaN when none is finite.
double quantile_type7(std::vector<double> x, double p);

/// `intervals` (one row per quantity) and `bootstrap_replicates` (one row per replicate ×
/// quantity) as tidy tables (docs/formats.md).
std::vector<report::TidyTable> bootstrap_tables(const BootstrapResult& result);

}  // namespace safesite::pipeline
