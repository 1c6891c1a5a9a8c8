// The seed arrival chain (docs/methods/arrival.md): limiting cases, closed forms, invariants
// and derivatives. The closed forms are derived in the comments (solutions of the Kolmogorov
// forward equation dp/dt = pQ for small chains); tolerances are argued per check.
#include <catch2/catch.hpp>

#include <cmath>
#include <map>
#include <random>

#include "safesite/arrival/arrival_chain.hpp"
#include "safesite/error.hpp"

using safesite::arrival::ArrivalResult;
using safesite::arrival::ChainModifiers;
using safesite::arrival::ChainParameters;

namespace {

// Three microsites: bare gravel, cushion and tussock neighbours (invented example values).
ChainParameters three_microsites() {
    ChainParameters p;
    p.microsites = {"gravel", "cushion", "tussock"};
    p.bare = 0;
    p.cover = Eigen::Vector3d(0.0, 0.20, 0.12);
    p.trapping = Eigen::Vector3d(0.0, 0.55, 0.35);
    p.hazard_per_day = Eigen::Vector3d(0.08, 0.01, 0.02);
    p.relanding = 0.6;
    p.exposure_days = 150.0;
    return p;
}

// Bare soil and one shrub form: ℓ = (0.8, 0.2), h = (0.05, 0.004) per day.
ChainParameters bare_and_shrub(double relanding, double exposure_days) {
    ChainParameters p;
    p.microsites = {"bare", "shrub"};
    p.bare = 0;
    p.cover = Eigen::Vector2d(0.0, 0.4);
    p.trapping = Eigen::Vector2d(0.0, 0.5);
    p.hazard_per_day = Eigen::Vector2d(0.05, 0.004);
    p.relanding = relanding;
    p.exposure_days = exposure_days;
    return p;
}

}  // namespace

TEST_CASE("landing split: trapped share under each form, the rest on bare soil",
          "[arrival][unit]") {
    const ChainParameters p = three_microsites();
    const Eigen::VectorXd split = safesite::arrival::landing_split(p);
    // ℓ_f = c_f τ_f; ℓ_bare = 1 − Σ c_f τ_f (exact arithmetic on decimals: 1e-15).
    CHECK(split[1] == Approx(0.20 * 0.55).margin(1e-15));
    CHECK(split[2] == Approx(0.12 * 0.35).margin(1e-15));
    CHECK(split[0] == Approx(1.0 - 0.11 - 0.042).margin(1e-15));
    CHECK(split.sum() == Approx(1.0).margin(1e-15));
}

TEST_CASE("hazard 0: the arrival fractions equal the landing split", "[arrival][unit]") {
    ChainParameters p = three_microsites();
    p.hazard_per_day.setZero();
    const ArrivalResult r = safesite::arrival::arrival_fractions(p);
    // Q = 0 ⇒ exp(QT) = I exactly; the only error is rounding in the Padé evaluation (1e-14).
    for (int i = 0; i < 3; ++i) CHECK(r.fractions[i] == Approx(r.landing[i]).margin(1e-14));
    CHECK(r.lost == Approx(0.0).margin(1e-14));
}

TEST_CASE("T large and no certain re-landing: every seed is lost", "[arrival][unit]") {
    ChainParameters p = three_microsites();
    for (double rho : {0.0, 0.6, 0.99}) {
        p.relanding = rho;
        p.exposure_days = 1e5;
        const ArrivalResult r = safesite::arrival::arrival_fractions(p);
        INFO("rho = " << rho);
        // Slowest effective loss rate ≥ min h (1 − ρ) = 0.01·0.01 per day; after 1e5 days the
        // survivors are ≤ exp(−10) ≈ 4.5e-5 in the worst case ρ = 0.99; for ρ ≤ 0.6 they are
        // below exp(−400). Tolerances: 5e-5 and 1e-12.
        const double tol = rho > 0.9 ? 5e-5 : 1e-12;
        CHECK(r.lost == Approx(1.0).margin(tol));
        CHECK(r.fractions.sum() == Approx(0.0).margin(tol));
    }
}

TEST_CASE("one microsite: closed form exp(−h(1−ρ)T), self-transitions handled",
          "[arrival][unit]") {
    // Two states {bare, lost}: a seed departs at rate h and re-lands (back on bare soil) with
    // probability ρ, so the effective exit rate is h(1 − ρ) and a(T) = exp(−h(1 − ρ)T).
    ChainParameters p;
    p.microsites = {"bare"};
    p.cover = Eigen::VectorXd::Zero(1);
    p.trapping = Eigen::VectorXd::Zero(1);
    p.hazard_per_day = Eigen::VectorXd::Constant(1, 0.07);
    for (double rho : {0.0, 0.3, 0.9, 1.0}) {
        for (double t : {0.0, 1.0, 30.0, 200.0}) {
            p.relanding = rho;
            p.exposure_days = t;
            const ArrivalResult r = safesite::arrival::arrival_fractions(p);
            const double expected = std::exp(-0.07 * (1.0 - rho) * t);
            INFO("rho = " << rho << ", T = " << t);
            // Padé scaling and squaring is accurate to a few ulps relative to ‖QT‖ (Higham
            // 2005): 1e-13 absolute for ‖QT‖ ≤ 14.
            CHECK(r.fractions[0] == Approx(expected).margin(1e-13));
            CHECK(r.lost == Approx(1.0 - expected).margin(1e-13));
        }
    }
}

TEST_CASE("two microsites, no re-landing: a_m = ℓ_m exp(−h_m T)", "[arrival][unit]") {
    const ChainParameters p = bare_and_shrub(0.0, 90.0);
    const ArrivalResult r = safesite::arrival::arrival_fractions(p);
    // Without re-landing the microsites do not exchange seeds: each decays on its own.
    CHECK(r.fractions[0] == Approx(0.8 * std::exp(-0.05 * 90.0)).margin(1e-13));
    CHECK(r.fractions[1] == Approx(0.2 * std::exp(-0.004 * 90.0)).margin(1e-13));
}

TEST_CASE("two microsites with re-landing: closed form by Sylvester's formula",
          "[arrival][unit]") {
    // The microsite block B = diag(h)(ρ 1 ℓᵀ − I) is 2×2 with distinct real eigenvalues λ1, λ2
    // and exp(BT) = [e^{λ1 T}(B − λ2 I) − e^{λ2 T}(B − λ1 I)] / (λ1 − λ2) (Sylvester's
    // formula, any linear-algebra text); a(T) = ℓᵀ exp(BT). λ from the characteristic
    // polynomial λ² − tr(B) λ + det(B) = 0.
    const ChainParameters p = bare_and_shrub(0.7, 120.0);
    const double l0 = 0.8, l1 = 0.2, h0 = 0.05, h1 = 0.004, rho = 0.7, t = 120.0;
    const double b00 = h0 * (rho * l0 - 1.0), b01 = h0 * rho * l1;
    const double b10 = h1 * rho * l0, b11 = h1 * (rho * l1 - 1.0);
    const double tr = b00 + b11, det = b00 * b11 - b01 * b10;
    const double disc = std::sqrt(tr * tr / 4.0 - det);
    const double lam1 = tr / 2.0 + disc, lam2 = tr / 2.0 - disc;
    const double e1 = std::exp(lam1 * t), e2 = std::exp(lam2 * t);
    auto entry = [&](double bij, bool diag) {
        return (e1 * (bij - (diag ? lam2 : 0.0)) - e2 * (bij - (diag ? lam1 : 0.0))) /
               (lam1 - lam2);
    };
    const double x00 = entry(b00, true), x01 = entry(b01, false);
    const double x10 = entry(b10, false), x11 = entry(b11, true);
    const ArrivalResult r = safesite::arrival::arrival_fractions(p);
    // Both routes are accurate to ~1e-15 relative; the closed form loses a little to the
    // subtraction over λ1 − λ2 ≈ 0.05: 1e-12 absolute.
    CHECK(r.fractions[0] == Approx(l0 * x00 + l1 * x10).margin(1e-12));
    CHECK(r.fractions[1] == Approx(l0 * x01 + l1 * x11).margin(1e-12));
}

TEST_CASE("probabilities sum to 1 and stay in [0, 1] over random parameter sets",
          "[arrival][unit]") {
    std::mt19937_64 rng(20261201);  // fixed seed (DEVELOPERS.md)
    std::uniform_real_distribution<double> u(0.0, 1.0);
    for (int rep = 0; rep < 200; ++rep) {
        ChainParameters p = three_microsites();
        const double c1 = u(rng), c2 = u(rng) * (1.0 - c1);
        p.cover = Eigen::Vector3d(0.0, c1, c2);
        p.trapping = Eigen::Vector3d(0.0, u(rng), u(rng));
        p.hazard_per_day = Eigen::Vector3d(u(rng), 0.2 * u(rng), 0.5 * u(rng));
        p.relanding = u(rng);
        p.exposure_days = 400.0 * u(rng);
        const ArrivalResult r = safesite::arrival::arrival_fractions(p);
        INFO("replicate " << rep);
        // Q has zero row sums, so exp(QT) is stochastic in exact arithmetic; rounding in the
        // Padé/squaring steps stays far below the 1e-12 required by issue 5.
        CHECK(r.fractions.sum() + r.lost == Approx(1.0).margin(1e-12));
        CHECK(r.fractions.minCoeff() >= 0.0);
        CHECK(r.fractions.maxCoeff() <= 1.0);
    }
}

TEST_CASE("derivatives agree with central differences", "[arrival][unit]") {
    const ChainParameters p = three_microsites();
    const auto d = safesite::arrival::arrival_derivatives(p);
    // Central differences with step δ = 1e-5 (relative to parameters of order 0.01–150): the
    // truncation error is O(δ² a''') ≲ 1e-10 here and rounding is O(ε/δ) ≈ 1e-11, so analytic
    // and numerical values must agree to 1e-8 absolute (common practice for checking
    // derivatives).
    const double tol = 1e-8;
    auto diff = [&](auto&& set, double base, double step) {
        ChainParameters up = p, down = p;
        set(up, base + step);
        set(down, base - step);
        return Eigen::VectorXd((safesite::arrival::arrival_fractions(up).fractions -
                                safesite::arrival::arrival_fractions(down).fractions) /
                               (2.0 * step));
    };
    for (int f : {1, 2}) {
        const Eigen::VectorXd dc =
            diff([f](ChainParameters& q, double x) { q.cover[f] = x; }, p.cover[f], 1e-5);
        const Eigen::VectorXd dt =
            diff([f](ChainParameters& q, double x) { q.trapping[f] = x; }, p.trapping[f], 1e-5);
        for (int i = 0; i < 3; ++i) {
            INFO("form " << f << ", microsite " << i);
            CHECK(d.d_cover(i, f) == Approx(dc[i]).margin(tol));
            CHECK(d.d_trapping(i, f) == Approx(dt[i]).margin(tol));
        }
    }
    CHECK(d.d_cover.col(0).isZero(0.0));
    for (int m = 0; m < 3; ++m) {
        // hazards are of order 0.01–0.1: step 1e-7 keeps the relative step ≤ 1e-5.
        const Eigen::VectorXd dh = diff(
            [m](ChainParameters& q, double x) { q.hazard_per_day[m] = x; }, p.hazard_per_day[m],
            1e-7);
        for (int i = 0; i < 3; ++i) {
            INFO("hazard of microsite " << m << ", microsite " << i);
            // ∂a/∂h is of order T = 150, so the check is relative: 1e-8 · 150.
            CHECK(d.d_hazard_per_day(i, m) == Approx(dh[i]).margin(150 * tol));
        }
    }
    const Eigen::VectorXd dr =
        diff([](ChainParameters& q, double x) { q.relanding = x; }, p.relanding, 1e-5);
    const Eigen::VectorXd dT =
        diff([](ChainParameters& q, double x) { q.exposure_days = x; }, p.exposure_days, 1e-3);
    for (int i = 0; i < 3; ++i) {
        CHECK(d.d_relanding[i] == Approx(dr[i]).margin(tol));
        CHECK(d.d_exposure_days[i] == Approx(dT[i]).margin(tol));
    }
}

TEST_CASE("scenario modifiers change cover, trapping odds, hazards and exposure",
          "[arrival][unit]") {
    const ChainParameters p = three_microsites();
    ChainModifiers mod;
    mod.cover_factor["cushion"] = 0.5;
    mod.trapping_odds_factor["tussock"] = 2.0;
    mod.hazard_factor["gravel"] = 0.25;
    mod.exposure_days = 100.0;
    const ChainParameters q = safesite::arrival::apply_modifiers(p, mod);
    CHECK(q.cover[1] == Approx(0.10).margin(1e-15));
    CHECK(q.cover[2] == Approx(0.12).margin(1e-15));
    // odds 0.35/0.65 doubled = 0.7/0.65 ⇒ τ = 0.7/1.35 (exact algebra; 1e-15).
    CHECK(q.trapping[2] == Approx(0.7 / 1.35).margin(1e-15));
    CHECK(q.hazard_per_day[0] == Approx(0.02).margin(1e-15));
    CHECK(q.exposure_days == 100.0);
    // The modified parameters drive the scenario result.
    const ArrivalResult direct = safesite::arrival::arrival_fractions(q);
    const ArrivalResult via = safesite::arrival::scenario_arrival(p, mod);
    CHECK((direct.fractions - via.fractions).cwiseAbs().maxCoeff() == 0.0);

    ChainModifiers too_much;
    too_much.cover_factor["cushion"] = 5.0;  // 1.0 + 0.12 > 1
    CHECK_THROWS_AS(safesite::arrival::apply_modifiers(p, too_much), safesite::UsageError);
    ChainModifiers unknown;
    unknown.hazard_factor["moss"] = 2.0;
    CHECK_THROWS_AS(safesite::arrival::apply_modifiers(p, unknown), safesite::UsageError);
    ChainModifiers bare_cover;
    bare_cover.cover_factor["gravel"] = 2.0;
    CHECK_THROWS_AS(safesite::arrival::apply_modifiers(p, bare_cover), safesite::UsageError);
}

TEST_CASE("direct scenario fractions and shares", "[arrival][unit]") {
    const ChainParameters p = three_microsites();
    const ArrivalResult base = safesite::arrival::arrival_fractions(p);
    ChainModifiers shares;
    shares.fraction_shares["gravel"] = 1.0;
    const ArrivalResult all_bare = safesite::arrival::scenario_arrival(p, shares);
    // Every retained seed moved to bare soil; the retained total is the baseline's.
    CHECK(all_bare.fractions[0] == Approx(base.fractions.sum()).margin(1e-15));
    CHECK(all_bare.fractions[1] == 0.0);
    CHECK(all_bare.lost == Approx(base.lost).margin(1e-15));

    ChainModifiers direct;
    direct.fractions = {{"gravel", 0.5}, {"cushion", 0.3}};
    const ArrivalResult r = safesite::arrival::scenario_arrival(p, direct);
    CHECK(r.fractions[0] == 0.5);
    CHECK(r.fractions[2] == 0.0);
    CHECK(r.lost == Approx(0.2).margin(1e-15));

    ChainModifiers over;
    over.fractions = {{"gravel", 0.8}, {"cushion", 0.3}};
    CHECK_THROWS_AS(safesite::arrival::scenario_arrival(p, over), safesite::UsageError);
    ChainModifiers both = direct;
    both.fraction_shares["gravel"] = 1.0;
    CHECK_THROWS_AS(safesite::arrival::scenario_arrival(p, both), safesite::UsageError);
}

TEST_CASE("chain parameters are validated", "[arrival][unit]") {
    auto throws = [](auto&& change) {
        ChainParameters p = three_microsites();
        change(p);
        CHECK_THROWS_AS(safesite::arrival::arrival_fractions(p), safesite::UsageError);
    };
    throws([](ChainParameters& p) { p.cover[1] = 0.95; });            // Σ cover > 1
    throws([](ChainParameters& p) { p.trapping[2] = 1.2; });          // τ > 1
    throws([](ChainParameters& p) { p.hazard_per_day[0] = -0.1; });   // h < 0
    throws([](ChainParameters& p) { p.relanding = 1.5; });            // ρ > 1
    throws([](ChainParameters& p) { p.exposure_days = -1.0; });       // T < 0
    throws([](ChainParameters& p) { p.bare = 3; });                   // no such microsite
    throws([](ChainParameters& p) { p.microsites[2] = "cushion"; });  // duplicate label
    throws([](ChainParameters& p) { p.cover = Eigen::Vector2d(0, 0.1); });  // wrong length
    // The bare entry of cover and trapping is ignored, whatever it holds.
    ChainParameters p = three_microsites();
    p.cover[0] = 0.68;
    p.trapping[0] = 7.0;
    CHECK_NOTHROW(safesite::arrival::arrival_fractions(p));
}

TEST_CASE("chain parameters from labelled values", "[arrival][unit]") {
    const ChainParameters p = safesite::arrival::make_chain_parameters(
        {"gravel", "cushion", "tussock"}, "gravel", {{"cushion", 0.2}, {"tussock", 0.12}},
        {{"cushion", 0.55}, {"tussock", 0.35}},
        {{"gravel", 0.08}, {"cushion", 0.01}, {"tussock", 0.02}}, 0.6, 150.0);
    const ChainParameters q = three_microsites();
    CHECK(p.bare == q.bare);
    CHECK(p.cover == q.cover);
    CHECK(p.trapping == q.trapping);
    CHECK(p.hazard_per_day == q.hazard_per_day);
    auto make = [](std::map<std::string, double> cover, std::map<std::string, double> hazard) {
        return safesite::arrival::make_chain_parameters(
            {"gravel", "cushion"}, "gravel", cover, {{"cushion", 0.5}}, hazard, 0.5, 10.0);
    };
    CHECK_NOTHROW(make({{"cushion", 0.2}}, {{"gravel", 0.1}, {"cushion", 0.1}}));
    CHECK_THROWS_AS(make({}, {{"gravel", 0.1}, {"cushion", 0.1}}), safesite::UsageError);
    CHECK_THROWS_AS(make({{"cushion", 0.2}, {"gravel", 0.8}}, {{"gravel", 0.1}, {"cushion", 0.1}}),
                    safesite::UsageError);
    CHECK_THROWS_AS(make({{"cushion", 0.2}}, {{"gravel", 0.1}}), safesite::UsageError);
    CHECK_THROWS_AS(make({{"cushion", 0.2}}, {{"gravel", 0.1}, {"moss", 0.1}}),
                    safesite::UsageError);
}
