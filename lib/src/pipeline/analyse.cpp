#include "safesite/pipeline/analyse.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "safesite/analysis/eigen_error.hpp"
#include "safesite/analysis/eigen_triple.hpp"
#include "safesite/analysis/kernel_sensitivity.hpp"
#include "safesite/analysis/lambda_derivative.hpp"
#include "safesite/analysis/life_history.hpp"
#include "safesite/analysis/reducibility.hpp"
#include "safesite/analysis/stochastic_growth.hpp"
#include "safesite/arrival/arrival_chain.hpp"
#include "safesite/error.hpp"
#include "core/number_text.hpp"
#include "safesite/kernel/kernel_operator.hpp"
#include "safesite/pipeline/kernel_builder.hpp"

namespace safesite::pipeline {

namespace {

using CurvesPtr = std::shared_ptr<const KernelCurves>;

void check_model(const PreparedModel& model) {
    const auto n_sites = static_cast<Eigen::Index>(model.layout.microsites.size());
    if (n_sites == 0) throw UsageError("prepared model: no microsites");
    if (model.bare >= model.layout.microsites.size())
        throw UsageError("prepared model: bare-soil index out of range");
    if (model.arrival.size() != n_sites)
        throw UsageError("prepared model: arrival needs one value per microsite");
    if (model.establishment_pooled.size() != n_sites)
        throw UsageError("prepared model: pooled establishment needs one value per microsite");
    if (model.establishment_by_year.size() != model.years.size())
        throw UsageError("prepared model: establishment needs one vector per census year");
    for (const auto& e : model.establishment_by_year)
        if (e.size() != n_sites)
            throw UsageError("prepared model: establishment needs one value per microsite");
    for (double change : model.survival_changes)
        if (!(change > -1.0) || !std::isfinite(change))
            throw UsageError("survival change " + std::to_string(change) +
                             " is not admissible; expected a proportional change > -1");
}

bool has_juveniles(const KernelLayout& layout, const Eigen::VectorXd& nodes) {
    if (layout.juvenile == JuvenileMode::seedling_class) return true;
    return std::isfinite(layout.juvenile_size_below) && nodes.size() > 0 &&
           nodes[0] < layout.juvenile_size_below;
}

// A class as the output tables name it: the microsite, with " (first-year)" for a first-year
// class.
std::string class_name(const KernelLayout& layout, std::size_t k) {
    const std::string& site = layout.microsites[k % layout.microsites.size()];
    const bool first_year =
        layout.juvenile == JuvenileMode::seedling_class && k >= layout.microsites.size();
    return first_year ? site + " (first-year)" : site;
}

// The reducible kernels met while analysing, kept for the `reducibility` table and warnings.
struct ReducibleLog {
    const KernelLayout* layout = nullptr;
    std::vector<ReducibleKernel>* out = nullptr;

    void add(const kernel::KernelOperator& op, const analysis::Reducibility& r,
             const std::string& kernel, const std::string& setting) const {
        ReducibleKernel k;
        k.kernel = kernel;
        k.setting = setting;
        k.lambda_kernel = r.kernel_lambda;
        k.lambda_renewing = r.renewing_lambda;
        for (std::size_t g = 0; g < op.group_count(); ++g) {
            const std::size_t c = r.components.component[g];
            k.classes.push_back({g < op.class_count() ? class_name(*layout, g) : op.group_name(g),
                                 c + 1, analysis::to_string(r.components.role[c]),
                                 r.component_lambda[c]});
        }
        out->push_back(std::move(k));
    }
};

// λ of a kernel (docs/methods/kernel.md, "Reducible kernels"): the dominant eigenvalue when
// the class graph is strongly connected; otherwise λ of the self-renewing part (0 when no
// part renews itself), and the kernel is logged when `log` is given.
double kernel_lambda(const kernel::KernelOperator& op, const ReducibleLog* log,
                     const std::string& kernel, const std::string& setting) {
    const analysis::Reducibility r = analysis::reducibility(op);
    if (!r.components.reducible()) return analysis::dominant_eigen(op).lambda;
    if (log) log->add(op, r, kernel, setting);
    return r.renewing_lambda;
}

double lambda_of(const kernel::Mesh& mesh, const CurvesPtr& curves,
                 const RecruitmentParameters& recruitment, kernel::EvictionPolicy eviction,
                 SurvivalChange change = {}, const ReducibleLog* log = nullptr,
                 const std::string& setting = "") {
    const kernel::KernelOperator op(mesh,
                                    describe_kernel(curves, recruitment, eviction, change));
    return kernel_lambda(op, log, curves->label, setting);
}

// Share of a normal N(mean, sd²) above `upper` and below `lower`.
std::pair<double, double> normal_tails(double mean, double sd, double lower, double upper) {
    return {0.5 * std::erfc((upper - mean) / (sd * std::sqrt(2.0))),
            0.5 * std::erfc((mean - lower) / (sd * std::sqrt(2.0)))};
}

// The largest growth share off the mesh of every class over the observed parent sizes (the
// mesh nodes from the last one at or below the smallest observed size to the first one at or
// above the largest), and the recruit-size share of every microsite.
std::vector<EvictionPeak> eviction_peaks(const kernel::KernelOperator& op,
                                         const KernelCurves& curves, const MeshSettings& mesh) {
    const Eigen::VectorXd& z = curves.nodes;
    Eigen::Index first = 0, last = z.size() - 1;
    if (std::isfinite(mesh.observed_lower) && std::isfinite(mesh.observed_upper)) {
        while (first + 1 < z.size() && z[first + 1] <= mesh.observed_lower) ++first;
        while (last > first && z[last - 1] >= mesh.observed_upper) --last;
    }
    std::vector<EvictionPeak> out;
    for (std::size_t c = 0; c < op.class_count(); ++c) {
        const Eigen::VectorXd& evicted = op.evicted_growth(c);
        Eigen::Index at = first;
        for (Eigen::Index j = first; j <= last; ++j)
            if (evicted[j] > evicted[at]) at = j;
        const ClassCurves& cc = curves.classes[c];
        const auto [above, below] =
            normal_tails(cc.growth_mean[at], cc.growth_sd[at], mesh.lower, mesh.upper);
        out.push_back({c, "growth", z[at], std::max(0.0, evicted[at]), above >= below});
    }
    for (std::size_t m = 0; m < op.microsite_count(); ++m) {
        const auto mi = static_cast<Eigen::Index>(m);
        const auto [above, below] = normal_tails(curves.recruit_mean[mi], curves.recruit_sd[mi],
                                                 mesh.lower, mesh.upper);
        out.push_back({op.entry_class(m), "recruit_size",
                       std::numeric_limits<double>::quiet_NaN(), op.evicted_recruits(m),
                       above >= below});
    }
    return out;
}

std::string percent(double share) { return core::number_text(100.0 * share, 3) + " %"; }

// One warning per part (growth, recruit size) whose share off the mesh exceeds the threshold
// in some kernel and class: it names the worst kernel, class, size and share, and the other
// classes over the threshold (with one growth model for every class they often all are).
void eviction_warnings(const AnalysisResult& result, const MeshSettings& mesh,
                       std::vector<std::string>& warnings) {
    const auto t = mesh.size_transform;
    auto size_text = [&](double z) {
        std::string out = core::number_text(census::invert(t, z), 4);
        if (t != census::SizeTransform::none)
            out += " (" + core::number_text(z, 4) + " on the kernel scale)";
        return out;
    };
    for (const char* part : {"growth", "recruit_size"}) {
        const KernelResult* worst_kernel = nullptr;
        const EvictionPeak* worst = nullptr;
        std::size_t over = 0;
        std::vector<std::size_t> classes;
        for (const KernelResult& k : result.kernels)
            for (const EvictionPeak& e : k.eviction) {
                if (e.part != part || !(e.share > mesh.eviction_warning)) continue;
                ++over;
                if (std::find(classes.begin(), classes.end(), e.class_index) == classes.end())
                    classes.push_back(e.class_index);
                if (!worst || e.share > worst->share) {
                    worst = &e;
                    worst_kernel = &k;
                }
            }
        if (!worst) continue;
        const bool growth = worst->part == "growth";
        std::string others;
        for (std::size_t c : classes)
            if (c != worst->class_index)
                others += (others.empty() ? "" : ", ") + class_name(result.layout, c);
        std::string w = "eviction: kernel " + worst_kernel->label + ", class " +
                        class_name(result.layout, worst->class_index) + ": " +
                        percent(worst->share) + " of the " +
                        (growth ? "growth mass of plants of size " + size_text(worst->size)
                                : std::string("recruit-size mass")) +
                        " falls " +
                        (worst->above ? "above the mesh upper bound U = "
                                      : "below the mesh lower bound L = ") +
                        size_text(worst->above ? mesh.upper : mesh.lower);
        if (over > 1)
            w += "; " + std::to_string(over) + " kernel-class pairs lose more than " +
                 percent(mesh.eviction_warning) +
                 (others.empty() ? std::string() : " (also classes " + others + ")");
        w += ". Widen the mesh: " + std::string(worst->above ? "raise [mesh] upper"
                                                             : "lower [mesh] lower") +
             " (or, when the bounds are derived from the data, raise [mesh] margin); table "
             "eviction has every share";
        warnings.push_back(std::move(w));
    }
}

// Relative change of λ between n and 2n mesh points above which a warning is given.
constexpr double k_mesh_tolerance = 1e-4;

void mesh_warnings(const AnalysisResult& result, std::vector<std::string>& warnings) {
    std::string listed;
    double worst = 0.0;
    std::size_t points = 0;
    for (const KernelResult& k : result.kernels) {
        if (std::isnan(k.lambda_refined)) continue;
        const double change = std::abs(k.lambda_refined - k.lambda) / k.lambda;
        if (!(change > k_mesh_tolerance)) continue;
        listed += (listed.empty() ? "" : ", ") + k.label + " " + core::number_text(change, 2);
        worst = std::max(worst, change);
        points = k.points;
    }
    if (listed.empty()) return;
    warnings.push_back("mesh check: λ changes by more than " +
                       core::number_text(k_mesh_tolerance, 2) + " (relative) between " +
                       std::to_string(points) + " and " + std::to_string(2 * points) +
                       " mesh points in kernel(s) " + listed +
                       "; use more points ([mesh] points, e.g. " + std::to_string(2 * points) +
                       ") before trusting the digits of λ");
}

// One warning per setting (baseline, a scenario, …) with reducible kernels, with the numbers
// of its pooled kernel when there is one (else its first kernel).
void reducibility_warnings(const AnalysisResult& result, std::vector<std::string>& warnings) {
    std::vector<std::string> settings;
    // Warn where the answer changes: λ of the self-renewing part differs from the whole
    // kernel's dominant eigenvalue, or nothing renews itself (the table lists every case).
    auto matters = [](const ReducibleKernel& r) {
        return !(r.lambda_renewing > 0.0) ||
               std::abs(r.lambda_renewing - r.lambda_kernel) > 1e-9 * r.lambda_kernel;
    };
    for (const auto& r : result.reducible)
        if (matters(r) &&
            std::find(settings.begin(), settings.end(), r.setting) == settings.end())
            settings.push_back(r.setting);
    for (const auto& setting : settings) {
        const ReducibleKernel* shown = nullptr;
        std::string kernels;
        for (const auto& r : result.reducible) {
            if (r.setting != setting || !matters(r)) continue;
            kernels += (kernels.empty() ? "" : ", ") + r.kernel;
            if (!shown || r.kernel == "pooled") shown = &r;
        }
        std::string renewing, others;
        for (const auto& c : shown->classes) {
            std::string& list = c.role == "self_renewing" ? renewing : others;
            list += (list.empty() ? "" : ", ") + c.class_name +
                    (c.role == "self_renewing" ? "" : " (" + c.role + ")");
        }
        const auto num = [](double x) { return core::number_text(x, 5); };
        std::string w = "reducible kernel (" + setting + "; kernel(s) " + kernels + "): ";
        if (renewing.empty()) {
            w += "no class renews itself (no reproduction leads back into any class); ";
            w += setting == "baseline"
                     ? "λ of kernel " + shown->kernel + " is the dominant eigenvalue " +
                           num(shown->lambda_kernel) +
                           ", the survival of existing plants alone"
                     : "λ is taken as 0 (kernel " + shown->kernel +
                           ": the existing plants decline at " + num(shown->lambda_kernel) + ")";
        } else {
            w += "the classes " + others +
                 " are not part of the self-renewing life cycle; λ is that of the self-renewing "
                 "part (" + renewing + "): kernel " + shown->kernel + " " +
                 num(shown->lambda_renewing) + " (the whole kernel's dominant eigenvalue is " +
                 num(shown->lambda_kernel) + ")";
        }
        warnings.push_back(w + "; see table reducibility");
    }
}

// dλ/dθ = ⟨v, (∂A/∂θ) w⟩ with ∂A/∂θ given as an operator on the same mesh.
double directional_derivative(const analysis::EigenTriple& triple,
                              const kernel::KernelOperator& derivative) {
    return analysis::lambda_derivative(triple, [&derivative](const double* x, double* y) {
        derivative.apply(kernel::KernelPart::all, x, y);
    });
}

// Arrival fractions under a scenario. With a fitted chain the arrival module applies the
// modifiers; with fractions given directly only direct fractions can change, which the
// arrival module handles on the trivial chain that reproduces the given fractions (cover
// c_f = a_f, trapping 1, no departures: ℓ = a).
arrival::ArrivalResult scenario_arrival(const PreparedModel& model,
                                        const ScenarioSettings& scenario) {
    if (model.chain) return arrival::scenario_arrival(*model.chain, scenario.arrival);
    const auto& mod = scenario.arrival;
    if (!mod.cover_factor.empty() || !mod.trapping_odds_factor.empty() ||
        !mod.hazard_factor.empty() || mod.exposure_days || mod.relanding)
        throw UsageError("scenario '" + scenario.name +
                         "' changes cover, trapping, hazards, exposure or re-landing, but the "
                         "arrival fractions are given directly; these need [arrival] method = "
                         "\"experiments\"");
    arrival::ArrivalResult out;
    out.fractions = model.arrival;
    out.lost = 1.0 - model.arrival.sum();
    if (mod.fractions.empty() && mod.fraction_shares.empty()) return out;
    if (std::abs(model.arrival.sum() - 1.0) > 1e-9)
        throw UsageError("scenario '" + scenario.name +
                         "': direct arrival fractions must sum to 1 to be rescaled");
    arrival::ChainParameters trivial;
    trivial.microsites = model.layout.microsites;
    trivial.bare = model.bare;
    trivial.cover = model.arrival;
    trivial.cover[static_cast<Eigen::Index>(model.bare)] = 0.0;
    trivial.trapping = Eigen::VectorXd::Ones(model.arrival.size());
    trivial.hazard_per_day = Eigen::VectorXd::Zero(model.arrival.size());
    trivial.relanding = 0.0;
    trivial.exposure_days = 0.0;
    return arrival::scenario_arrival(trivial, mod);
}

Eigen::VectorXd scaled_establishment(const PreparedModel& model, const Eigen::VectorXd& e,
                                     const ScenarioSettings& scenario) {
    Eigen::VectorXd out = e;
    for (const auto& [label, factor] : scenario.establishment_factor) {
        std::size_t m = 0;
        while (m < model.layout.microsites.size() && model.layout.microsites[m] != label) ++m;
        if (m == model.layout.microsites.size())
            throw UsageError("scenario '" + scenario.name + "': unknown microsite '" + label +
                             "' in establishment_factor");
        if (!(factor >= 0.0) || !std::isfinite(factor))
            throw UsageError("scenario '" + scenario.name +
                             "': establishment factor must be finite and >= 0");
        // e_m ← min(1, factor · e_m): establishment is a probability.
        const auto mi = static_cast<Eigen::Index>(m);
        out[mi] = std::min(1.0, factor * out[mi]);
    }
    return out;
}

// Per-state rates of the life-cycle measures: flowering p(z_i) and the seeds produced in one
// census interval, Y = flowered · b(z) with flowering Bernoulli(p) and the seed number at its
// mean b: ρ1 = p b, ρ2 = E[Y²] = p b² (the spread of seed numbers among flowering plants of one
// size is not included; docs/methods/life-history.md). Stages: 0.
analysis::LifeCycleRates life_cycle_rates(const kernel::KernelOperator& op,
                                          const KernelCurves& curves) {
    analysis::LifeCycleRates r;
    r.flowering = Eigen::VectorXd::Zero(op.rows());
    r.reward = Eigen::VectorXd::Zero(op.rows());
    r.reward_square = Eigen::VectorXd::Zero(op.rows());
    for (std::size_t c = 0; c < op.class_count(); ++c) {
        const ClassCurves& k = curves.classes.at(c);
        const Eigen::Index at = op.group_offset(c), n = op.group_size(c);
        r.flowering.segment(at, n) = k.flowering;
        r.reward.segment(at, n) = k.flowering.cwiseProduct(k.seeds);
        r.reward_square.segment(at, n) =
            k.flowering.cwiseProduct(k.seeds).cwiseProduct(k.seeds);
    }
    return r;
}

// The life-cycle result from the analysis module's per-state measures; a recruit of microsite
// m is born with the numbers π_i ∝ ω_i c_m(z_i) in the entry class (normalised to 1: the
// recruit-size mass on the mesh after the eviction policy).
LifeCycleResult life_cycle_result(const kernel::KernelOperator& op,
                                  const analysis::LifeHistory& life,
                                  const std::vector<std::string>& microsites) {
    const analysis::LifeCycle& c = *life.cycle;
    const Eigen::Index classes_end =
        op.class_count() > 0 ? op.group_offset(op.class_count() - 1) +
                                   op.group_size(op.class_count() - 1)
                             : 0;
    LifeCycleResult out;
    out.life_expectancy = life.life_expectancy.head(classes_end);
    out.flowering_probability = c.flowering_probability.head(classes_end);
    out.first_flowering_age = c.first_flowering_age.head(classes_end);
    out.seeds_mean = c.reward_mean.head(classes_end);
    out.seeds_variance = (c.reward_second_moment - c.reward_mean.cwiseProduct(c.reward_mean))
                             .head(classes_end)
                             .cwiseMax(0.0);
    for (std::size_t m = 0; m < op.microsite_count(); ++m) {
        const std::size_t entry = op.entry_class(m);
        Eigen::VectorXd birth = Eigen::VectorXd::Zero(op.rows());
        birth.segment(op.group_offset(entry), op.group_size(entry)) =
            op.mesh().weights().cwiseProduct(op.recruit_density(m));
        const double total = birth.sum();
        if (!(total > 0.0)) continue;
        const analysis::CohortLifeCycle h = analysis::cohort_life_cycle(life, birth / total);
        out.at_birth.push_back({microsites.at(m), h.life_expectancy, h.flowering_probability,
                                h.first_flowering_age, h.reward_mean, h.reward_variance});
    }
    return out;
}

}  // namespace

RecruitmentParameters baseline_recruitment(const PreparedModel& model, std::size_t index) {
    RecruitmentParameters r;
    r.arrival = model.arrival;
    r.establishment = index < model.years.size() ? model.establishment_by_year.at(index)
                                                 : model.establishment_pooled;
    return r;
}

AnalysisResult analyse(const PreparedModel& model) {
    check_model(model);
    const kernel::EvictionPolicy eviction = model.mesh.eviction;
    const kernel::Mesh mesh(model.mesh.lower, model.mesh.upper, model.mesh.points,
                            model.mesh.rule);

    AnalysisResult out;
    out.layout = model.layout;
    out.bare = model.bare;
    out.arrival_source = model.arrival_source;
    out.assumptions = model.assumptions;
    out.warnings = model.warnings;

    // Every kernel's rates on the mesh nodes, once: census years in order, then pooled.
    std::vector<const KernelRates*> rates;
    for (const auto& r : model.years) rates.push_back(&r);
    rates.push_back(&model.pooled);
    std::vector<CurvesPtr> curves;
    for (const KernelRates* r : rates)
        curves.push_back(evaluate_rates(*r, model.layout, mesh.points()));

    const bool juveniles = has_juveniles(model.layout, mesh.points());
    if (!juveniles && !model.survival_changes.empty())
        out.warnings.push_back(
            "no juveniles on the mesh (no first-year class and no size below the juvenile "
            "threshold): the juvenile survival perturbation is skipped");

    // Every kernel's operator and eigen-triple are kept for the analyses below (stochastic
    // growth uses the year kernels, the parameter sensitivities the pooled one).
    std::vector<std::unique_ptr<kernel::KernelOperator>> ops;
    std::vector<analysis::EigenTriple> triples;
    triples.reserve(rates.size());
    const ReducibleLog reducible_log{&model.layout, &out.reducible};
    for (std::size_t i = 0; i < rates.size(); ++i) {
        const RecruitmentParameters recruitment = baseline_recruitment(model, i);
        ops.push_back(std::make_unique<kernel::KernelOperator>(
            mesh, describe_kernel(curves[i], recruitment, eviction)));
        const kernel::KernelOperator& op = *ops.back();
        // A reducible kernel is analysed on its leading self-renewing component (its λ, w, v;
        // w and v are zero elsewhere), so that λ, the sensitivities and Δλ describe the part
        // of the population that replaces itself.
        const analysis::Reducibility structure = analysis::reducibility(op);
        if (structure.components.reducible())
            reducible_log.add(op, structure, rates[i]->label, "baseline");
        triples.push_back(structure.leading_renewing
                              ? analysis::restricted_triple(
                                    op, structure.components.members[*structure.leading_renewing])
                              : analysis::dominant_eigen(op));
        const analysis::EigenTriple& triple = triples.back();

        KernelResult k;
        k.label = rates[i]->label;
        k.reducible = structure.components.reducible();
        k.lambda = triple.lambda;
        // One LU of I − P for R0 and life expectancy, reused by the life-cycle moments.
        std::optional<analysis::LifeCycleRates> cycle_rates;
        if (model.life_cycle) cycle_rates = life_cycle_rates(op, *curves[i]);
        const analysis::LifeHistory life = analysis::life_history(
            op, triple.lambda, cycle_rates ? &*cycle_rates : nullptr);
        if (life.cycle) k.life_cycle = life_cycle_result(op, life, model.layout.microsites);
        k.r0 = life.net_reproductive_rate;
        k.generation_time = life.generation_time.value_or(KernelResult::nan);
        k.points = mesh.size();
        k.nodes = mesh.points();
        k.weights = mesh.weights();
        k.w = triple.w;
        k.v = triple.v;
        k.arrival = recruitment.arrival;
        k.establishment = recruitment.establishment;
        for (std::size_t c = 0; c < op.class_count(); ++c)
            k.max_evicted_growth.push_back(op.evicted_growth(c).maxCoeff());
        for (std::size_t m = 0; m < op.microsite_count(); ++m)
            k.evicted_recruits.push_back(op.evicted_recruits(m));
        k.eviction = eviction_peaks(op, *curves[i], model.mesh);
        {
            // Elasticity block sums E = K ∘ s / λ, per part (docs/methods/kernel.md).
            const analysis::KernelSensitivity ks(op, triple);
            const std::pair<kernel::KernelPart, const char*> parts[] = {
                {kernel::KernelPart::survival_growth, "survival_growth"},
                {kernel::KernelPart::reproduction, "reproduction"}};
            for (const auto& [part, name] : parts) {
                const Eigen::MatrixXd sums = ks.elasticity_block_sums(part);
                for (Eigen::Index to = 0; to < sums.rows(); ++to)
                    for (Eigen::Index from = 0; from < sums.cols(); ++from)
                        if (sums(to, from) != 0.0)
                            k.block_elasticities.push_back(
                                {op.group_name(static_cast<std::size_t>(to)),
                                 op.group_name(static_cast<std::size_t>(from)), name,
                                 sums(to, from)});
            }
        }

        if (juveniles) {
            // Directional derivatives ⟨v, ∂A w⟩/⟨v, w⟩ (docs/methods/pipeline.md).
            const kernel::KernelOperator d_prop(
                mesh, juvenile_survival_derivative(curves[i], eviction,
                                                   JuvenileDerivative::proportional));
            const kernel::KernelOperator d_add(
                mesh, juvenile_survival_derivative(curves[i], eviction,
                                                   JuvenileDerivative::additive));
            k.juvenile_elasticity =
                directional_derivative(triple, d_prop) / triple.lambda;
            k.juvenile_sensitivity = directional_derivative(triple, d_add);
            for (double change : model.survival_changes) {
                const double lambda =
                    change == 0.0 ? triple.lambda
                                  : lambda_of(mesh, curves[i], recruitment, eviction,
                                              SurvivalChange{1.0 + change}, &reducible_log,
                                              "juvenile survival x" +
                                                  core::number_text(1.0 + change, 6));
                k.perturbation.push_back({change, lambda});
            }
        }

        if (model.mesh_check) {
            const kernel::Mesh fine(model.mesh.lower, model.mesh.upper, 2 * model.mesh.points,
                                    model.mesh.rule);
            k.lambda_refined =
                lambda_of(fine, evaluate_rates(*rates[i], model.layout, fine.points()),
                          recruitment, eviction);
        }
        out.kernels.push_back(std::move(k));
    }

    const std::size_t pooled_index = rates.size() - 1;
    const CurvesPtr& pooled_curves = curves[pooled_index];
    const double lambda0 = out.pooled().lambda;

    // Year-to-year decomposition: each rate (and establishment) of a year swapped with the
    // pooled one, forwards and backwards; the rest of Δλ is the interaction.
    if (model.decompose_years) {
        using Slot = BoundRate KernelRates::*;
        const std::pair<const char*, Slot> slots[] = {
            {"survival", &KernelRates::survival},   {"growth", &KernelRates::growth},
            {"flowering", &KernelRates::flowering}, {"seeds", &KernelRates::seeds},
            {"recruit_size", &KernelRates::recruit_size}};
        const RecruitmentParameters pooled_r = baseline_recruitment(model, pooled_index);
        for (std::size_t i = 0; i < model.years.size(); ++i) {
            const KernelRates& year = model.years[i];
            const RecruitmentParameters year_r = baseline_recruitment(model, i);
            const double delta = out.kernels[i].lambda - lambda0;
            double explained = 0.0;
            auto push = [&](const char* component, double forward, double backward) {
                const double c = 0.5 * ((forward - lambda0) + (out.kernels[i].lambda - backward));
                explained += c;
                out.year_contributions.push_back({year.label, component, c, delta});
            };
            for (const auto& [name, slot] : slots) {
                KernelRates to_year = model.pooled, to_pooled = year;
                to_year.*slot = pin_year(year.*slot, year.label);
                to_pooled.*slot = pin_year(model.pooled.*slot, model.pooled.label);
                push(name,
                     lambda_of(mesh, evaluate_rates(to_year, model.layout, mesh.points()),
                               pooled_r, eviction),
                     lambda_of(mesh, evaluate_rates(to_pooled, model.layout, mesh.points()),
                               year_r, eviction));
            }
            RecruitmentParameters e_year = pooled_r, e_pooled = year_r;
            e_year.establishment = year_r.establishment;
            e_pooled.establishment = pooled_r.establishment;
            push("establishment", lambda_of(mesh, pooled_curves, e_year, eviction),
                 lambda_of(mesh, curves[i], e_pooled, eviction));
            out.year_contributions.push_back({year.label, "interaction", delta - explained, delta});
        }
    }

    // Stochastic growth: the census years' kernels drawn at random, each equally likely.
    if (model.stochastic_years > 0 && model.years.size() >= 2) {
        std::vector<const kernel::KernelOperator*> views;
        for (std::size_t i = 0; i < model.years.size(); ++i) views.push_back(ops[i].get());
        analysis::StochasticOptions so;
        so.years = model.stochastic_years;
        so.seed = model.stochastic_seed;
        const analysis::StochasticGrowth g =
            analysis::stochastic_growth(views, out.pooled().w.cwiseMax(0.0), so);
        out.stochastic = StochasticResult{model.years.size(), g.years,  g.log_lambda,
                                          g.lambda,           g.std_error, so.seed};
    }

    // Scenarios: new a (and e) for the pooled and every year kernel.
    for (const ScenarioSettings& scenario : model.scenarios) {
        const arrival::ArrivalResult a = scenario_arrival(model, scenario);
        ScenarioResult s;
        s.name = scenario.name;
        s.arrival = a.fractions;
        s.lost = a.lost;
        for (std::size_t i = 0; i < rates.size(); ++i) {
            RecruitmentParameters r = baseline_recruitment(model, i);
            r.arrival = a.fractions;
            r.establishment = scaled_establishment(model, r.establishment, scenario);
            const double lambda = lambda_of(mesh, curves[i], r, eviction, {}, &reducible_log,
                                            "scenario: " + scenario.name);
            const double delta = lambda - out.kernels[i].lambda;
            if (i == pooled_index) {
                s.establishment_pooled = r.establishment;
                s.lambda_pooled = lambda;
                s.delta_pooled = delta;
            } else {
                s.lambda_years.push_back(lambda);
                s.delta_years.push_back(delta);
            }
        }
        out.scenarios.push_back(std::move(s));
    }

    // Sensitivities of the pooled λ to a_m and e_m (kernel), c_f and h_m (chain rule).
    {
        const RecruitmentParameters r = baseline_recruitment(model, pooled_index);
        const kernel::KernelOperator& op = *ops[pooled_index];
        const analysis::EigenTriple& triple = triples[pooled_index];
        const analysis::RecruitmentSensitivity rs = analysis::recruitment_sensitivity(op, triple);
        const Eigen::VectorXd& d_a = rs.arrival;
        const Eigen::VectorXd& d_e = rs.establishment;
        const auto& sites = model.layout.microsites;
        auto push = [&](const std::string& parameter, const std::string& target, double value,
                        double sensitivity) {
            out.sensitivities.push_back(
                {parameter, target, value, sensitivity, value / lambda0 * sensitivity});
        };
        for (std::size_t m = 0; m < sites.size(); ++m)
            push("arrival", sites[m], r.arrival[static_cast<Eigen::Index>(m)],
                 d_a[static_cast<Eigen::Index>(m)]);
        for (std::size_t m = 0; m < sites.size(); ++m)
            push("establishment", sites[m], r.establishment[static_cast<Eigen::Index>(m)],
                 d_e[static_cast<Eigen::Index>(m)]);
        if (model.chain) {
            // dλ/dθ = Σ_m (dλ/da_m)(∂a_m/∂θ): chain rule through the arrival derivatives.
            const arrival::ArrivalDerivatives da = arrival::arrival_derivatives(*model.chain);
            const arrival::ChainParameters& c = *model.chain;
            const Eigen::VectorXd d_cover = da.d_cover.transpose() * d_a;
            const Eigen::VectorXd d_trapping = da.d_trapping.transpose() * d_a;
            const Eigen::VectorXd d_hazard = da.d_hazard_per_day.transpose() * d_a;
            for (std::size_t f = 0; f < sites.size(); ++f) {
                if (f == model.bare) continue;
                const auto i = static_cast<Eigen::Index>(f);
                push("cover", sites[f], c.cover[i], d_cover[i]);
            }
            for (std::size_t f = 0; f < sites.size(); ++f) {
                if (f == model.bare) continue;
                const auto i = static_cast<Eigen::Index>(f);
                push("trapping", sites[f], c.trapping[i], d_trapping[i]);
            }
            for (std::size_t m = 0; m < sites.size(); ++m) {
                const auto i = static_cast<Eigen::Index>(m);
                push("hazard", sites[m], c.hazard_per_day[i], d_hazard[i]);
            }
            push("relanding", "", c.relanding, da.d_relanding.dot(d_a));
            push("exposure_days", "", c.exposure_days, da.d_exposure_days.dot(d_a));
        }
        const KernelResult& p = out.pooled();
        if (juveniles)
            out.sensitivities.push_back({"juvenile_survival", "", KernelResult::nan,
                                         p.juvenile_sensitivity, p.juvenile_elasticity});
    }

    // Break-even bare-soil establishment for every neighbour form, and for all forms at once.
    if (model.break_even && model.layout.microsites.size() > 1) {
        const RecruitmentParameters base = baseline_recruitment(model, pooled_index);
        const auto bare = static_cast<Eigen::Index>(model.bare);
        auto solve = [&](const std::string& form, const std::vector<Eigen::Index>& moved) {
            RecruitmentParameters r = base;
            double a_moved = 0.0;
            for (Eigen::Index f : moved) {
                a_moved += r.arrival[f];
                r.arrival[bare] += r.arrival[f];
                r.arrival[f] = 0.0;
            }
            auto lambda_of_e = [&](double e_bare) {
                RecruitmentParameters q = r;
                q.establishment[bare] = e_bare;
                const bool end = e_bare == 0.0 || e_bare == 1.0;
                try {
                    return lambda_of(mesh, pooled_curves, q, eviction, {},
                                     end ? &reducible_log : nullptr,
                                     "break-even " + form + ", e_bare = " +
                                         (e_bare == 0.0 ? "0" : "1"));
                } catch (const analysis::EigenError& e) {
                    // With e_bare = 0 and every seed moved there, nothing reproduces and the
                    // microsites decouple: the spectral radius is shared by several blocks.
                    // The root-finder needs only the spectral radius, which is well defined.
                    if (e.reason() == analysis::EigenError::Reason::not_unique &&
                        std::isfinite(e.lambda()))
                        return e.lambda();
                    throw;
                }
            };
            BreakEvenResult b;
            b.form = form;
            b.arrival_form = a_moved;
            b.establishment_bare = base.establishment[bare];
            b.lambda_baseline = lambda0;
            b.solution = solve_break_even(lambda_of_e, lambda0, 0.0, 1.0);
            out.break_even.push_back(b);
        };
        std::vector<Eigen::Index> all;
        for (std::size_t f = 0; f < model.layout.microsites.size(); ++f) {
            if (f == model.bare) continue;
            all.push_back(static_cast<Eigen::Index>(f));
            solve(model.layout.microsites[f], {static_cast<Eigen::Index>(f)});
        }
        if (all.size() > 1) solve("all", all);
    }

    eviction_warnings(out, model.mesh, out.warnings);
    mesh_warnings(out, out.warnings);
    reducibility_warnings(out, out.warnings);
    return out;
}

}  // namespace safesite::pipeline
