// `moderato-cli probe`: conditional effects of the focal predictor across the
// moderator, regions of significance, the simultaneous band and crossover
// points; the cell table when both predictors are categorical.
#include <cmath>
#include <cstdint>
#include <iostream>
#include <optional>

#include "commands.hpp"
#include "model_options.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/probing/binned_effects.hpp"
#include "moderato/probing/cells.hpp"
#include "moderato/probing/common_support.hpp"
#include "moderato/probing/probe.hpp"
#include "moderato/probing/probe_bootstrap.hpp"
#include "moderato/probing/response_scale.hpp"
#include "moderato/probing/scale.hpp"
#include "moderato/probing/smooth_effects.hpp"
#include "moderato/reporting/bootstrap_report.hpp"
#include "moderato/reporting/cells_report.hpp"
#include "moderato/reporting/fit_report.hpp"
#include "moderato/reporting/json_writer.hpp"
#include "moderato/reporting/linearity_report.hpp"
#include "moderato/reporting/output_json.hpp"
#include "moderato/reporting/probe_report.hpp"
#include "moderato/support/error.hpp"
#include "postgres_data.hpp"

namespace moderato::cli {

namespace {

// What a probe run asked for, beyond the model.
struct ProbeRequest {
    ProbeSpec spec;
    ProbeScale scale = ProbeScale::Model;
    Averaging averaging = Averaging::Sample;
    std::optional<BootstrapOptions> bootstrap;
    int surface = 0;  // grid size; 0: none
    int bins = 0;     // 0: no binned estimates
    std::optional<SmoothOptions> smooth;
};

// What a probe computes besides the probe itself.
struct ProbeExtras {
    std::optional<ProbeBootstrap> bootstrap;
    std::optional<SurfaceGrid> surface;
    std::optional<BinnedEffects> binned;
    std::optional<SmoothEffects> smooth;
    std::optional<CommonSupport> support;
};

std::set<std::string> probe_valued() {
    auto valued = model_valued();
    for (const char* o :
         {"focal", "moderator", "moderator-values", "moderator-percentiles", "second-moderator", "focal-at", "scale",
          "average", "bootstrap", "seed", "surface", "adjust", "bins", "bandwidth"})
        valued.insert(o);
    return valued;
}

// Two categorical predictors: the cell table answers the question.
int run_cells(const Arguments& a, const LoadedModel& m, const Design& design, const FitResult& fit, const ProbeSpec& ps,
              const std::string& format) {
    for (const char* o : {"moderator-values", "moderator-percentiles", "second-moderator", "focal-at", "bootstrap",
                          "surface", "adjust", "bins", "smooth", "bandwidth"})
        if (a.has(o))
            throw InputError(std::string("option --") + o +
                             " does not apply when both the focal predictor and the moderator are categorical");
    const CellTable t = cell_table(design, fit, ps.focal, ps.moderator);
    if (format != "json") {
        std::cout << cell_table_to_text(t);
        return 0;
    }
    JsonWriter w = begin_output(a, m.spec);
    w.field("family", to_string(fit.family));
    w.field("standard_errors", standard_errors_name(fit.se));
    w.field("rows_used", fit.n);
    w.key("cell_table");
    write_cell_table(w, t);
    w.end_object();
    std::cout << w.str();
    return 0;
}

// --moderator-values or --moderator-percentiles (numeric moderators only).
void read_moderator_values(const Arguments& a, const Design& design, ProbeSpec& ps) {
    const bool values = a.has("moderator-values"), percentiles = a.has("moderator-percentiles");
    if ((values || percentiles) && design.categorical(ps.moderator))
        throw InputError("--moderator-values and --moderator-percentiles need a numeric moderator; '" + ps.moderator +
                         "' is categorical, and its effects are given at every level");
    if (values && percentiles) throw InputError("give either --moderator-values or --moderator-percentiles, not both");
    if (auto at = a.get("moderator-values"))
        for (const auto& v : split_list(*at, "moderator-values")) ps.at.push_back(parse_double(v, "moderator-values"));
    if (auto pct = a.get("moderator-percentiles")) {
        if (!design.summaries.count(ps.moderator))
            throw InputError("--moderator-percentiles needs a numeric moderator; '" + ps.moderator +
                             "' is categorical");
        for (const auto& v : split_list(*pct, "moderator-percentiles")) {
            const double p = parse_double(v, "moderator-percentiles");
            if (p < 0 || p > 100)
                throw InputError("option --moderator-percentiles takes percentiles from 0 to 100, got '" + v + "'");
            ps.at.push_back(design.percentile(ps.moderator, p));
        }
    }
}

// --second-moderator W[=VALUE] and --focal-at VALUE.
void read_held_values(const Arguments& a, ProbeSpec& ps) {
    if (auto sm = a.get("second-moderator")) {
        std::string col = *sm;
        if (auto eq = sm->find('='); eq != std::string::npos) {
            col = sm->substr(0, eq);
            ps.second_value = parse_double(sm->substr(eq + 1), "second-moderator");
        }
        ps.second_moderator = col;
    }
    if (auto fa = a.get("focal-at")) ps.focal_value = parse_double(*fa, "focal-at");
}

// --scale model|outcome (the old words link and response are refused with
// the new ones) and --average sample|values.
void read_scale(const Arguments& a, Family family, ProbeRequest& req) {
    const std::string scale = a.get("scale").value_or("model");
    if (scale == "link" || scale == "response")
        throw InputError("--scale " + scale + " is now called --scale " +
                         (scale == "link" ? "model (the scale the coefficients live on, e.g. log-odds)"
                                          : "outcome (the outcome's own scale, e.g. probability)"));
    if (scale != "model" && scale != "outcome")
        throw InputError("option --scale must be model or outcome, got '" + scale + "'");
    const std::string average = a.get("average").value_or("sample");
    if (average != "sample" && average != "values")
        throw InputError("option --average must be sample or values, got '" + average + "'");
    req.scale = scale == "outcome" ? ProbeScale::Outcome : ProbeScale::Model;
    req.averaging = average == "values" ? Averaging::AtValues : Averaging::Sample;
    if (req.scale == ProbeScale::Outcome && !generalized(family))
        throw InputError(
            "--scale outcome applies to logistic, probit, poisson and negative-binomial models; a linear model's "
            "effects are already on the outcome's scale");
}

// --adjust holm|bonferroni|none: for the pairwise differences between the
// levels of a categorical moderator.
void read_adjustment(const Arguments& a, const Design& design, ProbeSpec& ps) {
    const auto word = a.get("adjust");
    if (!word) return;
    const auto adjustment = adjustment_from_string(*word);
    if (!adjustment) throw InputError("option --adjust must be holm, bonferroni or none, got '" + *word + "'");
    if (!design.categorical(ps.moderator))
        throw InputError("option --adjust applies to the pairwise comparisons of a categorical moderator's levels; '" +
                         ps.moderator + "' is numeric");
    ps.adjustment = *adjustment;
}

// --bootstrap N [--seed S] and --surface K.
void read_extras(const Arguments& a, const ModelSpec& spec, ProbeRequest& req) {
    if (auto n = a.get("bootstrap")) {
        auto& boot = req.bootstrap.emplace();
        boot.replicates = static_cast<int>(parse_integer(*n, "bootstrap", 100, 1000000));
        boot.seed = static_cast<std::uint64_t>(parse_integer(a.get("seed").value_or("1"), "seed", 0, INT64_MAX));
        boot.threads = spec.threads;
        boot.level = spec.level;
    } else if (a.has("seed")) {
        throw InputError("option --seed goes with --bootstrap N");
    }
    if (auto sz = a.get("surface")) req.surface = static_cast<int>(parse_integer(*sz, "surface", 2, 401));
}

// --bins K, --smooth [--bandwidth H] (replicates and seed from --bootstrap).
void read_linearity(const Arguments& a, const ModelSpec& spec, ProbeRequest& req) {
    if (auto k = a.get("bins")) req.bins = static_cast<int>(parse_integer(*k, "bins", 2, 100));
    if (!a.has("smooth")) {
        if (a.has("bandwidth")) throw InputError("option --bandwidth goes with --smooth");
        return;
    }
    auto& o = req.smooth.emplace();
    if (auto h = a.get("bandwidth")) {
        o.bandwidth = parse_double(*h, "bandwidth");
        if (!(o.bandwidth > 0) || !std::isfinite(o.bandwidth))
            throw InputError("option --bandwidth must be a positive number, got '" + *h + "'");
    }
    if (req.bootstrap) {
        o.replicates = req.bootstrap->replicates;
        o.seed = req.bootstrap->seed;
    }
    o.threads = spec.threads;
    o.level = spec.level;
}

ProbeExtras compute_extras(const Design& design, const FitResult& fit, const ModelSpec& spec, const ProbeRequest& req,
                           const ProbeResult& r) {
    ProbeExtras x;
    if (req.bootstrap) x.bootstrap = bootstrap_probe(design, spec, req.spec, r, *req.bootstrap);
    if (req.surface > 0)
        x.surface = surface_grid(design, fit, req.spec.focal, req.spec.moderator, req.surface, req.surface);
    if (req.bins > 0) x.binned = binned_effects(design, fit, spec, req.spec.focal, req.spec.moderator, req.bins);
    if (req.smooth) x.smooth = smooth_effects(design, fit, req.spec.focal, req.spec.moderator, *req.smooth);
    if (x.binned || x.smooth) x.support = common_support(design, req.spec.focal, req.spec.moderator);
    return x;
}

void print_probe_text(const FitResult& fit, const ProbeResult& r, const ProbeExtras& x) {
    std::cout << probe_to_text(r, fit);
    if (x.bootstrap) std::cout << probe_bootstrap_to_text(*x.bootstrap);
    if (x.binned) std::cout << binned_to_text(*x.binned);
    if (x.smooth) std::cout << smooth_to_text(*x.smooth);
    if (x.support) std::cout << common_support_to_text(*x.support);
}

void print_probe(const Arguments& a, const LoadedModel& m, const FitResult& fit, const ProbeResult& r,
                 const ProbeExtras& x, const std::string& format) {
    if (format != "json") return print_probe_text(fit, r, x);
    JsonWriter w = begin_output(a, m.spec);
    w.field("family", to_string(fit.family));
    if (count_outcome(fit.family)) {
        w.key("exposure");
        if (fit.exposure.empty()) w.null();
        else w.value(fit.exposure);
    }
    w.field("standard_errors", standard_errors_name(fit.se));
    w.field("rows_used", fit.n);
    write_probe_fields(w, r);
    w.key("bootstrap");
    if (x.bootstrap) write_probe_bootstrap(w, *x.bootstrap);
    else w.null();
    if (x.surface) {
        w.key("surface");
        write_surface(w, *x.surface);
    }
    if (x.binned) write_binned(w.key("binned"), *x.binned);
    if (x.smooth) write_smooth(w.key("smooth"), *x.smooth);
    if (x.support) write_common_support(w.key("common_support"), *x.support);
    w.end_object();
    std::cout << w.str();
}

}  // namespace

int run_probe(const std::vector<std::string>& args) {
    auto flags = model_flags();
    flags.insert("smooth");
    flags.insert("in-database");
    const Arguments a(args, flags, probe_valued(), repeatable_options());
    if (!a.positional.empty()) throw InputError("unexpected argument '" + a.positional.front() + "'");
    const std::string format = output_format(a);
    LoadedModel m;
    Design design;
    FitResult fit;
    std::string sampled;  // a fit in the database: which rows each part used
    if (a.has("in-database")) {
        fit = probe_in_database_option(a, m, design, sampled);
    } else {
        m = load_model(a);
        design = build_design(m.table, m.spec);
        fit = fit_design(design, m.spec);
    }

    ProbeRequest req;
    req.spec.focal = a.required("focal");
    req.spec.moderator = a.required("moderator");
    if (design.categorical(req.spec.focal) && design.categorical(req.spec.moderator))
        return run_cells(a, m, design, fit, req.spec, format);
    read_moderator_values(a, design, req.spec);
    read_held_values(a, req.spec);
    read_adjustment(a, design, req.spec);
    read_scale(a, m.spec.family, req);
    read_extras(a, m.spec, req);
    read_linearity(a, m.spec, req);

    ProbeResult r = req.scale == ProbeScale::Outcome ? probe_response(design, fit, req.spec, req.averaging)
                                                     : probe(design, fit, req.spec);
    if (!sampled.empty()) r.notes.insert(r.notes.begin(), sampled);
    print_probe(a, m, fit, r, compute_extras(design, fit, m.spec, req, r), format);
    return 0;
}

}  // namespace moderato::cli
