#pragma once
/// \file laplace_engine.hpp
/// (private) The objective functions of mixed-model fitting at a given θ:
/// - the profiled Gaussian deviance (ML or REML) [Bates2015, eqs. 34, 41];
/// - the Laplace approximation to −2 log L of a binomial or Poisson mixed model, with the
///   conditional modes found by penalised IRLS [Bates2015, section 5.4; Breslow1993].

#include <Eigen/Core>

#include "stats/detail/conditional_response.hpp"
#include "stats/detail/random_design.hpp"

namespace safesite::stats::detail {

/// The Gaussian penalised least-squares solution at one θ.
struct GaussianProfile {
    bool ok = false;
    double log_det_A = 0.0;  ///< log|Λ'Z'ZΛ + I|
    double log_det_S = 0.0;  ///< log|R_X|² = log|X'X − X'ZΛA⁻¹Λ'Z'X|
    double r2 = 0.0;         ///< penalised residual sum of squares ‖y − Xβ − ZΛu‖² + ‖u‖²
    Eigen::VectorXd beta, u;
    Eigen::MatrixXd S;       ///< the Schur complement R_X'R_X (p × p)

    /// −2 log L profiled over β and σ (ML) or −2 log L_R profiled over σ (REML).
    double deviance(bool reml, int n, int p) const;
    /// The same criterion at a given σ (β still profiled): used for standard errors.
    double deviance_at_sigma(bool reml, int n, int p, double sigma) const;
    /// σ̂² = r²/n (ML) or r²/(n − p) (REML).
    double sigma2(bool reml, int n, int p) const;
};

/// Solves the penalised least-squares problem at θ (y already has the offset removed).
GaussianProfile gaussian_profile(RandomDesign& re, const Eigen::MatrixXd& X,
                                 const Eigen::VectorXd& y, const Eigen::VectorXd& theta);

/// Penalised IRLS and the Laplace criterion, with warm starts between calls.
class LaplaceEngine {
public:
    LaplaceEngine(RandomDesign& re, const Eigen::MatrixXd& X, const Eigen::VectorXd& offset,
                  const ConditionalResponse& response);

    /// Stage 1: −2 log L (Laplace) with u and β at their joint conditional mode given θ.
    double joint(const Eigen::VectorXd& theta);
    /// Stage 2: −2 log L (Laplace) at (θ, β) with u at its conditional mode.
    double conditional(const Eigen::VectorXd& theta, const Eigen::VectorXd& beta);

    const Eigen::VectorXd& u() const noexcept { return m_u; }
    const Eigen::VectorXd& beta() const noexcept { return m_beta; }
    /// X'WX − X'WZΛA⁻¹Λ'Z'WX of the last joint() call (its inverse approximates Cov β).
    const Eigen::MatrixXd& schur() const noexcept { return m_S; }
    /// False when the last penalised IRLS stopped at its iteration cap or broke down.
    bool last_converged() const noexcept { return m_last_ok; }
    int pirls_iterations() const noexcept { return m_pirls_iterations; }

private:
    double pirls(bool with_beta);

    RandomDesign& m_re;
    const Eigen::MatrixXd& m_X;
    Eigen::VectorXd m_offset;
    const ConditionalResponse& m_resp;
    Eigen::VectorXd m_u, m_beta;
    Eigen::MatrixXd m_S;
    bool m_started = false;
    bool m_last_ok = true;
    int m_pirls_iterations = 0;
};

}  // namespace safesite::stats::detail
