// The progress line of long verbs (cli/progress_line.hpp): its text, hand-worked, and that
// nothing is written when progress is off (stderr not a terminal, or --quiet).
#include <catch2/catch.hpp>

#include <algorithm>
#include <sstream>
#include <string>

#include "progress_line.hpp"

using namespace safesite::cli;

TEST_CASE("clock text of durations", "[cli][unit]") {
    CHECK(clock_text(0.0) == "0:00");
    CHECK(clock_text(59.4) == "0:59");
    CHECK(clock_text(59.6) == "1:00");
    CHECK(clock_text(754.0) == "12:34");
    CHECK(clock_text(3600.0) == "1:00:00");
    CHECK(clock_text(3725.0) == "1:02:05");
    CHECK(clock_text(-5.0) == "0:00");
}

TEST_CASE("progress text: done, elapsed and the time left at the mean pace", "[cli][unit]") {
    CHECK(progress_text("bootstrap replicates", 0, 99, 3.0) ==
          "safesite: bootstrap replicates 0/99, 0:03 elapsed");
    // 12 of 99 in 48 s: 4 s each, 87 left, 348 s = 5:48 (hand-worked).
    CHECK(progress_text("bootstrap replicates", 12, 99, 48.0) ==
          "safesite: bootstrap replicates 12/99, 0:48 elapsed, about 5:48 left");
    CHECK(progress_text("bootstrap replicates", 99, 99, 396.0) ==
          "safesite: bootstrap replicates 99/99, 6:36 elapsed, done");
}

TEST_CASE("no progress line unless progress is on; in place with a carriage return",
          "[cli][unit]") {
    std::ostringstream out, err;
    {
        const Streams quiet{out, err, false};
        ProgressLine line(quiet, "items");
        line.update(1, 2);
        line.update(2, 2);
    }
    CHECK(err.str().empty());
    {
        const Streams shown{out, err, true};
        ProgressLine line(shown, "items");
        line.update(1, 2);
        line.update(2, 2);  // the last one is always drawn
        line.finish();
        line.update(2, 2);  // after finish: nothing
    }
    const std::string s = err.str();
    CHECK(s.rfind("\rsafesite: items 1/2, ", 0) == 0);
    CHECK(s.find("\rsafesite: items 2/2, ") != std::string::npos);
    CHECK(s.back() == '\n');
    CHECK(std::count(s.begin(), s.end(), '\n') == 1);
    CHECK(std::count(s.begin(), s.end(), '\r') == 2);
}
