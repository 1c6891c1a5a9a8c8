#pragma once
/// \file family.hpp
/// Response distributions (families) and link functions of the generalized linear models, with
/// the conversions from and to the spellings of docs/formats.md.
///
/// A GLM relates the mean \f$\mu_i\f$ of response \f$y_i\f$ to the linear predictor
/// \f$\eta_i = x_i^\top\beta + o_i\f$ through the link \f$g(\mu_i) = \eta_i\f$, with
/// \f$\mathrm{Var}(y_i) = \phi\,V(\mu_i)/w_i\f$ (McCullagh & Nelder 1989, ch. 2; docs/references.md).

#include <optional>
#include <string>
#include <vector>

namespace safesite::stats {

/// Response distribution of a regression.
enum class Family {
    binomial,        ///< successes out of trials (0/1 or counts); \f$V(\mu)=\mu(1-\mu)\f$
    poisson,         ///< counts; \f$V(\mu)=\mu\f$
    negbin,          ///< overdispersed counts; \f$V(\mu)=\mu+\mu^2/\theta\f$, θ by ML
    gaussian,        ///< normal, constant SD σ
    gaussian_spread  ///< normal with \f$\sigma(x)=\exp(\gamma_0+\gamma_1 x)\f$ (growth)
};

/// Link function \f$g\f$ with \f$g(\mu)=\eta\f$.
enum class Link {
    logit,    ///< \f$\log(\mu/(1-\mu))\f$
    probit,   ///< \f$\Phi^{-1}(\mu)\f$
    cloglog,  ///< \f$\log(-\log(1-\mu))\f$
    log,      ///< \f$\log\mu\f$
    identity  ///< \f$\mu\f$
};

/// "binomial", "poisson", "negbin", "gaussian", "gaussian-spread" (docs/formats.md).
/// Returns nullopt for any other text.
std::optional<Family> parse_family(const std::string& text);
/// "logit", "probit", "cloglog", "log", "identity". Returns nullopt for any other text.
std::optional<Link> parse_link(const std::string& text);
/// The docs/formats.md spelling of a family (inverse of parse_family).
std::string to_string(Family family);
/// The docs/formats.md spelling of a link (inverse of parse_link).
std::string to_string(Link link);

/// The canonical (default) link: logit for binomial, log for Poisson and negative binomial,
/// identity for the Gaussian families.
Link canonical_link(Family family);
/// The links a family admits: binomial {logit, probit, cloglog}; poisson, negbin {log};
/// gaussian {identity, log}; gaussian_spread {identity}.
std::vector<Link> admissible_links(Family family);
/// Throws UsageError naming the admissible links when `link` does not suit `family`.
void check_link(Family family, Link link);

/// \f$\eta = g(\mu)\f$. For binomial links \f$0<\mu<1\f$; for log \f$\mu>0\f$.
double link_function(Link link, double mu);
/// \f$\mu = g^{-1}(\eta)\f$. Binomial links keep μ within
/// \f$[\epsilon, 1-\epsilon]\f$ (ε the double machine epsilon) so that
/// log-likelihoods stay finite; log keeps \f$\mu \ge\f$ the smallest normal double.
double inverse_link(Link link, double eta);
/// \f$d\mu/d\eta\f$ at η, bounded below by ε for the binomial links (common practice).
double inverse_link_derivative(Link link, double eta);

/// Variance function \f$V(\mu)\f$ (θ used by negbin only; Gaussian families return 1).
double variance_function(Family family, double mu, double theta = 1.0);

}  // namespace safesite::stats
