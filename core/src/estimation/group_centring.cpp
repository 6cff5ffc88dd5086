#include "moderato/estimation/group_centring.hpp"

#include <algorithm>
#include <map>

#include "moderato/support/error.hpp"
#include "moderato/support/report_text.hpp"
#include "support/text_util.hpp"

namespace moderato {

using detail::quoted;

GroupCodes group_codes(const Column& groups) {
    GroupCodes g;
    const std::size_t n = groups.size();
    g.code.assign(n, -1);
    if (groups.kind == ColumnKind::Categorical) {
        std::vector<int> id(groups.levels.size(), -1);
        for (std::size_t r = 0; r < n; ++r) {
            const int c = groups.codes[r];
            if (c < 0) continue;
            if (id[static_cast<std::size_t>(c)] < 0) {
                id[static_cast<std::size_t>(c)] = static_cast<int>(g.names.size());
                g.names.push_back(groups.levels[static_cast<std::size_t>(c)]);
            }
            g.code[r] = id[static_cast<std::size_t>(c)];
        }
        return g;
    }
    std::map<double, int> id;
    for (std::size_t r = 0; r < n; ++r) {
        const double v = groups.numbers[r];
        if (v != v) continue;
        auto [it, fresh] = id.emplace(v, static_cast<int>(id.size()));
        if (fresh) g.names.push_back(exact_text(v));
        g.code[r] = it->second;
    }
    return g;
}

namespace {

bool listed(const std::vector<std::string>& names, const std::string& name) {
    return std::find(names.begin(), names.end(), name) != names.end();
}

// The table columns the model reads (group-means columns are made here).
std::vector<std::string> model_columns(const ModelSpec& spec) {
    std::vector<std::string> names;
    const auto& ml = spec.multilevel;
    auto use = [&](const std::string& name) {
        if (name.empty() || listed(names, name)) return;
        for (const auto& c : ml.group_means)
            if (name == group_mean_name(c)) return;
        names.push_back(name);
    };
    use(spec.outcome);
    for (const auto& p : spec.predictors) use(p);
    for (const auto& i : spec.interactions)
        for (const auto& f : i) use(f);
    for (const auto& [c, degree] : spec.polynomial) use(c);
    use(spec.weights);
    use(ml.groups);
    for (const auto& c : ml.random_slopes) use(c);
    for (const auto& c : ml.centre_within) use(c);
    for (const auto& c : ml.group_means) use(c);
    return names;
}

const Column& numeric_column(const Table& table, const std::string& name, const char* option) {
    const Column& c = table.at(name);
    if (c.kind != ColumnKind::Numeric)
        throw InputError(std::string(option) + " " + quoted(name) +
                         ": the column is categorical; group means are taken of numeric columns only");
    return c;
}

// Each group's mean of `c` over the rows in `use`.
std::vector<double> group_means(const Column& c, const GroupCodes& g, const std::vector<char>& use) {
    std::vector<double> sum(g.names.size(), 0.0), count(g.names.size(), 0.0);
    for (std::size_t r = 0; r < use.size(); ++r)
        if (use[r]) {
            sum[static_cast<std::size_t>(g.code[r])] += c.numbers[r];
            count[static_cast<std::size_t>(g.code[r])] += 1;
        }
    for (std::size_t k = 0; k < sum.size(); ++k) sum[k] = count[k] > 0 ? sum[k] / count[k] : missing_value();
    return sum;
}

Column derived(const Column& c, const GroupCodes& g, const std::vector<char>& use, bool deviation) {
    const std::vector<double> mean = group_means(c, g, use);
    Column out;
    out.kind = ColumnKind::Numeric;
    out.numbers.assign(c.size(), missing_value());
    for (std::size_t r = 0; r < use.size(); ++r)
        if (use[r]) {
            const double m = mean[static_cast<std::size_t>(g.code[r])];
            out.numbers[r] = deviation ? c.numbers[r] - m : m;
        }
    return out;
}

}  // namespace

std::optional<CentredModel> group_centred(const Table& table, const ModelSpec& spec) {
    const auto& ml = spec.multilevel;
    if (ml.centre_within.empty() && ml.group_means.empty()) return std::nullopt;
    if (!ml.active())
        throw InputError("group-mean centring and group means need a grouping column; name one with --groups");
    CentredModel out;
    out.table.source = table.source;
    out.table.row_lines = table.row_lines;
    out.table.delimiter = table.delimiter;
    const std::vector<std::string> names = model_columns(spec);
    for (const auto& name : names) out.table.columns.push_back(table.at(name));
    std::vector<char> use(table.rows(), 1);
    for (const auto& c : out.table.columns)
        for (std::size_t r = 0; r < use.size(); ++r)
            if (c.is_missing(r)) use[r] = 0;
    const GroupCodes g = group_codes(table.at(ml.groups));
    out.spec = spec;
    const std::string by = " by " + quoted(ml.groups);
    for (const auto& name : ml.group_means) {
        Column m = derived(numeric_column(table, name, "group means of"), g, use, false);
        m.name = group_mean_name(name);
        out.table.columns.push_back(std::move(m));
        bool in_model = listed(spec.predictors, group_mean_name(name));
        for (const auto& i : spec.interactions) in_model = in_model || listed(i, group_mean_name(name));
        if (!in_model) out.spec.predictors.push_back(group_mean_name(name));
        out.notes.push_back(group_mean_name(name) + " is the mean of " + name + " in each group" + by +
                            ", a group-level predictor");
    }
    for (const auto& name : ml.centre_within) {
        Column d = derived(numeric_column(table, name, "group-mean centring of"), g, use, true);
        d.name = name;
        *out.table.find(name) = std::move(d);
        out.notes.push_back(name + " is centred within groups" + by + " (each row's value minus its group's mean)");
    }
    out.spec.multilevel.centre_within.clear();
    out.spec.multilevel.group_means.clear();
    return out;
}

}  // namespace moderato
