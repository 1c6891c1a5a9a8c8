#include "stats/detail/optimise.hpp"

#include <cmath>
#include <cstdint>
#include <limits>

#include <boost/math/tools/minima.hpp>
#include <nlopt.hpp>

namespace safesite::stats::detail {

OptimiseResult minimise_brent(const std::function<double(double)>& f, double upper,
                              int max_evaluations, int bits) {
    OptimiseResult out;
    out.x.resize(1);
    int evaluations = 0;
    auto counted = [&](double t) {
        ++evaluations;
        return f(t);
    };
    for (int widen = 0; widen <= 6; ++widen) {
        std::uintmax_t iters = static_cast<std::uintmax_t>(max_evaluations);
        // At most 26 bits (half the double mantissa): the location of a smooth minimum is
        // only determined to about √ε by the criterion, and Boost caps the request there.
        const auto r = boost::math::tools::brent_find_minima(counted, 0.0, upper, bits, iters);
        out.x[0] = r.first;
        out.f = r.second;
        out.converged = iters < static_cast<std::uintmax_t>(max_evaluations);
        if (r.first < 0.95 * upper) break;
        upper *= 4.0;
    }
    out.evaluations = evaluations;
    if (!out.converged) out.message = "Brent's method reached its evaluation cap";
    return out;
}

namespace {
struct NloptData {
    const Objective* f;
    int evaluations = 0;
};

double nlopt_trampoline(unsigned n, const double* x, double* grad, void* data) {
    (void)grad;  // BOBYQA is derivative-free
    auto* d = static_cast<NloptData*>(data);
    ++d->evaluations;
    const double v = (*d->f)(Eigen::Map<const Eigen::VectorXd>(x, n));
    return std::isfinite(v) ? v : 1e100;
}
}  // namespace

OptimiseResult minimise_bobyqa(const Objective& f, const Eigen::VectorXd& x0,
                               const std::vector<double>& lower, const Eigen::VectorXd& step,
                               double xtol_rel, double ftol_abs, int max_evaluations) {
    const unsigned n = static_cast<unsigned>(x0.size());
    OptimiseResult out;
    NloptData data{&f};
    nlopt::opt opt(nlopt::LN_BOBYQA, n);
    opt.set_lower_bounds(lower);
    opt.set_min_objective(nlopt_trampoline, &data);
    opt.set_xtol_rel(xtol_rel);
    opt.set_ftol_abs(ftol_abs);
    opt.set_maxeval(max_evaluations);
    opt.set_initial_step(std::vector<double>(step.data(), step.data() + n));
    std::vector<double> x(x0.data(), x0.data() + n);
    for (unsigned i = 0; i < n; ++i)
        if (x[i] < lower[i]) x[i] = lower[i];
    double fmin = std::numeric_limits<double>::infinity();
    try {
        const nlopt::result r = opt.optimize(x, fmin);
        out.converged = r == nlopt::SUCCESS || r == nlopt::FTOL_REACHED ||
                        r == nlopt::XTOL_REACHED || r == nlopt::STOPVAL_REACHED;
        if (r == nlopt::MAXEVAL_REACHED) out.message = "BOBYQA reached its evaluation cap";
    } catch (const nlopt::roundoff_limited&) {
        // The optimiser cannot make progress because the criterion is flat to rounding:
        // the point reached is a minimum to working precision.
        out.converged = true;
        fmin = opt.last_optimum_value();
    } catch (const std::exception& e) {
        out.converged = false;
        out.message = std::string("BOBYQA stopped: ") + e.what();
    }
    out.x = Eigen::Map<const Eigen::VectorXd>(x.data(), n);
    out.f = fmin;
    out.evaluations = data.evaluations;
    return out;
}

Eigen::MatrixXd numeric_hessian(const Objective& f, const Eigen::VectorXd& x, double fx,
                                const Eigen::VectorXd& h) {
    const Eigen::Index d = x.size();
    Eigen::MatrixXd H(d, d);
    Eigen::VectorXd fp(d), fm(d);
    for (Eigen::Index i = 0; i < d; ++i) {
        Eigen::VectorXd e = x;
        e[i] = x[i] + h[i];
        fp[i] = f(e);
        e[i] = x[i] - h[i];
        fm[i] = f(e);
        H(i, i) = (fp[i] - 2.0 * fx + fm[i]) / (h[i] * h[i]);
    }
    for (Eigen::Index i = 0; i < d; ++i)
        for (Eigen::Index j = 0; j < i; ++j) {
            Eigen::VectorXd e = x;
            e[i] += h[i];
            e[j] += h[j];
            const double fpp = f(e);
            e[i] = x[i] - h[i];
            e[j] = x[j] - h[j];
            const double fmm = f(e);
            // Second difference along the diagonal direction, minus the two pure terms.
            H(i, j) = H(j, i) =
                (fpp + fmm - fp[i] - fm[i] - fp[j] - fm[j] + 2.0 * fx) / (2.0 * h[i] * h[j]);
        }
    return H;
}

}  // namespace safesite::stats::detail
