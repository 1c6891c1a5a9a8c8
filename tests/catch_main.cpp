// The single Catch2 main of the test suite, compiled once (style guide 4.17).
#define CATCH_CONFIG_MAIN
#include <catch2/catch.hpp>
