#pragma once
// Test helpers for model-file error tests: edit a TOML text, find the line of a piece of it,
// and parse a text that must be refused. `refused` parses under the name `file`.

#include <cstddef>
#include <stdexcept>
#include <string>

#include "safesite/error.hpp"
#include "safesite/spec/model_spec.hpp"

namespace safesite::test {

/// A small valid model file (three microsites, every rate, arrival fractions given) that
/// model-file error tests edit one thing at a time.
inline std::string base_model_text() {
    return R"([model]
size_transform = "log"

[data]
census = "census.csv"

[mesh]
points = 50

[microsites]
labels = ["gravel", "cushion", "tussock"]
bare = "gravel"

[rates.survival]
family = "binomial"
formula = "survived ~ size"

[rates.growth]
family = "gaussian"
formula = "size_next ~ size"

[rates.flowering]
family = "binomial"
formula = "flowered ~ size"

[rates.seeds]
family = "poisson"
formula = "seeds ~ size"

[rates.recruit_size]
family = "gaussian"
formula = "size ~ microsite"

[arrival]
fractions = { gravel = 0.5, cushion = 0.3, tussock = 0.2 }
)";
}

/// `text` with the first `from` replaced by `to`; throws when `from` is absent.
inline std::string replace(std::string text, const std::string& from, const std::string& to) {
    const auto at = text.find(from);
    if (at == std::string::npos) throw std::logic_error("test edit not found: " + from);
    return text.replace(at, from.size(), to);
}

/// 1-based line of the first occurrence of `what` in `text`.
inline std::size_t line_of(const std::string& text, const std::string& what) {
    const auto at = text.find(what);
    if (at == std::string::npos) throw std::logic_error("not in text: " + what);
    std::size_t line = 1;
    for (std::size_t i = 0; i < at; ++i) line += text[i] == '\n';
    return line;
}

/// The SpecError a model text is refused with; throws when it is accepted.
inline SpecError refused(const std::string& text, const std::string& file) {
    try {
        (void)spec::parse_model_spec(text, file);
    } catch (const SpecError& e) {
        return e;
    }
    throw std::logic_error("the model file was accepted");
}

/// The error's reason mentions `word`.
inline bool mentions(const SpecError& e, const std::string& word) {
    return e.reason().find(word) != std::string::npos;
}

}  // namespace safesite::test
