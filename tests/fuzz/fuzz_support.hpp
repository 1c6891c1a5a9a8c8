#pragma once
// Shared by the libFuzzer targets (tests/fuzz, DEVELOPERS.md "Fuzzing"). Each target feeds the
// input to one reader through its in-memory entry point. An error deriving from safesite::Error
// is the expected answer to bad input; anything else escapes LLVMFuzzerTestOneInput, ends the
// process (std::terminate) and is reported by libFuzzer as a crash, next to the sanitizers'
// reports (AddressSanitizer, UndefinedBehaviorSanitizer, LeakSanitizer).

#include <cstddef>
#include <cstdint>
#include <string_view>

#include "safesite/error.hpp"

namespace safesite::fuzz {

inline std::string_view as_text(const std::uint8_t* data, std::size_t size) {
    return {reinterpret_cast<const char*>(data), size};
}

/// Run `f`; a safesite::Error is the expected outcome for bad input and is swallowed.
template <class F>
void expect_only_safesite_errors(F&& f) {
    try {
        f();
    } catch (const safesite::Error&) {
    }
}

}  // namespace safesite::fuzz
