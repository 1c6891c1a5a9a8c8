// Reading and validating the long-format census (docs/methods/census.md).
#include "safesite/census/census.hpp"

#include <algorithm>
#include <cassert>
#include <cmath>
#include <limits>
#include <map>
#include <set>

#include "safesite/io/near_match.hpp"
#include "safesite/io/quoted.hpp"

namespace safesite::census {

namespace {

constexpr double k_nan = std::numeric_limits<double>::quiet_NaN();

/// A value quoted for a message, cut to 40 characters with its length (io/quoted.hpp).
std::string q(std::string_view s) { return io::quoted_short(s); }

/// Issue codes and their messages in words (docs/methods/census.md lists them).
struct Code {
    Severity severity;
    const char* code;
    const char* message;
};
constexpr Code k_bad_value{Severity::error, "bad_value",
                           "a cell cannot be read as the type of its column"};
constexpr Code k_missing_value{Severity::error, "missing_value",
                               "a plant recorded alive has no flowering record"};
constexpr Code k_missing_size{Severity::error, "missing_size",
                              "a plant recorded alive has no size (census.alive_without_size = "
                              "\"error\"); measure it, or set census.alive_without_size = "
                              "\"keep\" in the model file to keep such rows for survival and "
                              "flowering and leave them out where size is needed"};
constexpr Code k_alive_without_size{Severity::warning, "alive_without_size",
                                    "a plant recorded alive has no size; the row counts for "
                                    "survival, flowering and counts, and is left out of every "
                                    "fit that needs its size (census.alive_without_size = "
                                    "\"keep\"; \"error\" refuses such rows)"};
constexpr Code k_seeds_unknown{Severity::error, "seeds_unknown",
                               "a flowering plant has neither a size nor a seed count, so its "
                               "seeds can be neither counted nor predicted from size; give the "
                               "seed count or the size"};
constexpr Code k_bad_coordinate{Severity::warning, "bad_coordinate",
                                "a coordinate (x or y) cannot be read as a number; coordinates "
                                "are used by no computation, the cell is ignored"};
constexpr Code k_dead_read_notfound{Severity::warning, "dead_read_as_notfound",
                                    "a plant recorded dead is alive in a later year; the dead "
                                    "row is read as not found (census.alive_after_dead = "
                                    "\"notfound\")"};
constexpr Code k_bad_status{Severity::error, "bad_status",
                            "status is not one of alive, dead, notfound"};
constexpr Code k_unknown_microsite{Severity::error, "unknown_microsite",
                                   "microsite label is not in the model's microsite list"};
constexpr Code k_bad_size{Severity::error, "size_outside_transform",
                          "size cannot be taken by the size transform"};
constexpr Code k_seeds_no_flower{Severity::error, "seeds_without_flowering",
                                 "seeds are recorded for a plant that did not flower"};
constexpr Code k_duplicate{Severity::error, "duplicate_row",
                           "a plant has more than one row in one census year"};
constexpr Code k_alive_after_dead{Severity::error, "alive_after_dead",
                                  "a plant is recorded alive after being recorded dead; correct "
                                  "the record, or set census.alive_after_dead = \"notfound\" in "
                                  "the model file to read the dead row as not found (values: "
                                  "\"error\", the default, or \"notfound\")"};
constexpr Code k_microsite_changed{Severity::error, "microsite_changed",
                                   "a plant changes microsite; plants are sessile and keep "
                                   "the microsite they arrived in"};
constexpr Code k_plot_changed{Severity::error, "plot_changed", "a plant changes plot"};
constexpr Code k_missing_row_error{Severity::error, "missing_row",
                                   "a plant has no row in a year its plot was censused "
                                   "(census.missing_row = \"error\")"};
constexpr Code k_missing_row_warning{Severity::warning, "missing_row",
                                     "a plant has no row in a year its plot was censused; "
                                     "treated as not found (census.missing_row = \"notfound\")"};
constexpr Code k_no_transitions{Severity::error, "no_transitions",
                                "no plant has a transition between consecutive census years"};
constexpr Code k_gap{Severity::warning, "census_gap",
                     "census years are not consecutive; no transitions across the gap"};
constexpr Code k_plot_gap{Severity::warning, "plot_not_censused",
                          "a plot has no row in a census year between its first and last "
                          "census"};
constexpr Code k_year_empty{Severity::warning, "year_without_transitions",
                            "a census year has no transition to the next year"};
constexpr Code k_not_seedling{Severity::warning, "first_record_not_seedling",
                              "a plant first recorded after its plot's first census is not "
                              "flagged as a seedling; it is not counted as a recruit"};
constexpr Code k_seedling_later{Severity::warning, "seedling_flag_not_first",
                                "the seedling flag is set on a plant already recorded in an "
                                "earlier year; the flag is ignored"};
constexpr Code k_neighbour_on_bare{Severity::warning, "neighbour_size_on_bare",
                                   "a neighbour size is recorded for a plant on bare soil; "
                                   "the value is ignored"};

void add(ValidationReport& r, const Code& c, IssueExample e) {
    r.add(c.severity, c.code, c.message, std::move(e));
}

}  // namespace

const char* to_string(Status s) noexcept {
    switch (s) {
        case Status::alive: return "alive";
        case Status::dead: return "dead";
        case Status::notfound: return "notfound";
    }
    return "alive";
}

Census read_census(const io::CsvTable& table, CensusOptions options) {
    assert(!options.microsites.empty());
    Census c;
    c.m_file = table.file();
    c.m_report = ValidationReport(table.file());
    ValidationReport& report = c.m_report;
    const auto& map = options.columns;
    const std::vector<std::string>& labels = options.microsites;

    // Columns: the required ones are a structural error at once (DataError listing the header).
    const std::size_t col_plant = table.require("plant", map);
    const std::size_t col_year = table.require("year", map);
    const std::size_t col_plot = table.require("plot", map);
    const std::size_t col_microsite = table.require("microsite", map);
    const std::size_t col_status = table.require("status", map);
    const std::size_t col_size = table.require("size", map);
    const std::size_t col_flowered = table.require("flowered", map);
    const auto col_seeds = table.locate("seeds", map);
    constexpr std::size_t k_absent = std::numeric_limits<std::size_t>::max();
    const std::size_t col_seedling =
        options.seedling_flag ? table.require("seedling", map) : k_absent;
    const auto col_x = table.locate("x", map);
    const auto col_y = table.locate("y", map);
    const auto col_neighbour = table.locate("neighbour_size", map);
    assert(!options.bare || *options.bare < labels.size());
    if (table.rows() == 0)
        throw DataError({table.file(), table.header_line(), 0, ""},
                        "the census has a header but no data rows; expected one row per plant "
                        "per census year below the header (docs/formats.md, \"Census\")");

    // 1. Type every row; a row with an unreadable cell is reported and left out, but its
    //    plant, year and plot still count as "a row exists" for the missing-row rule.
    std::vector<CensusRecord> records;
    std::set<std::pair<std::string, int>> rows_seen;  // (plant, year) of every row
    std::map<std::string, std::set<int>> plot_years;  // plot → years with any row
    std::set<std::string> tainted;  // plants with a row left out for an error
    std::size_t left_out = 0;       // rows left out for an error
    for (std::size_t row = 0; row < table.rows(); ++row) {
        bool ok = true;
        auto cell = [&](auto read) {
            try {
                return read();
            } catch (const DataError& e) {
                add(report, k_bad_value, {e.line(), e.column(), e.key(), e.reason()});
                ok = false;
                return decltype(read())();
            }
        };
        auto where = [&](std::size_t col, std::string text) {
            return IssueExample{table.line(row, col), col + 1, table.header()[col],
                                std::move(text)};
        };
        CensusRecord r;
        r.line = table.line(row);
        r.plant = cell([&] { return table.text(row, col_plant); });
        const std::int64_t year = cell([&] { return table.integer(row, col_year); });
        if (ok && (year < -100000 || year > 100000)) {
            add(report, k_bad_value,
                where(col_year, "year " + std::to_string(year) +
                                    " is not a plausible census year"));
            ok = false;
        }
        r.year = static_cast<int>(year);
        r.plot = cell([&] { return table.text(row, col_plot); });
        if (ok) {
            rows_seen.insert({r.plant, r.year});
            plot_years[r.plot].insert(r.year);
        }
        r.microsite = cell([&] { return table.text(row, col_microsite); });
        if (!r.microsite.empty()) {
            const auto it = std::find(labels.begin(), labels.end(), r.microsite);
            if (it == labels.end()) {
                std::string known;
                for (const auto& l : labels) known += (known.empty() ? "" : ", ") + l;
                add(report, k_unknown_microsite,
                    where(col_microsite, "microsite " + q(r.microsite) + " is not one of " +
                                             known + io::did_you_mean(r.microsite, labels)));
                ok = false;
            } else {
                r.microsite_index = static_cast<std::size_t>(it - labels.begin());
            }
        }
        const std::string status = cell([&] { return table.text(row, col_status); });
        if (status == "alive")
            r.status = Status::alive;
        else if (status == "dead")
            r.status = Status::dead;
        else if (status == "notfound")
            r.status = Status::notfound;
        else if (!status.empty()) {
            add(report, k_bad_status,
                where(col_status, "status " + q(status) +
                                      " is not one of alive, dead, notfound" +
                                      io::did_you_mean(status, {"alive", "dead", "notfound"})));
            ok = false;
        }
        const bool alive = r.status == Status::alive && !status.empty();

        // Size and flowering: required when alive; read (for type errors only) otherwise.
        r.raw_size = k_nan;
        r.size = k_nan;
        bool no_size = false;  // alive, size empty, kept (alive_without_size = keep)
        const auto no_size_text = [&] {
            return "plant " + q(r.plant) + " is alive in " + std::to_string(r.year) +
                   " but has no size";
        };
        if (alive && table.empty(row, col_size)) {
            if (options.alive_without_size == AliveWithoutSize::error) {
                add(report, k_missing_size,
                    where(col_size, no_size_text() + "; to keep such rows, set "
                                                     "census.alive_without_size = \"keep\""));
                ok = false;
            } else {
                no_size = true;  // counted below if the row is otherwise readable
            }
        } else if (auto x = cell([&] { return table.optional_real(row, col_size); })) {
            r.raw_size = *x;
            if (alive) {
                if (!in_domain(options.transform, *x)) {
                    add(report, k_bad_size,
                        where(col_size, "size " + q(table.cell(row, col_size)) +
                                            " cannot be transformed by " +
                                            std::string(to_string(options.transform)) +
                                            "; expected " +
                                            std::string(domain_text(options.transform))));
                    ok = false;
                } else {
                    r.size = apply(options.transform, *x);
                }
            }
        }
        if (alive && table.empty(row, col_flowered)) {
            add(report, k_missing_value,
                where(col_flowered, "plant " + q(r.plant) + " is alive in " +
                                        std::to_string(r.year) +
                                        " but flowered is empty; expected 0 or 1"));
            ok = false;
        } else if (auto f = cell([&] { return table.optional_flag(row, col_flowered); })) {
            r.flowered = alive && *f;
        }
        if (col_seeds) {
            r.seeds = cell([&] { return table.optional_integer(row, *col_seeds); });
            if (r.seeds && *r.seeds < 0) {
                add(report, k_bad_value,
                    where(*col_seeds, "seeds " + q(table.cell(row, *col_seeds)) +
                                          " is negative; expected a count ≥ 0"));
                ok = false;
            } else if (alive && r.seeds && *r.seeds > 0 && !r.flowered &&
                       !table.empty(row, col_flowered)) {
                add(report, k_seeds_no_flower,
                    where(*col_seeds, "plant " + q(r.plant) + " has " +
                                          std::to_string(*r.seeds) + " seeds in " +
                                          std::to_string(r.year) + " but flowered is 0"));
            }
        }
        if (col_seedling != k_absent)
            r.seedling = cell([&] { return table.optional_flag(row, col_seedling); })
                             .value_or(false);
        // Coordinates feed no computation: a bad one is a warning, never a stop.
        auto coordinate = [&](std::size_t col) -> std::optional<double> {
            try {
                return table.optional_real(row, col);
            } catch (const DataError& e) {
                add(report, k_bad_coordinate, {e.line(), e.column(), e.key(), e.reason()});
                return std::nullopt;
            }
        };
        if (col_x) r.x = coordinate(*col_x);
        if (col_y) r.y = coordinate(*col_y);
        if (col_neighbour) {
            r.neighbour_size = cell([&] { return table.optional_real(row, *col_neighbour); });
            if (r.neighbour_size && *r.neighbour_size <= 0.0) {
                add(report, k_bad_value,
                    where(*col_neighbour, "neighbour_size " +
                                              q(table.cell(row, *col_neighbour)) +
                                              " is not positive; expected a size > 0 on the "
                                              "raw scale, or an empty cell"));
                r.neighbour_size.reset();
                ok = false;
            } else if (r.neighbour_size && options.bare &&
                       r.microsite == labels[*options.bare]) {
                add(report, k_neighbour_on_bare,
                    where(*col_neighbour, "plant " + q(r.plant) + " is on bare soil (" +
                                              q(r.microsite) + ") in " +
                                              std::to_string(r.year) +
                                              " but has neighbour_size " +
                                              q(table.cell(row, *col_neighbour))));
                r.neighbour_size.reset();
            }
        }
        if (ok && no_size && r.flowered && !r.seeds) {
            add(report, k_seeds_unknown,
                where(col_size, "plant " + q(r.plant) + " flowered in " +
                                    std::to_string(r.year) +
                                    " but has no size and no seed count"));
            ok = false;
        }
        if (ok && no_size) {
            add(report, k_alive_without_size, where(col_size, no_size_text()));
            ++c.m_summary.alive_without_size;
        }
        if (ok) {
            records.push_back(std::move(r));
        } else {
            ++left_out;
            if (!r.plant.empty()) tainted.insert(r.plant);
        }
    }

    // 2. Per plant, in year order: duplicates, sessile plants, alive after dead.
    std::stable_sort(records.begin(), records.end(),
                     [](const CensusRecord& a, const CensusRecord& b) {
                         return a.plant != b.plant ? a.plant < b.plant : a.year < b.year;
                     });
    std::vector<CensusRecord> kept;
    kept.reserve(records.size());
    for (std::size_t i = 0; i < records.size();) {
        std::size_t j = i;
        while (j < records.size() && records[j].plant == records[i].plant) ++j;
        if (options.alive_after_dead == AliveAfterDead::notfound) {
            std::size_t last_alive = i;
            bool any_alive = false;
            for (std::size_t k = i; k < j; ++k)
                if (records[k].status == Status::alive) {
                    last_alive = k;
                    any_alive = true;
                }
            for (std::size_t k = i; any_alive && k < last_alive; ++k) {
                CensusRecord& r = records[k];
                if (r.status != Status::dead) continue;
                r.status = Status::notfound;
                ++c.m_summary.dead_read_as_notfound;
                add(report, k_dead_read_notfound,
                    {r.line, 0, "", "plant " + q(r.plant) + " is recorded dead in " +
                                        std::to_string(r.year) + " and alive in " +
                                        std::to_string(records[last_alive].year) + " (line " +
                                        std::to_string(records[last_alive].line) + ")"});
            }
        }
        const CensusRecord& first = records[i];
        const CensusRecord* dead = nullptr;
        for (std::size_t k = i; k < j; ++k) {
            const CensusRecord& r = records[k];
            const std::string tag = "plant " + q(r.plant);
            if (k > i && r.year == records[k - 1].year) {
                add(report, k_duplicate,
                    {r.line, 0, "", tag + " has another row for " + std::to_string(r.year) +
                                        " on line " + std::to_string(records[k - 1].line)});
                continue;  // keep the first row of the year
            }
            if (r.microsite != first.microsite)
                add(report, k_microsite_changed,
                    {r.line, 0, "", tag + " is in " + q(r.microsite) + " in " +
                                        std::to_string(r.year) + " but in " +
                                        q(first.microsite) + " on line " +
                                        std::to_string(first.line)});
            if (r.plot != first.plot)
                add(report, k_plot_changed,
                    {r.line, 0, "", tag + " is in plot " + q(r.plot) + " in " +
                                        std::to_string(r.year) + " but in plot " +
                                        q(first.plot) + " on line " +
                                        std::to_string(first.line)});
            if (r.status == Status::alive && dead)
                add(report, k_alive_after_dead,
                    {r.line, 0, "", tag + " is alive in " + std::to_string(r.year) +
                                        " but was recorded dead in " +
                                        std::to_string(dead->year) + " (line " +
                                        std::to_string(dead->line) +
                                        "); to read that row as not found, set "
                                        "census.alive_after_dead = \"notfound\""});
            if (r.status == Status::dead && !dead) dead = &r;
            kept.push_back(r);
        }
        i = j;
    }
    records.swap(kept);

    // 3. Census years, gaps, plots not censused in a census year.
    std::set<int> year_set;
    for (const auto& [plot, ys] : plot_years) year_set.insert(ys.begin(), ys.end());
    CensusSummary& s = c.m_summary;
    s.rows = table.rows();
    s.years.assign(year_set.begin(), year_set.end());
    for (std::size_t k = 1; k < s.years.size(); ++k)
        if (s.years[k] != s.years[k - 1] + 1) {
            s.gaps.push_back({s.years[k - 1], s.years[k]});
            add(report, k_gap,
                {0, 0, "", "no census between " + std::to_string(s.years[k - 1]) + " and " +
                               std::to_string(s.years[k]) + "; transitions " +
                               std::to_string(s.years[k - 1]) + " → " +
                               std::to_string(s.years[k]) + " are not used"});
        }
    for (const auto& [plot, ys] : plot_years)
        for (int y : s.years)
            if (y > *ys.begin() && y < *ys.rbegin() && !ys.count(y))
                add(report, k_plot_gap,
                    {0, 0, "", "plot " + q(plot) + " has no row in " + std::to_string(y)});

    // 4. Missing rows: from a plant's first row to its death (or, if never recorded dead, to
    //    its plot's last census), every year the plot was censused needs a row.
    std::vector<CensusRecord> added;
    for (std::size_t i = 0; i < records.size();) {
        std::size_t j = i;
        while (j < records.size() && records[j].plant == records[i].plant) ++j;
        const CensusRecord& first = records[i];
        if (tainted.count(first.plant)) {  // a left-out row would look like a missing one
            i = j;
            continue;
        }
        int end = std::numeric_limits<int>::max();
        for (std::size_t k = i; k < j; ++k)
            if (records[k].status == Status::dead) {
                end = records[k].year;
                break;
            }
        const auto& ys = plot_years[first.plot];
        std::size_t before = i;  // the plant's last row before the missing year
        for (int y : ys) {
            if (y <= first.year || y > end) continue;
            while (before + 1 < j && records[before + 1].year < y) ++before;
            if (rows_seen.count({first.plant, y})) continue;
            const CensusRecord& prev = records[before];
            const std::string text = "plant " + q(first.plant) + " (plot " + q(first.plot) +
                                     ") has no row for " + std::to_string(y) +
                                     "; its last row before is this one (" +
                                     std::to_string(prev.year) + ")";
            if (options.missing_row == MissingRowPolicy::error) {
                add(report, k_missing_row_error, {prev.line, 0, "", text});
            } else {
                add(report, k_missing_row_warning, {prev.line, 0, "", text});
                CensusRecord nf = first;
                nf.year = y;
                nf.status = Status::notfound;
                nf.size = nf.raw_size = k_nan;
                nf.flowered = false;
                nf.seeds.reset();
                nf.seedling = false;
                nf.x.reset();
                nf.y.reset();
                nf.neighbour_size.reset();
                nf.line = 0;
                added.push_back(std::move(nf));
            }
        }
        i = j;
    }
    if (!added.empty()) {
        records.insert(records.end(), added.begin(), added.end());
        std::stable_sort(records.begin(), records.end(),
                         [](const CensusRecord& a, const CensusRecord& b) {
                             return a.plant != b.plant ? a.plant < b.plant : a.year < b.year;
                         });
    }

    // 5. Per-year counts, transitions, recruits.
    const std::size_t m = labels.size();
    std::map<int, std::size_t> year_index;
    for (std::size_t k = 0; k < s.years.size(); ++k) {
        year_index[s.years[k]] = k;
        YearSummary ys;
        ys.year = s.years[k];
        ys.next_censused = year_set.count(s.years[k] + 1) > 0;
        ys.alive_by_microsite.assign(m, 0);
        ys.recruits_by_microsite.assign(m, 0);
        s.per_year.push_back(std::move(ys));
    }
    s.size_min = k_nan;
    s.size_max = k_nan;
    c.m_seedling_row.assign(records.size(), false);
    for (std::size_t i = 0; i < records.size();) {
        std::size_t j = i;
        while (j < records.size() && records[j].plant == records[i].plant) ++j;
        ++s.plants;
        const CensusRecord& first = records[i];
        const auto& ys = plot_years[first.plot];
        const int plot_first = *ys.begin();
        // New recruit: flagged as seedling (or, without the flag, first recorded after its
        // plot's first census), first seen alive.
        bool recruit = false;
        if (first.status == Status::alive) {
            if (options.seedling_flag) {
                recruit = first.seedling;
                if (!first.seedling && first.year > plot_first && !tainted.count(first.plant))
                    add(report, k_not_seedling,
                        {first.line, 0, "", "plant " + q(first.plant) + " is first recorded in " +
                                                std::to_string(first.year) + ", after plot " +
                                                q(first.plot) + " was first censused (" +
                                                std::to_string(plot_first) + ")"});
            } else {
                recruit = first.year > plot_first;
            }
        }
        if (recruit) {
            c.m_seedling_row[i] = true;
            if (ys.count(first.year - 1)) {
                c.m_recruits.push_back(i);
                ++s.per_year[year_index.at(first.year - 1)]
                      .recruits_by_microsite[first.microsite_index];
                ++s.recruits;
            } else {
                ++s.unattributed_recruits;
            }
        }
        for (std::size_t k = i; k < j; ++k) {
            const CensusRecord& r = records[k];
            if (k > i && r.seedling && options.seedling_flag)
                add(report, k_seedling_later,
                    {r.line, 0, "", "plant " + q(r.plant) + " is flagged as a seedling in " +
                                        std::to_string(r.year) + " but was recorded in " +
                                        std::to_string(first.year)});
            if (r.status != Status::alive) continue;
            YearSummary& y = s.per_year[year_index.at(r.year)];
            ++y.alive;
            ++y.alive_by_microsite[r.microsite_index];
            if (r.flowered) {
                ++y.flowering;
                if (!r.seeds) ++y.flowering_without_count;
            }
            if (r.seeds) y.seeds_counted += *r.seeds;
            if (!std::isnan(r.size)) {
                if (std::isnan(s.size_min) || r.size < s.size_min) s.size_min = r.size;
                if (std::isnan(s.size_max) || r.size > s.size_max) s.size_max = r.size;
            }
            if (k + 1 < j && records[k + 1].year == r.year + 1) {
                if (records[k + 1].status == Status::notfound) {
                    ++y.excluded_notfound;
                } else {
                    ++y.transitions;
                    ++s.transitions;
                    c.m_transitions.emplace_back(k, k + 1);
                }
            }
        }
        i = j;
    }
    // Rows left out for an error could be what these two miss: say nothing more then.
    for (const auto& y : s.per_year)
        if (left_out == 0 && y.next_censused && y.transitions == 0)
            add(report, k_year_empty,
                {0, 0, "", "no plant alive in " + std::to_string(y.year) +
                               " has a row saying alive or dead in " +
                               std::to_string(y.year + 1)});
    if (s.transitions == 0 && !records.empty() && left_out == 0)
        add(report, k_no_transitions,
            {0, 0, "", "census years: " + std::to_string(s.years.size()) +
                           "; at least two consecutive years with the same plants are needed"});

    c.m_records = std::move(records);
    c.m_options = std::move(options);
    c.m_has_neighbour_sizes = col_neighbour.has_value();
    return c;
}

std::map<std::string, std::vector<double>> Census::neighbour_sizes_by_microsite() const {
    const auto& labels = m_options.microsites;
    // Records are sorted by plant then year; file order is line order. Alive rows are never
    // added by the missing-row policy (those are notfound, line 0), so every line is > 0.
    std::vector<std::size_t> order;
    for (std::size_t k = 0; k < m_records.size(); ++k) {
        const CensusRecord& r = m_records[k];
        if (r.status == Status::alive && r.neighbour_size) order.push_back(k);
    }
    std::sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) {
        return m_records[a].line < m_records[b].line;
    });
    std::map<std::string, std::vector<double>> out;
    for (std::size_t m = 0; m < labels.size(); ++m)
        if (!m_options.bare || m != *m_options.bare) out[labels[m]];
    for (std::size_t k : order) {
        const CensusRecord& r = m_records[k];
        const auto it = out.find(r.microsite);
        if (it != out.end()) it->second.push_back(*r.neighbour_size);
    }
    return out;
}

Census load_census(const std::filesystem::path& file, CensusOptions options) {
    Census c = read_census(io::CsvTable::read(file), std::move(options));
    if (!c.valid()) throw c.report().to_error();
    return c;
}

}  // namespace safesite::census
