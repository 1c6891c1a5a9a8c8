#include "stats/detail/conditional_response.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <string>

#include "safesite/error.hpp"

namespace safesite::stats::detail {

namespace {
constexpr double kEps = std::numeric_limits<double>::epsilon();
constexpr double kInvSqrt2 = 0.70710678118654752440;
constexpr double kInvSqrt2Pi = 0.39894228040143267794;

// log Φ(x) without underflow: erfc keeps relative accuracy in the lower tail down to
// x ≈ −37; below that the asymptotic log φ(x) − log(−x) is used (common practice).
double log_norm_cdf(double x) {
    if (x > -37.0) return std::log(0.5 * std::erfc(-x * kInvSqrt2));
    return -0.5 * x * x - std::log(-x) - 0.91893853320467274178;
}
}  // namespace

ConditionalResponse::ConditionalResponse(CondFamily family, CondLink link, const Eigen::VectorXd& y,
                                         const Eigen::VectorXd& trials)
    : m_family(family), m_link(link), m_y(y), m_n(trials) {
    if (family == CondFamily::binomial) {
        if (link != CondLink::logit && link != CondLink::probit && link != CondLink::cloglog)
            throw UsageError("binomial mixed models take the logit, probit or cloglog link");
        if (m_n.size() != m_y.size())
            throw UsageError("binomial mixed model: trials and response differ in length");
        for (Eigen::Index i = 0; i < m_y.size(); ++i) {
            if (!(m_n[i] >= 0.0) || !(m_y[i] >= 0.0) || m_y[i] > m_n[i] || !std::isfinite(m_n[i]))
                throw UsageError("binomial mixed model: row " + std::to_string(i + 1) +
                                 " needs 0 <= successes <= trials");
            m_const += std::lgamma(m_n[i] + 1.0) - std::lgamma(m_y[i] + 1.0) -
                       std::lgamma(m_n[i] - m_y[i] + 1.0);
        }
    } else if (family == CondFamily::poisson) {
        if (link != CondLink::log) throw UsageError("Poisson mixed models take the log link");
        m_n = Eigen::VectorXd::Ones(m_y.size());
        for (Eigen::Index i = 0; i < m_y.size(); ++i) {
            if (!(m_y[i] >= 0.0) || !std::isfinite(m_y[i]))
                throw UsageError("Poisson mixed model: row " + std::to_string(i + 1) +
                                 " needs a count >= 0");
            m_const -= std::lgamma(m_y[i] + 1.0);
        }
    } else {
        throw UsageError("the Laplace engine handles binomial and Poisson responses only");
    }
}

double ConditionalResponse::mean(double eta) const {
    switch (m_link) {
        case CondLink::logit: return 1.0 / (1.0 + std::exp(-eta));
        case CondLink::probit: return 0.5 * std::erfc(-eta * kInvSqrt2);
        case CondLink::cloglog: return -std::expm1(-std::exp(eta));
        case CondLink::log: return std::exp(eta);
        case CondLink::identity: return eta;
    }
    return eta;
}

double ConditionalResponse::dmu_deta(double eta) const {
    switch (m_link) {
        case CondLink::logit: {
            const double mu = mean(eta);
            return std::max(mu * (1.0 - mu), kEps);
        }
        case CondLink::probit: return std::max(kInvSqrt2Pi * std::exp(-0.5 * eta * eta), kEps);
        case CondLink::cloglog: {
            const double e = std::exp(std::min(eta, 700.0));
            return std::max(e * std::exp(-e), kEps);
        }
        case CondLink::log: return std::max(std::exp(eta), kEps);
        case CondLink::identity: return 1.0;
    }
    return 1.0;
}

double ConditionalResponse::log_mu(double eta) const {
    switch (m_link) {
        case CondLink::logit: return eta < 0.0 ? eta - std::log1p(std::exp(eta)) : -std::log1p(std::exp(-eta));
        case CondLink::probit: return log_norm_cdf(eta);
        case CondLink::cloglog: {
            const double e = std::exp(eta);
            return e < 1e-300 ? eta : std::log(-std::expm1(-e));
        }
        case CondLink::log: return eta;
        case CondLink::identity: return std::log(eta);
    }
    return 0.0;
}

double ConditionalResponse::log_one_minus_mu(double eta) const {
    switch (m_link) {
        case CondLink::logit: return log_mu(eta) - eta;
        case CondLink::probit: return log_norm_cdf(-eta);
        case CondLink::cloglog: return -std::exp(eta);
        default: return 0.0;
    }
}

double ConditionalResponse::minus_two_log_lik(const Eigen::VectorXd& eta) const {
    double ll = m_const;
    if (m_family == CondFamily::binomial) {
        for (Eigen::Index i = 0; i < eta.size(); ++i) {
            const double y = m_y[i], f = m_n[i] - m_y[i];
            if (m_link == CondLink::logit) {
                // log μ = −log(1 + e^{−η}), log(1 − μ) = log μ − η: one log and one exp per
                // row. log(1 + t) with t = e^{−|η|} ≤ 1 has an absolute error below 1e-16, all
                // a sum of log-likelihood terms needs (log1p costs twice as much here).
                const double e = eta[i];
                const double l = std::log(1.0 + std::exp(-std::abs(e)));
                const double lm = e < 0.0 ? e - l : -l;
                ll += y * lm + f * (lm - e);
                continue;
            }
            if (y > 0.0) ll += y * log_mu(eta[i]);
            if (f > 0.0) ll += f * log_one_minus_mu(eta[i]);
        }
    } else {
        for (Eigen::Index i = 0; i < eta.size(); ++i) ll += m_y[i] * eta[i] - std::exp(eta[i]);
    }
    return -2.0 * ll;
}

WorkingValues ConditionalResponse::working(const Eigen::VectorXd& eta) const {
    WorkingValues out{Eigen::VectorXd(eta.size()), Eigen::VectorXd(eta.size())};
    for (Eigen::Index i = 0; i < eta.size(); ++i) {
        if (m_family == CondFamily::binomial) {
            const double n = m_n[i];
            if (!(n > 0.0)) {
                out.w[i] = 0.0;
                out.z[i] = eta[i];
                continue;
            }
            // Clamp μ away from 0 and 1 so that V(μ) = μ(1 − μ) stays positive.
            const double mu = std::clamp(mean(eta[i]), kEps, 1.0 - kEps);
            const double d = m_link == CondLink::logit ? mu * (1.0 - mu) : dmu_deta(eta[i]);
            out.w[i] = n * d * d / (mu * (1.0 - mu));
            out.z[i] = eta[i] + (m_y[i] / n - mu) / d;
        } else {
            const double mu = std::max(std::exp(eta[i]), kEps);
            out.w[i] = mu;
            out.z[i] = eta[i] + (m_y[i] - mu) / mu;
        }
    }
    return out;
}

Eigen::VectorXd ConditionalResponse::start_eta() const {
    Eigen::VectorXd eta(m_y.size());
    for (Eigen::Index i = 0; i < m_y.size(); ++i) {
        if (m_family == CondFamily::poisson) {
            eta[i] = std::log(m_y[i] + 0.1);
            continue;
        }
        const double p = (m_y[i] + 0.5) / (m_n[i] + 1.0);
        switch (m_link) {
            case CondLink::logit: eta[i] = std::log(p / (1.0 - p)); break;
            case CondLink::probit: {
                // Inverse of Φ by a few Newton steps from the logit scale (p is in (0, 1)).
                double x = std::log(p / (1.0 - p)) / 1.7;
                for (int k = 0; k < 30; ++k) {
                    const double f = 0.5 * std::erfc(-x * kInvSqrt2) - p;
                    x -= f / (kInvSqrt2Pi * std::exp(-0.5 * x * x));
                }
                eta[i] = x;
                break;
            }
            case CondLink::cloglog: eta[i] = std::log(-std::log1p(-p)); break;
            default: eta[i] = p;
        }
    }
    return eta;
}

}  // namespace safesite::stats::detail
