#include "safesite/pipeline/run.hpp"

#include "safesite/pipeline/tables.hpp"

namespace safesite::pipeline {

RunResult run(const spec::ModelSpec& model) {
    RunResult out;
    out.fit = fit(model);
    out.analysis = analyse(out.fit.model);
    return out;
}

RunResult evaluate_fixed(const spec::ModelSpec& model) {
    RunResult out;
    out.fit = fit_given(model);
    out.analysis = analyse(out.fit.model);
    return out;
}

std::vector<report::TidyTable> run_tables(const RunResult& result) {
    std::vector<report::TidyTable> out = fit_tables(result.fit);
    for (auto& t : analysis_tables(result.analysis)) out.push_back(std::move(t));
    return out;
}

}  // namespace safesite::pipeline
