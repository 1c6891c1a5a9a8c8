// Mixed models: internal checks on simulated data (fixed seeds), derived truths and errors.
// These are internal checks (no outside source): a simulated truth must be recovered within
// its own standard errors, and closed forms of the balanced one-way model must hold.
#include <catch2/catch.hpp>

#include <cmath>
#include <random>
#include <string>
#include <vector>

#include "safesite/error.hpp"
#include "safesite/stats/mixed_model.hpp"

using namespace safesite;
using namespace safesite::stats;

namespace {

std::mt19937_64 stream(std::uint64_t seed, std::uint64_t replicate) {
    std::seed_seq seq{seed, replicate};
    return std::mt19937_64(seq);
}

GroupingFactor make_factor(const std::string& name, int levels, std::vector<int> level) {
    GroupingFactor g;
    g.name = name;
    for (int j = 0; j < levels; ++j) g.level_names.push_back(name + std::to_string(j + 1));
    g.level = std::move(level);
    return g;
}

const VarianceComponent& component(const MixedFit& fit, const std::string& group,
                                   const std::string& term = "(Intercept)") {
    for (const auto& vc : fit.variance_components)
        if (vc.group == group && vc.term == term) return vc;
    FAIL("no variance component " << group << "/" << term);
    return fit.variance_components.front();
}

bool has_warning(const MixedFit& fit, const std::string& word) {
    for (const auto& w : fit.warnings)
        if (w.find(word) != std::string::npos) return true;
    return false;
}

}  // namespace

TEST_CASE("Poisson GLMM recovers a known random-intercept SD over 30 seeds",
          "[stats][mixed][unit]") {
    // Internal check. Truth: log μ = 0.5 + 0.3·x + b_g, b_g ~ N(0, 0.6²), 30 groups × 15 rows.
    constexpr double sd_true = 0.6;
    constexpr int groups = 30, per = 15, seeds = 30;
    std::vector<double> est, se;
    int outside = 0;
    for (int s = 0; s < seeds; ++s) {
        auto rng = stream(20261201, static_cast<std::uint64_t>(s));
        std::normal_distribution<double> normal(0.0, 1.0);
        const int n = groups * per;
        Eigen::MatrixXd X(n, 2);
        Eigen::VectorXd y(n);
        std::vector<int> level(n);
        std::vector<double> b(groups);
        for (double& v : b) v = sd_true * normal(rng);
        for (int i = 0; i < n; ++i) {
            level[i] = i / per;
            X(i, 0) = 1.0;
            X(i, 1) = normal(rng);
            std::poisson_distribution<int> pois(std::exp(0.5 + 0.3 * X(i, 1) + b[level[i]]));
            y[i] = pois(rng);
        }
        MixedOptions opt;
        opt.family = Family::poisson;
        const MixedFit fit = fit_mixed_core(X, y, Eigen::VectorXd(), Eigen::VectorXd(),
                                            {make_factor("g", groups, level)}, opt);
        REQUIRE(fit.converged);
        const VarianceComponent& vc = component(fit, "g");
        REQUIRE(std::isfinite(vc.sd_se));
        est.push_back(vc.sd);
        se.push_back(vc.sd_se);
        if (std::abs(vc.sd - sd_true) > 3.0 * vc.sd_se) ++outside;
    }
    double mean = 0.0, mean_se = 0.0;
    for (int s = 0; s < seeds; ++s) {
        mean += est[s] / seeds;
        mean_se += se[s] / seeds;
    }
    double var = 0.0;
    for (double e : est) var += (e - mean) * (e - mean) / (seeds - 1);
    INFO("mean SD " << mean << ", empirical SD of the estimates " << std::sqrt(var)
                    << ", mean reported SE " << mean_se << ", outside 3 SE: " << outside);
    // Each seed: |ŝ − s| ≤ 3 SE(ŝ). Under normality 30 seeds give 0.08 expected misses; the
    // SD's sampling distribution is skewed with 30 groups, so at most 1 miss is allowed.
    CHECK(outside <= 1);
    // The mean over 30 seeds: within 3 standard errors of the mean (no gross bias).
    CHECK(std::abs(mean - sd_true) <= 3.0 * std::sqrt(var / seeds));
    // The reported SE (observed information) tracks the spread of the estimates: with 30
    // replicates the empirical SD is known to about ±13 % (1/√(2·29)), so a ratio within
    // [0.7, 1.4] is asserted.
    CHECK(mean_se / std::sqrt(var) > 0.7);
    CHECK(mean_se / std::sqrt(var) < 1.4);
}

TEST_CASE("crossed year x plant random intercepts recover their SDs", "[stats][mixed][unit]") {
    // Internal check. Binomial survival, logit: 20 years × 150 plants, every plant in every
    // year (20 years, not 10, so that the year SD has a usable standard error); logit p = −0.2 + 0.8·size + y_t + p_i, y_t ~ N(0, 0.5²), p_i ~ N(0, 0.8²).
    constexpr int years = 20, plants = 150;
    constexpr double sd_year = 0.5, sd_plant = 0.8;
    for (std::uint64_t seed : {1u, 2u, 3u}) {
        auto rng = stream(77, seed);
        std::normal_distribution<double> normal(0.0, 1.0);
        std::vector<double> ye(years), pe(plants);
        for (double& v : ye) v = sd_year * normal(rng);
        for (double& v : pe) v = sd_plant * normal(rng);
        const int n = years * plants;
        Eigen::MatrixXd X(n, 2);
        Eigen::VectorXd y(n), trials = Eigen::VectorXd::Ones(n);
        std::vector<int> yl(n), pl(n);
        for (int i = 0; i < n; ++i) {
            yl[i] = i / plants;
            pl[i] = i % plants;
            X(i, 0) = 1.0;
            X(i, 1) = normal(rng);
            const double eta = -0.2 + 0.8 * X(i, 1) + ye[yl[i]] + pe[pl[i]];
            y[i] = std::bernoulli_distribution(1.0 / (1.0 + std::exp(-eta)))(rng) ? 1.0 : 0.0;
        }
        MixedOptions opt;
        opt.family = Family::binomial;
        const MixedFit fit = fit_mixed_core(
            X, y, trials, Eigen::VectorXd(),
            {make_factor("year", years, yl), make_factor("plant", plants, pl)}, opt,
            {"(Intercept)", "size"});
        REQUIRE(fit.converged);
        const auto& vy = component(fit, "year");
        const auto& vp = component(fit, "plant");
        INFO("seed " << seed << ": year SD " << vy.sd << " ± " << vy.sd_se << ", plant SD "
                     << vp.sd << " ± " << vp.sd_se << ", size " << fit.fixed[1]);
        CHECK(std::abs(vy.sd - sd_year) < 3.0 * vy.sd_se);
        CHECK(std::abs(vp.sd - sd_plant) < 3.0 * vp.sd_se);
        CHECK(std::abs(fit.fixed[1] - 0.8) < 3.0 * fit.fixed_se[1]);
        // Year conditional modes follow the simulated year effects (150 Bernoulli rows per
        // year: little shrinkage, so a correlation above 0.9 is expected; common practice).
        const GroupEffects& re = fit.random_effects[0];
        REQUIRE(re.group == "year");
        Eigen::VectorXd truth = Eigen::Map<Eigen::VectorXd>(ye.data(), years);
        const Eigen::VectorXd modes = re.modes.col(0);
        const double corr = ((truth.array() - truth.mean()) * (modes.array() - modes.mean())).sum() /
                            std::sqrt((truth.array() - truth.mean()).square().sum() *
                                      (modes.array() - modes.mean()).square().sum());
        CHECK(corr > 0.9);
    }
}

TEST_CASE("zero between-group variance gives a boundary fit, not a spurious SD",
          "[stats][mixed][unit]") {
    // Derived truth: when every group has the same mean (Gaussian) or the same outcomes
    // (binomial, Poisson), the between-group variation is below its expectation under zero
    // variance, so the (RE)ML estimate of the SD is exactly zero.
    constexpr int groups = 12, per = 8;
    const int n = groups * per;
    std::vector<int> level(n);
    for (int i = 0; i < n; ++i) level[i] = i / per;
    Eigen::MatrixXd X = Eigen::MatrixXd::Ones(n, 1);
    SECTION("Gaussian, REML and ML") {
        auto rng = stream(5, 0);
        std::normal_distribution<double> normal(0.0, 1.0);
        std::vector<double> noise(per);
        for (double& v : noise) v = normal(rng);
        Eigen::VectorXd y(n);
        // The same within-group pattern in every group (a different order per group).
        for (int g = 0; g < groups; ++g)
            for (int k = 0; k < per; ++k) y[g * per + k] = 3.0 + noise[(k + g) % per];
        for (bool reml : {true, false}) {
            MixedOptions opt;
            opt.reml = reml;
            const MixedFit fit = fit_mixed_core(X, y, Eigen::VectorXd(), Eigen::VectorXd(),
                                                {make_factor("plot", groups, level)}, opt);
            const auto& vc = component(fit, "plot");
            CHECK(vc.boundary);
            CHECK(vc.sd == 0.0);
            CHECK(std::isnan(vc.sd_se));
            CHECK(has_warning(fit, "boundary"));
            CHECK(fit.random_effects[0].modes.cwiseAbs().maxCoeff() == 0.0);
        }
    }
    SECTION("binomial") {
        Eigen::VectorXd y(n), trials = Eigen::VectorXd::Constant(n, 10.0);
        for (int i = 0; i < n; ++i) y[i] = (i % per) + 1;  // 1..8 of 10 in every group
        MixedOptions opt;
        opt.family = Family::binomial;
        const MixedFit fit = fit_mixed_core(X, y, trials, Eigen::VectorXd(),
                                            {make_factor("neighbour", groups, level)}, opt);
        const auto& vc = component(fit, "neighbour");
        CHECK(vc.boundary);
        CHECK(vc.sd == 0.0);
        CHECK(has_warning(fit, "boundary"));
        // With the SD at zero the fit is the binomial GLM: intercept = logit(mean proportion).
        CHECK(fit.fixed[0] == Approx(std::log(0.45 / 0.55)).margin(1e-6));
    }
    SECTION("Poisson") {
        Eigen::VectorXd y(n);
        for (int i = 0; i < n; ++i) y[i] = (i % per);  // 0..7 in every group, mean 3.5
        MixedOptions opt;
        opt.family = Family::poisson;
        const MixedFit fit = fit_mixed_core(X, y, Eigen::VectorXd(), Eigen::VectorXd(),
                                            {make_factor("station", groups, level)}, opt);
        const auto& vc = component(fit, "station");
        CHECK(vc.boundary);
        CHECK(vc.sd == 0.0);
        CHECK(fit.fixed[0] == Approx(std::log(3.5)).margin(1e-6));
    }
}

TEST_CASE("balanced one-way Gaussian model: conditional modes and variances in closed form",
          "[stats][mixed][unit]") {
    // Derived truth (common practice, BLUP of the balanced one-way model): with m rows per
    // group, b̃_g = m·s_b² / (m·s_b² + σ²) · mean_g(y − Xβ̂) and Var(b_g | y) = s_b²σ²/(m s_b² + σ²).
    constexpr int groups = 9, per = 6;
    const int n = groups * per;
    auto rng = stream(11, 0);
    std::normal_distribution<double> normal(0.0, 1.0);
    Eigen::MatrixXd X(n, 2);
    Eigen::VectorXd y(n);
    std::vector<int> level(n);
    std::vector<double> b(groups);
    for (double& v : b) v = 2.0 * normal(rng);
    for (int i = 0; i < n; ++i) {
        level[i] = i / per;
        X(i, 0) = 1.0;
        X(i, 1) = i % per;  // the same covariate pattern in every group
        y[i] = 1.0 + 0.5 * X(i, 1) + b[level[i]] + normal(rng);
    }
    const MixedFit fit = fit_mixed_core(X, y, Eigen::VectorXd(), Eigen::VectorXd(),
                                        {make_factor("plot", groups, level)}, MixedOptions{});
    const double sb2 = std::pow(component(fit, "plot").sd, 2), s2 = fit.sigma * fit.sigma;
    const Eigen::VectorXd r = y - X * fit.fixed;
    for (int g = 0; g < groups; ++g) {
        const double mean_r = r.segment(g * per, per).mean();
        CHECK(fit.random_effects[0].modes(g, 0) ==
              Approx(per * sb2 / (per * sb2 + s2) * mean_r).margin(1e-9));
        CHECK(fit.random_effects[0].conditional_variances(g, 0) ==
              Approx(sb2 * s2 / (per * sb2 + s2)).epsilon(1e-9));
    }
}

TEST_CASE("random slope by year: correlated and independent forms", "[stats][mixed][unit]") {
    // Internal check: y = 2 + 0.5·x + a_t + c_t·x + e, (a_t, c_t) ~ N(0, diag(1, 0.3²)) over 25
    // years, 40 rows each. Both forms must recover the SDs within 3 SE.
    constexpr int years = 25, per = 40;
    const int n = years * per;
    auto rng = stream(2026, 0);
    std::normal_distribution<double> normal(0.0, 1.0);
    std::vector<double> a(years), c(years);
    for (int t = 0; t < years; ++t) {
        a[t] = normal(rng);
        c[t] = 0.3 * normal(rng);
    }
    Eigen::MatrixXd X(n, 2);
    Eigen::VectorXd y(n);
    std::vector<int> level(n);
    for (int i = 0; i < n; ++i) {
        level[i] = i / per;
        X(i, 0) = 1.0;
        X(i, 1) = normal(rng);
        y[i] = 2.0 + 0.5 * X(i, 1) + a[level[i]] + c[level[i]] * X(i, 1) + 0.5 * normal(rng);
    }
    GroupingFactor year = make_factor("year", years, level);
    year.slope = X.col(1);
    year.slope_name = "size";
    for (bool correlated : {true, false}) {
        MixedOptions opt;
        opt.correlated_slope = correlated;
        const MixedFit fit = fit_mixed_core(X, y, Eigen::VectorXd(), Eigen::VectorXd(), {year}, opt,
                                            {"(Intercept)", "size"});
        REQUIRE(fit.converged);
        const auto& vi = component(fit, "year", "(Intercept)");
        const auto& vs = component(fit, "year", "size");
        INFO("correlated " << correlated << ": SDs " << vi.sd << " ± " << vi.sd_se << ", "
                           << vs.sd << " ± " << vs.sd_se << ", corr " << vs.correlation);
        CHECK(std::abs(vi.sd - 1.0) < 3.0 * vi.sd_se);
        CHECK(std::abs(vs.sd - 0.3) < 3.0 * vs.sd_se);
        CHECK(fit.df == 2 + (correlated ? 3 : 2) + 1);
        if (correlated) {
            CHECK(vs.correlation >= -1.0);
            CHECK(vs.correlation <= 1.0);
        } else {
            CHECK(std::isnan(vs.correlation));
        }
        REQUIRE(fit.random_effects[0].terms.size() == 2);
        // Prediction with the year's modes equals the fixed part plus a_t + c_t·x.
        const Eigen::VectorXd with = fit.linear_predictor(X, Eigen::VectorXd(), {year}, true);
        const Eigen::VectorXd without = fit.linear_predictor(X, Eigen::VectorXd(), {year}, false);
        const int i = 3 * per + 7;
        CHECK(with[i] - without[i] ==
              Approx(fit.random_effect("year", "year4") +
                     fit.random_effect("year", "year4", "size") * X(i, 1)).margin(1e-12));
    }
}

TEST_CASE("mixed-model prediction: seen levels use their mode, unseen levels get zero",
          "[stats][mixed][unit]") {
    constexpr int groups = 6, per = 10;
    const int n = groups * per;
    auto rng = stream(3, 0);
    std::normal_distribution<double> normal(0.0, 1.0);
    Eigen::MatrixXd X = Eigen::MatrixXd::Ones(n, 1);
    Eigen::VectorXd y(n);
    std::vector<int> level(n);
    for (int i = 0; i < n; ++i) {
        level[i] = i / per;
        y[i] = 1.0 + level[i] + normal(rng);
    }
    const MixedFit fit = fit_mixed_core(X, y, Eigen::VectorXd(), Eigen::VectorXd(),
                                        {make_factor("year", groups, level)}, MixedOptions{});
    GroupingFactor fresh;
    fresh.name = "year";
    fresh.level_names = {"year3", "year99"};
    fresh.level = {0, 1};
    const Eigen::MatrixXd Xn = Eigen::MatrixXd::Ones(2, 1);
    const Eigen::VectorXd eta = fit.linear_predictor(Xn, Eigen::VectorXd(), {fresh}, true);
    CHECK(eta[0] == Approx(fit.fixed[0] + fit.random_effects[0].modes(2, 0)).margin(1e-12));
    CHECK(eta[1] == Approx(fit.fixed[0]).margin(1e-12));
    CHECK(fit.random_effect("year", "year99") == 0.0);
    CHECK_THROWS_AS(fit.random_effect("plot", "year1"), UsageError);
}

TEST_CASE("mixed-model input errors are typed", "[stats][mixed][unit]") {
    Eigen::MatrixXd X = Eigen::MatrixXd::Ones(6, 2);
    X.col(1) << 1, 2, 3, 4, 5, 6;
    Eigen::VectorXd y(6);
    y << 1, 2, 3, 4, 5, 7;
    GroupingFactor g = make_factor("plot", 2, {0, 0, 0, 1, 1, 1});
    MixedOptions opt;
    SECTION("length mismatch") {
        GroupingFactor bad = make_factor("plot", 2, {0, 1});
        CHECK_THROWS_AS(fit_mixed_core(X, y, {}, {}, {bad}, opt), UsageError);
    }
    SECTION("level index out of range") {
        GroupingFactor bad = make_factor("plot", 2, {0, 0, 0, 1, 1, 2});
        CHECK_THROWS_AS(fit_mixed_core(X, y, {}, {}, {bad}, opt), UsageError);
    }
    SECTION("unsupported family") {
        opt.family = Family::negbin;
        CHECK_THROWS_AS(fit_mixed_core(X, y, {}, {}, {g}, opt), UsageError);
    }
    SECTION("link that does not suit the family") {
        opt.family = Family::poisson;
        opt.link = Link::logit;
        CHECK_THROWS_AS(fit_mixed_core(X, y, {}, {}, {g}, opt), UsageError);
    }
    SECTION("binomial successes above trials") {
        opt.family = Family::binomial;
        CHECK_THROWS_AS(fit_mixed_core(X, y, Eigen::VectorXd::Constant(6, 2.0), {}, {g}, opt),
                        UsageError);
    }
    SECTION("rank-deficient fixed effects") {
        X.col(1).setOnes();
        CHECK_THROWS_AS(fit_mixed_core(X, y, {}, {}, {g}, opt), NumericalError);
    }
    SECTION("no grouping factor") {
        CHECK_THROWS_AS(fit_mixed_core(X, y, {}, {}, {}, opt), UsageError);
    }
}
