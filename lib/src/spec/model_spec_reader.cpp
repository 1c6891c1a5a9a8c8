// Reading the TOML model file (docs/formats.md, "Model file"). toml++ stays in this file.
#include <algorithm>
#include <cmath>
#include <fstream>
#include <limits>
#include <set>
#include <sstream>

#include "safesite/io/near_match.hpp"
#include "safesite/spec/formula_source.hpp"
#include "safesite/spec/mesh_memory.hpp"
#include "safesite/spec/model_spec.hpp"
// toml++ with its internal checks tested, not assumed (issue 11; see the header).
#include "spec/detail/checked_toml.hpp"

namespace safesite::spec {

namespace {

using Keys = std::vector<std::string>;

/// The response column each vital rate's formula must have (the tables of census/transitions).
const char* response_of(const std::string& rate) {
    if (rate == "survival") return "survived";
    if (rate == "growth") return "size_next";
    if (rate == "flowering") return "flowered";
    if (rate == "seeds") return "seeds";
    return "size";  // recruit_size
}

std::string type_name(const toml::node& n) {
    switch (n.type()) {
        case toml::node_type::table: return "a table";
        case toml::node_type::array: return "an array";
        case toml::node_type::string: return "a string";
        case toml::node_type::integer: return "an integer";
        case toml::node_type::floating_point: return "a decimal number";
        case toml::node_type::boolean: return "a boolean";
        case toml::node_type::date: return "a date";
        case toml::node_type::time: return "a time";
        case toml::node_type::date_time: return "a date-time";
        default: return "nothing";
    }
}

std::string list(const Keys& keys) {
    std::string out;
    for (std::size_t i = 0; i < keys.size(); ++i) out += (i ? ", " : "") + keys[i];
    return out;
}

std::string fmt_number(double x) {
    std::ostringstream s;
    s.precision(12);
    s << x;
    return s.str();
}

/// State shared by all readers of one file.
struct Context {
    std::string file;
    std::string_view text;       // the file's text (to place errors inside string values)
    std::set<std::string> keys;  // generic key paths present (no array indices)

    [[noreturn]] void fail(const toml::source_region& where, const std::string& key,
                           const std::string& reason) const {
        throw SpecError({file, static_cast<std::size_t>(where.begin.line),
                         static_cast<std::size_t>(where.begin.column), key},
                        reason);
    }
    SourceLocation at(const toml::source_region& where, const std::string& key) const {
        return {file, static_cast<std::size_t>(where.begin.line),
                static_cast<std::size_t>(where.begin.column), key};
    }
};

/// Typed access to one TOML table: every lookup names the full key path in errors and records
/// the key as present.
class TableReader {
public:
    TableReader(const toml::table& table, std::string path, std::string generic, Context& ctx)
        : m_table(table), m_path(std::move(path)), m_generic(std::move(generic)), m_ctx(ctx) {}

    const toml::table& table() const { return m_table; }
    const std::string& path() const { return m_path; }
    std::string key(std::string_view k) const {
        return m_path.empty() ? std::string(k) : m_path + "." + std::string(k);
    }
    SourceLocation location() const { return m_ctx.at(m_table.source(), m_path); }
    SourceLocation location(std::string_view k) const {
        const toml::node* n = m_table.get(k);
        return n ? m_ctx.at(n->source(), key(k)) : location();
    }

    /// Refuse keys that are not in `allowed`, with a hint for near misses.
    void allow(const Keys& allowed) const {
        for (auto&& [k, v] : m_table) {
            (void)v;
            const std::string name(k.str());
            if (std::find(allowed.begin(), allowed.end(), name) != allowed.end()) continue;
            std::string reason = "unknown key '" + key(name) + "'" +
                                 io::did_you_mean(name, allowed);
            if (io::closest_match(name, allowed) == std::nullopt)
                reason += "; expected one of: " + list(allowed);
            m_ctx.fail(k.source(), key(name), reason);
        }
    }

    bool has(std::string_view k) const { return m_table.contains(k); }

    [[noreturn]] void fail(std::string_view k, const std::string& reason) const {
        const toml::node* n = m_table.get(k);
        m_ctx.fail(n ? n->source() : m_table.source(), key(k), reason);
    }
    [[noreturn]] void fail_here(const std::string& reason) const {
        m_ctx.fail(m_table.source(), m_path, reason);
    }
    [[noreturn]] void missing(std::string_view k, const std::string& what) const {
        m_ctx.fail(m_table.source(), key(k),
                   "missing required key '" + key(k) + "' (" + what + ")");
    }

    const toml::node* node(std::string_view k) const {
        const toml::node* n = m_table.get(k);
        if (n) m_ctx.keys.insert(m_generic.empty() ? std::string(k)
                                                   : m_generic + "." + std::string(k));
        return n;
    }

    [[noreturn]] void wrong_type(std::string_view k, const toml::node& n,
                                 const std::string& expected) const {
        m_ctx.fail(n.source(), key(k),
                   "'" + key(k) + "' must be " + expected + "; got " + type_name(n));
    }

    std::optional<std::string> string(std::string_view k) const {
        const toml::node* n = node(k);
        if (!n) return std::nullopt;
        if (!n->is_string()) wrong_type(k, *n, "a string");
        return n->as_string()->get();
    }
    std::string required_string(std::string_view k, const std::string& what) const {
        auto s = string(k);
        if (!s) missing(k, what);
        if (s->empty()) fail(k, "'" + key(k) + "' must not be empty");
        return *s;
    }
    /// A string that must be one of `choices`.
    std::optional<std::string> choice(std::string_view k, const Keys& choices) const {
        auto s = string(k);
        if (!s) return std::nullopt;
        if (std::find(choices.begin(), choices.end(), *s) == choices.end())
            fail(k, "'" + key(k) + "' = \"" + *s + "\" is not one of: " + list(choices) +
                        io::did_you_mean(*s, choices));
        return s;
    }

    static bool as_number(const toml::node& n, double& out) {
        if (n.is_floating_point()) {
            out = n.as_floating_point()->get();
            return true;
        }
        if (n.is_integer()) {
            out = static_cast<double>(n.as_integer()->get());
            return true;
        }
        return false;
    }

    std::optional<double> number(std::string_view k) const {
        const toml::node* n = node(k);
        if (!n) return std::nullopt;
        double x = 0.0;
        if (!as_number(*n, x)) wrong_type(k, *n, "a number");
        if (!std::isfinite(x)) fail(k, "'" + key(k) + "' must be a finite number");
        return x;
    }
    std::optional<std::int64_t> integer(std::string_view k) const {
        const toml::node* n = node(k);
        if (!n) return std::nullopt;
        if (!n->is_integer()) wrong_type(k, *n, "an integer");
        return n->as_integer()->get();
    }
    std::optional<bool> boolean(std::string_view k) const {
        const toml::node* n = node(k);
        if (!n) return std::nullopt;
        if (!n->is_boolean()) wrong_type(k, *n, "true or false");
        return n->as_boolean()->get();
    }
    std::optional<Keys> strings(std::string_view k) const {
        const toml::node* n = node(k);
        if (!n) return std::nullopt;
        if (!n->is_array()) wrong_type(k, *n, "an array of strings");
        Keys out;
        for (const toml::node& e : *n->as_array()) {
            if (!e.is_string()) wrong_type(k, e, "an array of strings");
            if (e.as_string()->get().empty())
                m_ctx.fail(e.source(), key(k), "'" + key(k) + "' holds an empty string");
            out.push_back(e.as_string()->get());
        }
        return out;
    }
    std::optional<std::vector<double>> numbers(std::string_view k) const {
        const toml::node* n = node(k);
        if (!n) return std::nullopt;
        if (!n->is_array()) wrong_type(k, *n, "an array of numbers");
        std::vector<double> out;
        for (const toml::node& e : *n->as_array()) {
            double x = 0.0;
            if (!as_number(e, x)) wrong_type(k, e, "an array of numbers");
            if (!std::isfinite(x))
                m_ctx.fail(e.source(), key(k), "'" + key(k) + "' holds a non-finite number");
            out.push_back(x);
        }
        return out;
    }
    /// A table of name → number (an inline table or a sub-table), in key order.
    std::optional<std::vector<std::pair<std::string, double>>> number_map(
        std::string_view k) const {
        const toml::node* n = node(k);
        if (!n) return std::nullopt;
        if (!n->is_table()) wrong_type(k, *n, "a table of numbers, e.g. { name = 0.5 }");
        std::vector<std::pair<std::string, double>> out;
        for (auto&& [name, v] : *n->as_table()) {
            double x = 0.0;
            if (!as_number(v, x))
                m_ctx.fail(v.source(), key(k) + "." + std::string(name.str()),
                           "'" + key(k) + "." + std::string(name.str()) +
                               "' must be a number; got " + type_name(v));
            if (!std::isfinite(x))
                m_ctx.fail(v.source(), key(k), "'" + key(k) + "' holds a non-finite number");
            out.emplace_back(std::string(name.str()), x);
        }
        return out;
    }
    /// A table of name → string.
    std::optional<io::ColumnMap> string_map(std::string_view k, const Keys& allowed_names) const {
        const toml::node* n = m_table.get(k);
        if (!n) return std::nullopt;
        if (!n->is_table()) wrong_type(k, *n, "a table of strings");
        TableReader sub(*n->as_table(), key(k),
                        (m_generic.empty() ? "" : m_generic + ".") + std::string(k), m_ctx);
        sub.allow(allowed_names);
        io::ColumnMap out;
        for (const auto& name : allowed_names)
            if (auto s = sub.string(name)) {
                if (s->empty()) sub.fail(name, "'" + sub.key(name) + "' must not be empty");
                out[name] = *s;
            }
        return out;
    }
    /// A sub-table (not an inline value), or nothing.
    std::optional<TableReader> table(std::string_view k) const {
        const toml::node* n = m_table.get(k);
        if (!n) return std::nullopt;
        if (!n->is_table()) wrong_type(k, *n, "a table");
        return TableReader(*n->as_table(), key(k),
                           (m_generic.empty() ? "" : m_generic + ".") + std::string(k), m_ctx);
    }

    // Range checks with the key in the message.
    void require_in(std::string_view k, double x, double lo, double hi) const {
        if (!(x >= lo && x <= hi))
            fail(k, "'" + key(k) + "' = " + fmt_number(x) + " is out of range; expected " +
                        fmt_number(lo) + " ≤ value ≤ " + fmt_number(hi));
    }
    void require_at_least(std::string_view k, double x, double lo) const {
        if (!(x >= lo))
            fail(k, "'" + key(k) + "' = " + fmt_number(x) + " is out of range; expected ≥ " +
                        fmt_number(lo));
    }
    void require_positive(std::string_view k, double x) const {
        if (!(x > 0.0))
            fail(k, "'" + key(k) + "' = " + fmt_number(x) + " is out of range; expected > 0");
    }

private:
    const toml::table& m_table;
    std::string m_path;
    std::string m_generic;
    Context& m_ctx;
};

std::filesystem::path resolve(const std::filesystem::path& model_file, const std::string& p) {
    const std::filesystem::path given(p);
    if (given.is_absolute()) return given.lexically_normal();
    return (model_file.parent_path() / given).lexically_normal();
}

const Keys k_census_columns{"plant",    "year",  "plot",     "microsite", "size", "status",
                            "flowered", "seeds", "seedling", "x",         "y",    "neighbour_size"};
const Keys k_trapping_columns{"neighbour", "form",     "neighbour_size",
                              "seed_type", "launched", "trapped"};
const Keys k_retention_columns{"seed", "station", "microsite", "seed_type", "day", "present"};

/// Columns of the table each rate's formula sees (census/transitions.hpp).
const Keys k_transition_factors{"microsite", "plot", "plant"};
const Keys k_transition_numeric{"size", "size_next", "survived", "flowered", "seeds",
                                "seedling"};
const Keys k_recruit_factors{"microsite", "plot"};

/// A map over microsite labels: keys must be known labels (with a hint), optionally all of
/// them, optionally excluding bare soil. Values checked by `check`.
template <class Check>
std::map<std::string, double> label_map(const TableReader& r, std::string_view k,
                                        const std::vector<std::pair<std::string, double>>& m,
                                        const MicrositeSpec& ms, bool complete, bool no_bare,
                                        Check check) {
    Keys allowed;
    for (const auto& l : ms.labels)
        if (!(no_bare && l == ms.bare)) allowed.push_back(l);
    std::map<std::string, double> out;
    const toml::table& sub = *r.table().get(k)->as_table();
    for (const auto& [label, value] : m) {
        const toml::node* vn = sub.get(label);
        const std::string where = r.key(k) + "." + label;
        if (no_bare && label == ms.bare)
            throw SpecError({r.location(k).file, vn->source().begin.line,
                             vn->source().begin.column, where},
                            "'" + where + "': '" + label +
                                "' is the bare-soil microsite; expected a neighbour form (" +
                                list(allowed) + ")");
        if (std::find(allowed.begin(), allowed.end(), label) == allowed.end())
            throw SpecError({r.location(k).file, vn->source().begin.line,
                             vn->source().begin.column, where},
                            "'" + where + "': unknown microsite '" + label + "'" +
                                io::did_you_mean(label, allowed) + "; expected one of: " +
                                list(allowed));
        check(where, value, *vn);
        out[label] = value;
    }
    if (complete)
        for (const auto& l : allowed)
            if (!out.count(l))
                r.fail(k, "'" + r.key(k) + "' has no value for microsite '" + l +
                              "'; expected one for each of: " + list(allowed));
    return out;
}

/// A value check for label_map: lo ≤ x ≤ hi, else a SpecError at the value saying `expected`.
auto range_check(const std::string& file, double lo, double hi, std::string expected) {
    return [file, lo, hi, expected](const std::string& where, double x, const toml::node& n) {
        if (!(x >= lo && x <= hi))
            throw SpecError({file, n.source().begin.line, n.source().begin.column, where},
                            "'" + where + "' = " + fmt_number(x) + " is out of range; expected " +
                                expected);
    };
}

/// Fractions over all microsites: each in [0, 1], summing to 1 within 1e-9. Label order.
std::vector<double> read_fractions(const TableReader& r, std::string_view k,
                                   const std::vector<std::pair<std::string, double>>& m,
                                   const MicrositeSpec& ms, const std::string& file) {
    const auto map =
        label_map(r, k, m, ms, true, false, range_check(file, 0.0, 1.0, "0 ≤ value ≤ 1"));
    std::vector<double> out;
    double sum = 0.0;
    for (const auto& l : ms.labels) {
        out.push_back(map.at(l));
        sum += map.at(l);
    }
    // Tolerance 1e-9: values typed with up to 9 decimals still sum exactly enough; a real
    // mistake (0.6 + 0.25 + 0.1) is off by ≥ 1e-3 (common practice).
    if (std::abs(sum - 1.0) > 1e-9)
        r.fail(k, "'" + r.key(k) + "' sums to " + fmt_number(sum) +
                      "; expected the fractions to sum to 1 (within 1e-9)");
    return out;
}

template <class E>
E enum_of(const std::string& s, const std::vector<std::pair<const char*, E>>& table) {
    for (const auto& [name, value] : table)
        if (s == name) return value;
    return table.front().second;  // unreachable after choice() validated the spelling
}

void check_groups(const TableReader& r, std::string_view k, const Keys& groups,
                  const Keys& allowed) {
    for (const auto& g : groups) {
        if (g == "year")
            r.fail(k, "'" + r.key(k) + "' lists 'year'; use year = \"random\" for a random "
                      "year intercept");
        if (std::find(allowed.begin(), allowed.end(), g) == allowed.end())
            r.fail(k, "'" + r.key(k) + "': '" + g + "' is not a grouping column" +
                          io::did_you_mean(g, allowed) + "; expected one of: " + list(allowed));
    }
}

/// Where the string value `n` stands in the file; its text is verbatim on the line when the
/// characters after the opening quote are exactly the string followed by the same quote.
FormulaSource formula_source(const Context& ctx, const toml::node& n, const std::string& key) {
    FormulaSource out;
    out.value = ctx.at(n.source(), key);
    if (!n.is_string() || out.value.line == 0 || out.value.column == 0) return out;
    const std::string& value = n.as_string()->get();
    std::size_t start = 0;
    for (std::size_t line = 1; line < out.value.line; ++line) {
        start = ctx.text.find('\n', start);
        if (start == std::string_view::npos) return out;
        ++start;
    }
    // toml++ counts columns in characters (UTF-8 code points), from 1.
    std::size_t at = start, column = 1;
    while (column < out.value.column && at < ctx.text.size() && ctx.text[at] != '\n') {
        ++at;
        while (at < ctx.text.size() && (static_cast<unsigned char>(ctx.text[at]) & 0xC0) == 0x80)
            ++at;
        ++column;
    }
    if (at >= ctx.text.size() || (ctx.text[at] != '"' && ctx.text[at] != '\'')) return out;
    const char quote = ctx.text[at];
    if (ctx.text.substr(at + 1, value.size()) == value &&
        ctx.text.substr(at + 1 + value.size(), 1) == std::string_view(&quote, 1) &&
        value.find('\n') == std::string::npos)
        out.text_column = out.value.column + 1;
    return out;
}

/// The columns of the table each vital rate is fitted on (census/transition_data.hpp).
FormulaColumns rate_columns(const std::string& rate, const MicrositeSpec& ms) {
    FormulaColumns c;
    if (rate == "survival" || rate == "growth") {
        c.table = "transitions";
        c.numeric = {"size", "size_next", "survived", "flowered", "seeds", "seedling"};
        c.categorical = {"microsite", "year", "plot", "plant"};
    } else if (rate == "flowering" || rate == "seeds") {
        c.table = "plants";
        c.numeric = {"size", "flowered", "seeds", "seedling"};
        c.categorical = {"microsite", "year", "plot", "plant"};
    } else {
        c.table = "recruits";
        c.numeric = {"size"};
        c.categorical = {"microsite", "year", "plot"};
    }
    c.levels.assign(c.categorical.size(), {});
    c.levels[0] = ms.labels;
    return c;
}

/// The columns of the trapping trials and of the retention intervals (arrival/*_data.hpp).
FormulaColumns trapping_columns(const MicrositeSpec& ms) {
    FormulaColumns c;
    c.table = "trapping trials";
    c.numeric = {"neighbour_size", "launched", "trapped"};
    c.categorical = {"neighbour", "form", "seed_type"};
    c.response_only = {"launched", "trapped", "neighbour"};
    c.levels.assign(3, {});
    for (const auto& l : ms.labels)
        if (l != ms.bare) c.levels[1].push_back(l);
    return c;
}

FormulaColumns retention_columns(const MicrositeSpec& ms) {
    FormulaColumns c;
    c.table = "retention intervals";
    c.numeric = {"start_day", "interval_days", "left", "log_interval"};
    c.categorical = {"seed", "station", "microsite", "seed_type"};
    c.response_only = {"start_day", "left", "log_interval", "seed", "station"};
    c.levels.assign(4, {});
    c.levels[2] = ms.labels;
    return c;
}

/// Parse and resolve the formula under key `k` (a string) or each formula of an array.
void check_formula(const TableReader& r, std::string_view k, const FormulaColumns& columns,
                   const std::string& response, const Context& ctx,
                   std::vector<FormulaSource>* sources = nullptr) {
    const toml::node* n = r.table().get(k);
    if (!n) return;
    if (n->is_array()) {
        std::size_t i = 0;
        for (const toml::node& e : *n->as_array()) {
            ++i;
            const FormulaSource src =
                formula_source(ctx, e, r.key(k) + "[" + std::to_string(i) + "]");
            check_formula_text(src, e.as_string()->get(), columns, response);
            if (sources) sources->push_back(src);
        }
        return;
    }
    const FormulaSource src = formula_source(ctx, *n, r.key(k));
    check_formula_text(src, n->as_string()->get(), columns, response);
    if (sources) sources->push_back(src);
}

RateSpec read_rate(const TableReader& r, const std::string& name, const MicrositeSpec& ms,
                   Context& ctx) {
    r.allow({"family", "link", "formula", "candidates", "year", "groups", "random_slope",
             "spread", "coefficients", "sd", "spread_coefficients", "theta", "year_sd"});
    RateSpec rate;
    rate.name = name;
    rate.at = r.location();
    const Keys families{"binomial", "poisson", "negbin", "gaussian", "gaussian-spread"};
    const Keys links{"logit", "probit", "cloglog", "log", "identity"};
    auto family = r.choice("family", families);
    if (!family) r.missing("family", "one of " + list(families));
    rate.family = *family;
    Keys allowed_links;
    if (rate.family == "binomial")
        allowed_links = {"logit", "probit", "cloglog"};
    else if (rate.family == "poisson" || rate.family == "negbin")
        allowed_links = {"log"};
    else
        allowed_links = {"identity"};
    if (auto link = r.choice("link", links)) {
        if (std::find(allowed_links.begin(), allowed_links.end(), *link) == allowed_links.end())
            r.fail("link", "'" + r.key("link") + "' = \"" + *link + "\" does not suit family " +
                               rate.family + "; expected " + list(allowed_links));
        rate.link = *link;
    } else {
        rate.link = allowed_links.front();  // the canonical link
    }

    const char* response = response_of(name);
    rate.formula = r.required_string("formula", std::string("e.g. \"") + response + " ~ size\"");
    rate.formula_at = r.location("formula");
    const FormulaColumns columns = rate_columns(name, ms);
    std::vector<FormulaSource> sources;
    check_formula(r, "formula", columns, response, ctx, &sources);
    rate.formula_source = sources.front();
    if (auto c = r.strings("candidates")) {
        sources.clear();
        check_formula(r, "candidates", columns, response, ctx, &sources);
        rate.candidates = *c;
        rate.candidate_sources = sources;
    }

    if (auto y = r.choice("year", {"none", "fixed", "random"}))
        rate.year = enum_of<YearHandling>(*y, {{"none", YearHandling::none},
                                               {"fixed", YearHandling::fixed},
                                               {"random", YearHandling::random}});
    const bool recruits = name == "recruit_size";
    if (auto g = r.strings("groups")) {
        check_groups(r, "groups", *g, recruits ? k_recruit_factors : k_transition_factors);
        rate.groups = *g;
    }
    if (auto s = r.string("random_slope")) {
        if (rate.year != YearHandling::random)
            r.fail("random_slope", "'" + r.key("random_slope") +
                                       "' needs year = \"random\" (a random slope by year)");
        const Keys numeric = recruits ? Keys{"size"} : k_transition_numeric;
        if (std::find(numeric.begin(), numeric.end(), *s) == numeric.end())
            r.fail("random_slope", "'" + r.key("random_slope") + "' = \"" + *s +
                                       "\" is not a numeric column" +
                                       io::did_you_mean(*s, numeric) +
                                       "; expected one of: " + list(numeric));
        rate.random_slope = *s;
    }
    if (auto s = r.string("spread")) {
        if (rate.family != "gaussian-spread")
            r.fail("spread", "'" + r.key("spread") + "' is used only with family "
                                                      "\"gaussian-spread\"");
        const Keys numeric = recruits ? Keys{"size"} : k_transition_numeric;
        if (std::find(numeric.begin(), numeric.end(), *s) == numeric.end())
            r.fail("spread", "'" + r.key("spread") + "' = \"" + *s +
                                 "\" is not a numeric column" + io::did_you_mean(*s, numeric));
        rate.spread = *s;
    } else if (rate.family == "gaussian-spread") {
        rate.spread = "size";
    }

    // Fixed parameter values.
    if (auto c = r.number_map("coefficients")) {
        if (c->empty()) r.fail("coefficients", "'" + r.key("coefficients") + "' is empty");
        rate.coefficients.emplace(c->begin(), c->end());
    }
    const bool fixed = rate.is_fixed();
    auto only_fixed = [&](std::string_view k) {
        if (!fixed && r.has(k))
            r.fail(k, "'" + r.key(k) + "' is used only with fixed coefficients; add "
                                       "'coefficients' or remove it");
    };
    for (const char* k : {"sd", "spread_coefficients", "theta", "year_sd"}) only_fixed(k);
    if (auto sd = r.number("sd")) {
        if (rate.family != "gaussian")
            r.fail("sd", "'" + r.key("sd") + "' is used only with family \"gaussian\"" +
                             (rate.family == "gaussian-spread"
                                  ? std::string("; use spread_coefficients")
                                  : std::string()));
        r.require_positive("sd", *sd);
        rate.sd = sd;
    }
    if (auto g = r.numbers("spread_coefficients")) {
        if (rate.family != "gaussian-spread")
            r.fail("spread_coefficients", "'" + r.key("spread_coefficients") +
                                              "' is used only with family \"gaussian-spread\"");
        if (g->size() != 2)
            r.fail("spread_coefficients", "'" + r.key("spread_coefficients") + "' has " +
                                              std::to_string(g->size()) +
                                              " values; expected 2 (g0, g1)");
        rate.spread_coefficients = *g;
    }
    if (auto t = r.number("theta")) {
        if (rate.family != "negbin")
            r.fail("theta", "'" + r.key("theta") + "' is used only with family \"negbin\"");
        r.require_positive("theta", *t);
        rate.theta = t;
    }
    if (auto ysd = r.number("year_sd")) {
        if (rate.year != YearHandling::random)
            r.fail("year_sd", "'" + r.key("year_sd") + "' needs year = \"random\"");
        r.require_at_least("year_sd", *ysd, 0.0);
        rate.year_sd = ysd;
    }
    if (fixed) {
        if (rate.family == "gaussian" && !rate.sd)
            r.missing("sd", "a fixed gaussian rate needs its residual SD");
        if (rate.family == "gaussian-spread" && rate.spread_coefficients.empty())
            r.missing("spread_coefficients", "a fixed gaussian-spread rate needs g0, g1");
        if (rate.family == "negbin" && !rate.theta)
            r.missing("theta", "a fixed negbin rate needs its dispersion");
        if (rate.year == YearHandling::random && !rate.year_sd)
            r.missing("year_sd", "a fixed rate with year = \"random\" needs the SD of the year "
                                 "intercepts");
    }
    return rate;
}

ArrivalSpec read_arrival(const TableReader& r, const MicrositeSpec& ms, const Context& ctx) {
    r.allow({"method", "fractions", "cover", "exposure_days", "relanding", "seed_type",
             "trapping_formula", "trapping_groups", "retention_formula", "retention_groups"});
    ArrivalSpec a;
    a.at = r.location();
    const auto method = r.choice("method", {"fractions", "experiments"});
    a.method = method && *method == "experiments" ? ArrivalMethod::experiments
                                                  : ArrivalMethod::fractions;
    const Keys chain_keys{"cover",           "exposure_days",     "relanding",
                          "seed_type",       "trapping_formula",  "trapping_groups",
                          "retention_formula", "retention_groups"};
    if (a.method == ArrivalMethod::fractions) {
        for (const auto& k : chain_keys)
            if (r.has(k))
                r.fail(k, "'" + r.key(k) + "' is used only with method = \"experiments\"");
        auto m = r.number_map("fractions");
        if (!m) r.missing("fractions", "arrival fraction per microsite, or method = "
                                       "\"experiments\"");
        a.fractions = read_fractions(r, "fractions", *m, ms, ctx.file);
        return a;
    }
    if (r.has("fractions"))
        r.fail("fractions", "'" + r.key("fractions") + "' is not used with method = "
                            "\"experiments\"; give fractions in a [[scenario]] instead");
    const toml::node* cover = r.node("cover");
    if (!cover) r.missing("cover", "cover per neighbour form, or \"census\"");
    if (cover->is_string()) {
        if (cover->as_string()->get() != "census")
            r.fail("cover", "'" + r.key("cover") + "' = \"" + cover->as_string()->get() +
                                "\" is not understood; expected \"census\" or a table of "
                                "cover per neighbour form");
        a.cover_from_census = true;
    } else {
        auto m = r.number_map("cover");
        a.cover = label_map(r, "cover", *m, ms, true, true,
                            range_check(ctx.file, 0.0, 1.0, "0 ≤ cover ≤ 1"));
        double sum = 0.0;
        for (const auto& [l, c] : a.cover) sum += c;
        if (sum > 1.0 + 1e-9)
            r.fail("cover", "'" + r.key("cover") + "' sums to " + fmt_number(sum) +
                                "; expected the cover of the neighbour forms to sum to ≤ 1");
    }
    auto days = r.number("exposure_days");
    if (!days) r.missing("exposure_days", "days from seed release to germination");
    r.require_at_least("exposure_days", *days, 0.0);
    a.exposure_days = *days;
    auto rel = r.number("relanding");
    if (!rel) r.missing("relanding", "probability that a departing seed lands again");
    r.require_in("relanding", *rel, 0.0, 1.0);
    a.relanding = *rel;
    a.seed_type = r.required_string("seed_type", "the focal seed type");
    a.trapping_formula = r.required_string("trapping_formula", "e.g. \"trapped / launched ~ "
                                                               "form\"");
    std::vector<FormulaSource> sources;
    check_formula(r, "trapping_formula", trapping_columns(ms), "", ctx, &sources);
    a.retention_formula = r.required_string("retention_formula", "e.g. \"left ~ microsite\"");
    check_formula(r, "retention_formula", retention_columns(ms), "", ctx, &sources);
    a.trapping_formula_source = sources.at(0);
    a.retention_formula_source = sources.at(1);
    if (auto g = r.strings("trapping_groups")) {
        check_groups(r, "trapping_groups", *g, {"neighbour", "form", "seed_type"});
        a.trapping_groups = *g;
    }
    if (auto g = r.strings("retention_groups")) {
        check_groups(r, "retention_groups", *g, {"seed", "station", "microsite", "seed_type"});
        a.retention_groups = *g;
    }
    return a;
}

ScenarioSpec read_scenario(const TableReader& r, const MicrositeSpec& ms, const Context& ctx) {
    r.allow({"name", "fractions", "fraction_shares", "cover_factor", "trapping_odds_factor",
             "hazard_factor", "exposure_days", "relanding", "establishment_factor"});
    ScenarioSpec s;
    s.at = r.location();
    s.name = r.required_string("name", "a name for the scenario");
    if (auto m = r.number_map("fractions"))
        s.fractions = read_fractions(r, "fractions", *m, ms, ctx.file);
    const auto nonneg = range_check(ctx.file, 0.0, std::numeric_limits<double>::infinity(),
                                    "a factor ≥ 0");
    if (auto m = r.number_map("cover_factor"))
        s.cover_factor = label_map(r, "cover_factor", *m, ms, false, true, nonneg);
    if (auto m = r.number_map("trapping_odds_factor"))
        s.trapping_odds_factor = label_map(r, "trapping_odds_factor", *m, ms, false, true, nonneg);
    if (auto m = r.number_map("hazard_factor"))
        s.hazard_factor = label_map(r, "hazard_factor", *m, ms, false, false, nonneg);
    if (auto m = r.number_map("establishment_factor"))
        s.establishment_factor =
            label_map(r, "establishment_factor", *m, ms, false, false, nonneg);
    if (auto m = r.number_map("fraction_shares")) {
        s.fraction_shares = label_map(r, "fraction_shares", *m, ms, false, false, nonneg);
        double total = 0.0;
        for (const auto& [label, share] : s.fraction_shares) total += share;
        if (!(total > 0.0))
            r.fail("fraction_shares", "'" + r.key("fraction_shares") +
                                          "' is all zero; expected at least one share > 0");
    }
    if (auto d = r.number("exposure_days")) {
        r.require_at_least("exposure_days", *d, 0.0);
        s.exposure_days = d;
    }
    if (auto p = r.number("relanding")) {
        r.require_in("relanding", *p, 0.0, 1.0);
        s.relanding = p;
    }
    const bool direct = s.fractions || !s.fraction_shares.empty();
    if (s.fractions && !s.fraction_shares.empty())
        r.fail_here("scenario '" + s.name + "' gives both fractions and fraction_shares; "
                    "give one");
    if (direct && s.changes_chain())
        r.fail_here("scenario '" + s.name + "' gives arrival fractions and also changes the "
                    "arrival chain (cover, trapping, hazard, exposure or re-landing); the "
                    "fractions would replace the chain, so give one or the other");
    if (!direct && !s.changes_chain() && s.establishment_factor.empty())
        r.fail_here("scenario '" + s.name + "' changes nothing; expected at least one of "
                    "fractions, fraction_shares, cover_factor, trapping_odds_factor, "
                    "hazard_factor, exposure_days, relanding, establishment_factor");
    return s;
}

/// A whole number n with 1 ≤ n ≤ 100000 (a guard against typos that would make a simulation
/// run for hours; common practice).
std::int64_t count_key(const TableReader& r, std::string_view k, const std::string& what) {
    auto n = r.integer(k);
    if (!n) r.missing(k, what);
    if (*n < 1 || *n > 100000)
        r.fail(k, "'" + r.key(k) + "' = " + std::to_string(*n) +
                      " is out of range; expected an integer 1 ≤ n ≤ 100000");
    return *n;
}

double required_number(const TableReader& r, std::string_view k, const std::string& what) {
    auto x = r.number(k);
    if (!x) r.missing(k, what);
    return *x;
}

/// Check days: start at 0, at least two, strictly increasing.
std::vector<double> schedule_key(const TableReader& r, std::string_view k) {
    auto days = r.numbers(k);
    if (!days) r.missing(k, "check days, e.g. [0, 1, 3, 7, 14]");
    if (days->size() < 2 || days->front() != 0.0)
        r.fail(k, "'" + r.key(k) + "' must start at day 0 and hold at least two checks");
    for (std::size_t i = 1; i < days->size(); ++i)
        if (!((*days)[i] > (*days)[i - 1]))
            r.fail(k, "'" + r.key(k) + "': day " + fmt_number((*days)[i]) + " follows day " +
                          fmt_number((*days)[i - 1]) + "; expected strictly increasing days");
    return *days;
}

TrappingTruthSpec read_trapping_truth(const TableReader& r, const MicrositeSpec& ms,
                                      const Context& ctx) {
    r.allow({"intercept", "log_size_slope", "form_effect", "seed_type_effect", "neighbour_sd",
             "neighbours_per_form", "log_size_mean", "log_size_sd", "launched"});
    TrappingTruthSpec t;
    t.intercept = required_number(r, "intercept", "β0 on the logit scale");
    t.log_size_slope =
        required_number(r, "log_size_slope", "slope per unit of log(neighbour_size)");
    const auto any = range_check(ctx.file, -std::numeric_limits<double>::infinity(),
                                 std::numeric_limits<double>::infinity(), "a finite number");
    if (auto m = r.number_map("form_effect"))
        t.form_effect = label_map(r, "form_effect", *m, ms, false, true, any);
    auto types = r.number_map("seed_type_effect");
    if (!types)
        r.missing("seed_type_effect", "logit-scale effect per seed type, e.g. { plumed = 0.0 }");
    if (types->empty())
        r.fail("seed_type_effect", "'" + r.key("seed_type_effect") +
                                       "' is empty; expected at least one seed type");
    t.seed_type_effect.insert(types->begin(), types->end());
    if (auto sd = r.number("neighbour_sd")) {
        r.require_at_least("neighbour_sd", *sd, 0.0);
        t.neighbour_sd = *sd;
    }
    t.neighbours_per_form = static_cast<int>(
        count_key(r, "neighbours_per_form", "neighbours tried per growth form"));
    auto means = r.number_map("log_size_mean");
    if (!means) r.missing("log_size_mean", "mean of log(neighbour size) per neighbour form");
    t.log_size_mean = label_map(r, "log_size_mean", *means, ms, true, true, any);
    t.log_size_sd = required_number(r, "log_size_sd", "SD of log(neighbour size)");
    r.require_at_least("log_size_sd", t.log_size_sd, 0.0);
    t.launched = count_key(r, "launched", "seeds launched per trial");
    return t;
}

RetentionTruthSpec read_retention_truth(const TableReader& r, const MicrositeSpec& ms,
                                        const Keys& seed_types, const Context& ctx) {
    r.allow({"hazard_per_day", "station_sd", "stations_per_microsite", "seeds_per_station",
             "schedule", "irregular_schedule", "irregular_share"});
    RetentionTruthSpec t;
    // hazard_per_day = { microsite = { seed_type = h, ... }, ... }: every microsite × type.
    const toml::node* h = r.node("hazard_per_day");
    if (!h) r.missing("hazard_per_day", "daily hazard per microsite and seed type");
    if (!h->is_table())
        r.wrong_type("hazard_per_day", *h,
                     "a table of tables, e.g. { gravel = { plumed = 0.09 } }");
    const std::string hkey = r.key("hazard_per_day");
    for (auto&& [site_key, site_node] : *h->as_table()) {
        const std::string site(site_key.str());
        const std::string where = hkey + "." + site;
        if (!ms.index(site))
            ctx.fail(site_key.source(), where,
                     "'" + where + "': unknown microsite '" + site + "'" +
                         io::did_you_mean(site, ms.labels) + "; expected one of: " +
                         list(ms.labels));
        if (!site_node.is_table())
            ctx.fail(site_node.source(), where,
                     "'" + where + "' must be a table of hazards per seed type; got " +
                         type_name(site_node));
        auto& row = t.hazard_per_day[site];
        for (auto&& [type_key, value] : *site_node.as_table()) {
            const std::string type(type_key.str());
            const std::string at = where + "." + type;
            if (std::find(seed_types.begin(), seed_types.end(), type) == seed_types.end())
                ctx.fail(type_key.source(), at,
                         "'" + at + "': unknown seed type '" + type + "'" +
                             io::did_you_mean(type, seed_types) +
                             "; expected one of the seed types of "
                             "simulate.trapping.seed_type_effect: " + list(seed_types));
            double x = 0.0;
            if (!TableReader::as_number(value, x))
                ctx.fail(value.source(), at,
                         "'" + at + "' must be a number; got " + type_name(value));
            if (!(std::isfinite(x) && x >= 0.0))
                ctx.fail(value.source(), at,
                         "'" + at + "' = " + fmt_number(x) +
                             " is out of range; expected a finite hazard ≥ 0 per day");
            row[type] = x;
        }
        for (const auto& type : seed_types)
            if (!row.count(type))
                ctx.fail(site_node.source(), where,
                         "'" + where + "' has no hazard for seed type '" + type +
                             "'; expected one for each of: " + list(seed_types));
    }
    for (const auto& site : ms.labels)
        if (!t.hazard_per_day.count(site))
            r.fail("hazard_per_day", "'" + hkey + "' has no hazards for microsite '" + site +
                                         "'; expected a table for each of: " + list(ms.labels));
    if (auto sd = r.number("station_sd")) {
        r.require_at_least("station_sd", *sd, 0.0);
        t.station_sd = *sd;
    }
    t.stations_per_microsite = static_cast<int>(
        count_key(r, "stations_per_microsite", "retention stations per microsite"));
    t.seeds_per_station = static_cast<int>(
        count_key(r, "seeds_per_station", "seeds of each type placed per station"));
    t.schedule = schedule_key(r, "schedule");
    if (auto share = r.number("irregular_share")) {
        r.require_in("irregular_share", *share, 0.0, 1.0);
        t.irregular_share = *share;
    }
    if (r.has("irregular_schedule")) {
        t.irregular_schedule = schedule_key(r, "irregular_schedule");
    } else if (t.irregular_share > 0.0) {
        r.missing("irregular_schedule", "the check days used for irregular_share of the seeds");
    }
    return t;
}

/// `[simulate]` of a truth file: both sub-tables, with `[arrival] method = "experiments"`, a
/// cover table and a focal seed type among the simulated ones.
ExperimentTruthSpec read_experiment_truth(const TableReader& r, const TableReader& arrival,
                                          const ArrivalSpec& a, const MicrositeSpec& ms,
                                          const Context& ctx) {
    r.allow({"trapping", "retention"});
    if (a.method != ArrivalMethod::experiments)
        r.fail_here("[simulate] (the truth of the seed experiments) needs arrival.method = "
                    "\"experiments\"");
    if (a.cover_from_census)
        arrival.fail("cover", "'arrival.cover' = \"census\" cannot be a truth: [simulate] "
                              "needs the cover of each neighbour form given as a table");
    auto trapping = r.table("trapping");
    if (!trapping)
        r.missing("trapping", "[simulate.trapping] must come with [simulate.retention]");
    auto retention = r.table("retention");
    if (!retention)
        r.missing("retention", "[simulate.retention] must come with [simulate.trapping]");
    ExperimentTruthSpec e;
    e.at = r.location();
    e.trapping = read_trapping_truth(*trapping, ms, ctx);
    const Keys types = e.trapping.seed_types();
    e.retention = read_retention_truth(*retention, ms, types, ctx);
    if (std::find(types.begin(), types.end(), a.seed_type) == types.end())
        arrival.fail("seed_type", "'arrival.seed_type' = \"" + a.seed_type +
                                      "\" is not a simulated seed type" +
                                      io::did_you_mean(a.seed_type, types) +
                                      "; expected one of simulate.trapping.seed_type_effect: " +
                                      list(types));
    return e;
}

DataSpec read_data(const TableReader& r, const std::filesystem::path& file) {
    r.allow({"census", "trapping", "retention", "columns", "trapping_columns",
             "retention_columns"});
    DataSpec d;
    auto path = [&](const char* k) -> std::optional<std::filesystem::path> {
        auto p = r.string(k);
        if (!p) return std::nullopt;
        if (p->empty()) r.fail(k, "'" + r.key(k) + "' must not be empty");
        return resolve(file, *p);
    };
    d.census = path("census");
    d.trapping = path("trapping");
    d.retention = path("retention");
    if (auto m = r.string_map("columns", k_census_columns)) d.census_columns = *m;
    if (auto m = r.string_map("trapping_columns", k_trapping_columns)) d.trapping_columns = *m;
    if (auto m = r.string_map("retention_columns", k_retention_columns))
        d.retention_columns = *m;
    return d;
}

MeshSpec read_mesh(const TableReader& r) {
    r.allow({"points", "rule", "eviction", "lower", "upper", "margin", "eviction_warning",
             "allow_sizes_outside"});
    MeshSpec mesh;
    if (auto n = r.integer("points")) {
        if (*n < 2)
            r.fail("points", "'mesh.points' = " + std::to_string(*n) +
                                 " is out of range; expected an integer ≥ 2");
        mesh.points = static_cast<std::size_t>(*n);
        mesh.points_at = r.location("points");
    }
    if (auto s = r.choice("rule", {"midpoint", "gauss-legendre"}))
        mesh.rule = *s == "midpoint" ? QuadratureRule::midpoint : QuadratureRule::gauss_legendre;
    if (auto s = r.choice("eviction", {"boundary", "discard"}))
        mesh.eviction = *s == "boundary" ? EvictionPolicy::boundary : EvictionPolicy::discard;
    mesh.lower = r.number("lower");
    mesh.upper = r.number("upper");
    if (mesh.lower && mesh.upper && !(*mesh.lower < *mesh.upper))
        r.fail("upper", "'mesh.upper' = " + fmt_number(*mesh.upper) +
                            " is not above 'mesh.lower' = " + fmt_number(*mesh.lower) +
                            "; expected lower < upper");
    if (auto m = r.number("margin")) {
        r.require_at_least("margin", *m, 0.0);
        mesh.margin = *m;
    }
    if (auto w = r.number("eviction_warning")) {
        r.require_at_least("eviction_warning", *w, 0.0);
        mesh.eviction_warning = *w;
    }
    if (auto b = r.boolean("allow_sizes_outside")) mesh.allow_sizes_outside = *b;
    mesh.lower_at = r.location("lower");
    mesh.upper_at = r.location("upper");
    return mesh;
}

MicrositeSpec read_microsites(const TableReader& r) {
    r.allow({"labels", "bare"});
    MicrositeSpec ms;
    auto labels = r.strings("labels");
    if (!labels) r.missing("labels", "the microsite labels, e.g. [\"gravel\", \"cushion\"]");
    if (labels->empty()) r.fail("labels", "'microsites.labels' is empty");
    std::set<std::string> seen;
    for (const auto& l : *labels)
        if (!seen.insert(l).second) r.fail("labels", "'microsites.labels' lists '" + l + "' twice");
    ms.labels = *labels;
    ms.bare = r.required_string("bare", "the bare-soil microsite label");
    auto idx = ms.index(ms.bare);
    if (!idx)
        r.fail("bare", "'microsites.bare' = \"" + ms.bare + "\" is not one of the labels" +
                           io::did_you_mean(ms.bare, *labels) + "; expected one of: " +
                           list(*labels));
    ms.bare_index = *idx;
    return ms;
}

EstablishmentSpec read_establishment(const TableReader& r, const MicrositeSpec& ms,
                                     const Context& ctx) {
    r.allow({"method", "values"});
    EstablishmentSpec e;
    if (auto m = r.choice("method", {"census", "fixed"}))
        e.method = *m == "census" ? EstablishmentMethod::census : EstablishmentMethod::fixed;
    if (e.method == EstablishmentMethod::fixed) {
        auto m = r.number_map("values");
        if (!m) r.missing("values", "establishment probability per microsite");
        const auto map = label_map(r, "values", *m, ms, true, false,
                                   range_check(ctx.file, 0.0, 1.0, "a probability 0 ≤ p ≤ 1"));
        for (const auto& l : ms.labels) e.values.push_back(map.at(l));
    } else if (r.has("values")) {
        r.fail("values", "'establishment.values' is used only with method = \"fixed\"");
    }
    return e;
}

PerturbationSpec read_perturbation(const TableReader& r, bool census_flags_seedlings) {
    r.allow({"juvenile", "juvenile_size_below", "survival_changes"});
    PerturbationSpec p;
    if (auto j = r.choice("juvenile", {"seedling", "size"}))
        p.juvenile = *j == "seedling" ? JuvenileRule::seedling : JuvenileRule::size;
    p.juvenile_size_below = r.number("juvenile_size_below");
    if (p.juvenile == JuvenileRule::size && !p.juvenile_size_below)
        r.missing("juvenile_size_below", "the transformed size below which a plant is juvenile");
    if (p.juvenile == JuvenileRule::seedling && p.juvenile_size_below)
        r.fail("juvenile_size_below",
               "'perturbation.juvenile_size_below' is used only with juvenile = \"size\"");
    if (p.juvenile == JuvenileRule::seedling && !census_flags_seedlings)
        r.fail("juvenile", "'perturbation.juvenile' = \"seedling\" needs the census to mark "
                           "seedlings (census.seedling_flag = true); use juvenile = \"size\"");
    auto changes = r.numbers("survival_changes");
    if (!changes) r.missing("survival_changes", "proportional changes, e.g. [-0.2, 0.0, 0.2]");
    for (double c : *changes)
        if (!(c >= -1.0))
            r.fail("survival_changes", "'perturbation.survival_changes' holds " +
                                           fmt_number(c) + "; expected changes ≥ -1");
    p.survival_changes = *changes;
    return p;
}

UncertaintySpec read_uncertainty(const TableReader& r) {
    r.allow({"replicates", "seed", "level"});
    UncertaintySpec u;
    if (auto l = r.number("level")) {
        if (!(*l > 0.0 && *l < 1.0))
            r.fail("level", "'uncertainty.level' = " + fmt_number(*l) +
                                " is out of range; expected 0 < level < 1");
        u.level = *l;
    }
    if (auto n = r.integer("replicates")) {
        u.replicates_at = r.location("replicates");
        const auto most = static_cast<std::int64_t>(k_max_replicates);
        const auto least = static_cast<std::int64_t>(min_replicates(u.level));
        if (*n < 0 || *n > most)
            r.fail("replicates", "'uncertainty.replicates' = " + std::to_string(*n) +
                                     " is out of range; expected 0 (no intervals) or an integer "
                                     "from " + std::to_string(least) + " to " +
                                     std::to_string(most));
        if (*n > 0 && *n < least)
            r.fail("replicates",
                   "'uncertainty.replicates' = " + std::to_string(*n) +
                       " is too few for percentile intervals at level " + fmt_number(u.level) +
                       "; expected 0 (no intervals) or at least " + std::to_string(least) +
                       " (with fewer, an end of the interval is the most extreme replicate "
                       "or lies next to it)");
        u.replicates = static_cast<std::size_t>(*n);
    }
    if (auto n = r.integer("seed")) {
        if (*n < 0)
            r.fail("seed", "'uncertainty.seed' = " + std::to_string(*n) +
                               " is out of range; expected an integer from 0 to " +
                               std::to_string(k_max_seed));
        u.seed = static_cast<std::uint64_t>(*n);
    }
    return u;
}

/// Rules across tables: the data files each part of the model needs.
void check_data_needs(const ModelSpec& spec, const Context& ctx) {
    const bool have_census = spec.data.census.has_value();
    for (const auto& rate : spec.rates)
        if (!rate.is_fixed() && !have_census)
            throw SpecError(rate.at, "rate '" + rate.name +
                                         "' is fitted (no coefficients) but data.census is "
                                         "not given");
    if (spec.establishment.method == EstablishmentMethod::census && !have_census)
        throw SpecError({ctx.file, 0, 0, "establishment.method"},
                        "establishment.method = \"census\" (the default) needs data.census; "
                        "give data.census or method = \"fixed\" with values");
    // A truth file with [simulate] invents the experiments: it needs no experiment data.
    if (spec.arrival.method == ArrivalMethod::experiments && !spec.experiment_truth) {
        if (!spec.data.trapping || !spec.data.retention)
            throw SpecError(spec.arrival.at,
                            "arrival.method = \"experiments\" needs data.trapping and "
                            "data.retention");
        if (spec.arrival.cover_from_census && !have_census)
            throw SpecError(spec.arrival.at, "arrival.cover = \"census\" needs data.census");
    }
}

ModelSpec read_document(const toml::table& doc, const std::filesystem::path& file,
                        Context& ctx) {
    ModelSpec spec;
    spec.file = file;
    const TableReader root(doc, "", "", ctx);
    root.allow({"model", "data", "census", "mesh", "microsites", "rates", "establishment",
                "arrival", "scenario", "perturbation", "uncertainty", "output", "simulate"});
    auto required_table = [&](std::string_view k, const std::string& what) {
        auto t = root.table(k);
        if (!t)
            throw SpecError({ctx.file, 0, 0, std::string(k)},
                            "missing table [" + std::string(k) + "] (" + what + ")");
        return *t;
    };

    // [model]
    {
        const TableReader r = required_table("model", "size_transform and a name");
        r.allow({"name", "size_transform"});
        spec.name = r.string("name").value_or(file.stem().string());
        auto t = r.choice("size_transform", {"none", "log", "log1p", "sqrt"});
        if (!t) r.missing("size_transform", "none, log, log1p or sqrt");
        spec.size_transform = *census::parse_size_transform(*t);
    }
    if (auto r = root.table("data")) spec.data = read_data(*r, file);
    // [census]
    if (auto r = root.table("census")) {
        r->allow({"missing_row", "seedling_flag", "alive_without_size", "alive_after_dead"});
        if (auto p = r->choice("missing_row", {"error", "notfound"}))
            spec.census.missing_row = *census::parse_missing_row_policy(*p);
        if (auto p = r->choice("alive_without_size", {"keep", "error"}))
            spec.census.alive_without_size = *census::parse_alive_without_size(*p);
        if (auto p = r->choice("alive_after_dead", {"error", "notfound"}))
            spec.census.alive_after_dead = *census::parse_alive_after_dead(*p);
        if (auto b = r->boolean("seedling_flag")) spec.census.seedling_flag = *b;
    }
    if (auto r = root.table("mesh")) spec.mesh = read_mesh(*r);
    spec.microsites = read_microsites(required_table("microsites", "labels and the bare one"));
    // [rates.*]
    {
        const TableReader r = required_table("rates", "one table per vital rate");
        r.allow(rate_names());
        for (const auto& name : rate_names()) {
            auto t = r.table(name);
            if (!t)
                throw SpecError({ctx.file, r.location().line, 0, "rates." + name},
                                "missing table [rates." + name + "]; every vital rate (" +
                                    list(rate_names()) + ") needs one");
            spec.rates.push_back(read_rate(*t, name, spec.microsites, ctx));
        }
    }
    if (auto r = root.table("establishment"))
        spec.establishment = read_establishment(*r, spec.microsites, ctx);
    // [arrival]
    const TableReader arrival_reader =
        required_table("arrival", "arrival fractions or experiments");
    spec.arrival = read_arrival(arrival_reader, spec.microsites, ctx);
    // [[scenario]]
    if (const toml::node* n = doc.get("scenario")) {
        if (!n->is_array_of_tables())
            root.wrong_type("scenario", *n, "an array of tables ([[scenario]])");
        std::set<std::string> names;
        std::size_t i = 0;
        for (const toml::node& e : *n->as_array()) {
            ++i;
            const TableReader r(*e.as_table(), "scenario[" + std::to_string(i) + "]",
                                "scenario", ctx);
            ScenarioSpec s = read_scenario(r, spec.microsites, ctx);
            if (!names.insert(s.name).second)
                r.fail("name", "scenario name '" + s.name + "' is used twice");
            if (s.changes_chain() && spec.arrival.method != ArrivalMethod::experiments)
                r.fail_here("scenario '" + s.name + "' changes the arrival chain; that needs "
                            "arrival.method = \"experiments\"");
            spec.scenarios.push_back(std::move(s));
        }
    }
    if (auto r = root.table("perturbation"))
        spec.perturbation = read_perturbation(*r, spec.census.seedling_flag);
    if (auto r = root.table("uncertainty")) spec.uncertainty = read_uncertainty(*r);
    // [output]
    spec.output.dir = resolve(file, "out");
    if (auto r = root.table("output")) {
        r->allow({"dir", "print_coordinates", "matrices"});
        if (auto d = r->string("dir")) {
            if (d->empty()) r->fail("dir", "'output.dir' must not be empty");
            spec.output.dir = resolve(file, *d);
        }
        if (auto b = r->boolean("print_coordinates")) spec.output.print_coordinates = *b;
        if (auto b = r->boolean("matrices")) spec.output.matrices = *b;
    }
    // [simulate] (truth files)
    if (auto r = root.table("simulate"))
        spec.experiment_truth =
            read_experiment_truth(*r, arrival_reader, spec.arrival, spec.microsites, ctx);

    check_data_needs(spec, ctx);
    // The least a run keeps is two kernels (one transition year and the pooled one); fit and
    // check refuse again with the census's number of years.
    require_mesh_memory(spec, 2);
    spec.keys.assign(ctx.keys.begin(), ctx.keys.end());
    return spec;
}

}  // namespace

const std::vector<std::string>& rate_names() {
    static const std::vector<std::string> names{"survival", "growth", "flowering", "seeds",
                                                "recruit_size"};
    return names;
}

std::optional<std::size_t> MicrositeSpec::index(std::string_view label) const {
    for (std::size_t i = 0; i < labels.size(); ++i)
        if (labels[i] == label) return i;
    return std::nullopt;
}

std::size_t min_replicates(double level) {
    // ⌈2/(1 − level)⌉ with a tolerance, so that level 0.95 gives 40 (not 41 from rounding).
    const double tails = 2.0 / (1.0 - level);
    return static_cast<std::size_t>(std::ceil(tails - 1e-9)) + 1;
}

const RateSpec& ModelSpec::rate(std::string_view name) const {
    for (const auto& r : rates)
        if (r.name == name) return r;
    throw UsageError("'" + std::string(name) + "' is not a vital rate");
}

bool ModelSpec::all_rates_fixed() const noexcept {
    return std::all_of(rates.begin(), rates.end(), [](const RateSpec& r) { return r.is_fixed(); });
}

const char* to_string(YearHandling y) noexcept {
    switch (y) {
        case YearHandling::none: return "none";
        case YearHandling::fixed: return "fixed";
        case YearHandling::random: return "random";
    }
    return "none";
}

const char* to_string(QuadratureRule r) noexcept {
    return r == QuadratureRule::midpoint ? "midpoint" : "gauss-legendre";
}

const char* to_string(EvictionPolicy e) noexcept {
    return e == EvictionPolicy::boundary ? "boundary" : "discard";
}

ModelSpec parse_model_spec(std::string_view text, const std::filesystem::path& file) {
    Context ctx;
    ctx.file = file.string();
    ctx.text = text;
    toml::table doc;
    try {
        doc = toml::parse(text, ctx.file);
    } catch (const toml::parse_error& e) {
        throw SpecError({ctx.file, static_cast<std::size_t>(e.source().begin.line),
                         static_cast<std::size_t>(e.source().begin.column), ""},
                        "TOML syntax: " + std::string(e.description()));
    } catch (const detail::TomlCheckFailure& e) {
        // Malformed text that broke one of toml++'s internal checks (issue 11).
        const auto at = detail::explain_check_failure(text, e);
        throw SpecError({ctx.file, at.line, at.column, ""}, "TOML syntax: " + at.reason);
    }
    return read_document(doc, file, ctx);
}

ModelSpec read_model_spec(const std::filesystem::path& file) {
    std::ifstream in(file, std::ios::binary);
    if (!in) throw SpecError({file.string(), 0, 0, ""}, "cannot open the model file");
    std::ostringstream buffer;
    buffer << in.rdbuf();
    return parse_model_spec(buffer.str(), file);
}

}  // namespace safesite::spec
