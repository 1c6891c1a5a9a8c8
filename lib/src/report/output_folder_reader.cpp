#include "safesite/report/output_folder_reader.hpp"

#include <algorithm>
#include <cstdint>
#include <fstream>
#include <limits>
#include <map>
#include <optional>
#include <set>
#include <sstream>

#include <nlohmann/json.hpp>

#include "safesite/error.hpp"
#include "safesite/io/staged_folder.hpp"
#include "safesite/report/html_report.hpp"

namespace safesite::report {

namespace {

namespace fs = std::filesystem;
using nlohmann::json;

/// The whole file, or nothing when it cannot be opened or read.
std::optional<std::string> slurp(const fs::path& p) {
    std::error_code ec;
    if (!fs::is_regular_file(p, ec)) return std::nullopt;
    std::ifstream f(p, std::ios::binary);
    if (!f) return std::nullopt;
    std::ostringstream ss;
    ss << f.rdbuf();
    if (f.bad()) return std::nullopt;
    return ss.str();
}

/// Line and column (1-based) of byte offset `byte` (1-based, as nlohmann's parse_error gives
/// it: the byte at which the parser stopped) of `text`.
std::pair<std::size_t, std::size_t> line_column(const std::string& text, std::size_t byte) {
    std::size_t line = 1, column = 1;
    const std::size_t end = std::min(byte > 0 ? byte - 1 : 0, text.size());
    for (std::size_t i = 0; i < end; ++i) {
        if (text[i] == '\n') {
            ++line;
            column = 1;
        } else {
            ++column;
        }
    }
    return {line, column};
}

/// Checked access to summary.json: every failure is a DataError naming the file and the key.
class Reader {
public:
    explicit Reader(std::string file) : m_file(std::move(file)) {}

    [[noreturn]] void fail(const std::string& key, const std::string& reason) const {
        throw DataError({m_file, 0, 0, key}, key + ": " + reason);
    }

    const json& member(const json& obj, const std::string& name, const std::string& key) const {
        if (!obj.is_object()) fail(key, "expected an object");
        const auto it = obj.find(name);
        if (it == obj.end()) fail(key.empty() ? name : key + "." + name, "missing");
        return *it;
    }

    std::string string(const json& j, const std::string& key) const {
        if (!j.is_string()) fail(key, "expected a string");
        return j.get<std::string>();
    }

    std::vector<std::string> strings(const json& j, const std::string& key) const {
        if (!j.is_array()) fail(key, "expected an array of strings");
        std::vector<std::string> out;
        for (std::size_t i = 0; i < j.size(); ++i)
            out.push_back(string(j[i], key + "[" + std::to_string(i) + "]"));
        return out;
    }

    Cell cell(const json& j, const std::string& key) const {
        switch (j.type()) {
            case json::value_t::null: return missing();
            case json::value_t::string: return text(j.get<std::string>());
            case json::value_t::number_integer: return integer(j.get<std::int64_t>());
            case json::value_t::number_unsigned: {
                const auto u = j.get<std::uint64_t>();
                if (u > static_cast<std::uint64_t>(std::numeric_limits<std::int64_t>::max())) return number(j.get<double>());
                return integer(static_cast<std::int64_t>(u));
            }
            case json::value_t::number_float: return number(j.get<double>());
            default: fail(key, "expected null, a string or a number");
        }
    }

    TidyTable table(const json& j, const std::string& key) const {
        TidyTable t;
        t.name = string(member(j, "name", key), key + ".name");
        t.columns = strings(member(j, "columns", key), key + ".columns");
        const json& rows = member(j, "rows", key);
        if (!rows.is_array()) fail(key + ".rows", "expected an array of rows");
        for (std::size_t r = 0; r < rows.size(); ++r) {
            const std::string rk = key + ".rows[" + std::to_string(r) + "]";
            if (!rows[r].is_array()) fail(rk, "expected an array of cells");
            if (rows[r].size() != t.columns.size())
                fail(rk, "has " + std::to_string(rows[r].size()) + " cells; expected " +
                             std::to_string(t.columns.size()) + " (one per column)");
            std::vector<Cell> row;
            for (std::size_t c = 0; c < rows[r].size(); ++c)
                row.push_back(cell(rows[r][c], rk + "[" + std::to_string(c) + "]"));
            t.rows.push_back(std::move(row));
        }
        try {
            check_table(t);
        } catch (const UsageError& e) {
            fail(key, e.what());
        }
        return t;
    }

private:
    std::string m_file;
};

}  // namespace

OutputFolder read_output_folder(const fs::path& dir) {
    const fs::path summary = dir / "summary.json";
    const std::string file = summary.string();
    const auto text = slurp(summary);
    if (!text) {
        throw DataError({file, 0, 0, ""},
                        "cannot read the summary of an output folder (no such file, or not "
                        "readable); expected a folder written by 'safesite run'");
    }
    json j;
    try {
        j = json::parse(*text);
    } catch (const json::parse_error& e) {
        const auto [line, column] = line_column(*text, e.byte);
        // nlohmann's message begins "[json.exception.parse_error.101] parse error at line …";
        // keep the part after the last ": " (what was wrong), the location is in the prefix.
        std::string what = e.what();
        const std::size_t k = what.rfind(": ");
        if (k != std::string::npos) what = what.substr(k + 2);
        throw DataError({file, line, column, ""}, "malformed JSON: " + what);
    }
    const Reader r(file);
    if (!j.is_object()) r.fail("", "expected a JSON object at the top");
    OutputFolder out;
    out.info.safesite_version =
        r.string(r.member(j, "safesite_version", ""), "safesite_version");
    out.info.command = r.string(r.member(j, "command", ""), "command");
    const json& model = r.member(j, "model", "");
    out.info.model_file = r.string(r.member(model, "file", "model"), "model.file");
    out.info.model_name = r.string(r.member(model, "name", "model"), "model.name");
    const json& seed = r.member(j, "seed", "");
    if (seed.is_number_unsigned()) {
        out.info.seed = seed.get<std::uint64_t>();
    } else if (seed.is_number_integer() && seed.get<std::int64_t>() >= 0) {
        out.info.seed = static_cast<std::uint64_t>(seed.get<std::int64_t>());
    } else if (!seed.is_null()) {
        r.fail("seed", "expected null or a non-negative integer");
    }
    out.info.assumptions = r.strings(r.member(j, "assumptions", ""), "assumptions");
    out.info.warnings = r.strings(r.member(j, "warnings", ""), "warnings");
    const json& tables = r.member(j, "tables", "");
    if (!tables.is_array()) r.fail("tables", "expected an array of tables");
    std::set<std::string> names;
    for (std::size_t i = 0; i < tables.size(); ++i) {
        const std::string key = "tables[" + std::to_string(i) + "]";
        out.tables.push_back(r.table(tables[i], key));
        if (!names.insert(out.tables.back().name).second)
            r.fail(key + ".name", "a second table named \"" + out.tables.back().name + "\"");
    }

    // Figures: those all_figures() draws from these tables first, in its order, then any
    // other SVG file by name, so a re-rendered report orders them as `safesite run` does.
    const fs::path fig_dir = dir / "figures";
    std::error_code ec;
    if (fs::is_directory(fig_dir, ec)) {
        std::vector<std::string> stems;
        for (const auto& entry : fs::directory_iterator(fig_dir, ec)) {
            if (entry.path().extension() == ".svg" && entry.is_regular_file(ec))
                stems.push_back(entry.path().stem().string());
        }
        if (ec) {
            throw InputError({fig_dir.string(), 0, 0, ""},
                             "cannot list the figures: " + ec.message());
        }
        std::sort(stems.begin(), stems.end());
        std::vector<std::string> order;
        std::map<std::string, std::string> section;  // report section of the known figures
        for (const auto& f : all_figures(out.tables)) {
            section[f.name] = f.section;
            if (std::find(stems.begin(), stems.end(), f.name) != stems.end())
                order.push_back(f.name);
        }
        for (const auto& s : stems)
            if (std::find(order.begin(), order.end(), s) == order.end()) order.push_back(s);
        for (const auto& name : order) {
            const fs::path p = fig_dir / (name + ".svg");
            const auto svg = slurp(p);
            if (!svg) throw InputError({p.string(), 0, 0, ""}, "cannot read the figure");
            const auto known = section.find(name);
            out.figures.push_back(
                {name, *svg, known == section.end() ? std::string() : known->second});
        }
    }
    return out;
}

fs::path rerender_html_report(const fs::path& dir) {
    const OutputFolder folder = read_output_folder(dir);
    const fs::path written = write_html_report(dir, folder.tables, folder.info, folder.figures);
    // A folder that lists its files lists the report too, so the next run may replace it.
    try {
        io::StagedFolder::record(dir, "report.html");
    } catch (const Error& e) {
        throw InputError({(dir / io::StagedFolder::k_manifest).string(), 0, 0, "out"}, e.what());
    }
    return written;
}

}  // namespace safesite::report
