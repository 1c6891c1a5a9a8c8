// An output folder written all or nothing (io::StagedFolder, docs/formats.md "Output folder"):
// a temporary folder beside the target, put in place by one rename; failures, stops and killed
// runs leave the previous folder intact and no partial folder. The rules are this project's
// (issue 11); no outside source. Checks are behavioural: folder contents, file modes, error
// types and location fields.
#include <catch2/catch.hpp>

#include <signal.h>
#include <sys/stat.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <map>
#include <random>
#include <sstream>
#include <string>

#include "safesite/error.hpp"
#include "safesite/io/atomic_file.hpp"
#include "safesite/io/interruption.hpp"
#include "safesite/io/staged_folder.hpp"
#include "safesite/report/output_folder.hpp"

namespace fs = std::filesystem;
using safesite::InputError;
using safesite::io::StagedFolder;
using safesite::io::StagedFolderRules;
using safesite::io::write_file_atomic;

namespace {

std::string slurp(const fs::path& p) {
    std::ifstream in(p, std::ios::binary);
    std::ostringstream s;
    s << in.rdbuf();
    return s.str();
}

/// A fresh empty parent folder, removed at scope exit.
struct Parent {
    fs::path path;
    explicit Parent(const std::string& tag) {
        path = fs::temp_directory_path() /
               ("safesite-staged-" + tag + "-" + std::to_string(std::random_device{}()));
        fs::remove_all(path);
        fs::create_directories(path);
    }
    ~Parent() {
        std::error_code ec;
        fs::remove_all(path, ec);
    }
};

/// Every file under `dir` (relative path → content).
std::map<std::string, std::string> contents(const fs::path& dir) {
    std::map<std::string, std::string> out;
    for (const auto& e : fs::recursive_directory_iterator(dir))
        if (e.is_regular_file()) out[fs::relative(e.path(), dir).generic_string()] = slurp(e.path());
    return out;
}

/// Names in `dir` that are safesite temporaries (".<target>.safesite-…").
std::vector<std::string> temporaries(const fs::path& dir) {
    std::vector<std::string> out;
    for (const auto& e : fs::directory_iterator(dir)) {
        const std::string n = e.path().filename().string();
        if (n.find(".safesite-") != std::string::npos && n != StagedFolder::k_manifest)
            out.push_back(n);
    }
    return out;
}

/// A previous output folder as a run leaves it.
void write_previous(const fs::path& target) {
    StagedFolder f(target, safesite::report::output_folder_rules({}));
    write_file_atomic(f.path() / "lambda.csv", "kernel,lambda\npooled,1.01\n");
    write_file_atomic(f.path() / "summary.json", "{}\n");
    f.commit();
}

/// The refusal of `target` with key "out" and the target as its file.
void check_refused(const fs::path& target, const StagedFolderRules& rules) {
    try {
        StagedFolder::check(target, rules);
        FAIL("no error for " << target);
    } catch (const InputError& e) {
        CHECK(e.key() == "out");
        CHECK(e.file() == target.string());
    }
}

}  // namespace

TEST_CASE("a staged folder appears whole at commit, with its list of files", "[io][unit]") {
    const Parent parent("new");
    const fs::path target = parent.path / "out";
    {
        StagedFolder f(target, {});
        CHECK(f.path().parent_path() == fs::canonical(parent.path));
        CHECK(f.path().filename().string().rfind(".out.safesite-writing-" +
                                                     std::to_string(::getpid()) + "-", 0) == 0);
        write_file_atomic(f.path() / "a.csv", "x\n1\n");
        fs::create_directories(f.path() / "figures");
        write_file_atomic(f.path() / "figures" / "b.svg", "<svg/>");
        CHECK_FALSE(fs::exists(target));  // nothing at the target until commit
        const auto files = f.commit();
        CHECK(files == std::vector<std::string>{"a.csv", "figures/b.svg"});
    }
    CHECK(slurp(target / "a.csv") == "x\n1\n");
    CHECK(slurp(target / "figures" / "b.svg") == "<svg/>");
    const std::string list = slurp(target / StagedFolder::k_manifest);
    CHECK(list.find("\na.csv\nfigures/b.svg\n") != std::string::npos);
    CHECK(temporaries(parent.path).empty());
}

TEST_CASE("a commit replaces the previous folder as a whole", "[io][unit]") {
    const Parent parent("replace");
    const fs::path target = parent.path / "out";
    write_previous(target);
    {
        StagedFolder f(target, safesite::report::output_folder_rules({}));
        write_file_atomic(f.path() / "other.csv", "y\n2\n");
        f.commit();
    }
    const auto now = contents(target);
    CHECK(now.count("lambda.csv") == 0);  // the previous folder's files are gone
    CHECK(now.at("other.csv") == "y\n2\n");
    CHECK(temporaries(parent.path).empty());
}

TEST_CASE("a failure midway or no commit leaves the previous folder and no partial one",
          "[io][unit]") {
    const Parent parent("fail");
    const fs::path target = parent.path / "out";
    write_previous(target);
    const auto before = contents(target);
    SECTION("a write fails midway (through the library: the name is taken by a folder)") {
        try {
            StagedFolder f(target, safesite::report::output_folder_rules({}));
            write_file_atomic(f.path() / "one.csv", "1\n");
            fs::create_directories(f.path() / "two.csv" / "blocker");
            safesite::report::write_output_file(f.path() / "two.csv", "2\n");
            f.commit();
            FAIL("no error");
        } catch (const InputError& e) {
            CHECK(e.key() == "out");
        }
    }
    SECTION("the writer gives up without commit") {
        StagedFolder f(target, safesite::report::output_folder_rules({}));
        write_file_atomic(f.path() / "one.csv", "1\n");
    }
    CHECK(contents(target) == before);
    CHECK(temporaries(parent.path).empty());
}

TEST_CASE("a stop request ends the writing before the rename", "[io][unit]") {
    const Parent parent("stop");
    const fs::path target = parent.path / "out";
    write_previous(target);
    const auto before = contents(target);
    // With no temporary on disk a handler may end the process at once.
    CHECK(safesite::io::request_stop(SIGINT));
    CHECK(safesite::io::stop_signal() == SIGINT);
    // ... and no temporary is created afterwards.
    CHECK_THROWS_AS(StagedFolder(target, {}), safesite::io::Interrupted);
    safesite::io::clear_stop();
    {
        StagedFolder f(target, safesite::report::output_folder_rules({}));
        write_file_atomic(f.path() / "one.csv", "1\n");
        // A temporary exists: the handler must only record the signal.
        CHECK_FALSE(safesite::io::request_stop(SIGTERM));
        try {
            f.commit();
            FAIL("no error");
        } catch (const safesite::io::Interrupted& e) {
            CHECK(e.signal() == SIGTERM);
        }
    }
    safesite::io::clear_stop();
    CHECK(contents(target) == before);
    CHECK(temporaries(parent.path).empty());
}

TEST_CASE("temporaries of a killed run are removed by the next run into the parent",
          "[io][unit]") {
    const Parent parent("stale");
    const fs::path p = parent.path;
    // A pid above Linux's largest pid_max (2^22, proc(5)) belongs to no process.
    const std::string dead = "999999999";
    fs::create_directories(p / (".out.safesite-writing-" + dead + "-abcdef") / "figures");
    write_file_atomic(p / (".out.safesite-writing-" + dead + "-abcdef") / "half.csv", "1\n");
    // A previous folder left aside between the two renames, its target missing: put back.
    fs::create_directories(p / (".kept.safesite-replaced-" + dead + "-ghijkl"));
    write_file_atomic(p / (".kept.safesite-replaced-" + dead + "-ghijkl") / "summary.json", "{}");
    // A live process's temporary (our parent's pid), and names not of our pattern: kept.
    const std::string live = ".out.safesite-writing-" + std::to_string(::getppid()) + "-mnopqr";
    fs::create_directories(p / live);
    fs::create_directories(p / (".out.safesite-writing-" + dead + "-toolongsuffix"));
    fs::create_directories(p / ".out.other-999999999-abcdef");

    StagedFolder::check(p / "out", {});
    CHECK_FALSE(fs::exists(p / (".out.safesite-writing-" + dead + "-abcdef")));
    CHECK(slurp(p / "kept" / "summary.json") == "{}");
    CHECK(fs::exists(p / live));
    CHECK(fs::exists(p / (".out.safesite-writing-" + dead + "-toolongsuffix")));
    CHECK(fs::exists(p / ".out.other-999999999-abcdef"));
    // A file's temporary left by a killed run is removed by the next write of that file.
    fs::create_directories(p / "kept2");
    write_file_atomic(p / "kept2" / (".report.html.safesite-tmp-" + dead + "-abcdef"), "half");
    write_file_atomic(p / "kept2" / "report.html", "whole");
    CHECK(contents(p / "kept2") == std::map<std::string, std::string>{{"report.html", "whole"}});
}

TEST_CASE("files and folders follow the umask", "[io][unit]") {
    const Parent parent("umask");
    const mode_t saved = ::umask(077);
    {
        StagedFolder f(parent.path / "private", {});
        write_file_atomic(f.path() / "a.csv", "1\n");
        fs::create_directories(f.path() / "figures");
        write_file_atomic(f.path() / "figures" / "b.svg", "<svg/>");
        f.commit();
    }
    ::umask(022);
    {
        StagedFolder f(parent.path / "shared", {});
        write_file_atomic(f.path() / "a.csv", "1\n");
        f.commit();
    }
    ::umask(saved);
    auto mode = [](const fs::path& q) {
        struct stat st;
        REQUIRE(::stat(q.c_str(), &st) == 0);
        return st.st_mode & 0777;
    };
    CHECK(mode(parent.path / "private") == 0700);
    CHECK(mode(parent.path / "private" / "a.csv") == 0600);
    CHECK(mode(parent.path / "private" / "figures") == 0700);
    CHECK(mode(parent.path / "private" / "figures" / "b.svg") == 0600);
    CHECK(mode(parent.path / "private" / StagedFolder::k_manifest) == 0600);
    CHECK(mode(parent.path / "shared") == 0755);
    CHECK(mode(parent.path / "shared" / "a.csv") == 0644);
}

TEST_CASE("folders that may not be replaced or created are refused", "[io][unit]") {
    const Parent parent("refuse");
    const fs::path p = parent.path;
    const auto rules = safesite::report::output_folder_rules({p / "data" / "census.csv"});
    write_file_atomic(p / "file", "x");
    fs::create_directories(p / "data");
    write_file_atomic(p / "data" / "census.csv", "tag\n");
    fs::create_directories(p / "notes");
    write_file_atomic(p / "notes" / "todo.txt", "x");

    check_refused(p / "file", rules);                   // a file, not a folder
    check_refused(p / "missing" / "out", rules);        // parent missing
    check_refused(p / "file" / "out", rules);           // parent is a file
    check_refused(p / "data", rules);                   // holds an input
    check_refused(p, rules);                            // holds an input deeper down
    check_refused(p / "notes", rules);                  // not an output folder
    check_refused(fs::current_path(), {});              // the working folder
    // An output folder with a file added by hand.
    write_previous(p / "out");
    write_file_atomic(p / "out" / "mine.csv", "keep me");
    check_refused(p / "out", rules);
    // A folder written before the list existed: summary.json and files of ours only.
    fs::create_directories(p / "old" / "figures");
    write_file_atomic(p / "old" / "summary.json", "{}");
    write_file_atomic(p / "old" / "lambda.csv", "x");
    write_file_atomic(p / "old" / "report.html", "x");
    write_file_atomic(p / "old" / "figures" / "a.svg", "x");
    CHECK_NOTHROW(StagedFolder::check(p / "old", rules));
    write_file_atomic(p / "old" / "figures" / "notes.txt", "x");
    check_refused(p / "old", rules);
    // An empty folder, and one through a trailing separator, may be used.
    fs::create_directories(p / "empty");
    CHECK_NOTHROW(StagedFolder::check(p / "empty", rules));
    CHECK_NOTHROW(StagedFolder::check((p / "empty").string() + "/", rules));
    // Nothing was left by the checks.
    CHECK(temporaries(p).empty());
    CHECK(slurp(p / "data" / "census.csv") == "tag\n");
}

TEST_CASE("StagedFolder::record adds a file written later to the list", "[io][unit]") {
    const Parent parent("record");
    write_previous(parent.path / "out");
    write_file_atomic(parent.path / "out" / "report.html", "x");
    StagedFolder::record(parent.path / "out", "report.html");
    StagedFolder::record(parent.path / "out", "report.html");  // once only
    const std::string list = slurp(parent.path / "out" / StagedFolder::k_manifest);
    CHECK(list.find("\nreport.html\n") != std::string::npos);
    CHECK(list.find("\nreport.html\n") == list.rfind("\nreport.html\n"));
    CHECK_NOTHROW(StagedFolder::check(parent.path / "out", {}));
}
