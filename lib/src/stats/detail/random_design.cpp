#include "stats/detail/random_design.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <string>

#include "safesite/error.hpp"

namespace safesite::stats::detail {

RandomDesign::RandomDesign(const std::vector<GroupingFactor>& groups, std::size_t rows,
                           bool correlated_slope)
    : m_rows(static_cast<int>(rows)) {
    if (groups.empty()) throw UsageError("a mixed model needs at least one grouping factor");
    // 1. Blocks, θ layout and per-row entry slots.
    for (std::size_t g = 0; g < groups.size(); ++g) {
        const GroupingFactor& f = groups[g];
        if (f.level.size() != rows)
            throw UsageError("grouping factor '" + f.name + "' has " +
                             std::to_string(f.level.size()) + " entries; the data have " +
                             std::to_string(rows) + " rows");
        if (f.level_names.empty())
            throw UsageError("grouping factor '" + f.name + "' has no levels");
        const int L = static_cast<int>(f.level_names.size());
        for (int lv : f.level)
            if (lv < 0 || lv >= L)
                throw UsageError("grouping factor '" + f.name + "': level index " +
                                 std::to_string(lv) + " outside 0.." + std::to_string(L - 1));
        if (f.has_slope()) {
            if (static_cast<std::size_t>(f.slope.size()) != rows)
                throw UsageError("random slope '" + f.slope_name + "' by '" + f.name +
                                 "' has " + std::to_string(f.slope.size()) +
                                 " values; the data have " + std::to_string(rows) + " rows");
            if (!f.slope.allFinite())
                throw UsageError("random slope '" + f.slope_name + "' has missing or non-finite values");
        }
        RandomBlock b;
        b.group = static_cast<int>(g);
        b.first_col = m_q;
        b.levels = L;
        b.width = f.has_slope() ? 2 : 1;
        b.theta_first = static_cast<int>(m_lower.size());
        b.theta_count = f.has_slope() ? (correlated_slope ? 3 : 2) : 1;
        m_q += L * b.width;
        const double inf = std::numeric_limits<double>::infinity();
        if (b.theta_count == 1) {
            m_diagonal.push_back(b.theta_first);
            m_lower.push_back(0.0);
        } else if (b.theta_count == 2) {
            m_diagonal.push_back(b.theta_first);
            m_diagonal.push_back(b.theta_first + 1);
            m_lower.insert(m_lower.end(), {0.0, 0.0});
        } else {  // (l11, l21, l22)
            m_diagonal.push_back(b.theta_first);
            m_diagonal.push_back(b.theta_first + 2);
            m_lower.insert(m_lower.end(), {0.0, -inf, 0.0});
        }
        for (int r = 0; r < b.width; ++r) {
            m_entry_block.push_back(static_cast<int>(m_blocks.size()));
            m_entry_role.push_back(r);
        }
        m_blocks.push_back(b);
    }
    m_per_row = static_cast<int>(m_entry_block.size());
    const int m = m_per_row;
    m_cols.resize(rows * m);
    m_z.resize(rows * m);
    m_zl.assign(rows * m, 0.0);
    for (std::size_t i = 0; i < rows; ++i) {
        for (int a = 0; a < m; ++a) {
            const RandomBlock& b = m_blocks[m_entry_block[a]];
            const GroupingFactor& f = groups[b.group];
            const int lv = f.level[i];
            const int role = m_entry_role[a];
            m_cols[i * m + a] = b.first_col + lv * b.width + role;
            m_z[i * m + a] = role == 0 ? 1.0 : f.slope[static_cast<Eigen::Index>(i)];
        }
    }
    // 2. Pattern of the lower triangle of A: every pair of entries within a row, plus the
    //    whole diagonal (the +I term), plus the full 2×2 block of each level with a slope so
    //    that the pattern does not depend on θ.
    std::vector<Eigen::Triplet<double>> trip;
    trip.reserve(rows * m * (m + 1) / 2 + m_q);
    for (std::size_t i = 0; i < rows; ++i)
        for (int a = 0; a < m; ++a)
            for (int c = 0; c <= a; ++c) {
                const int r1 = m_cols[i * m + a], r2 = m_cols[i * m + c];
                trip.emplace_back(std::max(r1, r2), std::min(r1, r2), 1.0);
            }
    for (int j = 0; j < m_q; ++j) trip.emplace_back(j, j, 1.0);
    for (const RandomBlock& b : m_blocks)
        if (b.width == 2)
            for (int lv = 0; lv < b.levels; ++lv)
                trip.emplace_back(b.first_col + 2 * lv + 1, b.first_col + 2 * lv, 1.0);
    m_A.resize(m_q, m_q);
    m_A.setFromTriplets(trip.begin(), trip.end());
    m_A.makeCompressed();
    auto position = [&](int row, int col) {
        const int* inner = m_A.innerIndexPtr();
        const int begin = m_A.outerIndexPtr()[col], end = m_A.outerIndexPtr()[col + 1];
        const int* it = std::lower_bound(inner + begin, inner + end, row);
        return static_cast<int>(it - inner);
    };
    const int pairs = m * (m + 1) / 2;
    m_pos.resize(rows * pairs);
    for (std::size_t i = 0; i < rows; ++i) {
        int k = 0;
        for (int a = 0; a < m; ++a)
            for (int c = 0; c <= a; ++c, ++k) {
                const int r1 = m_cols[i * m + a], r2 = m_cols[i * m + c];
                m_pos[i * pairs + k] = position(std::max(r1, r2), std::min(r1, r2));
            }
    }
    m_diag_pos.resize(m_q);
    for (int j = 0; j < m_q; ++j) m_diag_pos[j] = position(j, j);
    m_chol.analyzePattern(m_A);
    m_theta = Eigen::Map<const Eigen::VectorXd>(theta_start().data(), n_theta());
    set_theta(m_theta);
}

std::vector<double> RandomDesign::theta_start() const {
    std::vector<double> t(m_lower.size(), 0.0);
    for (int d : m_diagonal) t[d] = 1.0;
    return t;
}

void RandomDesign::set_theta(const Eigen::VectorXd& theta) {
    m_theta = theta;
    const int m = m_per_row;
    for (int a = 0; a < m; ++a) {
        const RandomBlock& b = m_blocks[m_entry_block[a]];
        const int role = m_entry_role[a];
        const double* t = theta.data() + b.theta_first;
        // Row of ZΛ: z'Λ_j with z = (1, x) and Λ_j = [[l11, 0], [l21, l22]]:
        //   intercept slot: l11 + x·l21;  slope slot: x·l22.
        if (b.theta_count == 1) {
            for (int i = 0; i < m_rows; ++i) m_zl[i * m + a] = t[0];
        } else if (role == 0) {
            const double l21 = b.theta_count == 3 ? t[1] : 0.0;
            const int slope_slot = a + 1;
            for (int i = 0; i < m_rows; ++i) m_zl[i * m + a] = t[0] + m_z[i * m + slope_slot] * l21;
        } else {
            const double l22 = t[b.theta_count - 1];
            for (int i = 0; i < m_rows; ++i) m_zl[i * m + a] = m_z[i * m + a] * l22;
        }
    }
}

Eigen::MatrixXd RandomDesign::lambda_block(int k) const {
    const RandomBlock& b = m_blocks[k];
    const double* t = m_theta.data() + b.theta_first;
    Eigen::MatrixXd L = Eigen::MatrixXd::Zero(b.width, b.width);
    if (b.theta_count == 1) {
        L(0, 0) = t[0];
    } else {
        L(0, 0) = t[0];
        L(1, 0) = b.theta_count == 3 ? t[1] : 0.0;
        L(1, 1) = t[b.theta_count - 1];
    }
    return L;
}

bool RandomDesign::factorize(const Eigen::VectorXd& w) {
    double* val = m_A.valuePtr();
    std::fill(val, val + m_A.nonZeros(), 0.0);
    const int m = m_per_row;
    const int pairs = m * (m + 1) / 2;
    for (int i = 0; i < m_rows; ++i) {
        const double wi = w[i];
        if (wi == 0.0) continue;
        const double* v = m_zl.data() + static_cast<std::size_t>(i) * m;
        const int* pos = m_pos.data() + static_cast<std::size_t>(i) * pairs;
        int k = 0;
        for (int a = 0; a < m; ++a) {
            const double wva = wi * v[a];
            for (int c = 0; c <= a; ++c, ++k) val[pos[k]] += wva * v[c];
        }
    }
    for (int j = 0; j < m_q; ++j) val[m_diag_pos[j]] += 1.0;
    m_chol.factorize(m_A);
    if (m_chol.info() != Eigen::Success) return false;
    return (m_chol.vectorD().array() > 0.0).all();
}

double RandomDesign::log_det() const { return m_chol.vectorD().array().log().sum(); }

Eigen::MatrixXd RandomDesign::solve(const Eigen::MatrixXd& rhs) const { return m_chol.solve(rhs); }

Eigen::VectorXd RandomDesign::solve(const Eigen::VectorXd& rhs) const { return m_chol.solve(rhs); }

Eigen::VectorXd RandomDesign::times(const Eigen::VectorXd& u) const {
    Eigen::VectorXd out(m_rows);
    const int m = m_per_row;
    for (int i = 0; i < m_rows; ++i) {
        double s = 0.0;
        for (int a = 0; a < m; ++a) s += m_zl[i * m + a] * u[m_cols[i * m + a]];
        out[i] = s;
    }
    return out;
}

Eigen::VectorXd RandomDesign::times_t(const Eigen::VectorXd& w, const Eigen::VectorXd& r) const {
    Eigen::VectorXd out = Eigen::VectorXd::Zero(m_q);
    const int m = m_per_row;
    for (int i = 0; i < m_rows; ++i) {
        const double wr = w[i] * r[i];
        for (int a = 0; a < m; ++a) out[m_cols[i * m + a]] += m_zl[i * m + a] * wr;
    }
    return out;
}

Eigen::MatrixXd RandomDesign::times_t(const Eigen::VectorXd& w, const Eigen::MatrixXd& R) const {
    const Eigen::Index p = R.cols();
    // Accumulate transposed (p × q) so each row update touches contiguous memory.
    Eigen::MatrixXd outT = Eigen::MatrixXd::Zero(p, m_q);
    const int m = m_per_row;
    for (int i = 0; i < m_rows; ++i) {
        if (w[i] == 0.0) continue;
        for (int a = 0; a < m; ++a) {
            const double s = m_zl[i * m + a] * w[i];
            outT.col(m_cols[i * m + a]) += s * R.row(i).transpose();
        }
    }
    return outT.transpose();
}

Eigen::VectorXd RandomDesign::lambda_times(const Eigen::VectorXd& u) const {
    Eigen::VectorXd b(m_q);
    for (std::size_t k = 0; k < m_blocks.size(); ++k) {
        const RandomBlock& bl = m_blocks[k];
        const Eigen::MatrixXd L = lambda_block(static_cast<int>(k));
        for (int lv = 0; lv < bl.levels; ++lv) {
            const int c = bl.first_col + lv * bl.width;
            b.segment(c, bl.width) = L * u.segment(c, bl.width);
        }
    }
    return b;
}

Eigen::VectorXd RandomDesign::inverse_entries(const std::vector<std::pair<int, int>>& pairs) const {
    const auto& L = m_chol.matrixL().nestedExpression();  // strictly lower part, unit diagonal
    const Eigen::VectorXd& D = m_chol.vectorD();
    const auto& perm = m_chol.permutationP().indices();
    // Parent of each node in the elimination tree: the smallest row index of its column.
    std::vector<int> parent(m_q, -1);
    for (int k = 0; k < m_q; ++k)
        for (Eigen::SparseMatrix<double>::InnerIterator it(L, k); it; ++it)
            if (it.row() > k && (parent[k] < 0 || it.row() < parent[k])) parent[k] = static_cast<int>(it.row());
    std::vector<double> za(m_q, 0.0), zb(m_q, 0.0);
    std::vector<int> path;
    // Forward solve L z = e_j along the path j → root; returns the path in `path`.
    auto path_solve = [&](int j, std::vector<double>& z) {
        path.clear();
        z[j] = 1.0;
        for (int k = j; k >= 0; k = parent[k]) {
            path.push_back(k);
            const double zk = z[k];
            if (zk == 0.0) continue;
            for (Eigen::SparseMatrix<double>::InnerIterator it(L, k); it; ++it)
                if (it.row() > k) z[it.row()] -= it.value() * zk;
        }
    };
    Eigen::VectorXd out(static_cast<Eigen::Index>(pairs.size()));
    std::vector<int> path_a;
    for (std::size_t i = 0; i < pairs.size(); ++i) {
        const int a = perm[pairs[i].first], b = perm[pairs[i].second];
        path_solve(a, za);
        path_a = path;
        double s = 0.0;
        if (a == b) {
            for (int k : path_a) s += za[k] * za[k] / D[k];
        } else {
            path_solve(b, zb);
            for (int k : path_a) s += za[k] * zb[k] / D[k];
            for (int k : path) zb[k] = 0.0;
        }
        for (int k : path_a) za[k] = 0.0;
        out[static_cast<Eigen::Index>(i)] = s;
    }
    return out;
}

}  // namespace safesite::stats::detail
