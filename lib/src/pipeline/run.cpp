#include "safesite/pipeline/run.hpp"

#include "safesite/census/transition_data.hpp"
#include "safesite/pipeline/tables.hpp"

namespace safesite::pipeline {

RunResult run(const spec::ModelSpec& model) {
    RunResult out;
    if (!model.data.census) {
        out.fit = fit(model);
    } else {
        // Read once here and kept for the model checks (fit(model) would read the same).
        const census::Census c =
            census::load_census(*model.data.census, spec::to_census_options(model));
        CheckData data{census::build_transitions(c), std::nullopt};
        if (model.arrival.method == spec::ArrivalMethod::experiments)
            data.experiments = read_experiments(model);
        out.fit = fit(model, c, data.experiments ? &*data.experiments : nullptr);
        out.data = std::move(data);
    }
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
    for (auto& t : model_check_tables(result.fit, result.analysis,
                                      result.data ? &*result.data : nullptr))
        out.push_back(std::move(t));
    return out;
}

}  // namespace safesite::pipeline
