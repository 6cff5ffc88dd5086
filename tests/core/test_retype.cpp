// Cells of text among numbers, read honestly: the CSV reader's "text as
// missing" columns, the check that finds a column read as categorical only
// because of a few words, and a column's kind changed after import. Expected
// values come from the construction of each small table (by hand); the rules
// are the ones stated in csv.hpp and retype.hpp (common practice for
// delimited text: a cell is a number when all of it reads as one).
#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "common/input_error.hpp"
#include "moderato/project/project.hpp"
#include "moderato/project/recipes.hpp"
#include "moderato/reading/csv.hpp"
#include "moderato/reading/retype.hpp"

namespace {

using namespace moderato;
using moderato::test::input_error_of;

bool contains(const std::string& text, const std::string& part) { return text.find(part) != std::string::npos; }

// hours: numbers with "twelve" on line 4 and " n/a " on line 7 (NA is a missing token).
const char* kHours =
    "crew,hours,site\n"
    "a,10,north\n"
    "b,12.5,south\n"
    "c,twelve,north\n"
    "d,NA,south\n"
    "e,8,north\n"
    "f, n/a ,south\n"
    "g,+7,north\n";

TEST(TextAsMissing, TextCellsBecomeMissingAndAreCounted) {
    CsvOptions o;
    o.text_as_missing = {"hours"};
    const Table t = read_csv_text(kHours, "hours.csv", o);
    const Column& h = t.at("hours");
    ASSERT_EQ(h.kind, ColumnKind::Numeric);
    EXPECT_TRUE(h.kind_forced);
    ASSERT_EQ(h.numbers.size(), 7u);
    EXPECT_EQ(h.numbers[0], 10.0);
    EXPECT_EQ(h.numbers[1], 12.5);
    EXPECT_TRUE(std::isnan(h.numbers[2]));  // twelve
    EXPECT_TRUE(std::isnan(h.numbers[3]));  // NA, a missing token, not text
    EXPECT_TRUE(std::isnan(h.numbers[5]));  // n/a
    EXPECT_EQ(h.numbers[6], 7.0);
    EXPECT_EQ(h.text_as_missing, 2u);
    ASSERT_EQ(h.text_examples.size(), 2u);
    EXPECT_EQ(h.text_examples[0], (TextCell{4, "twelve"}));
    EXPECT_EQ(h.text_examples[1], (TextCell{7, "n/a"}));  // trimmed, as for numbers
    EXPECT_EQ(t.delimiter, ',');
}

TEST(TextAsMissing, CountsAndFirstCellsDoNotDependOnBlocksOrThreads) {
    // 400 rows; every 7th cell is text: 57 text cells, the first five on lines 2, 9, 16, 23, 30.
    std::string text = "x,y\n";
    for (int i = 0; i < 400; ++i)
        text += (i % 7 == 0 ? "w" + std::to_string(i) : std::to_string(i)) + "," + std::to_string(i % 5) + "\n";
    CsvOptions o;
    o.text_as_missing = {"x"};
    for (const std::size_t block : {std::size_t{64}, std::size_t{257}, std::size_t{1} << 20})
        for (const unsigned threads : {1u, 3u}) {
            o.threads = threads;
            moderato::detail::CsvTuning tuning;
            tuning.block_size = block;
            tuning.min_piece = 16;
            const Table t = moderato::detail::read_csv_text_tuned(text, "w.csv", o, {}, tuning);
            const Column& x = t.at("x");
            EXPECT_EQ(x.text_as_missing, 58u) << block << " " << threads;  // i = 0, 7, ..., 399
            ASSERT_EQ(x.text_examples.size(), kTextExamples);
            for (std::size_t k = 0; k < kTextExamples; ++k) {
                EXPECT_EQ(x.text_examples[k].line, 2 + 7 * k) << block << " " << threads;
                EXPECT_EQ(x.text_examples[k].text, "w" + std::to_string(7 * k));
            }
        }
}

TEST(TextAsMissing, OptionsThatNameNoColumnOrContradictAreRefused) {
    CsvOptions o;
    o.text_as_missing = {"hour"};
    const std::string m = input_error_of([&] { read_csv_text(kHours, "hours.csv", o); });
    EXPECT_TRUE(contains(m, "hours.csv: column 'hour' is set to numbers with text as missing")) << m;
    EXPECT_TRUE(contains(m, "columns are: ")) << m;
    o.text_as_missing = {"hours"};
    o.column_kinds["hours"] = ColumnKind::Categorical;
    const std::string c = input_error_of([&] { read_csv_text(kHours, "hours.csv", o); });
    EXPECT_TRUE(contains(c, "column 'hours' is set to categorical and also to numbers")) << c;
}

TEST(StrayText, FindsTheFewWordsAmongNumbers) {
    std::string text = "hours,zone\n";
    for (int i = 0; i < 30; ++i)
        text += (i == 17 ? std::string("twelve") : std::to_string(i % 9)) + ",z" + std::to_string(i % 3) + "\n";
    const Table t = read_csv_text(text, "h.csv");
    const Column& h = t.at("hours");
    ASSERT_EQ(h.kind, ColumnKind::Categorical);  // the reader's inference
    const StrayText s = stray_text(t, h, false);
    EXPECT_EQ(s.number_cells, 29u);
    EXPECT_EQ(s.text_cells, 1u);
    EXPECT_EQ(s.text_levels, 1u);
    ASSERT_EQ(s.first.size(), 1u);
    EXPECT_EQ(s.first[0], (TextCell{19, "twelve"}));  // row 17, after the header: line 19
    EXPECT_TRUE(mostly_numbers(s));
    // A column of words is not "mostly numbers", nor is a numeric one.
    EXPECT_FALSE(mostly_numbers(stray_text(t, t.at("zone"), false)));
    EXPECT_EQ(stray_text(t, t.at("zone"), false).number_cells, 0u);
    // The threshold: 9 numbers per text cell (retype.hpp), not fewer.
    EXPECT_TRUE(mostly_numbers(StrayText{9, 1, 1, {}}));
    EXPECT_FALSE(mostly_numbers(StrayText{8, 1, 1, {}}));
    EXPECT_FALSE(mostly_numbers(StrayText{30, 0, 0, {}}));
}

TEST(Retype, CategoriesToNumbersFollowTheReadersNumberRules) {
    CsvOptions o;
    o.delimiter = ';';
    o.decimal_comma = true;
    o.column_kinds["v"] = ColumnKind::Categorical;
    const Table t = read_csv_text("v;k\n3,5;a\n\"  -0,25 \";b\nfew;a\n;b\n3,5;a\n", "v.csv", o);
    const Column n = as_numeric(t, t.at("v"), true);
    ASSERT_EQ(n.kind, ColumnKind::Numeric);
    ASSERT_EQ(n.numbers.size(), 5u);
    EXPECT_EQ(n.numbers[0], 3.5);
    EXPECT_EQ(n.numbers[1], -0.25);  // a quoted level is trimmed before reading, as the reader does
    EXPECT_TRUE(std::isnan(n.numbers[2]));
    EXPECT_TRUE(std::isnan(n.numbers[3]));  // missing stays missing
    EXPECT_EQ(n.numbers[4], 3.5);
    EXPECT_EQ(n.text_as_missing, 1u);
    ASSERT_EQ(n.text_examples.size(), 1u);
    EXPECT_EQ(n.text_examples[0], (TextCell{4, "few"}));
    // With the point as the decimal mark, "3,5" is text.
    EXPECT_EQ(as_numeric(t, t.at("v"), false).text_as_missing, 4u);
}

TEST(Retype, NumbersToCategoriesUseTheShortestTextInOrderOfAppearance) {
    const Table t = read_csv_text("g,y\n3.10,1\n12,2\n3.1,3\nNA,4\n-0,5\n0,6\n1e3,7\n", "g.csv");
    const Column c = as_categorical(t.at("g"));
    ASSERT_EQ(c.kind, ColumnKind::Categorical);
    EXPECT_EQ(c.levels, (std::vector<std::string>{"3.1", "12", "0", "1000"}));
    EXPECT_EQ(c.codes, (std::vector<std::int32_t>{0, 1, 0, kMissingCode, 2, 2, 3}));
}

TEST(Retype, TheTableOfADatasetAppliesKindsThenRecipes) {
    const auto read = std::make_shared<const Table>(read_csv_text(kHours, "hours.csv"));
    ASSERT_EQ(read->at("hours").kind, ColumnKind::Categorical);
    DataSource source;
    source.id = "d";
    source.retyped["hours"] = ColumnKind::Numeric;
    DerivedRecipe centre;
    centre.dataset = "d";
    centre.name = "hours_c";
    centre.kind = RecipeKind::CentreMean;
    centre.source = "hours";
    const auto t = dataset_table(read, source, {centre});
    const Column& c = t->at("hours_c");
    // Mean of 10, 12.5, 8, 7 (by hand): 9.375.
    EXPECT_DOUBLE_EQ(c.numbers[0], 10 - 9.375);
    EXPECT_TRUE(std::isnan(c.numbers[2]));
    EXPECT_EQ(t->at("hours").text_as_missing, 2u);
    // Nothing to change: the table as read itself (no copy).
    EXPECT_EQ(dataset_table(read, DataSource{}, {}), read);
    source.retyped = {{"hour", ColumnKind::Numeric}};
    const std::string m = input_error_of([&] { dataset_table(read, source, {}); });
    EXPECT_TRUE(contains(m, "'hour'")) << m;
}

TEST(Retype, KindsChangedAfterImportAreSavedOnlyWhenThereAreSome) {
    Project p;
    DataSource d;
    d.id = "d";
    d.path = "d.csv";
    p.datasets.push_back(d);
    EXPECT_FALSE(contains(project_to_json(p), "retyped"));
    EXPECT_FALSE(contains(project_to_json(p), "text_as_missing"));
    p.datasets[0].retyped["hours"] = ColumnKind::Numeric;
    p.datasets[0].import.text_as_missing = {"wind"};
    const std::string text = project_to_json(p);
    const Project back = project_from_json(text, "p.moderato");
    EXPECT_EQ(back.datasets[0].retyped, p.datasets[0].retyped);
    EXPECT_EQ(back.datasets[0].import.text_as_missing, p.datasets[0].import.text_as_missing);
    EXPECT_TRUE(back == p);
    p.datasets[0].retyped["hours"] = ColumnKind::Categorical;
    EXPECT_FALSE(back == p);
}

}  // namespace
