// Dominant eigen-triple of a kernel: the only translation unit that includes Spectra.
//
// References: [1] Caswell (2001) ch. 4 (λ, w, v of a projection matrix; Perron–Frobenius);
// [2] Ellner, Childs & Rees (2016) ch. 2–3 (the same for IPMs, weights in the inner product);
// [3] Spectra 1.0.1 documentation (GenEigsSolver: implicitly restarted Arnoldi, requirements
//     nev ≤ n − 2 and nev + 2 ≤ ncv ≤ n).
#include <algorithm>
#include <cmath>
#include <complex>
#include <cstdio>
#include <limits>
#include <string>

#include <Eigen/Eigenvalues>
// g++ 12 reports a false -Wuse-after-free inside Spectra's UpperHessenbergEigen (Eigen
// temporaries freed by inlined destructors); it is silenced for this file only.
#if defined(__GNUC__) && !defined(__clang__) && __GNUC__ >= 12
#pragma GCC diagnostic ignored "-Wuse-after-free"
#endif
#include <Spectra/GenEigsSolver.h>

#include "safesite/analysis/eigen_error.hpp"
#include "safesite/analysis/eigen_triple.hpp"
#include "safesite/kernel/kernel_error.hpp"

namespace safesite::analysis {

namespace {

using kernel::KernelOperator;
using kernel::TransposedKernelOperator;

std::string number(double x) {
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.10g", x);
    return buf;
}

constexpr double nan = std::numeric_limits<double>::quiet_NaN();

// Check that the leading eigenvalue (largest modulus) is real, positive and strictly dominant.
// `scale` is a size of the operator (used to tell λ = 0 from rounding).
void check_dominant(std::complex<double> lead, double second, double scale,
                    const EigenOptions& options) {
    const double modulus = std::abs(lead);
    if (!(modulus > 1e-12 * scale) || lead.real() <= 0.0) {
        if (modulus > 1e-12 * scale && std::abs(lead.imag()) <= 1e-10 * modulus)
            throw EigenError(EigenError::Reason::not_positive, lead.real(), second,
                             "the eigenvalue of largest modulus is negative (" +
                                 number(lead.real()) + "); the kernel has no positive dominant "
                                                       "eigenvalue");
        if (!(modulus > 1e-12 * scale))
            throw EigenError(EigenError::Reason::not_positive, modulus, second,
                             "the kernel has no positive dominant eigenvalue (largest modulus " +
                                 number(modulus) +
                                 "): no reproduction and no stasis, or a zero kernel");
    }
    if (std::abs(lead.imag()) > 1e-10 * modulus)
        throw EigenError(EigenError::Reason::not_real, modulus, second,
                         "the eigenvalue of largest modulus is complex (" + number(lead.real()) +
                             (lead.imag() < 0 ? " - " : " + ") + number(std::abs(lead.imag())) +
                             "i); no real dominant eigenvalue");
    if (second >= modulus * (1.0 - options.uniqueness_gap))
        throw EigenError(EigenError::Reason::not_unique, modulus, second,
                         "the dominant eigenvalue " + number(modulus) +
                             " is not unique: another eigenvalue has modulus " + number(second) +
                             " (periodic or reducible life cycle)");
}

// Make a Perron vector non-negative and scaled to sum(weights ∘ x) = 1. Entries that are
// negative only by rounding (≥ −1e-9 max) are set to 0; larger negative entries mean the
// vector is not a Perron vector.
Eigen::VectorXd normalise_perron(Eigen::VectorXd x, const Eigen::VectorXd& weights,
                                 double lambda, const char* which) {
    const double total = weights.dot(x);
    if (!(std::abs(total) > 0.0) || !std::isfinite(total))
        throw EigenError(EigenError::Reason::not_converged, lambda, nan,
                         std::string("the ") + which + " eigenvector could not be normalised");
    x /= total;
    const double top = x.cwiseAbs().maxCoeff();
    for (Eigen::Index i = 0; i < x.size(); ++i) {
        if (x[i] < 0.0) {
            if (x[i] < -1e-9 * top)
                throw EigenError(EigenError::Reason::not_unique, lambda, nan,
                                 std::string("the ") + which +
                                     " eigenvector has entries of both signs");
            x[i] = 0.0;
        }
    }
    return x / weights.dot(x);
}

// Fill w, v (from u = ω ∘ v), the normalisation and the residuals.
void finish(EigenTriple& t, const KernelOperator& op, const Eigen::VectorXd& right,
            const Eigen::VectorXd& left_u) {
    const Eigen::VectorXd& omega = op.state_weights();
    t.weights = omega;
    t.w = normalise_perron(right, omega, t.lambda, "right");
    // u = ω ∘ v is the left eigenvector of A; make v = u / ω and scale ⟨v, w⟩ = 1.
    Eigen::VectorXd u = normalise_perron(left_u, Eigen::VectorXd::Ones(omega.size()), t.lambda,
                                         "left");
    Eigen::VectorXd v = u.cwiseQuotient(omega);
    const double vw = omega.cwiseProduct(v).dot(t.w);
    if (!(vw > 0.0) || !std::isfinite(vw))
        throw EigenError(EigenError::Reason::not_unique, t.lambda, t.second_modulus,
                         "the left and right dominant eigenvectors are orthogonal (<v, w> = 0): "
                         "the dominant eigenvalue is not simple");
    t.v = v / vw;

    Eigen::VectorXd y(omega.size());
    op.apply(kernel::KernelPart::all, t.w.data(), y.data());
    t.residual = (y - t.lambda * t.w).norm() / t.w.norm();
    const Eigen::VectorXd uu = omega.cwiseProduct(t.v);
    op.apply_transposed(kernel::KernelPart::all, uu.data(), y.data());
    t.left_residual = (y - t.lambda * uu).norm() / uu.norm();
}

EigenTriple dense_route(const KernelOperator& op, const EigenOptions& options) {
    const Eigen::MatrixXd A = op.to_dense();
    const double scale = std::max(A.cwiseAbs().maxCoeff(), std::numeric_limits<double>::min());

    Eigen::EigenSolver<Eigen::MatrixXd> right(A, true);
    if (right.info() != Eigen::Success)
        throw EigenError(EigenError::Reason::not_converged, nan, nan,
                         "the dense eigen-solver did not converge");
    const Eigen::VectorXcd values = right.eigenvalues();
    Eigen::Index lead = 0;
    for (Eigen::Index i = 1; i < values.size(); ++i)
        if (std::abs(values[i]) > std::abs(values[lead])) lead = i;
    double second = 0.0;
    for (Eigen::Index i = 0; i < values.size(); ++i)
        if (i != lead) second = std::max(second, std::abs(values[i]));
    check_dominant(values[lead], second, scale, options);

    EigenTriple t;
    t.method = EigenMethod::dense;
    t.lambda = values[lead].real();
    t.second_modulus = second;

    Eigen::EigenSolver<Eigen::MatrixXd> left(A.transpose(), true);
    if (left.info() != Eigen::Success)
        throw EigenError(EigenError::Reason::not_converged, t.lambda, second,
                         "the dense eigen-solver did not converge on the transpose");
    const Eigen::VectorXcd lvalues = left.eigenvalues();
    Eigen::Index llead = 0;
    for (Eigen::Index i = 1; i < lvalues.size(); ++i)
        if (std::abs(lvalues[i] - t.lambda) < std::abs(lvalues[llead] - t.lambda)) llead = i;

    finish(t, op, right.eigenvectors().col(lead).real(), left.eigenvectors().col(llead).real());
    return t;
}

// Spectra needs a non-const operator reference; this view forwards to the const operator.
class ForwardView {
public:
    using Scalar = double;
    explicit ForwardView(const KernelOperator& op) : m_op(op) {}
    Eigen::Index rows() const { return m_op.rows(); }
    Eigen::Index cols() const { return m_op.cols(); }
    void perform_op(const double* x, double* y) const { m_op.perform_op(x, y); }

private:
    const KernelOperator& m_op;
};

// Run GenEigsSolver for `nev` eigenvalues of largest modulus from the all-ones start vector.
template <class Op>
void arnoldi(Op& view, Eigen::Index nev, Eigen::Index ncv, const EigenOptions& options,
             Eigen::VectorXcd& values, Eigen::VectorXd& lead_vector, std::size_t& iterations) {
    const Eigen::VectorXd start = Eigen::VectorXd::Ones(view.rows());  // deterministic
    Spectra::GenEigsSolver<Op> solver(view, nev, ncv);
    solver.init(start.data());
    solver.compute(Spectra::SortRule::LargestMagn, options.max_restarts, options.tolerance);
    iterations += static_cast<std::size_t>(solver.num_iterations());
    if (solver.info() != Spectra::CompInfo::Successful)
        throw EigenError(EigenError::Reason::not_converged, nan, nan,
                         "the Arnoldi iteration did not converge in " +
                             std::to_string(options.max_restarts) + " restarts");
    values = solver.eigenvalues();
    lead_vector = solver.eigenvectors(1).col(0).real();
}

EigenTriple krylov_route(const KernelOperator& op, const EigenOptions& options) {
    const Eigen::Index N = op.rows();
    Eigen::Index ncv = options.subspace > 0 ? options.subspace : std::min<Eigen::Index>(N, 24);
    ncv = std::clamp<Eigen::Index>(ncv, 4, N);

    // Scale of the operator, ‖A 1‖ / ‖1‖, to tell λ = 0 from rounding.
    const Eigen::VectorXd ones = Eigen::VectorXd::Ones(N);
    Eigen::VectorXd probe(N);
    op.apply(kernel::KernelPart::all, ones.data(), probe.data());
    const double scale = probe.norm() / ones.norm();
    if (!(scale > 0.0))
        throw EigenError(EigenError::Reason::not_positive, 0.0, 0.0,
                         "the kernel is zero: no positive dominant eigenvalue");

    EigenTriple t;
    t.method = EigenMethod::krylov;
    const std::size_t before = op.applications();
    Eigen::VectorXd right_vec, left_vec;
    try {
        // Right: nev = 2 so that |λ₂| is known and uniqueness can be checked.
        ForwardView forward(op);
        Eigen::VectorXcd values;
        arnoldi(forward, 2, ncv, options, values, right_vec, t.iterations);
        const double second = values.size() > 1 ? std::abs(values[1]) : 0.0;
        check_dominant(values[0], second, scale, options);
        t.lambda = values[0].real();
        t.second_modulus = second;

        // Left: the same eigenvalue of Aᵀ (simple and dominant by the check above).
        TransposedKernelOperator transposed(op);
        Eigen::VectorXcd lvalues;
        arnoldi(transposed, 1, ncv, options, lvalues, left_vec, t.iterations);
        if (std::abs(lvalues[0] - t.lambda) > 1e-8 * t.lambda)
            throw EigenError(EigenError::Reason::not_converged, t.lambda, t.second_modulus,
                             "the left iteration found " + number(std::abs(lvalues[0])) +
                                 " instead of λ = " + number(t.lambda));
    } catch (const EigenError&) {
        throw;
    } catch (const std::exception& e) {
        throw EigenError(EigenError::Reason::not_converged, nan, nan,
                         std::string("the Arnoldi iteration failed: ") + e.what());
    }
    t.applications = op.applications() - before;
    finish(t, op, right_vec, left_vec);
    // Arnoldi converges each Ritz pair to `tolerance`; a residual far above that means the
    // pair is not trustworthy (common practice: accept 1e-8 relative to λ).
    if (!(t.residual <= 1e-8 * t.lambda) || !(t.left_residual <= 1e-8 * t.lambda))
        throw EigenError(EigenError::Reason::not_converged, t.lambda, t.second_modulus,
                         "the eigenvector residual " + number(std::max(t.residual, t.left_residual)) +
                             " is too large");
    return t;
}

}  // namespace

EigenTriple dominant_eigen(const KernelOperator& op, const EigenOptions& options) {
    if (options.dense_threshold < 4)
        throw kernel::KernelError("eigen options", "dense_threshold", kernel::KernelError::npos,
                                  "must be at least 4 (Spectra needs nev + 2 <= ncv <= n)");
    if (op.rows() <= options.dense_threshold) return dense_route(op, options);
    return krylov_route(op, options);
}

EigenTriple dominant_eigen(const Eigen::MatrixXd& stage_matrix, const EigenOptions& options) {
    return dominant_eigen(KernelOperator::from_stage_matrix(stage_matrix), options);
}

}  // namespace safesite::analysis
