#pragma once
/// \file break_even.hpp
/// Break-even establishment in bare soil (issue 5 §4; docs/methods/pipeline.md, "Break-even").
///
/// For a neighbour form f, move the seeds that arrive under f to bare soil
/// (a'_bare = a_bare + a_f, a'_f = 0) and ask which bare-soil establishment e* leaves λ at
/// its baseline value λ0:
///
/// \f[ \lambda(a', e_{bare} = e^*) = \lambda_0 . \f]
///
/// λ is non-decreasing in e_bare (fecundity F grows with e_bare and every entry of K is
/// non-negative, so by Perron–Frobenius λ cannot fall; Caswell 2001 §9.1), so the root is
/// unique when it exists and is bracketed by [0, 1]. When λ(e_bare = 1) < λ0 there is no
/// break-even in range ("none in range": bare soil cannot make up for the form); when
/// λ(e_bare = 0) ≥ λ0 every e_bare works (the seeds under f contribute nothing to λ).

#include <functional>
#include <string>

namespace safesite::pipeline {

/// Outcome of a break-even search.
struct BreakEven {
    enum class Status {
        found,          ///< a root e* in (lo, hi)
        none_in_range,  ///< λ(hi) < λ0: no e_bare in range keeps λ
        always,         ///< λ(lo) ≥ λ0: every e_bare in range keeps λ (e* = lo)
    };
    Status status = Status::none_in_range;
    double value = 0.0;      ///< e* when found; lo when always; NaN when none in range
    double lambda_lo = 0.0;  ///< λ at e_bare = lo
    double lambda_hi = 0.0;  ///< λ at e_bare = hi
    int evaluations = 0;     ///< number of λ evaluations

    /// "found", "none in range" or "always".
    std::string status_name() const;
};

/// Solve λ(e) = target for e in [lo, hi] where λ is non-decreasing in e.
///
/// Uses Boost.Math's TOMS 748 bracketing solver (Alefeld, Potra & Shi 1995) to a bracket
/// width of about 1e-12 relative (40 bits) or `max_evaluations`.
/// \param lambda_of_e  λ as a function of e (e.g. bare-soil establishment)
/// \param target       λ0 > 0
/// \param lo, hi       search interval, 0 ≤ lo < hi (1 for a probability)
/// \throws UsageError when lo ≥ hi; NumericalError when λ is not finite or the solver does
///         not converge in `max_evaluations`.
BreakEven solve_break_even(const std::function<double(double)>& lambda_of_e, double target,
                           double lo = 0.0, double hi = 1.0, int max_evaluations = 100);

}  // namespace safesite::pipeline
