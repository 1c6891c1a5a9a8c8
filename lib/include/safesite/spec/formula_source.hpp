#pragma once
/// \file formula_source.hpp
/// Where a formula of the model file stands in the file, so that a problem found at a
/// character of the formula (a syntax error, an unknown column, an unknown level) is reported
/// at the model file's line and column, with the key, pointing into the user's own text
/// (never into text the pipeline adds, such as `+ year`).

#include <cstddef>
#include <string>
#include <vector>

#include "safesite/error.hpp"

namespace safesite::spec {

/// The location of one formula value of the model file.
struct FormulaSource {
    /// The TOML value: file, line, column of its opening quote, key
    /// (`rates.growth.formula`, `rates.growth.candidates[2]`, `arrival.trapping_formula`).
    SourceLocation value;
    /// File column (1-based, in characters as the TOML parser counts them) of the formula's
    /// first character when the text stands verbatim on that line (a one-line string without
    /// escapes); 0 when it does not (then errors give the value's column and the character).
    std::size_t text_column = 0;

    /// The location of character `offset` (1-based, in bytes of the formula text): the exact
    /// file column when known, else the value's own column.
    SourceLocation at(const std::string& text, std::size_t offset) const;
};

/// Throw the SpecError for a problem at character `offset` (1-based; 0: the whole formula) of
/// formula `text`: located by `source`, reason `'<key>' = "<text>", character <offset>:
/// <reason>`, followed by a line with the formula and a caret under the character.
[[noreturn]] void formula_error(const FormulaSource& source, const std::string& text,
                                std::size_t offset, const std::string& reason);

/// "'<level>' is not a level of '<column>'<where>; did you mean …? The levels are: …".
std::string level_message(const std::string& level, const std::string& column,
                          const std::vector<std::string>& levels, const std::string& where);

/// The columns one formula can read, with their kinds and, where the model file fixes them,
/// the levels of categorical columns (microsite labels, neighbour forms).
struct FormulaColumns {
    std::string table;                         ///< e.g. "transitions", "trapping trials"
    std::vector<std::string> numeric;          ///< numeric columns
    std::vector<std::string> categorical;      ///< categorical columns
    /// Known levels per categorical column (same order as `categorical`; empty: from data).
    std::vector<std::vector<std::string>> levels;
    /// Columns (of `numeric` or `categorical`) the response may read but the terms may not
    /// (the arrival formulas: τ and the hazard are predicted from a few columns only).
    std::vector<std::string> response_only;
    /// All column names, numeric first.
    std::vector<std::string> names() const;
};

/// Parse `text` and resolve every column it reads against `columns` (kinds, and the levels of
/// ref() where `columns` knows them). With a non-empty `response`, the left-hand side must
/// be exactly that column. Throws SpecError through formula_error().
void check_formula_text(const FormulaSource& source, const std::string& text,
                        const FormulaColumns& columns, const std::string& response);

}  // namespace safesite::spec
