#include "safesite/arrival/retention_data.hpp"

#include <algorithm>
#include <cmath>
#include <map>
#include <set>
#include <utility>

#include "arrival/detail/csv_text.hpp"
#include "safesite/error.hpp"
#include "safesite/io/csv_table.hpp"
#include "safesite/io/quoted.hpp"

namespace safesite::arrival {
namespace {

// What is known about a seed from its rows so far.
struct SeedState {
    std::size_t first_row = 0;
    std::string station, microsite, seed_type;
    double last_day = 0;
    bool last_present = true;
    std::size_t last_line = 0;
    std::size_t absent_line = 0;  // line where it was first absent (0: not yet)
};

}  // namespace

RetentionData retention_from_csv(const io::CsvTable& csv,
                                 const std::vector<std::string>& microsites,
                                 const io::ColumnMap& columns) {
    const std::size_t c_seed = csv.require("seed", columns);
    const std::size_t c_station = csv.require("station", columns);
    const std::size_t c_micro = csv.require("microsite", columns);
    const std::size_t c_type = csv.require("seed_type", columns);
    const std::size_t c_day = csv.require("day", columns);
    const std::size_t c_present = csv.require("present", columns);
    const std::set<std::string> known(microsites.begin(), microsites.end());

    if (csv.rows() == 0)
        throw DataError({csv.file(), csv.header_line(), 0, ""},
                        "the retention file has a header but no data rows; expected one row per "
                        "seed per check below the header (docs/formats.md, \"Retention "
                        "checks\")");

    using io::quoted_short;
    RetentionData data;
    data.file = csv.file();
    data.checks.reserve(csv.rows());
    std::map<std::string, SeedState> seeds;
    for (std::size_t r = 0; r < csv.rows(); ++r) {
        RetentionCheck c;
        c.line = csv.line(r);
        c.seed = csv.text(r, c_seed);
        c.station = csv.text(r, c_station);
        c.microsite = csv.text(r, c_micro);
        const std::string seed = "seed " + quoted_short(c.seed);
        if (known.count(c.microsite) == 0)
            throw csv.error_at(r, c_micro, seed + ": microsite " + quoted_short(c.microsite) +
                                               " is not a microsite; expected one of " +
                                               detail::quoted_list(microsites));
        c.seed_type = csv.text(r, c_type);
        c.day = csv.real(r, c_day);
        if (c.day < 0.0)
            throw csv.error_at(r, c_day, seed + ": day " + quoted_short(csv.cell(r, c_day)) +
                                             "; expected days since placement ≥ 0");
        c.present = csv.flag(r, c_present);

        auto it = seeds.find(c.seed);
        if (it == seeds.end()) {
            // First row of a seed: the placement, day 0, present.
            if (c.day != 0.0)
                throw csv.error_at(r, c_day, seed + " has no day-0 placement: its first check "
                                             "is day " + quoted_short(csv.cell(r, c_day)) +
                                             "; expected a first row with day 0");
            if (!c.present)
                throw csv.error_at(r, c_present, seed + " is absent at day 0; a placed seed "
                                                 "must be present at placement");
            SeedState s;
            s.first_row = r;
            s.station = c.station;
            s.microsite = c.microsite;
            s.seed_type = c.seed_type;
            s.last_day = 0.0;
            s.last_present = true;
            s.last_line = c.line;
            seeds.emplace(c.seed, std::move(s));
        } else {
            SeedState& s = it->second;
            auto same = [&](const std::string& now, const std::string& before, std::size_t col,
                            const char* what) {
                if (now != before)
                    throw csv.error_at(r, col, seed + ": " + what + " " + quoted_short(now) +
                                                   " differs from " + quoted_short(before) +
                                                   " on line " +
                                                   std::to_string(csv.line(s.first_row)));
            };
            same(c.station, s.station, c_station, "station");
            same(c.microsite, s.microsite, c_micro, "microsite");
            same(c.seed_type, s.seed_type, c_type, "seed type");
            if (!(c.day > s.last_day))
                throw csv.error_at(r, c_day, seed + ": day " + quoted_short(csv.cell(r, c_day)) +
                                                 " does not follow day " +
                                                 detail::csv_number(s.last_day) + " on line " +
                                                 std::to_string(s.last_line) +
                                                 "; expected strictly increasing days");
            if (c.present && !s.last_present)
                throw csv.error_at(r, c_present, seed + " is present again on day " +
                                                     quoted_short(csv.cell(r, c_day)) +
                                                     " after it was absent on line " +
                                                     std::to_string(s.absent_line) +
                                                     "; a departed seed cannot return");
            s.last_day = c.day;
            s.last_line = c.line;
            if (!c.present && s.last_present) s.absent_line = c.line;
            s.last_present = c.present;
        }
        data.checks.push_back(std::move(c));
    }
    return data;
}

RetentionData parse_retention(std::string_view text, const std::vector<std::string>& microsites,
                              std::string file) {
    return retention_from_csv(io::CsvTable::parse(text, std::move(file)), microsites);
}

RetentionData read_retention(const std::filesystem::path& path,
                             const std::vector<std::string>& microsites,
                             const io::ColumnMap& columns) {
    return retention_from_csv(io::CsvTable::read(path), microsites, columns);
}

std::vector<RetentionInterval> retention_intervals(const std::vector<RetentionCheck>& checks) {
    // Group the rows by seed, seeds in order of first appearance, rows in file order.
    std::map<std::string, std::size_t> index;
    std::vector<std::vector<const RetentionCheck*>> by_seed;
    for (const auto& c : checks) {
        auto [it, fresh] = index.emplace(c.seed, by_seed.size());
        if (fresh) by_seed.emplace_back();
        by_seed[it->second].push_back(&c);
    }
    std::vector<RetentionInterval> out;
    for (const auto& rows : by_seed) {
        for (std::size_t j = 0; j + 1 < rows.size(); ++j) {
            const RetentionCheck& a = *rows[j];
            const RetentionCheck& b = *rows[j + 1];
            if (!a.present) break;  // departed: no longer at risk
            RetentionInterval iv;
            iv.seed = a.seed;
            iv.station = a.station;
            iv.microsite = a.microsite;
            iv.seed_type = a.seed_type;
            iv.start_day = a.day;
            iv.interval_days = b.day - a.day;
            iv.left = !b.present;
            out.push_back(std::move(iv));
        }
    }
    return out;
}

stats::Table interval_table(const std::vector<RetentionInterval>& intervals,
                            const std::vector<std::string>& microsites) {
    std::vector<std::string> seed, station, micro, type;
    std::vector<double> start, length, left, log_length;
    std::set<std::string> present;
    for (const auto& iv : intervals) {
        seed.push_back(iv.seed);
        station.push_back(iv.station);
        micro.push_back(iv.microsite);
        type.push_back(iv.seed_type);
        start.push_back(iv.start_day);
        length.push_back(iv.interval_days);
        left.push_back(iv.left ? 1.0 : 0.0);
        log_length.push_back(std::log(iv.interval_days));
        present.insert(iv.microsite);
    }
    std::vector<std::string> levels =
        detail::ordered_levels(present, microsites, "interval table: microsite");
    stats::Table table;
    table.add_categorical("seed", std::move(seed));
    table.add_categorical("station", std::move(station));
    table.add_categorical("microsite", std::move(micro), std::move(levels));
    table.add_categorical("seed_type", std::move(type));
    table.add_numeric("start_day", std::move(start));
    table.add_numeric("interval_days", std::move(length));
    table.add_numeric("left", std::move(left));
    table.add_numeric("log_interval", std::move(log_length));
    return table;
}

std::string format_retention_csv(const std::vector<RetentionCheck>& checks) {
    using detail::csv_field;
    std::string out = "seed,station,microsite,seed_type,day,present\n";
    for (const auto& c : checks) {
        out += csv_field(c.seed) + "," + csv_field(c.station) + "," + csv_field(c.microsite) +
               "," + csv_field(c.seed_type) + "," + detail::csv_number(c.day) + "," +
               (c.present ? "1" : "0") + "\n";
    }
    return out;
}

}  // namespace safesite::arrival
