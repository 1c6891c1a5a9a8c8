#pragma once
/// \file mesh.hpp
/// The size mesh of an integral projection model: n quadrature nodes on [L, U] with weights.

#include <cstddef>

#include <Eigen/Core>

namespace safesite::kernel {

/// How the size integral \f$\int_L^U f(z)\,dz\f$ is replaced by a sum \f$\sum_i w_i f(z_i)\f$.
enum class QuadratureRule {
    /// Midpoint rule: \f$h = (U-L)/n\f$, \f$z_i = L + (i + 1/2) h\f$, \f$w_i = h\f$
    /// (Easterling et al. 2000). Error \f$O(h^2)\f$ for smooth kernels.
    midpoint,
    /// Gauss–Legendre rule with n nodes mapped from [-1, 1] to [L, U]: exact for polynomials
    /// of degree ≤ 2n − 1 (Ellner, Childs & Rees 2016, section 6.8). Nodes are the zeros of
    /// the Legendre polynomial \f$P_n\f$ (Boost.Math `legendre_p_zeros`), weights
    /// \f$w_i = 2 / ((1 - x_i^2) P_n'(x_i)^2)\f$ times \f$(U-L)/2\f$.
    gauss_legendre,
};

/// A mesh on [L, U] (size on the user's scale, usually log size) with n nodes, ascending.
///
/// Throws KernelError (block "mesh", parameter "lower"/"upper" or "size") when L or U is not
/// finite, L ≥ U, or n < 2.
class Mesh {
public:
    Mesh(double lower, double upper, std::size_t size,
         QuadratureRule rule = QuadratureRule::midpoint);

    /// Nodes \f$z_1 < \dots < z_n\f$ in (L, U).
    const Eigen::VectorXd& points() const noexcept { return m_points; }
    /// Quadrature weights \f$w_i > 0\f$, summing to U − L.
    const Eigen::VectorXd& weights() const noexcept { return m_weights; }
    double lower() const noexcept { return m_lower; }
    double upper() const noexcept { return m_upper; }
    /// Number of nodes n ≥ 2.
    std::size_t size() const noexcept { return static_cast<std::size_t>(m_points.size()); }
    QuadratureRule rule() const noexcept { return m_rule; }

private:
    double m_lower;
    double m_upper;
    QuadratureRule m_rule;
    Eigen::VectorXd m_points;
    Eigen::VectorXd m_weights;
};

}  // namespace safesite::kernel
