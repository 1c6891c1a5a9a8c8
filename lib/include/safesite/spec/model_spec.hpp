#pragma once
/// \file model_spec.hpp
/// The TOML model file as a validated, typed description (docs/formats.md, "Model file").
///
/// Reading checks every key: unknown keys, wrong types, missing required keys and values out
/// of range are SpecErrors with the file, the line (from the TOML parser's source regions),
/// the dotted key path (`rates.survival.family`, `scenario[2].name` counting from 1) and a
/// "did you mean" hint for near misses. Later stages trust these values (style guide 4.8).

#include <cstddef>
#include <cstdint>
#include <filesystem>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "safesite/census/census.hpp"
#include "safesite/census/missing_row_policy.hpp"
#include "safesite/census/size_transform.hpp"
#include "safesite/error.hpp"
#include "safesite/io/csv_table.hpp"
#include "safesite/spec/arrival_spec.hpp"
#include "safesite/spec/experiment_truth_spec.hpp"
#include "safesite/spec/rate_spec.hpp"
#include "safesite/spec/scenario_spec.hpp"

namespace safesite::spec {

/// `[data]`: input files (resolved against the model file's folder) and column maps.
struct DataSpec {
    std::optional<std::filesystem::path> census;
    std::optional<std::filesystem::path> trapping;
    std::optional<std::filesystem::path> retention;
    io::ColumnMap census_columns;     ///< `[data.columns]`: our census name → file name
    io::ColumnMap trapping_columns;   ///< `[data.trapping_columns]`
    io::ColumnMap retention_columns;  ///< `[data.retention_columns]`
};

/// `[census]`: reading policies.
struct CensusSpec {
    census::MissingRowPolicy missing_row = census::MissingRowPolicy::error;
    census::AliveWithoutSize alive_without_size = census::AliveWithoutSize::keep;
    census::AliveAfterDead alive_after_dead = census::AliveAfterDead::error;
    bool seedling_flag = true;  ///< the census has a `seedling` column marking new recruits
};

enum class QuadratureRule { midpoint, gauss_legendre };
enum class EvictionPolicy { boundary, discard };

/// `[mesh]`: the size domain [L, U] (transformed scale) and its quadrature.
struct MeshSpec {
    std::size_t points = 100;  ///< ≥ 2
    QuadratureRule rule = QuadratureRule::midpoint;
    EvictionPolicy eviction = EvictionPolicy::boundary;
    std::optional<double> lower;  ///< given L; else data minimum − margin·range
    std::optional<double> upper;  ///< given U; else data maximum + margin·range (L < U)
    double margin = 0.1;          ///< ≥ 0, used only for derived bounds
    SourceLocation points_at;     ///< where `points` is given (line 0: the default)
    /// Warn when a kernel loses more than this share of growth or recruit-size mass off the
    /// mesh at an observed size (≥ 0, default 0.01).
    double eviction_warning = 0.01;
    /// Observed sizes outside given bounds are an error unless this is true.
    bool allow_sizes_outside = false;
    SourceLocation lower_at;  ///< where `lower` is written (the [mesh] table when absent)
    SourceLocation upper_at;  ///< where `upper` is written (the [mesh] table when absent)
};

/// `[microsites]`: the labels in the order used everywhere (vectors indexed by microsite),
/// one of which is bare soil.
struct MicrositeSpec {
    std::vector<std::string> labels;  ///< unique, non-empty, ≥ 1
    std::string bare;                 ///< one of labels
    std::size_t bare_index = 0;       ///< position of `bare` in labels
    /// Position of a label, or nothing.
    std::optional<std::size_t> index(std::string_view label) const;
};

enum class EstablishmentMethod { census, fixed };

/// `[establishment]`: e_m estimated from the census, or given.
struct EstablishmentSpec {
    EstablishmentMethod method = EstablishmentMethod::census;
    std::vector<double> values;  ///< method = fixed: e_m in [0, 1], label order
};

enum class JuvenileRule { seedling, size };

/// `[perturbation]`: juvenile survival changes. Absent table: no perturbation
/// (survival_changes empty).
struct PerturbationSpec {
    JuvenileRule juvenile = JuvenileRule::seedling;
    std::optional<double> juvenile_size_below;  ///< juvenile = size: transformed threshold
    std::vector<double> survival_changes;       ///< proportional changes, each ≥ −1
};

/// Most bootstrap replicates accepted (model file and command line; docs/cli.md, "Ranges").
inline constexpr std::size_t k_max_replicates = 10000;
/// Largest seed accepted (model file and command line): 2^63 − 1, the largest TOML integer.
inline constexpr std::uint64_t k_max_seed = 9223372036854775807ULL;

/// The fewest bootstrap replicates B for percentile intervals at `level`: with fewer, an end of
/// the interval is the most extreme replicate or lies between the two most extreme, i.e. the
/// type-7 quantile at p = (1 − level)/2 needs (B − 1)·p ≥ 1: B = ⌈2/(1 − level)⌉ + 1
/// (41 for level 0.95, 21 for 0.90, 201 for 0.99). 0 < level < 1.
std::size_t min_replicates(double level);

/// `[uncertainty]`: bootstrap settings.
struct UncertaintySpec {
    std::size_t replicates = 0;
    std::uint64_t seed = 1;
    double level = 0.95;  ///< 0 < level < 1
    SourceLocation replicates_at;  ///< where `replicates` is given (line 0: not given)
};

/// `[output]`.
struct OutputSpec {
    std::filesystem::path dir;  ///< resolved against the model file's folder (default "out")
    bool print_coordinates = false;
    /// Write the discretised P and F of every kernel (Matrix Market files in `matrices/`).
    bool matrices = true;
};

/// The whole model file.
struct ModelSpec {
    std::filesystem::path file;  ///< the model file as given
    std::string name;            ///< model.name (default: the file's stem)
    census::SizeTransform size_transform = census::SizeTransform::none;
    DataSpec data;
    CensusSpec census;
    MeshSpec mesh;
    MicrositeSpec microsites;
    /// The five vital rates in the order survival, growth, flowering, seeds, recruit_size.
    std::vector<RateSpec> rates;
    EstablishmentSpec establishment;
    ArrivalSpec arrival;
    std::vector<ScenarioSpec> scenarios;
    PerturbationSpec perturbation;
    UncertaintySpec uncertainty;
    OutputSpec output;
    /// `[simulate.trapping]` and `[simulate.retention]`: the truth of the seed experiments
    /// (truth files for `safesite simulate` only; needs arrival.method = "experiments").
    std::optional<ExperimentTruthSpec> experiment_truth;
    /// The dotted key paths present in the file, array-of-table entries without an index
    /// (`scenario.name`), maps as one key (`arrival.fractions`); sorted, unique.
    std::vector<std::string> keys;

    /// The rate called `name`. Throws UsageError for a name that is not a vital rate.
    const RateSpec& rate(std::string_view name) const;
    /// True when every rate has fixed coefficients (no fitting needed).
    bool all_rates_fixed() const noexcept;
};

/// The vital-rate names in canonical order.
const std::vector<std::string>& rate_names();

/// Read and validate a model file. Throws SpecError (file cannot be read, TOML syntax, or any
/// rule of docs/formats.md).
ModelSpec read_model_spec(const std::filesystem::path& file);

/// Validate model-file text; `file` names it in errors and anchors relative paths.
ModelSpec parse_model_spec(std::string_view text, const std::filesystem::path& file);

/// The census reading options of a model: column map, size transform, microsite labels,
/// missing-row policy and seedling flag.
census::CensusOptions to_census_options(const ModelSpec& spec);

const char* to_string(QuadratureRule r) noexcept;
const char* to_string(EvictionPolicy e) noexcept;

}  // namespace safesite::spec
