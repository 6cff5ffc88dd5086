#include "model_options.hpp"

#include <algorithm>
#include <cctype>
#include <cstdio>

#include "moderato/reading/csv_columns.hpp"
#include "moderato/reading/derive.hpp"
#include "moderato/reading/postgres_source.hpp"
#include "moderato/reporting/output_json.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/report_text.hpp"
#include "password_prompt.hpp"

namespace moderato::cli {

namespace {

std::pair<std::string, std::string> split_pair(const std::string& text, const std::string& option,
                                               const std::string& what) {
    const auto eq = text.find('=');
    if (eq == std::string::npos || eq == 0 || eq + 1 == text.size())
        throw InputError("option --" + option + " needs COLUMN=" + what + ", got '" + text + "'");
    return {text.substr(0, eq), text.substr(eq + 1)};
}

void replace_column(Table& t, Column c, const std::string& name) {
    c.name = name;
    *t.find(name) = std::move(c);
}

// Replace every "*" with the product sign used in term labels.
std::string product_sign(std::string s) {
    std::string out;
    for (char c : s) {
        if (c == '*') out += "×";
        else out += c;
    }
    return out;
}

}  // namespace

std::set<std::string> repeatable_options() {
    return {"missing",   "categorical", "numeric",     "text-missing", "interaction", "poly",
            "reference", "centre",      "standardise", "log",          "log1p",       "test"};
}

std::set<std::string> import_flags() { return {"no-header", "decimal-comma"}; }
std::set<std::string> import_valued() {
    return {"data",         "delimiter", "missing", "categorical", "numeric",
            "text-missing", "threads",   "sheet",   "table",       "query"};
}
std::set<std::string> model_flags() {
    auto s = import_flags();
    s.insert("no-intercept");
    s.insert("group-effects");
    return s;
}
std::set<std::string> model_valued() {
    auto s = import_valued();
    for (const char* o :
         {"outcome", "predictors",    "interaction", "poly",     "family",        "se",          "cluster",
          "weights", "level",         "reference",   "exposure", "centre",        "standardise", "log",
          "log1p",   "test",          "format",      "groups",   "random-slopes", "estimation",  "random-covariance",
          "df",      "centre-within", "group-means"})
        s.insert(o);
    return s;
}

JsonWriter begin_output(const Arguments& args, const ModelSpec& spec) {
    JsonWriter w = begin_document();
    w.field("moderato_version", MODERATO_VERSION);
    w.field("data", args.required("data"));
    w.field("outcome", spec.outcome);
    return w;
}

std::string output_format(const Arguments& args) {
    const std::string f = args.get("format").value_or("text");
    if (f != "json" && f != "text") throw InputError("option --format must be json or text, got '" + f + "'");
    return f;
}

CsvOptions csv_options(const Arguments& args) {
    CsvOptions o;
    if (auto d = args.get("delimiter")) {
        if (*d == "comma" || *d == ",") o.delimiter = ',';
        else if (*d == "semicolon" || *d == ";") o.delimiter = ';';
        else if (*d == "tab" || *d == "\\t" || *d == "\t") o.delimiter = '\t';
        else if (*d == "pipe" || *d == "|") o.delimiter = '|';
        else throw InputError("option --delimiter must be comma, semicolon, tab or pipe, got '" + *d + "'");
    }
    o.header = !args.has("no-header");
    o.decimal_comma = args.has("decimal-comma");
    for (const auto& list : args.all("missing"))
        for (const auto& t : split_list(list, "missing")) o.missing_tokens.push_back(t);
    for (const auto& list : args.all("categorical"))
        for (const auto& c : split_list(list, "categorical")) o.column_kinds[c] = ColumnKind::Categorical;
    for (const auto& list : args.all("numeric"))
        for (const auto& c : split_list(list, "numeric")) o.column_kinds[c] = ColumnKind::Numeric;
    for (const auto& list : args.all("text-missing"))
        for (const auto& c : split_list(list, "text-missing")) o.text_as_missing.insert(c);
    if (auto t = args.get("threads")) o.threads = static_cast<unsigned>(parse_integer(*t, "threads", 1, 256));
    return o;
}

SourceSpec source_spec(const Arguments& args) {
    return parse_source(args.required("data"), args.get("sheet").value_or(""), args.get("table").value_or(""),
                        args.get("query").value_or(""));
}

Table load_table(const Arguments& args) {
    const SourceSpec source = source_spec(args);
    if (source.kind == SourceKind::PostgreSQL)
        return read_postgres(source, csv_options(args), {}, typed_password(source.location));
    return read_source(source, csv_options(args));
}

namespace {

// --centre COL[=mean|median|VALUE], repeatable.
void apply_centring(const Arguments& args, LoadedModel& m) {
    Table& t = m.table;
    for (const auto& item : args.all("centre")) {
        std::string col = item, how = "mean";
        if (auto eq = item.find('='); eq != std::string::npos) {
            col = item.substr(0, eq);
            how = item.substr(eq + 1);
        }
        const Column& c = t.at(col);
        CentreAt at = CentreAt::Mean;
        double value = 0;
        if (how == "median") at = CentreAt::Median;
        else if (how != "mean") {
            at = CentreAt::Value;
            value = parse_double(how, "centre");
        }
        const double used = centre_value(c, at, value);
        replace_column(t, centre(c, at, value, col), col);
        m.notes.push_back(col + " is centred at " +
                          (at == CentreAt::Mean     ? "its mean "
                           : at == CentreAt::Median ? "its median "
                                                    : "") +
                          format_sig(used));
    }
}

// Column transforms, applied in place (the file is never touched):
// --centre, then --standardise, --log and --log1p.
void apply_transforms(const Arguments& args, LoadedModel& m) {
    Table& t = m.table;
    apply_centring(args, m);
    for (const auto& list : args.all("standardise"))
        for (const auto& col : split_list(list, "standardise")) {
            replace_column(t, standardise(t.at(col), col), col);
            m.notes.push_back(col + " is standardised (mean 0, SD 1)");
        }
    for (const auto& list : args.all("log"))
        for (const auto& col : split_list(list, "log")) {
            replace_column(t, log_column(t.at(col), t, col), col);
            m.notes.push_back(col + " is replaced by its natural logarithm");
        }
    for (const auto& list : args.all("log1p"))
        for (const auto& col : split_list(list, "log1p")) {
            replace_column(t, log1p_column(t.at(col), t, col), col);
            m.notes.push_back(col + " is replaced by log(1 + " + col + ")");
        }
}

// --outcome, --predictors, --interaction, --poly, --no-intercept.
void read_terms(const Arguments& args, ModelSpec& s) {
    s.outcome = args.required("outcome");
    if (auto p = args.get("predictors")) s.predictors = split_list(*p, "predictors");
    for (const auto& i : args.all("interaction")) s.interactions.push_back(split_list(i, "interaction"));
    for (const auto& item : args.all("poly")) {
        auto [col, deg] = split_pair(item, "poly", "DEGREE");
        s.polynomial[col] = static_cast<int>(parse_integer(deg, "poly", 1, 12));
    }
    if (s.predictors.empty() && s.interactions.empty() && s.polynomial.empty())
        throw InputError("no predictors: give --predictors, --interaction or --poly");
    s.intercept = !args.has("no-intercept");
}

// --family, --exposure, --cluster, --weights, --se, --level.
void read_estimation(const Arguments& args, ModelSpec& s) {
    if (auto f = args.get("family")) s.family = parse_family(*f);
    if (auto e = args.get("exposure")) s.exposure = *e;
    if (auto c = args.get("cluster")) s.cluster = *c;
    if (auto w = args.get("weights")) s.weights = *w;
    if (auto se_text = args.get("se")) {
        std::string se = *se_text;
        for (char& c : se) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
        s.se = parse_se_kind(se);
        if (!s.cluster.empty() && s.se != SeKind::Cluster)
            throw InputError("--se " + se + " and --cluster " + s.cluster +
                             " ask for two kinds of standard error; choose one");
    } else if (!s.cluster.empty()) {
        s.se = SeKind::Cluster;
    }
    if (auto l = args.get("level")) {
        s.level = parse_double(*l, "level");
        if (!(s.level > 0 && s.level < 1))
            throw InputError("option --level must be between 0 and 1 (e.g. 0.95), got '" + *l + "'");
    }
}

// --reference, --test, --threads.
void read_extras(const Arguments& args, ModelSpec& s) {
    for (const auto& item : args.all("reference")) {
        auto [col, level] = split_pair(item, "reference", "LEVEL");
        s.reference_levels[col] = level;
    }
    for (const auto& list : args.all("test")) {
        std::vector<std::string> terms;
        for (const auto& term : split_list(list, "test")) terms.push_back(product_sign(term));
        s.wald_tests.push_back(terms);
    }
    if (auto th = args.get("threads")) s.threads = static_cast<unsigned>(parse_integer(*th, "threads", 1, 256));
}

// --groups, --random-slopes, --estimation, --random-covariance, --df,
// --centre-within, --group-means, --group-effects.
void read_multilevel(const Arguments& args, ModelSpec& s) {
    MultilevelSpec& ml = s.multilevel;
    if (auto g = args.get("groups")) ml.groups = *g;
    if (auto r = args.get("random-slopes")) ml.random_slopes = split_list(*r, "random-slopes");
    if (auto e = args.get("estimation")) ml.estimation = parse_mixed_estimation(*e);
    if (auto c = args.get("random-covariance")) ml.covariance = parse_random_covariance(*c);
    if (auto d = args.get("df")) ml.df = parse_fixed_effect_df(*d);
    if (auto c = args.get("centre-within")) ml.centre_within = split_list(*c, "centre-within");
    if (auto m = args.get("group-means")) ml.group_means = split_list(*m, "group-means");
    ml.group_effects = args.has("group-effects");
    if (ml.active()) return;
    for (const char* o : {"random-slopes", "estimation", "random-covariance", "df", "centre-within", "group-means"})
        if (args.get(o))
            throw InputError(std::string("option --") + o +
                             " belongs to a multilevel model; name its grouping column with --groups");
    if (ml.group_effects)
        throw InputError(
            "option --group-effects belongs to a multilevel model; name its grouping column with --groups");
}

}  // namespace

ModelSpec read_spec(const Arguments& args) {
    ModelSpec spec;
    read_terms(args, spec);
    read_estimation(args, spec);
    read_extras(args, spec);
    read_multilevel(args, spec);
    return spec;
}

namespace {

// Every column the specification and the column transforms name.
std::vector<std::string> named_columns(const Arguments& args, const ModelSpec& s) {
    std::vector<std::string> names{s.outcome, s.weights, s.cluster, s.exposure, s.multilevel.groups};
    names.insert(names.end(), s.predictors.begin(), s.predictors.end());
    for (const auto& i : s.interactions) names.insert(names.end(), i.begin(), i.end());
    for (const auto& [c, degree] : s.polynomial) names.push_back(c);
    for (const auto& [c, level] : s.reference_levels) names.push_back(c);
    for (const auto* list : {&s.multilevel.random_slopes, &s.multilevel.centre_within, &s.multilevel.group_means})
        names.insert(names.end(), list->begin(), list->end());
    for (const auto& item : args.all("centre")) names.push_back(item.substr(0, item.find('=')));
    for (const char* option : {"standardise", "log", "log1p"})
        for (const auto& list : args.all(option))
            for (const auto& c : split_list(list, option)) names.push_back(c);
    std::erase(names, std::string());
    return names;
}

}  // namespace

LoadedModel load_model(const Arguments& args, bool named_only) {
    LoadedModel m;
    m.table = named_only && source_spec(args).kind == SourceKind::TextFile
                  ? read_csv_columns(args.required("data"), csv_options(args), named_columns(args, read_spec(args)))
                  : load_table(args);
    apply_transforms(args, m);
    m.spec = read_spec(args);
    return m;
}

}  // namespace moderato::cli
