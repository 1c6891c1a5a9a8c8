#pragma once
/// \file kernel_description.hpp
/// The structured description of a microsite-split integral projection model: plain values and
/// callables, built by the pipeline (or by hand), turned into a KernelOperator on a Mesh.
///
/// State: continuous classes k = 0..B−1 on the size mesh (each tied to one microsite m(k); a
/// plant never changes microsite) plus discrete stages d = 0..D−1 (e.g. a seed bank).
/// Pre-breeding census, one year t → t+1 (docs/methods/kernel.md):
///
/// \f[ K((k',z'),(k,z)) = [k' = \mathrm{next}(k)]\, s_k(z)\, g_k(z'|z)
///      + \sum_{m'} [k' = \mathrm{entry}(m')]\, \varphi\, p_k(z) b_k(z)\, a_{m'} e_{m'} c_{m'}(z') \f]
///
/// plus the discrete-stage terms described at DiscreteStage. References: Easterling, Ellner &
/// Dixon (2000); Ellner & Rees (2006); Ellner, Childs & Rees (2016) chapter 6.

#include <cstddef>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include <Eigen/Core>

namespace safesite::kernel {

/// A function of size z (on the mesh scale), e.g. survival s(z).
using SizeFunction = std::function<double(double)>;
/// A transition density g(z_to | z_from), per unit of size at z_to.
using TransitionDensity = std::function<double(double z_to, double z_from)>;

/// What happens to growth (and recruit-size) mass that falls outside [L, U]
/// (Williams, Miller & Ellner 2012).
enum class EvictionPolicy {
    /// Put the mass below L into the lowest mesh cell and the mass above U into the highest
    /// (size is clamped to the mesh bounds). Conserves the survivors exactly for Gaussian
    /// growth; for a general density the side is chosen as documented in kernel.md.
    boundary,
    /// Leave the mass out: evicted plants are lost (an extra, unintended mortality). Only
    /// sensible when the reported evicted fraction is negligible.
    discard,
};

/// Growth kernel g(z'|z) of one class: Gaussian with size-dependent mean and spread, or a
/// general density callable.
struct Growth {
    enum class Kind { gaussian, density };
    Kind kind = Kind::gaussian;
    SizeFunction mean;           ///< gaussian: E[z' | z], finite
    SizeFunction sd;             ///< gaussian: sd[z' | z] > 0, finite
    TransitionDensity density;   ///< density: g(z'|z) ≥ 0, finite

    /// \f$ g(z'|z) = \phi\big((z' - \mu(z))/\sigma(z)\big) / \sigma(z) \f$; tail masses outside
    /// [L, U] are exact normal-CDF values.
    static Growth gaussian(SizeFunction mean, SizeFunction sd) {
        Growth g;
        g.kind = Kind::gaussian;
        g.mean = std::move(mean);
        g.sd = std::move(sd);
        return g;
    }
    /// A general density; evicted mass is \f$1 - \sum_i w_i g(z_i|z)\f$.
    static Growth general(TransitionDensity density) {
        Growth g;
        g.kind = Kind::density;
        g.density = std::move(density);
        return g;
    }
};

/// A size density that does not depend on a parent size, e.g. recruit size c(z').
struct SizeDensity {
    enum class Kind { gaussian, density };
    Kind kind = Kind::gaussian;
    double mean = 0.0;      ///< gaussian: finite
    double sd = 1.0;        ///< gaussian: > 0
    SizeFunction density;   ///< density: c(z') ≥ 0, finite

    static SizeDensity gaussian(double mean, double sd) {
        SizeDensity c;
        c.kind = Kind::gaussian;
        c.mean = mean;
        c.sd = sd;
        return c;
    }
    static SizeDensity general(SizeFunction density) {
        SizeDensity c;
        c.kind = Kind::density;
        c.density = std::move(density);
        return c;
    }
};

/// A continuous class: plants of one microsite (and, optionally, one age class such as
/// first-year juveniles), with their vital rates as functions of size z.
struct ContinuousClass {
    std::string name;               ///< for messages and tables
    std::size_t microsite = 0;      ///< index into KernelDescription::microsites
    SizeFunction survival;          ///< s(z) ∈ [0, 1]; required
    Growth growth;                  ///< g(z'|z) of survivors; required when survival is not 0
    SizeFunction flowering;         ///< p(z) ∈ [0, 1]; empty means 1
    SizeFunction seeds;             ///< b(z) ≥ 0 seeds per flowering plant; empty means none
    /// Where survivors go (a class of the same microsite); empty means this class itself.
    std::optional<std::size_t> next_class;
};

/// Recruitment into one microsite m': seeds arrive there with fraction a, establish with
/// probability e, and enter class `entry_class` with size density c(z').
struct Microsite {
    std::string name;
    double arrival = 0.0;         ///< a_{m'} ∈ [0, 1], fraction of seeds in m' at germination
    double establishment = 0.0;   ///< e_{m'} ≥ 0, recruits seen at the census per arrived seed
    SizeDensity recruit_size;     ///< c_{m'}(z')
    std::size_t entry_class = 0;  ///< class recruits enter; must belong to this microsite
};

/// A direct flow from a discrete stage into a continuous class (e.g. a dormant tuber stage).
struct StageToClass {
    std::size_t target_class = 0;  ///< class index
    double rate = 0.0;             ///< individuals in the class per stage individual, ≥ 0
    SizeDensity size;              ///< their size density at t+1
};

/// A flow from a continuous class into a discrete stage (e.g. plants entering dormancy).
struct ClassToStage {
    std::size_t source_class = 0;  ///< class index
    SizeFunction rate;             ///< stage individuals at t+1 per plant of size z, ≥ 0
};

/// A discrete stage d (e.g. a seed bank). With x_d its number at t and S the seeds produced
/// at t (\f$S = \sum_k \int p_k b_k x_k\,dz\f$):
///
/// \f[ x_d(t+1) = \sum_{d'} T_{d d'} x_{d'} + \sigma_d S + \sum_{\text{from}} \int h(z) x_k(z) dz \f]
///
/// and stage d feeds the recruitment route with \f$r_d x_d\f$ seed-equivalents (split over
/// microsites by a, e, c like fresh seeds) plus its direct flows into classes.
/// T is `KernelDescription::stage_transitions` with `stay` added on the diagonal.
struct DiscreteStage {
    std::string name;
    double stay = 0.0;          ///< T_dd contribution: probability of staying, ∈ [0, 1]
    double seed_input = 0.0;    ///< σ_d ≥ 0: stage individuals at t+1 per seed produced at t
    double recruitment = 0.0;   ///< r_d ≥ 0: seed-equivalents per stage individual that take
                                ///< the recruitment route (e.g. germination × bank survival)
    std::vector<StageToClass> to_classes;
    std::vector<ClassToStage> from_classes;
};

/// Everything a KernelOperator needs besides the mesh.
struct KernelDescription {
    std::vector<ContinuousClass> classes;
    std::vector<Microsite> microsites;
    std::vector<DiscreteStage> stages;
    /// D×D stage-to-stage flows T(d', d) (stage d at t → stage d' at t+1), entries ≥ 0; may be
    /// empty (0×0) meaning zero. Added to the stages' `stay` diagonal. With no classes this is
    /// a plain stage matrix.
    Eigen::MatrixXd stage_transitions;
    /// φ ∈ [0, 1]: fraction of the seeds produced at t that take the recruitment route in the
    /// same year (the rest enters stages through σ_d, or is lost).
    double fresh_recruitment = 1.0;
    EvictionPolicy eviction = EvictionPolicy::boundary;
};

}  // namespace safesite::kernel
