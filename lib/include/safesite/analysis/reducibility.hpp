#pragma once
/// \file reducibility.hpp
/// The class graph of a kernel, its strongly connected components, and the growth rate of the
/// part of the population that renews itself (docs/methods/kernel.md, "Reducible kernels").
///
/// Classes are the continuous classes and the discrete stages of a KernelOperator (its
/// groups). Class j leads to class i (edge j → i) when the block K_ij has any positive entry.
/// The kernel is irreducible when every class leads to every other one (one strongly connected
/// component); otherwise it is reducible, and its dominant eigenvalue is the largest of the
/// components' own eigenvalues (Caswell 2001 §4.5; Stott, Townley, Carslake & Hodgson 2010).
/// A component *renews itself* when one of its internal edges is reproduction: the offspring
/// of its members come back into it. Its λ does not depend on plants outside it.

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "safesite/analysis/eigen_triple.hpp"
#include "safesite/kernel/kernel_operator.hpp"

namespace safesite::analysis {

/// A square boolean matrix: entry (i, j) true for an edge j → i.
using BoolMatrix = Eigen::Matrix<bool, Eigen::Dynamic, Eigen::Dynamic>;

/// The part a component plays.
enum class ComponentRole {
    self_renewing,  ///< a strongly connected component with an internal reproduction edge
    dependent,      ///< not self-renewing, but reached from a self-renewing component
    declining,      ///< neither: its members are not replaced (they die out on their own)
};

/// "self_renewing", "dependent" or "declining".
std::string to_string(ComponentRole role);

/// Strongly connected components of a class graph.
struct ClassComponents {
    /// Per class: its component, numbered in topological order (a component only leads to
    /// components with a larger number).
    std::vector<std::size_t> component;
    /// Per component: its role.
    std::vector<ComponentRole> role;
    /// Per component: its classes, ascending.
    std::vector<std::vector<std::size_t>> members;

    std::size_t count() const noexcept { return members.size(); }
    /// More than one component (a class that leads nowhere or is reached from nowhere makes
    /// a component of its own).
    bool reducible() const noexcept { return members.size() > 1; }
};

/// Components of the graph `edges` (n × n; (i, j) true for an edge j → i, a diagonal entry is
/// a self-loop) with the roles given by `reproduction` (the subset of edges that are
/// reproduction). Tarjan's algorithm (Tarjan 1972), O(n²) on the dense matrix.
/// Throws std::invalid_argument when the matrices are not square and of equal size.
ClassComponents class_components(const BoolMatrix& edges, const BoolMatrix& reproduction);

/// The class graph of a kernel: (edges, reproduction edges), one node per group of `op`
/// (classes, then stages). Reproduction edges are those of KernelPart::reproduction.
std::pair<BoolMatrix, BoolMatrix> class_graph(const kernel::KernelOperator& op);

/// The dense matrix of `op` restricted to the state entries of `groups` (in the given order).
Eigen::MatrixXd restricted_matrix(const kernel::KernelOperator& op,
                                  const std::vector<std::size_t>& groups);

/// Spectral radius of `op` restricted to `groups` (0 for an empty set or a nilpotent block).
double restricted_lambda(const kernel::KernelOperator& op,
                         const std::vector<std::size_t>& groups);

/// The dominant eigen-triple of `op` restricted to `groups`, embedded in the full state (zero
/// outside the groups), normalised as dominant_eigen() does with the state weights of `op`.
/// `groups` must form one strongly connected component (the restriction is irreducible, so
/// its spectral radius is a simple, positive eigenvalue with positive vectors).
/// Throws EigenError when the restriction has no positive eigenvalue.
EigenTriple restricted_triple(const kernel::KernelOperator& op,
                              const std::vector<std::size_t>& groups);

/// A kernel's components and their growth rates.
struct Reducibility {
    ClassComponents components;
    /// Per component: spectral radius of the kernel restricted to it (0 for a single class
    /// without a self-loop).
    std::vector<double> component_lambda;
    /// The self-renewing component with the largest λ, when there is one.
    std::optional<std::size_t> leading_renewing;
    /// λ of the self-renewing part: the largest λ of a self-renewing component, 0 when no
    /// component renews itself (nothing replaces itself).
    double renewing_lambda = 0.0;
    /// Spectral radius of the whole kernel: the largest component λ.
    double kernel_lambda = 0.0;
};

/// Components, roles and λ of every component of `op`. The λ are computed only when the
/// kernel is reducible: for an irreducible kernel `component_lambda` holds one NaN and
/// `renewing_lambda`, `kernel_lambda` are NaN (the caller's dominant eigenvalue is the
/// answer; dominant_eigen() gives it with its vectors).
Reducibility reducibility(const kernel::KernelOperator& op);

}  // namespace safesite::analysis
