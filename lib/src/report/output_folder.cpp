#include "safesite/report/output_folder.hpp"

#include <cmath>
#include <iterator>
#include <set>

#include <nlohmann/json.hpp>

#include "safesite/error.hpp"
#include "safesite/io/atomic_file.hpp"
#include "safesite/report/caution.hpp"
#include "safesite/version.hpp"

namespace safesite::report {

namespace {

namespace fs = std::filesystem;

/// RFC 4180 quoting, plus quoting of leading/trailing spaces so no reader trims them.
std::string quote_field(const std::string& field) {
    bool needs = field.find_first_of(",\"\r\n") != std::string::npos;
    if (!field.empty() && (field.front() == ' ' || field.back() == ' ')) needs = true;
    if (!needs) return field;
    std::string out = "\"";
    for (char c : field) {
        if (c == '"') out += '"';
        out += c;
    }
    out += '"';
    return out;
}

nlohmann::ordered_json cell_json(const Cell& cell) {
    struct Visitor {
        nlohmann::ordered_json operator()(const Missing&) const { return nullptr; }
        nlohmann::ordered_json operator()(const std::string& s) const { return s; }
        nlohmann::ordered_json operator()(std::int64_t i) const { return i; }
        nlohmann::ordered_json operator()(double x) const {
            if (!std::isfinite(x)) return nullptr;  // JSON has no NaN/Inf
            return x;
        }
    };
    return std::visit(Visitor{}, cell);
}

void check_tables(const std::vector<TidyTable>& tables) {
    std::set<std::string> names;
    for (const auto& t : tables) {
        check_table(t);
        if (t.name == "summary") {
            throw UsageError("table name \"summary\" is reserved for summary.json");
        }
        if (!names.insert(t.name).second) {
            throw UsageError("two tables are named \"" + t.name + "\"");
        }
    }
}

}  // namespace

void write_output_file(const fs::path& path, const std::string& content) {
    try {
        io::write_file_atomic(path, content);
    } catch (const InputError&) {
        throw;
    } catch (const Error& e) {
        throw InputError({path.string(), 0, 0, "out"}, e.what());
    }
}

void ensure_output_folder(const fs::path& dir) {
    try {
        io::ensure_directory(dir);
    } catch (const InputError&) {
        throw;
    } catch (const Error& e) {
        throw InputError({dir.string(), 0, 0, "out"}, e.what());
    }
}

std::string to_csv(const TidyTable& table) {
    check_table(table);
    std::string out;
    for (std::size_t c = 0; c < table.columns.size(); ++c) {
        if (c > 0) out += ',';
        out += quote_field(table.columns[c]);
    }
    out += '\n';
    for (const auto& row : table.rows) {
        for (std::size_t c = 0; c < row.size(); ++c) {
            if (c > 0) out += ',';
            out += quote_field(format_cell(row[c]));
        }
        out += '\n';
    }
    return out;
}

std::string to_summary_json(const std::vector<TidyTable>& tables, const RunInfo& info) {
    check_tables(tables);
    nlohmann::ordered_json j;
    j["safesite_version"] = version();
    j["command"] = info.command;
    j["model"] = {{"file", info.model_file}, {"name", info.model_name}};
    if (info.seed) {
        j["seed"] = *info.seed;
    } else {
        j["seed"] = nullptr;
    }
    j["caution"] = k_caution;
    j["assumptions"] = info.assumptions;
    j["warnings"] = info.warnings;
    auto list = nlohmann::ordered_json::array();
    for (const auto& t : tables) {
        nlohmann::ordered_json jt;
        jt["name"] = t.name;
        jt["columns"] = t.columns;
        auto rows = nlohmann::ordered_json::array();
        for (const auto& row : t.rows) {
            auto jr = nlohmann::ordered_json::array();
            for (const auto& cell : row) jr.push_back(cell_json(cell));
            rows.push_back(std::move(jr));
        }
        jt["rows"] = std::move(rows);
        list.push_back(std::move(jt));
    }
    j["tables"] = std::move(list);
    return j.dump(2) + "\n";
}

fs::path write_csv(const fs::path& dir, const TidyTable& table) {
    const std::string text = to_csv(table);
    ensure_output_folder(dir);
    const fs::path p = dir / (table.name + ".csv");
    write_output_file(p, text);
    return p;
}

std::vector<fs::path> write_output_folder(const fs::path& dir,
                                          const std::vector<TidyTable>& tables,
                                          const RunInfo& info) {
    check_tables(tables);
    // Render everything first: a bad table fails before any file is touched.
    const std::string json = to_summary_json(tables, info);
    ensure_output_folder(dir);
    std::vector<fs::path> written;
    for (const auto& t : tables) {
        const fs::path p = dir / (t.name + ".csv");
        write_output_file(p, to_csv(t));
        written.push_back(p);
    }
    const fs::path s = dir / "summary.json";
    write_output_file(s, json);
    written.push_back(s);
    return written;
}

io::StagedFolderRules output_folder_rules(std::vector<fs::path> inputs) {
    io::StagedFolderRules rules;
    rules.inputs = std::move(inputs);
    rules.legacy_marker = "summary.json";
    rules.legacy_entry = [](const std::string& rel) {
        const fs::path p(rel);
        const auto parts = std::distance(p.begin(), p.end());
        if (parts == 1)
            return p.extension() == ".csv" || rel == "summary.json" || rel == "report.html";
        return parts == 2 && *p.begin() == "figures" && p.extension() == ".svg";
    };
    return rules;
}

}  // namespace safesite::report
