#include "safesite/io/quoted.hpp"

#include <cstdio>

namespace safesite::io {

namespace {

bool continues(unsigned char c) noexcept { return (c & 0xC0) == 0x80; }

}  // namespace

std::size_t character_count(std::string_view text) noexcept {
    std::size_t n = 0;
    for (char c : text)
        if (!continues(static_cast<unsigned char>(c))) ++n;
    return n;
}

std::string quoted_short(std::string_view value, std::size_t keep) {
    std::string out = "\"";
    std::size_t kept = 0;  // characters kept
    std::size_t i = 0;
    for (; i < value.size(); ++i) {
        const auto c = static_cast<unsigned char>(value[i]);
        if (!continues(c)) {
            if (kept == keep) break;
            ++kept;
        }
        switch (c) {
            case '"':
                out += "\"\"";
                break;
            case '\n':
                out += "\\n";
                break;
            case '\r':
                out += "\\r";
                break;
            case '\t':
                out += "\\t";
                break;
            case '\0':
                out += "\\0";
                break;
            default:
                if (c < 0x20 || c == 0x7F) {
                    char hex[8];
                    std::snprintf(hex, sizeof hex, "\\x%02X", static_cast<unsigned>(c));
                    out += hex;
                } else {
                    out += static_cast<char>(c);
                }
        }
    }
    if (i < value.size())
        return out + "…\" (" + std::to_string(character_count(value)) + " characters)";
    return out + "\"";
}

std::string capped(std::string message, std::size_t limit) {
    if (message.size() <= limit) return message;
    std::size_t cut = limit;
    while (cut > 0 && continues(static_cast<unsigned char>(message[cut]))) --cut;
    const std::size_t line_end = message.rfind('\n', cut);
    if (line_end != std::string::npos && line_end > limit / 2) cut = line_end;
    const std::size_t left_out = message.size() - cut;
    message.resize(cut);
    if (!message.empty() && message.back() != '\n') message += '\n';
    message += "... (message shortened: " + std::to_string(left_out) + " more bytes left out)";
    return message;
}

}  // namespace safesite::io
