#pragma once
/// \file analyse.hpp
/// The analyses of a prepared model (docs/methods/pipeline.md, "Analyses"): λ, R0,
/// generation time, w and v of every year kernel and of the pooled kernel; the juvenile
/// survival perturbation with its sensitivity and elasticity; mesh-convergence and eviction
/// diagnostics; scenarios; sensitivities of the pooled λ to a_m, e_m, c_f and h_m; and the
/// break-even bare-soil establishment of every neighbour form.

#include "safesite/pipeline/analysis_result.hpp"
#include "safesite/pipeline/prepared_model.hpp"

namespace safesite::pipeline {

/// Run every analysis on `model`.
///
/// Throws UsageError for an inconsistent PreparedModel (sizes, labels), kernel::KernelError
/// (a UsageError) for inadmissible vital-rate values, NumericalError (analysis::EigenError)
/// when a kernel has no unique positive dominant eigenvalue.
AnalysisResult analyse(const PreparedModel& model);

/// The recruitment parameters of kernel `index` of `model` (0..years−1: census years; years:
/// pooled) under the baseline.
RecruitmentParameters baseline_recruitment(const PreparedModel& model, std::size_t index);

}  // namespace safesite::pipeline
