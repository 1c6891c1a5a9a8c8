// Class graph components and the λ of the self-renewing part, on stage matrices whose
// components and eigenvalues are derived by hand, and on an IPM with a class that receives no
// recruits (docs/methods/kernel.md, "Reducible kernels").
#include <catch2/catch.hpp>

#include <cmath>

#include "safesite/analysis/eigen_triple.hpp"
#include "safesite/analysis/reducibility.hpp"
#include "safesite/kernel/kernel_operator.hpp"

using namespace safesite;
using namespace safesite::analysis;

namespace {

BoolMatrix positive(const Eigen::MatrixXd& m) { return (m.array() > 0.0).matrix(); }

}  // namespace

TEST_CASE("reducibility: components and roles of a 4-stage graph known by hand",
          "[analysis][unit]") {
    // Stages 0 juvenile, 1 adult, 2 senescent (reached from adults, never reproduces), 3 a
    // remnant class planted once (survives, matures into adults, receives nothing). Edges
    // j → i for A(i, j) > 0; reproduction: adult → juvenile. By hand (Caswell 2001 §4.5
    // normal form): components {3} (a source) → {0, 1} (renews itself through adult →
    // juvenile) → {2}; {3} is reached by nothing, so declining; {2} is reached from the
    // renewing component, so dependent.
    Eigen::MatrixXd a(4, 4);
    a << 0.0, 2.0, 0.0, 0.0,   //
        0.3, 0.5, 0.0, 0.1,    //
        0.0, 0.2, 0.8, 0.0,    //
        0.0, 0.0, 0.0, 0.9;
    Eigen::MatrixXd f = Eigen::MatrixXd::Zero(4, 4);
    f(0, 1) = 2.0;
    const ClassComponents c = class_components(positive(a), positive(f));
    REQUIRE(c.count() == 3);
    CHECK(c.reducible());
    CHECK(c.component[3] == 0);
    CHECK(c.component[0] == 1);
    CHECK(c.component[1] == 1);
    CHECK(c.component[2] == 2);
    CHECK(c.role[0] == ComponentRole::declining);
    CHECK(c.role[1] == ComponentRole::self_renewing);
    CHECK(c.role[2] == ComponentRole::dependent);
    CHECK(c.members[1] == std::vector<std::size_t>{0, 1});

    // λ of each component by hand: {0, 1}: λ² − 0.5 λ − 0.6 = 0, λ = (0.5 + √2.65)/2;
    // {2}: 0.8; {3}: 0.9. The whole matrix's spectral radius is the largest, 1.0639…
    const kernel::KernelOperator op = kernel::KernelOperator::from_stage_matrix(a);
    const double renewing = 0.5 * (0.5 + std::sqrt(2.65));
    CHECK(restricted_lambda(op, {0, 1}) == Approx(renewing).epsilon(1e-12));
    CHECK(restricted_lambda(op, {2}) == Approx(0.8).epsilon(1e-12));
    CHECK(restricted_lambda(op, {3}) == Approx(0.9).epsilon(1e-12));
    CHECK(restricted_lambda(op, {}) == 0.0);
    CHECK(dominant_eigen(a).lambda == Approx(renewing).epsilon(1e-10));

    // The triple of the renewing block: w ∝ (λ − 0.5, 0.3)·… from the second row
    // 0.3 w0 + 0.5 w1 = λ w1, so w0 / w1 = (λ − 0.5)/0.3; zero outside the block.
    const EigenTriple t = restricted_triple(op, {0, 1});
    CHECK(t.lambda == Approx(renewing).epsilon(1e-12));
    CHECK(t.w[0] / t.w[1] == Approx((renewing - 0.5) / 0.3).epsilon(1e-10));
    CHECK(t.w[2] == 0.0);
    CHECK(t.w[3] == 0.0);
    CHECK(t.w.sum() == Approx(1.0).epsilon(1e-12));
    // Left: v0 · λ = 0.3 v1 from the first column, so v1 / v0 = λ / 0.3; ⟨v, w⟩ = 1.
    CHECK(t.v[1] / t.v[0] == Approx(renewing / 0.3).epsilon(1e-10));
    CHECK(t.v.dot(t.w) == Approx(1.0).epsilon(1e-12));
}

TEST_CASE("reducibility: a declining class with a larger eigenvalue than the renewing part",
          "[analysis][unit]") {
    // Juvenile 0 and adult 1 renew each other (fecundity 0.5, survival 0.3 and 0.6); stage 2
    // holds old plants that survive with 0.97 and make juveniles (0.4) but are never
    // replaced. The dominant eigenvalue is 0.97 (stage 2's stasis); the renewing part has
    // λ² − 0.6 λ − 0.15 = 0, λ = (0.6 + √0.96)/2 = 0.78990, by hand. Reproduction edges:
    // 1 → 0 and 2 → 0.
    Eigen::MatrixXd a(3, 3);
    a << 0.0, 0.5, 0.4,  //
        0.3, 0.6, 0.0,   //
        0.0, 0.0, 0.97;
    Eigen::MatrixXd f = Eigen::MatrixXd::Zero(3, 3);
    f(0, 1) = 0.5;
    f(0, 2) = 0.4;
    const ClassComponents c = class_components(positive(a), positive(f));
    REQUIRE(c.count() == 2);
    CHECK(c.component[2] == 0);
    CHECK(c.role[0] == ComponentRole::declining);  // {2}: its reproduction leaves it
    CHECK(c.role[1] == ComponentRole::self_renewing);
    const kernel::KernelOperator op = kernel::KernelOperator::from_stage_matrix(a);
    CHECK(dominant_eigen(a).lambda == Approx(0.97).epsilon(1e-10));
    CHECK(restricted_lambda(op, c.members[1]) ==
          Approx(0.5 * (0.6 + std::sqrt(0.96))).epsilon(1e-12));
}

TEST_CASE("reducibility: an irreducible matrix is one component; a lone class is its own",
          "[analysis][unit]") {
    Eigen::MatrixXd a(2, 2);
    a << 0.2, 1.5,  //
        0.4, 0.7;
    Eigen::MatrixXd f = Eigen::MatrixXd::Zero(2, 2);
    f(0, 1) = 1.5;
    const ClassComponents c = class_components(positive(a), positive(f));
    CHECK(c.count() == 1);
    CHECK_FALSE(c.reducible());
    CHECK(c.role[0] == ComponentRole::self_renewing);
    // Without the reproduction label, the same cycle does not renew itself.
    const ClassComponents d =
        class_components(positive(a), BoolMatrix::Constant(2, 2, false));
    CHECK(d.role[0] == ComponentRole::declining);
    // A class with no edges at all is a component of its own (common practice: a graph is
    // strongly connected only if every node reaches every other).
    Eigen::MatrixXd b = Eigen::MatrixXd::Zero(3, 3);
    b.topLeftCorner(2, 2) = a;
    CHECK(class_components(positive(b), BoolMatrix::Constant(3, 3, false)).count() == 2);
    CHECK_THROWS_AS(class_components(positive(b), positive(a)), std::invalid_argument);
}

TEST_CASE("reducibility: an IPM with a microsite that receives no recruits",
          "[analysis][unit]") {
    // Two classes (microsites A and B), size-independent rates: survival s_A = 0.5,
    // s_B = 0.95, growth z' ~ N(5, 1) on [0, 10] (boundary eviction keeps all growth mass),
    // flowering 1, b = 10 seeds; every seed arrives in A (a = (1, 0)), e_A = 0.03. Columns of
    // the A block then sum to s_A + b a_A e_A = 0.8 at every size, so λ_A = 0.8 with a
    // constant reproductive value (algebra: 1ᵀ K_AA = 0.8 · 1ᵀ in the weighted sense);
    // B only survives and grows: λ_B = 0.95. B's seeds go to A, nothing comes back to B.
    using namespace safesite::kernel;
    KernelDescription d;
    for (std::size_t m = 0; m < 2; ++m) {
        ContinuousClass c;
        c.name.assign(1, m == 0 ? 'A' : 'B');  // a string literal here: false -Wrestrict
        c.microsite = m;
        const double s = m == 0 ? 0.5 : 0.95;
        c.survival = [s](double) { return s; };
        c.growth = Growth::gaussian([](double) { return 5.0; }, [](double) { return 1.0; });
        c.flowering = [](double) { return 1.0; };
        c.seeds = [](double) { return 10.0; };
        d.classes.push_back(c);
        Microsite site;
        site.name = c.name;
        site.arrival = m == 0 ? 1.0 : 0.0;
        site.establishment = 0.03;
        site.recruit_size = SizeDensity::gaussian(5.0, 1.0);
        site.entry_class = m;
        d.microsites.push_back(site);
    }
    d.eviction = EvictionPolicy::boundary;
    const KernelOperator op(Mesh(0.0, 10.0, 60, QuadratureRule::gauss_legendre), d);

    const Reducibility r = reducibility(op);
    REQUIRE(r.components.reducible());
    REQUIRE(r.components.count() == 2);
    CHECK(r.components.component[1] == 0);  // B upstream of A
    CHECK(r.components.role[0] == ComponentRole::declining);
    CHECK(r.components.role[1] == ComponentRole::self_renewing);
    REQUIRE(r.leading_renewing);
    CHECK(*r.leading_renewing == 1);
    CHECK(r.renewing_lambda == Approx(0.8).epsilon(1e-8));
    CHECK(r.kernel_lambda == Approx(0.95).epsilon(1e-8));
    // The whole kernel's dominant eigenvalue is B's survival: the flaw this module fixes.
    CHECK(dominant_eigen(op).lambda == Approx(0.95).epsilon(1e-8));

    const EigenTriple t = restricted_triple(op, r.components.members[1]);
    CHECK(t.lambda == Approx(0.8).epsilon(1e-8));
    const Eigen::Index n = 60;
    CHECK(t.w.segment(n, n).cwiseAbs().maxCoeff() == 0.0);
    CHECK(t.v.segment(n, n).cwiseAbs().maxCoeff() == 0.0);
    // Constant reproductive value on A, normalised to ⟨v, w⟩ = Σ ω v w = 1 with Σ ω w = 1.
    CHECK(t.v.head(n).maxCoeff() == Approx(1.0).epsilon(1e-8));
    CHECK(t.v.head(n).minCoeff() == Approx(1.0).epsilon(1e-8));
    CHECK(t.weights.cwiseProduct(t.w).sum() == Approx(1.0).epsilon(1e-12));
}
