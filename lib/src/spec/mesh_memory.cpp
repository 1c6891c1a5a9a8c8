// Memory estimate of the kernels (docs/methods/kernel.md, "Memory").
#include "safesite/spec/mesh_memory.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "safesite/error.hpp"
#include "safesite/spec/model_spec.hpp"

namespace safesite::spec {

namespace {

/// Doubles per n² (the estimate is this times 8 n²): K·C for the kernels kept, 4·C² for the
/// dense matrices of the life-history step (which also covers the 4·C of the mesh check).
double per_square(std::size_t classes, std::size_t kernels) {
    const auto c = static_cast<double>(classes), k = static_cast<double>(kernels);
    return k * c + 4.0 * c * c;
}

std::string bytes_text(double bytes) {
    char buf[64];
    if (bytes >= 1e9)
        std::snprintf(buf, sizeof buf, "%.3g GB", bytes / 1e9);
    else
        std::snprintf(buf, sizeof buf, "%.0f MB", std::max(1.0, std::ceil(bytes / 1e6)));
    return buf;
}

}  // namespace

double mesh_memory_bytes(std::size_t points, std::size_t classes, std::size_t kernels) {
    const auto n = static_cast<double>(points);
    return 8.0 * per_square(classes, kernels) * n * n;
}

std::size_t kernel_classes(const ModelSpec& model) {
    const std::size_t m = model.microsites.labels.size();
    const bool seedling_class =
        model.perturbation.juvenile == JuvenileRule::seedling && model.census.seedling_flag;
    return seedling_class ? 2 * m : m;
}

MeshMemory mesh_memory(const ModelSpec& model, std::size_t kernels) {
    MeshMemory out;
    out.points = model.mesh.points;
    out.classes = std::max<std::size_t>(1, kernel_classes(model));
    out.kernels = std::max<std::size_t>(1, kernels);
    out.bytes = mesh_memory_bytes(out.points, out.classes, out.kernels);
    out.largest_points = static_cast<std::size_t>(
        std::floor(std::sqrt(k_mesh_memory_limit / (8.0 * per_square(out.classes, out.kernels)))));
    return out;
}

std::string describe(const MeshMemory& m) {
    return std::to_string(m.points) + " points × " + std::to_string(m.classes) + " classes × " +
           std::to_string(m.kernels) + " kernels: about " + bytes_text(m.bytes);
}

void require_mesh_memory(const ModelSpec& model, std::size_t kernels) {
    const MeshMemory m = mesh_memory(model, kernels);
    if (m.bytes <= k_mesh_memory_limit) return;
    SourceLocation at = model.mesh.points_at;
    if (at.file.empty()) at.file = model.file.string();
    at.key = "mesh.points";
    throw SpecError(at, "'mesh.points' = " + std::to_string(m.points) +
                            " needs too much memory for the kernels (" + describe(m) +
                            ", more than the limit of " + bytes_text(k_mesh_memory_limit) +
                            "); expected at most " + std::to_string(m.largest_points) +
                            " points for " + std::to_string(m.classes) + " classes and " +
                            std::to_string(m.kernels) +
                            " kernels (docs/methods/kernel.md, \"Memory\")");
}

}  // namespace safesite::spec
