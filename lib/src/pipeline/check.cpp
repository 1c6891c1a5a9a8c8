#include "safesite/pipeline/check.hpp"

#include <cstdint>
#include <numeric>

#include "safesite/error.hpp"
#include "safesite/io/csv_table.hpp"

namespace safesite::pipeline {

CheckResult check(const spec::ModelSpec& model) {
    if (!model.data.census)
        throw SpecError({model.file.string(), 0, 0, "data.census"},
                        "the model file names no census ([data] census)");
    const io::CsvTable csv = io::CsvTable::read(*model.data.census);
    const census::Census c = census::read_census(csv, spec::to_census_options(model));
    CheckResult out;
    out.census_file = model.data.census->string();
    out.microsites = model.microsites.labels;
    out.report = c.report();
    out.summary = c.summary();
    return out;
}

std::vector<report::TidyTable> check_tables(const CheckResult& result) {
    using report::integer;
    using report::text;
    auto count = [](auto n) { return integer(static_cast<std::int64_t>(n)); };
    const auto& s = result.summary;

    report::TidyTable years{"census_years",
                            {"year", "next_censused", "alive", "flowering", "seeds_counted",
                             "flowering_without_count", "transitions", "excluded_notfound",
                             "recruits_next_year"},
                            {}};
    report::TidyTable sites{"census_microsites",
                            {"year", "microsite", "alive", "recruits_next_year"},
                            {}};
    for (const auto& y : s.per_year) {
        const std::size_t recruits = std::accumulate(y.recruits_by_microsite.begin(),
                                                     y.recruits_by_microsite.end(),
                                                     std::size_t{0});
        years.rows.push_back({count(y.year), count(y.next_censused ? 1 : 0), count(y.alive),
                              count(y.flowering), count(y.seeds_counted),
                              count(y.flowering_without_count), count(y.transitions),
                              count(y.excluded_notfound), count(recruits)});
        for (std::size_t m = 0; m < result.microsites.size(); ++m) {
            const auto alive = m < y.alive_by_microsite.size() ? y.alive_by_microsite[m] : 0;
            const auto rec = m < y.recruits_by_microsite.size() ? y.recruits_by_microsite[m] : 0;
            sites.rows.push_back({count(y.year), text(result.microsites[m]), count(alive),
                                  y.next_censused ? count(rec) : report::missing()});
        }
    }
    report::TidyTable gaps{"census_gaps", {"from_year", "to_year"}, {}};
    for (const auto& g : s.gaps) gaps.rows.push_back({count(g.from), count(g.to)});

    report::TidyTable problems{
        "problems",
        {"severity", "code", "message", "count", "line", "column", "key", "example"},
        {}};
    for (const auto& issue : result.report.issues()) {
        const std::string severity =
            issue.severity == census::Severity::error ? "error" : "warning";
        if (issue.examples.empty())
            problems.rows.push_back({text(severity), text(issue.code), text(issue.message),
                                     count(issue.count), report::missing(), report::missing(),
                                     text(""), text("")});
        for (const auto& ex : issue.examples)
            problems.rows.push_back(
                {text(severity), text(issue.code), text(issue.message), count(issue.count),
                 ex.line > 0 ? count(ex.line) : report::missing(),
                 ex.column > 0 ? count(ex.column) : report::missing(), text(ex.key),
                 text(ex.text)});
    }
    return {years, sites, gaps, problems};
}

}  // namespace safesite::pipeline
