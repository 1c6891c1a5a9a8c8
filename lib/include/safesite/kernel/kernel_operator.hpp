#pragma once
/// \file kernel_operator.hpp
/// The discretised kernel as a matrix-free operator (Spectra's operator concept).

#include <cstddef>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "safesite/kernel/kernel_description.hpp"
#include "safesite/kernel/mesh.hpp"

namespace safesite::kernel {

/// Which part of the kernel to assemble or apply (life-history analysis needs P and F apart).
enum class KernelPart {
    all,                ///< K = P + F
    survival_growth,    ///< P: class survival–growth, stage→stage, stage→class, class→stage
    reproduction,       ///< F: new individuals from seeds (fresh recruitment and seed input σ)
};

/// The discretised kernel A on the state vector x = (x_0, …, x_{B−1}, x_B, …, x_{B+D−1}):
/// B blocks of n density values \f$x_k(z_i)\f$ (class k, mesh node i) followed by D discrete
/// stage numbers. \f$A_{(k',i),(k,j)} = K((k',z_i),(k,z_j))\,w_j\f$ with the quadrature
/// weights \f$w_j\f$ of the mesh (1 for discrete stages), so that
/// \f$ n(t+1) = A\, n(t) \f$ approximates \f$ n(z', t+1) = \int K(z', z) n(z, t) dz \f$.
///
/// Cost of one application (perform_op or perform_transposed_op): \f$B n^2\f$ multiply-adds for
/// the survival–growth blocks plus \f$O(B n + M n + D^2)\f$ for fecundity, which is rank one
/// over all classes because the recruit part does not depend on the parent class
/// (Ellner & Rees 2006). The dense matrix is formed only by to_dense().
///
/// Construction evaluates every vital rate at the mesh nodes and throws KernelError naming the
/// block (class, microsite, stage) and parameter when a value is negative, non-finite, or a
/// probability outside [0, 1], or when indices are inconsistent.
///
/// Meets Spectra's operator concept: `Scalar`, `rows()`, `cols()`, `perform_op(x, y)`.
/// The application counter is not synchronised: use one operator per thread.
class KernelOperator {
public:
    using Scalar = double;

    KernelOperator(const Mesh& mesh, const KernelDescription& description);

    /// A plain D×D stage matrix (no continuous part): entries must be finite and ≥ 0.
    /// Throws KernelError (block "stage matrix") otherwise, or if it is not square or empty.
    static KernelOperator from_stage_matrix(const Eigen::MatrixXd& matrix);

    /// State dimension B·n + D.
    Eigen::Index rows() const noexcept { return m_dim; }
    Eigen::Index cols() const noexcept { return m_dim; }

    /// y = A x (x, y of length rows(); must not alias). Counts one application.
    void perform_op(const double* x, double* y) const;
    /// y = Aᵀ x. Counts one application.
    void perform_transposed_op(const double* x, double* y) const;
    /// y = A_part x for one part of the kernel (not counted).
    void apply(KernelPart part, const double* x, double* y) const;
    /// y = A_partᵀ x (not counted).
    void apply_transposed(KernelPart part, const double* x, double* y) const;

    /// Number of perform_op / perform_transposed_op calls since construction or reset.
    std::size_t applications() const noexcept { return m_applications; }
    void reset_applications() const noexcept { m_applications = 0; }

    /// The dense matrix A (or one part of it), (B·n + D)².
    Eigen::MatrixXd to_dense(KernelPart part = KernelPart::all) const;
    /// One block of A: rows of group `to`, columns of group `from` (groups: classes 0..B−1,
    /// then stages B..B+D−1).
    Eigen::MatrixXd block(std::size_t to, std::size_t from, KernelPart part = KernelPart::all) const;

    // --- layout --------------------------------------------------------------------------
    const Mesh& mesh() const noexcept { return m_mesh; }
    std::size_t mesh_size() const noexcept { return m_n; }
    std::size_t class_count() const noexcept { return m_next.size(); }
    std::size_t stage_count() const noexcept { return m_stage_names.size(); }
    std::size_t microsite_count() const noexcept { return m_arrival.size(); }
    /// Classes then stages.
    std::size_t group_count() const noexcept { return class_count() + stage_count(); }
    Eigen::Index group_offset(std::size_t group) const;
    Eigen::Index group_size(std::size_t group) const;
    /// "class 1 (established, litter)" / "stage 0 (seed bank)".
    std::string group_name(std::size_t group) const;
    /// Weights of the state entries: mesh weights for class entries, 1 for stages. The
    /// inner product of two states is \f$\langle u, x\rangle = \sum_i u_i \omega_i x_i\f$.
    const Eigen::VectorXd& state_weights() const noexcept { return m_state_weights; }

    // --- eviction ------------------------------------------------------------------------
    EvictionPolicy eviction_policy() const noexcept { return m_eviction; }
    /// Growth mass of class k falling outside [L, U] per parent node z_j (before survival):
    /// exact normal tails for Gaussian growth, \f$1 - \sum_i w_i g(z_i|z_j)\f$ for a general
    /// density (may be slightly negative from quadrature error).
    const Eigen::VectorXd& evicted_growth(std::size_t k) const { return m_evicted_growth.at(k); }
    /// Recruit-size mass of microsite m outside [L, U].
    double evicted_recruits(std::size_t m) const { return m_evicted_recruits.at(m); }

    // --- recruitment pieces (for derivatives with respect to a and e) ----------------------
    double arrival(std::size_t m) const { return m_arrival.at(m); }
    double establishment(std::size_t m) const { return m_establishment.at(m); }
    std::size_t entry_class(std::size_t m) const { return m_entry.at(m); }
    /// Recruit size density of microsite m at the nodes, after the eviction policy.
    const Eigen::VectorXd& recruit_density(std::size_t m) const { return m_recruit_shape.at(m); }
    /// Seed-equivalents taking the recruitment route from state x:
    /// \f$R(x) = \varphi \sum_k \sum_j w_j p_k(z_j) b_k(z_j) x_k(z_j) + \sum_d r_d x_d\f$.
    double recruitment_input(const double* x) const;

    // --- reproduction as a rank-one product, F = u sᵀ (life-history analysis) -------------
    /// u: offspring at t+1 per seed produced at t — \f$\varphi a_m e_m c_m(z_i)\f$ in the entry
    /// class of each microsite, σ_d in stage d.
    Eigen::VectorXd offspring_per_seed() const;
    /// s: seeds produced per unit of state — \f$p_k(z_j) b_k(z_j) w_j\f$ for class entries,
    /// 0 for stages.
    Eigen::VectorXd seeds_per_individual() const;

private:
    KernelOperator() = default;
    void apply_impl(KernelPart part, const double* x, double* y) const;
    void apply_transposed_impl(KernelPart part, const double* x, double* y) const;

    struct Flow {            // stage d → class k with size density (eviction applied)
        std::size_t stage;
        std::size_t target;
        double rate;
        Eigen::VectorXd shape;
    };
    struct Inflow {          // class k → stage d, rate(z_j) w_j
        std::size_t stage;
        std::size_t source;
        Eigen::VectorXd weighted_rate;
    };

    Mesh m_mesh{0.0, 1.0, 2};
    std::size_t m_n = 0;
    Eigen::Index m_dim = 0;
    Eigen::Index m_stage_offset = 0;
    EvictionPolicy m_eviction = EvictionPolicy::boundary;
    Eigen::VectorXd m_state_weights;

    std::vector<Eigen::MatrixXd> m_P;          // per class: s_j g(z_i|z_j) w_j, eviction applied
    std::vector<std::size_t> m_next;
    std::vector<std::string> m_class_names;
    std::vector<Eigen::VectorXd> m_seeds;      // per class: p_j b_j w_j
    std::vector<Eigen::VectorXd> m_evicted_growth;

    std::vector<double> m_arrival;
    std::vector<double> m_establishment;
    std::vector<std::size_t> m_entry;
    std::vector<Eigen::VectorXd> m_recruit_shape;  // c(z_i) after eviction
    std::vector<double> m_evicted_recruits;
    double m_fresh = 1.0;

    std::vector<std::string> m_stage_names;
    Eigen::MatrixXd m_T;                       // D×D
    Eigen::VectorXd m_seed_input;              // σ_d
    Eigen::VectorXd m_stage_recruitment;       // r_d
    std::vector<Flow> m_flows;
    std::vector<Inflow> m_inflows;

    mutable std::size_t m_applications = 0;
};

/// Aᵀ as a Spectra operator (for the reproductive value v). Holds a reference: the
/// KernelOperator must outlive it.
class TransposedKernelOperator {
public:
    using Scalar = double;
    explicit TransposedKernelOperator(const KernelOperator& op) : m_op(op) {}
    Eigen::Index rows() const noexcept { return m_op.rows(); }
    Eigen::Index cols() const noexcept { return m_op.cols(); }
    void perform_op(const double* x, double* y) const { m_op.perform_transposed_op(x, y); }

private:
    const KernelOperator& m_op;
};

}  // namespace safesite::kernel
