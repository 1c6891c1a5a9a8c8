#pragma once
/// \file kernel_sensitivity.hpp
/// Sensitivity and elasticity of λ to the kernel, block by block.

#include <cstddef>

#include <Eigen/Core>

#include "safesite/analysis/eigen_triple.hpp"
#include "safesite/kernel/kernel_operator.hpp"

namespace safesite::analysis {

/// Kernel sensitivity and elasticity (Caswell 2001 §9.1–9.2; Easterling, Ellner & Dixon 2000):
///
/// \f[ s(z', z) = \frac{v(z')\, w(z)}{\langle v, w\rangle}, \qquad
///     e(z', z) = \frac{K(z', z)\, s(z', z)}{\lambda}, \f]
///
/// with ⟨v, w⟩ = 1 by the EigenTriple normalisation. On the mesh, `sensitivity` gives the
/// function values \f$s(z_i, z_j) = v_i w_j\f$; `matrix_sensitivity` the derivative of λ with
/// respect to the entries of the discretised matrix A, \f$\partial\lambda/\partial A_{ij} =
/// \omega_i v_i w_j\f$; `elasticity` the cell masses \f$E_{ij} = A_{ij}\,\omega_i v_i w_j /
/// \lambda = e(z_i, z_j)\,\omega_i \omega_j\f$, which sum to 1 over all blocks. For a plain
/// stage matrix (ω = 1) the three are the usual matrix sensitivity and elasticity.
///
/// Blocks are indexed by groups (classes 0..B−1, then stages B..B+D−1) as in KernelOperator.
/// Holds references: `op` and `triple` must outlive this object.
class KernelSensitivity {
public:
    KernelSensitivity(const kernel::KernelOperator& op, const EigenTriple& triple)
        : m_op(op), m_triple(triple) {}

    /// \f$s(z_i, z_j)\f$ for rows in group `to` and columns in group `from`.
    Eigen::MatrixXd sensitivity(std::size_t to, std::size_t from) const;
    /// \f$\partial\lambda/\partial A_{ij}\f$ for the block.
    Eigen::MatrixXd matrix_sensitivity(std::size_t to, std::size_t from) const;
    /// Elasticity cell masses \f$E_{ij}\f$ of the block (all parts of K, or one part).
    Eigen::MatrixXd elasticity(std::size_t to, std::size_t from,
                               kernel::KernelPart part = kernel::KernelPart::all) const;
    /// G×G matrix of block sums of the elasticity (sums to 1 for part = all): the share of λ
    /// carried by each transition type (survival–growth within a class, recruitment into a
    /// class, seed bank flows, ...).
    Eigen::MatrixXd elasticity_block_sums(kernel::KernelPart part = kernel::KernelPart::all) const;

    /// Whole-state matrices (B·n + D)²: only for small state spaces.
    Eigen::MatrixXd matrix_sensitivity() const;
    Eigen::MatrixXd elasticity_matrix(kernel::KernelPart part = kernel::KernelPart::all) const;

private:
    const kernel::KernelOperator& m_op;
    const EigenTriple& m_triple;
};

}  // namespace safesite::analysis
