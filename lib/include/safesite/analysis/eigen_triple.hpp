#pragma once
/// \file eigen_triple.hpp
/// Dominant eigen-triple (λ, w, v) of a discretised kernel or a stage matrix.

#include <cstddef>

#include <Eigen/Core>

#include "safesite/kernel/kernel_operator.hpp"

namespace safesite::analysis {

/// Which route computed the triple.
enum class EigenMethod {
    dense,    ///< Eigen's EigenSolver on the assembled matrix (small state spaces)
    krylov,   ///< Spectra GenEigsSolver (implicitly restarted Arnoldi) on the operator
};

/// Controls of dominant_eigen().
struct EigenOptions {
    /// State dimensions N ≤ this use the dense route (Spectra needs nev ≤ N − 2, ncv ≤ N;
    /// below ~100 states the dense route is also as fast). ≥ 4.
    Eigen::Index dense_threshold = 100;
    /// Krylov subspace size ncv (clamped to [4, N]); 0 means min(N, 24).
    Eigen::Index subspace = 0;
    /// Restart limit of the Arnoldi iteration.
    Eigen::Index max_restarts = 1000;
    /// Relative convergence tolerance of each Ritz value (Spectra's `tol`).
    double tolerance = 1e-13;
    /// λ must exceed |λ₂| by this relative gap: |λ₂| < λ (1 − gap), else not unique.
    double uniqueness_gap = 1e-8;
};

/// The dominant eigen-triple of A (see KernelOperator for the state layout):
/// \f$ A w = \lambda w \f$, \f$ v^\top \Omega A = \lambda v^\top \Omega \f$ with
/// \f$\Omega = \mathrm{diag}(\omega)\f$ the state weights. Normalisation (Ellner, Childs &
/// Rees 2016, ch. 2): \f$ \sum_i \omega_i w_i = 1 \f$ (w is a density over classes and a
/// number per stage: the stable structure) and \f$ \langle v, w\rangle = \sum_i \omega_i
/// v_i w_i = 1 \f$ (v is the reproductive value per individual). For a plain stage matrix
/// ω = 1 and these are the usual sum-to-one w and v·w = 1 (Caswell 2001, ch. 4).
struct EigenTriple {
    double lambda = 0.0;          ///< dominant eigenvalue λ > 0 (per year)
    Eigen::VectorXd w;            ///< stable structure, ≥ 0, Σ ω w = 1
    Eigen::VectorXd v;            ///< reproductive value, ≥ 0, Σ ω v w = 1
    Eigen::VectorXd weights;      ///< ω: mesh weights for class entries, 1 for stages
    double second_modulus = 0.0;  ///< |λ₂| (damping ratio λ/|λ₂|)
    double residual = 0.0;        ///< ‖A w − λ w‖₂ / ‖w‖₂
    double left_residual = 0.0;   ///< ‖Aᵀ u − λ u‖₂ / ‖u‖₂ with u = ω ∘ v
    std::size_t iterations = 0;   ///< Arnoldi restarts, right + left (0 for dense)
    std::size_t applications = 0; ///< operator applications, right + left (0 for dense)
    EigenMethod method = EigenMethod::dense;
};

/// λ, w, v of the kernel operator. Uses EigenSolver on to_dense() when rows() ≤
/// `dense_threshold`, otherwise Spectra's GenEigsSolver on the operator (nev = 2, to check
/// uniqueness) and on its transpose (nev = 1), both started from the all-ones vector.
///
/// Throws EigenError (a NumericalError) when λ is not real and positive, when |λ₂| ≥ λ(1 − gap)
/// (imprimitive or reducible with ties), when ⟨v, w⟩ vanishes, or when the iteration fails.
EigenTriple dominant_eigen(const kernel::KernelOperator& op, const EigenOptions& options = {});

/// λ, w, v of a plain non-negative stage matrix (KernelOperator::from_stage_matrix).
EigenTriple dominant_eigen(const Eigen::MatrixXd& stage_matrix, const EigenOptions& options = {});

}  // namespace safesite::analysis
