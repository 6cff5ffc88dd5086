// From a dataset and an analysis's settings to everything the analysis shows.
#include "moderato/project/analysis_run.hpp"

#include <algorithm>
#include <cmath>
#include <set>

#include "moderato/estimation/in_database_fit.hpp"
#include "moderato/probing/response_scale.hpp"
#include "moderato/reading/derive.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/report_text.hpp"
#include "project/straight_line_check.hpp"

namespace moderato {

namespace {

std::string quoted(const std::string& s) { return "'" + s + "'"; }

// A numeric column whose present values are all 0 or 1 (and both occur).
bool zero_one(const Column& c) {
    if (c.kind != ColumnKind::Numeric) return false;
    bool zero = false, one = false;
    for (const double v : c.numbers) {
        if (v != v) continue;
        if (v == 0) zero = true;
        else if (v == 1) one = true;
        else return false;
    }
    return zero && one;
}

bool grouping(const Column& c) { return c.kind == ColumnKind::Categorical || zero_one(c); }

void require_column(const Table& t, const Analysis& a, const std::string& role, const std::string& column) {
    if (column.empty() || t.find(column)) return;
    throw InputError("analysis " + quoted(a.name) + ": the " + role + " column " + quoted(column) +
                     " is not in the dataset " + t.source +
                     "; choose another column in Specify or restore the column in the data file");
}

}  // namespace

ProbeKind probe_kind(const Table& t, const Analysis& a) {
    if (a.roles.outcome.empty()) throw InputError("analysis " + quoted(a.name) + ": choose an Outcome column");
    if (a.roles.focal.empty()) throw InputError("analysis " + quoted(a.name) + ": choose a Focal predictor");
    if (a.roles.moderator.empty()) throw InputError("analysis " + quoted(a.name) + ": choose a Moderator");
    require_column(t, a, "Outcome", a.roles.outcome);
    require_column(t, a, "Focal predictor", a.roles.focal);
    require_column(t, a, "Moderator", a.roles.moderator);
    const Column& f = t.at(a.roles.focal);
    const Column& m = t.at(a.roles.moderator);
    if (grouping(f) && grouping(m)) return ProbeKind::Cells;
    if (f.kind == ColumnKind::Categorical)
        throw InputError("analysis " + quoted(a.name) + ": the Focal predictor " + quoted(a.roles.focal) +
                         " is categorical and the Moderator " + quoted(a.roles.moderator) +
                         " is numeric; swap the two roles to see the effect of " + a.roles.moderator +
                         " in each group of " + a.roles.focal);
    return grouping(m) ? ProbeKind::Groups : ProbeKind::Continuous;
}

// Refuses, before anything is read or fitted, a model the database cannot fit.
void require_server_model(const Analysis& a) {
    if (a.family != Family::Linear || a.multilevel.active() || !a.roles.exposure.empty())
        throw InputError("analysis " + quoted(a.name) +
                         ": a fit in the database is a linear model (least squares, weighted or not) of one "
                         "level; choose the linear family without groups, or read every row into Moderato "
                         "(import the table without fitting in the database)");
}

// The model fitted in the database over every row, and to the sample read
// for plots (for the checks). Both designs must have the same columns: a
// level the sample lacks is named.
void fit_in_server(AnalysisRun& run, const Analysis& a, const ServerFit& server) {
    run.sample_fit = fit_design(run.design, run.spec);
    run.fit = fit_in_database(server.source, run.spec, server.options, server.password);
    const auto& all = run.fit.coefficients;
    const auto& sample = run.sample_fit->coefficients;
    for (std::size_t j = 0; j < std::max(all.size(), sample.size()); ++j)
        if (j >= all.size() || j >= sample.size() || all[j].term != sample[j].term)
            throw InputError("analysis " + quoted(a.name) + ": the model's term " +
                             quoted(j < all.size() ? all[j].term : sample[j].term) +
                             " is in the database's rows but not in the sample read for plots (a rare level?); "
                             "merge rare levels in a query, or read every row");
}

// What a fit in the database says about the rows behind its plots.
std::string sample_caution(const AnalysisRun& run) {
    return "Estimates use all " + format_count(static_cast<long long>(run.fit.n)) +
           " complete rows in the database; the plots' points and the model checks use a random sample of " +
           format_count(static_cast<long long>(run.sample_fit->n)) + " of them.";
}

void probe_analysis(AnalysisRun& run, const Analysis& a, const RunProgress& progress) {
    PreviousCheck previous{std::move(run.binned), std::move(run.smooth)};
    run.binned.reset();
    run.smooth.reset();
    run.support.reset();
    run.straight_line_notes.clear();
    run.probe.reset();
    run.probe_link.reset();
    run.cells.reset();
    run.surface.reset();
    run.cautions.clear();
    ProbeSpec ps;
    ps.focal = a.roles.focal;
    ps.moderator = a.roles.moderator;
    ps.second_moderator = a.roles.second_moderator;
    ps.second_value = a.probe.second_value;
    ps.adjustment = a.probe.adjustment;
    switch (run.kind) {
        case ProbeKind::Cells:
            run.cells = cell_table(run.design, run.fit, a.roles.focal, a.roles.moderator);
            break;
        case ProbeKind::Groups:
        case ProbeKind::Continuous: {
            if (run.kind == ProbeKind::Continuous) ps.pinned = a.probe.pinned;
            run.probe = probe(run.design, run.fit, ps);
            if (generalized(a.family) && a.probe.scale == ProbeScale::Outcome) {
                run.probe_link = run.probe;
                run.probe = probe_response(run.design, run.fit, ps, a.probe.averaging);
            }
            if (run.kind == ProbeKind::Continuous && a.roles.second_moderator.empty())
                run.surface = surface_grid(run.design, run.fit, a.roles.focal, a.roles.moderator);
            run.cautions = run.probe->cautions;
            if (run.kind == ProbeKind::Continuous) check_straight_line(run, a, std::move(previous), progress);
            break;
        }
    }
    if (run.cautions.empty())
        run.cautions.push_back(
            "These are associations in observational data, not causal effects, unless the focal "
            "predictor was randomised.");
    if (run.sample_fit) {
        run.cautions.push_back(sample_caution(run));
        if (a.centring == Centring::Mean)
            run.cautions.push_back("Coefficients at centred predictors are not shown for a fit in the database.");
        if (a.probe.show_binned || a.probe.show_smooth)
            run.straight_line_notes.push_back("The straight-line check uses the sample of " +
                                              format_count(static_cast<long long>(run.sample_fit->n)) +
                                              " rows read for plots.");
    }
}

bool same_model(const Analysis& a, const Analysis& b) {
    return a.dataset == b.dataset && a.roles == b.roles && a.family == b.family && a.se == b.se && a.level == b.level &&
           a.centring == b.centring && a.reference_levels == b.reference_levels && a.multilevel == b.multilevel;
}

bool same_probe(const Analysis& a, const Analysis& b) {
    const auto same = [](double x, double y) { return x == y || (std::isnan(x) && std::isnan(y)); };
    return same_model(a, b) && a.probe.pinned == b.probe.pinned && same(a.probe.second_value, b.probe.second_value) &&
           a.probe.scale == b.probe.scale && a.probe.averaging == b.probe.averaging &&
           a.probe.adjustment == b.probe.adjustment && a.probe.show_binned == b.probe.show_binned &&
           a.probe.bins == b.probe.bins && a.probe.show_smooth == b.probe.show_smooth &&
           same(a.probe.smooth_bandwidth, b.probe.smooth_bandwidth) &&
           a.probe.smooth_replicates == b.probe.smooth_replicates && a.probe.smooth_seed == b.probe.smooth_seed;
}

bool smooth_work_pending(const AnalysisRun* run, const Analysis& a) {
    if (!a.probe.show_smooth) return false;
    return !run || !run->smooth || !smooth_matches(*run->smooth, a);
}

AnalysisRun run_analysis(std::shared_ptr<const Table> table, const Analysis& a, const RunProgress& progress,
                         const ServerFit* server) {
    if (!table) throw InputError("analysis " + quoted(a.name) + ": its dataset is not loaded");
    const Table& t = *table;
    AnalysisRun run;
    run.analysis_id = a.id;
    run.table = table;
    run.kind = probe_kind(t, a);
    require_column(t, a, "Second moderator", a.roles.second_moderator);
    for (const auto& c : a.roles.controls) require_column(t, a, "Controls", c);
    require_column(t, a, "Weights", a.roles.weights);
    require_column(t, a, "Clusters", a.roles.clusters);
    require_column(t, a, "Exposure", a.roles.exposure);
    require_column(t, a, "Groups", a.multilevel.groups);
    if (a.se == SeKind::Cluster && a.roles.clusters.empty())
        throw InputError("analysis " + quoted(a.name) +
                         ": cluster-robust standard errors need a Clusters column; drop one in the Clusters slot");

    if (server) require_server_model(a);
    run.spec = model_spec(a);
    run.design = build_design(t, run.spec);
    if (server) fit_in_server(run, a, *server);
    else run.fit = fit_design(run.design, run.spec);

    probe_analysis(run, a, progress);

    if (a.centring == Centring::Mean && !server) {
        // Centre the numeric (not 0/1) focal predictor and moderators; the fit is the same
        // model, only the lower-order coefficients change meaning.
        // Only the model's columns (not a copy of the whole table), plus the centred copies.
        Table centred;
        centred.source = t.source;
        centred.row_lines = t.row_lines;
        std::set<std::string> used{a.roles.outcome, a.roles.focal,    a.roles.moderator, a.roles.second_moderator,
                                   a.roles.weights, a.roles.clusters, a.roles.exposure};
        used.insert(a.roles.controls.begin(), a.roles.controls.end());
        used.insert(a.multilevel.groups);
        used.insert(a.multilevel.centre_within.begin(), a.multilevel.centre_within.end());
        used.insert(a.multilevel.group_means.begin(), a.multilevel.group_means.end());
        for (const Column& c : t.columns)
            if (used.count(c.name)) centred.columns.push_back(c);
        std::map<std::string, std::string> names;
        for (const std::string& col : {a.roles.focal, a.roles.moderator, a.roles.second_moderator}) {
            if (col.empty()) continue;
            const Column& c = t.at(col);
            if (c.kind != ColumnKind::Numeric || zero_one(c)) continue;
            std::string name = col + "_centred";
            while (t.find(name) || centred.find(name)) name += "_";
            // Centre at the mean over the rows the model uses, so the intercept and
            // lower-order terms describe the sample that was fitted.
            const auto s = run.design.summaries.find(col);
            const double m = s != run.design.summaries.end() ? s->second.mean : centre_value(c, CentreAt::Mean);
            centred.columns.push_back(centre(c, CentreAt::Value, m, name));
            names[col] = name;
            run.centres[col] = m;
        }
        if (!names.empty()) run.centred_fit = fit_model(centred, model_spec(a, names));
    }
    return run;
}

}  // namespace moderato
