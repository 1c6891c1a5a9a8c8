#pragma once
/// \file data_rules.hpp
/// Small documented rules that turn census tables into model settings: mesh bounds derived
/// from the data range, and ground cover taken from the census when none was measured
/// (docs/methods/pipeline.md, "Kernels" and "Arrival fractions").

#include <string>
#include <utility>
#include <vector>

#include <Eigen/Core>

#include "safesite/stats/table.hpp"

namespace safesite::pipeline {

/// Mesh bounds from the data: [min − margin·r, max + margin·r] with min, max and r = max − min
/// over the finite values of `size` and `size_next` of the transitions and `size` of the
/// recruits (kernel scale). Ellner, Childs & Rees (2016, §2.6) recommend bounds a little
/// beyond the observed sizes to limit eviction (Williams, Miller & Ellner 2012).
/// \param margin ≥ 0
/// \throws UsageError when margin < 0 or a column is missing; DataError (key "size") when no
///         finite size is found or all sizes are equal.
std::pair<double, double> derive_mesh_bounds(const stats::Table& transitions,
                                             const stats::Table& recruits, double margin);

/// Ground cover c_f from the census (`[arrival] cover = "census"`): the share of plant
/// records alive at t (the rows of the transitions table) that stand in microsite f, for
/// every microsite except bare soil (whose entry is 0). A proxy for the ground cover of each
/// neighbour form when cover was not measured: it assumes focal plants are spread over the
/// microsites in proportion to their area. Returns one value per microsite.
/// \throws UsageError when the table has no `microsite` column or no rows.
Eigen::VectorXd census_cover(const stats::Table& transitions,
                             const std::vector<std::string>& microsites, std::size_t bare);

}  // namespace safesite::pipeline
