// Big and odd inputs through the real moderato-cli process, scaled down for
// the normal suite (tests/benchmarks/big_inputs.py runs the full sizes and
// measures peak memory): 10,000 columns, a 5 MB cell, a 5 MB line of fields
// and a categorical moderator with 100,000 levels. Each is either handled
// (exit 0) or refused as bad input (exit 2, a one-line message saying which
// limit was hit), the input untouched. Files are generated per test from a
// seeded recipe into a temporary folder; none is committed.
#include <gtest/gtest.h>

#include <cstdint>
#include <filesystem>
#include <string>
#include <vector>

#include "cli_runner.hpp"
#include "common/temp_dir.hpp"

namespace {

namespace fs = std::filesystem;
using moderato::test::FileSnapshot;
using moderato::test::run_cli;
using moderato::test::RunResult;
using moderato::test::TempDir;

bool contains(const std::string& hay, const std::string& needle) { return hay.find(needle) != std::string::npos; }

// A fixed pseudo-random sequence (64-bit LCG, Knuth's MMIX constants), so
// the files are the same on every run.
struct Lcg {
    std::uint64_t s;
    int digit() {
        s = s * 6364136223846793005ULL + 1442695040888963407ULL;
        return static_cast<int>(s >> 60) % 10;
    }
};

// Runs moderato-cli on `file` and checks the file was not touched.
RunResult run_on(const fs::path& file, std::vector<std::string> args) {
    const FileSnapshot before = FileSnapshot::take(file.string());
    RunResult r = run_cli(args);
    EXPECT_TRUE(FileSnapshot::take(file.string()) == before) << "the data file was touched";
    EXPECT_TRUE(r.exited) << r.describe();
    return r;
}

TEST(BigInputCli, TenThousandColumnsAreListedAndFitted) {
    TempDir dir("big-cli");
    Lcg rng{7};
    std::string s;
    for (int j = 1; j <= 10'000; ++j) s += (j > 1 ? ",c" : "c") + std::to_string(j);
    s += '\n';
    for (int i = 0; i < 40; ++i) {
        for (int j = 1; j <= 10'000; ++j) {
            if (j > 1) s += ',';
            s += std::to_string(rng.digit());
        }
        s += '\n';
    }
    const fs::path file = dir.write("wide.csv", s);
    const RunResult cols = run_on(file, {"columns", "--data", file.string()});
    EXPECT_EQ(cols.exit_code, 0) << cols.describe();
    EXPECT_TRUE(contains(cols.out, "c10000")) << cols.out.substr(0, 200);
    const RunResult fit =
        run_on(file, {"fit", "--data", file.string(), "--outcome", "c1", "--predictors", "c2,c9999,c10000"});
    EXPECT_EQ(fit.exit_code, 0) << fit.describe();
    EXPECT_TRUE(contains(fit.out, "c9999")) << fit.out.substr(0, 400);
}

TEST(BigInputCli, AFiveMegabyteCellDoesNotStopAFitOfOtherColumns) {
    TempDir dir("big-cli");
    Lcg rng{11};
    std::string s = "y,x,note\n";
    for (int i = 0; i < 200; ++i) {
        s += std::to_string(rng.digit()) + ',' + std::to_string(rng.digit()) + ',';
        s += i == 100 ? std::string(5u << 20, 'w') : "short";
        s += '\n';
    }
    const fs::path file = dir.write("cell.csv", s);
    const RunResult fit = run_on(file, {"fit", "--data", file.string(), "--outcome", "y", "--predictors", "x"});
    EXPECT_EQ(fit.exit_code, 0) << fit.describe();
    EXPECT_EQ(fit.err, "");
}

TEST(BigInputCli, AFiveMegabyteLineOfFieldsIsRefusedByTheColumnLimit) {
    TempDir dir("big-cli");
    std::string s;
    while (s.size() < (5u << 20)) s += "v" + std::to_string(s.size()) + ',';
    s += "last\n";
    s += "1\n";
    const fs::path file = dir.write("fields.csv", s);
    const RunResult r = run_on(file, {"columns", "--data", file.string()});
    EXPECT_EQ(r.exit_code, 2) << r.describe();
    EXPECT_EQ(r.err, "moderato-cli: " + file.string() +
                         ": line 1 has more than 100,000 fields; Moderato reads at most 100,000 columns. Check the "
                         "delimiter (','), or keep only the columns the analysis needs\n");
    EXPECT_EQ(r.out, "");
}

TEST(BigInputCli, AHundredThousandLevelModeratorIsRefusedBeforeTheDesign) {
    // 100,000 rows, each its own shop: as a moderator of x that is
    // 1 + 1 + 99,999 + 99,999 = 200,000 design columns (by construction).
    TempDir dir("big-cli");
    Lcg rng{13};
    std::string s = "y,x,shop\n";
    for (int i = 0; i < 100'000; ++i)
        s += std::to_string(rng.digit()) + ',' + std::to_string(rng.digit()) + ",shop" + std::to_string(i) + '\n';
    const fs::path file = dir.write("shops.csv", s);
    const std::string expected =
        "moderato-cli: categorical column 'shop' has 100,000 levels among the used rows, and each level but the "
        "reference is a design column in every term it enters; the model needs 200,000 design columns, over the "
        "limit of 2,000. Use a column with fewer levels as the moderator (or group its levels)\n";
    for (const char* command : {"fit", "probe"}) {
        std::vector<std::string> args{command,        "--data", file.string(),   "--outcome", "y",
                                      "--predictors", "x,shop", "--interaction", "x,shop"};
        if (std::string(command) == "probe") args.insert(args.end(), {"--focal", "x", "--moderator", "shop"});
        const RunResult r = run_on(file, args);
        EXPECT_EQ(r.exit_code, 2) << command << ": " << r.describe();
        EXPECT_EQ(r.err, expected) << command;
        EXPECT_EQ(r.out, "");
    }
}

}  // namespace
