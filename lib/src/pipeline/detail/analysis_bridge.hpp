#pragma once
// The calls the pipeline makes into the kernel and analysis modules, in one place.

#include <Eigen/Core>

#include "safesite/analysis/eigen_triple.hpp"
#include "safesite/kernel/kernel_operator.hpp"

namespace safesite::pipeline::detail {

/// R0 and generation time of a kernel.
struct LifeHistory {
    double r0 = 0.0;
    double generation_time = 0.0;
};

analysis::EigenTriple eigen(const kernel::KernelOperator& op);

/// dλ/dθ = ⟨v, (∂A/∂θ) w⟩ / ⟨v, w⟩ with ∂A/∂θ given as an operator on the same mesh.
double directional_derivative(const kernel::KernelOperator& op,
                              const analysis::EigenTriple& triple,
                              const kernel::KernelOperator& derivative);

/// dλ/da_m for every microsite m.
Eigen::VectorXd d_lambda_d_arrival(const kernel::KernelOperator& op,
                                   const analysis::EigenTriple& triple);
/// dλ/de_m for every microsite m.
Eigen::VectorXd d_lambda_d_establishment(const kernel::KernelOperator& op,
                                         const analysis::EigenTriple& triple);

LifeHistory life_history(const kernel::KernelOperator& op, const analysis::EigenTriple& triple);

}  // namespace safesite::pipeline::detail
