// Learning the constants of a formula from training rows and building model matrices.
//
// Column layout: the intercept, then each term in formula order; within a term the columns
// of its atoms are crossed with the first atom varying fastest (common practice). A
// categorical atom gives treatment contrasts (one indicator per non-reference level) when the
// term without it is in the model, otherwise one indicator per level (Chambers & Hastie
// 1992, §2.4.1: the margin rule).
#include "safesite/stats/design_spec.hpp"

#include <algorithm>
#include <cmath>
#include <map>
#include <set>

#include "stats/detail/basis.hpp"
#include "stats/detail/design_detail.hpp"

namespace safesite::stats {

namespace {

std::string column_list(const Table& data) {
    std::string s;
    for (const auto& n : data.names()) s += (s.empty() ? "" : ", ") + n;
    return s.empty() ? "(none)" : s;
}

[[noreturn]] void formula_fail(const Formula& f, std::size_t pos, const std::string& reason) {
    SourceLocation where;
    where.column = pos;
    where.key = f.key.empty() ? f.text : f.key;
    throw FormulaError(where, "formula '" + f.text + "', character " + std::to_string(pos) + ": " +
                                  reason);
}

// Every column node of an expression must exist and be numeric.
void check_numeric(const Formula& f, const NumExpr& e, const Table& data, const char* role) {
    if (e.kind == NumExpr::Kind::column) {
        if (!data.has(e.name))
            formula_fail(f, e.position, "unknown column '" + e.name + "'; the columns are: " +
                                            column_list(data));
        if (!data.is_numeric(e.name))
            formula_fail(f, e.position, "column '" + e.name + "' is categorical; " + role +
                                            " needs a numeric column");
    }
    for (const auto& a : e.args) check_numeric(f, a, data, role);
}

std::string atom_column_name(const LearnedAtom& la, std::size_t j, bool full) {
    const Atom& a = la.atom;
    if (la.categorical) return a.expr.name + "[" + la.levels[full ? j : j + 1] + "]";
    switch (a.kind) {
        case Atom::Kind::orthpoly:
            return "orthpoly(" + a.expr.text() + "," + std::to_string(a.degree) + ")[" +
                   std::to_string(j + 1) + "]";
        case Atom::Kind::nspline:
            return "nspline(" + a.expr.text() + "," + std::to_string(a.df) + ")[" +
                   std::to_string(j + 1) + "]";
        default: return a.expr.text();
    }
}

}  // namespace

namespace detail {

Eigen::VectorXd evaluate(const NumExpr& e, const Table& data, const std::vector<std::size_t>& rows,
                         const std::string& key) {
    const auto n = static_cast<Eigen::Index>(rows.size());
    switch (e.kind) {
        case NumExpr::Kind::column: {
            const auto& v = data.numeric(e.name);
            Eigen::VectorXd out(n);
            for (Eigen::Index i = 0; i < n; ++i) out[i] = v[rows[static_cast<std::size_t>(i)]];
            return out;
        }
        case NumExpr::Kind::number: return Eigen::VectorXd::Constant(n, e.value);
        case NumExpr::Kind::log: {
            Eigen::VectorXd x = evaluate(e.args.at(0), data, rows, key);
            for (Eigen::Index i = 0; i < n; ++i) {
                if (!(x[i] > 0.0)) {
                    SourceLocation where;
                    where.key = e.args.at(0).text();
                    throw DataError(where, e.text() + " needs values > 0; row " +
                                               std::to_string(rows[static_cast<std::size_t>(i)] + 1) +
                                               " has " + std::to_string(x[i]) + " (formula '" +
                                               key + "')");
                }
            }
            return x.array().log().matrix();
        }
        case NumExpr::Kind::pow: {
            Eigen::VectorXd x = evaluate(e.args.at(0), data, rows, key);
            return x.array().pow(e.value).matrix();
        }
    }
    return Eigen::VectorXd::Zero(n);
}

bool row_missing(const Table& data, const std::string& column, std::size_t row) {
    if (data.is_numeric(column)) return std::isnan(data.numeric(column)[row]);
    return data.categorical(column).values[row].empty();
}

}  // namespace detail

std::size_t LearnedAtom::width(bool full) const {
    if (categorical) return full ? levels.size() : levels.size() - 1;
    switch (atom.kind) {
        case Atom::Kind::orthpoly: return static_cast<std::size_t>(atom.degree);
        case Atom::Kind::nspline: return static_cast<std::size_t>(atom.df);
        default: return 1;
    }
}

DesignSpec DesignSpec::learn(const Formula& formula, const Table& data,
                             const std::vector<std::size_t>& rows) {
    return learn_impl(formula, data, &rows);
}

DesignSpec DesignSpec::learn_types(const Formula& formula, const Table& data) {
    return learn_impl(formula, data, nullptr);
}

DesignSpec DesignSpec::learn_impl(const Formula& formula, const Table& data,
                                  const std::vector<std::size_t>* rows_ptr) {
    DesignSpec spec;
    spec.m_formula = formula;
    const Formula& f = spec.m_formula;
    const std::string key = f.key.empty() ? f.text : f.key;

    // The response is checked by complete_rows(with_response = true), so that a table
    // without it (prediction, fixed models) can still give the levels and constants.
    for (const auto& o : f.offsets) check_numeric(f, o, data, "offset()");

    // Unique atoms, learned once.
    std::map<std::string, std::size_t> index;
    for (const auto& term : f.terms) {
        for (const auto& atom : term.atoms) {
            const std::string k = atom.key();
            if (index.count(k)) continue;
            LearnedAtom la;
            la.atom = atom;
            const NumExpr& e = atom.expr;
            const bool plain = e.kind == NumExpr::Kind::column;
            if (plain && !data.has(e.name))
                formula_fail(f, e.position, "unknown column '" + e.name +
                                                "'; the columns are: " + column_list(data));
            if (atom.kind == Atom::Kind::reference) {
                if (!data.is_categorical(e.name))
                    formula_fail(f, e.position, "ref() needs a categorical column; '" + e.name +
                                                    "' is numeric");
                la.categorical = true;
                la.levels = data.categorical(e.name).levels;
                auto it = std::find(la.levels.begin(), la.levels.end(), atom.ref_level);
                if (it == la.levels.end()) {
                    std::string lv;
                    for (const auto& l : la.levels) lv += (lv.empty() ? "" : ", ") + l;
                    formula_fail(f, atom.level_position > 0 ? atom.level_position : atom.position,
                                 "'" + atom.ref_level + "' is not a level of '" + e.name +
                                     "'; the levels are: " + lv);
                }
                std::rotate(la.levels.begin(), it, it + 1);
            } else if (atom.kind == Atom::Kind::value && plain && data.is_categorical(e.name)) {
                la.categorical = true;
                la.levels = data.categorical(e.name).levels;
            } else {
                check_numeric(f, e, data,
                              atom.kind == Atom::Kind::value ? "this term" : "this function");
            }
            if (la.categorical && la.levels.empty())
                formula_fail(f, e.position, "column '" + e.name + "' has no levels");

            if (rows_ptr == nullptr) {
                // types only
            } else if (atom.kind == Atom::Kind::orthpoly) {
                const Eigen::VectorXd x = detail::evaluate(e, data, *rows_ptr, key);
                if (!detail::orthpoly_learn(x, atom.degree, la.alpha, la.norm2)) {
                    SourceLocation where;
                    where.key = e.text();
                    throw DataError(where, atom.key() + " needs at least " +
                                               std::to_string(atom.degree + 1) +
                                               " distinct values of " + e.text());
                }
            } else if (atom.kind == Atom::Kind::nspline) {
                const Eigen::VectorXd x = detail::evaluate(e, data, *rows_ptr, key);
                SourceLocation where;
                where.key = e.text();
                if (x.size() < 2 || !(x.maxCoeff() > x.minCoeff()))
                    throw DataError(where, atom.key() + " needs at least two distinct values of " +
                                               e.text());
                la.lower = x.minCoeff();
                la.upper = x.maxCoeff();
                if (!atom.knots.empty()) {
                    la.interior_knots = atom.knots;
                } else {
                    std::vector<double> v(x.data(), x.data() + x.size());
                    for (int j = 1; j < atom.df; ++j)
                        la.interior_knots.push_back(
                            detail::quantile_type7(v, static_cast<double>(j) / atom.df));
                }
                double prev = la.lower;
                for (double k : la.interior_knots) {
                    if (!(k > prev) || !(k < la.upper))
                        throw DataError(where,
                                        atom.key() + ": interior knots must lie strictly inside the "
                                        "data range [" + std::to_string(la.lower) + ", " +
                                        std::to_string(la.upper) + "] and differ (ties in " +
                                        e.text() + "? try fewer df)");
                    prev = k;
                }
            }
            index[k] = spec.m_atoms.size();
            spec.m_atoms.push_back(std::move(la));
        }
    }

    // Term coding by the margin rule, then column names.
    std::vector<std::set<std::string>> term_keys;
    for (const auto& term : f.terms) {
        std::set<std::string> s;
        for (const auto& a : term.atoms) s.insert(a.key());
        term_keys.push_back(std::move(s));
    }
    if (f.intercept) spec.m_names.push_back("(Intercept)");
    for (std::size_t t = 0; t < f.terms.size(); ++t) {
        TermCoding tc;
        tc.label = f.terms[t].label();
        tc.first_column = spec.m_names.size();
        for (const auto& a : f.terms[t].atoms) {
            const std::size_t ai = index.at(a.key());
            tc.atoms.push_back(ai);
            bool full = false;
            if (spec.m_atoms[ai].categorical) {
                std::set<std::string> margin = term_keys[t];
                margin.erase(a.key());
                const bool margin_present =
                    margin.empty() ? f.intercept
                                   : std::find(term_keys.begin(), term_keys.end(), margin) !=
                                         term_keys.end();
                full = !margin_present;
            }
            tc.full.push_back(full);
        }
        // Cross the atoms' columns, first atom fastest.
        std::vector<std::size_t> widths;
        std::size_t total = 1;
        for (std::size_t j = 0; j < tc.atoms.size(); ++j) {
            widths.push_back(spec.m_atoms[tc.atoms[j]].width(tc.full[j]));
            total *= widths.back();
        }
        for (std::size_t c = 0; c < total; ++c) {
            std::string name;
            std::size_t rest = c;
            for (std::size_t j = 0; j < tc.atoms.size(); ++j) {
                const std::size_t pick = rest % widths[j];
                rest /= widths[j];
                if (j > 0) name += ':';
                name += atom_column_name(spec.m_atoms[tc.atoms[j]], pick, tc.full[j]);
            }
            spec.m_names.push_back(name);
        }
        tc.width = total;
        spec.m_terms.push_back(std::move(tc));
    }
    return spec;
}

std::vector<std::string> DesignSpec::predictor_columns() const {
    std::vector<std::string> out;
    auto add = [&](const NumExpr& e) {
        for (const auto& c : e.columns())
            if (std::find(out.begin(), out.end(), c) == out.end()) out.push_back(c);
    };
    for (const auto& la : m_atoms) add(la.atom.expr);
    for (const auto& o : m_formula.offsets) add(o);
    return out;
}

const std::vector<std::string>& DesignSpec::levels(const std::string& column) const {
    for (const auto& la : m_atoms)
        if (la.categorical && la.atom.expr.name == column) return la.levels;
    throw UsageError("column '" + column + "' is not a categorical term of formula '" +
                     m_formula.text + "'");
}

std::vector<std::size_t> DesignSpec::complete_rows(const Table& data, bool with_response,
                                                   const std::vector<std::string>& also) const {
    const Formula& f = m_formula;
    // Types must match the training table.
    for (const auto& la : m_atoms) {
        const NumExpr& e = la.atom.expr;
        if (la.categorical) {
            if (!data.has(e.name))
                formula_fail(f, e.position, "unknown column '" + e.name + "'; the columns are: " +
                                                column_list(data));
            if (!data.is_categorical(e.name))
                formula_fail(f, e.position, "column '" + e.name +
                                                "' must be categorical, as in the training data");
        } else {
            check_numeric(f, e, data, "this term");
        }
    }
    for (const auto& o : f.offsets) check_numeric(f, o, data, "offset()");
    std::vector<std::string> cols = predictor_columns();
    if (with_response && f.has_response) {
        check_numeric(f, f.response.value, data, "the response");
        if (f.response.ratio) check_numeric(f, f.response.trials, data, "the trials");
        for (const auto& c : f.response.value.columns()) cols.push_back(c);
        if (f.response.ratio)
            for (const auto& c : f.response.trials.columns()) cols.push_back(c);
    }
    for (const auto& c : also) {
        if (!data.has(c))
            throw UsageError("no column '" + c + "'; the columns are: " + column_list(data));
        cols.push_back(c);
    }
    // Missing-value mask, one column at a time (no per-cell lookups by name).
    std::vector<char> ok(data.rows(), 1);
    for (const auto& c : cols) {
        if (data.is_numeric(c)) {
            const auto& v = data.numeric(c);
            for (std::size_t r = 0; r < v.size(); ++r)
                if (std::isnan(v[r])) ok[r] = 0;
        } else {
            const auto& v = data.categorical(c).values;
            for (std::size_t r = 0; r < v.size(); ++r)
                if (v[r].empty()) ok[r] = 0;
        }
    }
    std::vector<std::size_t> rows;
    rows.reserve(data.rows());
    for (std::size_t r = 0; r < data.rows(); ++r)
        if (ok[r]) rows.push_back(r);
    // Labels of categorical atoms must be training levels.
    for (const auto& la : m_atoms) {
        if (!la.categorical) continue;
        const auto& values = data.categorical(la.atom.expr.name).values;
        std::set<std::string> known(la.levels.begin(), la.levels.end());
        for (auto r : rows) {
            if (known.count(values[r]) == 0) {
                std::string lv;
                for (const auto& l : la.levels) lv += (lv.empty() ? "" : ", ") + l;
                SourceLocation where;
                where.key = la.atom.expr.name;
                throw DataError(where, "row " + std::to_string(r + 1) + ": '" + values[r] +
                                           "' is not a level of '" + la.atom.expr.name +
                                           "' in the fitted model; the levels are: " + lv);
            }
        }
    }
    return rows;
}

Eigen::MatrixXd DesignSpec::model_matrix(const Table& data,
                                         const std::vector<std::size_t>& rows) const {
    const auto n = static_cast<Eigen::Index>(rows.size());
    const std::string key = m_formula.key.empty() ? m_formula.text : m_formula.key;
    // Per atom: numeric basis (n × width) or level index per row.
    std::vector<Eigen::MatrixXd> basis(m_atoms.size());
    std::vector<std::vector<int>> level_index(m_atoms.size());
    for (std::size_t a = 0; a < m_atoms.size(); ++a) {
        const LearnedAtom& la = m_atoms[a];
        if (la.categorical) {
            std::map<std::string, int> pos;
            for (std::size_t l = 0; l < la.levels.size(); ++l) pos[la.levels[l]] = static_cast<int>(l);
            const auto& values = data.categorical(la.atom.expr.name).values;
            auto& idx = level_index[a];
            idx.resize(rows.size());
            for (std::size_t i = 0; i < rows.size(); ++i) {
                auto it = pos.find(values[rows[i]]);
                idx[i] = it == pos.end() ? -1 : it->second;
            }
            continue;
        }
        const Eigen::VectorXd x = detail::evaluate(la.atom.expr, data, rows, key);
        switch (la.atom.kind) {
            case Atom::Kind::orthpoly: basis[a] = detail::orthpoly_basis(x, la.alpha, la.norm2); break;
            case Atom::Kind::nspline:
                basis[a] = detail::nspline_basis(x, la.lower, la.upper, la.interior_knots);
                break;
            default: basis[a] = x; break;
        }
    }
    Eigen::MatrixXd X(n, static_cast<Eigen::Index>(m_names.size()));
    Eigen::Index col = 0;
    if (m_formula.intercept) X.col(col++).setOnes();
    for (const auto& tc : m_terms) {
        std::vector<std::size_t> widths;
        for (std::size_t j = 0; j < tc.atoms.size(); ++j)
            widths.push_back(m_atoms[tc.atoms[j]].width(tc.full[j]));
        for (std::size_t c = 0; c < tc.width; ++c) {
            auto v = X.col(col);  // filled in place
            v.setOnes();
            std::size_t rest = c;
            for (std::size_t j = 0; j < tc.atoms.size(); ++j) {
                const std::size_t pick = rest % widths[j];
                rest /= widths[j];
                const std::size_t a = tc.atoms[j];
                if (m_atoms[a].categorical) {
                    const int level = static_cast<int>(tc.full[j] ? pick : pick + 1);
                    const auto& idx = level_index[a];
                    for (Eigen::Index i = 0; i < n; ++i)
                        if (idx[static_cast<std::size_t>(i)] != level) v[i] = 0.0;
                } else {
                    v.array() *= basis[a].col(static_cast<Eigen::Index>(pick)).array();
                }
            }
            ++col;
        }
    }
    return X;
}

Eigen::VectorXd DesignSpec::offset(const Table& data, const std::vector<std::size_t>& rows) const {
    const std::string key = m_formula.key.empty() ? m_formula.text : m_formula.key;
    Eigen::VectorXd out = Eigen::VectorXd::Zero(static_cast<Eigen::Index>(rows.size()));
    for (const auto& o : m_formula.offsets) out += detail::evaluate(o, data, rows, key);
    return out;
}

void DesignSpec::response(const Table& data, const std::vector<std::size_t>& rows,
                          Eigen::VectorXd& y, Eigen::VectorXd& trials) const {
    const std::string key = m_formula.key.empty() ? m_formula.text : m_formula.key;
    if (!m_formula.has_response) throw UsageError("formula '" + m_formula.text + "' has no response");
    y = detail::evaluate(m_formula.response.value, data, rows, key);
    trials = m_formula.response.ratio ? detail::evaluate(m_formula.response.trials, data, rows, key)
                                      : Eigen::VectorXd::Ones(static_cast<Eigen::Index>(rows.size()));
}

}  // namespace safesite::stats
