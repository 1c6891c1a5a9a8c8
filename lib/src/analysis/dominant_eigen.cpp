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
#include <functional>
#include <vector>
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
#include "core/number_text.hpp"
#include "safesite/analysis/eigen_triple.hpp"
#include "safesite/kernel/kernel_error.hpp"

namespace safesite::analysis {

namespace {

using kernel::KernelOperator;
using kernel::TransposedKernelOperator;

std::string number(double x) { return core::number_text(x, 10); }

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
// Returns false (instead of throwing) when it does not converge, so that the caller can fall
// back to the unrestarted iteration below.
template <class Op>
bool spectra_leading(Op& view, Eigen::Index nev, Eigen::Index ncv, const EigenOptions& options,
                     Eigen::VectorXcd& values, Eigen::VectorXcd& lead_vector,
                     std::size_t& iterations) {
    const Eigen::VectorXd start = Eigen::VectorXd::Ones(view.rows());  // deterministic
    try {
        Spectra::GenEigsSolver<Op> solver(view, nev, ncv);
        solver.init(start.data());
        solver.compute(Spectra::SortRule::LargestMagn, options.max_restarts, options.tolerance);
        iterations += static_cast<std::size_t>(solver.num_iterations());
        if (solver.info() != Spectra::CompInfo::Successful) return false;
        values = solver.eigenvalues();
        lead_vector = solver.eigenvectors(1).col(0);
        return values.size() > 0;
    } catch (const std::exception&) {
        return false;  // Spectra's own failures (e.g. a factorisation it cannot continue)
    }
}

using Apply = std::function<void(const double*, double*)>;

// Relative residual ‖A x − μ x‖ / (|μ| ‖x‖) of a (possibly complex) Ritz pair.
double ritz_residual(const Apply& apply, std::complex<double> mu, const Eigen::VectorXcd& x) {
    const Eigen::Index N = x.size();
    const Eigen::VectorXd re = x.real(), im = x.imag();
    Eigen::VectorXd are(N), aim(N);
    apply(re.data(), are.data());
    apply(im.data(), aim.data());
    Eigen::VectorXcd ax(N);
    ax.real() = are;
    ax.imag() = aim;
    const double scale = std::abs(mu) * x.norm();
    return scale > 0.0 ? (ax - mu * x).norm() / scale : std::numeric_limits<double>::infinity();
}

// Fallback: unrestarted Arnoldi with full (twice-repeated) Gram–Schmidt from the all-ones
// vector, stopping at a relative breakdown (an invariant subspace: its Ritz values are exact
// eigenvalues) or when the dominant Ritz pair's residual estimate |h_{m+1,m} y_m| is below the
// tolerance. Used only when Spectra's answer fails the residual check: Spectra 1.0.1 detects
// breakdown with an absolute threshold (eps·√n) and can return spurious Ritz values for
// kernels of low numerical rank (e.g. separable growth), which this handles exactly.
// Saad (2011) Numerical Methods for Large Eigenvalue Problems, 2nd ed., §6.3 (from memory).
void fallback_arnoldi(const Apply& apply, Eigen::Index N, const EigenOptions& options,
                      Eigen::VectorXcd& values, Eigen::VectorXcd& lead_vector,
                      std::size_t& iterations) {
    const Eigen::Index max_dim = std::min<Eigen::Index>(N, 400);
    Eigen::MatrixXd V(N, max_dim + 1);
    Eigen::MatrixXd H = Eigen::MatrixXd::Zero(max_dim + 1, max_dim);
    V.col(0) = Eigen::VectorXd::Ones(N) / std::sqrt(static_cast<double>(N));
    Eigen::VectorXd w(N);
    for (Eigen::Index k = 0; k < max_dim; ++k) {
        apply(V.col(k).data(), w.data());
        const double wnorm = w.norm();
        for (int pass = 0; pass < 2; ++pass) {
            const Eigen::VectorXd h = V.leftCols(k + 1).transpose() * w;
            w.noalias() -= V.leftCols(k + 1) * h;
            H.col(k).head(k + 1) += h;
        }
        const double beta = w.norm();
        H(k + 1, k) = beta;
        const Eigen::Index m = k + 1;
        const bool breakdown = !(beta > 1e-12 * wnorm) || wnorm == 0.0;
        if (breakdown || m % 8 == 0 || m == max_dim) {
            Eigen::EigenSolver<Eigen::MatrixXd> es(H.topLeftCorner(m, m), true);
            const Eigen::VectorXcd ritz = es.eigenvalues();
            std::vector<Eigen::Index> order(static_cast<std::size_t>(m));
            for (Eigen::Index i = 0; i < m; ++i) order[static_cast<std::size_t>(i)] = i;
            std::sort(order.begin(), order.end(), [&](Eigen::Index a, Eigen::Index b) {
                return std::abs(ritz[a]) > std::abs(ritz[b]);
            });
            const Eigen::VectorXcd y = es.eigenvectors().col(order[0]);
            const double estimate = beta * std::abs(y[m - 1]) / y.norm();
            if (breakdown || estimate <= options.tolerance * std::abs(ritz[order[0]])) {
                values.resize(std::min<Eigen::Index>(m, 2));
                for (Eigen::Index i = 0; i < values.size(); ++i)
                    values[i] = ritz[order[static_cast<std::size_t>(i)]];
                lead_vector = V.leftCols(m).cast<std::complex<double>>() * y;
                iterations += 1;
                return;
            }
        }
        if (breakdown) break;
        V.col(k + 1) = w / beta;
    }
    throw EigenError(EigenError::Reason::not_converged, nan, nan,
                     "the Arnoldi iteration did not converge (Krylov dimension " +
                         std::to_string(max_dim) + ")");
}

// The leading eigenvalues (values[0] dominant, values[1] next when available) and the lead
// eigenvector of an operator: Spectra first, checked by its residual, the fallback otherwise.
template <class Op>
void leading(Op& view, const Apply& apply, Eigen::Index nev, Eigen::Index ncv,
             const EigenOptions& options, Eigen::VectorXcd& values, Eigen::VectorXd& vector,
             std::size_t& iterations) {
    Eigen::VectorXcd vec;
    const bool ok = spectra_leading(view, nev, ncv, options, values, vec, iterations) &&
                    ritz_residual(apply, values[0], vec) <= 1e-8;
    if (!ok) fallback_arnoldi(apply, view.rows(), options, values, vec, iterations);
    // Real eigenvector of a real eigenvalue: rotate out the arbitrary complex phase.
    Eigen::Index big = 0;
    vec.cwiseAbs().maxCoeff(&big);
    const std::complex<double> phase = vec[big] / std::abs(vec[big]);
    vector = (vec / phase).real();
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
    {
        // Right: nev = 2 so that |λ₂| is known and uniqueness can be checked.
        ForwardView forward(op);
        const Apply apply = [&op](const double* x, double* y) { op.perform_op(x, y); };
        Eigen::VectorXcd values;
        leading(forward, apply, 2, ncv, options, values, right_vec, t.iterations);
        const double second = values.size() > 1 ? std::abs(values[1]) : 0.0;
        check_dominant(values[0], second, scale, options);
        t.lambda = values[0].real();
        t.second_modulus = second;
    }
    {
        // Left: the same eigenvalue of Aᵀ (simple and dominant by the check above).
        TransposedKernelOperator transposed(op);
        const Apply apply = [&op](const double* x, double* y) {
            op.perform_transposed_op(x, y);
        };
        Eigen::VectorXcd lvalues;
        leading(transposed, apply, 1, ncv, options, lvalues, left_vec, t.iterations);
        if (std::abs(lvalues[0] - t.lambda) > 1e-8 * t.lambda)
            throw EigenError(EigenError::Reason::not_converged, t.lambda, t.second_modulus,
                             "the left iteration found " + number(std::abs(lvalues[0])) +
                                 " instead of lambda = " + number(t.lambda));
    }
    t.applications = op.applications() - before;
    finish(t, op, right_vec, left_vec);
    // Each Ritz pair was checked above; a residual far above the tolerance here means the
    // normalised Perron vectors are not trustworthy (common practice: 1e-8 relative to λ).
    if (!(t.residual <= 1e-8 * t.lambda) || !(t.left_residual <= 1e-8 * t.lambda))
        throw EigenError(EigenError::Reason::not_converged, t.lambda, t.second_modulus,
                         "the eigenvector residual " +
                             number(std::max(t.residual, t.left_residual)) + " is too large");
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
