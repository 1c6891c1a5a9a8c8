#include "safesite/pipeline/kernel_builder.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "safesite/error.hpp"

namespace safesite::pipeline {

namespace {

// Evaluate a bound rate on a covariate table and check that every value is finite.
Eigen::VectorXd predict(const TablePrediction& f, const stats::Table& table,
                        const std::string& rate, const std::string& what,
                        const KernelCurves& curves, std::size_t k) {
    if (!f) throw UsageError("kernel rates '" + curves.label + "': rate " + rate + " (" + what +
                             ") is not bound");
    Eigen::VectorXd out = f(table);
    if (static_cast<std::size_t>(out.size()) != table.rows())
        throw UsageError("kernel rates '" + curves.label + "': rate " + rate +
                         " returned the wrong number of predictions");
    for (Eigen::Index i = 0; i < out.size(); ++i)
        if (!std::isfinite(out[i]))
            throw NumericalError("vital rate " + rate + " (" + what + ") of kernel '" +
                                 curves.label + "' is not finite for class " +
                                 std::to_string(k) + " at size " +
                                 std::to_string(table.numeric("size")[static_cast<std::size_t>(i)]));
    return out;
}

// Which vector of ClassCurves a callable reads.
enum class Curve { survival, growth_mean, growth_sd, flowering, seeds };

// A size function reading the precomputed value at a mesh node, and predicting afresh
// (one-row table) for any other size.
kernel::SizeFunction curve_function(std::shared_ptr<const KernelCurves> curves, std::size_t k,
                                    Curve which) {
    return [curves, k, which](double z) {
        const ClassCurves& c = curves->classes[k];
        const Eigen::VectorXd* values = nullptr;
        switch (which) {
            case Curve::survival: values = &c.survival; break;
            case Curve::growth_mean: values = &c.growth_mean; break;
            case Curve::growth_sd: values = &c.growth_sd; break;
            case Curve::flowering: values = &c.flowering; break;
            case Curve::seeds: values = &c.seeds; break;
        }
        const Eigen::VectorXd& nodes = curves->nodes;
        const double* first = nodes.data();
        const double* last = nodes.data() + nodes.size();
        const double* it = std::lower_bound(first, last, z);
        if (it != last && *it == z) return (*values)[it - first];
        // Off the nodes: evaluate the regression at z.
        Eigen::VectorXd one(1);
        one[0] = z;
        const stats::Table table =
            covariate_table(curves->layout, one, c.microsite, c.juvenile, curves->label);
        const KernelRates& r = curves->rates;
        switch (which) {
            case Curve::survival: return r.survival.mean(table)[0];
            case Curve::growth_mean: return r.growth.mean(table)[0];
            case Curve::growth_sd: return r.growth.sd(table)[0];
            case Curve::flowering: return r.flowering.mean(table)[0];
            case Curve::seeds: return r.seeds.mean(table)[0];
        }
        return std::numeric_limits<double>::quiet_NaN();
    };
}

bool is_juvenile_size(const KernelLayout& layout, double z) {
    return layout.juvenile == JuvenileMode::size_threshold && z < layout.juvenile_size_below;
}

}  // namespace

std::shared_ptr<const KernelCurves> evaluate_rates(const KernelRates& rates,
                                                   const KernelLayout& layout,
                                                   const Eigen::VectorXd& nodes) {
    auto curves = std::make_shared<KernelCurves>();
    curves->label = rates.label;
    curves->nodes = nodes;
    curves->rates = rates;
    curves->layout = layout;
    const std::size_t n_sites = layout.microsites.size();
    for (std::size_t k = 0; k < layout.classes(); ++k) {
        ClassCurves c;
        c.microsite = k % n_sites;
        c.juvenile = k >= n_sites;
        const stats::Table table =
            covariate_table(layout, nodes, c.microsite, c.juvenile, rates.label);
        c.survival = predict(rates.survival.mean, table, "survival", "mean", *curves, k);
        c.growth_mean = predict(rates.growth.mean, table, "growth", "mean", *curves, k);
        c.growth_sd = predict(rates.growth.sd, table, "growth", "sd", *curves, k);
        c.flowering = predict(rates.flowering.mean, table, "flowering", "mean", *curves, k);
        c.seeds = predict(rates.seeds.mean, table, "seeds", "mean", *curves, k);
        curves->classes.push_back(std::move(c));
    }
    // Recruit size: one row per microsite (the recruits table has no parent size; the size
    // column is filled with the mesh midpoint and only matters if a formula misuses it).
    const double mid = nodes.size() > 0 ? 0.5 * (nodes[0] + nodes[nodes.size() - 1]) : 0.0;
    curves->recruit_mean.resize(static_cast<Eigen::Index>(n_sites));
    curves->recruit_sd.resize(static_cast<Eigen::Index>(n_sites));
    for (std::size_t m = 0; m < n_sites; ++m) {
        Eigen::VectorXd one(1);
        one[0] = mid;
        const stats::Table table = covariate_table(layout, one, m, true, rates.label);
        curves->recruit_mean[static_cast<Eigen::Index>(m)] =
            predict(rates.recruit_size.mean, table, "recruit_size", "mean", *curves, m)[0];
        curves->recruit_sd[static_cast<Eigen::Index>(m)] =
            predict(rates.recruit_size.sd, table, "recruit_size", "sd", *curves, m)[0];
    }
    return curves;
}

kernel::KernelDescription describe_kernel(std::shared_ptr<const KernelCurves> curves,
                                          const RecruitmentParameters& recruitment,
                                          kernel::EvictionPolicy eviction,
                                          SurvivalChange juvenile_change) {
    const KernelLayout& layout = curves->layout;
    const std::size_t n_sites = layout.microsites.size();
    if (static_cast<std::size_t>(recruitment.arrival.size()) != n_sites ||
        static_cast<std::size_t>(recruitment.establishment.size()) != n_sites)
        throw UsageError("kernel '" + curves->label + "': arrival and establishment need " +
                         std::to_string(n_sites) + " values (one per microsite)");
    if (!(juvenile_change.factor >= 0.0))
        throw UsageError("juvenile survival factor must be >= 0");

    kernel::KernelDescription d;
    d.eviction = eviction;
    const double factor = juvenile_change.factor;
    for (std::size_t k = 0; k < curves->classes.size(); ++k) {
        const ClassCurves& c = curves->classes[k];
        kernel::ContinuousClass cls;
        cls.name = (c.juvenile ? "first-year " : "") + layout.microsites[c.microsite];
        cls.microsite = c.microsite;
        kernel::SizeFunction s = curve_function(curves, k, Curve::survival);
        if (factor != 1.0) {
            // s → min(1, factor · s) for juveniles (issue 4 §4: capped at probability 1).
            if (c.juvenile)
                s = [s, factor](double z) { return std::min(1.0, factor * s(z)); };
            else if (layout.juvenile == JuvenileMode::size_threshold)
                s = [s, factor, &layout = curves->layout, keep = curves](double z) {
                    const double base = s(z);
                    return is_juvenile_size(layout, z) ? std::min(1.0, factor * base) : base;
                };
        }
        cls.survival = std::move(s);
        cls.growth = kernel::Growth::gaussian(curve_function(curves, k, Curve::growth_mean),
                                              curve_function(curves, k, Curve::growth_sd));
        cls.flowering = curve_function(curves, k, Curve::flowering);
        cls.seeds = curve_function(curves, k, Curve::seeds);
        if (c.juvenile) cls.next_class = layout.established_class(c.microsite);
        d.classes.push_back(std::move(cls));
    }
    for (std::size_t m = 0; m < n_sites; ++m) {
        const auto mi = static_cast<Eigen::Index>(m);
        kernel::Microsite site;
        site.name = layout.microsites[m];
        site.arrival = recruitment.arrival[mi];
        site.establishment = recruitment.establishment[mi];
        site.recruit_size =
            kernel::SizeDensity::gaussian(curves->recruit_mean[mi], curves->recruit_sd[mi]);
        site.entry_class = layout.juvenile == JuvenileMode::seedling_class
                               ? layout.juvenile_class(m)
                               : layout.established_class(m);
        d.microsites.push_back(std::move(site));
    }
    return d;
}

kernel::KernelDescription juvenile_survival_derivative(std::shared_ptr<const KernelCurves> curves,
                                                       kernel::EvictionPolicy eviction,
                                                       JuvenileDerivative kind) {
    // Start from the full description without reproduction (a = e = 0) and replace every
    // survival by ∂s_k(z)/∂θ: s_k(z) (proportional) or 1 (additive) where (k, z) is a
    // juvenile, 0 elsewhere. Growth is unchanged, so the P part becomes ∂s · g = ∂K/∂θ.
    const std::size_t n_sites = curves->layout.microsites.size();
    RecruitmentParameters none{Eigen::VectorXd::Zero(static_cast<Eigen::Index>(n_sites)),
                               Eigen::VectorXd::Zero(static_cast<Eigen::Index>(n_sites))};
    kernel::KernelDescription d = describe_kernel(curves, none, eviction);
    const KernelLayout& layout = curves->layout;
    for (std::size_t k = 0; k < d.classes.size(); ++k) {
        const bool juvenile_class = curves->classes[k].juvenile;
        kernel::SizeFunction s = d.classes[k].survival;
        d.classes[k].survival = [s, juvenile_class, kind, &layout = curves->layout,
                                 keep = curves](double z) {
            const bool juvenile = juvenile_class || is_juvenile_size(layout, z);
            if (!juvenile) return 0.0;
            return kind == JuvenileDerivative::proportional ? s(z) : 1.0;
        };
        d.classes[k].flowering = nullptr;
        d.classes[k].seeds = nullptr;
    }
    (void)layout;
    return d;
}

}  // namespace safesite::pipeline
