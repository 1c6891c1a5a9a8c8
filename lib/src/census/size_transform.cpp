#include "safesite/census/size_transform.hpp"

#include <cmath>

namespace safesite::census {

std::string_view to_string(SizeTransform t) noexcept {
    switch (t) {
        case SizeTransform::none: return "none";
        case SizeTransform::log: return "log";
        case SizeTransform::log1p: return "log1p";
        case SizeTransform::sqrt: return "sqrt";
    }
    return "none";
}

std::optional<SizeTransform> parse_size_transform(std::string_view name) noexcept {
    for (auto t : {SizeTransform::none, SizeTransform::log, SizeTransform::log1p,
                   SizeTransform::sqrt})
        if (to_string(t) == name) return t;
    return std::nullopt;
}

bool in_domain(SizeTransform t, double x) noexcept {
    if (!std::isfinite(x)) return false;
    switch (t) {
        case SizeTransform::none: return true;
        case SizeTransform::log: return x > 0.0;
        case SizeTransform::log1p: return x > -1.0;
        case SizeTransform::sqrt: return x >= 0.0;
    }
    return false;
}

double apply(SizeTransform t, double x) noexcept {
    switch (t) {
        case SizeTransform::none: return x;
        case SizeTransform::log: return std::log(x);
        case SizeTransform::log1p: return std::log1p(x);
        case SizeTransform::sqrt: return std::sqrt(x);
    }
    return x;
}

double invert(SizeTransform t, double z) noexcept {
    switch (t) {
        case SizeTransform::none: return z;
        case SizeTransform::log: return std::exp(z);
        case SizeTransform::log1p: return std::expm1(z);
        case SizeTransform::sqrt: return z * z;
    }
    return z;
}

std::string_view domain_text(SizeTransform t) noexcept {
    switch (t) {
        case SizeTransform::none: return "a finite size";
        case SizeTransform::log: return "size > 0";
        case SizeTransform::log1p: return "size > -1";
        case SizeTransform::sqrt: return "size >= 0";
    }
    return "";
}

}  // namespace safesite::census
