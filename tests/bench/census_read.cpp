// Benchmark: read, validate and tabulate a census of the demo's size (issue 4: about 2 000
// tagged plants over 10 census years). Prints its figures; never fails on time.
#include <chrono>
#include <ctime>
#include <cstdio>
#include <random>
#include <string>

#include "safesite/census/census.hpp"
#include "safesite/census/transition_data.hpp"
#include "safesite/io/csv_table.hpp"

int main() {
    // An invented census: plants in 20 plots, recruited over the years, dying at random.
    std::mt19937_64 rng(20261201);
    std::uniform_real_distribution<double> u(0.0, 1.0);
    std::string text = "plant,year,plot,microsite,size,status,flowered,seeds,seedling\n";
    const char* micro[] = {"gravel", "cushion", "tussock"};
    const int plants = 2000, first = 2015, years = 10;
    for (int p = 0; p < plants; ++p) {
        const int start = p < 800 ? first : first + 1 + static_cast<int>(u(rng) * (years - 1));
        std::string plot = "P";
        plot += std::to_string(p % 20);
        const char* m = micro[p % 3];
        double size = 1.0 + 5.0 * u(rng);
        for (int y = start; y < first + years; ++y) {
            const bool dies = u(rng) < 0.15;
            const bool flowers = !dies && u(rng) < 0.3;
            text += "T";
            text += std::to_string(p) + "," + std::to_string(y) + "," + plot + "," + m + ",";
            if (dies) {
                text += ",dead,,,0\n";
                break;
            }
            text += std::to_string(size) + ",alive," + (flowers ? "1," : "0,") +
                    (flowers ? std::to_string(static_cast<int>(50 * u(rng))) : "") + "," +
                    (y == start && start > first ? "1" : "0") + "\n";
            size *= 0.9 + 0.3 * u(rng);
        }
    }
    safesite::census::CensusOptions o;
    o.transform = safesite::census::SizeTransform::log;
    o.microsites = {"gravel", "cushion", "tussock"};

    const std::clock_t c0 = std::clock();
    const auto t0 = std::chrono::steady_clock::now();
    const auto csv = safesite::io::CsvTable::parse(text, "bench.csv");
    const auto t1 = std::chrono::steady_clock::now();
    const auto census = safesite::census::read_census(csv, o);
    const auto t2 = std::chrono::steady_clock::now();
    const auto data = safesite::census::build_transitions(census);
    const auto t3 = std::chrono::steady_clock::now();
    const std::clock_t c3 = std::clock();
    auto ms = [](auto a, auto b) {
        return std::chrono::duration<double, std::milli>(b - a).count();
    };
    std::printf("census rows: %zu, plants: %zu, transitions: %zu, recruits: %zu, issues: %zu\n",
                csv.rows(), census.summary().plants, data.transitions.rows(),
                data.recruits.rows(), census.report().issues().size());
    std::printf("parse CSV: %.1f ms, validate: %.1f ms, tables: %.1f ms\n", ms(t0, t1),
                ms(t1, t2), ms(t2, t3));
    // CPU time as well: on a shared, loaded machine the wall time mostly measures waiting.
    std::printf("total: %.1f ms wall, %.1f ms CPU\n", ms(t0, t3),
                1000.0 * static_cast<double>(c3 - c0) / CLOCKS_PER_SEC);
    return 0;
}
