#pragma once
/// \file validation_report.hpp
/// Every problem found in an input file, collected before anything stops (issue 4: "report all
/// problems at once, in words, with the first few offending rows").

#include <cstddef>
#include <string>
#include <vector>

#include "safesite/error.hpp"

namespace safesite::census {

enum class Severity { warning, error };

/// One occurrence of a problem: where, and what in words.
struct IssueExample {
    std::size_t line = 0;    ///< 1-based file line; 0 when the row is not in the file
    std::size_t column = 0;  ///< 1-based field number; 0 when not one cell
    std::string key;         ///< column name of the file, when one cell
    std::string text;        ///< e.g. `plant "A12" in 2019 is also on line 14`
};

/// One kind of problem with its total count and the first few occurrences.
struct ValidationIssue {
    Severity severity = Severity::error;
    std::string code;     ///< stable identifier, e.g. "duplicate_row" (docs/methods/census.md)
    std::string message;  ///< the problem in words, e.g. "a plant has two rows in one year"
    std::size_t count = 0;
    std::vector<IssueExample> examples;  ///< at most ValidationReport::max_examples
};

/// The issues of one input file, in the order first met.
class ValidationReport {
public:
    static constexpr std::size_t max_examples = 5;

    explicit ValidationReport(std::string file = {}) : m_file(std::move(file)) {}

    /// Count one occurrence of the problem `code` (created on first use with `severity` and
    /// `message`); the first max_examples occurrences keep their example.
    void add(Severity severity, const std::string& code, const std::string& message,
             IssueExample example);

    const std::string& file() const noexcept { return m_file; }
    const std::vector<ValidationIssue>& issues() const noexcept { return m_issues; }
    /// The issue with this code, or nullptr.
    const ValidationIssue* find(const std::string& code) const;
    bool has_errors() const noexcept;
    std::size_t error_count() const noexcept;    ///< occurrences over all error issues
    std::size_t warning_count() const noexcept;  ///< occurrences over all warning issues

    /// The report in words, errors first, one line per example with `file:line:column:`.
    std::string render() const;

    /// A DataError located at the first example of the first error issue, whose reason is that
    /// example's text with the issue code, then the rendered report (the CLI prints it and
    /// exits 3); the reason is capped (io::capped). Precondition: has_errors().
    DataError to_error() const;

private:
    std::string m_file;
    std::vector<ValidationIssue> m_issues;
};

}  // namespace safesite::census
