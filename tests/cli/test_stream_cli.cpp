// moderato-cli fit --stream and --memory-budget through the real process: a
// tiny budget makes fit stream a small file on its own, and its JSON numbers
// equal the in-memory run's (the reference, within 1e-9 relative; the
// in-memory fit is checked against statsmodels and NIST elsewhere).
#include <gtest/gtest.h>

#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "cli_json.hpp"
#include "cli_runner.hpp"
#include "common/temp_dir.hpp"
#include "common/tolerance.hpp"

using namespace moderato::test;

namespace {

std::vector<std::string> fit_args(const std::string& data, const std::string& se) {
    return {"fit",     "--format",      "json",    "--data", data, "--outcome", "y", "--predictors",
            "x,group", "--interaction", "x,group", "--se",   se,   "--weights", "w"};
}

// Every number of the terms, the covariance and the fit statistics agree.
void expect_same_numbers(const nlohmann::json& s, const nlohmann::json& m) {
    ASSERT_EQ(s.at("terms").size(), m.at("terms").size());
    for (std::size_t k = 0; k < m.at("terms").size(); ++k)
        for (const char* f : {"value", "se", "test_value", "low", "high"})
            EXPECT_LE(rel(s.at("terms")[k].at(f), m.at("terms")[k].at(f)), 1e-9) << k << " " << f;
    for (const char* f : {"r2", "r2_adjusted", "residual_sd", "log_likelihood", "aic", "bic"})
        EXPECT_LE(rel(s.at(f), m.at(f)), 1e-9) << f;
    EXPECT_LE(rel(s.at("overall_test").at("value"), m.at("overall_test").at("value")), 1e-9);
    EXPECT_LE(rel(s.at("without_products").at("test").at("value"), m.at("without_products").at("test").at("value")),
              1e-9);
    EXPECT_EQ(s.at("rows_used"), m.at("rows_used"));
    EXPECT_EQ(s.at("rows_left_out"), m.at("rows_left_out"));
}

std::string small_table() {
    std::string t = "y,x,group,w\n";
    for (int i = 0; i < 80; ++i) {  // invented: a slope that differs by group, with noise from i
        const double x = (i % 13) * 0.7, noise = ((i * 37) % 11 - 5) * 0.1;
        const char* g = i % 3 == 0 ? "a" : (i % 3 == 1 ? "\"b, two\"" : "c");
        t += std::to_string(1 + 0.5 * x + (i % 3) * 0.8 * x + noise) + "," + std::to_string(x) + "," + g + "," +
             (i % 17 == 0 ? std::string("NA") : std::to_string(1 + i % 4)) + "\n";
    }
    return t;
}

}  // namespace

TEST(StreamCli, TinyBudgetStreamsAndMatchesTheInMemoryFit) {
    TempDir dir("streamcli");
    const std::string data = dir.write("small.csv", small_table()).string();
    for (const std::string se : {"classical", "hc3"}) {
        SCOPED_TRACE(se);
        const RunResult mem = run_cli(fit_args(data, se));
        ASSERT_EQ(mem.exit_code, 0) << mem.describe();
        auto args = fit_args(data, se);
        args.insert(args.end(), {"--memory-budget", "0.001"});
        const RunResult str = run_cli(args);
        ASSERT_EQ(str.exit_code, 0) << str.describe();
        const nlohmann::json m = json_output(mem), s = json_output(str);
        EXPECT_TRUE(m.at("streamed").is_null());
        ASSERT_TRUE(s.at("streamed").is_object());
        EXPECT_EQ(s.at("streamed").at("passes"), se == "classical" ? 2 : 3);  // streamed_fit.hpp: 2 or 3 passes
        expect_same_numbers(s, m);
        const std::string first_note = s.at("notes")[0];
        EXPECT_NE(first_note.find("over the memory budget of"), std::string::npos) << first_note;
    }
}

TEST(StreamCli, StreamRefusesWhatItCannotStream) {
    TempDir dir("streamcli");
    const std::string data = dir.write("small.csv", small_table()).string();
    auto args = fit_args(data, "classical");
    args.insert(args.end(), {"--stream", "--centre", "x"});
    const RunResult r = run_cli(args);
    EXPECT_EQ(r.exit_code, 2) << r.describe();
    EXPECT_NE(r.err.find("--stream: the column transforms (--centre) need the table in memory"), std::string::npos)
        << r.err;
    // Without --stream, a tiny budget does not stop a transform: the table is read whole and the notes say why.
    args = fit_args(data, "classical");
    args.insert(args.end(), {"--memory-budget", "0.001", "--centre", "x"});
    const RunResult fallback = run_cli(args);
    ASSERT_EQ(fallback.exit_code, 0) << fallback.describe();
    EXPECT_TRUE(json_output(fallback).at("streamed").is_null());
}
