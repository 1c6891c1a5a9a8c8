#pragma once
// Test helpers for model-file error tests: edit a TOML text, find the line of a piece of it,
// and parse a text that must be refused. `refused` parses under the name `file`.

#include <cstddef>
#include <stdexcept>
#include <string>

#include "safesite/error.hpp"
#include "safesite/spec/model_spec.hpp"

namespace safesite::test {

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
