#pragma once
/// \file scenario_spec.hpp
/// One `[[scenario]]` entry: a named change to the baseline model (docs/formats.md).

#include <map>
#include <optional>
#include <string>
#include <vector>

#include "safesite/error.hpp"

namespace safesite::spec {

/// A scenario changes at least one of the items below. Factor maps hold only the microsites
/// the file names (others are unchanged, factor 1).
struct ScenarioSpec {
    std::string name;
    /// Arrival fractions replacing the baseline (label order, sum 1 within 1e-9).
    std::optional<std::vector<double>> fractions;
    /// Arrival fractions as relative shares (each ≥ 0, not all 0; microsites not named get
    /// 0): normalised to sum 1 and scaled by the baseline's retained total, so seeds move
    /// between microsites without changing how many are lost (arrival::ChainModifiers).
    std::map<std::string, double> fraction_shares;
    /// Multiplies the cover of a neighbour form (≥ 0; non-bare microsites only).
    std::map<std::string, double> cover_factor;
    /// Multiplies the odds of trapping by a neighbour form (≥ 0; non-bare only).
    std::map<std::string, double> trapping_odds_factor;
    /// Multiplies the daily departure hazard in a microsite (≥ 0).
    std::map<std::string, double> hazard_factor;
    /// Replaces the exposure period T (days, ≥ 0).
    std::optional<double> exposure_days;
    /// Replaces the re-landing probability ρ (0 ≤ ρ ≤ 1).
    std::optional<double> relanding;
    /// Multiplies establishment in a microsite (≥ 0; the product is capped at 1 by the user
    /// of the value).
    std::map<std::string, double> establishment_factor;

    SourceLocation at;  ///< the entry in the model file, key "scenario[i]" (1-based)

    /// True when the scenario changes the arrival chain (cover, trapping, hazard, exposure or
    /// re-landing; needs arrival.method = experiments).
    bool changes_chain() const noexcept {
        return !cover_factor.empty() || !trapping_odds_factor.empty() || !hazard_factor.empty() ||
               exposure_days.has_value() || relanding.has_value();
    }
};

}  // namespace safesite::spec
