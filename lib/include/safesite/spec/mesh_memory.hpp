#pragma once
/// \file mesh_memory.hpp
/// The memory the kernels of a model need, estimated from the model file before any work, and
/// the limit on `[mesh] points` that follows (docs/methods/kernel.md, "Memory").
///
/// With n mesh points, C continuous classes (microsites, twice that with a seedling class) and
/// K kernels kept for the analyses (one per transition year, and the pooled one), the largest
/// blocks of doubles alive at once are the K kernel operators (C blocks of n × n each), plus
/// the dense (C·n)² matrices of the life-history step (P, I − P, its LU factors, and one more
/// found by measurement), which also covers the kernel of the mesh check on 2n points
/// (C blocks of 2n × 2n):
///
///     bytes ≈ 8 · (K·C + 4·C²) · n²
///
/// The bootstrap holds this once more per worker thread.

#include <cstddef>
#include <string>

namespace safesite::spec {

struct ModelSpec;

/// The estimate for one model.
struct MeshMemory {
    std::size_t points = 0;   ///< n
    std::size_t classes = 0;  ///< C
    std::size_t kernels = 0;  ///< K
    double bytes = 0.0;       ///< the estimate
    /// The most points whose estimate stays within k_mesh_memory_limit (same C and K).
    std::size_t largest_points = 0;
};

/// The limit on the estimate: 2 GB (2·10⁹ bytes).
inline constexpr double k_mesh_memory_limit = 2e9;

/// bytes ≈ 8 · (K·C + 4·C²) · n².
double mesh_memory_bytes(std::size_t points, std::size_t classes, std::size_t kernels);

/// The continuous classes of `model`'s kernels: the microsites, twice as many with a seedling
/// class (`perturbation.juvenile = "seedling"`, the default, and `census.seedling_flag`).
std::size_t kernel_classes(const ModelSpec& model);

/// The estimate for `model` with `kernels` kernels kept.
MeshMemory mesh_memory(const ModelSpec& model, std::size_t kernels);

/// "100 points × 6 classes × 10 kernels: about 14 MB".
std::string describe(const MeshMemory& m);

/// Refuse a mesh whose estimate exceeds the limit: SpecError at `mesh.points` giving the
/// estimate and the largest admissible number of points.
void require_mesh_memory(const ModelSpec& model, std::size_t kernels);

}  // namespace safesite::spec
