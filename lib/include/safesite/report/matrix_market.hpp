#pragma once
/// \file matrix_market.hpp
/// A dense matrix as a Matrix Market file, coordinate format (the open exchange format of the
/// NIST Matrix Market; Boisvert, Pozo & Remington 1996, docs/references.md): the banner
/// `%%MatrixMarket matrix coordinate real general`, comment lines starting with `%`, the size
/// line `rows cols entries`, then one line `i j value` per entry with 1-based indices, column
/// by column (column-major order; any order is valid in the format).

#include <cstddef>
#include <string>
#include <vector>

#include <Eigen/Core>

namespace safesite::report {

/// Relative threshold of the written entries: a_ij is written when
/// \f$|a_{ij}| > \tau \max_{kl} |a_{kl}|\f$ with τ = 1e-17 (below the last of the 17
/// significant digits of the largest entry). Dropping the rest changes every column sum by
/// less than rows · τ · max|A|.
inline constexpr double matrix_market_relative_threshold = 1e-17;

/// A Matrix Market file's text and its number of entries.
struct MatrixMarketText {
    std::string text;
    std::size_t entries = 0;
};

/// The Matrix Market text of `matrix`: banner, one `% ` line per comment (a comment must not
/// contain a line break), the size line, then the entries above the threshold, each value
/// with 17 significant digits ("%.17g": reads back to the same double).
/// \throws UsageError when an entry is not finite or a comment holds a line break.
MatrixMarketText to_matrix_market(const Eigen::MatrixXd& matrix,
                                  const std::vector<std::string>& comments = {});

}  // namespace safesite::report
