#include "estimation/in_database_sql.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstdio>

#include "support/text_util.hpp"

namespace moderato::detail {

std::string float8_literal(double v) {
    char buf[40];
    std::snprintf(buf, sizeof buf, "%.17g", v);
    return std::string("'") + buf + "'::float8";
}

namespace {

bool reads_as_number(const std::string& t, double& v) {
    const char* b = t.data();
    const char* e = b + t.size();
    if (b < e && *b == '+') ++b;
    const auto r = std::from_chars(b, e, v);
    return b < e && r.ec == std::errc() && r.ptr == e && std::isfinite(v);
}

// " WHEN <cond> THEN NULL" for the missing tokens of this column.
std::string token_cases(const PgConnection& c, const std::string& ref, PgValue value,
                        const std::vector<std::string>& tokens) {
    std::vector<std::string> numbers, texts;
    for (const auto& t : tokens) {
        double v = 0;
        if (value == PgValue::Number) {
            if (reads_as_number(t, v)) numbers.push_back(float8_literal(v));
        } else {
            texts.push_back(c.literal(t));
        }
    }
    std::string out;
    if (!numbers.empty()) out += " WHEN " + ref + "::float8 IN (" + join(numbers, ", ") + ") THEN NULL";
    if (!texts.empty()) {
        const std::string text = value == PgValue::Boolean ? "CASE WHEN " + ref + " THEN 't' ELSE 'f' END"
                                 : value == PgValue::Text  ? ref + "::text"
                                                           : ref + "::text";
        out += " WHEN btrim(" + text + ", E' \\t') IN (" + join(texts, ", ") + ") THEN NULL";
    }
    return out;
}

}  // namespace

std::string value_expression(const PgConnection& c, const PgColumn& column, const CsvOptions& options) {
    const std::string ref = c.identifier(column.name);
    const ColumnKind kind = target_kind(column, options);
    const std::string tokens = token_cases(c, ref, column.value, options.missing_tokens);
    if (kind == ColumnKind::Categorical)
        return "CASE WHEN " + ref + " IS NULL THEN NULL" + tokens + " ELSE " + ref + "::text END";
    switch (column.value) {
        case PgValue::Number:
            return "CASE WHEN " + ref + " IS NULL THEN NULL WHEN " + ref + "::float8 = 'NaN'::float8 THEN NULL" +
                   tokens + " ELSE " + ref + "::float8 END";
        case PgValue::Boolean:
            return "CASE WHEN " + ref + " IS NULL THEN NULL" + tokens + " WHEN " + ref +
                   " THEN '1'::float8 ELSE '0'::float8 END";
        default: {  // text read as numbers, as read_csv reads them (one leading '+' allowed)
            const std::string t = "btrim(" + ref + "::text, E' \\t')";
            const std::string pattern = "'^\\+?-?([0-9]+\\.?[0-9]*|\\.[0-9]+)([eE][-+]?[0-9]+)?$'";
            const std::string bad =
                options.text_as_missing.count(column.name) ? "NULL" : "ltrim(" + t + ", '+')::float8";
            return "CASE WHEN " + ref + " IS NULL THEN NULL" + tokens + " WHEN " + t + " ~ " + pattern +
                   " THEN ltrim(" + t + ", '+')::float8 ELSE " + bad + " END";
        }
    }
}

std::string complete_value_expression(const PgConnection& c, const PgColumn& column, const CsvOptions& options) {
    const std::string ref = c.identifier(column.name);
    const ColumnKind kind = target_kind(column, options);
    if (kind == ColumnKind::Categorical) return ref + "::text";
    if (column.value == PgValue::Number) return ref + "::float8";
    if (column.value == PgValue::Boolean) return "CASE WHEN " + ref + " THEN '1'::float8 ELSE '0'::float8 END";
    return value_expression(c, column, options);
}

std::string design_expression(const PgConnection& c, const DesignColumn& column,
                              const std::vector<std::string>& names) {
    std::vector<std::string> factors;
    for (const auto& atom : column.atoms) {
        const auto at = std::find(names.begin(), names.end(), atom.column) - names.begin();
        const std::string v = "s" + std::to_string(at);
        if (!atom.level.empty()) {
            factors.push_back("CASE WHEN " + v + " = " + c.literal(atom.level) +
                              " THEN '1'::float8 ELSE '0'::float8 END");
            continue;
        }
        for (int k = 0; k < atom.power; ++k) factors.push_back(v);
    }
    return "(" + join(factors, " * ") + ")";
}

std::string DesignQuery::key_list() const {
    std::string out;
    for (std::size_t i = 0; i < keys.size(); ++i) out += "k" + std::to_string(i) + ", ";
    return out;
}

std::string DesignQuery::group_by(const std::string& more) const {
    std::string list = key_list() + more;
    while (!list.empty() && (list.back() == ' ' || list.back() == ',')) list.pop_back();
    return list.empty() ? std::string() : " GROUP BY " + list;
}

std::string DesignQuery::level0() const {
    std::vector<std::string> items;
    for (std::size_t i = 0; i < values.size(); ++i) items.push_back(values[i] + " AS v" + std::to_string(i));
    for (std::size_t i = 0; i < simple.size(); ++i) items.push_back(simple[i] + " AS s" + std::to_string(i));
    for (std::size_t i = 0; i < keys.size(); ++i) items.push_back(keys[i] + " AS k" + std::to_string(i));
    return "SELECT " + join(items, ", ") + " FROM " + from;
}

std::string DesignQuery::level1(bool complete_only) const {
    std::vector<std::string> items;
    for (std::size_t i = 0; i < values.size(); ++i) items.push_back("v" + std::to_string(i));
    for (std::size_t i = 0; i < simple.size(); ++i) items.push_back("s" + std::to_string(i));
    for (std::size_t i = 0; i < keys.size(); ++i) items.push_back("k" + std::to_string(i));
    for (std::size_t j = 0; j < design.size(); ++j) items.push_back(design[j] + " AS d" + std::to_string(j + 1));
    items.push_back(y + " AS y");
    items.push_back((w.empty() ? std::string("'1'::float8") : w) + " AS w");
    return "SELECT " + join(items, ", ") + " FROM (" + level0() + ") AS l0" +
           (complete_only ? " WHERE " + complete : std::string());
}

}  // namespace moderato::detail
