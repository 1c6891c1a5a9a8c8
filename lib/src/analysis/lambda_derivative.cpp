// Parameter derivatives of λ from one eigen-triple (Caswell 2001 §9.2, eq. 9.10: dλ/dθ =
// vᵀ (∂A/∂θ) w / vᵀw; Ellner, Childs & Rees 2016 §4.3 for the kernel form with weights).
#include "safesite/analysis/lambda_derivative.hpp"

#include <cmath>
#include <string>

#include "safesite/error.hpp"

namespace safesite::analysis {

double lambda_derivative(const EigenTriple& triple, const PerturbationApply& apply_dA) {
    if (!apply_dA) throw UsageError("lambda_derivative: no perturbation given");
    Eigen::VectorXd y(triple.w.size());
    apply_dA(triple.w.data(), y.data());
    // <v, dA w> with the state weights; <v, w> = 1.
    return triple.weights.cwiseProduct(triple.v).dot(y);
}

double lambda_derivative(const EigenTriple& triple, const kernel::KernelOperator& plus,
                         const kernel::KernelOperator& minus, double step) {
    if (plus.rows() != triple.w.size() || minus.rows() != triple.w.size())
        throw UsageError("lambda_derivative: perturbed kernels have " +
                         std::to_string(plus.rows()) + " and " + std::to_string(minus.rows()) +
                         " states, the eigen-triple " + std::to_string(triple.w.size()));
    if (!(step > 0.0) || !std::isfinite(step))
        throw UsageError("lambda_derivative: step h must be positive and finite");
    Eigen::VectorXd yp(triple.w.size()), ym(triple.w.size());
    plus.apply(kernel::KernelPart::all, triple.w.data(), yp.data());
    minus.apply(kernel::KernelPart::all, triple.w.data(), ym.data());
    return triple.weights.cwiseProduct(triple.v).dot(yp - ym) / (2.0 * step);
}

RecruitmentSensitivity recruitment_sensitivity(const kernel::KernelOperator& op,
                                               const EigenTriple& triple) {
    const auto M = static_cast<Eigen::Index>(op.microsite_count());
    RecruitmentSensitivity out;
    out.arrival = Eigen::VectorXd::Zero(M);
    out.establishment = Eigen::VectorXd::Zero(M);
    out.arrival_redistribution = Eigen::VectorXd::Zero(M);
    out.arrival_elasticity = Eigen::VectorXd::Zero(M);
    if (M == 0) return out;
    // ∂A/∂a_m = e_m (c_m into the entry class) ⊗ (recruitment-route input row), so
    // <v, ∂A/∂a_m w> = e_m R(w) Σ_i ω_i v_{entry,i} c_m(z_i).
    const double route = op.recruitment_input(triple.w.data());
    const auto n = static_cast<Eigen::Index>(op.mesh_size());
    for (Eigen::Index m = 0; m < M; ++m) {
        const auto mm = static_cast<std::size_t>(m);
        const Eigen::Index off = op.group_offset(op.entry_class(mm));
        const double value = route * op.mesh().weights()
                                         .cwiseProduct(triple.v.segment(off, n))
                                         .dot(op.recruit_density(mm));
        out.arrival[m] = op.establishment(mm) * value;
        out.establishment[m] = op.arrival(mm) * value;
        out.arrival_elasticity[m] = op.arrival(mm) * out.arrival[m] / triple.lambda;
    }
    for (Eigen::Index m = 0; m < M; ++m) {
        if (M == 1) break;
        double others = 0.0;
        for (Eigen::Index j = 0; j < M; ++j)
            if (j != m) others += op.arrival(static_cast<std::size_t>(j));
        double change = out.arrival[m];
        for (Eigen::Index j = 0; j < M; ++j) {
            if (j == m) continue;
            const double share = others > 0.0 ? op.arrival(static_cast<std::size_t>(j)) / others
                                               : 1.0 / static_cast<double>(M - 1);
            change -= share * out.arrival[j];
        }
        out.arrival_redistribution[m] = change;
    }
    return out;
}

}  // namespace safesite::analysis
