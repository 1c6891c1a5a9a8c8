#pragma once
/// \file table.hpp
/// A small column-oriented data table: the plain value that flows from the census and the seed
/// experiments into the regression engine. Columns are numeric (double) or categorical (string
/// labels with an ordered list of levels; the first level is the reference level of treatment
/// contrasts unless a formula chooses another).

#include <cstddef>
#include <map>
#include <string>
#include <variant>
#include <vector>

namespace safesite::stats {

/// A numeric column. NaN marks a missing value.
struct NumericColumn {
    std::vector<double> values;
};

/// A categorical column: one label per row and the ordered list of levels.
struct CategoricalColumn {
    std::vector<std::string> values;  ///< label per row; "" marks a missing value
    std::vector<std::string> levels;  ///< ordered levels; every non-missing value is one of them
};

/// A table of equally long named columns, in insertion order.
class Table {
public:
    using Column = std::variant<NumericColumn, CategoricalColumn>;

    /// Number of rows (0 for a table without columns).
    std::size_t rows() const noexcept { return m_rows; }
    /// Column names in insertion order.
    const std::vector<std::string>& names() const noexcept { return m_names; }
    bool has(const std::string& name) const { return m_columns.count(name) > 0; }
    bool is_numeric(const std::string& name) const;
    bool is_categorical(const std::string& name) const;

    /// Add or replace a numeric column. Throws UsageError if the length differs from rows().
    void add_numeric(const std::string& name, std::vector<double> values);
    /// Add or replace a categorical column. When `levels` is empty they are the distinct values
    /// in sorted order. Throws UsageError on a length mismatch or a value outside `levels`.
    void add_categorical(const std::string& name, std::vector<std::string> values,
                         std::vector<std::string> levels = {});

    /// The numeric values of a column. Throws UsageError naming the columns when absent or
    /// not numeric.
    const std::vector<double>& numeric(const std::string& name) const;
    /// The categorical column. Throws UsageError naming the columns when absent or not
    /// categorical.
    const CategoricalColumn& categorical(const std::string& name) const;

    /// A new table with the rows whose indices are given (in that order, repeats allowed:
    /// this is how bootstrap resamples are made). Categorical levels are kept.
    Table select_rows(const std::vector<std::size_t>& rows) const;

private:
    void check_length(const std::string& name, std::size_t n);
    [[noreturn]] void missing(const std::string& name, const char* wanted) const;

    std::size_t m_rows = 0;
    std::vector<std::string> m_names;
    std::map<std::string, Column> m_columns;
};

}  // namespace safesite::stats
