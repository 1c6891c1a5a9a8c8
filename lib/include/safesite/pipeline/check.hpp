#pragma once
/// \file check.hpp
/// `safesite check`: read and validate the census of a model file and summarise it, without
/// fitting anything (issue 4 §1, §5).

#include <string>
#include <vector>

#include "safesite/census/census.hpp"
#include "safesite/census/validation_report.hpp"
#include "safesite/report/tidy_table.hpp"
#include "safesite/spec/model_spec.hpp"

namespace safesite::pipeline {

/// The census as read, with every problem found and the counts.
struct CheckResult {
    std::string census_file;                 ///< as named in the model file
    std::vector<std::string> microsites;     ///< model labels, in order
    census::ValidationReport report;         ///< all problems (errors and warnings)
    census::CensusSummary summary;           ///< plants, years, transitions, recruits, gaps
    /// True when the census has no error (warnings allowed): fit and run may proceed.
    bool valid() const { return !report.has_errors(); }
};

/// Read and validate the census of `model` and summarise it. Problems in the data are
/// collected in `report` (never thrown), so that all are shown at once.
/// \throws SpecError (key data.census) when the model file names no census; DataError when
///         the file cannot be read as CSV or lacks a required column.
CheckResult check(const spec::ModelSpec& model);

/// The check as tables: `census_years` (one row per census year), `census_microsites` (per
/// transition year and microsite: plants alive at t and recruits at t+1), `census_gaps`,
/// `problems` (one row per example of each problem).
std::vector<report::TidyTable> check_tables(const CheckResult& result);

}  // namespace safesite::pipeline
