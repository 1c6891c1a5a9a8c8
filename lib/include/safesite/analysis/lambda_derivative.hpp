#pragma once
/// \file lambda_derivative.hpp
/// Derivatives of λ with respect to model parameters, from one eigen-triple.

#include <functional>

#include <Eigen/Core>

#include "safesite/analysis/eigen_triple.hpp"
#include "safesite/kernel/kernel_operator.hpp"

namespace safesite::analysis {

/// Applies a kernel perturbation to a state: y = (∂A/∂θ) x (x, y of the operator's length).
using PerturbationApply = std::function<void(const double* x, double* y)>;

/// The generic directional derivative (Caswell 2001 eq. 9.10; Ellner, Childs & Rees 2016 §4.3):
///
/// \f[ \frac{d\lambda}{d\theta} = \frac{\langle v, (\partial K/\partial\theta)\, w\rangle}
///     {\langle v, w\rangle} = \sum_i \omega_i v_i \big((\partial A/\partial\theta)\, w\big)_i \f]
///
/// (⟨v, w⟩ = 1 by the EigenTriple normalisation). Exact for any perturbation of the kernel;
/// costs one application of ∂A/∂θ.
double lambda_derivative(const EigenTriple& triple, const PerturbationApply& apply_dA);

/// The same with ∂A/∂θ given by two kernels built at θ + h and θ − h:
/// \f$ \partial A/\partial\theta \approx (A_{+} - A_{-}) / (2h) \f$. Exact when θ enters the
/// kernel linearly (e.g. a survival multiplier), O(h²) otherwise; no eigen-problem is re-solved
/// (two operator applications). `plus` and `minus` must have the layout of the triple's kernel.
/// Throws UsageError if the sizes differ or h ≤ 0.
double lambda_derivative(const EigenTriple& triple, const kernel::KernelOperator& plus,
                         const kernel::KernelOperator& minus, double step);

/// Derivatives of λ with respect to the recruitment parameters of each microsite m.
struct RecruitmentSensitivity {
    /// \f$\partial\lambda/\partial a_m = e_m\, R(w)\, \langle v_{\mathrm{entry}(m)}, c_m\rangle\f$
    /// with R(w) the seed-equivalents on the recruitment route (unconstrained partials).
    Eigen::VectorXd arrival;
    /// \f$\partial\lambda/\partial e_m = a_m\, R(w)\, \langle v_{\mathrm{entry}(m)}, c_m\rangle\f$.
    Eigen::VectorXd establishment;
    /// Moving seeds into m from the other microsites in proportion to their fractions, with
    /// Σa fixed: \f$\partial_m\lambda - \sum_{j\ne m} \frac{a_j}{\sum_{l\ne m} a_l}
    /// \partial_j\lambda\f$ (equal shares when all other a_j are 0; 0 with one microsite).
    Eigen::VectorXd arrival_redistribution;
    /// Elasticities \f$(a_m/\lambda)\,\partial\lambda/\partial a_m\f$ (equal to those of e_m).
    Eigen::VectorXd arrival_elasticity;
};

/// Exact recruitment derivatives (a and e enter the kernel linearly through F).
RecruitmentSensitivity recruitment_sensitivity(const kernel::KernelOperator& op,
                                               const EigenTriple& triple);

}  // namespace safesite::analysis
