#pragma once
/// \file size_transform.hpp
/// The scale on which size enters the kernel: z = h(x) for a raw size x.

#include <optional>
#include <string_view>

namespace safesite::census {

/// Size transforms z = h(x) and the raw sizes each can take:
/// - none:  z = x,            any finite x;
/// - log:   z = ln x,         x > 0;
/// - log1p: z = ln(1 + x),    x > −1;
/// - sqrt:  z = √x,           x ≥ 0.
enum class SizeTransform { none, log, log1p, sqrt };

/// The model-file spelling: "none", "log", "log1p", "sqrt".
std::string_view to_string(SizeTransform t) noexcept;
/// Parse the model-file spelling; nothing for an unknown name.
std::optional<SizeTransform> parse_size_transform(std::string_view name) noexcept;
/// True when h(x) is defined and finite for the raw size x.
bool in_domain(SizeTransform t, double x) noexcept;
/// z = h(x). Precondition: in_domain(t, x).
double apply(SizeTransform t, double x) noexcept;
/// x = h⁻¹(z), the raw size of a transformed size (for output tables).
double invert(SizeTransform t, double z) noexcept;
/// The domain in words, for messages: "size > 0" etc.
std::string_view domain_text(SizeTransform t) noexcept;

}  // namespace safesite::census
