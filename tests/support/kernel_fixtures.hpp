#pragma once
// Test kernels shared by the kernel and analysis tests: invented smooth vital rates with fixed
// seeds (common practice; the shapes follow the logistic/Gaussian forms of Easterling et al.
// 2000 and Ellner, Childs & Rees 2016 ch. 2, with invented coefficients).
#include <cmath>
#include <cstddef>
#include <random>

#include "safesite/kernel/kernel_description.hpp"

namespace safesite::test {

inline double logistic(double x) { return 1.0 / (1.0 + std::exp(-x)); }

/// A random positive kernel with `microsites` microsites (one class each; microsite 0 also
/// gets a first-year juvenile class whose survivors join its established class) and
/// `stages` seed-bank-like discrete stages, on sizes in [0, 10].
inline kernel::KernelDescription random_description(std::size_t microsites, std::size_t stages,
                                                    unsigned seed) {
    std::mt19937_64 rng(seed);
    std::uniform_real_distribution<double> u(0.0, 1.0);
    kernel::KernelDescription d;
    double a_total = 0.0;
    std::vector<double> a(microsites);
    for (auto& x : a) a_total += (x = 0.2 + u(rng));
    for (std::size_t m = 0; m < microsites; ++m) {
        kernel::Microsite site;
        site.name = "site" + std::to_string(m);
        site.arrival = a[m] / a_total;
        site.establishment = 0.05 + 0.3 * u(rng);
        site.recruit_size = kernel::SizeDensity::gaussian(1.5 + u(rng), 0.5 + 0.3 * u(rng));
        site.entry_class = d.classes.size();
        d.microsites.push_back(site);

        const double s0 = -1.0 + u(rng), s1 = 0.3 + 0.3 * u(rng);
        const double g0 = 0.8 + u(rng), g1 = 0.7 + 0.2 * u(rng), gsd = 0.6 + 0.4 * u(rng);
        const double f0 = -5.0 + u(rng), f1 = 0.6 + 0.4 * u(rng);
        const double b0 = 1.0 + u(rng), b1 = 0.2 * u(rng);
        kernel::ContinuousClass c;
        c.name = "established";
        c.microsite = m;
        c.survival = [=](double z) { return logistic(s0 + s1 * z); };
        c.growth = kernel::Growth::gaussian([=](double z) { return g0 + g1 * z; },
                                            [=](double z) { return gsd * (1.0 + 0.02 * z); });
        c.flowering = [=](double z) { return logistic(f0 + f1 * z); };
        c.seeds = [=](double z) { return std::exp(b0 + b1 * z); };
        if (m == 0) {
            // Juvenile class (entry class of microsite 0): lower survival, no seeds.
            kernel::ContinuousClass j = c;
            j.name = "juvenile";
            j.survival = [=](double z) { return 0.6 * logistic(s0 + s1 * z); };
            j.seeds = nullptr;
            j.next_class = d.classes.size() + 1;
            d.classes.push_back(j);
        }
        d.classes.push_back(c);
    }
    for (std::size_t s = 0; s < stages; ++s) {
        kernel::DiscreteStage st;
        st.name = "bank" + std::to_string(s);
        st.stay = 0.2 + 0.5 * u(rng);
        st.seed_input = 0.05 + 0.1 * u(rng);
        st.recruitment = 0.1 + 0.2 * u(rng);
        d.stages.push_back(st);
    }
    d.fresh_recruitment = 0.7;
    return d;
}

}  // namespace safesite::test
