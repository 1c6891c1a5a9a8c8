#pragma once
/// \file arrival_spec.hpp
/// Where seeds are when germination starts: the `[arrival]` table (docs/formats.md).

#include <map>
#include <string>
#include <vector>

#include "safesite/error.hpp"
#include "safesite/spec/formula_source.hpp"

namespace safesite::spec {

/// fractions: the arrival fractions are given; experiments: they come from the trapping and
/// retention experiments through the arrival chain (design.md section 4).
enum class ArrivalMethod { fractions, experiments };

struct ArrivalSpec {
    ArrivalMethod method = ArrivalMethod::fractions;

    /// method = fractions: a_m per microsite, in the order of MicrositeSpec::labels;
    /// each in [0, 1], summing to 1 within 1e-9.
    std::vector<double> fractions;

    /// method = experiments: ground cover per neighbour form (every non-bare microsite, each in
    /// [0, 1], sum ≤ 1), unless `cover_from_census` (cover = "census": the share of census
    /// plants per microsite).
    std::map<std::string, double> cover;
    bool cover_from_census = false;
    /// Snow-free days from release to germination, T ≥ 0.
    double exposure_days = 0.0;
    /// Probability in [0, 1] that a departing seed lands again in the stand.
    double relanding = 0.0;
    /// The focal seed type (a value of the seed_type column of both experiments).
    std::string seed_type;
    std::string trapping_formula;
    std::vector<std::string> trapping_groups;
    /// "left ~ ..." on the interval table; offset(log(interval_days)) is added by arrival.
    std::string retention_formula;
    std::vector<std::string> retention_groups;
    /// Where the two formulas stand in the model file (method = experiments).
    FormulaSource trapping_formula_source;
    FormulaSource retention_formula_source;

    SourceLocation at;  ///< the [arrival] table
};

}  // namespace safesite::spec
