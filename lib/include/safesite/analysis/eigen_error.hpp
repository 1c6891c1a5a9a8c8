#pragma once
/// \file eigen_error.hpp
/// The error thrown when a kernel has no usable dominant eigen-triple.

#include <string>

#include "safesite/error.hpp"

namespace safesite::analysis {

/// No unique, real, positive dominant eigenvalue, or the iteration did not converge.
/// `reason()` says which; `lambda()` and `second_modulus()` hold what was found (NaN if
/// nothing). Typical causes: a zero kernel or one without stasis and reproduction (λ = 0,
/// `not_positive`), a periodic (imprimitive) life cycle (|λ₂| = λ, `not_unique`), a dominant
/// complex pair (`not_real`), no convergence within the iteration limit (`not_converged`).
class EigenError : public NumericalError {
public:
    enum class Reason { not_positive, not_real, not_unique, not_converged };

    EigenError(Reason reason, double lambda, double second_modulus, const std::string& what)
        : NumericalError(what), m_reason(reason), m_lambda(lambda), m_second(second_modulus) {}

    Reason reason() const noexcept { return m_reason; }
    double lambda() const noexcept { return m_lambda; }
    double second_modulus() const noexcept { return m_second; }

private:
    Reason m_reason;
    double m_lambda;
    double m_second;
};

}  // namespace safesite::analysis
