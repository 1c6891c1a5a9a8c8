#pragma once
// Random stream ids of the simulator (private to lib/src/sim). Each kind of draw has its own
// stream, derived from (user seed, stream id) by core::Variates, so that adding one kind of
// draw (e.g. seed experiments) never moves the draws of another (e.g. the census).

#include <cstdint>

namespace safesite::sim::detail {

enum Stream : std::uint64_t {
    burn_in_stream = 1,         // census: burn-in years and the first population
    year_stream = 2,            // census: year deviations
    process_stream = 3,         // census: life cycle of the tagged plants
    wart_stream = 4,            // census: not-found plants, uncounted seeds
    place_stream = 5,           // census: x, y coordinates
    neighbour_size_stream = 6,  // census: neighbour size of plants under a neighbour form
    experiments_stream = 7,     // seed experiments: the seeds of arrival's own streams
};

}  // namespace safesite::sim::detail
