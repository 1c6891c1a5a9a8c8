// The Matrix Market export of the kernels (pipeline::write_kernel_matrices): files read back
// by a small reader of our own and by Eigen's MarketIO (unsupported module of Debian's
// libeigen3-dev), λ recomputed with a dense eigen solver.
#include <catch2/catch.hpp>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <random>
#include <sstream>
#include <string>

#include <Eigen/Eigenvalues>
#include <Eigen/SparseCore>
#include <unsupported/Eigen/SparseExtra>

#include "safesite/error.hpp"
#include "safesite/io/csv_table.hpp"
#include "safesite/kernel/kernel_operator.hpp"
#include "safesite/pipeline/analyse.hpp"
#include "safesite/pipeline/kernel_builder.hpp"
#include "safesite/pipeline/kernel_matrices.hpp"
#include "safesite/pipeline/run.hpp"
#include "safesite/report/matrix_market.hpp"
#include "safesite/spec/model_spec.hpp"

namespace fs = std::filesystem;
using namespace safesite;

namespace {

struct Scratch {
    fs::path path;
    Scratch() {
        path = fs::temp_directory_path() /
               ("safesite-matrices-" + std::to_string(std::random_device{}()));
        fs::remove_all(path);
    }
    ~Scratch() {
        std::error_code ec;
        fs::remove_all(path, ec);
    }
};

// A strict reader of the coordinate real general format, checking the layout of the NIST
// Matrix Market exchange format (Boisvert, Pozo & Remington 1996; from memory): the first line
// is the banner "%%MatrixMarket matrix coordinate real general" (object, format, field and
// symmetry, case-insensitive in the spec; we write them in lower case); then lines starting
// with '%' are comments; then the size line "M N L" (rows, columns, entries); then exactly L
// lines "I J value" with 1-based indices 1 ≤ I ≤ M, 1 ≤ J ≤ N.
Eigen::MatrixXd read_market(const fs::path& file) {
    std::ifstream in(file);
    REQUIRE(in.good());
    std::string line;
    REQUIRE(std::getline(in, line));
    CHECK(line == "%%MatrixMarket matrix coordinate real general");
    while (std::getline(in, line) && !line.empty() && line[0] == '%') {
    }
    std::istringstream size(line);
    long long rows = -1, cols = -1, entries = -1;
    size >> rows >> cols >> entries;
    REQUIRE(!size.fail());
    std::string rest;
    CHECK_FALSE(static_cast<bool>(size >> rest));
    REQUIRE(rows > 0);
    REQUIRE(cols > 0);
    REQUIRE(entries >= 0);
    Eigen::MatrixXd a = Eigen::MatrixXd::Zero(rows, cols);
    long long seen = 0;
    while (std::getline(in, line)) {
        std::istringstream e(line);
        long long i = 0, j = 0;
        double v = 0.0;
        e >> i >> j >> v;
        REQUIRE(!e.fail());
        REQUIRE(i >= 1);
        REQUIRE(i <= rows);
        REQUIRE(j >= 1);
        REQUIRE(j <= cols);
        a(i - 1, j - 1) = v;
        ++seen;
    }
    CHECK(seen == entries);
    return a;
}

double dominant(const Eigen::MatrixXd& a) {
    const Eigen::VectorXcd values = Eigen::EigenSolver<Eigen::MatrixXd>(a, false).eigenvalues();
    double best = 0.0;
    for (Eigen::Index i = 0; i < values.size(); ++i) best = std::max(best, std::abs(values[i]));
    return best;
}

pipeline::RunResult fixed_example() {
    const auto model =
        spec::read_model_spec(fs::path(SAFESITE_SOURCE_DIR) / "models" / "fixed-example.toml");
    return pipeline::evaluate_fixed(model);
}

}  // namespace

TEST_CASE("Matrix Market text: banner, size line, 1-based entries, 17 digits, threshold",
          "[report][unit]") {
    // Format from memory of the NIST Matrix Market specification (see read_market above).
    Eigen::MatrixXd a(2, 3);
    a << 0.1, 0.0, 1e-300, 0.0, -2.5, 1.0 / 3.0;
    const auto mm = report::to_matrix_market(a, {"one comment"});
    CHECK(mm.entries == 3);  // 1e-300 ≤ 1e-17 · 2.5 is dropped
    CHECK(mm.text ==
          "%%MatrixMarket matrix coordinate real general\n% one comment\n2 3 3\n"
          "1 1 0.10000000000000001\n2 2 -2.5\n2 3 0.33333333333333331\n");
    REQUIRE_THROWS_AS(report::to_matrix_market(a, {"two\nlines"}), UsageError);
    a(0, 0) = NAN;
    REQUIRE_THROWS_AS(report::to_matrix_market(a), UsageError);
}

TEST_CASE("file stems of kernel and scenario labels", "[pipeline][unit]") {
    // Our own rule (kernel_matrices.hpp).
    CHECK(pipeline::file_stem("2016") == "2016");
    CHECK(pipeline::file_stem("pooled") == "pooled");
    CHECK(pipeline::file_stem("every seed on bare gravel") == "every-seed-on-bare-gravel");
    CHECK(pipeline::file_stem("Late snowmelt: 75 days") == "late-snowmelt-75-days");
    CHECK(pipeline::file_stem("../x") == "-x");
    CHECK(pipeline::file_stem("") == "kernel");
}

TEST_CASE("kernel matrices read back give the run's lambda to 1e-10", "[pipeline][unit]") {
    const pipeline::RunResult result = fixed_example();
    const Scratch dir;
    const auto written =
        pipeline::write_kernel_matrices(dir.path, result.fit.model, result.analysis);
    const fs::path m = dir.path / "matrices";
    for (const auto& p : written) CHECK(fs::exists(p));
    REQUIRE(fs::exists(m / "pooled_P.mtx"));
    REQUIRE(fs::exists(m / "pooled_F.mtx"));
    REQUIRE(fs::exists(m / "mesh.csv"));
    REQUIRE(fs::exists(m / "kernels.csv"));

    // Our reader: λ of P + F by a dense eigen solver against the run's λ (Spectra on the
    // matrix-free operator). The writer drops entries ≤ 1e-17 max|A| and writes 17 digits, so
    // the agreement is limited by the two eigen solvers: 1e-10 relative.
    const Eigen::MatrixXd P = read_market(m / "pooled_P.mtx");
    const Eigen::MatrixXd F = read_market(m / "pooled_F.mtx");
    REQUIRE(P.rows() == F.rows());
    CHECK(dominant(P + F) == Approx(result.analysis.pooled().lambda).epsilon(1e-10));

    // Round trip: each written value is the same double as the kernel's (17 significant
    // digits, IEEE 754 round trip); dropped entries are ≤ 1e-17 max|P|.
    const auto& model = result.fit.model;
    const kernel::Mesh mesh(model.mesh.lower, model.mesh.upper, model.mesh.points, model.mesh.rule);
    const kernel::KernelOperator op(
        mesh, pipeline::describe_kernel(
                  pipeline::evaluate_rates(model.pooled, model.layout, mesh.points()),
                  pipeline::baseline_recruitment(model, model.years.size()), model.mesh.eviction));
    const Eigen::MatrixXd P0 = op.to_dense(kernel::KernelPart::survival_growth);
    const double cut = report::matrix_market_relative_threshold * P0.cwiseAbs().maxCoeff();
    for (Eigen::Index j = 0; j < P0.cols(); ++j)
        for (Eigen::Index i = 0; i < P0.rows(); ++i) {
            if (std::abs(P0(i, j)) > cut)
                REQUIRE(P(i, j) == P0(i, j));
            else
                REQUIRE(P(i, j) == 0.0);
        }

    // Eigen's own Matrix Market reader (an independent parser) gives the same matrix.
    Eigen::SparseMatrix<double> sparse;
    REQUIRE(Eigen::loadMarket(sparse, (m / "pooled_F.mtx").string()));
    CHECK((Eigen::MatrixXd(sparse) - F).cwiseAbs().maxCoeff() == 0.0);

    // The mesh table: one row per state, 1-based index; the weights of each class sum to
    // U − L (quadrature weights, mesh.hpp).
    const auto mesh_csv = io::CsvTable::read(m / "mesh.csv");
    REQUIRE(mesh_csv.rows() == static_cast<std::size_t>(P.rows()));
    const std::size_t index = mesh_csv.require("index"), weight = mesh_csv.require("weight");
    double weights = 0.0;
    for (std::size_t r = 0; r < mesh_csv.rows(); ++r) {
        CHECK(std::stol(mesh_csv.cell(r, index)) == static_cast<long>(r + 1));
        weights += std::stod(mesh_csv.cell(r, weight));
    }
    CHECK(weights ==
          Approx(static_cast<double>(op.class_count()) * (model.mesh.upper - model.mesh.lower))
              .epsilon(1e-12));

    // Scenario "every seed on bare gravel": its F sends no recruits into any cushion state
    // (rows whose microsite in mesh.csv is cushion) and some into the gravel states.
    const fs::path scen = m / "scenario-1-every-seed-on-bare-gravel_F.mtx";
    REQUIRE(fs::exists(scen));
    const Eigen::MatrixXd Fs = read_market(scen);
    REQUIRE(Fs.rows() == P.rows());
    const std::size_t site = mesh_csv.require("microsite");
    double cushion = 0.0, gravel = 0.0;
    for (std::size_t r = 0; r < mesh_csv.rows(); ++r) {
        const double row_max = Fs.row(static_cast<Eigen::Index>(r)).maxCoeff();
        (mesh_csv.cell(r, site) == "cushion" ? cushion : gravel) += row_max;
    }
    CHECK(cushion == 0.0);
    CHECK(gravel > 0.0);
}

TEST_CASE("[output] matrices = false is read from the model file", "[pipeline][unit]") {
    const fs::path file = fs::path(SAFESITE_SOURCE_DIR) / "models" / "fixed-example.toml";
    std::ifstream in(file);
    std::stringstream text;
    text << in.rdbuf();
    CHECK(spec::parse_model_spec(text.str(), file).output.matrices);  // default
    text << "\n[output]\nmatrices = false\n";
    CHECK_FALSE(spec::parse_model_spec(text.str(), file).output.matrices);
}
