// Kernel sensitivity and elasticity (Caswell 2001 eq. 9.10 and 9.27; Easterling, Ellner &
// Dixon 2000 eq. 9–10; the weighted inner product of Ellner, Childs & Rees 2016 §4.3).
#include "safesite/analysis/kernel_sensitivity.hpp"

namespace safesite::analysis {

namespace {
Eigen::VectorXd segment(const Eigen::VectorXd& x, const kernel::KernelOperator& op,
                        std::size_t group) {
    return x.segment(op.group_offset(group), op.group_size(group));
}
}  // namespace

Eigen::MatrixXd KernelSensitivity::sensitivity(std::size_t to, std::size_t from) const {
    // s_ij = v_i w_j / <v, w>, and <v, w> = 1 by construction of the triple.
    return segment(m_triple.v, m_op, to) * segment(m_triple.w, m_op, from).transpose();
}

Eigen::MatrixXd KernelSensitivity::matrix_sensitivity(std::size_t to, std::size_t from) const {
    // dλ/dA_ij = u_i w_j / (u·w) with u = ω ∘ v the left eigenvector of A; u·w = <v, w> = 1.
    const Eigen::VectorXd u = segment(m_triple.weights.cwiseProduct(m_triple.v), m_op, to);
    return u * segment(m_triple.w, m_op, from).transpose();
}

Eigen::MatrixXd KernelSensitivity::elasticity(std::size_t to, std::size_t from,
                                              kernel::KernelPart part) const {
    // E_ij = A_ij (dλ/dA_ij) / λ.
    return m_op.block(to, from, part).cwiseProduct(matrix_sensitivity(to, from)) /
           m_triple.lambda;
}

Eigen::MatrixXd KernelSensitivity::elasticity_block_sums(kernel::KernelPart part) const {
    const std::size_t G = m_op.group_count();
    Eigen::MatrixXd sums(static_cast<Eigen::Index>(G), static_cast<Eigen::Index>(G));
    const Eigen::VectorXd u = m_triple.weights.cwiseProduct(m_triple.v);
    for (std::size_t to = 0; to < G; ++to)
        for (std::size_t from = 0; from < G; ++from)
            // Σ_ij A_ij u_i w_j / λ = u_toᵀ A_block w_from / λ.
            sums(static_cast<Eigen::Index>(to), static_cast<Eigen::Index>(from)) =
                segment(u, m_op, to).dot(m_op.block(to, from, part) *
                                         segment(m_triple.w, m_op, from)) /
                m_triple.lambda;
    return sums;
}

Eigen::MatrixXd KernelSensitivity::matrix_sensitivity() const {
    return m_triple.weights.cwiseProduct(m_triple.v) * m_triple.w.transpose();
}

Eigen::MatrixXd KernelSensitivity::elasticity_matrix(kernel::KernelPart part) const {
    return m_op.to_dense(part).cwiseProduct(matrix_sensitivity()) / m_triple.lambda;
}

}  // namespace safesite::analysis
