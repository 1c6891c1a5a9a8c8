#include "common.hpp"

#include "safesite/io/staged_folder.hpp"
#include "safesite/report/caution.hpp"
#include "safesite/report/output_folder.hpp"

namespace safesite::cli {

spec::ModelSpec load_model(const std::string& path) { return spec::read_model_spec(path); }

report::RunInfo run_info(const std::string& command, const std::string& model_path,
                         const spec::ModelSpec& model, std::optional<std::uint64_t> seed,
                         const std::vector<std::string>& assumptions,
                         const std::vector<std::string>& warnings) {
    report::RunInfo info;
    info.command = command;
    info.model_file = model_path;
    info.model_name = model.name;
    info.seed = seed;
    info.assumptions = report::model_assumptions();
    info.assumptions.insert(info.assumptions.end(), assumptions.begin(), assumptions.end());
    info.warnings = warnings;
    return info;
}

std::vector<report::TidyTable> pick_tables(const std::vector<report::TidyTable>& tables,
                                           const std::vector<std::string>& names) {
    std::vector<report::TidyTable> out;
    for (const auto& name : names) {
        for (const auto& t : tables) {
            if (t.name == name && !t.rows.empty()) out.push_back(t);
        }
    }
    return out;
}

std::filesystem::path output_dir(const std::string& out_option, const spec::ModelSpec& model) {
    if (!out_option.empty()) return out_option;
    return model.output.dir;
}

std::vector<std::filesystem::path> input_files(const spec::ModelSpec& model) {
    std::vector<std::filesystem::path> files = {model.file};
    for (const auto& f : {model.data.census, model.data.trapping, model.data.retention})
        if (f) files.push_back(*f);
    return files;
}

void check_output_folder(const std::filesystem::path& dir, const spec::ModelSpec& model) {
    io::StagedFolder::check(dir, report::output_folder_rules(input_files(model)));
}

}  // namespace safesite::cli
