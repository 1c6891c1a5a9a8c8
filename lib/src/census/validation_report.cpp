#include "safesite/census/validation_report.hpp"

#include <algorithm>

#include "safesite/io/quoted.hpp"

namespace safesite::census {

void ValidationReport::add(Severity severity, const std::string& code, const std::string& message,
                           IssueExample example) {
    auto it = std::find_if(m_issues.begin(), m_issues.end(),
                           [&](const ValidationIssue& i) { return i.code == code; });
    if (it == m_issues.end()) {
        m_issues.push_back(ValidationIssue{severity, code, message, 0, {}});
        it = std::prev(m_issues.end());
    }
    ++it->count;
    if (it->examples.size() < max_examples) it->examples.push_back(std::move(example));
}

const ValidationIssue* ValidationReport::find(const std::string& code) const {
    for (const auto& i : m_issues)
        if (i.code == code) return &i;
    return nullptr;
}

bool ValidationReport::has_errors() const noexcept {
    return std::any_of(m_issues.begin(), m_issues.end(),
                       [](const ValidationIssue& i) { return i.severity == Severity::error; });
}

std::size_t ValidationReport::error_count() const noexcept {
    std::size_t n = 0;
    for (const auto& i : m_issues)
        if (i.severity == Severity::error) n += i.count;
    return n;
}

std::size_t ValidationReport::warning_count() const noexcept {
    std::size_t n = 0;
    for (const auto& i : m_issues)
        if (i.severity == Severity::warning) n += i.count;
    return n;
}

std::string ValidationReport::render() const {
    auto plural = [](std::size_t n, const char* word) {
        return std::to_string(n) + " " + word + (n == 1 ? "" : "s");
    };
    std::string out = (m_file.empty() ? std::string("input") : m_file) + ": " +
                      plural(error_count(), "error") + ", " +
                      plural(warning_count(), "warning") + "\n";
    for (Severity pass : {Severity::error, Severity::warning}) {
        for (const auto& issue : m_issues) {
            if (issue.severity != pass) continue;
            out += (pass == Severity::error ? "error " : "warning ") + issue.code + ": " +
                   issue.message + " (" + plural(issue.count, "case") + ")\n";
            for (const auto& e : issue.examples) {
                out += "  ";
                if (e.line > 0) {
                    out += SourceLocation{m_file, e.line, e.column, e.key}.prefix();
                }
                out += e.text + "\n";
            }
            if (issue.count > issue.examples.size())
                out += "  ... and " + std::to_string(issue.count - issue.examples.size()) +
                       " more\n";
        }
    }
    return out;
}

DataError ValidationReport::to_error() const {
    for (const auto& issue : m_issues) {
        if (issue.severity != Severity::error) continue;
        // First line: the first example in words (the line a reader sees first), then the
        // whole report with each problem's message and remedy.
        const IssueExample first = issue.examples.empty() ? IssueExample{} : issue.examples[0];
        const std::string lead = first.text.empty() ? issue.message : first.text;
        return DataError({m_file, first.line, first.column, first.key},
                         io::capped(lead + " [" + issue.code + "]; full report:\n" + render()));
    }
    return DataError({m_file, 0, 0, ""}, io::capped(render()));
}

}  // namespace safesite::census
