#include "safesite/stats/family.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include <boost/math/distributions/normal.hpp>

#include "safesite/error.hpp"

namespace safesite::stats {

namespace {

constexpr double k_eps = std::numeric_limits<double>::epsilon();

struct FamilyName {
    Family family;
    const char* name;
};
constexpr FamilyName k_families[] = {{Family::binomial, "binomial"},
                                     {Family::poisson, "poisson"},
                                     {Family::negbin, "negbin"},
                                     {Family::gaussian, "gaussian"},
                                     {Family::gaussian_spread, "gaussian-spread"}};

struct LinkName {
    Link link;
    const char* name;
};
constexpr LinkName k_links[] = {{Link::logit, "logit"},
                                {Link::probit, "probit"},
                                {Link::cloglog, "cloglog"},
                                {Link::log, "log"},
                                {Link::identity, "identity"}};

const boost::math::normal_distribution<double> k_std_normal(0.0, 1.0);

}  // namespace

std::optional<Family> parse_family(const std::string& text) {
    for (const auto& f : k_families)
        if (text == f.name) return f.family;
    return std::nullopt;
}

std::optional<Link> parse_link(const std::string& text) {
    for (const auto& l : k_links)
        if (text == l.name) return l.link;
    return std::nullopt;
}

std::string to_string(Family family) {
    for (const auto& f : k_families)
        if (f.family == family) return f.name;
    return "?";
}

std::string to_string(Link link) {
    for (const auto& l : k_links)
        if (l.link == link) return l.name;
    return "?";
}

Link canonical_link(Family family) {
    switch (family) {
        case Family::binomial: return Link::logit;
        case Family::poisson:
        case Family::negbin: return Link::log;
        case Family::gaussian:
        case Family::gaussian_spread: return Link::identity;
    }
    return Link::identity;
}

std::vector<Link> admissible_links(Family family) {
    switch (family) {
        case Family::binomial: return {Link::logit, Link::probit, Link::cloglog};
        case Family::poisson:
        case Family::negbin: return {Link::log};
        case Family::gaussian: return {Link::identity, Link::log};
        case Family::gaussian_spread: return {Link::identity};
    }
    return {};
}

void check_link(Family family, Link link) {
    const auto ok = admissible_links(family);
    if (std::find(ok.begin(), ok.end(), link) != ok.end()) return;
    std::string list;
    for (auto l : ok) list += (list.empty() ? "" : ", ") + to_string(l);
    throw UsageError("link '" + to_string(link) + "' does not suit family '" + to_string(family) +
                     "'; use one of: " + list);
}

double link_function(Link link, double mu) {
    switch (link) {
        case Link::logit: return std::log(mu / (1.0 - mu));
        case Link::probit: return boost::math::quantile(k_std_normal, mu);
        case Link::cloglog: return std::log(-std::log1p(-mu));
        case Link::log: return std::log(mu);
        case Link::identity: return mu;
    }
    return mu;
}

double inverse_link(Link link, double eta) {
    switch (link) {
        case Link::logit: {
            // μ = 1/(1+e^{−η}), written to avoid overflow for large |η|.
            const double mu = eta >= 0 ? 1.0 / (1.0 + std::exp(-eta))
                                       : std::exp(eta) / (1.0 + std::exp(eta));
            return std::clamp(mu, k_eps, 1.0 - k_eps);
        }
        case Link::probit:
            return std::clamp(boost::math::cdf(k_std_normal, std::clamp(eta, -40.0, 40.0)), k_eps,
                              1.0 - k_eps);
        case Link::cloglog:
            return std::clamp(-std::expm1(-std::exp(std::min(eta, 700.0))), k_eps, 1.0 - k_eps);
        case Link::log:
            return std::max(std::exp(std::min(eta, 700.0)), std::numeric_limits<double>::min());
        case Link::identity: return eta;
    }
    return eta;
}

double inverse_link_derivative(Link link, double eta) {
    switch (link) {
        case Link::logit: {
            const double a = std::exp(-std::abs(eta));
            return std::max(a / ((1.0 + a) * (1.0 + a)), k_eps);
        }
        case Link::probit:
            return std::max(boost::math::pdf(k_std_normal, std::clamp(eta, -40.0, 40.0)), k_eps);
        case Link::cloglog: {
            const double e = std::min(eta, 700.0);
            return std::max(std::exp(e - std::exp(e)), k_eps);
        }
        case Link::log:
            return std::max(std::exp(std::min(eta, 700.0)), std::numeric_limits<double>::min());
        case Link::identity: return 1.0;
    }
    return 1.0;
}

double variance_function(Family family, double mu, double theta) {
    switch (family) {
        case Family::binomial: return mu * (1.0 - mu);
        case Family::poisson: return mu;
        case Family::negbin: return mu + mu * mu / theta;
        case Family::gaussian:
        case Family::gaussian_spread: return 1.0;
    }
    return 1.0;
}

}  // namespace safesite::stats
