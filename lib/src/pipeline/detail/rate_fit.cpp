#include "pipeline/detail/rate_fit.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>
#include <memory>
#include <set>

#include "pipeline/detail/bound_rates.hpp"
#include "safesite/error.hpp"
#include "safesite/stats/design.hpp"
#include "safesite/stats/family.hpp"
#include "safesite/stats/formula.hpp"
#include "safesite/stats/glm.hpp"
#include "safesite/stats/grouping_factor.hpp"
#include "safesite/stats/mixed_model.hpp"
#include "safesite/stats/model_comparison.hpp"

namespace safesite::pipeline::detail {

namespace {

constexpr double k_nan = std::numeric_limits<double>::quiet_NaN();

SourceLocation key_at(const spec::RateSpec& rate, const std::string& key) {
    SourceLocation at = rate.at;
    at.key = "rates." + rate.name + "." + key;
    return at;
}

bool uses_column(const std::string& formula, const std::string& column) {
    const auto columns = stats::parse_formula(formula).columns();
    return std::find(columns.begin(), columns.end(), column) != columns.end();
}

// `formula + year`, unless the formula already reads year.
std::string with_year(const std::string& formula) {
    return uses_column(formula, "year") ? formula : formula + " + year";
}

// Two-sided normal p-value of a z statistic: 2 (1 − Φ(|z|)) = erfc(|z| / √2).
double normal_p(double z) { return std::isfinite(z) ? std::erfc(std::abs(z) / std::sqrt(2.0)) : k_nan; }

// The grouping factors of a mixed fit, built from the rows of the design.
std::vector<stats::GroupingFactor> grouping_factors(const stats::Table& data,
                                                    const std::vector<std::size_t>& rows,
                                                    const std::vector<std::string>& groups,
                                                    const std::string& slope_column) {
    std::vector<stats::GroupingFactor> out;
    for (const auto& name : groups) {
        const auto& column = data.categorical(name);
        stats::GroupingFactor g;
        g.name = name;
        g.level_names = column.levels;
        std::map<std::string, int> index;
        for (std::size_t k = 0; k < column.levels.size(); ++k)
            index[column.levels[k]] = static_cast<int>(k);
        for (std::size_t r : rows) g.level.push_back(index.at(column.values[r]));
        if (name == "year" && !slope_column.empty()) {
            const auto& x = data.numeric(slope_column);
            g.slope.resize(static_cast<Eigen::Index>(rows.size()));
            for (std::size_t i = 0; i < rows.size(); ++i)
                g.slope[static_cast<Eigen::Index>(i)] = x[rows[i]];
            g.slope_name = slope_column;
        }
        out.push_back(std::move(g));
    }
    return out;
}

// A mixed fit with its design (for prediction).
struct MixedResult {
    stats::Design design;
    stats::MixedFit fit;
};

MixedResult fit_mixed_model(const std::string& formula, const stats::Table& data,
                            const std::vector<std::string>& groups, const std::string& slope,
                            const std::vector<std::string>& also_required, stats::Family family,
                            stats::Link link, bool reml) {
    stats::DesignOptions design_options;
    design_options.also_required = also_required;
    for (const auto& g : groups) design_options.also_required.push_back(g);
    if (!slope.empty()) design_options.also_required.push_back(slope);
    MixedResult out;
    out.design = stats::build_design(formula, data, design_options);
    stats::MixedOptions options;
    options.family = family;
    options.link = link;
    options.groups = groups;
    options.slope_column = slope;
    options.reml = reml;
    out.fit = stats::fit_mixed_core(out.design.X, out.design.y, out.design.trials,
                                    out.design.offset,
                                    grouping_factors(data, out.design.rows, groups, slope),
                                    options, out.design.column_names);
    return out;
}

void glm_rows(std::vector<CoefficientRow>& out, const stats::GlmFit& fit,
              const CoefficientRow& proto) {
    for (const auto& c : fit.coefficient_table()) {
        CoefficientRow r = proto;
        r.term = c.term;
        r.estimate = c.estimate;
        r.std_error = c.std_error;
        r.statistic = c.statistic;
        r.p_value = c.p_value;
        out.push_back(r);
    }
    auto extra = [&](const std::string& term, double estimate, double se) {
        CoefficientRow r = proto;
        r.term = term;
        r.estimate = estimate;
        r.std_error = se;
        out.push_back(r);
    };
    if (fit.family == stats::Family::gaussian) extra("sigma", fit.sigma, k_nan);
    if (fit.family == stats::Family::gaussian_spread) {
        extra("spread:(Intercept)", fit.spread[0], fit.spread_se[0]);
        extra("spread:" + fit.spread_x.text(), fit.spread[1], fit.spread_se[1]);
    }
    if (fit.family == stats::Family::negbin) extra("theta", fit.theta, fit.theta_se);
}

void mixed_rows(std::vector<CoefficientRow>& out, const stats::MixedFit& fit,
                const CoefficientRow& proto) {
    for (std::size_t j = 0; j < fit.fixed_names.size(); ++j) {
        CoefficientRow r = proto;
        r.term = fit.fixed_names[j];
        r.estimate = fit.fixed[static_cast<Eigen::Index>(j)];
        r.std_error = fit.fixed_se[static_cast<Eigen::Index>(j)];
        r.statistic = r.estimate / r.std_error;
        r.p_value = normal_p(r.statistic);
        out.push_back(r);
    }
    for (const auto& vc : fit.variance_components) {
        CoefficientRow r = proto;
        if (vc.group == "residual")
            r.term = "sigma";
        else
            r.term = "sd(" + vc.group + ")" + (vc.term == "(Intercept)" ? "" : ":" + vc.term);
        r.estimate = vc.sd;
        r.std_error = vc.sd_se;
        out.push_back(r);
    }
    for (const auto& g : fit.random_effects) {
        if (g.group != "year") continue;
        for (std::size_t l = 0; l < g.levels.size(); ++l)
            for (std::size_t t = 0; t < g.terms.size(); ++t) {
                CoefficientRow r = proto;
                r.term = "mode(year)[" + g.levels[l] + "]" +
                         (g.terms[t] == "(Intercept)" ? "" : ":" + g.terms[t]);
                const auto li = static_cast<Eigen::Index>(l), ti = static_cast<Eigen::Index>(t);
                r.estimate = g.modes(li, ti);
                r.std_error = std::sqrt(g.conditional_variances(li, ti));
                out.push_back(r);
            }
    }
}

// AIC table of mixed fits (the stats comparison takes GLM fits): Δ and Akaike weights
// w = exp(−Δ/2)/Σ exp(−Δ/2) (Burnham & Anderson 2002 §2.9); ties keep the input order.
std::vector<ComparisonRow> compare_mixed(const std::vector<MixedResult>& fits,
                                         const std::vector<std::string>& labels,
                                         const std::string& rate, const std::string& model) {
    double best = std::numeric_limits<double>::infinity();
    for (const auto& f : fits) best = std::min(best, f.fit.aic);
    double total = 0.0;
    for (const auto& f : fits) total += std::exp(-0.5 * (f.fit.aic - best));
    std::vector<ComparisonRow> rows;
    for (std::size_t i = 0; i < fits.size(); ++i) {
        const auto& f = fits[i].fit;
        rows.push_back({rate, model, labels[i], f.aic, f.aic - best,
                        std::exp(-0.5 * (f.aic - best)) / total, false, f.df,
                        f.log_likelihood});
    }
    std::stable_sort(rows.begin(), rows.end(),
                     [](const ComparisonRow& a, const ComparisonRow& b) { return a.aic < b.aic; });
    return rows;
}

}  // namespace

std::vector<CoefficientRow> given_rows(const spec::RateSpec& rate) {
    std::vector<CoefficientRow> out;
    CoefficientRow proto;
    proto.rate = rate.name;
    proto.model = "all";
    proto.year_handling = spec::to_string(rate.year);
    proto.source = "given";
    for (const auto& [term, value] : *rate.coefficients) {
        CoefficientRow r = proto;
        r.term = term;
        r.estimate = value;
        out.push_back(r);
    }
    auto extra = [&](const std::string& term, double value) {
        CoefficientRow r = proto;
        r.term = term;
        r.estimate = value;
        out.push_back(r);
    };
    if (rate.sd) extra("sigma", *rate.sd);
    if (rate.spread_coefficients.size() == 2) {
        extra("spread:(Intercept)", rate.spread_coefficients[0]);
        extra("spread:" + rate.spread.value_or("size"), rate.spread_coefficients[1]);
    }
    if (rate.theta) extra("theta", *rate.theta);
    if (rate.year_sd) extra("sd(year)", *rate.year_sd);
    return out;
}

RateOutcome fit_rate(const spec::RateSpec& rate, const stats::Table& data,
                     const KernelLayout& layout) {
    (void)layout;
    RateOutcome out;
    out.summary.rate = rate.name;
    out.summary.family = rate.family;
    out.summary.link = rate.link;
    out.summary.year_handling = spec::to_string(rate.year);

    if (rate.is_fixed()) {
        out.summary.given = true;
        out.summary.formula = rate.formula;
        out.coefficients = given_rows(rate);
        auto shared = std::make_shared<spec::RateSpec>(rate);
        out.for_year = [shared, layout](const std::string& label) {
            return fixed_rate(*shared, layout, 0.0, label);
        };
        out.pooled = fixed_rate(rate, layout, 0.0, "pooled");
        return out;
    }

    const auto family = stats::parse_family(rate.family);
    const auto link = stats::parse_link(rate.link);
    if (!family || !link)
        throw SpecError(key_at(rate, "family"), "unknown family or link '" + rate.family + "', '" +
                                                    rate.link + "'");
    const bool random_year = rate.year == spec::YearHandling::random;
    const bool fixed_year = rate.year == spec::YearHandling::fixed;
    const bool mixed = random_year || !rate.groups.empty();
    if (mixed && *family != stats::Family::gaussian && *family != stats::Family::binomial &&
        *family != stats::Family::poisson)
        throw SpecError(key_at(rate, random_year ? "year" : "groups"),
                        "random effects are available for the gaussian, binomial and poisson "
                        "families; rate " + rate.name + " is " + rate.family);
    const std::string slope = rate.random_slope.value_or("");

    // The formulas of the year kernels: the main formula first, then the candidates; with a
    // fixed year effect every one gets `+ year`.
    std::vector<std::string> labels{rate.formula};
    for (const auto& c : rate.candidates)
        if (std::find(labels.begin(), labels.end(), c) == labels.end()) labels.push_back(c);
    std::vector<std::string> formulas;
    for (const auto& f : labels) formulas.push_back(fixed_year ? with_year(f) : f);
    // Every candidate is fitted on the same rows: those complete in all their columns.
    std::set<std::string> columns;
    for (const auto& f : formulas)
        for (const auto& c : stats::parse_formula(f).columns()) columns.insert(c);
    const std::vector<std::string> also(columns.begin(), columns.end());

    CoefficientRow proto;
    proto.rate = rate.name;
    proto.year_handling = out.summary.year_handling;
    proto.source = "fitted";
    proto.model = fixed_year ? "years" : "all";
    const std::string model_label = proto.model;

    std::size_t chosen = 0;
    if (!mixed) {
        stats::GlmOptions options;
        options.family = *family;
        options.link = *link;
        options.spread_column = rate.spread.value_or("size");
        options.also_required = also;
        std::vector<stats::GlmFit> fits;
        for (const auto& f : formulas) fits.push_back(stats::fit_glm(f, data, options));
        const stats::ComparisonTable table = stats::compare_models(fits, formulas);
        chosen = table.rows.front().index;
        for (const auto& row : table.rows)
            out.comparison.push_back({rate.name, model_label, row.label, row.aic, row.delta_aic,
                                      row.weight, row.index == chosen, row.n_parameters,
                                      row.loglik});
        const stats::GlmFit& best = fits[chosen];
        glm_rows(out.coefficients, best, proto);
        for (const auto& w : best.warnings) out.warnings.push_back(rate.name + ": " + w);
        out.summary.observations = best.n_used;
        BoundRate years_rate = glm_rate(best);
        if (fixed_year) {
            // Pooled kernel: the chosen formula without year, on the same rows.
            stats::GlmFit pooled = stats::fit_glm(labels[chosen], data, options);
            CoefficientRow p = proto;
            p.model = "pooled";
            glm_rows(out.coefficients, pooled, p);
            for (const auto& w : pooled.warnings)
                out.warnings.push_back(rate.name + " (pooled fit): " + w);
            out.pooled = glm_rate(pooled);
        } else {
            out.pooled = years_rate;
        }
        out.for_year = [years_rate](const std::string&) { return years_rate; };
    } else {
        std::vector<std::string> groups = rate.groups;
        if (random_year && std::find(groups.begin(), groups.end(), "year") == groups.end())
            groups.push_back("year");
        // AIC of Gaussian models with different fixed effects is comparable under ML only.
        const bool reml = formulas.size() == 1;
        std::vector<MixedResult> fits;
        for (const auto& f : formulas)
            fits.push_back(fit_mixed_model(f, data, groups, random_year ? slope : "", also,
                                           *family, *link, reml));
        out.comparison = compare_mixed(fits, formulas, rate.name, model_label);
        const std::string best_formula = out.comparison.front().formula;
        chosen = static_cast<std::size_t>(
            std::find(formulas.begin(), formulas.end(), best_formula) - formulas.begin());
        out.comparison.front().chosen = true;
        const MixedResult& best = fits[chosen];
        mixed_rows(out.coefficients, best.fit, proto);
        for (const auto& w : best.fit.warnings) out.warnings.push_back(rate.name + ": " + w);
        out.summary.observations = static_cast<std::size_t>(best.fit.nobs);
        BoundRate years_rate;
        years_rate.mean = mixed_mean(best.design.spec, best.fit, random_year,
                                     random_year ? slope : "");
        if (*family == stats::Family::gaussian) years_rate.sd = constant_sd(best.fit.sigma);
        if (fixed_year) {
            const MixedResult pooled = fit_mixed_model(labels[chosen], data, groups, "", also,
                                                       *family, *link, true);
            CoefficientRow p = proto;
            p.model = "pooled";
            mixed_rows(out.coefficients, pooled.fit, p);
            out.pooled.mean = mixed_mean(pooled.design.spec, pooled.fit, false, "");
            if (*family == stats::Family::gaussian) out.pooled.sd = constant_sd(pooled.fit.sigma);
        } else {
            // Random year: the pooled kernel is the fixed effects alone (the "average year").
            out.pooled.mean = mixed_mean(best.design.spec, best.fit, false, "");
            out.pooled.sd = years_rate.sd;
        }
        out.for_year = [years_rate](const std::string&) { return years_rate; };
    }
    out.summary.formula = formulas[chosen];
    return out;
}

}  // namespace safesite::pipeline::detail
