#pragma once
/// \file random_design.hpp
/// (private) The random-effects part of a mixed model: the sparse design Z, the relative
/// covariance factor Λθ, and the sparse Cholesky factorisation of A = Λ'Z'WZΛ + I.
///
/// Notation follows Bates et al. (2015) [Bates2015], section 3: b = Λθ u with u ~ N(0, I)
/// (scaled by σ² in the Gaussian case), so the penalised system never needs Σ⁻¹ and stays
/// well defined when a variance component is zero.

#include <cstddef>
#include <utility>
#include <vector>

#include <Eigen/Core>
#include <Eigen/SparseCore>
#include <Eigen/SparseCholesky>

#include "safesite/stats/grouping_factor.hpp"

namespace safesite::stats::detail {

/// One grouping factor's block of random-effect columns.
struct RandomBlock {
    int group = 0;        ///< index into the grouping factors
    int first_col = 0;    ///< first column of the block in Z (and in u, b)
    int levels = 0;       ///< number of levels L
    int width = 1;        ///< random terms per level: 1 (intercept) or 2 (intercept, slope)
    int theta_first = 0;  ///< first element of θ for this block
    int theta_count = 1;  ///< 1 (intercept), 2 (independent slope) or 3 (correlated slope)
};

class RandomDesign {
public:
    /// Builds Z and the fixed sparsity pattern of A. Columns of a block with a slope are
    /// interleaved per level: (intercept_j, slope_j). Throws UsageError on inconsistent input.
    RandomDesign(const std::vector<GroupingFactor>& groups, std::size_t rows,
                 bool correlated_slope);

    int rows() const noexcept { return m_rows; }
    int q() const noexcept { return m_q; }
    int n_theta() const noexcept { return static_cast<int>(m_lower.size()); }
    const std::vector<double>& theta_lower() const noexcept { return m_lower; }
    /// Start value: 1 on the diagonal of each Λ block, 0 off it.
    std::vector<double> theta_start() const;
    /// Indices of θ that are on a diagonal of Λ (bounded below by 0).
    const std::vector<int>& diagonal_theta() const noexcept { return m_diagonal; }
    const std::vector<RandomBlock>& blocks() const noexcept { return m_blocks; }

    /// Sets θ and recomputes the entries of ZΛ (same pattern as Z).
    void set_theta(const Eigen::VectorXd& theta);
    const Eigen::VectorXd& theta() const noexcept { return m_theta; }
    /// The width×width lower-triangular factor Λ_k of block k at the current θ.
    Eigen::MatrixXd lambda_block(int k) const;

    /// A = Λ'Z'WZΛ + I with the given row weights; factorises it. False if not positive
    /// definite (cannot happen in exact arithmetic for w ≥ 0).
    bool factorize(const Eigen::VectorXd& w);
    /// log|A| of the last factorisation.
    double log_det() const;
    Eigen::MatrixXd solve(const Eigen::MatrixXd& rhs) const;
    Eigen::VectorXd solve(const Eigen::VectorXd& rhs) const;

    /// ZΛu (length n).
    Eigen::VectorXd times(const Eigen::VectorXd& u) const;
    /// Λ'Z' diag(w) r (length q).
    Eigen::VectorXd times_t(const Eigen::VectorXd& w, const Eigen::VectorXd& r) const;
    /// Λ'Z' diag(w) R (q × p).
    Eigen::MatrixXd times_t(const Eigen::VectorXd& w, const Eigen::MatrixXd& R) const;
    /// b = Λu (length q).
    Eigen::VectorXd lambda_times(const Eigen::VectorXd& u) const;
    /// Entries (A⁻¹)_{ab} for the listed index pairs, from the last factorisation.
    /// With P A P' = L D L', (A⁻¹)_{ab} = Σ_k z_k^a z_k^b / D_k where z^a = L⁻¹ P e_a; z^a is
    /// non-zero only on the path from P·a to the root of the elimination tree, so each entry
    /// costs the product of two path lengths, not a full solve (common practice).
    Eigen::VectorXd inverse_entries(const std::vector<std::pair<int, int>>& pairs) const;

private:
    int m_rows = 0;
    int m_q = 0;
    int m_per_row = 0;               // entries of Z per row
    std::vector<RandomBlock> m_blocks;
    std::vector<double> m_lower;     // lower bounds of θ
    std::vector<int> m_diagonal;
    std::vector<int> m_cols;         // n × m_per_row column indices
    std::vector<double> m_z;         // n × m_per_row raw Z values (1 or x)
    std::vector<int> m_entry_block;  // block of each entry slot (length m_per_row)
    std::vector<int> m_entry_role;   // 0 intercept, 1 slope
    std::vector<double> m_zl;        // n × m_per_row values of ZΛ
    std::vector<int> m_pos;          // n × m(m+1)/2 positions in A's value array
    std::vector<int> m_diag_pos;     // q positions of A's diagonal
    Eigen::VectorXd m_theta;
    Eigen::SparseMatrix<double> m_A;  // lower triangle
    Eigen::SimplicialLDLT<Eigen::SparseMatrix<double>, Eigen::Lower> m_chol;
};

}  // namespace safesite::stats::detail
