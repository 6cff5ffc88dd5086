#include "moderato/estimation/design.hpp"

#include "estimation/design_layout.hpp"
#include "estimation/outcome_checks.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <limits>
#include <map>
#include <set>
#include <string_view>
#include <unordered_map>

#include "moderato/estimation/group_centring.hpp"
#include "moderato/reading/column_summary.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/report_text.hpp"
#include "support/parallel.hpp"
#include "support/text_util.hpp"

namespace moderato {

using detail::join;
using detail::quoted;

int Design::column_index(const std::string& label) const {
    for (std::size_t j = 0; j < columns.size(); ++j)
        if (columns[j].label == label) return static_cast<int>(j);
    return -1;
}

int Design::main_column(const std::string& column) const {
    for (std::size_t k = 0; k < columns.size(); ++k)
        if (columns[k].atoms.size() == 1 && columns[k].atoms[0] == Atom{column, "", 1}) return static_cast<int>(k);
    return -1;
}

bool Design::is_binary(const std::string& column) const {
    const int j = main_column(column);
    return j >= 0 && ((X.col(j).array() == 0.0) || (X.col(j).array() == 1.0)).all();
}

double Design::percentile(const std::string& column, double p) const {
    const int j = main_column(column);
    if (j < 0 || X.rows() == 0) return std::numeric_limits<double>::quiet_NaN();
    std::vector<double> sorted(X.col(j).data(), X.col(j).data() + X.rows());
    std::sort(sorted.begin(), sorted.end());
    const double pos = std::clamp(p, 0.0, 100.0) / 100.0 * static_cast<double>(sorted.size() - 1);
    const auto lo = static_cast<std::size_t>(std::floor(pos));
    const std::size_t hi = std::min(lo + 1, sorted.size() - 1);
    return sorted[lo] + (pos - static_cast<double>(lo)) * (sorted[hi] - sorted[lo]);
}

const CategoricalInfo* Design::categorical(const std::string& column) const {
    for (const auto& c : categoricals)
        if (c.column == column) return &c;
    return nullptr;
}

int Design::level_index(const std::string& column, const std::string& level) const {
    const CategoricalInfo* c = categorical(column);
    if (!c) return -1;
    for (std::size_t i = 0; i < c->levels.size(); ++i)
        if (c->levels[i] == level) return static_cast<int>(i);
    return -1;
}

int Design::column_of(const std::vector<Atom>& atoms) const {
    for (std::size_t j = 0; j < columns.size(); ++j) {
        const auto& a = columns[j].atoms;
        if (a.size() == atoms.size() && std::is_permutation(a.begin(), a.end(), atoms.begin()))
            return static_cast<int>(j);
    }
    return -1;
}

std::vector<int> Design::product_columns() const {
    std::vector<int> out;
    for (std::size_t j = 0; j < columns.size(); ++j)
        if (terms[static_cast<std::size_t>(columns[j].term)].factors.size() >= 2) out.push_back(static_cast<int>(j));
    return out;
}

namespace {

bool parse_number(const std::string& s, double& out) {
    const char* b = s.data();
    const char* e = s.data() + s.size();
    auto [ptr, ec] = std::from_chars(b, e, out);
    return ec == std::errc() && ptr == e && std::isfinite(out);
}

std::string factor_label(const std::string& column, int power) {
    return power == 1 ? column : column + "^" + std::to_string(power);
}

}  // namespace

NumericSummary numeric_summary(std::vector<double> values) {
    NumericSummary s;
    const std::size_t n = values.size();
    if (n == 0) return s;
    s.min = std::numeric_limits<double>::infinity();
    s.max = -s.min;
    long double sum = 0;
    for (const double v : values) {
        sum += v;
        s.min = std::min(s.min, v);
        s.max = std::max(s.max, v);
    }
    s.mean = static_cast<double>(sum / static_cast<long double>(n));
    long double ss = 0, cube = 0;
    for (const double v : values) {
        const long double e = v - s.mean;
        ss += e * e;
        cube += e * e * e;
    }
    s.sd = n > 1 ? std::sqrt(static_cast<double>(ss / static_cast<long double>(n - 1))) : 0.0;
    const long double m2 = ss / static_cast<long double>(n), m3 = cube / static_cast<long double>(n);
    s.skew = m2 > 0 ? static_cast<double>(m3 / std::pow(m2, 1.5L)) : 0.0;
    const std::vector<double> q = quantiles_by_selection(values, {0.10, 0.50, 0.90});
    s.p10 = q[0];
    s.p50 = q[1];
    s.p90 = q[2];
    return s;
}

std::string atom_label(const Atom& a) {
    return a.level.empty() ? factor_label(a.column, a.power) : a.column + "=" + a.level;
}

namespace {

std::string term_label(const std::vector<std::pair<std::string, int>>& factors) {
    std::vector<std::string> parts;
    for (const auto& [c, k] : factors) parts.push_back(factor_label(c, k));
    return join(parts, "×");
}

// Canonical key of a term: its factors sorted by column.
std::vector<std::pair<std::string, int>> term_key(std::vector<std::pair<std::string, int>> f) {
    std::sort(f.begin(), f.end());
    return f;
}

struct TermBuilder {
    std::vector<DesignTerm> terms;
    std::map<std::vector<std::pair<std::string, int>>, std::size_t> index;
    int order = 0;
    std::vector<int> first_seen;

    void add(const std::vector<std::pair<std::string, int>>& factors, bool added) {
        auto key = term_key(factors);
        auto it = index.find(key);
        if (it != index.end()) {
            if (!added) terms[it->second].added = false;
            return;
        }
        DesignTerm t;
        t.factors = factors;
        t.label = term_label(factors);
        for (const auto& f : factors) t.degree += f.second;
        t.added = added;
        index.emplace(std::move(key), terms.size());
        terms.push_back(std::move(t));
    }
};

// All lower-order sub-terms of a term (exponent vectors below the full one),
// by degree, then in the order the factors were given.
std::vector<std::vector<std::pair<std::string, int>>> sub_terms(
    const std::vector<std::pair<std::string, int>>& factors) {
    std::vector<std::vector<std::pair<std::string, int>>> out;
    std::vector<int> e(factors.size(), 0);
    while (true) {
        std::size_t i = 0;
        while (i < e.size() && e[i] == factors[i].second) e[i++] = 0;
        if (i == e.size()) break;
        ++e[i];
        std::vector<std::pair<std::string, int>> t;
        bool full = true;
        for (std::size_t k = 0; k < e.size(); ++k) {
            if (e[k] > 0) t.emplace_back(factors[k].first, e[k]);
            if (e[k] != factors[k].second) full = false;
        }
        if (!full) out.push_back(std::move(t));
    }
    auto degree = [](const auto& t) {
        int d = 0;
        for (const auto& f : t) d += f.second;
        return d;
    };
    auto position = [&](const auto& t) {
        // lexicographic by factor positions, so (x,z) precedes (x,w) precedes (z,w)
        std::vector<std::size_t> pos;
        for (const auto& f : t)
            for (std::size_t k = 0; k < factors.size(); ++k)
                if (factors[k].first == f.first) pos.push_back(k);
        return pos;
    };
    std::stable_sort(out.begin(), out.end(), [&](const auto& a, const auto& b) {
        if (degree(a) != degree(b)) return degree(a) < degree(b);
        return position(a) < position(b);
    });
    return out;
}

// The column for a role, or an error that names the role.
const Column& column_for(const Table& table, const std::string& name, const std::string& role) {
    if (const Column* c = table.find(name)) return *c;
    std::vector<std::string> names;
    for (const auto& c : table.columns) names.push_back(c.name);
    throw InputError(role + " column " + quoted(name) + " not found" +
                     (table.source.empty() ? std::string() : " in " + table.source) +
                     "; columns are: " + join(names, ", "));
}

// A hint when text looks like a number written with a decimal comma.
std::string decimal_comma_hint(const std::string& text) {
    bool digit = false, comma = false;
    for (std::size_t i = 0; i < text.size(); ++i) {
        const char c = text[i];
        if (c >= '0' && c <= '9') digit = true;
        else if (c == ',' && !comma && digit) comma = true;
        else if (!(c == '-' && i == 0)) return {};
    }
    return comma && text.back() != ','
               ? "; if the file writes decimals with a comma, read it with the decimal-comma option"
               : std::string();
}

std::string not_numeric(const Table& table, const std::string& role, const Column& c, const std::string& advice) {
    return role + " " + quoted(c.name) + " is not numeric: " + table.line_word() + " " +
           std::to_string(c.first_text_line) + (table.source.empty() ? "" : " of " + table.source) + " holds " +
           quoted(c.first_text) + "; " + advice + decimal_comma_hint(c.first_text);
}

// A column read as categorical only because a few cells hold text, while
// most of its values are numbers, is almost always a data-entry slip.
bool mostly_numbers(const Column& c) {
    if (c.kind != ColumnKind::Categorical || c.kind_forced || c.first_text_line == 0) return false;
    std::size_t numeric = 0;
    double v;
    for (const auto& l : c.levels)
        if (parse_number(l, v)) ++numeric;
    return numeric * 2 > c.levels.size() && c.levels.size() > 2;
}

}  // namespace

std::vector<std::string> sorted_levels(const Column& column) {
    std::vector<std::string> levels = column.levels;
    std::vector<double> values(levels.size());
    bool all_numeric = !levels.empty();
    for (std::size_t i = 0; i < levels.size() && all_numeric; ++i) all_numeric = parse_number(levels[i], values[i]);
    std::vector<std::size_t> idx(levels.size());
    for (std::size_t i = 0; i < idx.size(); ++i) idx[i] = i;
    if (all_numeric) std::stable_sort(idx.begin(), idx.end(), [&](auto a, auto b) { return values[a] < values[b]; });
    else std::stable_sort(idx.begin(), idx.end(), [&](auto a, auto b) { return levels[a] < levels[b]; });
    std::vector<std::string> out;
    for (auto i : idx) out.push_back(levels[i]);
    return out;
}

namespace detail {

// 1. Terms, with the lower-order terms of every product, sorted by degree.
//    `added_notes` says which lower-order terms were added.
std::vector<DesignTerm> model_terms(const Table& table, const ModelSpec& spec, std::vector<std::string>& added_notes) {
    TermBuilder tb;
    for (const auto& name : spec.predictors) {
        if (name == spec.outcome)
            throw InputError("column " + quoted(name) + " is the outcome and cannot also be a predictor");
        column_for(table, name, "predictor");
        tb.add({{name, 1}}, false);
    }
    for (const auto& [name, degree] : spec.polynomial) {
        column_for(table, name, "polynomial");
        if (degree < 1 || degree > 12)
            throw InputError("polynomial degree of " + quoted(name) + " must be between 1 and 12, got " +
                             std::to_string(degree));
        for (int k = 1; k <= degree; ++k) tb.add({{name, k}}, false);
    }
    for (const auto& inter : spec.interactions) {
        if (inter.size() < 2 || inter.size() > 3)
            throw InputError("an interaction needs 2 or 3 columns, got " + std::to_string(inter.size()) + " (" +
                             join(inter, ", ") + ")" +
                             (inter.size() == 1 ? "; a single column is a main effect: list it among the predictors"
                                                : std::string()));
        std::vector<std::pair<std::string, int>> factors;
        for (const auto& name : inter) {
            if (name == spec.outcome)
                throw InputError("column " + quoted(name) + " is the outcome and cannot also be a predictor");
            column_for(table, name, "interaction");
            auto it = std::find_if(factors.begin(), factors.end(), [&](auto& f) { return f.first == name; });
            if (it == factors.end()) factors.emplace_back(name, 1);
            else ++it->second;
        }
        const std::string full = term_label(factors);
        for (const auto& sub : sub_terms(factors)) {
            const bool existed = tb.index.count(term_key(sub)) > 0;
            tb.add(sub, true);
            if (!existed) added_notes.push_back(term_label(sub) + " (of " + full + ")");
        }
        tb.add(factors, false);
    }
    std::stable_sort(tb.terms.begin(), tb.terms.end(),
                     [](const DesignTerm& a, const DesignTerm& b) { return a.degree < b.degree; });
    for (const auto& t : tb.terms)
        for (const auto& [name, power] : t.factors)
            if (power > 1 && table.at(name).kind == ColumnKind::Categorical)
                throw InputError("categorical column " + quoted(name) + " cannot be raised to a power");
    return std::move(tb.terms);
}

// The model's columns: the outcome, every factor of the terms, then the
// weights and cluster columns (each once), with the checks of their kinds.
std::vector<std::string> used_columns(const Table& table, const ModelSpec& spec, const Column& outcome,
                                      const std::vector<DesignTerm>& terms) {
    if (outcome.kind != ColumnKind::Numeric)
        throw InputError(not_numeric(table, "outcome", outcome, "choose a numeric column or fix that cell"));
    for (const auto& t : terms)
        for (const auto& f : t.factors) {
            const Column& c = table.at(f.first);
            if (mostly_numbers(c))
                throw InputError(not_numeric(table, "predictor", c,
                                             "fix that cell, add " + quoted(c.first_text) +
                                                 " to the missing-value tokens, read " + quoted(c.name) +
                                                 " as numbers with its cells of text missing, or set it to "
                                                 "categorical to dummy-code it"));
        }
    std::vector<std::string> used{spec.outcome};
    auto use = [&](const std::string& name) {
        if (std::find(used.begin(), used.end(), name) == used.end()) used.push_back(name);
    };
    for (const auto& t : terms)
        for (const auto& f : t.factors) use(f.first);
    if (!spec.weights.empty()) {
        const Column& weights = column_for(table, spec.weights, "weights");
        if (weights.kind != ColumnKind::Numeric)
            throw InputError(
                not_numeric(table, "weights", weights, "choose a numeric weights column or fix that cell"));
        use(spec.weights);
    }
    detail::check_exposure_column(table, spec);
    if (!spec.exposure.empty()) use(spec.exposure);
    if (spec.se == SeKind::Cluster && spec.cluster.empty())
        throw InputError("cluster-robust standard errors need a cluster column; name one with --cluster");
    if (!spec.cluster.empty()) {
        column_for(table, spec.cluster, "cluster");
        use(spec.cluster);
    }
    if (spec.multilevel.active()) {
        column_for(table, spec.multilevel.groups, "grouping");
        use(spec.multilevel.groups);
    }
    return used;
}

// 2. The rows with a value in every used column (listwise deletion); the
//    exclusions per column go into `d`.
void count_complete(const Table& table, const std::vector<std::string>& used, std::vector<std::size_t>& missing_per,
                    std::vector<std::size_t>& rows) {
    const std::size_t N = table.rows();
    std::vector<const Column*> cols;
    for (const auto& name : used) cols.push_back(&table.at(name));
    missing_per.resize(cols.size(), 0);
    for (std::size_t r = 0; r < N; ++r) {
        bool complete = true;
        for (std::size_t c = 0; c < cols.size(); ++c)
            if (cols[c]->is_missing(r)) {
                ++missing_per[c];
                complete = false;
            }
        if (complete) rows.push_back(r);
    }
}

void record_exclusions(const Table& table, const std::vector<std::string>& used,
                       const std::vector<std::size_t>& missing_per, std::size_t table_rows, std::size_t complete,
                       Design& d) {
    d.n_excluded = table_rows - complete;
    for (std::size_t c = 0; c < used.size(); ++c)
        if (missing_per[c] > 0) d.exclusions.push_back({used[c], missing_per[c]});
    if (complete == 0) {
        std::vector<std::string> why;
        for (const auto& e : d.exclusions) why.push_back(e.column + ": " + std::to_string(e.rows) + " missing");
        throw InputError("no complete rows: every row" +
                         (table.source.empty() ? std::string() : " of " + table.source) +
                         " misses a value of a model column" + (why.empty() ? "" : " (" + join(why, ", ") + ")"));
    }
}

}  // namespace detail

namespace {

using detail::LevelMap;
using detail::LevelsPresent;

std::vector<std::size_t> complete_rows(const Table& table, const std::vector<std::string>& used, Design& d) {
    std::vector<std::size_t> missing_per, rows;
    rows.reserve(table.rows());
    detail::count_complete(table, used, missing_per, rows);
    detail::record_exclusions(table, used, missing_per, table.rows(), rows.size(), d);
    return rows;
}

// The levels of one categorical column among the used rows, reference first
// (the chosen one, else the first in sorted order).
std::vector<std::string> used_levels(const Column& c, const ModelSpec& spec, std::vector<char> present) {
    present.resize(c.levels.size(), 0);
    Column only = c;
    only.levels.clear();
    for (std::size_t i = 0; i < c.levels.size(); ++i)
        if (present[i]) only.levels.push_back(c.levels[i]);
    std::vector<std::string> levels = sorted_levels(only);
    std::string ref = levels.front();
    if (auto it = spec.reference_levels.find(c.name); it != spec.reference_levels.end()) {
        if (std::find(levels.begin(), levels.end(), it->second) == levels.end())
            throw InputError("reference level " + quoted(it->second) + " not found in column " + quoted(c.name) +
                             "; levels are: " + join(levels, ", "));
        ref = it->second;
    }
    if (levels.size() < 2)
        throw InputError("predictor " + quoted(c.name) + " is constant (every used row holds " +
                         quoted(levels.front()) + "); it has no contrast to estimate");
    std::vector<std::string> ordered{ref};
    for (const auto& l : levels)
        if (l != ref) ordered.push_back(l);
    return ordered;
}

}  // namespace

void detail::mark_levels(const Table& table, const std::vector<DesignTerm>& terms, const std::vector<std::size_t>& rows,
                         LevelsPresent& present) {
    for (const auto& t : terms)
        for (const auto& f : t.factors) {
            const Column& c = table.at(f.first);
            if (c.kind != ColumnKind::Categorical) continue;
            std::vector<char>& held = present[f.first];
            if (held.size() < c.levels.size()) held.resize(c.levels.size(), 0);
            for (auto r : rows) held[static_cast<std::size_t>(c.codes[r])] = 1;
        }
}

LevelMap detail::categorical_levels(const Table& table, const ModelSpec& spec, const std::vector<DesignTerm>& terms,
                                    const LevelsPresent& present, Design& d) {
    LevelMap cat_map;
    for (const auto& t : terms)
        for (const auto& f : t.factors) {
            const Column& c = table.at(f.first);
            if (c.kind != ColumnKind::Categorical || cat_map.count(f.first)) continue;
            const auto held = present.find(f.first);
            std::vector<std::string> ordered =
                used_levels(c, spec, held == present.end() ? std::vector<char>() : held->second);
            std::unordered_map<std::string_view, int> position;  // linear in the levels, however many
            for (std::size_t i = 0; i < ordered.size(); ++i) position.emplace(ordered[i], static_cast<int>(i));
            std::vector<int> code_to_level(c.levels.size(), -1);
            for (std::size_t i = 0; i < c.levels.size(); ++i)
                if (const auto it = position.find(c.levels[i]); it != position.end()) code_to_level[i] = it->second;
            d.categoricals.push_back({f.first, ordered, ordered.front()});
            cat_map[f.first] = {ordered, code_to_level};
        }
    for (const auto& [col, lvl] : spec.reference_levels)
        if (!cat_map.count(col)) {
            const Column& c = column_for(table, col, "reference-level");
            if (c.kind != ColumnKind::Categorical)
                throw InputError("reference level given for " + quoted(col) +
                                 ", which is numeric; declare it categorical to dummy-code it");
            throw InputError("reference level given for " + quoted(col) + ", which is not in the model");
        }
    return cat_map;
}

namespace {

// 3. Categorical levels among the used rows (into d.categoricals), and the
//    check that every reference level given belongs to a categorical model column.
LevelMap categorical_levels(const Table& table, const ModelSpec& spec, const std::vector<DesignTerm>& terms,
                            const std::vector<std::size_t>& rows, Design& d) {
    LevelsPresent present;
    detail::mark_levels(table, terms, rows, present);
    return detail::categorical_levels(table, spec, terms, present, d);
}

}  // namespace

// 3b. The size of the design, refused before anything of that size is
//     allocated (DesignLimits says why the limits are where they are).
void detail::check_design_size(const Table& table, const std::vector<DesignTerm>& terms, const LevelMap& cat_map,
                               bool intercept, std::size_t n) {
    double p = intercept ? 1.0 : 0.0;  // double: a product of level counts may not fit an integer
    for (const auto& t : terms) {
        double cols = 1.0;
        for (const auto& f : t.factors)
            if (table.at(f.first).kind == ColumnKind::Categorical)
                cols *= static_cast<double>(cat_map.at(f.first).first.size() - 1);
        p += cols;
    }
    const double cells = p * static_cast<double>(n);
    const bool too_wide = p > static_cast<double>(DesignLimits::max_columns);
    if (!too_wide && cells <= static_cast<double>(DesignLimits::max_cells)) return;
    std::string widest;  // the categorical column with the most levels, the usual cause
    std::size_t most = 0;
    for (const auto& [name, levels] : cat_map)
        if (levels.first.size() > most) most = levels.first.size(), widest = name;
    std::string cause;
    if (!widest.empty())
        cause = "categorical column " + quoted(widest) + " has " + format_count(static_cast<long long>(most)) +
                " levels among the used rows, and each level but the reference is a design column in every term "
                "it enters; ";
    const auto count = [](double v) { return format_count(static_cast<long long>(std::min(v, 9.0e18))); };
    if (too_wide)
        throw InputError(cause + "the model needs " + count(p) + " design columns, over the limit of " +
                         count(DesignLimits::max_columns) +
                         ". Use a column with fewer levels as the moderator (or group its levels)");
    throw InputError(cause + "the design matrix would hold " + count(cells) + " cells (" +
                     count(static_cast<double>(n)) + " rows × " + count(p) + " columns), over the limit of " +
                     count(DesignLimits::max_cells) + " cells. Fit fewer rows or fewer columns");
}

// 4. Design columns: the intercept, then each term expanded over the
//    non-reference levels of its categorical factors.
void detail::design_columns(const Table& table, const std::vector<DesignTerm>& terms, const LevelMap& cat_map,
                            bool intercept, Design& d) {
    if (intercept) {
        d.terms.push_back({"intercept", {}, 0, false, {0}});
        d.columns.push_back({"intercept", {}, 0});
    }
    for (const auto& t : terms) {
        const int ti = static_cast<int>(d.terms.size());
        std::vector<std::vector<Atom>> combos{{}};
        for (const auto& [name, power] : t.factors) {
            std::vector<std::vector<Atom>> next;
            const Column& c = table.at(name);
            if (c.kind == ColumnKind::Numeric) {
                for (auto& combo : combos) {
                    combo.push_back({name, "", power});
                    next.push_back(combo);
                }
            } else {
                const auto& levels = cat_map.at(name).first;
                for (const auto& combo : combos)
                    for (std::size_t l = 1; l < levels.size(); ++l) {
                        auto c2 = combo;
                        c2.push_back({name, levels[l], 1});
                        next.push_back(std::move(c2));
                    }
            }
            combos = std::move(next);
        }
        DesignTerm term = t;
        for (auto& combo : combos) {
            std::vector<std::string> parts;
            for (const auto& a : combo) parts.push_back(atom_label(a));
            term.columns.push_back(static_cast<int>(d.columns.size()));
            d.columns.push_back({join(parts, "×"), combo, ti});
        }
        d.terms.push_back(std::move(term));
    }
    if (d.columns.empty()) throw InputError("the model has no terms: add predictors or keep the intercept");
}

// 5. Numbers: the design matrix over the used rows, one column per task
// once there are enough rows to share (each column is filled as on one thread).
void detail::fill_rows(const Table& table, const LevelMap& cat_map, const std::vector<DesignColumn>& columns,
                       const std::vector<std::size_t>& rows, Eigen::MatrixXd& X) {
    const std::size_t n = rows.size(), p = columns.size();
    detail::parallel_for(p, n >= 32768 ? 0 : 1, [&](std::size_t j) {
        auto col = X.col(static_cast<Eigen::Index>(j));
        col.setOnes();
        for (const auto& a : columns[j].atoms) {
            const Column& c = table.at(a.column);
            if (c.kind == ColumnKind::Numeric) {
                const double* v = c.numbers.data();
                if (a.power == 1)
                    for (std::size_t i = 0; i < n; ++i) col[static_cast<Eigen::Index>(i)] *= v[rows[i]];
                else
                    for (std::size_t i = 0; i < n; ++i)
                        col[static_cast<Eigen::Index>(i)] *= std::pow(v[rows[i]], a.power);
            } else {
                const auto& [levels, code_to_level] = cat_map.at(a.column);
                const int want = static_cast<int>(std::find(levels.begin(), levels.end(), a.level) - levels.begin());
                for (std::size_t i = 0; i < n; ++i)
                    if (code_to_level[static_cast<std::size_t>(c.codes[rows[i]])] != want)
                        col[static_cast<Eigen::Index>(i)] = 0.0;
            }
        }
    });
}

namespace {

void fill_matrix(const Table& table, const LevelMap& cat_map, Design& d) {
    d.X.resize(static_cast<Eigen::Index>(d.rows.size()), static_cast<Eigen::Index>(d.columns.size()));
    detail::fill_rows(table, cat_map, d.columns, d.rows, d.X);
}

// The outcome over the used rows (checked for the family), the offset and the
// weights (positive).
void fill_outcome_and_weights(const Table& table, const ModelSpec& spec, const Column& outcome, Design& d) {
    const std::vector<std::size_t>& rows = d.rows;
    const std::size_t n = rows.size();
    d.y.resize(static_cast<Eigen::Index>(n));
    for (std::size_t i = 0; i < n; ++i) d.y[static_cast<Eigen::Index>(i)] = outcome.numbers[rows[i]];
    detail::check_outcome(table, spec, d);
    detail::fill_offset(table, spec, d);
    if (spec.weights.empty()) return;
    d.weights.resize(static_cast<Eigen::Index>(n));
    detail::fill_weights(table, spec, rows, d.weights);
}

}  // namespace

void detail::fill_weights(const Table& table, const ModelSpec& spec, const std::vector<std::size_t>& rows,
                          Eigen::VectorXd& out) {
    const Column& weights = table.at(spec.weights);
    for (std::size_t i = 0; i < rows.size(); ++i) {
        const double w = weights.numbers[rows[i]];
        if (!(w > 0))
            throw InputError("weights " + quoted(spec.weights) + " must be positive: " + table.row_place(rows[i]) +
                             " holds " + exact_text(w) + "; fix that row or choose another weights column");
        out[static_cast<Eigen::Index>(i)] = w;
    }
}

void detail::ClusterCodes::code_rows(const Table& table, const std::string& column,
                                     const std::vector<std::size_t>& rows, std::vector<int>& out) {
    const Column& cluster = table.at(column);
    if (cluster.kind == ColumnKind::Categorical) {
        if (code_id.size() < cluster.levels.size()) code_id.resize(cluster.levels.size(), -1);
        for (const std::size_t r : rows) {
            auto code = static_cast<std::size_t>(cluster.codes[r]);
            if (code_id[code] < 0) {
                code_id[code] = static_cast<int>(names.size());
                names.push_back(cluster.levels[code]);
            }
            out.push_back(code_id[code]);
        }
    } else {
        for (const std::size_t r : rows) {
            const double v = cluster.numbers[r];
            auto [it, fresh] = num_ids.emplace(v, static_cast<int>(num_ids.size()));
            if (fresh) names.push_back(exact_text(v));
            out.push_back(it->second);
        }
    }
}

void detail::check_clusters(const ModelSpec& spec, std::size_t clusters, std::size_t n) {
    if (clusters < 2)
        throw InputError(
            "cluster column " + quoted(spec.cluster) + " has a single cluster among the " + std::to_string(n) +
            " used rows; cluster-robust standard errors need at least 2 clusters (30 or more to be reliable)");
}

namespace {

// Cluster codes 0..G-1 in order of first appearance among the used rows, with
// their names; at least two clusters.
void fill_clusters(const Table& table, const ModelSpec& spec, Design& d) {
    detail::ClusterCodes codes;
    d.cluster.reserve(d.rows.size());
    codes.code_rows(table, spec.cluster, d.rows, d.cluster);
    d.cluster_names = std::move(codes.names);
    d.n_clusters = static_cast<int>(d.cluster_names.size());
    detail::check_clusters(spec, d.cluster_names.size(), d.rows.size());
}

// Each used row's group, for a multilevel model; at least two groups.
void fill_groups(const Table& table, const ModelSpec& spec, Design& d) {
    const std::string& name = spec.multilevel.groups;
    const GroupCodes all = group_codes(table.at(name));
    std::vector<int> id(all.names.size(), -1);
    d.group.resize(d.rows.size());
    for (std::size_t i = 0; i < d.rows.size(); ++i) {
        const auto code = static_cast<std::size_t>(all.code[d.rows[i]]);
        if (id[code] < 0) {
            id[code] = static_cast<int>(d.group_names.size());
            d.group_names.push_back(all.names[code]);
        }
        d.group[i] = static_cast<std::size_t>(id[code]);
    }
    if (d.group_names.size() < 2)
        throw InputError("grouping column " + quoted(name) + " has a single group (" + quoted(d.group_names.front()) +
                         ") among the " + std::to_string(d.rows.size()) +
                         " used rows; a multilevel model needs many groups (30 or more for variances and "
                         "cross-level effects worth reporting) — choose another grouping column");
}

// 6. Checks that make a fit meaningless: a constant numeric main effect
//    beside the intercept, and no more rows than coefficients.
void check_estimable(const Table& table, const ModelSpec& spec, const Design& d) {
    if (spec.intercept)
        for (const auto& t : d.terms) {
            if (t.degree != 1 || t.factors.size() != 1) continue;
            const Column& c = table.at(t.factors[0].first);
            if (c.kind != ColumnKind::Numeric) continue;
            auto col = d.X.col(t.columns[0]);
            if ((col.array() == col[0]).all()) detail::refuse_constant(t.factors[0].first, col[0]);
        }
    detail::check_enough_rows(table, d.columns, d.rows.size());
}

}  // namespace

void detail::refuse_constant(const std::string& column, double value) {
    throw InputError("predictor " + quoted(column) + " is constant (every used row holds " + exact_text(value) +
                     "); it cannot be estimated alongside the intercept — drop it or use --no-intercept");
}

void detail::check_enough_rows(const Table& table, const std::vector<DesignColumn>& columns, std::size_t n) {
    const std::size_t p = columns.size();
    if (n <= p) {
        std::vector<std::string> labels;
        for (const auto& c : columns) labels.push_back(c.label);
        throw InputError("too few rows: " + (table.source.empty() ? std::string() : table.source + " has ") +
                         std::to_string(n) + " complete rows for " + std::to_string(p) + " coefficients (" +
                         join(labels, ", ") +
                         "); the model needs more rows than coefficients — add rows or drop terms");
    }
}

namespace {

// The summary of every numeric model column over the used rows, one column
// per task (each summary is computed as on one thread).
void summarise(const Table& table, Design& d) {
    std::vector<const Column*> columns;
    for (const auto& t : d.terms)
        for (const auto& f : t.factors) {
            const Column& c = table.at(f.first);
            if (c.kind != ColumnKind::Numeric || d.summaries.count(f.first)) continue;
            d.summaries.emplace(f.first, NumericSummary{});
            columns.push_back(&c);
        }
    std::vector<NumericSummary> out(columns.size());
    detail::parallel_for(columns.size(), 0, [&](std::size_t k) {
        std::vector<double> values;
        values.reserve(d.rows.size());
        for (auto r : d.rows) values.push_back(columns[k]->numbers[r]);
        out[k] = numeric_summary(std::move(values));
    });
    for (std::size_t k = 0; k < columns.size(); ++k) d.summaries[columns[k]->name] = out[k];
}

}  // namespace

// What was done, for the reader: added terms, excluded rows, dummy coding.
void detail::add_notes(const std::vector<std::string>& added_notes, std::size_t table_rows, Design& d) {
    if (!added_notes.empty()) d.notes.push_back("lower-order terms added: " + join(added_notes, ", "));
    if (d.n_excluded > 0) {
        std::vector<std::string> why;
        for (const auto& e : d.exclusions) why.push_back(e.column + ": " + std::to_string(e.rows) + " missing");
        d.notes.push_back(std::to_string(d.n_excluded) + " of " + std::to_string(table_rows) +
                          " rows excluded for missing values (" + join(why, ", ") + ")");
    }
    for (const auto& ci : d.categoricals)
        d.notes.push_back(quoted(ci.column) + " is dummy-coded with reference level " + quoted(ci.reference));
}

const Column& detail::outcome_column(const Table& table, const ModelSpec& spec) {
    if (spec.outcome.empty()) throw InputError("no outcome given; choose the column to explain");
    if (!(spec.level > 0 && spec.level < 1))
        throw InputError("confidence level " + exact_text(spec.level) + " is not between 0 and 1 (e.g. 0.95)");
    return column_for(table, spec.outcome, "outcome");
}

Design build_design(const Table& table, const ModelSpec& spec) {
    if (auto centred = group_centred(table, spec)) {
        Design d = build_design(centred->table, centred->spec);
        d.notes.insert(d.notes.begin(), centred->notes.begin(), centred->notes.end());
        return d;
    }
    const Column& outcome = detail::outcome_column(table, spec);
    std::vector<std::string> added_notes;
    const std::vector<DesignTerm> terms = detail::model_terms(table, spec, added_notes);
    const std::vector<std::string> used = detail::used_columns(table, spec, outcome, terms);

    Design d;
    d.outcome = spec.outcome;
    d.intercept = spec.intercept;
    d.rows = complete_rows(table, used, d);
    const LevelMap cat_map = categorical_levels(table, spec, terms, d.rows, d);
    detail::check_design_size(table, terms, cat_map, spec.intercept, d.rows.size());
    detail::design_columns(table, terms, cat_map, spec.intercept, d);
    fill_matrix(table, cat_map, d);
    fill_outcome_and_weights(table, spec, outcome, d);
    if (!spec.cluster.empty()) fill_clusters(table, spec, d);
    if (spec.multilevel.active()) fill_groups(table, spec, d);
    check_estimable(table, spec, d);
    summarise(table, d);
    detail::add_notes(added_notes, table.rows(), d);
    return d;
}

}  // namespace moderato
