#include "safesite/pipeline/kernel_matrices.hpp"

#include <cctype>
#include <cstdint>

#include "safesite/kernel/kernel_operator.hpp"
#include "safesite/pipeline/analyse.hpp"
#include "safesite/pipeline/kernel_builder.hpp"
#include "safesite/report/matrix_market.hpp"
#include "safesite/report/output_folder.hpp"

namespace safesite::pipeline {

namespace fs = std::filesystem;

std::string file_stem(const std::string& label) {
    std::string out;
    bool gap = false;
    for (unsigned char ch : label) {
        const bool keep = std::isalnum(ch) != 0 || ch == '.' || ch == '-' || ch == '_';
        if (keep && ch < 128) {
            if (gap && !out.empty()) out += '-';
            gap = false;
            out += static_cast<char>(std::tolower(ch));
        } else {
            gap = true;
        }
        if (out.size() >= 48) break;
    }
    while (!out.empty() && out.front() == '.') out.erase(out.begin());  // no hidden files
    return out.empty() ? "kernel" : out;
}

std::vector<fs::path> write_kernel_matrices(const fs::path& dir, const PreparedModel& model,
                                            const AnalysisResult& analysis) {
    const fs::path folder = dir / "matrices";
    report::ensure_output_folder(folder);
    std::vector<fs::path> written;
    report::TidyTable index{"kernels", {"kernel", "scenario", "part", "file", "entries"}, {}};

    const kernel::Mesh mesh(model.mesh.lower, model.mesh.upper, model.mesh.points, model.mesh.rule);
    auto write_part = [&](const kernel::KernelOperator& op, kernel::KernelPart part,
                          const std::string& kernel, const std::string& scenario,
                          const std::string& stem) {
        const bool p = part == kernel::KernelPart::survival_growth;
        const std::string file = stem + (p ? "_P.mtx" : "_F.mtx");
        std::vector<std::string> comments{
            "safesite kernel '" + kernel + "'" +
                (scenario.empty() ? "" : ", scenario '" + scenario + "'") +
                (p ? ": P (survival-growth)" : ": F (reproduction)"),
            "entry (r, c) = K(state r, state c) * quadrature weight of state c; states in "
            "mesh.csv; lambda of P + F is the IPM's lambda"};
        const report::MatrixMarketText mm = report::to_matrix_market(op.to_dense(part), comments);
        report::write_output_file(folder / file, mm.text);
        written.push_back(folder / file);
        index.rows.push_back({report::text(kernel), report::text(scenario),
                              report::text(p ? "P" : "F"), report::text(file),
                              report::integer(static_cast<std::int64_t>(mm.entries))});
    };

    // Census years in order, then pooled: the same kernels as analyse().
    std::vector<const KernelRates*> rates;
    for (const auto& r : model.years) rates.push_back(&r);
    rates.push_back(&model.pooled);
    const std::size_t pooled = rates.size() - 1;
    for (std::size_t i = 0; i < rates.size(); ++i) {
        const auto curves = evaluate_rates(*rates[i], model.layout, mesh.points());
        const kernel::KernelOperator op(
            mesh, describe_kernel(curves, baseline_recruitment(model, i), model.mesh.eviction));
        const std::string stem = file_stem(rates[i]->label);
        write_part(op, kernel::KernelPart::survival_growth, rates[i]->label, "", stem);
        const report::Cell p_entries = index.rows.back()[4];
        write_part(op, kernel::KernelPart::reproduction, rates[i]->label, "", stem);
        if (i != pooled) continue;

        // Mesh and states, from the pooled operator (every kernel shares them).
        report::TidyTable states{"mesh", {"index", "microsite", "stage", "size", "weight"}, {}};
        const std::size_t n_sites = model.layout.microsites.size();
        std::int64_t row = 1;
        for (std::size_t g = 0; g < op.group_count(); ++g) {
            const Eigen::Index size = op.group_size(g);
            for (Eigen::Index j = 0; j < size; ++j, ++row) {
                if (g < op.class_count()) {
                    const bool first_year =
                        model.layout.juvenile == JuvenileMode::seedling_class && g >= n_sites;
                    states.rows.push_back(
                        {report::integer(row), report::text(model.layout.microsites[g % n_sites]),
                         report::text(first_year ? "first-year" : "established"),
                         report::number(mesh.points()[j]), report::number(mesh.weights()[j])});
                } else {
                    states.rows.push_back({report::integer(row), report::missing(),
                                           report::text(op.group_name(g)), report::missing(),
                                           report::number(1.0)});
                }
            }
        }
        written.push_back(report::write_csv(folder, states));

        // Scenarios change a and e only: F of the pooled kernel under each; P is pooled's.
        for (std::size_t s = 0; s < analysis.scenarios.size(); ++s) {
            const ScenarioResult& sc = analysis.scenarios[s];
            RecruitmentParameters r;
            r.arrival = sc.arrival;
            r.establishment = sc.establishment_pooled;
            const kernel::KernelOperator sop(mesh, describe_kernel(curves, r, model.mesh.eviction));
            const std::string sstem =
                "scenario-" + std::to_string(s + 1) + "-" + file_stem(sc.name);
            index.rows.push_back({report::text(rates[i]->label), report::text(sc.name),
                                  report::text("P"), report::text(stem + "_P.mtx"), p_entries});
            write_part(sop, kernel::KernelPart::reproduction, rates[i]->label, sc.name, sstem);
        }
    }
    written.push_back(report::write_csv(folder, index));
    return written;
}

}  // namespace safesite::pipeline
