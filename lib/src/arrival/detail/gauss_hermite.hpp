#pragma once
// Gauss–Hermite rule for expectations over a standard normal (private to lib/src/arrival).

#include <vector>

namespace safesite::arrival::detail {

/// Nodes x_k and weights w_k with Σ_k w_k f(x_k) ≈ E[f(Z)], Z ~ N(0, 1) (probabilists'
/// Hermite rule, exact for polynomials of degree ≤ 2n − 1), by the Golub–Welsch eigenvalue
/// method (Golub & Welsch 1969, Math. Comp. 23:221; from memory). n ≥ 1.
struct NormalRule {
    std::vector<double> nodes;
    std::vector<double> weights;
};
NormalRule normal_rule(int n);

}  // namespace safesite::arrival::detail
