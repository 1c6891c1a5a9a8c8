#include "pipeline/detail/analysis_bridge.hpp"

#include <cmath>
#include <limits>

#include <Eigen/Dense>

#include "safesite/error.hpp"

namespace safesite::pipeline::detail {

namespace {

// ⟨u, x⟩ = Σ ω_i u_i x_i, the inner product of states (kernel_operator.hpp).
double inner(const Eigen::VectorXd& weights, const Eigen::VectorXd& u, const Eigen::VectorXd& x) {
    return (weights.array() * u.array() * x.array()).sum();
}

}  // namespace

analysis::EigenTriple eigen(const kernel::KernelOperator& op) {
    return analysis::dominant_eigen(op);
}

double directional_derivative(const kernel::KernelOperator& op,
                              const analysis::EigenTriple& triple,
                              const kernel::KernelOperator& derivative) {
    // dλ/dθ = uᵀ (∂A/∂θ) w / uᵀ w with u = Ω v the left eigenvector of the discretised A
    // (Caswell 2001 §9.1, eq. 9.10).
    if (derivative.rows() != op.rows())
        throw UsageError("directional derivative: the derivative kernel has another layout");
    Eigen::VectorXd y(op.rows());
    derivative.apply(kernel::KernelPart::all, triple.w.data(), y.data());
    return inner(triple.weights, triple.v, y) / inner(triple.weights, triple.v, triple.w);
}

namespace {

// ∂A/∂(a_m e_m) applied to w, read against v: R(w) ⟨v_entry(m), c_m⟩ / ⟨v, w⟩. F is
// Σ_m a_m e_m c_m(z') R(x) into the entry class of m (kernel_description.hpp).
Eigen::VectorXd recruitment_derivative(const kernel::KernelOperator& op,
                                       const analysis::EigenTriple& triple) {
    const double r = op.recruitment_input(triple.w.data());
    const double vw = inner(triple.weights, triple.v, triple.w);
    Eigen::VectorXd out(static_cast<Eigen::Index>(op.microsite_count()));
    for (std::size_t m = 0; m < op.microsite_count(); ++m) {
        const std::size_t k = op.entry_class(m);
        const Eigen::Index at = op.group_offset(k);
        const Eigen::Index n = op.group_size(k);
        const Eigen::VectorXd& c = op.recruit_density(m);
        out[static_cast<Eigen::Index>(m)] =
            r * inner(triple.weights.segment(at, n), triple.v.segment(at, n), c) / vw;
    }
    return out;
}

}  // namespace

Eigen::VectorXd d_lambda_d_arrival(const kernel::KernelOperator& op,
                                   const analysis::EigenTriple& triple) {
    Eigen::VectorXd d = recruitment_derivative(op, triple);
    for (std::size_t m = 0; m < op.microsite_count(); ++m)
        d[static_cast<Eigen::Index>(m)] *= op.establishment(m);
    return d;
}

Eigen::VectorXd d_lambda_d_establishment(const kernel::KernelOperator& op,
                                         const analysis::EigenTriple& triple) {
    Eigen::VectorXd d = recruitment_derivative(op, triple);
    for (std::size_t m = 0; m < op.microsite_count(); ++m)
        d[static_cast<Eigen::Index>(m)] *= op.arrival(m);
    return d;
}

LifeHistory life_history(const kernel::KernelOperator& op, const analysis::EigenTriple& triple) {
    // R0 = dominant eigenvalue of the next-generation operator F (I − P)⁻¹ (Ellner, Childs &
    // Rees 2016 §3.1; Caswell 2001 §5.3.4). Without discrete stages F x = r R(x) is rank one
    // (every class's seeds take the same recruitment route), so F N = r sᵀN and
    // R0 = sᵀ N r = R(N y) / R(x0) for y = F x0 and any x0 with R(x0) ≠ 0.
    // Generation time T = log R0 / log λ (Caswell 2001 §5.3.5).
    if (op.stage_count() != 0)
        throw UsageError("life history: kernels with discrete stages are not supported here");
    const Eigen::Index n = op.rows();
    const Eigen::VectorXd x0 = Eigen::VectorXd::Ones(n);
    const double r0_input = op.recruitment_input(x0.data());
    LifeHistory out;
    if (!(r0_input > 0.0)) {
        out.r0 = 0.0;
        out.generation_time = std::numeric_limits<double>::quiet_NaN();
        return out;
    }
    Eigen::VectorXd y(n);
    op.apply(kernel::KernelPart::reproduction, x0.data(), y.data());
    const Eigen::MatrixXd P = op.to_dense(kernel::KernelPart::survival_growth);
    const Eigen::VectorXd z = (Eigen::MatrixXd::Identity(n, n) - P).partialPivLu().solve(y);
    out.r0 = op.recruitment_input(z.data()) / r0_input;
    if (!std::isfinite(out.r0) || out.r0 < 0.0)
        throw NumericalError("R0 is not finite: I − P is singular (some plants never die)");
    const double log_lambda = std::log(triple.lambda);
    out.generation_time = std::abs(log_lambda) > 1e-12 ? std::log(out.r0) / log_lambda
                                                       : std::numeric_limits<double>::quiet_NaN();
    return out;
}

}  // namespace safesite::pipeline::detail
