// Class graph, strongly connected components and the λ of the self-renewing part.
//
// References: Tarjan (1972) for the components; Caswell (2001) §4.5 for reducible matrices
// (the spectrum of a reducible matrix is the union of the spectra of its irreducible diagonal
// blocks in the normal form); Stott, Townley, Carslake & Hodgson (2010) for the consequences
// in population models (classes that cannot be reached, or cannot reach, reproduction).
#include "safesite/analysis/reducibility.hpp"

#include <algorithm>
#include <cmath>
#include <functional>
#include <limits>
#include <stdexcept>

#include <Eigen/Eigenvalues>

#include "safesite/analysis/eigen_error.hpp"

namespace safesite::analysis {

namespace {

constexpr double k_nan = std::numeric_limits<double>::quiet_NaN();

// Tarjan's algorithm on the graph with edges j → i for edges(i, j). Returns the components in
// the order they are completed, which is a reverse topological order.
std::vector<std::vector<std::size_t>> tarjan(const BoolMatrix& edges) {
    const auto n = static_cast<std::size_t>(edges.rows());
    constexpr std::size_t unset = static_cast<std::size_t>(-1);
    std::vector<std::size_t> index(n, unset), low(n, 0);
    std::vector<bool> on_stack(n, false);
    std::vector<std::size_t> stack;
    std::vector<std::vector<std::size_t>> out;
    std::size_t counter = 0;
    std::function<void(std::size_t)> visit = [&](std::size_t j) {
        index[j] = low[j] = counter++;
        stack.push_back(j);
        on_stack[j] = true;
        for (std::size_t i = 0; i < n; ++i) {
            if (!edges(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j))) continue;
            if (index[i] == unset) {
                visit(i);
                low[j] = std::min(low[j], low[i]);
            } else if (on_stack[i]) {
                low[j] = std::min(low[j], index[i]);
            }
        }
        if (low[j] == index[j]) {
            std::vector<std::size_t> members;
            std::size_t i = unset;
            do {
                i = stack.back();
                stack.pop_back();
                on_stack[i] = false;
                members.push_back(i);
            } while (i != j);
            std::sort(members.begin(), members.end());
            out.push_back(std::move(members));
        }
    };
    for (std::size_t j = 0; j < n; ++j)
        if (index[j] == unset) visit(j);
    return out;
}

bool any_positive(const Eigen::MatrixXd& m) { return (m.array() > 0.0).any(); }

}  // namespace

std::string to_string(ComponentRole role) {
    switch (role) {
        case ComponentRole::self_renewing: return "self_renewing";
        case ComponentRole::dependent: return "dependent";
        case ComponentRole::declining: return "declining";
    }
    return "";
}

ClassComponents class_components(const BoolMatrix& edges, const BoolMatrix& reproduction) {
    if (edges.rows() != edges.cols() || reproduction.rows() != edges.rows() ||
        reproduction.cols() != edges.cols())
        throw std::invalid_argument("class_components: square matrices of equal size expected");
    const auto n = static_cast<std::size_t>(edges.rows());
    ClassComponents out;
    out.members = tarjan(edges);
    std::reverse(out.members.begin(), out.members.end());  // topological: sources first
    out.component.assign(n, 0);
    for (std::size_t c = 0; c < out.members.size(); ++c)
        for (std::size_t k : out.members[c]) out.component[k] = c;

    const std::size_t count = out.members.size();
    std::vector<bool> renews(count, false);
    for (std::size_t j = 0; j < n; ++j)
        for (std::size_t i = 0; i < n; ++i)
            if (reproduction(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)) &&
                edges(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)) &&
                out.component[i] == out.component[j])
                renews[out.component[i]] = true;
    // Reached from a self-renewing component: propagate along edges in topological order
    // (every edge goes from a component to itself or to a later one).
    std::vector<bool> reached = renews;
    for (std::size_t c = 0; c < count; ++c) {
        if (!reached[c]) continue;
        for (std::size_t j : out.members[c])
            for (std::size_t i = 0; i < n; ++i)
                if (edges(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)))
                    reached[out.component[i]] = true;
    }
    out.role.resize(count);
    for (std::size_t c = 0; c < count; ++c)
        out.role[c] = renews[c]    ? ComponentRole::self_renewing
                      : reached[c] ? ComponentRole::dependent
                                   : ComponentRole::declining;
    return out;
}

std::pair<BoolMatrix, BoolMatrix> class_graph(const kernel::KernelOperator& op) {
    const auto g = static_cast<Eigen::Index>(op.group_count());
    BoolMatrix edges = BoolMatrix::Constant(g, g, false);
    BoolMatrix reproduction = BoolMatrix::Constant(g, g, false);
    for (std::size_t to = 0; to < op.group_count(); ++to)
        for (std::size_t from = 0; from < op.group_count(); ++from) {
            const auto i = static_cast<Eigen::Index>(to), j = static_cast<Eigen::Index>(from);
            reproduction(i, j) =
                any_positive(op.block(to, from, kernel::KernelPart::reproduction));
            edges(i, j) = reproduction(i, j) ||
                          any_positive(op.block(to, from, kernel::KernelPart::survival_growth));
        }
    return {edges, reproduction};
}

Eigen::MatrixXd restricted_matrix(const kernel::KernelOperator& op,
                                  const std::vector<std::size_t>& groups) {
    Eigen::Index size = 0;
    std::vector<Eigen::Index> offset;
    for (std::size_t g : groups) {
        offset.push_back(size);
        size += op.group_size(g);
    }
    Eigen::MatrixXd out(size, size);
    for (std::size_t a = 0; a < groups.size(); ++a)
        for (std::size_t b = 0; b < groups.size(); ++b)
            out.block(offset[a], offset[b], op.group_size(groups[a]), op.group_size(groups[b])) =
                op.block(groups[a], groups[b]);
    return out;
}

double restricted_lambda(const kernel::KernelOperator& op,
                         const std::vector<std::size_t>& groups) {
    if (groups.empty()) return 0.0;
    const Eigen::MatrixXd m = restricted_matrix(op, groups);
    if (!any_positive(m)) return 0.0;
    // The spectral radius of a non-negative matrix is one of its eigenvalues (Perron–
    // Frobenius; Caswell 2001 §4.5), so the largest modulus is λ of the block.
    const Eigen::EigenSolver<Eigen::MatrixXd> es(m, false);
    if (es.info() != Eigen::Success)
        throw EigenError(EigenError::Reason::not_converged, k_nan, k_nan,
                         "the dense eigen-solver did not converge on a kernel component");
    return es.eigenvalues().cwiseAbs().maxCoeff();
}

EigenTriple restricted_triple(const kernel::KernelOperator& op,
                              const std::vector<std::size_t>& groups) {
    const Eigen::MatrixXd m = restricted_matrix(op, groups);
    const Eigen::Index size = m.rows();
    Eigen::VectorXd omega(size);
    {
        Eigen::Index at = 0;
        for (std::size_t g : groups) {
            omega.segment(at, op.group_size(g)) =
                op.state_weights().segment(op.group_offset(g), op.group_size(g));
            at += op.group_size(g);
        }
    }
    // The Perron root of an irreducible block is the eigenvalue with the largest real part
    // (it is real, positive and not smaller in modulus than any other).
    auto perron = [](const Eigen::MatrixXd& a, double& lambda, double& second,
                     Eigen::VectorXd& vector) {
        const Eigen::EigenSolver<Eigen::MatrixXd> es(a, true);
        if (es.info() != Eigen::Success)
            throw EigenError(EigenError::Reason::not_converged, k_nan, k_nan,
                             "the dense eigen-solver did not converge on a kernel component");
        const Eigen::VectorXcd values = es.eigenvalues();
        Eigen::Index lead = 0;
        for (Eigen::Index i = 1; i < values.size(); ++i)
            if (values[i].real() > values[lead].real()) lead = i;
        lambda = values[lead].real();
        second = 0.0;
        for (Eigen::Index i = 0; i < values.size(); ++i)
            if (i != lead) second = std::max(second, std::abs(values[i]));
        Eigen::VectorXd x = es.eigenvectors().col(lead).real();
        if (x.sum() < 0.0) x = -x;
        vector = x.cwiseMax(0.0);  // entries negative only by rounding
    };
    EigenTriple t;
    t.method = EigenMethod::dense;
    Eigen::VectorXd w, u;
    double left_lambda = 0.0, ignored = 0.0;
    perron(m, t.lambda, t.second_modulus, w);
    if (!(t.lambda > 0.0))
        throw EigenError(EigenError::Reason::not_positive, t.lambda, t.second_modulus,
                         "the kernel component has no positive eigenvalue");
    perron(m.transpose(), left_lambda, ignored, u);
    const double total = omega.dot(w);
    const Eigen::VectorXd v_part = u.cwiseQuotient(omega);
    const double vw = omega.cwiseProduct(v_part).dot(w / total);
    if (!(total > 0.0) || !(vw > 0.0))
        throw EigenError(EigenError::Reason::not_unique, t.lambda, t.second_modulus,
                         "the eigenvectors of a kernel component could not be normalised");

    const Eigen::Index n = op.rows();
    t.weights = op.state_weights();
    t.w = Eigen::VectorXd::Zero(n);
    t.v = Eigen::VectorXd::Zero(n);
    Eigen::Index at = 0;
    for (std::size_t g : groups) {
        const Eigen::Index len = op.group_size(g);
        t.w.segment(op.group_offset(g), len) = w.segment(at, len) / total;
        t.v.segment(op.group_offset(g), len) = v_part.segment(at, len) / vw;
        at += len;
    }
    // Residuals on the component (the embedded vectors are eigenvectors of the restriction).
    const Eigen::VectorXd wr = w / total;
    t.residual = (m * wr - t.lambda * wr).norm() / wr.norm();
    const Eigen::VectorXd ur = omega.cwiseProduct(v_part / vw);
    t.left_residual = (m.transpose() * ur - t.lambda * ur).norm() / ur.norm();
    return t;
}

Reducibility reducibility(const kernel::KernelOperator& op) {
    Reducibility out;
    const auto [edges, reproduction] = class_graph(op);
    out.components = class_components(edges, reproduction);
    if (!out.components.reducible()) {
        out.component_lambda.assign(1, k_nan);
        out.renewing_lambda = out.kernel_lambda = k_nan;
        return out;
    }
    const std::size_t count = out.components.count();
    out.component_lambda.resize(count);
    for (std::size_t c = 0; c < count; ++c) {
        out.component_lambda[c] = restricted_lambda(op, out.components.members[c]);
        out.kernel_lambda = std::max(out.kernel_lambda, out.component_lambda[c]);
        if (out.components.role[c] == ComponentRole::self_renewing &&
            (!out.leading_renewing ||
             out.component_lambda[c] > out.component_lambda[*out.leading_renewing]))
            out.leading_renewing = c;
    }
    if (out.leading_renewing) out.renewing_lambda = out.component_lambda[*out.leading_renewing];
    return out;
}

}  // namespace safesite::analysis
