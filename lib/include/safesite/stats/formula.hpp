#pragma once
/// \file formula.hpp
/// Model formulas in Wilkinson–Rogers notation (Wilkinson & Rogers 1973), our spelling:
///
///     response ~ terms
///     survived ~ size * microsite                 size + microsite + size:microsite
///     survived ~ size + ref(microsite, gravel)    reference level of treatment contrasts
///     size_next ~ nspline(size, df = 3) - 1       natural cubic spline, no intercept
///     trapped / launched ~ log(neighbour_size) + form
///     left ~ microsite + offset(log(interval_days))
///
/// Operators: `+` (add terms), `-` (remove terms), `:` (interaction), `*` (crossing,
/// a*b = a + b + a:b), parentheses; `1` / `0` (`- 1`, `+ 0` remove the intercept).
/// Functions: `pow(x, k)`, `log(x)`, `orthpoly(x, k)`, `nspline(x, df = k)`,
/// `nspline(x, knots = [a, b, c])`, `ref(column, level)`, `offset(x)`; x is a numeric
/// column or a nested `log`/`pow` of one. The full grammar is in docs/methods/regression.md.

#include <cstddef>
#include <string>
#include <vector>

#include "safesite/error.hpp"

namespace safesite::stats {

/// A formula that cannot be parsed or does not fit the data. `column()` is the 1-based
/// character position in the formula text; `key()` is the formula text or the caller's key.
class FormulaError : public InputError {
public:
    using InputError::InputError;
};

/// A numeric expression: a column, a number, or `log(e)` / `pow(e, k)` of an expression.
struct NumExpr {
    enum class Kind { column, number, log, pow };
    Kind kind = Kind::column;
    std::string name;            ///< column name (Kind::column)
    double value = 0.0;          ///< the number (Kind::number) or the exponent k (Kind::pow)
    std::vector<NumExpr> args;   ///< one argument for log and pow
    std::size_t position = 0;    ///< 1-based character position in the formula text

    /// Canonical text without spaces, as used in design column names: `size`,
    /// `log(neighbour_size)`, `pow(size,2)`.
    std::string text() const;
    /// Names of the columns the expression reads, in order of appearance (no repeats).
    std::vector<std::string> columns() const;
};

/// One factor of a term ("variable" in Wilkinson & Rogers): a numeric expression or a
/// categorical column, possibly expanded into several design columns.
struct Atom {
    enum class Kind {
        value,      ///< a column or log/pow expression; categorical columns give indicators
        reference,  ///< ref(column, level): categorical column with a chosen reference level
        orthpoly,   ///< orthpoly(x, k): orthogonal polynomials of degree 1..k
        nspline     ///< nspline(x, df = k) or nspline(x, knots = [...]): natural cubic spline
    };
    Kind kind = Kind::value;
    NumExpr expr;                 ///< the argument (for reference: the column)
    std::string ref_level;        ///< reference level (Kind::reference)
    std::size_t level_position = 0;  ///< 1-based character position of ref_level in the text
    int degree = 0;               ///< k of orthpoly
    int df = 0;                   ///< columns of nspline: given df, or interior knots + 1
    std::vector<double> knots;    ///< interior knots of nspline when given explicitly
    std::size_t position = 0;     ///< 1-based character position in the formula text

    /// Canonical text identifying the atom: `size`, `pow(size,2)`, `orthpoly(size,2)`,
    /// `nspline(size,3)`, `microsite` (for ref(microsite, ...) too).
    std::string key() const;
};

/// A term: the interaction of its atoms (one atom for a main effect).
struct Term {
    std::vector<Atom> atoms;
    /// `size`, `size:microsite`.
    std::string label() const;
};

/// The left-hand side: one numeric expression, or `successes / trials` for binomial counts.
struct Response {
    NumExpr value;               ///< the response, or the successes of a ratio
    bool ratio = false;          ///< `successes / trials`
    NumExpr trials;              ///< trials (ratio only)
    /// `survived`, `trapped / launched`.
    std::string text() const;
};

/// A parsed formula: the response, the intercept flag and the expanded terms in order
/// (by degree, then first appearance), plus offsets.
struct Formula {
    std::string text;            ///< the formula as written
    std::string key;             ///< key reported in errors (formula text unless given)
    bool has_response = true;    ///< false for one-sided `~ terms` (model matrices only)
    Response response;
    bool intercept = true;
    std::vector<Term> terms;
    std::vector<NumExpr> offsets;

    /// Every column the formula reads (response, terms, offsets), first appearance order.
    std::vector<std::string> columns() const;
};

/// Parse and expand a formula. `key` is reported in errors (default: the formula text).
/// Throws FormulaError with column = 1-based character position of the problem.
Formula parse_formula(const std::string& text, const std::string& key = "");

/// Parse a stand-alone numeric expression such as `size` or `log(size)` (used for the
/// spread column of gaussian_spread). Throws FormulaError.
NumExpr parse_numeric_expression(const std::string& text, const std::string& key = "");

}  // namespace safesite::stats
