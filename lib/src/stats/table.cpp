#include "safesite/stats/table.hpp"

#include <algorithm>
#include <set>

#include "safesite/error.hpp"

namespace safesite::stats {

bool Table::is_numeric(const std::string& name) const {
    auto it = m_columns.find(name);
    return it != m_columns.end() && std::holds_alternative<NumericColumn>(it->second);
}

bool Table::is_categorical(const std::string& name) const {
    auto it = m_columns.find(name);
    return it != m_columns.end() && std::holds_alternative<CategoricalColumn>(it->second);
}

void Table::check_length(const std::string& name, std::size_t n) {
    const bool replacing = m_columns.count(name) > 0;
    if (!m_names.empty() && !(replacing && m_names.size() == 1) && n != m_rows) {
        throw UsageError("column '" + name + "' has " + std::to_string(n) +
                         " values; the table has " + std::to_string(m_rows) + " rows");
    }
    m_rows = n;
    if (!replacing) m_names.push_back(name);
}

void Table::add_numeric(const std::string& name, std::vector<double> values) {
    check_length(name, values.size());
    m_columns[name] = NumericColumn{std::move(values)};
}

void Table::add_categorical(const std::string& name, std::vector<std::string> values,
                            std::vector<std::string> levels) {
    if (levels.empty()) {
        std::set<std::string> distinct;
        for (const auto& v : values)
            if (!v.empty()) distinct.insert(v);
        levels.assign(distinct.begin(), distinct.end());
    } else {
        std::set<std::string> known(levels.begin(), levels.end());
        for (const auto& v : values) {
            if (!v.empty() && known.count(v) == 0)
                throw UsageError("column '" + name + "': value '" + v + "' is not a level");
        }
    }
    check_length(name, values.size());
    m_columns[name] = CategoricalColumn{std::move(values), std::move(levels)};
}

void Table::missing(const std::string& name, const char* wanted) const {
    std::string list;
    for (const auto& n : m_names) list += (list.empty() ? "" : ", ") + n;
    if (m_columns.count(name) == 0)
        throw UsageError("no column '" + name + "'; the columns are: " + list);
    throw UsageError("column '" + name + "' is not " + wanted);
}

const std::vector<double>& Table::numeric(const std::string& name) const {
    auto it = m_columns.find(name);
    if (it == m_columns.end() || !std::holds_alternative<NumericColumn>(it->second))
        missing(name, "numeric");
    return std::get<NumericColumn>(it->second).values;
}

const CategoricalColumn& Table::categorical(const std::string& name) const {
    auto it = m_columns.find(name);
    if (it == m_columns.end() || !std::holds_alternative<CategoricalColumn>(it->second))
        missing(name, "categorical");
    return std::get<CategoricalColumn>(it->second);
}

Table Table::select_rows(const std::vector<std::size_t>& rows) const {
    Table out;
    for (const auto& name : m_names) {
        const Column& col = m_columns.at(name);
        if (const auto* num = std::get_if<NumericColumn>(&col)) {
            std::vector<double> v;
            v.reserve(rows.size());
            for (auto r : rows) v.push_back(num->values.at(r));
            out.add_numeric(name, std::move(v));
        } else {
            const auto& cat = std::get<CategoricalColumn>(col);
            std::vector<std::string> v;
            v.reserve(rows.size());
            for (auto r : rows) v.push_back(cat.values.at(r));
            out.m_names.push_back(name);
            out.m_rows = v.size();
            out.m_columns[name] = CategoricalColumn{std::move(v), cat.levels};
        }
    }
    return out;
}

}  // namespace safesite::stats
