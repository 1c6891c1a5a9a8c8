#include "safesite/census/row_policies.hpp"

namespace safesite::census {

std::string_view to_string(AliveWithoutSize p) noexcept {
    return p == AliveWithoutSize::keep ? "keep" : "error";
}

std::optional<AliveWithoutSize> parse_alive_without_size(std::string_view name) noexcept {
    if (name == "keep") return AliveWithoutSize::keep;
    if (name == "error") return AliveWithoutSize::error;
    return std::nullopt;
}

std::string_view to_string(AliveAfterDead p) noexcept {
    return p == AliveAfterDead::error ? "error" : "notfound";
}

std::optional<AliveAfterDead> parse_alive_after_dead(std::string_view name) noexcept {
    if (name == "error") return AliveAfterDead::error;
    if (name == "notfound") return AliveAfterDead::notfound;
    return std::nullopt;
}

}  // namespace safesite::census
