// The streamed fit's passes (streamed_fit.hpp): the facts of pass A, the
// factor of pass B and the residual sums of pass C.
#include "moderato/estimation/streamed_fit.hpp"

#include <algorithm>
#include <cmath>
#include <map>
#include <optional>
#include <set>

#include "estimation/covariance.hpp"
#include "estimation/design_layout.hpp"
#include "estimation/streamed_factor.hpp"
#include "estimation/streamed_statistics.hpp"
#include "moderato/support/error.hpp"
#include "support/parallel.hpp"

namespace moderato {

namespace {

using LD = long double;
using detail::VecL;

void refuse_unstreamed(const ModelSpec& spec, const std::string& file) {
    const std::string what = generalized(spec.family)   ? std::string("a ") + to_string(spec.family) + " model"
                             : spec.multilevel.active() ? std::string("a multilevel model")
                             : !spec.exposure.empty()   ? std::string("an exposure")
                                                        : std::string();
    if (!what.empty())
        throw InputError(file + ": streamed fits are linear (OLS or WLS) for now; " + what +
                         " needs the table in memory. Fit it without streaming (drop --stream, or raise "
                         "--memory-budget), or keep only the rows and columns it needs");
}

// Every column the model reads, by name (their order comes later from the schema).
std::vector<std::string> model_column_names(const ModelSpec& spec) {
    std::set<std::string> names{spec.outcome};
    names.insert(spec.predictors.begin(), spec.predictors.end());
    for (const auto& [c, degree] : spec.polynomial) names.insert(c);
    for (const auto& inter : spec.interactions) names.insert(inter.begin(), inter.end());
    if (!spec.weights.empty()) names.insert(spec.weights);
    if (!spec.cluster.empty()) names.insert(spec.cluster);
    return {names.begin(), names.end()};
}

// Pass A's facts, gathered chunk by chunk over the complete rows.
struct Facts {
    std::vector<std::string> names;  // the model's columns
    std::vector<std::size_t> missing_per;
    std::size_t rows = 0, complete = 0;
    std::vector<DesignTerm> terms;  // from the header (kinds may still change)
    detail::LevelsPresent present;
    std::map<std::string, std::pair<double, bool>> first_value;  // numeric main effect: first value, varies
    detail::ClusterCodes clusters;

    void add(const Table& chunk, const ModelSpec& spec) {
        std::vector<std::size_t> used_rows;
        detail::count_complete(chunk, names, missing_per, used_rows);
        rows += chunk.rows();
        complete += used_rows.size();
        detail::mark_levels(chunk, terms, used_rows, present);
        for (const auto& t : terms) {
            if (t.degree != 1 || t.factors.size() != 1) continue;
            const Column& c = chunk.at(t.factors[0].first);
            if (c.kind != ColumnKind::Numeric) continue;
            for (const std::size_t r : used_rows) {
                auto [it, fresh] = first_value.emplace(c.name, std::make_pair(c.numbers[r], false));
                if (!fresh && c.numbers[r] != it->second.first) it->second.second = true;
            }
        }
        if (spec.cluster.empty()) return;
        std::vector<int> ids;
        clusters.code_rows(chunk, spec.cluster, used_rows, ids);
    }
};

// The design without rows, decided from the schema and pass A's facts, with
// build_design's checks in its order, and its level map.
struct Layout {
    Design d;
    detail::LevelMap cat_map;
    std::vector<std::string> used;
    std::size_t n = 0;
};

// One chunk's used rows as design rows, outcome and weights.
struct ChunkRows {
    std::vector<std::size_t> rows;
    Eigen::MatrixXd X;
    Eigen::VectorXd y, w;
};

void chunk_rows(const Table& chunk, const ModelSpec& spec, const Layout& l, ChunkRows& out) {
    std::vector<std::size_t> missing_per;
    out.rows.clear();
    detail::count_complete(chunk, l.used, missing_per, out.rows);
    const auto m = static_cast<Eigen::Index>(out.rows.size());
    out.X.resize(m, static_cast<Eigen::Index>(l.d.columns.size()));
    detail::fill_rows(chunk, l.cat_map, l.d.columns, out.rows, out.X);
    const Column& y = chunk.at(spec.outcome);
    out.y.resize(m);
    for (Eigen::Index i = 0; i < m; ++i) out.y[i] = y.numbers[out.rows[static_cast<std::size_t>(i)]];
    out.w.resize(spec.weights.empty() ? 0 : m);
    if (!spec.weights.empty()) detail::fill_weights(chunk, spec, out.rows, out.w);
}

// Pass B folded into pass A when the header decides the layout: no term
// has a categorical factor (whose reference level needs every used row).
// Given up (and pass B run) when a factor column turns categorical.
struct EarlyFactor {
    unsigned threads = 1;
    bool live = false;
    Layout l;
    std::optional<detail::StreamedFactor> factor;
    LD sum_log_w = 0;
    std::size_t n = 0;
    ChunkRows cr;

    bool numeric_factors(const Table& chunk, const std::vector<DesignTerm>& terms) const {
        for (const auto& t : terms)
            for (const auto& f : t.factors)
                if (chunk.at(f.first).kind != ColumnKind::Numeric) return false;
        return true;
    }
    void start(const Table& chunk, const ModelSpec& spec, const std::vector<DesignTerm>& terms) {
        live = false;
        if (!numeric_factors(chunk, terms)) return;
        try {
            l = Layout{};
            l.used = detail::used_columns(chunk, spec, detail::outcome_column(chunk, spec), terms);
            detail::design_columns(chunk, terms, l.cat_map, spec.intercept, l.d);
        } catch (const InputError&) {
            return;  // the checks after the pass will say it
        }
        factor.emplace(static_cast<Eigen::Index>(l.d.columns.size()), false, threads);
        sum_log_w = 0;
        n = 0;
        live = true;
    }
    void add(const Table& chunk, const ModelSpec& spec, const std::vector<DesignTerm>& terms) {
        if (!live) return;
        if (!numeric_factors(chunk, terms)) {
            live = false;
            return;
        }
        chunk_rows(chunk, spec, l, cr);
        factor->add(cr.X, cr.y, cr.w);
        for (Eigen::Index i = 0; i < cr.w.size(); ++i) sum_log_w += std::log(static_cast<LD>(cr.w[i]));
        n += cr.rows.size();
    }
};

// Pass A: the schema and the facts.
Facts scan_facts(CsvStream& stream, const ModelSpec& spec, EarlyFactor& early) {
    Facts facts;
    facts.names = model_column_names(spec);
    bool started = false, early_pending = true;
    stream.scan(
        [&](const Table& chunk) {
            if (!started) {  // the header: names are final, so unknown columns are refused at once
                detail::outcome_column(chunk, spec);
                std::vector<std::string> notes;
                facts.terms = detail::model_terms(chunk, spec, notes);
                for (const auto& n : facts.names) chunk.at(n);
                started = true;
            }
            facts.add(chunk, spec);
            if (early_pending) early.start(chunk, spec, facts.terms);
            early_pending = false;
            early.add(chunk, spec, facts.terms);
        },
        [&] {
            early_pending = true;
            Facts fresh;
            fresh.names = facts.names;
            fresh.terms = facts.terms;
            facts = std::move(fresh);
        });
    return facts;
}

Layout decide_layout(const Table& schema, const ModelSpec& spec, const Facts& facts) {
    Layout l;
    const Column& outcome = detail::outcome_column(schema, spec);
    std::vector<std::string> added_notes;
    const std::vector<DesignTerm> terms = detail::model_terms(schema, spec, added_notes);
    l.used = detail::used_columns(schema, spec, outcome, terms);
    std::vector<std::size_t> missing_per;
    for (const auto& name : l.used) {
        const auto at = std::find(facts.names.begin(), facts.names.end(), name) - facts.names.begin();
        missing_per.push_back(facts.missing_per.empty() ? 0 : facts.missing_per[static_cast<std::size_t>(at)]);
    }
    l.d.outcome = spec.outcome;
    l.d.intercept = spec.intercept;
    detail::record_exclusions(schema, l.used, missing_per, facts.rows, facts.complete, l.d);
    l.n = facts.complete;
    l.cat_map = detail::categorical_levels(schema, spec, terms, facts.present, l.d);
    // Columns only: a streamed fit never holds the n x p design, so
    // DesignLimits' cell limit (set by memory) does not apply.
    detail::check_design_size(schema, terms, l.cat_map, spec.intercept, 0);
    detail::design_columns(schema, terms, l.cat_map, spec.intercept, l.d);
    if (!spec.cluster.empty()) {
        detail::check_clusters(spec, facts.clusters.names.size(), l.n);
        l.d.n_clusters = static_cast<int>(facts.clusters.names.size());
    }
    if (spec.intercept)
        for (const auto& t : l.d.terms) {
            if (t.degree != 1 || t.factors.size() != 1) continue;
            const auto it = facts.first_value.find(t.factors[0].first);
            if (it != facts.first_value.end() && !it->second.second)
                detail::refuse_constant(it->first, it->second.first);
        }
    detail::check_enough_rows(schema, l.d.columns, l.n);
    detail::add_notes(added_notes, facts.rows, l.d);
    return l;
}

// The solve on the factor of every used row.
void finish_sums(detail::StreamedFactor& factor, const FitOptions& options, const Layout& l, detail::StreamedSums& s,
                 VecL& coef_long) {
    LeastSquaresOptions lso;
    lso.extended_budget = options.extended_budget;
    s.ls = factor.finish(s.n, lso, coef_long);
    s.factor = factor.factor();
    s.scales = factor.scales();
    s.n_clusters = l.d.n_clusters;
}

// Pass B: the factor, the solve, the sum of log weights.
detail::StreamedSums factor_pass(CsvStream& stream, const ModelSpec& spec, const FitOptions& options, const Layout& l,
                                 VecL& coef_long) {
    const auto p = static_cast<Eigen::Index>(l.d.columns.size());
    const double cells = static_cast<double>(l.n) * static_cast<double>(p + 1) * static_cast<double>(p + 1);
    const unsigned threads = detail::resolve_threads(spec.threads);
    detail::StreamedFactor factor(p, cells <= options.extended_budget, threads);
    detail::StreamedSums s;
    ChunkRows cr;
    stream.read(
        [&](const Table& chunk) {
            chunk_rows(chunk, spec, l, cr);
            factor.add(cr.X, cr.y, cr.w);
            for (Eigen::Index i = 0; i < cr.w.size(); ++i) s.sum_log_w += std::log(static_cast<LD>(cr.w[i]));
            s.n += cr.rows.size();
        },
        &l.used);
    if (s.n != l.n)
        throw InputError(stream.name() +
                         ": the file changed between the passes of a streamed "
                         "read (its complete rows differ); try again");
    finish_sums(factor, options, l, s, coef_long);
    return s;
}

// Pass C: residuals, the RSS and the sandwich's meat (or per-cluster score sums).
void residual_pass(CsvStream& stream, const ModelSpec& spec, const Layout& l, const VecL& coef_long,
                   detail::StreamedSums& s) {
    const std::vector<int>& kept = s.ls.kept;
    const auto k = static_cast<Eigen::Index>(kept.size());
    const Eigen::MatrixXd& A = s.ls.inverse_factor;
    const bool clustered = spec.se == SeKind::Cluster;
    Eigen::MatrixXd meat = Eigen::MatrixXd::Zero(k, k);
    Eigen::MatrixXd U = Eigen::MatrixXd::Zero(clustered ? s.n_clusters : 0, k);
    detail::ClusterCodes codes;
    std::vector<int> ids;
    LD rss = 0;
    ChunkRows cr;
    const double nd = static_cast<double>(s.n), kd = static_cast<double>(k);
    stream.read(
        [&](const Table& chunk) {
            chunk_rows(chunk, spec, l, cr);
            const Eigen::Index m = cr.X.rows();
            Eigen::VectorXd score(m);
            for (Eigen::Index i = 0; i < m; ++i) {  // least_squares' residuals, in long double
                LD fit = 0;
                for (int j : kept) fit += static_cast<LD>(cr.X(i, j)) * coef_long[j];
                const LD e = static_cast<LD>(cr.y[i]) - fit;
                const LD w = cr.w.size() ? static_cast<LD>(cr.w[i]) : 1.0L;
                rss += w * e * e;
                score[i] = static_cast<double>(w) * static_cast<double>(e);
            }
            Eigen::MatrixXd W = detail::projected_rows(cr.X, kept, A, 0, m);
            if (clustered) {
                ids.clear();
                codes.code_rows(chunk, spec.cluster, cr.rows, ids);
                for (Eigen::Index i = 0; i < m; ++i) U.row(ids[static_cast<std::size_t>(i)]) += W.row(i) * score[i];
                return;
            }
            detail::weigh_rows(W, score.data(), cr.w.size() ? cr.w.data() : nullptr, spec.se, nd, kd);
            meat.selfadjointView<Eigen::Lower>().rankUpdate(W.transpose());
        },
        &l.used);
    if (clustered) meat.selfadjointView<Eigen::Lower>().rankUpdate(U.transpose());
    s.residual_rss = true;
    s.rss = static_cast<double>(rss);
    s.sandwich = detail::sandwich_from_meat(meat, A, detail::sandwich_factor(spec.se, nd, kd, s.n_clusters));
}

}  // namespace

std::size_t streamed_passes(SeKind se) { return se == SeKind::Classical ? 2 : 3; }

FitResult fit_streamed(CsvStream& stream, const ModelSpec& spec, const FitOptions& options) {
    refuse_unstreamed(spec, stream.name());
    EarlyFactor early;
    early.threads = detail::resolve_threads(spec.threads);
    const Facts facts = scan_facts(stream, spec, early);
    const Layout l = decide_layout(stream.schema(), spec, facts);
    VecL coef_long;
    detail::StreamedSums sums;
    const double p1 = static_cast<double>(l.d.columns.size() + 1);
    const bool extended = static_cast<double>(l.n) * p1 * p1 <= options.extended_budget;
    std::vector<std::string> labels, early_labels;
    for (const auto& c : l.d.columns) labels.push_back(c.label);
    for (const auto& c : early.l.d.columns) early_labels.push_back(c.label);
    if (early.live && !extended && early.n == l.n && labels == early_labels && early.l.used == l.used) {
        sums.n = early.n;  // pass B was folded into pass A
        sums.sum_log_w = early.sum_log_w;
        finish_sums(*early.factor, options, l, sums, coef_long);
    } else {
        sums = factor_pass(stream, spec, options, l, coef_long);
    }
    if (spec.se != SeKind::Classical) residual_pass(stream, spec, l, coef_long, sums);
    FitResult f = detail::streamed_result(l.d, spec, options, sums);
    f.streamed = StreamedFit{stream.passes(), stream.chunk_rows()};
    const std::size_t passes = stream.passes();
    f.notes.push_back("fitted by streaming the file: " + std::to_string(passes) + (passes == 1 ? " pass" : " passes") +
                      " in chunks of about " + std::to_string(stream.chunk_rows()) +
                      " rows; fitted values and residuals were not kept");
    return f;
}

}  // namespace moderato
