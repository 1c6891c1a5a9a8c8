#pragma once
/// \file quoted.hpp
/// Values and whole messages made safe to print in an error: a value read from an input file
/// can be a 10 MB line, a binary blob or hold line breaks; a message must stay a few lines.

#include <cstddef>
#include <string>
#include <string_view>

namespace safesite::io {

/// How many characters of a value quoted_short() keeps by default.
inline constexpr std::size_t k_quoted_keep = 40;
/// How many bytes capped() keeps of a message by default (a census report of every problem
/// kind with its first examples fits well below this).
inline constexpr std::size_t k_message_cap = 16384;

/// A value quoted for a message: `"12,3"`. Inner quotes are doubled; line breaks, tabs and
/// other control bytes are shown as `\n`, `\r`, `\t`, `\0` or `\xNN`. At most `keep`
/// characters (UTF-8 code points, never a split sequence) are kept; a longer value is cut and
/// says how long it was: `"AAAA…" (10485760 characters)`.
std::string quoted_short(std::string_view value, std::size_t keep = k_quoted_keep);

/// Number of UTF-8 code points in `text` (bytes that do not continue a sequence).
std::size_t character_count(std::string_view text) noexcept;

/// `message` when it has at most `limit` bytes; otherwise its first `limit` bytes (cut at a
/// line end or a character boundary) followed by a line saying how much was left out.
std::string capped(std::string message, std::size_t limit = k_message_cap);

}  // namespace safesite::io
