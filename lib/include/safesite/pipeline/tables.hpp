#pragma once
/// \file tables.hpp
/// Results as long-form tables (one observation per row), documented column by column in
/// docs/formats.md, "Outputs". Missing values (not computed, not applicable) are empty cells.

#include <vector>

#include "safesite/pipeline/analysis_result.hpp"
#include "safesite/pipeline/establishment.hpp"
#include "safesite/report/tidy_table.hpp"

namespace safesite::pipeline {

/// The analysis tables, in this order: `lambda`, `perturbation`, `stable_structure`,
/// `reproductive_value`, `arrival`, `scenarios`, `sensitivities`, `break_even`,
/// `diagnostics`, `assumptions`, `eviction`, `mesh_check`, `reducibility`.
std::vector<report::TidyTable> analysis_tables(const AnalysisResult& result);

/// The `establishment` table: year (t or "pooled"), microsite, seeds, arrival, recruits,
/// establishment, source ("census").
report::TidyTable establishment_table(const EstablishmentEstimate& estimate);

}  // namespace safesite::pipeline
