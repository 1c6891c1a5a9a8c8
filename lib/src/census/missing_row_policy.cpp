#include "safesite/census/missing_row_policy.hpp"

namespace safesite::census {

std::string_view to_string(MissingRowPolicy p) noexcept {
    return p == MissingRowPolicy::error ? "error" : "notfound";
}

std::optional<MissingRowPolicy> parse_missing_row_policy(std::string_view name) noexcept {
    if (name == "error") return MissingRowPolicy::error;
    if (name == "notfound") return MissingRowPolicy::notfound;
    return std::nullopt;
}

}  // namespace safesite::census
