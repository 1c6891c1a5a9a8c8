#pragma once
/// \file kernel_error.hpp
/// The error the kernel module throws for bad arguments or bad kernel values.

#include <cstddef>
#include <string>

#include "safesite/error.hpp"

namespace safesite::kernel {

/// A kernel argument or an evaluated kernel value is not admissible: a mesh with L ≥ U or
/// n < 2, a probability outside [0, 1], a negative or non-finite vital rate, growth density
/// or recruit density, a class or microsite index out of range.
///
/// It is a UsageError (the caller passed values the kernel cannot use); the offending place is
/// kept as fields so that callers (the CLI, the pipeline) can map it back to a model-file key:
/// - `block()`: the part of the kernel, e.g. "mesh", "class 2 (juvenile, bare)", "microsite 1
///   (litter)", "stage 0 (seed bank)", "stage matrix";
/// - `parameter()`: the quantity, e.g. "upper", "size", "survival", "growth density",
///   "arrival", "establishment", "recruit density", "stage transition";
/// - `index()`: the mesh point (0-based) or matrix row at which a value failed, or `npos`.
class KernelError : public UsageError {
public:
    static constexpr std::size_t npos = static_cast<std::size_t>(-1);

    KernelError(std::string block, std::string parameter, std::size_t index,
                const std::string& reason)
        : UsageError(render(block, parameter, index, reason)),
          m_block(std::move(block)),
          m_parameter(std::move(parameter)),
          m_index(index) {}

    const std::string& block() const noexcept { return m_block; }
    const std::string& parameter() const noexcept { return m_parameter; }
    std::size_t index() const noexcept { return m_index; }

private:
    static std::string render(const std::string& block, const std::string& parameter,
                              std::size_t index, const std::string& reason) {
        std::string out = "kernel " + block + ", " + parameter;
        if (index != npos) out += " at point " + std::to_string(index);
        return out + ": " + reason;
    }

    std::string m_block;
    std::string m_parameter;
    std::size_t m_index;
};

}  // namespace safesite::kernel
