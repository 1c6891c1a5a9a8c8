#pragma once
/// \file optimise.hpp
/// (private) Thin wrappers around the optimisers used by the mixed-model engine:
/// Boost.Math's Brent minimiser (one variance parameter) and NLopt's BOBYQA [Powell2009]
/// (several parameters, bound-constrained, derivative-free), plus a central-difference
/// Hessian for observed-information standard errors.

#include <functional>
#include <string>
#include <vector>

#include <Eigen/Core>

namespace safesite::stats::detail {

using Objective = std::function<double(const Eigen::VectorXd&)>;

struct OptimiseResult {
    Eigen::VectorXd x;
    double f = 0.0;
    int evaluations = 0;
    bool converged = false;
    std::string message;  ///< why it stopped, when it did not converge
};

/// Brent's method on [0, upper], widening `upper` fourfold (up to 6 times) while the
/// minimum sits at its top end.
/// `bits`: requested precision of the minimiser's location (at most 26 for double).
OptimiseResult minimise_brent(const std::function<double(double)>& f, double upper,
                              int max_evaluations, int bits = 26);

/// BOBYQA from x0 with lower bounds (−∞ allowed) and per-coordinate initial steps.
OptimiseResult minimise_bobyqa(const Objective& f, const Eigen::VectorXd& x0,
                               const std::vector<double>& lower, const Eigen::VectorXd& step,
                               double xtol_rel, double ftol_abs, int max_evaluations);

/// Central-difference Hessian of f at x with steps h (f(x) given as fx).
Eigen::MatrixXd numeric_hessian(const Objective& f, const Eigen::VectorXd& x, double fx,
                                const Eigen::VectorXd& h);

}  // namespace safesite::stats::detail
