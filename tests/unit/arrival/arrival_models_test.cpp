// Trapping and retention models against closed-form maximum-likelihood solutions (saturated
// models, where the binomial MLE of each cell is its observed proportion — a textbook fact,
// e.g. McCullagh & Nelder 1989, section 4.4 (from memory)), and the Gauss–Hermite average
// against a fine trapezoid rule.
#include <catch2/catch.hpp>

#include <cmath>
#include <string>

#include "safesite/arrival/retention_data.hpp"
#include "safesite/arrival/retention_model.hpp"
#include "safesite/arrival/trapping_data.hpp"
#include "safesite/arrival/trapping_model.hpp"
#include "safesite/error.hpp"

namespace arr = safesite::arrival;

namespace {

const std::vector<std::string> microsites = {"gravel", "cushion", "tussock"};
const std::vector<std::string> forms = {"cushion", "tussock"};

// Retention intervals all of length delta: `left` of `n` intervals end in a departure.
std::vector<arr::RetentionInterval> intervals(const std::string& micro, int n, int left,
                                              double delta) {
    std::vector<arr::RetentionInterval> out;
    for (int i = 0; i < n; ++i)
        out.push_back({micro + std::to_string(i), "st", micro, "plumed", 0.0, delta, i < left});
    return out;
}

}  // namespace

TEST_CASE("retention hazard: equal intervals give the closed-form MLE", "[arrival][unit]") {
    // With one interval length Δ per microsite and the saturated model `left ~ microsite`, the
    // MLE of P(left) in microsite m is its observed share p̂ = k/n, so
    //   ĥ = −log(1 − p̂)/Δ   and, by the delta method on η = log(−log(1 − p)) − log Δ,
    //   se(log ĥ) = √(p̂ / ((1 − p̂) n)) / (−log(1 − p̂)).
    auto iv = intervals("gravel", 200, 120, 3.0);
    const auto c = intervals("cushion", 150, 30, 7.0);
    iv.insert(iv.end(), c.begin(), c.end());
    const auto table = arr::interval_table(iv, microsites);
    const auto fit = arr::fit_retention(table, "left ~ microsite");
    REQUIRE(fit.converged);
    const auto hz = arr::hazard_table(fit, {"gravel", "cushion"}, {"plumed"}, 0.95);
    REQUIRE(hz.size() == 2);
    const double p_g = 120.0 / 200.0, p_c = 30.0 / 150.0;
    // IRLS converges to ~1e-10 relative in the deviance, which leaves ~1e-8 relative in the
    // estimates; 1e-6 relative is a safe bound.
    CHECK(hz[0].hazard_per_day == Approx(-std::log(1 - p_g) / 3.0).epsilon(1e-6));
    CHECK(hz[1].hazard_per_day == Approx(-std::log(1 - p_c) / 7.0).epsilon(1e-6));
    const double se_c = std::sqrt(p_c / ((1 - p_c) * 150.0)) / (-std::log(1 - p_c));
    CHECK(hz[1].log_hazard_se == Approx(se_c).epsilon(1e-5));
    // 95 % Wald interval on the log scale, z = 1.959964 (normal quantile, 7 digits).
    CHECK(hz[1].lower == Approx(hz[1].hazard_per_day * std::exp(-1.959964 * se_c)).epsilon(1e-5));
    CHECK(hz[1].upper == Approx(hz[1].hazard_per_day * std::exp(1.959964 * se_c)).epsilon(1e-5));
    // Unequal intervals: the offset puts both on the daily scale, so a microsite split into
    // 3-day and 7-day intervals with the shares 1 − e^{−3h}, 1 − e^{−7h} of one h = 0.05 per day
    // is fitted by that h when the shares are exact (n large enough for integer counts: the
    // counts below are rounded, so the check allows 1 %).
    std::vector<arr::RetentionInterval> mixed = intervals("tussock", 10000, 1393, 3.0);
    const auto seven = intervals("tussock", 10000, 2953, 7.0);  // 1 − e^{−0.35} = 0.2953
    mixed.insert(mixed.end(), seven.begin(), seven.end());        // 1 − e^{−0.15} = 0.1393
    const auto fit2 = arr::fit_retention(arr::interval_table(mixed, microsites), "left ~ 1");
    const auto h2 = arr::hazard_table(fit2, {"tussock"}, {"plumed"});
    CHECK(h2[0].hazard_per_day == Approx(0.05).epsilon(0.01));
}

TEST_CASE("retention formula gets its offset once", "[arrival][unit]") {
    CHECK(arr::retention_formula_with_offset("left ~ microsite") ==
          "left ~ microsite + offset(log(interval_days))");
    CHECK(arr::retention_formula_with_offset("left ~ microsite + offset(log_interval)") ==
          "left ~ microsite + offset(log_interval)");
    const Eigen::VectorXd r = arr::retention_curve(0.1, Eigen::Vector3d(0.0, 10.0, 20.0));
    CHECK(r[0] == 1.0);
    CHECK(r[1] == Approx(std::exp(-1.0)).margin(1e-15));
    CHECK(r[2] == Approx(std::exp(-2.0)).margin(1e-15));
}

TEST_CASE("trapping by form: a size-free model returns each form's pooled share",
          "[arrival][unit]") {
    // `trapped / launched ~ form + seed_type` is saturated for a 2 × 2 layout only when
    // interactions are absent in the data; with a single seed type, `~ form` is saturated and
    // the MLE of each form's probability is its pooled trapped share.
    const char* csv =
        "neighbour,form,neighbour_size,seed_type,launched,trapped\n"
        "c1,cushion,10,plumed,20,8\n"
        "c2,cushion,20,plumed,20,12\n"
        "t1,tussock,15,plumed,20,3\n"
        "t2,tussock,40,plumed,30,4\n";
    const auto data = arr::parse_trapping(csv, forms);
    const auto fit = arr::fit_trapping(arr::trapping_table(data.trials, forms),
                                       "trapped / launched ~ form");
    const auto tau = arr::trapping_by_form(fit, "plumed",
                                           {{"cushion", {5.0, 50.0}}, {"tussock", {12.0}}});
    CHECK(tau.at("cushion") == Approx(20.0 / 40.0).epsilon(1e-6));
    CHECK(tau.at("tussock") == Approx(7.0 / 50.0).epsilon(1e-6));
    // Forms or seed types without trials cannot be predicted.
    CHECK_THROWS_AS(arr::trapping_by_form(fit, "plumed", {{"moss", {1.0}}}),
                    safesite::UsageError);
    CHECK_THROWS_AS(arr::trapping_by_form(fit, "plumed", {{"cushion", {}}}),
                    safesite::UsageError);
}

TEST_CASE("average trapping integrates the neighbour effect", "[arrival][unit]") {
    // E[logit⁻¹(η + σZ)] by a trapezoid rule on [−12, 12] with step 1e-3 (error ≪ 1e-10 for
    // this smooth, rapidly decaying integrand: common practice) vs the 40-node Gauss–Hermite
    // rule; tolerance 1e-9.
    auto trapezoid = [](double eta, double sd) {
        const double h = 1e-3;
        double s = 0.0;
        for (double z = -12.0; z <= 12.0 + 1e-12; z += h) {
            const double w = (std::abs(z) > 12.0 - 1e-9) ? 0.5 : 1.0;
            s += w * std::exp(-0.5 * z * z) / (1.0 + std::exp(-(eta + sd * z)));
        }
        return s * h / std::sqrt(2.0 * M_PI);
    };
    for (double sd : {0.3, 1.0, 2.5}) {
        for (double eta : {-3.0, 0.0, 1.5}) {
            INFO("sd = " << sd << ", eta = " << eta);
            CHECK(arr::average_trapping(Eigen::VectorXd::Constant(1, eta), sd) ==
                  Approx(trapezoid(eta, sd)).margin(1e-9));
        }
    }
    // sd = 0: the plain mean of the probabilities.
    CHECK(arr::average_trapping(Eigen::Vector2d(0.0, std::log(3.0)), 0.0) ==
          Approx((0.5 + 0.75) / 2).margin(1e-15));
    CHECK_THROWS_AS(arr::average_trapping(Eigen::VectorXd(), 0.0), safesite::UsageError);
}
