#include "safesite/report/caution.hpp"

namespace safesite::report {

std::vector<std::string> model_assumptions() {
    // The model structure of design.md section 3, said in words for the reader of a report.
    return {
        "Each plant stays for life in the microsite its seed arrived in.",
        "Vital rates depend on size (on the model file's size scale), microsite and year only; "
        "there is no density dependence, so λ describes growth at the observed densities.",
        "Census timing is pre-breeding: seeds produced in year t that establish are seen as "
        "recruits at the census of year t+1.",
        "Growth outside the mesh bounds is handled by the eviction policy named in the "
        "diagnostics.",
    };
}

}  // namespace safesite::report
