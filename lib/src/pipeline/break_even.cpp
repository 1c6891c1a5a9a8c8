#include "safesite/pipeline/break_even.hpp"

#include <cmath>
#include <cstdint>
#include <limits>

#include <boost/math/tools/roots.hpp>
#include <boost/math/tools/toms748_solve.hpp>

#include "safesite/error.hpp"

namespace safesite::pipeline {

std::string BreakEven::status_name() const {
    switch (status) {
        case Status::found: return "found";
        case Status::none_in_range: return "none in range";
        case Status::always: return "always";
    }
    return "";
}

BreakEven solve_break_even(const std::function<double(double)>& lambda_of_e, double target,
                           double lo, double hi, int max_evaluations) {
    if (!(lo < hi)) throw UsageError("break-even: empty search interval");
    BreakEven out;
    auto lambda = [&](double e) {
        ++out.evaluations;
        const double l = lambda_of_e(e);
        if (!std::isfinite(l))
            throw NumericalError("break-even: λ is not finite at e = " + std::to_string(e));
        return l;
    };
    out.lambda_lo = lambda(lo);
    out.lambda_hi = lambda(hi);
    if (out.lambda_lo >= target) {
        out.status = BreakEven::Status::always;
        out.value = lo;
        return out;
    }
    if (out.lambda_hi < target) {
        out.status = BreakEven::Status::none_in_range;
        out.value = std::numeric_limits<double>::quiet_NaN();
        return out;
    }
    // g(e) = λ(e) − λ0 changes sign on [lo, hi]; TOMS 748 keeps the bracket.
    auto g = [&](double e) { return lambda(e) - target; };
    std::uintmax_t iterations = static_cast<std::uintmax_t>(max_evaluations);
    const auto bracket = boost::math::tools::toms748_solve(
        g, lo, hi, out.lambda_lo - target, out.lambda_hi - target,
        boost::math::tools::eps_tolerance<double>(40), iterations);
    if (iterations >= static_cast<std::uintmax_t>(max_evaluations))
        throw NumericalError("break-even: no convergence in " + std::to_string(max_evaluations) +
                             " evaluations");
    out.status = BreakEven::Status::found;
    out.value = 0.5 * (bracket.first + bracket.second);
    return out;
}

}  // namespace safesite::pipeline
