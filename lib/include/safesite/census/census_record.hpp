#pragma once
/// \file census_record.hpp
/// One row of the long-format census, typed (docs/formats.md, "Census").

#include <cstddef>
#include <cstdint>
#include <optional>
#include <string>

namespace safesite::census {

enum class Status { alive, dead, notfound };

/// One plant in one census year.
struct CensusRecord {
    std::string plant;
    int year = 0;
    std::string plot;
    std::string microsite;
    std::size_t microsite_index = 0;  ///< position in CensusOptions::microsites
    Status status = Status::alive;
    double size = 0.0;                ///< transformed size h(x); NaN unless alive
    double raw_size = 0.0;            ///< size as in the file; NaN when empty
    bool flowered = false;            ///< alive rows only
    std::optional<std::int64_t> seeds;  ///< empty = not counted
    bool seedling = false;            ///< the seedling flag of the row
    std::optional<double> x, y;       ///< coordinates, read for validation only
    /// Size of the neighbour plant the record stands under, that year, on the raw scale of
    /// the file (e.g. its diameter in cm; > 0). Empty when not measured, when the file has no
    /// `neighbour_size` column, and on bare-soil rows (where a value is ignored with the
    /// warning `neighbour_size_on_bare`). Never transformed.
    std::optional<double> neighbour_size;
    std::size_t line = 0;             ///< file line; 0 for a row added by missing_row = notfound
};

/// "alive", "dead", "notfound".
const char* to_string(Status s) noexcept;

}  // namespace safesite::census
