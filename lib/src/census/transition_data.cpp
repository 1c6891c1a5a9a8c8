#include "safesite/census/transition_data.hpp"

#include <algorithm>
#include <limits>
#include <set>

namespace safesite::census {

namespace {

/// Year labels with their levels in ascending numeric order (not string order).
std::vector<std::string> year_levels(const std::set<int>& years) {
    std::vector<std::string> out;
    for (int y : years) out.push_back(std::to_string(y));
    return out;
}

}  // namespace

TransitionData build_transitions(const Census& census) {
    if (!census.valid())
        throw UsageError("build_transitions: the census '" + census.file() +
                         "' has validation errors");
    constexpr double nan = std::numeric_limits<double>::quiet_NaN();
    const auto& records = census.records();
    const auto& labels = census.options().microsites;
    TransitionData out;

    {
        const auto& rows = census.transition_rows();
        std::vector<double> size, size_next, survived, flowered, seeds, seedling;
        std::vector<std::string> microsite, year, plot, plant;
        std::set<int> years;
        for (const auto& [t, next] : rows) {
            const CensusRecord& a = records[t];
            const CensusRecord& b = records[next];
            const bool alive = b.status == Status::alive;
            size.push_back(a.size);
            size_next.push_back(alive ? b.size : nan);
            survived.push_back(alive ? 1.0 : 0.0);
            flowered.push_back(a.flowered ? 1.0 : 0.0);
            seeds.push_back(a.seeds ? static_cast<double>(*a.seeds) : nan);
            seedling.push_back(census.is_seedling_row(t) ? 1.0 : 0.0);
            microsite.push_back(a.microsite);
            year.push_back(std::to_string(a.year));
            years.insert(a.year);
            plot.push_back(a.plot);
            plant.push_back(a.plant);
        }
        stats::Table& t = out.transitions;
        t.add_numeric("size", std::move(size));
        t.add_numeric("size_next", std::move(size_next));
        t.add_numeric("survived", std::move(survived));
        t.add_numeric("flowered", std::move(flowered));
        t.add_numeric("seeds", std::move(seeds));
        t.add_categorical("microsite", std::move(microsite), labels);
        t.add_categorical("year", std::move(year), year_levels(years));
        t.add_categorical("plot", std::move(plot));
        t.add_categorical("plant", std::move(plant));
        t.add_numeric("seedling", std::move(seedling));
    }
    {
        std::vector<double> size;
        std::vector<std::string> microsite, year, plot;
        std::set<int> years;
        for (std::size_t i : census.recruit_rows()) {
            const CensusRecord& r = records[i];
            size.push_back(r.size);
            microsite.push_back(r.microsite);
            year.push_back(std::to_string(r.year - 1));  // attributed to t → t + 1, label t
            years.insert(r.year - 1);
            plot.push_back(r.plot);
        }
        stats::Table& t = out.recruits;
        t.add_numeric("size", std::move(size));
        t.add_categorical("microsite", std::move(microsite), labels);
        t.add_categorical("year", std::move(year), year_levels(years));
        t.add_categorical("plot", std::move(plot));
    }
    {
        std::vector<double> size, flowered, seeds, seedling;
        std::vector<std::string> microsite, year, plot, plant;
        std::set<int> years;
        for (std::size_t i = 0; i < records.size(); ++i) {
            const CensusRecord& r = records[i];
            if (r.status != Status::alive) continue;
            size.push_back(r.size);
            flowered.push_back(r.flowered ? 1.0 : 0.0);
            seeds.push_back(r.seeds ? static_cast<double>(*r.seeds) : nan);
            seedling.push_back(census.is_seedling_row(i) ? 1.0 : 0.0);
            microsite.push_back(r.microsite);
            year.push_back(std::to_string(r.year));
            years.insert(r.year);
            plot.push_back(r.plot);
            plant.push_back(r.plant);
        }
        stats::Table& t = out.plants;
        t.add_numeric("size", std::move(size));
        t.add_numeric("flowered", std::move(flowered));
        t.add_numeric("seeds", std::move(seeds));
        t.add_categorical("microsite", std::move(microsite), labels);
        t.add_categorical("year", std::move(year), year_levels(years));
        t.add_categorical("plot", std::move(plot));
        t.add_categorical("plant", std::move(plant));
        t.add_numeric("seedling", std::move(seedling));
    }
    return out;
}

}  // namespace safesite::census
