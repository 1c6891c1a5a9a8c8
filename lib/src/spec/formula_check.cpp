// Formulas of the model file checked before any fitting: parsed, and every column and known
// level resolved against the columns of the table the formula will be fitted on
// (docs/formats.md, "Formulas in the model file"). Errors point into the user's own text.
#include <algorithm>

#include "safesite/io/near_match.hpp"
#include "safesite/spec/formula_source.hpp"
#include "safesite/stats/formula.hpp"

namespace safesite::spec {

namespace {

/// Characters (UTF-8 code points) in the first `bytes` bytes of `s`.
std::size_t code_points(const std::string& s, std::size_t bytes) {
    std::size_t n = 0;
    for (std::size_t i = 0; i < std::min(bytes, s.size()); ++i)
        if ((static_cast<unsigned char>(s[i]) & 0xC0) != 0x80) ++n;
    return n;
}

std::string list(const std::vector<std::string>& names) {
    std::string out;
    for (const auto& n : names) out += (out.empty() ? "" : ", ") + n;
    return out.empty() ? "(none)" : out;
}

bool contains(const std::vector<std::string>& v, const std::string& x) {
    return std::find(v.begin(), v.end(), x) != v.end();
}

}  // namespace

std::string level_message(const std::string& level, const std::string& column,
                          const std::vector<std::string>& levels, const std::string& where) {
    const std::string hint = io::did_you_mean(level, levels);
    return "'" + level + "' is not a level of '" + column + "'" + where +
           (hint.empty() ? "." : hint) + " The levels are: " + list(levels);
}

namespace {

/// Resolves the columns of one parsed formula.
class Resolver {
public:
    Resolver(const FormulaSource& source, const std::string& text, const FormulaColumns& columns)
        : m_source(source), m_text(text), m_columns(columns) {}

    [[noreturn]] void fail(std::size_t pos, const std::string& reason) const {
        formula_error(m_source, m_text, pos, reason);
    }

    void require_known(const std::string& name, std::size_t pos) const {
        if (contains(m_columns.numeric, name) || contains(m_columns.categorical, name)) {
            if (!m_response && contains(m_columns.response_only, name)) {
                std::vector<std::string> terms;
                for (const auto& n : m_columns.names())
                    if (!contains(m_columns.response_only, n)) terms.push_back(n);
                fail(pos, "column '" + name + "' can be used only in the response here; the "
                          "terms may read: " + list(terms));
            }
            return;
        }
        const auto names = m_columns.names();
        const std::string hint = io::did_you_mean(name, names);
        fail(pos, "unknown column '" + name + "'" + (hint.empty() ? "." : hint) + " The " +
                      m_columns.table + " table has the columns: " + list(names));
    }

    /// Columns read from now on are in the response or an offset (true) or in the terms.
    void in_response(bool yes) { m_response = yes; }

    /// Every column node of `e` must exist and be numeric (`role` names the use).
    void numeric(const stats::NumExpr& e, const std::string& role) const {
        if (e.kind == stats::NumExpr::Kind::column) {
            require_known(e.name, e.position);
            if (!contains(m_columns.numeric, e.name))
                fail(e.position, "column '" + e.name + "' is categorical; " + role +
                                     " needs a numeric column (the numeric columns are: " +
                                     list(m_columns.numeric) + ")");
        }
        for (const auto& a : e.args)
            numeric(a, e.kind == stats::NumExpr::Kind::log ? "log()" : "pow()");
    }

    void atom(const stats::Atom& a) const {
        using Kind = stats::Atom::Kind;
        const stats::NumExpr& e = a.expr;
        if (a.kind == Kind::reference) {
            require_known(e.name, e.position);
            const auto it =
                std::find(m_columns.categorical.begin(), m_columns.categorical.end(), e.name);
            if (it == m_columns.categorical.end())
                fail(e.position, "ref() needs a categorical column; '" + e.name +
                                     "' is numeric (the categorical columns are: " +
                                     list(m_columns.categorical) + ")");
            const auto& levels = m_columns.levels[static_cast<std::size_t>(
                it - m_columns.categorical.begin())];
            if (!levels.empty() && !contains(levels, a.ref_level))
                fail(a.level_position, level_message(a.ref_level, e.name, levels, ""));
            return;
        }
        if (a.kind == Kind::value && e.kind == stats::NumExpr::Kind::column) {
            require_known(e.name, e.position);  // numeric or categorical: both are terms
            return;
        }
        numeric(e, a.kind == Kind::orthpoly  ? "orthpoly()"
                   : a.kind == Kind::nspline ? "nspline()"
                                             : "this term");
    }

private:
    const FormulaSource& m_source;
    const std::string& m_text;
    const FormulaColumns& m_columns;
    bool m_response = false;
};

}  // namespace

SourceLocation FormulaSource::at(const std::string& text, std::size_t offset) const {
    SourceLocation where = value;
    if (text_column > 0 && offset > 0 && offset <= text.size() + 1)
        where.column = text_column + code_points(text, offset - 1);
    return where;
}

void formula_error(const FormulaSource& source, const std::string& text, std::size_t offset,
                   const std::string& reason) {
    std::string message = "'" + source.value.key + "' = \"" + text + "\"";
    if (offset > 0) message += ", character " + std::to_string(offset);
    message += ": " + reason;
    if (offset > 0 && text.find('\n') == std::string::npos) {
        message += "\n    " + text + "\n    " +
                   std::string(code_points(text, offset - 1), ' ') + "^";
    }
    throw SpecError(source.at(text, offset), message);
}

std::vector<std::string> FormulaColumns::names() const {
    std::vector<std::string> out = numeric;
    out.insert(out.end(), categorical.begin(), categorical.end());
    return out;
}

void check_formula_text(const FormulaSource& source, const std::string& text,
                        const FormulaColumns& columns, const std::string& response) {
    stats::Formula f;
    try {
        f = stats::parse_formula(text, source.value.key);
    } catch (const stats::FormulaError& e) {
        // The parser's reason starts "formula '<text>', character <n>: "; keep what follows.
        std::string reason = e.reason();
        const std::string prefix =
            "formula '" + text + "', character " + std::to_string(e.column()) + ": ";
        if (reason.rfind(prefix, 0) == 0) reason = reason.substr(prefix.size());
        formula_error(source, text, e.column(), reason);
    }
    Resolver r(source, text, columns);
    if (!f.has_response)
        formula_error(source, text, 1,
                      "no response before '~'" +
                          (response.empty() ? std::string()
                                            : "; expected '" + response + " ~ ...'"));
    if (!response.empty()) {
        const stats::NumExpr& y = f.response.value;
        if (f.response.ratio || y.kind != stats::NumExpr::Kind::column || y.name != response)
            formula_error(source, text, y.position,
                          "the response is '" + f.response.text() + "'; expected '" + response +
                              "' for this rate");
    }
    r.in_response(true);
    r.numeric(f.response.value, "the response");
    if (f.response.ratio) r.numeric(f.response.trials, "the trials of 'successes / trials'");
    r.in_response(false);
    for (const auto& t : f.terms)
        for (const auto& a : t.atoms) r.atom(a);
    r.in_response(true);  // an offset is not a predictor: it may read any numeric column
    for (const auto& o : f.offsets) r.numeric(o, "offset()");
}

}  // namespace safesite::spec
