// Edit distance and "did you mean" hints. Expected distances are worked by hand from the
// definitions (Levenshtein 1966: insert, delete, substitute; Damerau 1964: plus the swap of
// two adjacent characters; the optimal-string-alignment variant edits no substring twice).
// "kitten" → "sitting" = 3 is the usual textbook example (k→s, e→i, insert g; from memory).
#include <catch2/catch.hpp>

#include "safesite/io/near_match.hpp"

using safesite::io::closest_match;
using safesite::io::did_you_mean;
using safesite::io::edit_distance;

TEST_CASE("edit distance: insertions, deletions, substitutions, adjacent swaps", "[io][unit]") {
    CHECK(edit_distance("", "") == 0);
    CHECK(edit_distance("", "abc") == 3);
    CHECK(edit_distance("abc", "") == 3);
    CHECK(edit_distance("points", "points") == 0);
    CHECK(edit_distance("point", "points") == 1);   // one insertion
    CHECK(edit_distance("kitten", "sitting") == 3);
    CHECK(edit_distance("gravle", "gravel") == 1);  // one adjacent swap (Damerau)
    CHECK(edit_distance("flaw", "lawn") == 2);      // delete f, insert n
    // Optimal string alignment: "ca" → "abc" needs 3 (the true Damerau distance is 2, reached
    // only by editing the swapped pair again, which this variant does not allow).
    CHECK(edit_distance("ca", "abc") == 3);
    // Symmetric.
    CHECK(edit_distance("survival", "survivl") == edit_distance("survivl", "survival"));
}

TEST_CASE("closest match: near misses get a hint, far words do not", "[io][unit]") {
    const std::vector<std::string> keys{"points", "rule", "eviction", "lower", "upper", "margin"};
    CHECK(closest_match("point", keys).value() == "points");
    CHECK(closest_match("rules", keys).value() == "rule");
    CHECK(closest_match("evicton", keys).value() == "eviction");
    CHECK_FALSE(closest_match("colour", keys).has_value());
    CHECK_FALSE(closest_match("points", keys).has_value());  // an exact key needs no hint
    // Threshold max(2, n/3) = 2 for five letters: "lxwxr" (2 from lower) is near;
    // "xxxxr" (4 from upper and lower) is not.
    CHECK(closest_match("lxwxr", keys).value() == "lower");
    CHECK_FALSE(closest_match("xxxxr", keys).has_value());
    CHECK(did_you_mean("point", keys) == "; did you mean 'points'?");
    CHECK(did_you_mean("colour", keys).empty());
}
