#pragma once
/// \file caution.hpp
/// The caution that every report, the JSON summary, the terminal summary and the README carry
/// (DEVELOPERS.md, "Cautions"). One constant, so the wording cannot drift; a unit test checks
/// that README.md carries the same text.

#include <string>
#include <vector>

namespace safesite::report {

/// The caution text, one paragraph.
inline constexpr const char* k_caution =
    "Results are model projections under the assumptions stated with them, not a substitute "
    "for a site-specific assessment. Field work follows local permits and rules. Exact "
    "coordinates of rare plants are sensitive: safesite reads them but does not print them "
    "unless asked to.";

/// The assumptions of the safesite model itself (design.md section 3), stated in every
/// output; analyses append their own (e.g. the closed-population assumption of the
/// establishment estimate).
std::vector<std::string> model_assumptions();

}  // namespace safesite::report
