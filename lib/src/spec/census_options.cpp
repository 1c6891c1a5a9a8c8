#include "safesite/spec/model_spec.hpp"

namespace safesite::spec {

census::CensusOptions to_census_options(const ModelSpec& spec) {
    census::CensusOptions o;
    o.columns = spec.data.census_columns;
    o.transform = spec.size_transform;
    o.microsites = spec.microsites.labels;
    o.bare = spec.microsites.bare_index;
    o.missing_row = spec.census.missing_row;
    o.alive_without_size = spec.census.alive_without_size;
    o.alive_after_dead = spec.census.alive_after_dead;
    o.seedling_flag = spec.census.seedling_flag;
    return o;
}

}  // namespace safesite::spec
