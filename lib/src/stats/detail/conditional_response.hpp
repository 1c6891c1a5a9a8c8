#pragma once
/// \file conditional_response.hpp
/// (private) The conditional distribution of one response given the linear predictor η, for
/// the non-Gaussian mixed models: binomial (logit, probit, cloglog) and Poisson (log).
/// Kept private to the mixed-model engine: it needs the log-density with its constants for
/// the Laplace approximation and the Fisher working weights of penalised IRLS.

#include <Eigen/Core>

namespace safesite::stats::detail {

enum class CondFamily { gaussian, binomial, poisson };
enum class CondLink { identity, logit, probit, cloglog, log };

/// Per-row quantities of penalised IRLS at a given η.
struct WorkingValues {
    Eigen::VectorXd w;  ///< Fisher working weight n·(dμ/dη)²/V(μ)
    Eigen::VectorXd z;  ///< working response η + (y/n − μ)/(dμ/dη)
};

class ConditionalResponse {
public:
    /// y: successes (binomial, 0 ≤ y ≤ n) or counts (Poisson); n: binomial trials (ignored
    /// for Poisson). Throws UsageError for an unsupported family/link pair or bad data.
    ConditionalResponse(CondFamily family, CondLink link, const Eigen::VectorXd& y,
                        const Eigen::VectorXd& trials);

    CondFamily family() const noexcept { return m_family; }
    CondLink link() const noexcept { return m_link; }
    /// Canonical link (binomial–logit, Poisson–log): Fisher scoring is then Newton's method.
    bool canonical() const noexcept {
        return (m_family == CondFamily::binomial && m_link == CondLink::logit) ||
               (m_family == CondFamily::poisson && m_link == CondLink::log);
    }
    /// −2 Σ log p(y_i | η_i), including the constants (binomial coefficients, log y!).
    double minus_two_log_lik(const Eigen::VectorXd& eta) const;
    WorkingValues working(const Eigen::VectorXd& eta) const;
    /// A start for η from the data alone: link((y + ½)/(n + 1)) or log(y + 0.1).
    Eigen::VectorXd start_eta() const;
    /// Inverse link μ(η) (probability for binomial, mean count for Poisson).
    double mean(double eta) const;

private:
    double dmu_deta(double eta) const;
    double log_mu(double eta) const;         // log μ(η)
    double log_one_minus_mu(double eta) const;  // log(1 − μ(η))

    CondFamily m_family;
    CondLink m_link;
    Eigen::VectorXd m_y, m_n;
    double m_const = 0.0;  // Σ log C(n, y) or −Σ log y!
};

}  // namespace safesite::stats::detail
