#pragma once
/// \file error.hpp
/// The error hierarchy of safesite (style guide 4.7).
///
///     Error (std::runtime_error)
///     ├── UsageError        bad command-line use                      exit 2
///     ├── InputError        bad data or model file, with location     exit 3
///     │   ├── DataError     CSV data (file, line, column)
///     │   └── SpecError     TOML model file (file, line, key)
///     └── NumericalError    a computation that cannot give an answer  exit 4
///
/// Input errors carry their location as fields and render compiler-style:
/// `census.csv:14:5: size "12,3" is not a number; expected a decimal with '.'`.

#include <cstddef>
#include <stdexcept>
#include <string>

namespace safesite {

/// Root of every error safesite throws on purpose.
class Error : public std::runtime_error {
public:
    explicit Error(const std::string& what) : std::runtime_error(what) {}
};

/// Misuse of the command line or of a library call's arguments by the caller.
class UsageError : public Error {
public:
    explicit UsageError(const std::string& what) : Error(what) {}
};

/// Where in an input an error was found. Line and column are 1-based; 0 means "not known".
struct SourceLocation {
    std::string file;    ///< path as the user gave it (may be empty for in-memory input)
    std::size_t line = 0;
    std::size_t column = 0;
    std::string key;     ///< TOML key path or CSV column name, when known

    /// "file:line:column: " with the parts that are known, or "" when nothing is known.
    std::string prefix() const {
        std::string out = file;
        if (line > 0) {
            // Two appends rather than one concatenation: g++ 12 gives a false -Wrestrict
            // warning on `const char* + std::string&&` here (GCC bug 105329).
            out += out.empty() ? "line " : ":";
            out += std::to_string(line);
            if (column > 0) {
                out += ':';
                out += std::to_string(column);
            }
        }
        if (!out.empty()) out += ": ";
        return out;
    }
};

/// Bad input data or model file. `what()` is the rendered message with its location prefix;
/// `reason()` is the message alone.
class InputError : public Error {
public:
    InputError(SourceLocation where, const std::string& reason)
        : Error(where.prefix() + reason), m_where(std::move(where)), m_reason(reason) {}

    const SourceLocation& where() const noexcept { return m_where; }
    const std::string& file() const noexcept { return m_where.file; }
    std::size_t line() const noexcept { return m_where.line; }
    std::size_t column() const noexcept { return m_where.column; }
    const std::string& key() const noexcept { return m_where.key; }
    const std::string& reason() const noexcept { return m_reason; }

private:
    SourceLocation m_where;
    std::string m_reason;
};

/// An error in a CSV data file (census, trapping trials, retention checks).
class DataError : public InputError {
public:
    using InputError::InputError;
};

/// An error in a TOML model file: unknown key, wrong type, missing key, value out of range.
class SpecError : public InputError {
public:
    using InputError::InputError;
};

/// A computation that cannot give a trustworthy answer (no convergence, no unique positive
/// dominant eigenvalue, singular system, non-finite values).
class NumericalError : public Error {
public:
    explicit NumericalError(const std::string& what) : Error(what) {}
};

}  // namespace safesite
