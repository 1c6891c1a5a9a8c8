#include "arrival/detail/gauss_hermite.hpp"

#include <cmath>

#include <Eigen/Eigenvalues>

namespace safesite::arrival::detail {

NormalRule normal_rule(int n) {
    // The probabilists' Hermite polynomials satisfy He_{k+1}(x) = x He_k(x) − k He_{k−1}(x), so
    // the Jacobi matrix is tridiagonal with zero diagonal and off-diagonal √k (k = 1..n−1). Its
    // eigenvalues are the nodes; the weights are the squared first components of the
    // normalised eigenvectors (the total mass of N(0, 1) is 1) [Golub & Welsch 1969].
    Eigen::MatrixXd jacobi = Eigen::MatrixXd::Zero(n, n);
    for (int k = 1; k < n; ++k) {
        jacobi(k, k - 1) = std::sqrt(static_cast<double>(k));
        jacobi(k - 1, k) = jacobi(k, k - 1);
    }
    Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> solver(jacobi);
    NormalRule rule;
    for (int k = 0; k < n; ++k) {
        rule.nodes.push_back(solver.eigenvalues()[k]);
        const double v0 = solver.eigenvectors()(0, k);
        rule.weights.push_back(v0 * v0);
    }
    return rule;
}

}  // namespace safesite::arrival::detail
