#include "safesite/io/near_match.hpp"

#include <algorithm>

namespace safesite::io {

std::size_t edit_distance(std::string_view a, std::string_view b) {
    // Dynamic programme over prefixes: d[i][j] = distance between a[0..i) and b[0..j), with the
    // adjacent-swap step of the optimal string alignment variant. Only rows i-2, i-1, i kept.
    const std::size_t n = b.size();
    std::vector<std::size_t> two_back(n + 1), prev(n + 1), cur(n + 1);
    for (std::size_t j = 0; j <= n; ++j) prev[j] = j;
    for (std::size_t i = 1; i <= a.size(); ++i) {
        cur[0] = i;
        for (std::size_t j = 1; j <= n; ++j) {
            const std::size_t cost = a[i - 1] == b[j - 1] ? 0 : 1;
            cur[j] = std::min({prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + cost});
            if (i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1])
                cur[j] = std::min(cur[j], two_back[j - 2] + 1);
        }
        two_back.swap(prev);
        prev.swap(cur);
    }
    return prev[n];
}

std::optional<std::string> closest_match(std::string_view word,
                                         const std::vector<std::string>& candidates) {
    std::optional<std::string> best;
    std::size_t best_distance = 0;
    for (const auto& c : candidates) {
        if (c == word) continue;
        const std::size_t d = edit_distance(word, c);
        const std::size_t limit = std::max<std::size_t>(2, c.size() / 3);
        if (d <= limit && (!best || d < best_distance)) {
            best = c;
            best_distance = d;
        }
    }
    return best;
}

std::string did_you_mean(std::string_view word, const std::vector<std::string>& candidates) {
    if (auto m = closest_match(word, candidates)) return "; did you mean '" + *m + "'?";
    return {};
}

}  // namespace safesite::io
