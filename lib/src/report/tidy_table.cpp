#include "safesite/report/tidy_table.hpp"

#include <cmath>

#include <fmt/format.h>

#include "safesite/error.hpp"

namespace safesite::report {

namespace {

bool valid_name(const std::string& name) {
    if (name.empty()) return false;
    for (char c : name) {
        const bool ok = (c >= 'a' && c <= 'z') || (c >= '0' && c <= '9') || c == '_' || c == '-';
        if (!ok) return false;
    }
    return true;
}

}  // namespace

void check_table(const TidyTable& table) {
    if (!valid_name(table.name)) {
        throw UsageError("table name \"" + table.name +
                         "\" is not a valid file stem; expected [a-z0-9_-]+");
    }
    if (table.columns.empty()) throw UsageError("table \"" + table.name + "\" has no columns");
    for (std::size_t r = 0; r < table.rows.size(); ++r) {
        if (table.rows[r].size() != table.columns.size()) {
            throw UsageError(fmt::format("table \"{}\": row {} has {} cells; expected {} (one per column)",
                                         table.name, r + 1, table.rows[r].size(),
                                         table.columns.size()));
        }
    }
}

std::size_t column_index(const TidyTable& table, const std::string& column) {
    for (std::size_t i = 0; i < table.columns.size(); ++i) {
        if (table.columns[i] == column) return i;
    }
    throw UsageError(fmt::format("table \"{}\" has no column \"{}\"; it has: {}", table.name,
                                 column, fmt::join(table.columns, ", ")));
}

std::string format_cell(const Cell& cell) {
    struct Visitor {
        std::string operator()(const Missing&) const { return {}; }
        std::string operator()(const std::string& s) const { return s; }
        std::string operator()(std::int64_t i) const { return std::to_string(i); }
        std::string operator()(double x) const {
            if (std::isnan(x)) return "NaN";
            if (std::isinf(x)) return x > 0 ? "Inf" : "-Inf";
            // fmt's default format is the shortest decimal that reads back to the same
            // double (Ryu-style round trip), so files keep full precision.
            return fmt::format("{}", x);
        }
    };
    return std::visit(Visitor{}, cell);
}

}  // namespace safesite::report
