#pragma once
/// \file design_spec.hpp
/// The "terms object" of a model: a parsed formula plus every constant learned from the
/// training rows (factor levels and reference level, orthogonal-polynomial recurrence
/// coefficients, spline knots), so that the same design columns can be built for any new table
/// (prediction, kernels on a size mesh) exactly as for the training data.

#include <cstddef>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "safesite/stats/formula.hpp"
#include "safesite/stats/table.hpp"

namespace safesite::stats {

/// An atom together with the constants learned from the training rows.
struct LearnedAtom {
    Atom atom;
    bool categorical = false;           ///< a categorical column (value or reference atom)
    std::vector<std::string> levels;    ///< categorical: levels, reference level first
    /// orthpoly: recurrence \f$p_{j+1}(x) = (x-\alpha_{j+1})p_j(x) - (n_{j+1}/n_j)p_{j-1}(x)\f$,
    /// \f$p_0=1\f$, \f$p_{-1}=0\f$; `alpha` = \f$\alpha_1..\alpha_k\f$, `norm2` =
    /// \f$n_0..n_{k+1}\f$ with \f$n_0=1\f$, \f$n_{j+1}=\sum_i p_j(x_i)^2\f$; column j is
    /// \f$p_j(x)/\sqrt{n_{j+1}}\f$.
    std::vector<double> alpha;
    std::vector<double> norm2;
    /// nspline: boundary knots (training range) and interior knots.
    double lower = 0.0;
    double upper = 0.0;
    std::vector<double> interior_knots;

    /// Number of design columns this atom gives with indicator coding for all levels
    /// (`full`) or treatment contrasts (levels minus the reference).
    std::size_t width(bool full) const;
};

/// How a term is coded: for each atom, whether a categorical atom uses all its levels
/// (indicator coding) or treatment contrasts. An atom uses contrasts when the term without
/// it is in the model (the empty term being the intercept) — the margin rule of
/// Chambers & Hastie (1992, §2.4.1), so that `y ~ microsite - 1` gives one column per level.
struct TermCoding {
    std::vector<std::size_t> atoms;     ///< indices into DesignSpec::atoms()
    std::vector<bool> full;             ///< per atom: all levels (true) or contrasts (false)
    std::size_t first_column = 0;       ///< first design column of the term
    std::size_t width = 0;              ///< number of design columns
    std::string label;                  ///< `size:microsite`
};

/// A formula with its learned constants. Build with DesignSpec::learn (or build_design).
class DesignSpec {
public:
    DesignSpec() = default;

    /// Learn the constants of `formula` from `rows` of `data` (factor levels from the table's
    /// level lists; polynomial and spline constants from the values in `rows`). The response
    /// need not be in `data` (complete_rows with `with_response` checks it), so a prediction
    /// or level template without the response works.
    /// Throws FormulaError (position of the atom) for an unknown column — listing the
    /// columns of `data` — or a column of the wrong type; DataError when a spline or
    /// polynomial cannot be formed (too few distinct values).
    static DesignSpec learn(const Formula& formula, const Table& data,
                            const std::vector<std::size_t>& rows);
    /// Check names and types and take the factor levels, without polynomial or spline
    /// constants: enough for complete_rows(), not for model_matrix(). Throws as learn().
    static DesignSpec learn_types(const Formula& formula, const Table& data);

    const Formula& formula() const noexcept { return m_formula; }
    const std::vector<LearnedAtom>& atoms() const noexcept { return m_atoms; }
    const std::vector<TermCoding>& terms() const noexcept { return m_terms; }
    /// Design column names (docs/formats.md): `(Intercept)`, `size`, `microsite[cushion]`,
    /// `size:microsite[cushion]`, `pow(size,2)`, `orthpoly(size,2)[1]`, `nspline(size,3)[2]`.
    const std::vector<std::string>& column_names() const noexcept { return m_names; }
    std::size_t columns() const noexcept { return m_names.size(); }
    bool intercept() const noexcept { return m_formula.intercept; }

    /// Columns the right-hand side and offsets read (what a prediction table must hold).
    std::vector<std::string> predictor_columns() const;
    /// Levels (reference first) of a categorical column used by the formula; throws
    /// UsageError when the column is not a categorical atom of the formula.
    const std::vector<std::string>& levels(const std::string& column) const;

    /// Indices of the rows of `data` with no missing value in the predictors, the offsets,
    /// the response (when `with_response`) and the `also_required` columns (which must exist).
    /// Throws FormulaError for a missing or mistyped column, DataError for a categorical value
    /// that is not a training level.
    std::vector<std::size_t> complete_rows(const Table& data, bool with_response,
                                           const std::vector<std::string>& also_required = {}) const;
    /// Model matrix (rows × columns()) for the given rows, which must be complete.
    /// Throws DataError for log of a value ≤ 0.
    Eigen::MatrixXd model_matrix(const Table& data, const std::vector<std::size_t>& rows) const;
    /// Sum of the offsets for the given rows (zeros when the formula has none).
    Eigen::VectorXd offset(const Table& data, const std::vector<std::size_t>& rows) const;
    /// Response values and binomial trials (1 unless the response is `successes / trials`).
    void response(const Table& data, const std::vector<std::size_t>& rows, Eigen::VectorXd& y,
                  Eigen::VectorXd& trials) const;

private:
    static DesignSpec learn_impl(const Formula& formula, const Table& data,
                                 const std::vector<std::size_t>* rows);

    Formula m_formula;
    std::vector<LearnedAtom> m_atoms;
    std::vector<TermCoding> m_terms;
    std::vector<std::string> m_names;
};

}  // namespace safesite::stats
