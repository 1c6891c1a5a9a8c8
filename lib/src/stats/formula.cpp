// Parser and term expansion of Wilkinson–Rogers model formulas (Wilkinson & Rogers 1973),
// in the spelling documented in docs/methods/regression.md.
//
// Grammar (recursive descent, one token of look-ahead):
//   formula  := [response] '~' sum END
//   response := numexpr ['/' numexpr]
//   sum      := ['+' | '-'] product (('+' | '-') product)*
//   product  := inter ('*' inter)*
//   inter    := primary (':' primary)*
//   primary  := '(' sum ')' | '0' | '1' | call | NAME
//   call     := log(numexpr) | pow(numexpr, NUMBER) | orthpoly(numexpr, INT)
//             | nspline(numexpr, [df =] INT) | nspline(numexpr, knots = [NUMBER, ...])
//             | ref(NAME, level) | offset(numexpr)
//   numexpr  := NAME | log(numexpr) | pow(numexpr, NUMBER)
//
// Expansion (Wilkinson & Rogers 1973; Chambers & Hastie 1992 §2.4): a sum is the union of the
// terms of its operands, `a - b` removes b's terms, `a:b` is the set of pairwise unions of the
// atoms of a's and b's terms, `a*b = a + b + a:b`. `1` / `0` mark the intercept; `- 1` and
// `+ 0` remove it. Terms are then ordered by degree (number of atoms), stable in order of
// first appearance (common practice).
#include "safesite/stats/formula.hpp"

#include <algorithm>
#include <cctype>
#include <charconv>
#include <cmath>
#include <optional>

namespace safesite::stats {

namespace {

std::string format_number(double v) {
    if (std::isfinite(v) && v == std::floor(v) && std::abs(v) < 1e15)
        return std::to_string(static_cast<long long>(v));
    char buf[64];
    auto res = std::to_chars(buf, buf + sizeof buf, v);
    return std::string(buf, res.ptr);
}

enum class Tok { name, number, string, tilde, plus, minus, colon, star, slash, lparen, rparen,
                 comma, equals, lbracket, rbracket, end };

struct Token {
    Tok kind;
    std::string text;
    double number = 0.0;
    std::size_t pos;  // 1-based
};

const char* const k_functions = "log, pow, orthpoly, nspline, ref, offset";

class Parser {
public:
    Parser(const std::string& text, const std::string& key) : m_text(text), m_key(key) {
        tokenize();
    }

    [[noreturn]] void fail(std::size_t pos, const std::string& reason) const {
        SourceLocation where;
        where.column = pos;
        where.key = m_key;
        throw FormulaError(where, "formula '" + m_text + "', character " + std::to_string(pos) +
                                      ": " + reason);
    }

    Formula parse_formula() {
        Formula f;
        f.text = m_text;
        f.key = m_key;
        if (peek().kind == Tok::tilde) {
            f.has_response = false;
        } else {
            f.response.value = numexpr();
            if (peek().kind == Tok::slash) {
                next();
                f.response.ratio = true;
                f.response.trials = numexpr();
            }
        }
        expect(Tok::tilde, "'~' between the response and the terms");
        if (peek().kind == Tok::end) fail(peek().pos, "expected terms after '~' (use 1 for an intercept only)");
        TermList rhs = sum();
        if (peek().kind != Tok::end) fail(peek().pos, "unexpected '" + peek().text + "'");
        f.intercept = rhs.intercept != 0;
        std::stable_sort(rhs.terms.begin(), rhs.terms.end(), [](const Term& a, const Term& b) {
            return a.atoms.size() < b.atoms.size();
        });
        f.terms = std::move(rhs.terms);
        f.offsets = std::move(rhs.offsets);
        return f;
    }

    NumExpr parse_expression() {
        NumExpr e = numexpr();
        if (peek().kind != Tok::end) fail(peek().pos, "unexpected '" + peek().text + "'");
        return e;
    }

private:
    struct TermList {
        std::vector<Term> terms;
        int intercept = -1;  // -1 not said, 0 removed, 1 present
        std::vector<NumExpr> offsets;
        bool has_intercept_default() const { return intercept != 0; }
    };

    // ---- lexer -----------------------------------------------------------------------------
    void tokenize() {
        std::size_t i = 0;
        const std::size_t n = m_text.size();
        while (i < n) {
            const char c = m_text[i];
            const std::size_t pos = i + 1;
            if (std::isspace(static_cast<unsigned char>(c))) {
                ++i;
                continue;
            }
            if (std::isalpha(static_cast<unsigned char>(c)) || c == '_' || c == '.') {
                std::size_t j = i;
                while (j < n && (std::isalnum(static_cast<unsigned char>(m_text[j])) ||
                                 m_text[j] == '_' || m_text[j] == '.'))
                    ++j;
                m_tokens.push_back({Tok::name, m_text.substr(i, j - i), 0.0, pos});
                i = j;
                continue;
            }
            if (std::isdigit(static_cast<unsigned char>(c))) {
                std::size_t j = i;
                while (j < n && (std::isdigit(static_cast<unsigned char>(m_text[j])) ||
                                 m_text[j] == '.'))
                    ++j;
                if (j < n && (m_text[j] == 'e' || m_text[j] == 'E')) {
                    std::size_t k = j + 1;
                    if (k < n && (m_text[k] == '+' || m_text[k] == '-')) ++k;
                    if (k < n && std::isdigit(static_cast<unsigned char>(m_text[k]))) {
                        j = k;
                        while (j < n && std::isdigit(static_cast<unsigned char>(m_text[j]))) ++j;
                    }
                }
                const std::string s = m_text.substr(i, j - i);
                double v = 0.0;
                auto res = std::from_chars(s.data(), s.data() + s.size(), v);
                if (res.ec != std::errc() || res.ptr != s.data() + s.size())
                    fail(pos, "'" + s + "' is not a number");
                m_tokens.push_back({Tok::number, s, v, pos});
                i = j;
                continue;
            }
            if (c == '"') {
                const std::size_t close = m_text.find('"', i + 1);
                if (close == std::string::npos) fail(pos, "unterminated quoted level");
                m_tokens.push_back({Tok::string, m_text.substr(i + 1, close - i - 1), 0.0, pos});
                i = close + 1;
                continue;
            }
            Tok kind;
            switch (c) {
                case '~': kind = Tok::tilde; break;
                case '+': kind = Tok::plus; break;
                case '-': kind = Tok::minus; break;
                case ':': kind = Tok::colon; break;
                case '*': kind = Tok::star; break;
                case '/': kind = Tok::slash; break;
                case '(': kind = Tok::lparen; break;
                case ')': kind = Tok::rparen; break;
                case ',': kind = Tok::comma; break;
                case '=': kind = Tok::equals; break;
                case '[': kind = Tok::lbracket; break;
                case ']': kind = Tok::rbracket; break;
                default:
                    fail(pos, std::string("unexpected character '") + c + "'");
            }
            m_tokens.push_back({kind, std::string(1, c), 0.0, pos});
            ++i;
        }
        m_tokens.push_back({Tok::end, "end of formula", 0.0, n + 1});
    }

    const Token& peek() const { return m_tokens[m_at]; }
    const Token& next() { return m_tokens[m_at++]; }
    const Token& expect(Tok kind, const std::string& what) {
        if (peek().kind != kind) {
            const Token& t = peek();
            fail(t.pos, "expected " + what + (t.kind == Tok::end ? " before the end" :
                                              ", found '" + t.text + "'"));
        }
        return next();
    }

    // ---- numeric expressions ---------------------------------------------------------------
    NumExpr numexpr() {
        const Token& t = peek();
        if (t.kind != Tok::name) fail(t.pos, "expected a column name or log(...) / pow(...)");
        next();
        if (peek().kind != Tok::lparen) {
            NumExpr e;
            e.kind = NumExpr::Kind::column;
            e.name = t.text;
            e.position = t.pos;
            return e;
        }
        if (t.text == "log") {
            next();
            NumExpr e;
            e.kind = NumExpr::Kind::log;
            e.position = t.pos;
            e.args.push_back(numexpr());
            expect(Tok::rparen, "')' closing log(");
            return e;
        }
        if (t.text == "pow") {
            next();
            NumExpr e;
            e.kind = NumExpr::Kind::pow;
            e.position = t.pos;
            e.args.push_back(numexpr());
            expect(Tok::comma, "',' then the exponent in pow(x, k)");
            e.value = signed_number("the exponent k of pow(x, k)");
            expect(Tok::rparen, "')' closing pow(");
            return e;
        }
        if (t.text == "orthpoly" || t.text == "nspline" || t.text == "ref" || t.text == "offset")
            fail(t.pos, t.text + "() cannot be used inside another function");
        fail(t.pos, "unknown function '" + t.text + "'; the functions are: " + k_functions);
    }

    double signed_number(const std::string& what) {
        bool negative = false;
        if (peek().kind == Tok::minus) {
            next();
            negative = true;
        }
        const Token& t = expect(Tok::number, what);
        return negative ? -t.number : t.number;
    }

    int positive_int(const std::string& what) {
        const Token& t = expect(Tok::number, what);
        if (t.number < 1 || t.number != std::floor(t.number) || t.number > 50)
            fail(t.pos, what + " must be a whole number from 1 to 50, not '" + t.text + "'");
        return static_cast<int>(t.number);
    }

    // ---- terms -----------------------------------------------------------------------------
    static bool same_term(const Term& a, const Term& b) {
        if (a.atoms.size() != b.atoms.size()) return false;
        for (const auto& x : a.atoms) {
            bool found = false;
            for (const auto& y : b.atoms) found = found || x.key() == y.key();
            if (!found) return false;
        }
        return true;
    }

    static void add_term(std::vector<Term>& terms, const Term& t) {
        for (const auto& u : terms)
            if (same_term(u, t)) return;
        terms.push_back(t);
    }

    TermList sum() {
        TermList out;
        bool first = true;
        while (true) {
            Tok op = Tok::plus;
            std::size_t op_pos = peek().pos;
            if (peek().kind == Tok::plus || peek().kind == Tok::minus) {
                op = next().kind;
            } else if (!first) {
                break;
            }
            first = false;
            TermList rhs = product();
            if (op == Tok::plus) {
                for (const auto& t : rhs.terms) add_term(out.terms, t);
                if (rhs.intercept >= 0) out.intercept = rhs.intercept;
                for (auto& o : rhs.offsets) out.offsets.push_back(std::move(o));
            } else {
                if (!rhs.offsets.empty()) fail(op_pos, "an offset cannot be subtracted");
                for (const auto& t : rhs.terms) {
                    out.terms.erase(std::remove_if(out.terms.begin(), out.terms.end(),
                                                   [&](const Term& u) { return same_term(u, t); }),
                                    out.terms.end());
                }
                if (rhs.intercept == 1) out.intercept = 0;
                if (rhs.intercept == 0) out.intercept = 1;
            }
        }
        return out;
    }

    TermList product() {
        TermList out = interaction();
        while (peek().kind == Tok::star) {
            const std::size_t pos = next().pos;
            TermList rhs = interaction();
            TermList cross = combine(out, rhs, pos, "*");
            TermList merged;
            merged.intercept = out.intercept;
            for (const auto& t : out.terms) add_term(merged.terms, t);
            for (const auto& t : rhs.terms) add_term(merged.terms, t);
            for (const auto& t : cross.terms) add_term(merged.terms, t);
            out = std::move(merged);
        }
        return out;
    }

    TermList interaction() {
        TermList out = primary();
        while (peek().kind == Tok::colon) {
            const std::size_t pos = next().pos;
            TermList rhs = primary();
            out = combine(out, rhs, pos, ":");
        }
        return out;
    }

    // Pairwise unions of the atoms of the terms of a and b (the interaction a:b).
    TermList combine(const TermList& a, const TermList& b, std::size_t pos, const char* op) {
        if (a.intercept >= 0 || b.intercept >= 0)
            fail(pos, std::string("'") + op + "' cannot combine the intercept marks 0 or 1");
        if (!a.offsets.empty() || !b.offsets.empty())
            fail(pos, std::string("'") + op + "' cannot combine an offset");
        TermList out;
        for (const auto& ta : a.terms) {
            for (const auto& tb : b.terms) {
                Term t = ta;
                for (const auto& atom : tb.atoms) {
                    bool present = false;
                    for (const auto& x : t.atoms) present = present || x.key() == atom.key();
                    if (!present) t.atoms.push_back(atom);
                }
                add_term(out.terms, t);
            }
        }
        return out;
    }

    TermList primary() {
        const Token& t = peek();
        TermList out;
        if (t.kind == Tok::lparen) {
            next();
            out = sum();
            expect(Tok::rparen, "')'");
            return out;
        }
        if (t.kind == Tok::number) {
            next();
            if (t.number == 0.0) out.intercept = 0;
            else if (t.number == 1.0) out.intercept = 1;
            else fail(t.pos, "a number in the terms can only be 0 or 1 (the intercept), not '" +
                                 t.text + "'");
            return out;
        }
        if (t.kind != Tok::name) {
            fail(t.pos, t.kind == Tok::end ? "expected a term before the end"
                                           : "expected a term, found '" + t.text + "'");
        }
        Atom atom;
        atom.position = t.pos;
        const bool call = m_tokens[m_at + 1].kind == Tok::lparen;
        if (!call || t.text == "log" || t.text == "pow") {
            atom.kind = Atom::Kind::value;
            atom.expr = numexpr();
        } else if (t.text == "offset") {
            next();
            next();
            out.offsets.push_back(numexpr());
            expect(Tok::rparen, "')' closing offset(");
            return out;
        } else if (t.text == "ref") {
            next();
            next();
            atom.kind = Atom::Kind::reference;
            const Token& col = expect(Tok::name, "a categorical column name in ref(column, level)");
            atom.expr.kind = NumExpr::Kind::column;
            atom.expr.name = col.text;
            atom.expr.position = col.pos;
            expect(Tok::comma, "',' then the reference level in ref(column, level)");
            const Token& lev = peek();
            if (lev.kind != Tok::name && lev.kind != Tok::number && lev.kind != Tok::string)
                fail(lev.pos, "expected the reference level (a name, number or \"quoted\" text)");
            next();
            atom.ref_level = lev.text;
            atom.level_position = lev.pos;
            expect(Tok::rparen, "')' closing ref(");
        } else if (t.text == "orthpoly") {
            next();
            next();
            atom.kind = Atom::Kind::orthpoly;
            atom.expr = numexpr();
            expect(Tok::comma, "',' then the degree in orthpoly(x, k)");
            atom.degree = positive_int("the degree k of orthpoly(x, k)");
            expect(Tok::rparen, "')' closing orthpoly(");
        } else if (t.text == "nspline") {
            next();
            next();
            atom.kind = Atom::Kind::nspline;
            atom.expr = numexpr();
            expect(Tok::comma, "',' then df = k or knots = [...] in nspline(x, ...)");
            if (peek().kind == Tok::name) {
                const Token& arg = next();
                expect(Tok::equals, "'=' after '" + arg.text + "'");
                if (arg.text == "df") {
                    atom.df = positive_int("df of nspline(x, df = k)");
                } else if (arg.text == "knots") {
                    expect(Tok::lbracket, "'[' opening the knot list");
                    while (true) {
                        const std::size_t pos = peek().pos;
                        const double k = signed_number("a knot value");
                        if (!atom.knots.empty() && !(k > atom.knots.back()))
                            fail(pos, "knots must be strictly increasing");
                        atom.knots.push_back(k);
                        if (peek().kind != Tok::comma) break;
                        next();
                    }
                    expect(Tok::rbracket, "']' closing the knot list");
                    atom.df = static_cast<int>(atom.knots.size()) + 1;
                } else {
                    fail(arg.pos, "nspline takes df = k or knots = [a, b, ...], not '" +
                                      arg.text + "'");
                }
            } else {
                atom.df = positive_int("df of nspline(x, df = k)");
            }
            expect(Tok::rparen, "')' closing nspline(");
        } else {
            fail(t.pos, "unknown function '" + t.text + "'; the functions are: " + k_functions);
        }
        Term term;
        term.atoms.push_back(std::move(atom));
        out.terms.push_back(std::move(term));
        return out;
    }

    std::string m_text;
    std::string m_key;
    std::vector<Token> m_tokens;
    std::size_t m_at = 0;
};

void collect_columns(const NumExpr& e, std::vector<std::string>& out) {
    if (e.kind == NumExpr::Kind::column) {
        if (std::find(out.begin(), out.end(), e.name) == out.end()) out.push_back(e.name);
    }
    for (const auto& a : e.args) collect_columns(a, out);
}

}  // namespace

std::string NumExpr::text() const {
    switch (kind) {
        case Kind::column: return name;
        case Kind::number: return format_number(value);
        case Kind::log: return "log(" + args.at(0).text() + ")";
        case Kind::pow: return "pow(" + args.at(0).text() + "," + format_number(value) + ")";
    }
    return name;
}

std::vector<std::string> NumExpr::columns() const {
    std::vector<std::string> out;
    collect_columns(*this, out);
    return out;
}

std::string Atom::key() const {
    switch (kind) {
        case Kind::value:
        case Kind::reference: return expr.text();
        case Kind::orthpoly: return "orthpoly(" + expr.text() + "," + std::to_string(degree) + ")";
        case Kind::nspline: {
            std::string s = "nspline(" + expr.text() + "," + std::to_string(df);
            if (!knots.empty()) {
                s += ",[";
                for (std::size_t i = 0; i < knots.size(); ++i) {
                    if (i > 0) s += ',';
                    s += format_number(knots[i]);
                }
                s += "]";
            }
            return s + ")";
        }
    }
    return expr.text();
}

std::string Term::label() const {
    std::string s;
    for (const auto& a : atoms) {
        if (!s.empty()) s += ":";
        s += a.kind == Atom::Kind::nspline && !a.knots.empty()
                 ? "nspline(" + a.expr.text() + "," + std::to_string(a.df) + ")"
                 : a.key();
    }
    return s;
}

std::string Response::text() const {
    return ratio ? value.text() + " / " + trials.text() : value.text();
}

std::vector<std::string> Formula::columns() const {
    std::vector<std::string> out;
    if (has_response) {
        collect_columns(response.value, out);
        if (response.ratio) collect_columns(response.trials, out);
    }
    for (const auto& t : terms)
        for (const auto& a : t.atoms) collect_columns(a.expr, out);
    for (const auto& o : offsets) collect_columns(o, out);
    return out;
}

Formula parse_formula(const std::string& text, const std::string& key) {
    Parser p(text, key.empty() ? text : key);
    return p.parse_formula();
}

NumExpr parse_numeric_expression(const std::string& text, const std::string& key) {
    Parser p(text, key.empty() ? text : key);
    return p.parse_expression();
}

}  // namespace safesite::stats
