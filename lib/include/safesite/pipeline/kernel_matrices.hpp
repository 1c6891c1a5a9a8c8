#pragma once
/// \file kernel_matrices.hpp
/// The discretised kernels of a run written out for other software (docs/formats.md,
/// "matrices/"): P (survival–growth) and F (reproduction) of every census-year kernel and of
/// the pooled kernel, F of the pooled kernel under every scenario, as Matrix Market files
/// (report/matrix_market.hpp), with the mesh and an index as CSV.
///
/// Convention: entry (r, c) is the kernel value times the quadrature weight of the column,
/// \f$A_{(k',i),(k,j)} = K((k',z_i),(k,z_j))\,w_j\f$ (kernel/kernel_operator.hpp), so that
/// \f$n(t+1) = (P + F)\,n(t)\f$ on density values at the nodes and the dominant eigenvalue of
/// P + F is the IPM's λ.

#include <filesystem>
#include <string>
#include <vector>

#include "safesite/pipeline/analysis_result.hpp"
#include "safesite/pipeline/prepared_model.hpp"

namespace safesite::pipeline {

/// A file stem for a kernel or scenario label: ASCII letters and digits kept (letters in lower
/// case), '.', '-' and '_' kept, every other run of characters one '-', at most 48 characters,
/// never empty ("kernel" when nothing is left).
std::string file_stem(const std::string& label);

/// Write `<dir>/matrices/`: for each kernel (census years in order, then pooled)
/// `<kernel>_P.mtx` and `<kernel>_F.mtx`; for each scenario s (1-based, model-file order)
/// `scenario-<s>-<name>_F.mtx` (its P is `pooled_P.mtx`); `mesh.csv` (one row per state:
/// index, microsite, stage, size, weight) and `kernels.csv` (kernel, scenario, part, file,
/// entries). One dense matrix at a time is held in memory. Every file goes through
/// report::write_output_file (atomic). Returns the paths written, in order.
/// \throws InputError (key "out") when a file cannot be written; errors of analyse() when a
///         kernel cannot be rebuilt.
std::vector<std::filesystem::path> write_kernel_matrices(const std::filesystem::path& dir,
                                                         const PreparedModel& model,
                                                         const AnalysisResult& analysis);

}  // namespace safesite::pipeline
