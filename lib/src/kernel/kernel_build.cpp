// Construction of the KernelOperator: evaluate every vital rate at the mesh nodes, validate,
// apply the eviction policy and store the discretised pieces.
//
// References: [1] Easterling, Ellner & Dixon (2000) Ecology 81:694 (midpoint discretisation);
// [2] Williams, Miller & Ellner (2012) Ecology 93:2008 (eviction and its remedies);
// [3] Ellner, Childs & Rees (2016) chapter 6 (kernel assembly with weights).
#include <cmath>
#include <cstdio>
#include <memory>
#include <string>

#include <boost/math/distributions/normal.hpp>

#include "safesite/kernel/kernel_error.hpp"
#include "core/number_text.hpp"
#include "safesite/kernel/kernel_operator.hpp"

namespace safesite::kernel {

namespace {

std::string number(double x) { return core::number_text(x, 6); }

// Check one evaluated value; `what` names the admissible range.
enum class Range { probability, non_negative, finite, positive };

void check_value(double v, Range range, const std::string& block, const std::string& parameter,
                 std::size_t index) {
    if (!std::isfinite(v))
        throw KernelError(block, parameter, index, "value " + number(v) + " is not finite");
    switch (range) {
        case Range::probability:
            if (v < 0.0 || v > 1.0)
                throw KernelError(block, parameter, index,
                                  "value " + number(v) + " is outside [0, 1]");
            break;
        case Range::non_negative:
            if (v < 0.0)
                throw KernelError(block, parameter, index,
                                  "value " + number(v) + " is negative");
            break;
        case Range::positive:
            if (!(v > 0.0))
                throw KernelError(block, parameter, index,
                                  "value " + number(v) + " is not positive");
            break;
        case Range::finite:
            break;
    }
}

constexpr double inv_sqrt_2pi = 0.39894228040143267794;

// Tail masses of N(mean, sd) below L and above U (exact, Boost.Math normal CDF).
void normal_tails(double mean, double sd, double lower, double upper, double& below,
                  double& above) {
    const boost::math::normal_distribution<double> dist(mean, sd);
    below = boost::math::cdf(dist, lower);
    above = boost::math::cdf(boost::math::complement(dist, upper));
}

// Mass of a general density outside [L, U] on each side, used only to decide which edge
// receives the evicted mass under the boundary policy: 32-point Gauss–Legendre on
// [L − W, L] and [U, U + W], W = U − L (a documented heuristic, docs/methods/kernel.md).
template <class F>
void numerical_sides(const F& density, const Mesh& mesh, double& below, double& above) {
    const double width = mesh.upper() - mesh.lower();
    static thread_local std::unique_ptr<Mesh> unit;
    if (!unit) unit = std::make_unique<Mesh>(0.0, 1.0, 32, QuadratureRule::gauss_legendre);
    below = 0.0;
    above = 0.0;
    for (Eigen::Index i = 0; i < unit->points().size(); ++i) {
        const double u = unit->points()[i];
        const double wt = unit->weights()[i] * width;
        const double lo = density(mesh.lower() - width + u * width);
        const double hi = density(mesh.upper() + u * width);
        if (std::isfinite(lo) && lo > 0.0) below += wt * lo;
        if (std::isfinite(hi) && hi > 0.0) above += wt * hi;
    }
}

// Column shaping under the eviction policy: `values` holds the density at the nodes; the
// evicted masses below and above are added to the edge cells (boundary) or dropped (discard).
// Adding mass m to the cell of node i raises the density there by m / w_i.
void add_to_edges(Eigen::Ref<Eigen::VectorXd> values, const Eigen::VectorXd& weights,
                  double below, double above) {
    const Eigen::Index last = values.size() - 1;
    values[0] += below / weights[0];
    values[last] += above / weights[last];
}

// Evicted mass of a general density column and its split over the two sides.
template <class F>
double general_eviction(const F& density, const Mesh& mesh, const Eigen::VectorXd& values,
                        double centre, double& below, double& above) {
    const double evicted = 1.0 - mesh.weights().dot(values);
    below = 0.0;
    above = 0.0;
    if (evicted <= 0.0) return evicted;
    double lo = 0.0, hi = 0.0;
    numerical_sides(density, mesh, lo, hi);
    if (lo + hi > 0.0) {
        below = evicted * lo / (lo + hi);
        above = evicted - below;
    } else if (centre - mesh.lower() <= mesh.upper() - centre) {
        below = evicted;
    } else {
        above = evicted;
    }
    return evicted;
}

std::string class_block(std::size_t k, const std::string& name) {
    return "class " + std::to_string(k) + (name.empty() ? "" : " (" + name + ")");
}
std::string microsite_block(std::size_t m, const std::string& name) {
    return "microsite " + std::to_string(m) + (name.empty() ? "" : " (" + name + ")");
}
std::string stage_block(std::size_t d, const std::string& name) {
    return "stage " + std::to_string(d) + (name.empty() ? "" : " (" + name + ")");
}

// Density values of a parent-free size density at the nodes, with eviction applied.
Eigen::VectorXd shaped_density(const SizeDensity& c, const Mesh& mesh, EvictionPolicy policy,
                               const std::string& block, const std::string& parameter,
                               double& evicted) {
    const Eigen::VectorXd& z = mesh.points();
    const Eigen::Index n = z.size();
    Eigen::VectorXd values(n);
    double below = 0.0, above = 0.0;
    if (c.kind == SizeDensity::Kind::gaussian) {
        check_value(c.mean, Range::finite, block, parameter + " mean", KernelError::npos);
        check_value(c.sd, Range::positive, block, parameter + " sd", KernelError::npos);
        for (Eigen::Index i = 0; i < n; ++i) {
            const double u = (z[i] - c.mean) / c.sd;
            values[i] = inv_sqrt_2pi * std::exp(-0.5 * u * u) / c.sd;
        }
        normal_tails(c.mean, c.sd, mesh.lower(), mesh.upper(), below, above);
        evicted = below + above;
    } else {
        if (!c.density)
            throw KernelError(block, parameter, KernelError::npos, "no density function given");
        for (Eigen::Index i = 0; i < n; ++i) {
            values[i] = c.density(z[i]);
            check_value(values[i], Range::non_negative, block, parameter,
                        static_cast<std::size_t>(i));
        }
        const double mass = mesh.weights().dot(values);
        const double centre = mass > 0.0 ? mesh.weights().cwiseProduct(values).dot(z) / mass
                                         : 0.5 * (mesh.lower() + mesh.upper());
        evicted = general_eviction(c.density, mesh, values, centre, below, above);
    }
    if (policy == EvictionPolicy::boundary) add_to_edges(values, mesh.weights(), below, above);
    return values;
}

}  // namespace

KernelOperator::KernelOperator(const Mesh& mesh, const KernelDescription& d) : m_mesh(mesh) {
    const std::size_t B = d.classes.size();
    const std::size_t M = d.microsites.size();
    const std::size_t D = d.stages.size();
    if (B == 0 && D == 0)
        throw KernelError("kernel", "classes", KernelError::npos,
                          "no continuous class and no discrete stage");
    if (B == 0 && M > 0)
        throw KernelError(microsite_block(0, d.microsites[0].name), "entry_class",
                          KernelError::npos, "microsites need continuous classes to enter");
    check_value(d.fresh_recruitment, Range::probability, "kernel", "fresh_recruitment",
                KernelError::npos);

    m_n = mesh.size();
    const auto n = static_cast<Eigen::Index>(m_n);
    m_stage_offset = static_cast<Eigen::Index>(B) * n;
    m_dim = m_stage_offset + static_cast<Eigen::Index>(D);
    m_eviction = d.eviction;
    m_fresh = d.fresh_recruitment;
    const Eigen::VectorXd& z = mesh.points();
    const Eigen::VectorXd& w = mesh.weights();
    m_state_weights = Eigen::VectorXd::Ones(m_dim);
    for (std::size_t k = 0; k < B; ++k)
        m_state_weights.segment(static_cast<Eigen::Index>(k) * n, n) = w;

    // --- continuous classes: P_k(i, j) = s(z_j) g(z_i | z_j) w_j and seeds p b w -----------
    for (std::size_t k = 0; k < B; ++k) {
        const ContinuousClass& c = d.classes[k];
        const std::string block = class_block(k, c.name);
        m_class_names.push_back(block);
        if (c.microsite >= M)
            throw KernelError(block, "microsite", KernelError::npos,
                              "microsite index " + std::to_string(c.microsite) +
                                  " is out of range (" + std::to_string(M) + " microsites)");
        const std::size_t next = c.next_class.value_or(k);
        if (next >= B)
            throw KernelError(block, "next_class", KernelError::npos,
                              "class index " + std::to_string(next) + " is out of range");
        if (d.classes[next].microsite != c.microsite)
            throw KernelError(block, "next_class", KernelError::npos,
                              "survivors would change microsite (class " +
                                  std::to_string(next) + " belongs to another microsite)");
        m_next.push_back(next);
        if (!c.survival)
            throw KernelError(block, "survival", KernelError::npos, "no survival function given");

        Eigen::VectorXd s(n), seeds(n);
        for (Eigen::Index j = 0; j < n; ++j) {
            const auto jj = static_cast<std::size_t>(j);
            s[j] = c.survival(z[j]);
            check_value(s[j], Range::probability, block, "survival", jj);
            const double p = c.flowering ? c.flowering(z[j]) : 1.0;
            check_value(p, Range::probability, block, "flowering", jj);
            const double b = c.seeds ? c.seeds(z[j]) : 0.0;
            check_value(b, Range::non_negative, block, "seeds", jj);
            seeds[j] = p * b * w[j];
        }
        m_seeds.push_back(seeds);

        Eigen::MatrixXd P = Eigen::MatrixXd::Zero(n, n);
        Eigen::VectorXd evicted = Eigen::VectorXd::Zero(n);
        const bool any_survival = (s.array() > 0.0).any();
        const bool has_growth = c.growth.kind == Growth::Kind::gaussian
                                    ? (c.growth.mean && c.growth.sd)
                                    : static_cast<bool>(c.growth.density);
        if (any_survival && !has_growth)
            throw KernelError(block, "growth", KernelError::npos,
                              "survivors need a growth kernel (mean and sd, or a density)");
        if (has_growth) {
            for (Eigen::Index j = 0; j < n; ++j) {
                const auto jj = static_cast<std::size_t>(j);
                auto col = P.col(j);
                double below = 0.0, above = 0.0;
                if (c.growth.kind == Growth::Kind::gaussian) {
                    const double mu = c.growth.mean(z[j]);
                    check_value(mu, Range::finite, block, "growth mean", jj);
                    const double sd = c.growth.sd(z[j]);
                    check_value(sd, Range::positive, block, "growth sd", jj);
                    for (Eigen::Index i = 0; i < n; ++i) {
                        const double u = (z[i] - mu) / sd;
                        col[i] = inv_sqrt_2pi * std::exp(-0.5 * u * u) / sd;
                    }
                    normal_tails(mu, sd, mesh.lower(), mesh.upper(), below, above);
                    evicted[j] = below + above;
                } else {
                    for (Eigen::Index i = 0; i < n; ++i) {
                        col[i] = c.growth.density(z[i], z[j]);
                        check_value(col[i], Range::non_negative, block, "growth density",
                                    static_cast<std::size_t>(i));
                    }
                    const double zj = z[j];
                    auto g = [&c, zj](double to) { return c.growth.density(to, zj); };
                    evicted[j] = general_eviction(g, mesh, col, zj, below, above);
                }
                if (m_eviction == EvictionPolicy::boundary) add_to_edges(col, w, below, above);
                col *= s[j] * w[j];
            }
        }
        m_P.push_back(std::move(P));
        m_evicted_growth.push_back(std::move(evicted));
    }

    // --- microsites: a, e, entry class, recruit size density -------------------------------
    for (std::size_t m = 0; m < M; ++m) {
        const Microsite& site = d.microsites[m];
        const std::string block = microsite_block(m, site.name);
        check_value(site.arrival, Range::probability, block, "arrival", KernelError::npos);
        check_value(site.establishment, Range::non_negative, block, "establishment",
                    KernelError::npos);
        if (site.entry_class >= B)
            throw KernelError(block, "entry_class", KernelError::npos,
                              "class index " + std::to_string(site.entry_class) +
                                  " is out of range");
        if (d.classes[site.entry_class].microsite != m)
            throw KernelError(block, "entry_class", KernelError::npos,
                              "entry class " + std::to_string(site.entry_class) +
                                  " belongs to another microsite");
        double evicted = 0.0;
        m_recruit_shape.push_back(
            shaped_density(site.recruit_size, mesh, m_eviction, block, "recruit size", evicted));
        m_evicted_recruits.push_back(evicted);
        m_arrival.push_back(site.arrival);
        m_establishment.push_back(site.establishment);
        m_entry.push_back(site.entry_class);
    }

    // --- discrete stages ---------------------------------------------------------------------
    const auto Di = static_cast<Eigen::Index>(D);
    m_T = Eigen::MatrixXd::Zero(Di, Di);
    m_seed_input = Eigen::VectorXd::Zero(Di);
    m_stage_recruitment = Eigen::VectorXd::Zero(Di);
    if (d.stage_transitions.size() > 0) {
        if (d.stage_transitions.rows() != Di || d.stage_transitions.cols() != Di)
            throw KernelError("stage matrix", "stage_transitions", KernelError::npos,
                              "must be " + std::to_string(D) + "x" + std::to_string(D) +
                                  ", got " + std::to_string(d.stage_transitions.rows()) + "x" +
                                  std::to_string(d.stage_transitions.cols()));
        for (Eigen::Index col = 0; col < Di; ++col)
            for (Eigen::Index row = 0; row < Di; ++row) {
                const double v = d.stage_transitions(row, col);
                if (!std::isfinite(v) || v < 0.0)
                    throw KernelError("stage matrix", "entry (" + std::to_string(row + 1) + "," +
                                                          std::to_string(col + 1) + ")",
                                      KernelError::npos,
                                      "value " + number(v) + (std::isfinite(v)
                                                                  ? " is negative"
                                                                  : " is not finite"));
                m_T(row, col) = v;
            }
    }
    for (std::size_t s = 0; s < D; ++s) {
        const DiscreteStage& st = d.stages[s];
        const std::string block = stage_block(s, st.name);
        const auto si = static_cast<Eigen::Index>(s);
        m_stage_names.push_back(block);
        check_value(st.stay, Range::probability, block, "stay", KernelError::npos);
        check_value(st.seed_input, Range::non_negative, block, "seed_input", KernelError::npos);
        check_value(st.recruitment, Range::non_negative, block, "recruitment",
                    KernelError::npos);
        if (st.recruitment > 0.0 && M == 0)
            throw KernelError(block, "recruitment", KernelError::npos,
                              "no microsite to recruit into");
        m_T(si, si) += st.stay;
        m_seed_input[si] = st.seed_input;
        m_stage_recruitment[si] = st.recruitment;
        for (const StageToClass& f : st.to_classes) {
            if (f.target_class >= B)
                throw KernelError(block, "to_classes", KernelError::npos,
                                  "class index " + std::to_string(f.target_class) +
                                      " is out of range");
            check_value(f.rate, Range::non_negative, block, "to_classes rate",
                        KernelError::npos);
            double evicted = 0.0;
            m_flows.push_back({s, f.target_class, f.rate,
                               shaped_density(f.size, mesh, m_eviction, block,
                                              "to_classes size", evicted)});
        }
        for (const ClassToStage& f : st.from_classes) {
            if (f.source_class >= B)
                throw KernelError(block, "from_classes", KernelError::npos,
                                  "class index " + std::to_string(f.source_class) +
                                      " is out of range");
            if (!f.rate)
                throw KernelError(block, "from_classes rate", KernelError::npos,
                                  "no rate function given");
            Eigen::VectorXd r(n);
            for (Eigen::Index j = 0; j < n; ++j) {
                r[j] = f.rate(z[j]);
                check_value(r[j], Range::non_negative, block, "from_classes rate",
                            static_cast<std::size_t>(j));
                r[j] *= w[j];
            }
            m_inflows.push_back({s, f.source_class, std::move(r)});
        }
    }
}

KernelOperator KernelOperator::from_stage_matrix(const Eigen::MatrixXd& matrix) {
    if (matrix.rows() == 0 || matrix.rows() != matrix.cols())
        throw KernelError("stage matrix", "size", KernelError::npos,
                          "must be square and non-empty, got " + std::to_string(matrix.rows()) +
                              "x" + std::to_string(matrix.cols()));
    KernelDescription d;
    d.stages.resize(static_cast<std::size_t>(matrix.rows()));
    for (std::size_t s = 0; s < d.stages.size(); ++s) d.stages[s].name = std::string("s").append(std::to_string(s + 1));
    d.stage_transitions = matrix;
    return KernelOperator(Mesh(0.0, 1.0, 2), d);
}

}  // namespace safesite::kernel
