#include <cmath>
#include <cstdint>
#include <iostream>
#include <optional>

#include "commands.hpp"
#include "model_options.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/probing/cells.hpp"
#include "moderato/probing/probe.hpp"
#include "moderato/probing/probe_bootstrap.hpp"
#include "moderato/probing/response_scale.hpp"
#include "moderato/reporting/bootstrap_report.hpp"
#include "moderato/reporting/cells_report.hpp"
#include "moderato/reporting/json_writer.hpp"
#include "moderato/reporting/probe_report.hpp"
#include "moderato/support/error.hpp"

namespace moderato::cli {

// Conditional effects of the focal predictor across the moderator, regions of
// significance, the simultaneous band and crossover points.
int run_probe(const std::vector<std::string>& args) {
    auto valued = model_valued();
    for (const char* o : {"focal", "moderator", "at", "at-percentiles", "second-moderator", "focal-at", "scale",
                          "average", "bootstrap", "seed", "surface"})
        valued.insert(o);
    const Arguments a(args, model_flags(), valued, repeatable_options());
    if (!a.positional.empty()) throw InputError("unexpected argument '" + a.positional.front() + "'");
    const std::string format = output_format(a);
    LoadedModel m = load_model(a);
    const Design design = build_design(m.table, m.spec);
    FitResult fit = fit_design(design, m.spec);

    ProbeSpec ps;
    ps.focal = a.required("focal");
    ps.moderator = a.required("moderator");

    // Two categorical predictors: the cell table answers the question.
    if (design.categorical(ps.focal) && design.categorical(ps.moderator)) {
        for (const char* o : {"at", "at-percentiles", "second-moderator", "focal-at", "bootstrap", "surface"})
            if (a.has(o))
                throw InputError(std::string("option --") + o +
                                 " does not apply when both the focal predictor and the moderator are categorical");
        const CellTable t = cell_table(design, fit, ps.focal, ps.moderator);
        if (format == "json") {
            JsonWriter w = begin_output(a, m.spec);
            w.field("family", to_string(fit.family));
            w.field("n", fit.n);
            w.key("cell_table");
            write_cell_table(w, t);
            w.end_object();
            std::cout << w.str();
        } else {
            std::cout << cell_table_to_text(t);
        }
        return 0;
    }
    if (design.categorical(ps.moderator) && (a.has("at") || a.has("at-percentiles")))
        throw InputError("--at and --at-percentiles need a numeric moderator; '" + ps.moderator +
                         "' is categorical, and its effects are given at every level");
    if (a.has("at") && a.has("at-percentiles")) throw InputError("give either --at or --at-percentiles, not both");
    if (auto at = a.get("at"))
        for (const auto& v : split_list(*at, "at")) ps.at.push_back(parse_double(v, "at"));
    if (auto pct = a.get("at-percentiles")) {
        if (!design.summaries.count(ps.moderator))
            throw InputError("--at-percentiles needs a numeric moderator; '" + ps.moderator + "' is categorical");
        for (const auto& v : split_list(*pct, "at-percentiles")) {
            const double p = parse_double(v, "at-percentiles");
            if (p < 0 || p > 100)
                throw InputError("option --at-percentiles takes percentiles from 0 to 100, got '" + v + "'");
            ps.at.push_back(design.percentile(ps.moderator, p));
        }
    }
    if (auto sm = a.get("second-moderator")) {
        std::string col = *sm;
        if (auto eq = sm->find('='); eq != std::string::npos) {
            col = sm->substr(0, eq);
            ps.second_value = parse_double(sm->substr(eq + 1), "second-moderator");
        }
        ps.second_moderator = col;
    }
    if (auto fa = a.get("focal-at")) ps.focal_value = parse_double(*fa, "focal-at");
    const std::string scale = a.get("scale").value_or("link");
    if (scale != "link" && scale != "response")
        throw InputError("option --scale must be link or response, got '" + scale + "'");
    const std::string average = a.get("average").value_or("sample");
    if (average != "sample" && average != "values")
        throw InputError("option --average must be sample or values, got '" + average + "'");
    if (scale == "response" && m.spec.family != Family::Logistic)
        throw InputError(
            "--scale response applies to logistic models (--family logistic); a linear model's effects "
            "are already on the outcome's scale");
    std::optional<BootstrapOptions> boot;
    if (auto n = a.get("bootstrap")) {
        boot.emplace();
        boot->replicates = static_cast<int>(parse_integer(*n, "bootstrap", 100, 1000000));
        boot->seed = static_cast<std::uint64_t>(parse_integer(a.get("seed").value_or("1"), "seed", 0, INT64_MAX));
        boot->threads = m.spec.threads;
        boot->level = m.spec.level;
    } else if (a.has("seed")) {
        throw InputError("option --seed goes with --bootstrap N");
    }

    const ProbeResult r =
        scale == "response"
            ? probe_response(design, fit, ps, average == "sample" ? Averaging::Sample : Averaging::AtValues)
            : probe(design, fit, ps);
    std::optional<ProbeBootstrap> pb;
    if (boot) pb = bootstrap_probe(design, m.spec, ps, r, *boot);
    std::optional<SurfaceGrid> surface;
    if (auto sz = a.get("surface")) {
        const int k = static_cast<int>(parse_integer(*sz, "surface", 2, 401));
        surface = surface_grid(design, fit, ps.focal, ps.moderator, k, k);
    }
    if (format == "json") {
        JsonWriter w = begin_output(a, m.spec);
        w.field("family", to_string(fit.family));
        w.field("se_type", to_string(fit.se));
        w.field("n", fit.n);
        write_probe_fields(w, r);
        w.key("bootstrap");
        if (pb) write_probe_bootstrap(w, *pb);
        else w.null();
        if (surface) {
            w.key("surface");
            write_surface(w, *surface);
        }
        w.end_object();
        std::cout << w.str();
    } else {
        std::cout << probe_to_text(r, fit);
        if (pb) std::cout << probe_bootstrap_to_text(*pb);
    }
    return 0;
}

}  // namespace moderato::cli
