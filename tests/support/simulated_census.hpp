#pragma once
// Test helper: a simulated census read back through the census reader, as `safesite run`
// would read the file `safesite simulate` writes (the truth file's census options).

#include "safesite/census/census.hpp"
#include "safesite/io/csv_table.hpp"
#include "safesite/report/output_folder.hpp"
#include "safesite/report/tidy_table.hpp"
#include "safesite/spec/model_spec.hpp"

namespace safesite::test {

inline census::Census read_back(const spec::ModelSpec& truth, const report::TidyTable& census) {
    return census::read_census(io::CsvTable::parse(report::to_csv(census), "census.csv"),
                               spec::to_census_options(truth));
}

}  // namespace safesite::test
