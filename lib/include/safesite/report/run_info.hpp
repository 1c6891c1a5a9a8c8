#pragma once
/// \file run_info.hpp
/// What a run records about itself in summary.json: no timestamps and no absolute paths the
/// user did not give, so that the same inputs give byte-identical outputs.

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

namespace safesite::report {

/// Metadata of one run of safesite, written beside the tables.
struct RunInfo {
    std::string command;                  ///< the verb, e.g. "run" or "simulate"
    std::string model_file;               ///< the model file as the user named it
    std::string model_name;               ///< `[model].name` of the model file
    std::optional<std::uint64_t> seed;    ///< random seed in use, when the run draws numbers
    std::vector<std::string> assumptions; ///< stated assumptions (model_assumptions() + more)
    std::vector<std::string> warnings;    ///< warnings raised while the run went on
    /// Version of safesite that wrote the results, when they were read back from an output
    /// folder (`safesite_version` of summary.json); empty: this build (safesite::version()).
    /// to_summary_json() always writes this build's version.
    std::string safesite_version;
};

}  // namespace safesite::report
