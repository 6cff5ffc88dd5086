// Project files as hostile input: every JSON number, nesting depth, size,
// type and text problem is an InputError naming the file, the place (line
// and column, or the JSON path) and what was expected; nothing a file can
// hold ends in another exception. Stated rules: the house rule "bad input is
// a clear error naming the file and where", JSON (RFC 8259) for what is text,
// and the IEEE 754 double range (about ±1.8e308). Expected places are counted
// by construction from the texts below.
#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <limits>
#include <string>

#include "common/input_error.hpp"
#include "common/temp_dir.hpp"
#include "moderato/project/analysis_run.hpp"
#include "moderato/project/project.hpp"

namespace {

using namespace moderato;
using moderato::test::input_error_of;

bool contains(const std::string& text, const std::string& part) { return text.find(part) != std::string::npos; }

// A valid schema-2 project with one dataset "d" and one analysis "a";
// `analysis_extra` and `import_extra` are spliced into those objects.
std::string project_text(const std::string& analysis_extra = "", const std::string& import_extra = "",
                         const std::string& derived = "[]") {
    return "{\"schema_version\": 2,\n"
           "\"datasets\": [{\"id\": \"d\", \"path\": \"d.csv\", \"import\": {\"header\": true" +
           import_extra +
           "}}],\n"
           "\"derived_columns\": " +
           derived +
           ",\n"
           "\"analyses\": [{\"id\": \"a\", \"dataset\": \"d\"" +
           analysis_extra + "}]}\n";
}

TEST(ProjectInput, TheBaseTextReads) {
    // Guard for the cases below: without the spliced defect the text is a project.
    const Project p = project_from_json(project_text(), "base.moderato");
    ASSERT_EQ(p.analyses.size(), 1u);
    EXPECT_EQ(p.analyses[0].id, "a");
}

TEST(ProjectInput, NumberTooLargeNamesTheJsonPath) {
    // 1e999 is beyond the largest double (IEEE 754): the message names the
    // file, the line and column where the number starts, and the JSON path.
    const std::string text = project_text(", \"probe\": {\"pinned\": [1,\n 2, 1e999]}");
    const std::string m = input_error_of([&] { project_from_json(text, "big.moderato"); });
    EXPECT_TRUE(contains(m, "big.moderato: line 5, column 5 (at analyses[0].probe.pinned[2])")) << m;
    EXPECT_TRUE(contains(m, "1e999 is too large")) << m;

    const std::string level = project_text(", \"level\": -2e400");
    const std::string lm = input_error_of([&] { project_from_json(level, "level.moderato"); });
    EXPECT_TRUE(contains(lm, "(at analyses[0].level)")) << lm;
    EXPECT_TRUE(contains(lm, "-2e400")) << lm;
}

TEST(ProjectInput, SyntaxErrorsNameTheJsonPathToo) {
    // The stray ']' stands where the value of "import"."header" is expected.
    const std::string text = "{\"datasets\": [{\"id\": \"d\", \"import\": {\"header\": ]}}]}";
    const std::string m = input_error_of([&] { project_from_json(text, "syntax.moderato"); });
    EXPECT_TRUE(contains(m, "syntax.moderato: line 1, column 48 (at datasets[0].import.header)")) << m;
    EXPECT_TRUE(contains(m, "not valid JSON")) << m;
}

TEST(ProjectInput, DeepNestingIsRefusedBeforeParsing) {
    // 100,000 '[' would take the parser, the copies and the destructor deep
    // into recursion; the depth is bounded (64 levels) before parsing. The
    // '{' is level 1, so the 64th '[' (line 2, column 64) opens level 65.
    const std::string deep = "{\"memo_notes\":\n[" + std::string(99999, '[') + std::string(100000, ']') + "}";
    const std::string m = input_error_of([&] { project_from_json(deep, "deep.moderato"); });
    EXPECT_TRUE(contains(m, "deep.moderato: line 2, column 64")) << m;
    EXPECT_TRUE(contains(m, "nest more than 64 levels")) << m;

    // Brackets inside strings are text, not nesting.
    const std::string notes = "\"memo_notes\": \"" + std::string(1000, '[') + "\"";
    EXPECT_EQ(project_from_json(project_text(", " + notes), "text.moderato").analyses[0].memo_notes,
              std::string(1000, '['));
    // An escaped quote does not end the string early.
    const std::string escaped = "\"memo_notes\": \"\\\"" + std::string(100, '{') + "\"";
    EXPECT_NO_THROW(project_from_json(project_text(", " + escaped), "escaped.moderato"));
}

TEST(ProjectInput, WrongTypesInImportOptionsNameThePath) {
    struct Case {
        std::string extra, path, expected;
    };
    const Case cases[] = {
        {", \"delimiter\": 44", "datasets[0].import.delimiter", "expected text"},
        {", \"delimiter\": \";;\"", "datasets[0].import.delimiter", "expected one character"},
        {", \"missing_tokens\": [\"NA\", 0]", "datasets[0].import.missing_tokens[1]", "expected text"},
        {", \"missing_tokens\": \"NA\"", "datasets[0].import.missing_tokens", "expected a list"},
        {", \"decimal_comma\": 1", "datasets[0].import.decimal_comma", "expected true or false"},
        {", \"column_kinds\": {\"x\": \"text\"}", "datasets[0].import.column_kinds.x", "expected \"numeric\" or"},
        {", \"column_kinds\": [1]", "datasets[0].import.column_kinds", "expected an object"},
        {", \"text_as_missing\": \"x\"", "datasets[0].import.text_as_missing", "expected a list"},
        {", \"text_as_missing\": [\"x\", 2]", "datasets[0].import.text_as_missing[1]", "expected text"},
        {", \"column_kinds\": {\"x\": \"categorical\"}, \"text_as_missing\": [\"x\"]",
         "datasets[0].import.text_as_missing", "'x' is also in column_kinds as categorical"},
        // What the CSV reader refuses (csv.hpp) is refused here, with the project's path.
        {", \"delimiter\": \"\\\"\"", "datasets[0].import.delimiter", "cannot be a quote or a line break"},
        {", \"delimiter\": \"\\n\"", "datasets[0].import.delimiter", "cannot be a quote or a line break"},
        {", \"delimiter\": \",\", \"decimal_comma\": true", "datasets[0].import.delimiter", "cannot be ','"},
    };
    for (const auto& c : cases) {
        const std::string m = input_error_of([&] { project_from_json(project_text("", c.extra), "imp.moderato"); });
        EXPECT_TRUE(contains(m, "imp.moderato: " + c.path + ": " + c.expected)) << c.extra << " -> " << m;
    }
}

TEST(ProjectInput, RecipesFigurePresetsAndNotesOfTheWrongKind) {
    struct Case {
        std::string analysis, derived, path, expected;
    };
    const std::string recipe = R"({"dataset": "d", "name": "n", "kind": "centre-value", "source": "x", "value": )";
    const Case cases[] = {
        {"", "[" + recipe + "\"ten\"}]", "derived_columns[0].value", "expected a number"},
        {"", "[" + recipe + "1, \"level\": [1]}]", "derived_columns[0].level", "expected text"},
        {"", R"([{"dataset": "d", "name": "n", "kind": "cube", "source": "x"}])", "derived_columns[0].kind",
         "\"cube\" is not one of"},
        {"", "[7]", "derived_columns[0]", "expected an object"},
        // Figure presets: a size, a resolution and a font far outside what is drawn.
        {", \"figure\": {\"dpi\": 1e300}", "[]", "analyses[0].figure.dpi", "must lie between 72 and 1200"},
        {", \"figure\": {\"dpi\": -1e300}", "[]", "analyses[0].figure.dpi", "must lie between 72 and 1200"},
        {", \"figure\": {\"dpi\": 300.5}", "[]", "analyses[0].figure.dpi", "expected a whole number"},
        {", \"figure\": {\"width_in\": -3}", "[]", "analyses[0].figure", "width and height must lie between"},
        {", \"figure\": {\"font_pt\": 1e308}", "[]", "analyses[0].figure.font_pt", "must lie between"},
        {", \"figure\": {\"preset\": 2}", "[]", "analyses[0].figure.preset", "expected text"},
        {", \"figure\": {\"font_family\": {}}", "[]", "analyses[0].figure.font_family", "expected text"},
        {", \"memo_notes\": 12", "[]", "analyses[0].memo_notes", "expected text"},
        {", \"memo_notes\": [\"a\"]", "[]", "analyses[0].memo_notes", "expected text"},
        {", \"level\": 18446744073709551615", "[]", "analyses[0].level", "must lie strictly between 0 and 1"},
        // The straight-line check: bins, bandwidth, replicates and seed (ProbeSettings in project.hpp).
        {", \"probe\": {\"bins\": 1}", "[]", "analyses[0].probe.bins", "must lie between 2 and 50 bins"},
        {", \"probe\": {\"bins\": 2.5}", "[]", "analyses[0].probe.bins", "expected a whole number"},
        {", \"probe\": {\"bins\": \"3\"}", "[]", "analyses[0].probe.bins", "expected a number"},
        {", \"probe\": {\"binned_estimates\": 1}", "[]", "analyses[0].probe.binned_estimates",
         "expected true or false"},
        {", \"probe\": {\"smooth_bandwidth\": 0}", "[]", "analyses[0].probe.smooth_bandwidth",
         "must be a positive number"},
        {", \"probe\": {\"smooth_bandwidth\": -2}", "[]", "analyses[0].probe.smooth_bandwidth",
         "must be a positive number"},
        {", \"probe\": {\"smooth_replicates\": 50}", "[]", "analyses[0].probe.smooth_replicates",
         "must be 0 (no band) or between 100 and 100,000"},
        {", \"probe\": {\"smooth_replicates\": -1}", "[]", "analyses[0].probe.smooth_replicates",
         "must be 0 (no band) or between 100 and 100,000"},
        {", \"probe\": {\"smooth_seed\": -3}", "[]", "analyses[0].probe.smooth_seed", "expected a whole number"},
        {", \"probe\": {\"smooth_seed\": 1.5}", "[]", "analyses[0].probe.smooth_seed", "expected a whole number"},
    };
    for (const auto& c : cases) {
        const std::string m =
            input_error_of([&] { project_from_json(project_text(c.analysis, "", c.derived), "k.moderato"); });
        EXPECT_TRUE(contains(m, "k.moderato: " + c.path + ": " + c.expected)) << c.analysis << c.derived << " -> " << m;
    }
}

TEST(ProjectInput, NulCharactersInTextAreRefused) {
    // JSON may spell a NUL as \u0000 (RFC 8259); no name, path or setting of
    // ours may hold one (file paths and other programs would cut the text there).
    const std::string cases[][2] = {
        {", \"roles\": {\"outcome\": \"y\\u0000z\"}", "analyses[0].roles.outcome"},
        {", \"memo_notes\": \"a\\u0000\"", "analyses[0].memo_notes"},
        {", \"roles\": {\"controls\": [\"c\", \"\\u0000\"]}", "analyses[0].roles.controls[1]"},
        {", \"figure\": {\"font_family\": \"\\u0000\"}", "analyses[0].figure.font_family"},
    };
    for (const auto& c : cases) {
        const std::string m = input_error_of([&] { project_from_json(project_text(c[0]), "nul.moderato"); });
        EXPECT_TRUE(contains(m, "nul.moderato: " + c[1] + ": contains a NUL character")) << c[0] << " -> " << m;
    }
    const std::string key = input_error_of(
        [&] { project_from_json(project_text("", ", \"column_kinds\": {\"a\\u0000\": \"numeric\"}"), "k.moderato"); });
    EXPECT_TRUE(contains(key, "datasets[0].import.column_kinds: contains a NUL character")) << key;
}

TEST(ProjectInput, AFileFarLargerThanAnyProjectIsRefusedUnread) {
    // A sparse 65 MB file (64 MB is the bound): refused by its size, so the
    // check takes no time and no memory.
    moderato::test::TempDir tmp{"project-input"};
    const std::string path = (tmp.path() / "huge.moderato").string();
    std::ofstream(path) << "{";
    std::filesystem::resize_file(path, std::uintmax_t{65} << 20);
    const std::string m = input_error_of([&] { read_project_file(path); });
    EXPECT_TRUE(contains(m, path + ": 65 MB is too large for a Moderato project")) << m;
}

TEST(ProjectInput, TextThatIsNotUtf8IsWrittenNotThrown) {
    // A name with bytes that are not UTF-8 (only a caller bypassing the
    // readers could make one) is written with U+FFFD and reads back.
    Project p = project_from_json(project_text(), "p.moderato");
    p.analyses[0].name = "caf\xE9";
    const std::string text = project_to_json(p);
    EXPECT_EQ(project_from_json(text, "p.moderato").analyses[0].name, "caf\xEF\xBF\xBD");
}

TEST(ProjectInput, RecipesWithExtremeValuesStayInputErrorsOrNumbers) {
    // Regression seeds of fuzz_recipe: centring at the largest double, a
    // product of a column with itself and a dummy of a level that does not
    // occur give numbers (possibly infinite) or an InputError, nothing else.
    Table t;
    Column x;
    x.name = "x";
    x.numbers = {1.0, -1e308, std::numeric_limits<double>::quiet_NaN()};
    t.columns.push_back(x);
    DerivedRecipe c{"d", "c", RecipeKind::CentreValue, "x", "", "", 1.7976931348623157e308};
    DerivedRecipe q{"d", "q", RecipeKind::Square, "x", "", "", 0};
    DerivedRecipe p{"d", "p", RecipeKind::Product, "x", "x", "", 0};
    const Table out = apply_recipes(t, {c, q, p});
    ASSERT_EQ(out.columns.size(), 4u);
    EXPECT_TRUE(std::isinf(out.columns[2].numbers[1]));  // (-1e308)² overflows to +inf (IEEE 754)
    EXPECT_TRUE(std::isnan(out.columns[3].numbers[2]));  // missing stays missing (derive.hpp)
    DerivedRecipe d{"d", "dd", RecipeKind::Dummy, "x", "", "a", 0};
    EXPECT_TRUE(contains(input_error_of([&] { apply_recipes(t, {d}); }), "derived column 'dd'"));
}

}  // namespace
