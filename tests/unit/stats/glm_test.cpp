// GLM behaviour that has no published reference: warnings, aliasing, weights, offsets,
// prediction, fixed models and model comparison. Expected values come from closed-form
// results stated beside each check (common practice of GLM theory, McCullagh & Nelder 1989).
#include <catch2/catch.hpp>

#include <cmath>
#include <random>

#include "safesite/stats/glm.hpp"
#include "safesite/stats/model_comparison.hpp"

using namespace safesite::stats;

namespace {

bool has_warning(const GlmFit& f, const std::string& word) {
    for (const auto& w : f.warnings)
        if (w.find(word) != std::string::npos) return true;
    return false;
}

GlmOptions opts(Family family, std::optional<Link> link = std::nullopt) {
    GlmOptions o;
    o.family = family;
    o.link = link;
    return o;
}

Table logistic_data(unsigned seed, std::size_t n) {
    std::mt19937_64 rng(seed);
    std::normal_distribution<double> z(0.0, 1.0);
    std::uniform_real_distribution<double> u(0.0, 1.0);
    std::vector<double> size(n), y(n);
    std::vector<std::string> micro(n);
    const char* levels[] = {"gravel", "cushion", "tussock"};
    for (std::size_t i = 0; i < n; ++i) {
        size[i] = z(rng);
        micro[i] = levels[i % 3];
        const double eta = -0.3 + 1.1 * size[i] + (i % 3 == 1 ? 0.7 : 0.0);
        y[i] = u(rng) < 1.0 / (1.0 + std::exp(-eta)) ? 1.0 : 0.0;
    }
    Table t;
    t.add_numeric("size", size);
    t.add_numeric("y", y);
    t.add_categorical("microsite", micro, {"gravel", "cushion", "tussock"});
    return t;
}

}  // namespace

TEST_CASE("family and link spellings round-trip; unsuitable links are refused", "[stats][unit]") {
    for (auto f : {Family::binomial, Family::poisson, Family::negbin, Family::gaussian,
                   Family::gaussian_spread})
        CHECK(parse_family(to_string(f)) == f);
    for (auto l : {Link::logit, Link::probit, Link::cloglog, Link::log, Link::identity})
        CHECK(parse_link(to_string(l)) == l);
    CHECK(to_string(Family::gaussian_spread) == "gaussian-spread");
    CHECK_FALSE(parse_family("gamma").has_value());
    CHECK_THROWS_AS(check_link(Family::poisson, Link::logit), safesite::UsageError);
    // Inverse link and its derivative agree with a central difference (h = 1e-6).
    for (auto l : {Link::logit, Link::probit, Link::cloglog, Link::log}) {
        for (double eta : {-2.0, -0.3, 0.4, 1.5}) {
            const double num = (inverse_link(l, eta + 1e-6) - inverse_link(l, eta - 1e-6)) / 2e-6;
            CHECK(inverse_link_derivative(l, eta) == Approx(num).epsilon(1e-7));
            CHECK(link_function(l, inverse_link(l, eta)) == Approx(eta).margin(1e-12));
        }
    }
}

TEST_CASE("complete separation gives the separation warning, not a clean fit", "[stats][unit]") {
    Table t;
    t.add_numeric("x", {1, 2, 3, 4, 5, 6, 7, 8, 9, 10});
    t.add_numeric("y", {0, 0, 0, 0, 0, 1, 1, 1, 1, 1});
    const GlmFit f = fit_glm("y ~ x", t, opts(Family::binomial));
    CHECK(f.separation);
    CHECK(has_warning(f, "separation"));
    CHECK(has_warning(f, "0 or 1"));
    // Overlapping data: no separation.
    Table o = t;
    o.add_numeric("y", {0, 0, 1, 0, 0, 1, 0, 1, 1, 1});
    const GlmFit g = fit_glm("y ~ x", o, opts(Family::binomial));
    CHECK_FALSE(g.separation);
    CHECK(g.warnings.empty());
    CHECK(g.converged);
}

TEST_CASE("quasi-complete separation: one level with only successes", "[stats][unit]") {
    Table t;
    t.add_numeric("x", {0.1, 0.5, 0.2, 0.9, 0.4, 0.3, 0.8, 0.6, 0.7, 0.2, 0.5, 0.9});
    t.add_numeric("y", {0, 1, 0, 1, 1, 0, 1, 1, 1, 1, 1, 1});
    t.add_categorical("m", {"a", "a", "a", "a", "a", "a", "b", "b", "b", "b", "b", "b"});
    const GlmFit f = fit_glm("y ~ x + m", t, opts(Family::binomial));
    CHECK(f.separation);
    bool names_level = false;
    for (const auto& w : f.warnings) names_level = names_level || w.find("m[b]") != std::string::npos;
    CHECK(names_level);
}

TEST_CASE("aliased columns are named, reported as NaN and left out of predictions",
          "[stats][unit]") {
    Table t = logistic_data(11, 200);
    std::vector<double> twice = t.numeric("size");
    for (auto& v : twice) v *= 2.0;
    t.add_numeric("size2", twice);
    const GlmFit f = fit_glm("y ~ size + size2 + microsite", t, opts(Family::binomial));
    REQUIRE(f.aliased == std::vector<bool>{false, false, true, false, false});
    CHECK(std::isnan(f.coefficients[2]));
    CHECK(has_warning(f, "'size2'"));
    CHECK(f.rank == 4);
    const GlmFit g = fit_glm("y ~ size + microsite", t, opts(Family::binomial));
    CHECK(f.coefficients[1] == Approx(g.coefficients[1]).epsilon(1e-10));
    CHECK(f.deviance == Approx(g.deviance).epsilon(1e-12));
    const Eigen::VectorXd pf = f.predict(t), pg = g.predict(t);
    CHECK((pf - pg).cwiseAbs().maxCoeff() < 1e-10);
}

TEST_CASE("prior weight 2 equals a duplicated row; offsets give the rate MLE", "[stats][unit]") {
    Table t = logistic_data(5, 60);
    std::vector<double> w(60, 1.0);
    w[0] = 2.0;
    w[1] = 0.0;
    GlmOptions o = opts(Family::binomial);
    o.prior_weights = w;
    const GlmFit fw = fit_glm("y ~ size", t, o);
    std::vector<std::size_t> rows{0};
    for (std::size_t i = 0; i < 60; ++i)
        if (i != 1) rows.push_back(i);
    const GlmFit fd = fit_glm("y ~ size", t.select_rows(rows), opts(Family::binomial));
    CHECK((fw.coefficients - fd.coefficients).cwiseAbs().maxCoeff() < 1e-9);
    CHECK((fw.std_errors - fd.std_errors).cwiseAbs().maxCoeff() < 1e-9);
    CHECK(fw.loglik == Approx(fd.loglik).epsilon(1e-12));

    // Poisson rate with exposure: intercept-only MLE is log(Σy / Σexposure) (closed form).
    Table r;
    r.add_numeric("y", {3, 0, 7, 2, 5});
    r.add_numeric("exposure", {1.5, 0.5, 4.0, 1.0, 2.0});
    const GlmFit fr = fit_glm("y ~ 1 + offset(log(exposure))", r, opts(Family::poisson));
    CHECK(fr.coefficients[0] == Approx(std::log(17.0 / 9.0)).epsilon(1e-10));
    // Null model = the fitted model here: equal deviances.
    CHECK(fr.null_deviance == Approx(fr.deviance).epsilon(1e-10));
}

TEST_CASE("no convergence is a warning; bad responses are data errors", "[stats][unit]") {
    const Table t = logistic_data(3, 100);
    GlmOptions o = opts(Family::binomial);
    o.max_iterations = 1;
    const GlmFit f = fit_glm("y ~ size", t, o);
    CHECK_FALSE(f.converged);
    CHECK(has_warning(f, "did not converge"));
    Table bad;
    bad.add_numeric("s", {1, 5});
    bad.add_numeric("n", {3, 4});
    bad.add_numeric("x", {0, 1});
    CHECK_THROWS_AS(fit_glm("s / n ~ x", bad, opts(Family::binomial)), safesite::DataError);
    Table neg;
    neg.add_numeric("y", {1, -2, 3});
    neg.add_numeric("x", {0, 1, 2});
    CHECK_THROWS_AS(fit_glm("y ~ x", neg, opts(Family::poisson)), safesite::DataError);
}

TEST_CASE("prediction: response and link scales, delta-method SEs, missing rows",
          "[stats][unit]") {
    Table t = logistic_data(7, 300);
    const GlmFit f = fit_glm("y ~ nspline(size, df = 3) + microsite", t, opts(Family::binomial));
    const Prediction pl = f.predict_with_se(t, Scale::link);
    const Prediction pr = f.predict_with_se(t, Scale::response);
    for (Eigen::Index i = 0; i < 5; ++i) {
        const double mu = 1.0 / (1.0 + std::exp(-pl.fit[i]));
        CHECK(pr.fit[i] == Approx(mu).epsilon(1e-14));
        CHECK(pr.se[i] == Approx(mu * (1 - mu) * pl.se[i]).epsilon(1e-12));
    }
    // se(η) for a row equals √(xᵀVx) computed from the covariance directly.
    const Eigen::RowVectorXd x0 = [&] {
        const auto rows = f.spec.complete_rows(t, false);
        return Eigen::RowVectorXd(f.spec.model_matrix(t, rows).row(0));
    }();
    CHECK(pl.se[0] == Approx(std::sqrt((x0 * f.covariance * x0.transpose())(0, 0))).epsilon(1e-12));
    // Spline prediction on new data equals the training rows (stored knots).
    const std::vector<std::size_t> pick{299, 0, 150};
    const Eigen::VectorXd pn = f.predict(t.select_rows(pick));
    for (std::size_t i = 0; i < pick.size(); ++i)
        CHECK(pn[static_cast<Eigen::Index>(i)] ==
              Approx(pr.fit[static_cast<Eigen::Index>(pick[i])]).epsilon(1e-14));
    // A missing value gives NaN in that row only.
    Table nd = t.select_rows({0, 1});
    nd.add_numeric("size", {std::nan(""), 0.3});
    const Eigen::VectorXd pm = f.predict(nd);
    CHECK(std::isnan(pm[0]));
    CHECK(std::isfinite(pm[1]));
}

TEST_CASE("fixed models predict like fitted ones; coefficient names are checked",
          "[stats][unit]") {
    const Table t = logistic_data(9, 200);
    const GlmFit f = fit_glm("y ~ size * microsite", t, opts(Family::binomial, Link::probit));
    std::map<std::string, double> coef;
    for (std::size_t j = 0; j < f.column_names.size(); ++j)
        coef[f.column_names[j]] = f.coefficients[static_cast<Eigen::Index>(j)];
    Table levels;
    levels.add_categorical("microsite", {"gravel"}, {"gravel", "cushion", "tussock"});
    levels.add_numeric("size", {0.0});
    const GlmFit fx = fixed_glm("y ~ size * microsite", coef, Family::binomial, Link::probit, levels);
    CHECK(fx.fixed);
    CHECK((fx.predict(t) - f.predict(t)).cwiseAbs().maxCoeff() < 1e-14);

    auto missing = coef;
    missing.erase("size:microsite[cushion]");
    try {
        fixed_glm("y ~ size * microsite", missing, Family::binomial, Link::probit, levels);
        FAIL("no error");
    } catch (const safesite::SpecError& e) {
        CHECK(e.key() == "size:microsite[cushion]");
    }
    auto extra = coef;
    extra["size:microsite[sand]"] = 1.0;
    try {
        fixed_glm("y ~ size * microsite", extra, Family::binomial, Link::probit, levels);
        FAIL("no error");
    } catch (const safesite::SpecError& e) {
        CHECK(e.key() == "size:microsite[sand]");
    }
    FixedExtras ex;
    ex.spread = std::array<double, 2>{-0.7, -0.1};
    const GlmFit g = fixed_glm("size_next ~ size", {{"(Intercept)", 0.4}, {"size", 0.85}},
                               Family::gaussian_spread, std::nullopt, levels, ex);
    CHECK(g.sd_at(2.0) == Approx(std::exp(-0.9)).epsilon(1e-15));
    CHECK_THROWS_AS(fixed_glm("size_next ~ size", {{"(Intercept)", 0.4}, {"size", 0.85}},
                              Family::negbin, std::nullopt, levels),
                    safesite::UsageError);
}

TEST_CASE("model comparison: sorted by AIC, Akaike weights, ties in input order",
          "[stats][unit]") {
    const Table t = logistic_data(21, 400);
    const GlmFit a = fit_glm("y ~ 1", t, opts(Family::binomial));
    const GlmFit b = fit_glm("y ~ size", t, opts(Family::binomial));
    const GlmFit c = fit_glm("y ~ size + microsite", t, opts(Family::binomial));
    const ComparisonTable ct = compare_models({a, b, c, b}, {"a", "b", "c", "b again"});
    REQUIRE(ct.rows.size() == 4);
    for (std::size_t i = 1; i < 4; ++i) CHECK(ct.rows[i - 1].aic <= ct.rows[i].aic);
    CHECK(ct.rows[0].delta_aic == 0.0);
    double total = 0.0;
    for (const auto& r : ct.rows) total += r.weight;
    CHECK(total == Approx(1.0).epsilon(1e-14));
    // The two identical fits keep their input order.
    std::vector<std::size_t> order;
    for (const auto& r : ct.rows) order.push_back(r.index);
    const auto pos_b = std::find(order.begin(), order.end(), 1u);
    const auto pos_b2 = std::find(order.begin(), order.end(), 3u);
    CHECK(pos_b2 - pos_b == 1);
    // w_i / w_j = exp(−(Δ_i − Δ_j)/2).
    CHECK(ct.rows[1].weight / ct.rows[0].weight ==
          Approx(std::exp(-0.5 * ct.rows[1].delta_aic)).epsilon(1e-12));
    const GlmFit small = fit_glm("y ~ size", t.select_rows({0, 1, 2, 3, 4, 5, 6, 7, 8, 9}),
                                 opts(Family::binomial));
    CHECK_THROWS_AS(compare_models({a, small}, {"a", "small"}), safesite::UsageError);
}

// Internal check (no outside source): a Gaussian model with sd(x) = exp(γ0 + γ1 x) recovers
// the known γ0, γ1 from simulated data. Per seed the estimate should lie within 3 SE of the
// truth; over 50 seeds × 2 parameters at most 2 of the 100 |z| may exceed 3 (expected 0.27
// under a correct SE), and none may exceed 4 (P ≈ 6e-5 each). Seeds fixed.
TEST_CASE("gaussian-spread recovers known spread parameters (internal check, 50 seeds)",
          "[stats][unit]") {
    const double g0 = -0.5, g1 = 0.3, b0 = 1.0, b1 = 0.8;
    int beyond3 = 0;
    double worst = 0.0;
    for (unsigned seed = 1; seed <= 50; ++seed) {
        std::seed_seq seq{20261201u, seed};
        std::mt19937_64 rng(seq);
        std::uniform_real_distribution<double> ux(0.0, 4.0);
        std::normal_distribution<double> z(0.0, 1.0);
        const std::size_t n = 400;
        std::vector<double> size(n), next(n);
        for (std::size_t i = 0; i < n; ++i) {
            size[i] = ux(rng);
            next[i] = b0 + b1 * size[i] + std::exp(g0 + g1 * size[i]) * z(rng);
        }
        Table t;
        t.add_numeric("size", size);
        t.add_numeric("size_next", next);
        const GlmFit f = fit_glm("size_next ~ size", t, opts(Family::gaussian_spread));
        REQUIRE(f.converged);
        const double z0 = (f.spread[0] - g0) / f.spread_se[0];
        const double z1 = (f.spread[1] - g1) / f.spread_se[1];
        const double zb = (f.coefficients[1] - b1) / f.std_errors[1];
        for (double zz : {z0, z1}) {
            beyond3 += std::abs(zz) > 3.0 ? 1 : 0;
            worst = std::max(worst, std::abs(zz));
        }
        CHECK(std::abs(zb) < 4.0);
        CHECK(f.sd_at(2.0) == Approx(std::exp(f.spread[0] + 2.0 * f.spread[1])).epsilon(1e-15));
        CHECK(f.n_parameters == 4);
    }
    INFO("|z| > 3: " << beyond3 << ", largest |z| " << worst);
    CHECK(beyond3 <= 2);
    CHECK(worst < 4.0);
}
