#include "safesite/arrival/trapping_data.hpp"

#include <algorithm>
#include <map>
#include <set>
#include <utility>

#include "arrival/detail/csv_text.hpp"
#include "safesite/error.hpp"
#include "safesite/io/csv_table.hpp"
#include "safesite/io/quoted.hpp"

namespace safesite::arrival {

TrappingData trapping_from_csv(const io::CsvTable& csv, const std::vector<std::string>& forms,
                               const io::ColumnMap& columns) {
    const std::size_t c_neighbour = csv.require("neighbour", columns);
    const std::size_t c_form = csv.require("form", columns);
    const std::size_t c_size = csv.require("neighbour_size", columns);
    const std::size_t c_type = csv.require("seed_type", columns);
    const std::size_t c_launched = csv.require("launched", columns);
    const std::size_t c_trapped = csv.require("trapped", columns);
    const std::set<std::string> known(forms.begin(), forms.end());

    if (csv.rows() == 0)
        throw DataError({csv.file(), csv.header_line(), 0, ""},
                        "the trapping file has a header but no data rows; expected one row per "
                        "neighbour × seed type below the header (docs/formats.md, \"Trapping "
                        "trials\")");

    using io::quoted_short;
    TrappingData data;
    data.file = csv.file();
    data.trials.reserve(csv.rows());
    std::map<std::string, std::pair<std::string, std::size_t>> form_of;  // neighbour → form, line
    std::map<std::pair<std::string, std::string>, std::size_t> seen;     // (neighbour, type) → line
    for (std::size_t r = 0; r < csv.rows(); ++r) {
        TrappingTrial t;
        t.line = csv.line(r);
        t.neighbour = csv.text(r, c_neighbour);
        t.form = csv.text(r, c_form);
        if (known.count(t.form) == 0)
            throw csv.error_at(r, c_form, "form " + quoted_short(t.form) + " of neighbour " +
                                              quoted_short(t.neighbour) +
                                              " is not a neighbour microsite; expected one of " +
                                              detail::quoted_list(forms));
        t.neighbour_size = csv.real(r, c_size);
        if (!(t.neighbour_size > 0.0))
            throw csv.error_at(r, c_size, "neighbour_size " + quoted_short(csv.cell(r, c_size)) +
                                              " of neighbour " + quoted_short(t.neighbour) +
                                              "; expected a size > 0");
        t.seed_type = csv.text(r, c_type);
        t.launched = csv.integer(r, c_launched);
        if (t.launched <= 0)
            throw csv.error_at(r, c_launched, "launched " + quoted_short(csv.cell(r, c_launched)) +
                                                  "; expected a whole number > 0");
        t.trapped = csv.integer(r, c_trapped);
        if (t.trapped < 0 || t.trapped > t.launched)
            throw csv.error_at(r, c_trapped,
                               "trapped " + quoted_short(csv.cell(r, c_trapped)) +
                                   " of neighbour " + quoted_short(t.neighbour) +
                                   "; expected 0 ≤ trapped ≤ launched (" +
                                   std::to_string(t.launched) + ")");
        auto [it, fresh] = form_of.emplace(t.neighbour, std::make_pair(t.form, t.line));
        if (!fresh && it->second.first != t.form)
            throw csv.error_at(r, c_form, "neighbour " + quoted_short(t.neighbour) + " has form " +
                                              quoted_short(t.form) + " here but " +
                                              quoted_short(it->second.first) + " on line " +
                                              std::to_string(it->second.second));
        auto [jt, first] = seen.emplace(std::make_pair(t.neighbour, t.seed_type), t.line);
        if (!first)
            throw csv.error_at(r, c_type, "neighbour " + quoted_short(t.neighbour) +
                                              " and seed type " + quoted_short(t.seed_type) +
                                              " already have a trial on line " +
                                              std::to_string(jt->second) +
                                              "; expected one row per neighbour × seed type");
        data.trials.push_back(std::move(t));
    }
    return data;
}

TrappingData parse_trapping(std::string_view text, const std::vector<std::string>& forms,
                            std::string file) {
    return trapping_from_csv(io::CsvTable::parse(text, std::move(file)), forms);
}

TrappingData read_trapping(const std::filesystem::path& path,
                           const std::vector<std::string>& forms, const io::ColumnMap& columns) {
    return trapping_from_csv(io::CsvTable::read(path), forms, columns);
}

stats::Table trapping_table(const std::vector<TrappingTrial>& trials,
                            const std::vector<std::string>& forms) {
    std::vector<std::string> neighbour, form, type;
    std::vector<double> size, launched, trapped;
    std::set<std::string> present;
    for (const auto& t : trials) {
        neighbour.push_back(t.neighbour);
        form.push_back(t.form);
        type.push_back(t.seed_type);
        size.push_back(t.neighbour_size);
        launched.push_back(static_cast<double>(t.launched));
        trapped.push_back(static_cast<double>(t.trapped));
        present.insert(t.form);
    }
    // Form levels in the user's microsite order.
    std::vector<std::string> form_levels =
        detail::ordered_levels(present, forms, "trapping table: form");
    stats::Table table;
    table.add_categorical("neighbour", std::move(neighbour));
    table.add_categorical("form", std::move(form), std::move(form_levels));
    table.add_numeric("neighbour_size", std::move(size));
    table.add_categorical("seed_type", std::move(type));
    table.add_numeric("launched", std::move(launched));
    table.add_numeric("trapped", std::move(trapped));
    return table;
}

std::string format_trapping_csv(const std::vector<TrappingTrial>& trials) {
    using detail::csv_field;
    std::string out = "neighbour,form,neighbour_size,seed_type,launched,trapped\n";
    for (const auto& t : trials) {
        out += csv_field(t.neighbour) + "," + csv_field(t.form) + "," +
               detail::csv_number(t.neighbour_size) + "," + csv_field(t.seed_type) + "," +
               std::to_string(t.launched) + "," + std::to_string(t.trapped) + "\n";
    }
    return out;
}

}  // namespace safesite::arrival
