#pragma once
/// \file kernel_builder.hpp
/// From bound vital rates to the kernel module's structured description (design.md §3):
///
/// \f[ K((k',z'),(k,z)) = [k' = \mathrm{next}(k)]\, s_k(z)\, g_k(z'|z)
///      + \sum_{m'} [k' = \mathrm{entry}(m')]\, p_k(z)\, b_k(z)\, a_{m'}\, e_{m'}\, c_{m'}(z') \f]
///
/// Every class k belongs to one microsite m(k); its rates are the fitted rates evaluated at
/// microsite = m(k) and seedling = 1 for a first-year class, 0 otherwise. The rates are
/// evaluated once on the mesh nodes (KernelCurves) so that perturbations, scenarios and
/// root-finding rebuild the description without re-evaluating the regressions.

#include <cstddef>
#include <memory>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "safesite/kernel/kernel_description.hpp"
#include "safesite/pipeline/kernel_rates.hpp"

namespace safesite::pipeline {

/// The vital rates of one class on the mesh nodes.
struct ClassCurves {
    std::size_t microsite = 0;
    bool juvenile = false;           ///< first-year class (seedling = 1)
    Eigen::VectorXd survival;        ///< s(z_i) ∈ [0, 1]
    Eigen::VectorXd growth_mean;     ///< E[z' | z_i]
    Eigen::VectorXd growth_sd;       ///< sd[z' | z_i] > 0
    Eigen::VectorXd flowering;       ///< p(z_i) ∈ [0, 1]
    Eigen::VectorXd seeds;           ///< b(z_i) ≥ 0
};

/// The rates of one kernel on the nodes of a mesh, with the bound rates kept for sizes off
/// the nodes.
struct KernelCurves {
    std::string label;                ///< census year label, or "pooled"
    Eigen::VectorXd nodes;            ///< mesh nodes, ascending
    std::vector<ClassCurves> classes; ///< one per class of the layout, in class order
    Eigen::VectorXd recruit_mean;     ///< mean recruit size per microsite (kernel scale)
    Eigen::VectorXd recruit_sd;       ///< recruit size SD per microsite, > 0
    KernelRates rates;                ///< for evaluation off the nodes
    KernelLayout layout;
};

/// Evaluate the rates of one kernel on the mesh nodes (one prediction per rate and class).
/// Throws NumericalError when a prediction is not finite (naming rate, class and size).
std::shared_ptr<const KernelCurves> evaluate_rates(const KernelRates& rates,
                                                   const KernelLayout& layout,
                                                   const Eigen::VectorXd& nodes);

/// Which plants count as juveniles in the survival perturbation, and how their survival is
/// changed: \f$ s \to \min(1, \text{factor}\cdot s) \f$ (issue 4 §4: capped at probability 1).
struct SurvivalChange {
    double factor = 1.0;  ///< 1 + proportional change, ≥ 0
};

/// The structured kernel description for the kernel module.
///
/// Classes: the established class of each microsite (0..M−1), then, in seedling_class mode,
/// the first-year class of each microsite (M..2M−1) whose survivors go to the established
/// class (`next_class`); recruits of microsite m enter the first-year class when there is one.
/// `juvenile_change` multiplies the survival of juveniles (first-year classes, or sizes below
/// the layout's threshold) and caps it at 1.
kernel::KernelDescription describe_kernel(std::shared_ptr<const KernelCurves> curves,
                                          const RecruitmentParameters& recruitment,
                                          kernel::EvictionPolicy eviction,
                                          SurvivalChange juvenile_change = {});

/// Which derivative of K with respect to juvenile survival.
enum class JuvenileDerivative {
    /// s_J(z) → s_J(z) (1 + δ): ∂K/∂δ at δ = 0 is the juvenile survival–growth part
    /// s_J(z) g_J(z'|z). dλ/dδ divided by λ is the elasticity of λ to juvenile survival.
    proportional,
    /// s_J(z) → s_J(z) + ε (the same ε at every size): ∂K/∂ε = g_J(z'|z). dλ/dε is the
    /// sensitivity of λ to juvenile survival.
    additive,
};

/// The description of ∂K/∂θ for a juvenile-survival perturbation (no reproduction, only the
/// juvenile survival–growth columns), to be used with the kernel module's directional
/// derivative \f$ d\lambda/d\theta = \langle v, \partial K\, w\rangle / \langle v, w\rangle \f$
/// (Caswell 2001 §9.2; Ellner, Childs & Rees 2016 §4.3).
kernel::KernelDescription juvenile_survival_derivative(std::shared_ptr<const KernelCurves> curves,
                                                       kernel::EvictionPolicy eviction,
                                                       JuvenileDerivative kind);

}  // namespace safesite::pipeline
