// fit_mixed: grouping columns named beside the formula, numeric or categorical; prediction
// from a table with and without the random effects. Internal checks (fixed seeds).
#include <catch2/catch.hpp>

#include <cmath>
#include <limits>
#include <random>

#include "safesite/error.hpp"
#include "safesite/stats/mixed_model.hpp"

using namespace safesite;
using namespace safesite::stats;

namespace {
// 8 census years (numeric column 2015..2022) × 6 plots × 10 plants; Gaussian growth.
Table growth_table() {
    std::seed_seq seq{42, 0};
    std::mt19937_64 rng(seq);
    std::normal_distribution<double> normal(0.0, 1.0);
    std::vector<double> year_effect(8), plot_effect(6);
    for (double& v : year_effect) v = 0.4 * normal(rng);
    for (double& v : plot_effect) v = 0.2 * normal(rng);
    std::vector<double> year, size, size_next;
    std::vector<std::string> plot, microsite;
    for (int t = 0; t < 8; ++t)
        for (int p = 0; p < 6; ++p)
            for (int k = 0; k < 10; ++k) {
                const double z = 1.0 + normal(rng);
                const std::string m = (k % 2 == 0) ? "gravel" : "cushion";
                year.push_back(2015 + t);
                std::string label = "P";  // built by +=: g++ 12 warns falsely on "P" + string
                label += std::to_string(p + 1);
                plot.push_back(label);
                microsite.push_back(m);
                size.push_back(z);
                size_next.push_back(0.3 + 0.8 * z + (m == "cushion" ? 0.2 : 0.0) +
                                    year_effect[t] + plot_effect[p] + 0.3 * normal(rng));
            }
    Table t;
    t.add_numeric("year", year);
    t.add_categorical("plot", plot);
    t.add_categorical("microsite", microsite, {"gravel", "cushion"});
    t.add_numeric("size", size);
    t.add_numeric("size_next", size_next);
    return t;
}
}  // namespace

TEST_CASE("fit_mixed: numeric year and categorical plot as crossed random intercepts",
          "[stats][mixed][unit]") {
    const Table data = growth_table();
    MixedOptions opt;
    opt.groups = {"year", "plot"};
    const MixedFit fit = fit_mixed("size_next ~ size + microsite", data, opt);
    REQUIRE(fit.converged);
    CHECK(fit.nobs == 480);
    REQUIRE(fit.fixed_names ==
            std::vector<std::string>{"(Intercept)", "size", "microsite[cushion]"});
    REQUIRE(fit.random_effects.size() == 2);
    CHECK(fit.random_effects[0].group == "year");
    CHECK(fit.random_effects[0].levels.front() == "2015");
    CHECK(fit.random_effects[0].levels.back() == "2022");
    CHECK(fit.random_effects[1].levels.size() == 6);

    // Prediction: rows for year 2017 (seen), 2031 (unseen) and a missing size.
    Table nd;
    nd.add_numeric("year", {2017, 2031, 2017});
    nd.add_categorical("plot", {"P2", "P2", "P2"});
    nd.add_categorical("microsite", {"cushion", "cushion", "gravel"}, {"gravel", "cushion"});
    nd.add_numeric("size", {1.5, 1.5, std::numeric_limits<double>::quiet_NaN()});
    const Eigen::VectorXd fixed_only = fit.linear_predictor(nd, false);
    const Eigen::VectorXd with = fit.linear_predictor(nd, true);
    const double xb = fit.fixed[0] + 1.5 * fit.fixed[1] + fit.fixed[2];
    CHECK(fixed_only[0] == Approx(xb).margin(1e-12));
    CHECK(with[0] == Approx(xb + fit.random_effect("year", "2017") + fit.random_effect("plot", "P2"))
                         .margin(1e-12));
    // Unseen year: its effect is the population mean 0, the plot effect still applies.
    CHECK(with[1] == Approx(xb + fit.random_effect("plot", "P2")).margin(1e-12));
    CHECK(std::isnan(with[2]));
    CHECK(std::isnan(fixed_only[2]));
    // predict: the link scale is the linear predictor; identity link, so the response too.
    const Eigen::VectorXd p_link = fit.predict(nd, Scale::link, true);
    const Eigen::VectorXd p_resp = fit.predict(nd, Scale::response, false);
    CHECK(p_link[0] == Approx(with[0]).margin(1e-12));
    CHECK(p_resp[1] == Approx(fixed_only[1]).margin(1e-12));
    CHECK(std::isnan(p_resp[2]));
    // An absent grouping column contributes 0 (the "average plot").
    Table no_plot;
    no_plot.add_numeric("year", {2017});
    no_plot.add_categorical("microsite", {"cushion"}, {"gravel", "cushion"});
    no_plot.add_numeric("size", {1.5});
    CHECK(fit.linear_predictor(no_plot, true)[0] ==
          Approx(xb + fit.random_effect("year", "2017")).margin(1e-12));
}

TEST_CASE("fit_mixed: rows with a missing grouping label are left out", "[stats][mixed][unit]") {
    Table data = growth_table();
    std::vector<std::string> plot = data.categorical("plot").values;
    plot[0] = "";
    plot[7] = "";
    data.add_categorical("plot", plot);
    MixedOptions opt;
    opt.groups = {"plot"};
    const MixedFit fit = fit_mixed("size_next ~ size", data, opt);
    CHECK(fit.nobs == 478);
}

TEST_CASE("fit_mixed: random slope of size by year through the front end",
          "[stats][mixed][unit]") {
    const Table data = growth_table();
    MixedOptions opt;
    opt.groups = {"year"};
    opt.slope_column = "size";
    opt.correlated_slope = false;
    const MixedFit fit = fit_mixed("size_next ~ size + microsite", data, opt);
    REQUIRE(fit.random_effects[0].terms == std::vector<std::string>{"(Intercept)", "size"});
    Table nd;
    nd.add_numeric("year", {2016});
    nd.add_categorical("microsite", {"gravel"}, {"gravel", "cushion"});
    nd.add_numeric("size", {2.0});
    const double expected = fit.fixed[0] + 2.0 * fit.fixed[1] + fit.random_effect("year", "2016") +
                            2.0 * fit.random_effect("year", "2016", "size");
    CHECK(fit.linear_predictor(nd, true)[0] == Approx(expected).margin(1e-12));
}

TEST_CASE("fit_mixed: option errors are UsageErrors", "[stats][mixed][unit]") {
    const Table data = growth_table();
    MixedOptions opt;
    SECTION("no grouping column") {
        CHECK_THROWS_AS(fit_mixed("size_next ~ size", data, opt), UsageError);
    }
    SECTION("grouping column named twice") {
        opt.groups = {"plot", "plot"};
        CHECK_THROWS_AS(fit_mixed("size_next ~ size", data, opt), UsageError);
    }
    SECTION("unknown grouping column") {
        opt.groups = {"station"};
        CHECK_THROWS_AS(fit_mixed("size_next ~ size", data, opt), UsageError);
    }
    SECTION("slope group not among the groups") {
        opt.groups = {"plot"};
        opt.slope_column = "size";
        CHECK_THROWS_AS(fit_mixed("size_next ~ size", data, opt), UsageError);
    }
    SECTION("categorical slope column") {
        opt.groups = {"year"};
        opt.slope_column = "microsite";
        CHECK_THROWS_AS(fit_mixed("size_next ~ size", data, opt), UsageError);
    }
    SECTION("prediction from a fit without formula") {
        Eigen::MatrixXd X = Eigen::MatrixXd::Ones(6, 1);
        Eigen::VectorXd y(6);
        y << 1, 2, 3, 4, 5, 7;
        GroupingFactor g;
        g.name = "plot";
        g.level_names = {"a", "b"};
        g.level = {0, 0, 0, 1, 1, 1};
        const MixedFit fit = fit_mixed_core(X, y, {}, {}, {g}, opt);
        CHECK_THROWS_AS(fit.linear_predictor(data, false), UsageError);
    }
}

TEST_CASE("fit_mixed: binomial prediction on the response scale is the inverse logit",
          "[stats][mixed][unit]") {
    // Survival of 12 plots × 20 plants with a plot effect; predict a seen and an unseen plot.
    std::seed_seq seq{7, 0};
    std::mt19937_64 rng(seq);
    std::normal_distribution<double> normal(0.0, 1.0);
    std::vector<double> size, survived;
    std::vector<std::string> plot;
    for (int p = 0; p < 12; ++p) {
        const double b = 0.7 * normal(rng);
        for (int k = 0; k < 20; ++k) {
            const double z = normal(rng);
            std::string label = "Q";
            label += std::to_string(p);
            plot.push_back(label);
            size.push_back(z);
            const double pr = 1.0 / (1.0 + std::exp(-(0.4 + 0.9 * z + b)));
            survived.push_back(std::bernoulli_distribution(pr)(rng) ? 1.0 : 0.0);
        }
    }
    Table data;
    data.add_numeric("size", size);
    data.add_numeric("survived", survived);
    data.add_categorical("plot", plot);
    MixedOptions opt;
    opt.family = Family::binomial;
    opt.groups = {"plot"};
    const MixedFit fit = fit_mixed("survived ~ size", data, opt);
    REQUIRE(fit.converged);
    Table nd;
    nd.add_numeric("size", {0.5, 0.5});
    nd.add_categorical("plot", {"Q3", "elsewhere"});
    const Eigen::VectorXd eta = fit.predict(nd, Scale::link, true);
    const Eigen::VectorXd mu = fit.predict(nd, Scale::response, true);
    for (int i = 0; i < 2; ++i) CHECK(mu[i] == Approx(1.0 / (1.0 + std::exp(-eta[i]))).margin(1e-12));
    CHECK(eta[0] == Approx(fit.fixed[0] + 0.5 * fit.fixed[1] + fit.random_effect("plot", "Q3")).margin(1e-12));
    CHECK(eta[1] == Approx(fit.fixed[0] + 0.5 * fit.fixed[1]).margin(1e-12));
}
