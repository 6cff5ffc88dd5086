// Project files: SHA-256 against the published examples and outside tools,
// the JSON round trip, schema checks and migration (schema 0 and 1 to 2; the
// five sample projects as saved in schema 1), atomic writes, opening a
// project with its data files (never writing anything), and analysis runs
// built from project settings.
#include <gtest/gtest.h>

#include <signal.h>
#include <spawn.h>
#include <stdlib.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#include <Eigen/Dense>
#include <algorithm>
#include <bit>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <functional>
#include <limits>
#include <map>
#include <random>
#include <sstream>
#include <string>
#include <vector>

#include "common/file_bytes.hpp"
#include "common/folder_snapshot.hpp"
#include "common/input_error.hpp"
#include "common/reference_fixtures.hpp"
#include "common/sample_projects.hpp"
#include "common/shell_command.hpp"
#include "common/table_builder.hpp"
#include "common/temp_dir.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/project/analysis_run.hpp"
#include "moderato/project/project.hpp"
#include "moderato/project/project_loader.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/file_util.hpp"
#include "moderato/support/sha256.hpp"

namespace fs = std::filesystem;
using namespace moderato;
using moderato::test::input_error_of;
using moderato::test::read_file;
using moderato::test::run_command;
using moderato::test::samples_dir;
using moderato::test::snapshot_folder;
using moderato::test::TempDir;
using moderato::test::write_file;

namespace {

const double kNaN = std::numeric_limits<double>::quiet_NaN();

bool contains(const std::string& text, const std::string& part) { return text.find(part) != std::string::npos; }

bool same_bits(double a, double b) { return std::bit_cast<std::uint64_t>(a) == std::bit_cast<std::uint64_t>(b); }

}  // namespace

// ---------------------------------------------------------------- SHA-256

// Each check runs through sha256_hex (OpenSSL's libcrypto) on the bytes in
// one piece; FileMatchesSha256sum streams a file in 1 MiB reads.
#define EXPECT_SHA256(bytes, expected) EXPECT_EQ(sha256_hex(bytes), expected)

// FIPS 180-2 (with change notice), Appendix B.1: the one-block message "abc".
TEST(Sha256, FipsOneBlockMessage) {
    EXPECT_SHA256("abc", "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
}

// FIPS 180-2, Appendix B.2: the 448-bit two-block message.
TEST(Sha256, FipsTwoBlockMessage) {
    EXPECT_SHA256("abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq",
                  "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1");
}

// FIPS 180-2, Appendix B.3: one million repetitions of 'a'.
TEST(Sha256, FipsMillionA) {
    EXPECT_SHA256(std::string(1000000, 'a'), "cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0");
}

// The empty message: e3b0c442... (NIST CAVS SHA256ShortMsg, Len = 0; from memory,
// and checked against Python's hashlib in the next test).
TEST(Sha256, EmptyMessage) { EXPECT_SHA256("", "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855"); }

// Every length 0..200 (all the padding cases: 55, 56, 63, 64, 119, 120 bytes)
// against Python's hashlib on the same bytes (a second route to the same
// library, so this checks how we feed it; FIPS 180-2 above checks the digest).
TEST(Sha256, EveryPaddingCaseMatchesPythonHashlib) {
    if (!fs::exists("/usr/bin/python3")) GTEST_SKIP() << "/usr/bin/python3 is not installed";
    const std::string out = run_command(
        "/usr/bin/python3 -c 'import hashlib\n"
        "for n in range(201): print(hashlib.sha256(bytes((7 * j + 3) % 256 for j in range(n))).hexdigest())'");
    std::istringstream lines(out);
    std::string expected;
    int n = 0;
    for (; std::getline(lines, expected); ++n) {
        std::string bytes;
        for (int j = 0; j < n; ++j) bytes.push_back(static_cast<char>((7 * j + 3) % 256));
        SCOPED_TRACE("length " + std::to_string(n));
        EXPECT_SHA256(bytes, expected);
        // The same bytes at an odd address.
        const std::string shifted = "x" + bytes;
        EXPECT_EQ(sha256_hex(std::string_view(shifted).substr(1)), expected);
    }
    EXPECT_EQ(n, 201) << "python3 printed " << n << " hashes";
}

// A file of 2.5 MB (more than the 1 MiB read buffer, not a multiple of it)
// against the coreutils tool `sha256sum` on the same file.
TEST(Sha256, FileMatchesSha256sum) {
    TempDir dir("project");
    std::mt19937 random(20240917);
    std::string bytes(2500017, '\0');
    for (char& c : bytes) c = static_cast<char>(random() & 0xff);
    const std::string file = dir / "random.bin";
    write_file(file, bytes);
    const std::string tool = run_command("sha256sum '" + file + "'");
    if (tool.size() < 64) GTEST_SKIP() << "sha256sum (coreutils) did not run";
    EXPECT_EQ(sha256_file(file), tool.substr(0, 64));  // coreutils sha256sum
    EXPECT_SHA256(bytes, tool.substr(0, 64));

    const std::string empty = dir / "empty.bin";
    write_file(empty, "");
    EXPECT_EQ(sha256_file(empty), run_command("sha256sum '" + empty + "'").substr(0, 64));  // coreutils sha256sum
}

TEST(Sha256, UnreadableFileNamesTheFile) {
    TempDir dir("project");
    const std::string missing = dir / "nothing-here.csv";
    const std::string message = input_error_of([&] { sha256_file(missing); });
    EXPECT_TRUE(contains(message, missing)) << message;
}

// ---------------------------------------------------------------- JSON round trip

namespace {

// A project with every field set to something other than its default, and
// numbers that only survive exact (shortest round-trip) formatting.
Project full_project() {
    Project p;
    DataSource spend;
    spend.id = "spend";
    spend.path = "data/spend;weekly.csv";
    spend.sha256 = sha256_hex("spend");
    spend.import.delimiter = ';';
    spend.import.header = false;
    spend.import.missing_tokens = {"", "-999", "n/a", "“none”"};
    spend.import.decimal_comma = true;
    spend.import.column_kinds = {{"store", ColumnKind::Categorical}, {"code", ColumnKind::Numeric}};
    DataSource plots;
    plots.id = "plots";
    plots.path = "/srv/field data/plots.tsv";
    plots.import.delimiter = '\t';
    plots.import.missing_tokens = {};
    p.datasets = {spend, plots};

    const std::vector<RecipeKind> kinds{RecipeKind::CentreMean,  RecipeKind::CentreMedian, RecipeKind::CentreValue,
                                        RecipeKind::Standardise, RecipeKind::Log,          RecipeKind::Log1p,
                                        RecipeKind::Square,      RecipeKind::Dummy,        RecipeKind::Product};
    for (const auto kind : kinds) {
        DerivedRecipe r;
        r.dataset = kind == RecipeKind::Product ? "plots" : "spend";
        r.name = std::string("new_") + to_string(kind);
        r.kind = kind;
        r.source = "x";
        if (kind == RecipeKind::CentreValue) r.value = 1.0 / 3.0;
        if (kind == RecipeKind::Dummy) r.level = "North-East (coast)";
        if (kind == RecipeKind::Product) r.other = "z";
        p.derived.push_back(r);
    }

    Analysis a;
    a.id = "full";
    a.name = "discount × loyalty — all settings";
    a.dataset = "spend";
    a.roles = {"y", "x", "z", "w", {"c1", "c2", "région"}, "wt", "site", ""};
    a.family = Family::Logistic;
    a.se = SeKind::Cluster;
    a.level = 0.9;
    a.centring = Centring::Mean;
    a.probe.current = 12.375;
    a.probe.pinned = {0.1, 1.0 / 3.0, -0.0, 1e-300, 5e-324, 1.7976931348623157e308, -2.5, 123456789.123456789};
    a.probe.second_value = M_PI;
    a.probe.scale = ProbeScale::Outcome;
    a.probe.averaging = Averaging::AtValues;
    a.probe.simultaneous_band = true;
    a.probe.show_points = false;
    a.probe.adjustment = Adjustment::Bonferroni;
    a.probe.extend_to_boundaries = true;
    a.probe.jitter = false;
    a.reference_levels = {{"région", "Île"}, {"store", "B"}};
    a.figure = {SizePreset::Custom, 7.25, 3.1, 600, "Noto Serif", 10.5, true, false, true};
    p.analyses.push_back(a);

    // One analysis per standard-error kind, with the NaN defaults ("the mean").
    const std::vector<SeKind> kinds_se{SeKind::Classical, SeKind::HC0, SeKind::HC1,
                                       SeKind::HC2,       SeKind::HC3, SeKind::HC4};
    for (std::size_t i = 0; i < kinds_se.size(); ++i) {
        Analysis b;
        b.id = "se-" + std::to_string(i);
        b.name = std::string("SE ") + to_string(kinds_se[i]);
        b.dataset = "plots";
        b.roles.outcome = "yield";
        b.roles.focal = "n";
        b.roles.moderator = "moisture";
        b.se = kinds_se[i];
        b.level = 0.99;
        b.figure.preset = i % 2 ? SizePreset::Slide : SizePreset::TwoColumn;
        p.analyses.push_back(b);
    }
    // A multilevel analysis with every setting away from its default.
    Analysis m = p.analyses.back();
    m.id = "multilevel";
    m.se = SeKind::Classical;
    m.multilevel.groups = "field";
    m.multilevel.random_slopes = {"n", "moisture"};
    m.multilevel.estimation = MixedEstimation::Ml;
    m.multilevel.covariance = RandomCovariance::Diagonal;
    m.multilevel.df = FixedEffectDf::BetweenWithin;
    m.multilevel.centre_within = {"n"};
    m.multilevel.group_means = {"n", "moisture"};
    p.analyses.push_back(m);
    EXPECT_TRUE(std::isnan(p.analyses[1].probe.current));
    EXPECT_TRUE(std::isnan(p.analyses[1].probe.second_value));

    const std::vector<FigurePlot> plots_kinds{FigurePlot::Lines,    FigurePlot::Effect,    FigurePlot::Surface,
                                              FigurePlot::Cells,    FigurePlot::Residuals, FigurePlot::QQ,
                                              FigurePlot::Influence};
    for (const auto plot : plots_kinds) {
        const std::string key = to_string(plot);
        p.figures.push_back({"fig-" + key, "The " + key + " plot", plot == FigurePlot::Lines ? "full" : "se-1", plot});
    }
    return p;
}

}  // namespace

TEST(ProjectJson, EveryFieldRoundTripsExactly) {
    const Project p = full_project();
    const std::string text = project_to_json(p);
    const Project q = project_from_json(text, "memory.moderato");
    EXPECT_TRUE(q == p);
    // Field by field, so a failure says where.
    ASSERT_EQ(q.datasets.size(), p.datasets.size());
    for (std::size_t i = 0; i < p.datasets.size(); ++i) {
        EXPECT_EQ(q.datasets[i].id, p.datasets[i].id);
        EXPECT_EQ(q.datasets[i].path, p.datasets[i].path);
        EXPECT_EQ(q.datasets[i].sha256, p.datasets[i].sha256);
        EXPECT_EQ(q.datasets[i].import.delimiter, p.datasets[i].import.delimiter);
        EXPECT_EQ(q.datasets[i].import.header, p.datasets[i].import.header);
        EXPECT_EQ(q.datasets[i].import.missing_tokens, p.datasets[i].import.missing_tokens);
        EXPECT_EQ(q.datasets[i].import.decimal_comma, p.datasets[i].import.decimal_comma);
        EXPECT_EQ(q.datasets[i].import.column_kinds, p.datasets[i].import.column_kinds);
    }
    EXPECT_EQ(q.derived, p.derived);
    ASSERT_EQ(q.analyses.size(), p.analyses.size());
    for (std::size_t i = 0; i < p.analyses.size(); ++i) {
        SCOPED_TRACE(p.analyses[i].id);
        EXPECT_TRUE(q.analyses[i] == p.analyses[i]);
        EXPECT_EQ(q.analyses[i].roles, p.analyses[i].roles);
        EXPECT_EQ(q.analyses[i].se, p.analyses[i].se);
        EXPECT_EQ(q.analyses[i].family, p.analyses[i].family);
        EXPECT_TRUE(same_bits(q.analyses[i].level, p.analyses[i].level));
        EXPECT_TRUE(q.analyses[i].probe == p.analyses[i].probe);
        EXPECT_EQ(q.analyses[i].figure, p.analyses[i].figure);
        EXPECT_EQ(q.analyses[i].reference_levels, p.analyses[i].reference_levels);
        EXPECT_EQ(q.analyses[i].probe.adjustment, p.analyses[i].probe.adjustment);
        EXPECT_EQ(q.analyses[i].probe.extend_to_boundaries, p.analyses[i].probe.extend_to_boundaries);
        EXPECT_TRUE(q.analyses[i].multilevel == p.analyses[i].multilevel);
    }
    // Numbers: the same bits, including the sign of zero and a subnormal.
    const auto& pinned = q.analyses[0].probe.pinned;
    ASSERT_EQ(pinned.size(), p.analyses[0].probe.pinned.size());
    for (std::size_t i = 0; i < pinned.size(); ++i)
        EXPECT_TRUE(same_bits(pinned[i], p.analyses[0].probe.pinned[i])) << "pinned[" << i << "]";
    EXPECT_TRUE(std::signbit(pinned[2]));
    EXPECT_TRUE(same_bits(q.analyses[0].probe.second_value, M_PI));
    EXPECT_TRUE(same_bits(q.derived[2].value, 1.0 / 3.0));
    EXPECT_TRUE(std::isnan(q.analyses[3].probe.current));
    EXPECT_TRUE(std::isnan(q.analyses[3].probe.second_value));
    EXPECT_EQ(q.figures, p.figures);
    // Writing what was read gives the same text.
    EXPECT_EQ(project_to_json(q), text);
}

TEST(ProjectJson, EqualityNoticesEveryKindOfChange) {
    const Project p = full_project();
    Project q = p;
    q.datasets[0].import.column_kinds["store"] = ColumnKind::Numeric;
    EXPECT_FALSE(q == p);
    q = p;
    q.analyses[1].probe.current = 0;  // NaN (the mean) is not 0
    EXPECT_FALSE(q == p);
    q = p;
    q.analyses[0].probe.pinned[2] = 0.0;  // -0 == +0 numerically: equal states
    EXPECT_TRUE(q == p);
    q = p;
    q.derived[4].source = "y";
    EXPECT_FALSE(q == p);
    q = p;
    q.analyses[0].reference_levels["store"] = "A";
    EXPECT_FALSE(q == p);
    q = p;
    q.analyses[1].probe.adjustment = Adjustment::None;
    EXPECT_FALSE(q == p);
    q = p;
    q.analyses[1].probe.extend_to_boundaries = true;
    EXPECT_FALSE(q == p);
    q = p;
    q.analyses[1].figure.mark_slider = true;
    EXPECT_FALSE(q == p);
    q = p;
    q.analyses[1].probe.jitter = false;
    EXPECT_FALSE(q == p);
    q = p;
    q.analyses.back().multilevel.df = FixedEffectDf::Satterthwaite;
    EXPECT_FALSE(q == p);
    q = p;
    q.analyses.back().multilevel.groups.clear();
    EXPECT_FALSE(q == p);
}

// The Groups role and the multilevel settings are written only when set, so
// single-level projects keep their bytes.
TEST(ProjectJson, MultilevelSettingsAreWrittenOnlyWithGroups) {
    Project p = full_project();
    const std::string text = project_to_json(p);
    EXPECT_NE(text.find("\"groups\": \"field\""), std::string::npos);
    EXPECT_NE(text.find("\"df\": \"between-within\""), std::string::npos);
    p.analyses.pop_back();
    const std::string single = project_to_json(p);
    EXPECT_EQ(single.find("multilevel"), std::string::npos);
    EXPECT_EQ(single.find("\"groups\""), std::string::npos);
    // Settings kept while the Groups role is empty read back as they were.
    Project q = full_project();
    q.analyses.back().multilevel.groups.clear();
    const std::string kept = project_to_json(q);
    EXPECT_EQ(kept.find("\"groups\""), std::string::npos);
    EXPECT_TRUE(project_from_json(kept, "memory.moderato") == q);
}

// A count model's exposure: written under "roles" only when set (so projects
// without one keep their bytes), read back equal, counted by ==, and carried
// into the model specification (docs/user-guide.md, count models).
TEST(ProjectJson, ExposureRoleIsWrittenOnlyWhenSetAndRoundTrips) {
    Project p = full_project();
    const std::string without = project_to_json(p);
    EXPECT_EQ(without.find("\"exposure\""), std::string::npos);
    Analysis& a = p.analyses.front();
    a.family = Family::NegativeBinomial;
    a.roles.exposure = "open hours (week)";
    const std::string with = project_to_json(p);
    EXPECT_NE(with.find("\"exposure\": \"open hours (week)\""), std::string::npos) << with;
    EXPECT_NE(with.find("\"family\": \"negative-binomial\""), std::string::npos);
    const Project q = project_from_json(with, "memory.moderato");
    EXPECT_TRUE(q == p);
    EXPECT_EQ(q.analyses.front().roles.exposure, "open hours (week)");
    EXPECT_EQ(project_to_json(q), with);  // the same bytes again
    Project r = q;
    r.analyses.front().roles.exposure.clear();
    EXPECT_FALSE(r == q);
    EXPECT_EQ(model_spec(q.analyses.front()).exposure, "open hours (week)");
    EXPECT_EQ(model_spec(r.analyses.front()).exposure, "");
}

// Jitter is on by default; only "off" is written, so projects keep their bytes.
TEST(ProjectJson, JitterIsWrittenOnlyWhenOff) {
    Project p = full_project();
    ASSERT_FALSE(p.analyses[0].probe.jitter);
    EXPECT_TRUE(p.analyses[1].probe.jitter);  // the default
    const std::string text = project_to_json(p);
    EXPECT_NE(text.find("\"jitter\": false"), std::string::npos);
    EXPECT_EQ(text.find("\"jitter\": true"), std::string::npos);
    EXPECT_FALSE(project_from_json(text, "memory.moderato").analyses[0].probe.jitter);
    p.analyses[0].probe.jitter = true;
    EXPECT_EQ(project_to_json(p).find("jitter"), std::string::npos);
}

// Marking the slider's value in exports is off unless asked for; off, the
// key is not written, so sample projects keep their bytes.
TEST(ProjectJson, MarkSliderIsWrittenOnlyWhenOn) {
    Project p = full_project();
    ASSERT_TRUE(p.analyses[0].figure.mark_slider);
    EXPECT_FALSE(p.analyses[1].figure.mark_slider);  // the default
    const std::string text = project_to_json(p);
    EXPECT_NE(text.find("\"mark_slider\": true"), std::string::npos);
    EXPECT_EQ(text.find("\"mark_slider\": false"), std::string::npos);
    EXPECT_TRUE(project_from_json(text, "memory.moderato").analyses[0].figure.mark_slider);
    p.analyses[0].figure.mark_slider = false;
    EXPECT_EQ(project_to_json(p).find("mark_slider"), std::string::npos);
}

// The defaults (Holm; every reference level its first in text order; the
// Effect plot's axis not extended to the boundaries) are not written, so a
// project that never used them keeps its bytes.
TEST(ProjectJson, DefaultAdjustmentAndReferenceLevelsAreNotWritten) {
    Project p = full_project();
    const std::string text = project_to_json(p);
    EXPECT_NE(text.find("\"adjustment\": \"bonferroni\""), std::string::npos);
    EXPECT_NE(text.find("\"reference_levels\""), std::string::npos);
    EXPECT_NE(text.find("\"extend_to_boundaries\": true"), std::string::npos);
    p.analyses[0].probe.adjustment = Adjustment::Holm;
    p.analyses[0].reference_levels.clear();
    p.analyses[0].probe.extend_to_boundaries = false;
    const std::string plain = project_to_json(p);
    EXPECT_EQ(plain.find("adjustment"), std::string::npos);
    EXPECT_EQ(plain.find("reference_levels"), std::string::npos);
    EXPECT_EQ(plain.find("extend_to_boundaries"), std::string::npos);
    // Read back: absent means false.
    EXPECT_FALSE(project_from_json(plain, "memory.moderato").analyses[0].probe.extend_to_boundaries);
}

// The straight-line check's switches (binned estimates, smooth curve) are
// written only when not at their defaults (ProbeSettings in project.hpp: off,
// 3 bins, bandwidth by cross-validation, 200 replicates, seed 1), and every
// one of them survives the round trip and counts in == and same_probe.
TEST(ProjectJson, StraightLineCheckSettingsRoundTripAndDefaultsAreNotWritten) {
    Project p = full_project();
    const std::string plain = project_to_json(p);
    for (const char* key :
         {"binned_estimates", "\"bins\"", "smooth_curve", "smooth_bandwidth", "smooth_replicates", "smooth_seed"})
        EXPECT_EQ(plain.find(key), std::string::npos) << key;
    ProbeSettings& ps = p.analyses[0].probe;
    ps.show_binned = true;
    ps.bins = 5;
    ps.show_smooth = true;
    ps.smooth_bandwidth = 0.75;
    ps.smooth_replicates = 0;
    ps.smooth_seed = 18446744073709551615ull;  // the largest 64-bit seed survives JSON
    const std::string text = project_to_json(p);
    EXPECT_NE(text.find("\"binned_estimates\": true"), std::string::npos);
    EXPECT_NE(text.find("\"bins\": 5"), std::string::npos);
    EXPECT_NE(text.find("\"smooth_seed\": 18446744073709551615"), std::string::npos);
    const Project q = project_from_json(text, "memory.moderato");
    EXPECT_EQ(q, p);
    const ProbeSettings& back = q.analyses[0].probe;
    EXPECT_TRUE(back.show_binned);
    EXPECT_EQ(back.bins, 5);
    EXPECT_TRUE(back.show_smooth);
    EXPECT_EQ(back.smooth_bandwidth, 0.75);
    EXPECT_EQ(back.smooth_replicates, 0);
    EXPECT_EQ(back.smooth_seed, 18446744073709551615ull);
    // Each switch on its own makes a different probe (the run must be probed again).
    const Analysis base = full_project().analyses[0];
    const std::vector<std::function<void(ProbeSettings&)>> edits = {
        [](ProbeSettings& s) { s.show_binned = true; },      [](ProbeSettings& s) { s.bins = 4; },
        [](ProbeSettings& s) { s.show_smooth = true; },      [](ProbeSettings& s) { s.smooth_bandwidth = 2; },
        [](ProbeSettings& s) { s.smooth_replicates = 500; }, [](ProbeSettings& s) { s.smooth_seed = 7; }};
    for (std::size_t k = 0; k < edits.size(); ++k) {
        Analysis changed = base;
        edits[k](changed.probe);
        EXPECT_FALSE(changed.probe == base.probe) << k;
        EXPECT_FALSE(same_probe(changed, base)) << k;
        EXPECT_TRUE(same_model(changed, base)) << k;
    }
}

TEST(ProjectJson, WritingARecipeValueAndNonFiniteNumbersStaysReadable) {
    Project p = full_project();
    p.analyses[0].probe.pinned.push_back(kNaN);
    p.analyses[0].probe.pinned.push_back(std::numeric_limits<double>::infinity());
    p.analyses[0].probe.current = std::numeric_limits<double>::infinity();
    p.derived[0].value = 4.5;  // a value on a recipe that does not use it still round-trips
    const Project q = project_from_json(project_to_json(p), "memory.moderato");
    // Non-finite pinned values mean nothing on a slider: they are left out, and
    // a non-finite slider position is read back as "the mean".
    EXPECT_EQ(q.analyses[0].probe.pinned.size(), p.analyses[0].probe.pinned.size() - 2);
    EXPECT_TRUE(std::isnan(q.analyses[0].probe.current));
    EXPECT_EQ(q.derived[0].value, 4.5);
}

// ---------------------------------------------------------------- schema and errors

namespace {

const char* kSmallProject = R"({
  "schema_version": 2,
  "datasets": [ {"id": "d", "path": "d.csv", "import": {"delimiter": ","}} ],
  "analyses": [ {"id": "a", "dataset": "d",
                 "roles": {"outcome": "y", "focal": "x", "moderator": "z"},
                 "probe": {"pinned": [1, 2]}} ]
}
)";

std::string replaced(std::string text, const std::string& from, const std::string& to) {
    const auto at = text.find(from);
    EXPECT_NE(at, std::string::npos) << from;
    if (at != std::string::npos) text.replace(at, from.size(), to);
    return text;
}

}  // namespace

TEST(ProjectJson, SmallProjectReadsWithDefaults) {
    const Project p = project_from_json(kSmallProject, "small.moderato");
    ASSERT_EQ(p.analyses.size(), 1u);
    EXPECT_EQ(p.analyses[0].name, "a");  // the id when no name is given
    EXPECT_EQ(p.analyses[0].probe.pinned, (std::vector<double>{1, 2}));
    EXPECT_EQ(p.datasets[0].import.delimiter, ',');
    EXPECT_TRUE(p.migration_notes.empty());
}

TEST(ProjectJson, NewerSchemaIsRefusedNamingTheFileAndBothVersions) {
    const std::string text = replaced(kSmallProject, "\"schema_version\": 2", "\"schema_version\": 7");
    const std::string message = input_error_of([&] { project_from_json(text, "/data/future.moderato"); });
    EXPECT_TRUE(contains(message, "/data/future.moderato")) << message;
    EXPECT_TRUE(contains(message, "newer")) << message;
    EXPECT_TRUE(contains(message, "schema 7")) << message;
    EXPECT_TRUE(contains(message, "schema " + std::to_string(kProjectSchemaVersion))) << message;
    // A version too large for a signed 64-bit number is still "newer".
    const std::string huge =
        replaced(kSmallProject, "\"schema_version\": 2", "\"schema_version\": 18446744073709551615");
    const std::string huge_message = input_error_of([&] { project_from_json(huge, "future.moderato"); });
    EXPECT_TRUE(contains(huge_message, "newer")) << huge_message;
    EXPECT_TRUE(contains(huge_message, "18446744073709551615")) << huge_message;
}

TEST(ProjectJson, SchemaZeroIsMigratedWithANote) {
    // Schema 0 kept the roles at the top level of each analysis.
    const std::string old = R"({
      "schema_version": 0,
      "datasets": [ {"id": "d", "path": "d.csv"} ],
      "analyses": [ {"id": "a", "dataset": "d", "outcome": "y", "focal": "x", "moderator": "z",
                     "second_moderator": "w", "controls": ["c1", "c2"], "weights": "wt", "clusters": "g",
                     "se": "cluster"} ]
    })";
    const Project p = project_from_json(old, "old.moderato");
    ASSERT_EQ(p.analyses.size(), 1u);
    const Roles expected{"y", "x", "z", "w", {"c1", "c2"}, "wt", "g", ""};
    EXPECT_EQ(p.analyses[0].roles, expected);
    EXPECT_EQ(p.analyses[0].se, SeKind::Cluster);
    ASSERT_EQ(p.migration_notes.size(), 1u);
    EXPECT_TRUE(contains(p.migration_notes[0], "schema 0")) << p.migration_notes[0];
    EXPECT_EQ(p.schema_version, kProjectSchemaVersion);
    // Saving writes the current schema with the roles grouped.
    const std::string saved = project_to_json(p);
    EXPECT_TRUE(contains(saved, "\"schema_version\": " + std::to_string(kProjectSchemaVersion))) << saved;
    EXPECT_TRUE(contains(saved, "\"roles\"")) << saved;
    EXPECT_TRUE(project_from_json(saved, "again.moderato").migration_notes.empty());

    // A schema-0 project with no analyses at all is fine too.
    const Project empty = project_from_json(R"({"schema_version": 0, "datasets": []})", "old-empty.moderato");
    EXPECT_TRUE(empty.analyses.empty());
    EXPECT_EQ(empty.migration_notes.size(), 1u);
}

TEST(ProjectJson, SchemaOneIsMigratedToOurWordsWithANote) {
    // Schema 1 stored the probe scale as "link"/"response" and the standard
    // errors as "se" (ARCHITECTURE.md: schema 2 uses our own words).
    const std::string old = R"({
      "schema_version": 1,
      "datasets": [ {"id": "d", "path": "d.csv"} ],
      "analyses": [ {"id": "a", "dataset": "d", "se": "classical", "probe": {"scale": "response"}},
                    {"id": "b", "dataset": "d", "se": "cluster", "probe": {"scale": "link"}},
                    {"id": "c", "dataset": "d", "se": "hc3"} ]
    })";
    const Project p = project_from_json(old, "one.moderato");
    ASSERT_EQ(p.analyses.size(), 3u);
    EXPECT_EQ(p.analyses[0].se, SeKind::Classical);
    EXPECT_EQ(p.analyses[0].probe.scale, ProbeScale::Outcome);
    EXPECT_EQ(p.analyses[1].se, SeKind::Cluster);
    EXPECT_EQ(p.analyses[1].probe.scale, ProbeScale::Model);
    EXPECT_EQ(p.analyses[2].se, SeKind::HC3);
    EXPECT_EQ(p.analyses[2].probe.scale, ProbeScale::Model);  // absent: the default
    ASSERT_EQ(p.migration_notes.size(), 1u);
    const std::string& note = p.migration_notes[0];
    for (const char* said : {"schema 1", "schema 2", "\"link\" is now \"model\"", "\"response\" is now \"outcome\"",
                             "\"se\" is now \"standard_errors\"", "\"model-based\"", "\"cluster-robust\"",
                             "unchanged until the project is saved"})
        EXPECT_TRUE(contains(note, said)) << said << " not in: " << note;
    // Saving writes schema 2 in our words only.
    const std::string saved = project_to_json(p);
    EXPECT_TRUE(contains(saved, "\"schema_version\": 2")) << saved;
    for (const char* word : {"\"model-based\"", "\"cluster-robust\"", "\"standard_errors\"", "\"outcome\""})
        EXPECT_TRUE(contains(saved, word)) << word;
    for (const char* word : {"\"se\"", "\"classical\"", "\"cluster\"", "\"link\"", "\"response\""})
        EXPECT_FALSE(contains(saved, word)) << word;
    // A value schema 1 did not have stays an error naming the field, in the new words.
    const std::string odd = replaced(old, "\"scale\": \"link\"", "\"scale\": \"odds\"");
    const std::string message = input_error_of([&] { project_from_json(odd, "odd.moderato"); });
    EXPECT_TRUE(contains(message, "odd.moderato: analyses[1].probe.scale:")) << message;
    EXPECT_TRUE(contains(message, "model, outcome")) << message;
}

TEST(ProjectJson, SchemaThreeIsRefused) {
    const std::string text = replaced(kSmallProject, "\"schema_version\": 2", "\"schema_version\": 3");
    EXPECT_EQ(input_error_of([&] { project_from_json(text, "three.moderato"); }),
              "three.moderato: made by a newer Moderato (project schema 3; this version reads up to schema 2). "
              "Open it with a newer Moderato; the file was not changed.");
}

namespace {

const char* const kSamples[] = {"coffee-discount", "helpdesk-staffing", "orchard-nitrogen", "trial-conversion",
                                "volunteer-onboarding"};

}  // namespace

// tests/data/v1-projects holds the five sample projects as they were saved
// in schema 1. Each opens with its data, is migrated in memory (the file is
// not touched), and equals the schema-2 sample that generate.py writes now.
TEST(ProjectMigration, EverySampleOfSchemaOneOpensAsItsSchemaTwoProject) {
    for (const char* name : kSamples) {
        SCOPED_TRACE(name);
        const fs::path v1 = fs::path(MODERATO_TEST_DATA_DIR) / "v1-projects" / (std::string(name) + ".moderato");
        const fs::path v2 = samples_dir() / name / (std::string(name) + ".moderato");
        const std::string v1_text = read_file(v1);
        ASSERT_TRUE(contains(v1_text, "\"schema_version\": 1"));
        ASSERT_TRUE(contains(read_file(v2), "\"schema_version\": 2"));
        // The v1 file beside a copy of its data, as it was saved.
        TempDir dir("project");
        const Project v2_project = read_project_file(v2.string());
        ASSERT_EQ(v2_project.datasets.size(), 1u);
        const std::string csv = v2_project.datasets[0].path;
        fs::copy_file(samples_dir() / name / csv, dir.path() / csv);
        write_file(dir.path() / "old.moderato", v1_text);
        const auto before = snapshot_folder(dir.path());
        const LoadedProject loaded = load_project(dir / "old.moderato");
        EXPECT_TRUE(before == snapshot_folder(dir.path())) << "opening a schema-1 project wrote something";
        ASSERT_EQ(loaded.project.migration_notes.size(), 1u);
        EXPECT_TRUE(contains(loaded.project.migration_notes[0], "schema 1")) << loaded.project.migration_notes[0];
        EXPECT_EQ(loaded.warnings, loaded.project.migration_notes);  // and no changed-data warning: same SHA-256
        EXPECT_TRUE(loaded.table_errors.empty());
        EXPECT_TRUE(loaded.project == v2_project);
        EXPECT_EQ(project_to_json(loaded.project), project_to_json(v2_project));
    }
}

// What the migration changed in the samples, field by field (the values
// schema 1 held, read from its files: "hc3" or "classical", "link" or "response").
TEST(ProjectMigration, SampleKindsAreTheEnumsOfTheirSchemaOneWords) {
    for (const char* name : kSamples) {
        SCOPED_TRACE(name);
        const fs::path v1 = fs::path(MODERATO_TEST_DATA_DIR) / "v1-projects" / (std::string(name) + ".moderato");
        const std::string text = read_file(v1);
        const Project p = project_from_json(text, v1.string());
        ASSERT_EQ(p.analyses.size(), 1u);
        const Analysis& a = p.analyses[0];
        EXPECT_EQ(a.se, contains(text, "\"se\": \"hc3\"") ? SeKind::HC3 : SeKind::Classical);
        EXPECT_EQ(a.probe.scale, contains(text, "\"scale\": \"response\"") ? ProbeScale::Outcome : ProbeScale::Model);
        EXPECT_EQ(a.probe.averaging, Averaging::Sample);
        EXPECT_EQ(a.centring, Centring::None);
        EXPECT_EQ(a.figure.preset, SizePreset::Memo);
        ASSERT_EQ(p.figures.size(), 1u);
        EXPECT_EQ(p.figures[0].plot, contains(text, "\"plot\": \"cells\"") ? FigurePlot::Cells : FigurePlot::Lines);
    }
}

TEST(ProjectJson, NumberTooLargeForADoubleIsBadInputWithItsPlace) {
    // A number beyond the range of a double (about 1.8e308, IEEE 754) makes the
    // JSON parser give up without a position; the message still names the file,
    // the line and column of the number (by construction: line 3, column 12),
    // and the number itself, as bad input rather than a failure of ours.
    const std::string text = "{\n  \"schema_version\": 2,\n  \"level\": 9999e99999,\n  \"x\": 1\n}\n";
    const std::string message = input_error_of([&] { project_from_json(text, "huge.moderato"); });
    EXPECT_TRUE(contains(message, "huge.moderato: line 3, column 12")) << message;
    EXPECT_TRUE(contains(message, "9999e99999")) << message;
    EXPECT_TRUE(contains(message, "too large")) << message;

    // The same digits earlier inside a longer number do not mislead the place:
    // "19999e99999" on line 2 does not overflow the search for "9999e99999".
    const std::string two = "{\n  \"a\": \"19999e99999\",\n  \"b\": 9999e99999\n}\n";
    const std::string two_message = input_error_of([&] { project_from_json(two, "two.moderato"); });
    EXPECT_TRUE(contains(two_message, "line 3, column 8")) << two_message;
}

TEST(ProjectJson, CorruptJsonGivesLineAndColumn) {
    // By construction: the stray '}' is the 17th character of line 4
    // ("    {" is 5 characters, "\"id\": \"a\", " 11 more, then '}').
    const std::string text = "{\n  \"schema_version\": 1,\n  \"datasets\": [\n    {\"id\": \"a\", }\n  ]\n}\n";
    const std::string message = input_error_of([&] { project_from_json(text, "broken.moderato"); });
    EXPECT_TRUE(contains(message, "broken.moderato")) << message;
    EXPECT_TRUE(contains(message, "line 4, column 17")) << message;
    EXPECT_TRUE(contains(message, "not valid JSON")) << message;

    // Cut off after the first line: the end of the text is on line 2.
    const std::string cut = "{\n  \"schema_version\": 1,";
    const std::string cut_message = input_error_of([&] { project_from_json(cut, "cut.moderato"); });
    EXPECT_TRUE(contains(cut_message, "line 2")) << cut_message;

    // The column counts characters: "é" is two bytes but one column; the
    // stray ':' is the 18th character of line 2 (by construction).
    const std::string utf8 = "{\n  \"name\": \"caf\xc3\xa9\" :\n}";
    const std::string utf8_message = input_error_of([&] { project_from_json(utf8, "accent.moderato"); });
    EXPECT_TRUE(contains(utf8_message, "line 2, column 18")) << utf8_message;

    // An empty file and a file that is JSON but not an object.
    EXPECT_TRUE(contains(input_error_of([&] { project_from_json("", "empty.moderato"); }), "line 1, column 1"));
    EXPECT_TRUE(
        contains(input_error_of([&] { project_from_json("[1, 2]", "list.moderato"); }), "not a Moderato project"));
    EXPECT_TRUE(contains(input_error_of([&] { project_from_json("{}", "nothing.moderato"); }), "schema_version"));
    EXPECT_TRUE(contains(input_error_of([&] { project_from_json(R"({"schema_version": 1.5})", "half.moderato"); }),
                         "whole number"));
}

TEST(ProjectJson, WrongTypesNameTheFieldPath) {
    struct Case {
        std::string from, to, path, expected;
    };
    const std::vector<Case> cases{
        {"\"pinned\": [1, 2]", "\"pinned\": [1, \"two\"]", "analyses[0].probe.pinned[1]", "expected a number"},
        {"\"pinned\": [1, 2]", "\"pinned\": 3", "analyses[0].probe.pinned", "expected a list"},
        {"\"delimiter\": \",\"", "\"delimiter\": \",;\"", "datasets[0].import.delimiter", "one character"},
        {"\"delimiter\": \",\"", "\"header\": \"yes\"", "datasets[0].import.header", "true or false"},
        {"\"delimiter\": \",\"", "\"column_kinds\": {\"x\": \"date\"}", "datasets[0].import.column_kinds.x", "numeric"},
        {"\"outcome\": \"y\"", "\"outcome\": 5", "analyses[0].roles.outcome", "expected text"},
        {"\"outcome\": \"y\"", "\"controls\": [\"c\", 3]", "analyses[0].roles.controls[1]", "expected text"},
        {"\"outcome\": \"y\"", "\"outcome\": \"y\", \"exposure\": 40", "analyses[0].roles.exposure", "expected text"},
        {"\"outcome\": \"y\"", "\"outcome\": \"y\", \"exposure\": [\"hours\"]", "analyses[0].roles.exposure",
         "expected text"},
        {"\"dataset\": \"d\",", "\"dataset\": \"d\", \"level\": \"95%\",", "analyses[0].level", "expected a number"},
        {"\"dataset\": \"d\",", "\"dataset\": \"d\", \"level\": 95,", "analyses[0].level", "between 0 and 1"},
        {"\"dataset\": \"d\",", "\"dataset\": \"d\", \"standard_errors\": \"hc9\",", "analyses[0].standard_errors",
         "model-based"},
        {"\"dataset\": \"d\",", "\"dataset\": \"d\", \"family\": \"ordinal\",", "analyses[0].family",
         "negative-binomial"},
        {"\"dataset\": \"d\",", "\"dataset\": \"d\", \"centring\": \"median\",", "analyses[0].centring", "mean"},
        {"\"probe\": {", "\"probe\": {\"scale\": \"odds\",", "analyses[0].probe.scale", "outcome"},
        {"\"probe\": {", "\"probe\": {\"adjustment\": \"sidak\",", "analyses[0].probe.adjustment", "bonferroni"},
        {"\"probe\": {", "\"reference_levels\": {\"z\": 2}, \"probe\": {", "analyses[0].reference_levels.z",
         "expected text"},
        {"\"probe\": {", "\"reference_levels\": [\"z\"], \"probe\": {", "analyses[0].reference_levels",
         "expected an object"},
        {"\"probe\": {", "\"figure\": {\"dpi\": 1e20}, \"probe\": {", "analyses[0].figure.dpi", "between 72 and 1200"},
        // Values a random mutation of a sample produced: nothing sensible to draw.
        {"\"probe\": {", "\"figure\": {\"width_in\": 1e-320}, \"probe\": {", "analyses[0].figure", "0.5 and 40 inches"},
        {"\"probe\": {", "\"figure\": {\"font_pt\": 0}, \"probe\": {", "analyses[0].figure.font_pt",
         "between 4 and 48"},
        {"\"probe\": {", "\"figure\": {\"dpi\": 299.5}, \"probe\": {", "analyses[0].figure.dpi", "whole number"},
        {"\"probe\": {", "\"figure\": {\"width_in\": -1}, \"probe\": {", "analyses[0].figure", "inches"},
        {"\"probe\": {", "\"figure\": {\"preset\": \"poster\"}, \"probe\": {", "analyses[0].figure.preset", "memo"},
        {"\"probe\": {", "\"figure\": [], \"probe\": {", "analyses[0].figure", "expected an object"},
        // Each within its range, together over FigureLimits::max_pixels: 40 in × 1200 DPI = 48,000 px a side,
        // 12 × 12 in at 1200 DPI = 14,400² = 207,360,000 px (closed form); 11 × 11 in fits (174,240,000).
        {"\"probe\": {", "\"figure\": {\"width_in\": 40, \"height_in\": 40, \"dpi\": 1200}, \"probe\": {",
         "analyses[0].figure", "48,000 × 48,000 pixels, over the limit of 200,000,000 pixels"},
        {"\"probe\": {", "\"figure\": {\"width_in\": 12, \"height_in\": 12, \"dpi\": 1200}, \"probe\": {",
         "analyses[0].figure", "14,400 × 14,400 pixels, over the limit"},
        {"\"datasets\": [", "\"datasets\": [ 7, ", "datasets[0]", "expected an object"},
        {"\"id\": \"d\", \"path\": \"d.csv\",", "\"id\": \"d\",", "datasets[0]", "\"path\" is missing"},
    };
    for (const Case& c : cases) {
        SCOPED_TRACE(c.to);
        const std::string text = replaced(kSmallProject, c.from, c.to);
        const std::string message = input_error_of([&] { project_from_json(text, "typed.moderato"); });
        EXPECT_TRUE(contains(message, "typed.moderato: " + c.path + ":")) << message;
        EXPECT_TRUE(contains(message, c.expected)) << message;
    }
}

TEST(FigureLimits, ThePixelLimitAndTheLargestDpiAtASize) {
    using L = FigureLimits;
    // closed form: 11 in × 1200 DPI = 13,200 px; 13,200² = 174,240,000 ≤ 2·10⁸
    EXPECT_TRUE(L::pixels_fit(11, 11, 1200));
    EXPECT_FALSE(L::pixels_fit(12, 12, 1200));  // 207,360,000
    EXPECT_EQ(L::max_dpi_for(11, 11), 1200);    // capped by max_dpi
    // closed form: √(2·10⁸ / 1,600) = 353.55; 40 × 353 = 14,120 px, 14,120² = 199,374,400 fits, 354 does not
    EXPECT_EQ(L::max_dpi_for(40, 40), 353);
    EXPECT_TRUE(L::pixels_fit(40, 40, 353));
    EXPECT_FALSE(L::pixels_fit(40, 40, 354));
    // The memo preset (6.5 × 4 in) at the highest DPI: 7,800 × 4,800 px (closed form)
    EXPECT_EQ(L::pixels(6.5, 4, 1200), 7800.0 * 4800.0);
}

TEST(ProjectJson, UnknownReferencesAndRepeatedIdsAreRefused) {
    struct Case {
        std::string from, to, path, expected;
    };
    const std::vector<Case> cases{
        {"\"dataset\": \"d\",", "\"dataset\": \"elsewhere\",", "analyses[0].dataset", "\"elsewhere\""},
        {"\"analyses\": [",
         "\"derived_columns\": [{\"dataset\": \"gone\", \"name\": \"n\", \"kind\": \"log\", "
         "\"source\": \"x\"}], \"analyses\": [",
         "derived_columns[0].dataset", "\"gone\""},
        {"\"analyses\": [",
         "\"figures\": [{\"id\": \"f\", \"analysis\": \"nope\", \"plot\": \"lines\"}], \"analyses\": [",
         "figures[0].analysis", "\"nope\""},
        {"\"datasets\": [", "\"datasets\": [ {\"id\": \"d\", \"path\": \"other.csv\"}, ", "datasets[1].id",
         "used twice"},
        {"\"analyses\": [ {", "\"analyses\": [ {\"id\": \"a\", \"dataset\": \"d\"}, {", "analyses[1].id", "used twice"},
    };
    for (const Case& c : cases) {
        SCOPED_TRACE(c.to);
        const std::string text = replaced(kSmallProject, c.from, c.to);
        const std::string message = input_error_of([&] { project_from_json(text, "refs.moderato"); });
        EXPECT_TRUE(contains(message, "refs.moderato: " + c.path + ":")) << message;
        EXPECT_TRUE(contains(message, c.expected)) << message;
    }
    // Two figures with one id.
    const std::string figures =
        replaced(kSmallProject, "\"analyses\": [",
                 "\"figures\": [{\"id\": \"f\", \"analysis\": \"a\"}, {\"id\": \"f\", \"analysis\": \"a\"}], "
                 "\"analyses\": [");
    const std::string message = input_error_of([&] { project_from_json(figures, "refs.moderato"); });
    EXPECT_TRUE(contains(message, "figures[1].id")) << message;
}

// ---------------------------------------------------------------- atomic writes

namespace {
std::vector<std::string> names_in(const fs::path& dir) {
    std::vector<std::string> out;
    for (const auto& e : fs::directory_iterator(dir)) out.push_back(e.path().filename().string());
    std::sort(out.begin(), out.end());
    return out;
}
}  // namespace

TEST(AtomicWrite, WritesAndReplaces) {
    TempDir dir("project");
    const std::string file = dir / "project.moderato";
    write_file_atomically(file, "first");
    EXPECT_EQ(read_file(file), "first");
    write_file_atomically(file, std::string("second\0with a NUL", 17));
    EXPECT_EQ(read_file(file), std::string("second\0with a NUL", 17));
    write_file_atomically(file, "");
    EXPECT_EQ(read_file(file), "");
    EXPECT_EQ(names_in(dir.path()), std::vector<std::string>{"project.moderato"});  // no temporary left
    // A new file gets the usual permissions of a new file (umask applied);
    // a replaced file keeps its own.
    const mode_t mask = ::umask(0);
    ::umask(mask);
    const std::string fresh = dir / "fresh.moderato";
    write_file_atomically(fresh, "x");
    EXPECT_EQ(static_cast<mode_t>(fs::status(fresh).permissions()), 0666 & ~mask);
    fs::permissions(file, fs::perms::owner_read | fs::perms::owner_write);
    write_file_atomically(file, "private");
    EXPECT_EQ(fs::status(file).permissions(), fs::perms::owner_read | fs::perms::owner_write);
    EXPECT_EQ(read_file(file), "private");
}

TEST(AtomicWrite, ThroughASymlinkReplacesTheLinkedFile) {
    TempDir dir("project");
    const std::string real = dir / "real.moderato", link = dir / "link.moderato";
    write_file(real, "old");
    fs::create_symlink(real, link);
    write_file_atomically(link, "new");
    EXPECT_TRUE(fs::is_symlink(link));
    EXPECT_EQ(read_file(real), "new");
}

TEST(AtomicWrite, TargetIsAFolder) {
    TempDir dir("project");
    const fs::path folder = dir.path() / "taken.moderato";
    write_file(folder / "inside.txt", "keep me");
    const auto before = snapshot_folder(dir.path());
    const std::string message = input_error_of([&] { write_file_atomically(folder.string(), "new content"); });
    EXPECT_TRUE(contains(message, folder.string())) << message;
    EXPECT_TRUE(before == snapshot_folder(dir.path())) << "the folder changed or a temporary file was left";
}

TEST(AtomicWrite, FailureHalfwayLeavesTheOldFile) {
    // A file-size limit makes write() fail with EFBIG partway through (this
    // works for root too, where a read-only folder would not stop the write).
    TempDir dir("project");
    const std::string file = dir / "project.moderato";
    const std::string old(3000, 'o');
    write_file(file, old);
    const auto before = snapshot_folder(dir.path());
    rlimit saved{};
    ASSERT_EQ(::getrlimit(RLIMIT_FSIZE, &saved), 0);
    rlimit small = saved;
    small.rlim_cur = 1024;
    const auto old_handler = ::signal(SIGXFSZ, SIG_IGN);
    ASSERT_EQ(::setrlimit(RLIMIT_FSIZE, &small), 0);
    const std::string message = input_error_of([&] { write_file_atomically(file, std::string(100000, 'n')); });
    ::setrlimit(RLIMIT_FSIZE, &saved);
    ::signal(SIGXFSZ, old_handler);
    EXPECT_TRUE(contains(message, file)) << message;
    EXPECT_TRUE(contains(message, "left as it was")) << message;
    EXPECT_EQ(read_file(file), old);
    EXPECT_TRUE(before == snapshot_folder(dir.path())) << "the old file changed or a temporary file was left";
}

TEST(AtomicWrite, ReadOnlyFolder) {
    if (::geteuid() == 0) GTEST_SKIP() << "running as root: a read-only folder does not stop root from writing";
    TempDir dir("project");
    const fs::path folder = dir.path() / "locked";
    const fs::path file = folder / "project.moderato";
    write_file(file, "old bytes");
    fs::permissions(folder, fs::perms::owner_read | fs::perms::owner_exec);
    const auto before = snapshot_folder(dir.path());
    const std::string message = input_error_of([&] { write_file_atomically(file.string(), "new"); });
    EXPECT_TRUE(contains(message, file.string())) << message;
    EXPECT_TRUE(before == snapshot_folder(dir.path()));
    fs::permissions(folder, fs::perms::owner_all);
}

TEST(AtomicWrite, MissingFolderNamesTheFile) {
    TempDir dir("project");
    const std::string file = dir / "no/such/folder/project.moderato";
    const std::string message = input_error_of([&] { write_file_atomically(file, "x"); });
    EXPECT_TRUE(contains(message, file)) << message;
}

// A writer killed between creating its temporary file and renaming it leaves
// that file behind; the next write into the folder removes it. The kill is
// real: this test runs itself as a child (posix_spawn of /proc/self/exe, so
// nothing runs between fork and exec) whose file-size limit makes the kernel
// end it with SIGXFSZ in the middle of write() (POSIX default action).
TEST(AtomicWrite, TemporaryFileOfAKilledWriterGoesOnTheNextWrite) {
    if (const char* target = std::getenv("MODERATO_TEST_KILLED_WRITER")) {
        rlimit small{4096, 4096}, no_core{0, 0};
        ::setrlimit(RLIMIT_CORE, &no_core);
        ::signal(SIGXFSZ, SIG_DFL);
        ::setrlimit(RLIMIT_FSIZE, &small);
        write_file_atomically(target, std::string(1 << 20, 'n'));
        std::_Exit(3);  // not reached: the write is killed
    }
    TempDir dir("project");
    const std::string file = dir / "project.moderato";
    write_file(file, "old complete bytes");
    const std::string self = fs::read_symlink("/proc/self/exe").string();
    const std::string env = "MODERATO_TEST_KILLED_WRITER=" + file;
    const std::string filter = "--gtest_filter=AtomicWrite.TemporaryFileOfAKilledWriterGoesOnTheNextWrite";
    char* argv[] = {const_cast<char*>(self.c_str()), const_cast<char*>(filter.c_str()), nullptr};
    char* envp[] = {const_cast<char*>(env.c_str()), nullptr};
    pid_t child = 0;
    ASSERT_EQ(::posix_spawn(&child, self.c_str(), nullptr, nullptr, argv, envp), 0);
    int status = 0;
    ASSERT_EQ(::waitpid(child, &status, 0), child);
    ASSERT_TRUE(WIFSIGNALED(status) && WTERMSIG(status) == SIGXFSZ) << "child status " << status;
    EXPECT_EQ(read_file(file), "old complete bytes") << "the target is the old complete file";
    const std::vector<std::string> after_kill = names_in(dir.path());
    ASSERT_EQ(after_kill.size(), 2u) << "the killed writer left its temporary file";
    EXPECT_EQ(after_kill[0].rfind(".project.moderato.tmp-" + std::to_string(child) + "-", 0), 0u) << after_kill[0];

    // Files that are not a dead writer's temporary stay: pid 1 always runs,
    // and names of other shapes are not ours.
    for (const char* keep : {".other.tmp-1-77", "notes.tmp-99999999-1", ".x.tmp-abc", ".y.tmp-12-"})
        write_file(dir / keep, "keep");
    write_file_atomically(file, "new complete bytes");
    EXPECT_EQ(read_file(file), "new complete bytes");
    const std::vector<std::string> expected{".other.tmp-1-77", ".x.tmp-abc", ".y.tmp-12-", "notes.tmp-99999999-1",
                                            "project.moderato"};
    EXPECT_EQ(names_in(dir.path()), expected);
}

// Only plain files are ours: a folder or a symbolic link with the name of a
// dead writer's temporary file is someone else's and stays (and the file the
// link points to is untouched).
TEST(AtomicWrite, StaleTemporaryNamesCountOnlyForPlainFiles) {
    pid_t dead = 0;
    char* argv[] = {const_cast<char*>("/bin/true"), nullptr};
    ASSERT_EQ(::posix_spawn(&dead, "/bin/true", nullptr, nullptr, argv, nullptr), 0);
    ASSERT_EQ(::waitpid(dead, nullptr, 0), dead);  // reaped: no such process any more
    const std::string d = std::to_string(dead);
    TempDir dir("project");
    write_file(dir / "data.csv", "a,b\n1,2\n");
    write_file(dir / (".p.moderato.tmp-" + d + "-1"), "left by a killed save");
    fs::create_directory(dir / (".folder.tmp-" + d + "-2"));
    fs::create_symlink(dir / "data.csv", dir / (".link.tmp-" + d + "-3"));
    EXPECT_EQ(remove_stale_temp_files(dir.path().string()), 1);
    const std::vector<std::string> expected{".folder.tmp-" + d + "-2", ".link.tmp-" + d + "-3", "data.csv"};
    EXPECT_EQ(names_in(dir.path()), expected);
    EXPECT_EQ(read_file(dir / "data.csv"), "a,b\n1,2\n");
}

// ---------------------------------------------------------------- paths

TEST(ProjectPaths, RelativeInsideOrBesideTheProjectElseAbsolute) {
    EXPECT_EQ(relative_data_path("/a/b/data.csv", "/a/b/p.moderato"), "data.csv");
    EXPECT_EQ(relative_data_path("/a/b/sub/data.csv", "/a/b/p.moderato"), "sub/data.csv");
    EXPECT_EQ(relative_data_path("/a/shared/data.csv", "/a/b/p.moderato"), "../shared/data.csv");
    EXPECT_EQ(relative_data_path("/x/y/z/data.csv", "/a/b/p.moderato"), "/x/y/z/data.csv");
    DataSource s;
    s.path = "../shared/data.csv";
    EXPECT_EQ(resolve_data_path(s, "/a/b/p.moderato"), "/a/shared/data.csv");
    s.path = "/x/y/data.csv";
    EXPECT_EQ(resolve_data_path(s, "/a/b/p.moderato"), "/x/y/data.csv");
}

// ---------------------------------------------------------------- loading

namespace {

// A project folder: study/study.moderato with its data in study/data/ and one
// file in a sibling folder shared/, both named relative to the project.
struct StudyFolder {
    TempDir dir{"project"};
    std::string project, survey, extra;
    StudyFolder() {
        project = dir / "study/study.moderato";
        survey = dir / "study/data/survey.csv";
        extra = dir / "shared/extra.csv";
        write_file(survey, "y,x,z\n1.5,2,3\n2.5,3,1\n4.0,5,9\n3.25,1,4\n");
        write_file(extra, "a;b\n1;x\n2;y\n");
        Project p;
        DataSource s;
        s.id = "survey";
        s.path = "data/survey.csv";
        s.sha256 = sha256_file(survey);
        DataSource e;
        e.id = "extra";
        e.path = "../shared/extra.csv";
        e.sha256 = sha256_file(extra);
        e.import.delimiter = ';';
        p.datasets = {s, e};
        p.derived.push_back({"survey", "log_x", RecipeKind::Log, "x", "", "", 0});
        Analysis a;
        a.id = "main";
        a.name = "x by z";
        a.dataset = "survey";
        a.roles.outcome = "y";
        a.roles.focal = "x";
        a.roles.moderator = "z";
        p.analyses.push_back(a);
        write_project_file(p, project);
    }
};

}  // namespace

TEST(LoadProject, DataPathsAreRelativeToTheProject) {
    StudyFolder study;
    const auto before = snapshot_folder(study.dir.path());
    const LoadedProject loaded = load_project(study.project);
    EXPECT_TRUE(loaded.warnings.empty());
    ASSERT_TRUE(loaded.tables.count("survey"));
    const Table& survey = *loaded.tables.at("survey");
    EXPECT_EQ(survey.rows(), 4u);
    ASSERT_TRUE(survey.find("log_x"));
    EXPECT_DOUBLE_EQ(survey.find("log_x")->numbers[2], std::log(5.0));  // closed form
    EXPECT_EQ(loaded.base.at("survey")->cols(), 3u);
    const Table& extra = *loaded.tables.at("extra");
    EXPECT_EQ(extra.rows(), 2u);
    EXPECT_EQ(extra.find("b")->kind, ColumnKind::Categorical);
    // A dataset without derived columns shares its table (no copy).
    EXPECT_EQ(loaded.tables.at("extra"), loaded.base.at("extra"));
    // The hashes as read now, against coreutils sha256sum.
    const std::string tool = run_command("sha256sum '" + study.survey + "'");
    if (tool.size() >= 64) {
        EXPECT_EQ(loaded.sha256.at("survey"), tool.substr(0, 64));  // coreutils sha256sum
    }
    EXPECT_TRUE(before == snapshot_folder(study.dir.path())) << "opening a project wrote something";
}

TEST(LoadProject, ChangedDataFileWarnsAndStillLoads) {
    StudyFolder study;
    std::string bytes = read_file(study.survey);
    const auto at = bytes.find("4.0");
    ASSERT_NE(at, std::string::npos);
    bytes[at] = '6';  // one byte: 4.0 -> 6.0
    write_file(study.survey, bytes);
    const auto before = snapshot_folder(study.dir.path());
    const LoadedProject loaded = load_project(study.project);
    ASSERT_EQ(loaded.warnings.size(), 1u);
    EXPECT_TRUE(contains(loaded.warnings[0], "changed since the project was saved")) << loaded.warnings[0];
    EXPECT_TRUE(contains(loaded.warnings[0], "survey.csv")) << loaded.warnings[0];
    EXPECT_TRUE(contains(loaded.warnings[0], "'survey'")) << loaded.warnings[0];
    EXPECT_EQ(loaded.tables.at("survey")->find("y")->numbers[2], 6.0);  // the file as it is now
    EXPECT_EQ(loaded.sha256.at("survey"), sha256_hex(bytes));
    EXPECT_NE(loaded.sha256.at("survey"), loaded.project.dataset("survey")->sha256);
    EXPECT_TRUE(before == snapshot_folder(study.dir.path())) << "opening a project wrote something";
}

TEST(LoadProject, VanishedDataFileIsAnErrorNamingDatasetAndPath) {
    StudyFolder study;
    fs::remove(study.extra);
    const auto before = snapshot_folder(study.dir.path());
    const std::string message = input_error_of([&] { load_project(study.project); });
    EXPECT_TRUE(contains(message, "'extra'")) << message;
    EXPECT_TRUE(contains(message, fs::path(study.extra).lexically_normal().string())) << message;
    EXPECT_TRUE(contains(message, "../shared/extra.csv")) << message;
    EXPECT_TRUE(contains(message, study.project)) << message;
    EXPECT_TRUE(before == snapshot_folder(study.dir.path())) << "a failed open wrote something";
}

TEST(LoadProject, MissingDataFileSaysWhatTheProjectRecordsAndWhereItLooked) {
    StudyFolder study;
    fs::remove(study.survey);
    try {
        load_project(study.project);
        ADD_FAILURE() << "a missing data file was not refused";
    } catch (const MissingDataFile& e) {
        EXPECT_EQ(e.dataset, "survey");
        EXPECT_EQ(e.recorded, "data/survey.csv");  // as StudyFolder wrote it
        EXPECT_EQ(fs::path(e.looked_at).lexically_normal(), fs::path(study.survey).lexically_normal());
        EXPECT_TRUE(contains(e.what(), "\"data/survey.csv\"")) << e.what();
        EXPECT_TRUE(contains(e.what(), e.looked_at)) << e.what();
    }
}

TEST(LoadProject, MovedDataFileIsReadFromWhereTheUserFoundIt) {
    StudyFolder study;
    const std::string moved = study.dir / "elsewhere/survey.csv";
    fs::create_directories(fs::path(moved).parent_path());
    fs::rename(study.survey, moved);
    const LoadedProject same = load_project(study.project, {}, {{"survey", moved}});
    EXPECT_TRUE(same.warnings.empty());  // same bytes: the recorded SHA-256 matches
    EXPECT_EQ(same.tables.at("survey")->rows(), 4u);
    EXPECT_EQ(same.project.dataset("survey")->path, "data/survey.csv");  // the project itself is not changed here

    std::string bytes = read_file(moved);
    bytes[bytes.find("4.0")] = '6';
    write_file(moved, bytes);
    const auto before = snapshot_folder(study.dir.path());
    const LoadedProject other = load_project(study.project, {}, {{"survey", moved}});
    ASSERT_EQ(other.warnings.size(), 1u);
    // One wording for a changed data file, shared with the renderer.
    const std::string expected =
        changed_data_text(moved, "survey", sha256_hex(bytes), same.project.dataset("survey")->sha256);
    EXPECT_TRUE(contains(other.warnings[0], expected)) << other.warnings[0];
    EXPECT_EQ(other.tables.at("survey")->find("y")->numbers[2], 6.0);  // the file as it is now
    EXPECT_TRUE(before == snapshot_folder(study.dir.path())) << "opening a project wrote something";
}

TEST(LoadProject, FailingRecipeIsReportedAndTheDataStillLoad) {
    StudyFolder study;
    Project p = read_project_file(study.project);
    p.derived.push_back({"survey", "log_neg", RecipeKind::CentreValue, "x", "", "", 10});
    p.derived.push_back({"survey", "bad_log", RecipeKind::Log, "log_neg", "", "", 0});
    write_project_file(p, study.project);
    const auto before = snapshot_folder(study.dir.path());
    const LoadedProject loaded = load_project(study.project);
    ASSERT_TRUE(loaded.table_errors.count("survey"));
    EXPECT_TRUE(contains(loaded.table_errors.at("survey"), "bad_log")) << loaded.table_errors.at("survey");
    EXPECT_EQ(loaded.tables.at("survey")->rows(), 4u);
    ASSERT_EQ(loaded.warnings.size(), 1u);
    EXPECT_TRUE(before == snapshot_folder(study.dir.path()));
}

TEST(LoadProject, CorruptAndNewerProjectsWriteNothing) {
    StudyFolder study;
    const std::string text = read_file(study.project);
    write_file(study.project, text.substr(0, text.size() / 2));
    auto before = snapshot_folder(study.dir.path());
    std::string message = input_error_of([&] { load_project(study.project); });
    EXPECT_TRUE(contains(message, study.project)) << message;
    EXPECT_TRUE(contains(message, "line ")) << message;
    EXPECT_TRUE(before == snapshot_folder(study.dir.path()));

    write_file(study.project, replaced(text, "\"schema_version\": 2", "\"schema_version\": 3"));
    before = snapshot_folder(study.dir.path());
    message = input_error_of([&] { load_project(study.project); });
    EXPECT_TRUE(contains(message, "newer")) << message;
    EXPECT_TRUE(before == snapshot_folder(study.dir.path()));
}

// ---------------------------------------------------------------- analysis runs

namespace {

// Invented data with a known structure; the checks below derive their
// expected values independently (normal equations, the same core fit with a
// hand-built specification, or the closed form of centring).
Table study_table(std::size_t n = 240) {
    std::mt19937_64 random(97);
    std::normal_distribution<double> normal(0.0, 1.0);
    std::vector<double> y, x, z, c, w, wt, d;
    std::vector<std::string> g, site;
    for (std::size_t i = 0; i < n; ++i) {
        const double xi = 3 + normal(random), zi = 10 + 2 * normal(random), ci = normal(random);
        const double wi = normal(random);
        x.push_back(xi);
        z.push_back(zi);
        // A few missing controls: the model uses fewer rows than the table has.
        c.push_back(i % 37 == 5 ? kNaN : ci);
        w.push_back(wi);
        wt.push_back(0.5 + (i % 4) * 0.25);
        d.push_back(i % 3 == 0 ? 1.0 : 0.0);
        g.push_back(i % 3 == 0 ? "north" : i % 3 == 1 ? "south" : "west");
        site.push_back("s" + std::to_string(i % 12));
        y.push_back(1 + 0.8 * xi - 0.3 * zi + 0.12 * xi * zi + 0.5 * ci + 0.2 * wi + normal(random));
    }
    using test::numeric_column;
    return test::make_table(
        {numeric_column("y", y), numeric_column("x", x), numeric_column("z", z), numeric_column("c", c),
         numeric_column("w", w), numeric_column("wt", wt), numeric_column("d", d), test::categorical_column("g", g),
         test::categorical_column("site", site)},
        "study.csv");
}

Analysis study_analysis() {
    Analysis a;
    a.id = "a1";
    a.name = "x by z";
    a.dataset = "study";
    a.roles.outcome = "y";
    a.roles.focal = "x";
    a.roles.moderator = "z";
    a.roles.controls = {"c"};
    return a;
}

}  // namespace

TEST(RunAnalysis, RolesGiveTheModelOfAHandBuiltSpecification) {
    const auto table = std::make_shared<const Table>(study_table());
    Analysis a = study_analysis();
    a.se = SeKind::HC3;
    a.level = 0.9;
    const AnalysisRun run = run_analysis(table, a);
    EXPECT_EQ(run.kind, ProbeKind::Continuous);
    ModelSpec spec;
    spec.outcome = "y";
    spec.predictors = {"x", "z", "c"};
    spec.interactions = {{"x", "z"}};
    spec.se = SeKind::HC3;
    spec.level = 0.9;
    const FitResult direct = fit_model(*table, spec);
    ASSERT_EQ(run.fit.coefficients.size(), direct.coefficients.size());
    for (std::size_t i = 0; i < direct.coefficients.size(); ++i) {
        EXPECT_EQ(run.fit.coefficients[i].term, direct.coefficients[i].term);
        EXPECT_DOUBLE_EQ(run.fit.coefficients[i].estimate, direct.coefficients[i].estimate);
        EXPECT_DOUBLE_EQ(run.fit.coefficients[i].std_error, direct.coefficients[i].std_error);
        EXPECT_DOUBLE_EQ(run.fit.coefficients[i].ci_lower, direct.coefficients[i].ci_lower);
    }
    EXPECT_EQ(run.fit.se, SeKind::HC3);
    EXPECT_DOUBLE_EQ(run.fit.level, 0.9);

    // And the estimates solve the normal equations X'X b = X'y over the
    // complete rows (closed form), X = [1, x, z, c, x z].
    const Table& t = *table;
    std::vector<std::size_t> rows;
    for (std::size_t r = 0; r < t.rows(); ++r)
        if (!std::isnan(t.find("c")->numbers[r])) rows.push_back(r);
    Eigen::MatrixXd X(rows.size(), 5);
    Eigen::VectorXd y(rows.size());
    for (std::size_t k = 0; k < rows.size(); ++k) {
        const double x = t.find("x")->numbers[rows[k]], z = t.find("z")->numbers[rows[k]];
        X.row(k) << 1, x, z, t.find("c")->numbers[rows[k]], x * z;
        y[k] = t.find("y")->numbers[rows[k]];
    }
    const Eigen::VectorXd b = (X.transpose() * X).ldlt().solve(X.transpose() * y);
    EXPECT_EQ(run.fit.n, rows.size());
    for (int k = 0; k < 5; ++k) EXPECT_NEAR(run.fit.beta[k], b[k], 1e-8 * (1 + std::abs(b[k]))) << k;
}

TEST(RunAnalysis, SecondModeratorWeightsAndClustersReachTheModel) {
    const auto table = std::make_shared<const Table>(study_table());
    Analysis a = study_analysis();
    a.roles.second_moderator = "w";
    a.roles.weights = "wt";
    a.roles.clusters = "site";
    a.se = SeKind::Cluster;
    const AnalysisRun run = run_analysis(table, a);
    ModelSpec spec;
    spec.outcome = "y";
    spec.predictors = {"x", "z", "w", "c"};
    spec.interactions = {{"x", "z", "w"}};
    spec.weights = "wt";
    spec.cluster = "site";
    spec.se = SeKind::Cluster;
    const FitResult direct = fit_model(*table, spec);
    ASSERT_EQ(run.fit.beta.size(), direct.beta.size());
    for (Eigen::Index i = 0; i < direct.beta.size(); ++i) EXPECT_DOUBLE_EQ(run.fit.beta[i], direct.beta[i]);
    for (Eigen::Index i = 0; i < direct.beta.size(); ++i)
        EXPECT_DOUBLE_EQ(run.fit.covariance(i, i), direct.covariance(i, i));
    EXPECT_EQ(run.fit.n_clusters, 12);
    EXPECT_FALSE(run.surface.has_value());  // a second moderator: no single surface
}

TEST(RunAnalysis, ColumnThatNoLongerExistsNamesAnalysisRoleAndColumn) {
    const auto table = std::make_shared<const Table>(study_table());
    struct Case {
        std::string role, column;
        std::function<void(Analysis&)> set;
    };
    const std::vector<Case> cases{
        {"Outcome", "sales", [](Analysis& a) { a.roles.outcome = "sales"; }},
        {"Focal predictor", "price", [](Analysis& a) { a.roles.focal = "price"; }},
        {"Moderator", "loyal", [](Analysis& a) { a.roles.moderator = "loyal"; }},
        {"Second moderator", "season", [](Analysis& a) { a.roles.second_moderator = "season"; }},
        {"Controls", "tenure", [](Analysis& a) { a.roles.controls.push_back("tenure"); }},
        {"Weights", "weight_v2", [](Analysis& a) { a.roles.weights = "weight_v2"; }},
        {"Clusters", "store", [](Analysis& a) { a.roles.clusters = "store"; }},
        {"Exposure", "open_hours", [](Analysis& a) { a.roles.exposure = "open_hours"; }},
    };
    for (const Case& c : cases) {
        SCOPED_TRACE(c.role);
        Analysis a = study_analysis();
        a.name = "weekly spend model";
        c.set(a);
        const std::string message = input_error_of([&] { run_analysis(table, a); });
        EXPECT_TRUE(contains(message, "'weekly spend model'")) << message;
        EXPECT_TRUE(contains(message, c.role)) << message;
        EXPECT_TRUE(contains(message, "'" + c.column + "'")) << message;
        EXPECT_TRUE(contains(message, "study.csv")) << message;
    }
    Analysis a = study_analysis();
    a.roles.moderator.clear();
    EXPECT_TRUE(contains(input_error_of([&] { run_analysis(table, a); }), "Moderator"));
    a = study_analysis();
    a.se = SeKind::Cluster;
    EXPECT_TRUE(contains(input_error_of([&] { run_analysis(table, a); }), "Clusters"));
    EXPECT_TRUE(contains(input_error_of([&] { run_analysis(nullptr, study_analysis()); }), "not loaded"));
}

TEST(RunAnalysis, ProbeKindOfEachSampleProject) {
    // From each sample's design (README of sample-projects): binary moderator,
    // continuous x continuous, 2 x 2 cells, three-level moderator, logistic.
    const fs::path samples = moderato::test::samples_dir();
    const std::vector<std::pair<std::string, ProbeKind>> expected{{"coffee-discount", ProbeKind::Groups},
                                                                  {"orchard-nitrogen", ProbeKind::Continuous},
                                                                  {"volunteer-onboarding", ProbeKind::Cells},
                                                                  {"helpdesk-staffing", ProbeKind::Groups},
                                                                  {"trial-conversion", ProbeKind::Continuous}};
    for (const auto& [name, kind] : expected) {
        SCOPED_TRACE(name);
        const fs::path file = samples / name / (name + ".moderato");
        ASSERT_TRUE(fs::exists(file)) << file;
        const LoadedProject loaded = load_project(file.string());
        EXPECT_TRUE(loaded.warnings.empty());
        ASSERT_FALSE(loaded.project.analyses.empty());
        const Analysis& a = loaded.project.analyses.front();
        EXPECT_EQ(probe_kind(*loaded.tables.at(a.dataset), a), kind);
        const AnalysisRun run = run_analysis(loaded.tables.at(a.dataset), a);
        EXPECT_EQ(run.kind, kind);
        EXPECT_EQ(run.cells.has_value(), kind == ProbeKind::Cells);
        EXPECT_EQ(run.probe.has_value(), kind != ProbeKind::Cells);
        EXPECT_FALSE(run.cautions.empty());
    }
}

TEST(RunAnalysis, ProbeKindFromColumnKinds) {
    const Table t = study_table();
    Analysis a = study_analysis();
    a.roles.moderator = "d";  // 0/1
    EXPECT_EQ(probe_kind(t, a), ProbeKind::Groups);
    a.roles.moderator = "g";  // categorical
    EXPECT_EQ(probe_kind(t, a), ProbeKind::Groups);
    a.roles.focal = "d";
    EXPECT_EQ(probe_kind(t, a), ProbeKind::Cells);
    a.roles.focal = "g";
    a.roles.moderator = "z";
    EXPECT_TRUE(contains(input_error_of([&] { probe_kind(t, a); }), "swap"));
}

TEST(RunAnalysis, SameModelAndSameProbe) {
    const Analysis a = study_analysis();
    // View settings: the same probe.
    for (const auto& change : std::vector<std::function<void(Analysis&)>>{
             [](Analysis& b) { b.name = "renamed"; },
             [](Analysis& b) { b.probe.current = 11.5; },
             [](Analysis& b) { b.probe.simultaneous_band = true; },
             [](Analysis& b) { b.probe.show_points = false; },
             [](Analysis& b) { b.figure.dpi = 150; },
         }) {
        Analysis b = a;
        change(b);
        EXPECT_TRUE(same_model(a, b));
        EXPECT_TRUE(same_probe(a, b));
    }
    // Probe settings: the same model, another probe.
    for (const auto& change : std::vector<std::function<void(Analysis&)>>{
             [](Analysis& b) {
                 b.probe.pinned = {9, 11};
             },
             [](Analysis& b) { b.probe.second_value = 0.5; },
             [](Analysis& b) { b.probe.scale = ProbeScale::Outcome; },
             [](Analysis& b) { b.probe.averaging = Averaging::AtValues; },
         }) {
        Analysis b = a;
        change(b);
        EXPECT_TRUE(same_model(a, b));
        EXPECT_FALSE(same_probe(a, b));
    }
    // Model settings: another model.
    for (const auto& change : std::vector<std::function<void(Analysis&)>>{
             [](Analysis& b) { b.dataset = "other"; },
             [](Analysis& b) { b.roles.controls.clear(); },
             [](Analysis& b) { b.roles.weights = "wt"; },
             [](Analysis& b) { b.family = Family::Logistic; },
             [](Analysis& b) { b.se = SeKind::HC1; },
             [](Analysis& b) { b.level = 0.99; },
             [](Analysis& b) { b.centring = Centring::Mean; },
         }) {
        Analysis b = a;
        change(b);
        EXPECT_FALSE(same_model(a, b));
        EXPECT_FALSE(same_probe(a, b));
    }
    // NaN (the mean) equals NaN.
    Analysis b = a;
    b.probe.second_value = kNaN;
    EXPECT_TRUE(same_probe(a, b));
}

TEST(RunAnalysis, ProbeOnlyRerunReusesTheFit) {
    const auto table = std::make_shared<const Table>(study_table());
    Analysis a = study_analysis();
    AnalysisRun run = run_analysis(table, a);
    ASSERT_TRUE(run.probe);
    a.probe.pinned = {8.5, 12.25};
    probe_analysis(run, a);
    ASSERT_TRUE(run.probe);
    // The pins join the three default values, in order of value.
    ASSERT_EQ(run.probe->effects.size(), 5u);
    // Conditional effect b1 + b3 m (closed form for a two-way product).
    const double b1 = run.fit.beta[run.design.column_index("x")];
    const double b3 = run.fit.beta[run.design.product_columns().front()];
    int found = 0;
    for (std::size_t k = 0; k < run.probe->effects.size(); ++k) {
        const EffectPoint& e = run.probe->effects[k];
        if (k > 0) {
            EXPECT_LT(run.probe->effects[k - 1].moderator_value, e.moderator_value);
        }
        EXPECT_NEAR(e.estimate, b1 + b3 * e.moderator_value, 1e-10);
        found += e.moderator_value == 8.5 || e.moderator_value == 12.25;
    }
    EXPECT_EQ(found, 2);
}

TEST(RunAnalysis, MeanCentringMatchesTheClosedForm) {
    const auto table = std::make_shared<const Table>(study_table());
    Analysis a = study_analysis();
    const AnalysisRun raw = run_analysis(table, a);
    EXPECT_FALSE(raw.centred_fit.has_value());
    a.centring = Centring::Mean;
    const AnalysisRun run = run_analysis(table, a);
    ASSERT_TRUE(run.centred_fit.has_value());
    // The means over the rows the model uses (the control c is missing in some rows).
    const Table& t = *table;
    double sx = 0, sz = 0;
    std::size_t n = 0;
    for (std::size_t r = 0; r < t.rows(); ++r) {
        if (std::isnan(t.find("c")->numbers[r])) continue;
        sx += t.find("x")->numbers[r];
        sz += t.find("z")->numbers[r];
        ++n;
    }
    const double mx = sx / static_cast<double>(n), mz = sz / static_cast<double>(n);
    ASSERT_LT(n, t.rows());
    EXPECT_NEAR(run.centres.at("x"), mx, 1e-12 * std::abs(mx));
    EXPECT_NEAR(run.centres.at("z"), mz, 1e-12 * std::abs(mz));
    // Closed form: y = b0 + b1 x + b2 z + b3 x z + ... rewritten in x - mx, z - mz
    // has product coefficient b3, focal coefficient b1 + b3 mz (the conditional
    // effect of x at the moderator mean) and moderator coefficient b2 + b3 mx.
    const FitResult& c = *run.centred_fit;
    const auto coef = [](const FitResult& f, const std::string& term) {
        const int k = f.index_of(term);
        EXPECT_GE(k, 0) << term;
        return k >= 0 ? f.coefficients[static_cast<std::size_t>(k)].estimate : kNaN;
    };
    const double b1 = coef(raw.fit, "x"), b2 = coef(raw.fit, "z"), b3 = coef(raw.fit, "x×z");
    const double tol = 1e-9;
    EXPECT_NEAR(coef(c, "x_centred×z_centred"), b3, tol);
    EXPECT_NEAR(coef(c, "x_centred"), b1 + b3 * mz, tol);
    EXPECT_NEAR(coef(c, "z_centred"), b2 + b3 * mx, tol);
    EXPECT_NEAR(coef(c, "c"), coef(raw.fit, "c"), tol);
    // The same fit: residual sum of squares and the probe are unchanged.
    EXPECT_NEAR(c.rss, raw.fit.rss, 1e-9 * raw.fit.rss);
    ASSERT_TRUE(run.probe && raw.probe);
    EXPECT_NEAR(run.probe->effect_function.effect(mz), b1 + b3 * mz, 1e-9);
    // 0/1 and categorical roles are not centred.
    a.roles.moderator = "d";
    const AnalysisRun groups = run_analysis(table, a);
    EXPECT_EQ(groups.centres.count("d"), 0u);
    EXPECT_EQ(groups.centres.count("x"), 1u);
}

TEST(ApplyRecipes, AddsColumnsInOrderAndNamesTheFailingRecipe) {
    const Table t = study_table(20);
    const std::vector<DerivedRecipe> recipes{{"study", "xc", RecipeKind::CentreValue, "x", "", "", 3},
                                             {"study", "xz", RecipeKind::Product, "xc", "z", "", 0},
                                             {"study", "north", RecipeKind::Dummy, "g", "", "north", 0}};
    const Table out = apply_recipes(t, recipes);
    ASSERT_EQ(out.cols(), t.cols() + 3);
    for (std::size_t r = 0; r < t.rows(); ++r) {
        const double x = t.find("x")->numbers[r], z = t.find("z")->numbers[r];
        EXPECT_DOUBLE_EQ(out.find("xc")->numbers[r], x - 3);               // closed form
        EXPECT_DOUBLE_EQ(out.find("xz")->numbers[r], (x - 3) * z);         // closed form
        EXPECT_EQ(out.find("north")->numbers[r], r % 3 == 0 ? 1.0 : 0.0);  // by construction of g
    }
    const std::string message = input_error_of([&] {
        apply_recipes(t, {{"study", "lz", RecipeKind::Log, "missing_col", "", "", 0}});
    });
    EXPECT_TRUE(contains(message, "'lz'")) << message;
    EXPECT_TRUE(contains(message, "'missing_col'")) << message;
    const std::string twice = input_error_of([&] {
        apply_recipes(t, {{"study", "x", RecipeKind::Square, "z", "", "", 0}});
    });
    EXPECT_TRUE(contains(twice, "already has a column")) << twice;
}

// The reference level chosen for an analysis reaches the model and the probe;
// one chosen for a column that has left the model is kept but not used.
// Expected: the slopes of a re-referenced model are the same numbers in a
// new order, and a pair's difference changes sign with its order (algebra).
TEST(RunAnalysis, ChosenReferenceLevelOrdersTheGroupsAndTheirPairs) {
    const fs::path csv = moderato::test::reference_fixture_dir("contrasts_ols4.json") / "contrasts_ols4.csv";
    CsvOptions o;
    o.column_kinds["channel"] = ColumnKind::Categorical;
    o.column_kinds["team"] = ColumnKind::Categorical;
    const auto table = std::make_shared<const Table>(read_csv(csv.string(), o));
    Analysis a;
    a.id = "queue";
    a.name = "queue";
    a.dataset = "queue";
    a.roles.outcome = "wait";
    a.roles.focal = "tenure";
    a.roles.moderator = "channel";
    a.probe.adjustment = Adjustment::None;
    const AnalysisRun first = run_analysis(table, a);  // reference: "chat", first in text order
    a.reference_levels = {{"channel", "visit"}, {"team", "T07"}};
    const AnalysisRun chosen = run_analysis(table, a);
    ASSERT_TRUE(first.probe && chosen.probe);
    ASSERT_EQ(chosen.probe->effects.size(), 4u);
    EXPECT_EQ(first.probe->effects[0].level, "chat");
    EXPECT_EQ(chosen.probe->effects[0].level, "visit");
    EXPECT_EQ(chosen.probe->effects[1].level, "chat");
    EXPECT_NEAR(chosen.probe->effects[0].estimate, first.probe->effects[3].estimate, 1e-10);
    // (chat, visit) before; (visit, chat) now: the same difference, negated
    const auto find = [](const ProbeResult& r, const std::string& a1, const std::string& b1) {
        for (const auto& c : r.slope_contrasts)
            if (c.first == a1 && c.second == b1) return c;
        ADD_FAILURE() << a1 << " " << b1;
        return SlopeContrast{};
    };
    const SlopeContrast before = find(*first.probe, "chat", "visit"), after = find(*chosen.probe, "visit", "chat");
    EXPECT_NEAR(after.estimate, -before.estimate, 1e-10);
    EXPECT_NEAR(after.std_error, before.std_error, 1e-10);
    EXPECT_EQ(after.p_adjusted, after.p_value);  // adjustment none
    EXPECT_EQ(chosen.spec.reference_levels.count("team"), 0u);
}
