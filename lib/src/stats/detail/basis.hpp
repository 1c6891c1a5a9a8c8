#pragma once
// Bases of the function atoms: orthogonal polynomials and natural cubic splines.
// Private to lib/src/stats.

#include <vector>

#include <Eigen/Core>

namespace safesite::stats::detail {

/// Orthogonal-polynomial constants from training values x (degree k): fills alpha (k values)
/// and norm2 (k + 2 values). Returns false when x has fewer than k + 1 distinct values.
bool orthpoly_learn(const Eigen::VectorXd& x, int degree, std::vector<double>& alpha,
                    std::vector<double>& norm2);
/// n × k matrix of the orthogonal polynomials of degree 1..k at x, from the stored constants.
Eigen::MatrixXd orthpoly_basis(const Eigen::VectorXd& x, const std::vector<double>& alpha,
                               const std::vector<double>& norm2);

/// Type-7 sample quantile (linear interpolation between order statistics; Hyndman & Fan 1996).
double quantile_type7(std::vector<double> sorted_values, double p);

/// n × df natural cubic spline basis at x with boundary knots lower < upper and the interior
/// knots (df = interior knots + 1).
Eigen::MatrixXd nspline_basis(const Eigen::VectorXd& x, double lower, double upper,
                              const std::vector<double>& interior);

}  // namespace safesite::stats::detail
