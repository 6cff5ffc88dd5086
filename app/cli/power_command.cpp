// `moderato-cli power`: power and sample size for the F test of a set of
// tested terms (typically the interaction terms) in a linear model.
//
//   --n N --f2 X                   power with N observations
//   --power P --f2 X               smallest N reaching power P
//   --n N --power P --detectable   smallest f2 detectable with power P
//
// --r2-full A --r2-reduced B may replace --f2 (f2 = (A − B)/(1 − A)).
// Other options: --tested U (default 1), --predictors K (required; all
// predictors, tested terms included, intercept excluded), --alpha (0.05),
// --noncentrality cohen|n (default cohen), --format json|text (text).
#include <cmath>
#include <cstdio>
#include <iostream>
#include <optional>
#include <string>

#include "arguments.hpp"
#include "commands.hpp"
#include "model_options.hpp"
#include "moderato/probing/power.hpp"
#include "moderato/reporting/json_writer.hpp"
#include "moderato/reporting/output_json.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/report_text.hpp"

namespace moderato::cli {
namespace {

const char* kPowerUsage =
    "usage: moderato-cli power --predictors K [--tested U] [--alpha A] and one of\n"
    "  --n N --f2 X                  power of the test with N observations\n"
    "  --power P --f2 X              smallest N that reaches power P\n"
    "  --n N --power P --detectable  smallest f2 detectable with N observations and power P\n"
    "(--r2-full A --r2-reduced B may replace --f2; --noncentrality cohen|n; --format json|text)";

enum class Mode { power, sample_size, detectable };

std::string mode_name(Mode m) {
    switch (m) {
        case Mode::power:
            return "power";
        case Mode::sample_size:
            return "sample_size";
        case Mode::detectable:
            return "detectable_effect";
    }
    return "";
}

// A computed value: the one number formatter (support/report_text).
std::string num(double v) { return format_sig(v); }
// A value the user gave, as given (every digit it has).
std::string given(double v) { return format_data(v); }

// Power for reading: four significant digits, without rounding up to a misleading 1.
std::string power_words(double p) {
    if (std::isnan(p)) return "n/a";
    if (p > 0.9999) return "above 0.9999";
    return num(p);
}

std::string plural(long long count, const std::string& word) {
    return std::to_string(count) + " " + word + (count == 1 ? "" : "s");
}

// What the command was asked: which quantity to compute, the design, the
// effect size (absent in detectable mode) and the given n and power.
struct PowerRequest {
    Mode mode = Mode::power;
    PowerDesign design;
    std::optional<double> f2, r2_full, r2_reduced;
    std::optional<long long> n;
    std::optional<double> target;
};

// The answer: the power calculation, plus the power at one observation
// fewer in sample-size mode.
struct PowerAnswer {
    PowerResult r;
    double power_one_fewer = std::nan("");
};

Mode read_mode(const Arguments& a) {
    const bool has_n = a.has("n"), has_power = a.has("power");
    if (a.has("detectable")) {
        if (!has_n || !has_power)
            throw InputError(
                "--detectable needs both --n and --power (the smallest f2 detectable with N observations "
                "at power P)\n" +
                std::string(kPowerUsage));
        return Mode::detectable;
    }
    if (has_n && has_power)
        throw InputError(
            "--n and --power together need --detectable (smallest detectable f2); give only --n to "
            "compute power, or only --power to compute the sample size\n" +
            std::string(kPowerUsage));
    if (has_n) return Mode::power;
    if (has_power) return Mode::sample_size;
    throw InputError("give --n (to compute power) or --power (to compute the sample size)\n" +
                     std::string(kPowerUsage));
}

PowerDesign read_design(const Arguments& a) {
    if (!a.has("predictors"))
        throw InputError(
            "option --predictors is required: the number of predictors in the full model, tested "
            "terms included, intercept excluded\n" +
            std::string(kPowerUsage));
    PowerDesign design;
    design.total_predictors = parse_integer(a.required("predictors"), "predictors", 1, 100000);
    design.tested_terms = a.has("tested") ? parse_integer(a.required("tested"), "tested", 1, 100000) : 1;
    design.alpha = a.has("alpha") ? parse_double(a.required("alpha"), "alpha") : 0.05;
    design.convention = a.has("noncentrality") ? parse_noncentrality(a.required("noncentrality"), "noncentrality")
                                               : Noncentrality::cohen;
    return design;
}

// --f2, or --r2-full with --r2-reduced; none in detectable mode.
void read_effect_size(const Arguments& a, PowerRequest& req) {
    const bool has_r2 = a.has("r2-full") || a.has("r2-reduced");
    if (req.mode == Mode::detectable) {
        if (a.has("f2") || has_r2)
            throw InputError("--detectable computes f2: do not give --f2, --r2-full or --r2-reduced with it");
        return;
    }
    if (a.has("f2") && has_r2)
        throw InputError("give the effect size once: either --f2, or --r2-full with --r2-reduced");
    if (a.has("f2")) {
        req.f2 = parse_double(a.required("f2"), "f2");
        return;
    }
    if (!has_r2)
        throw InputError("give the effect size: --f2 X, or --r2-full A with --r2-reduced B\n" +
                         std::string(kPowerUsage));
    if (!a.has("r2-full") || !a.has("r2-reduced"))
        throw InputError(
            "--r2-full and --r2-reduced go together: give both (the R² with and without the "
            "tested terms), or give --f2");
    req.r2_full = parse_double(a.required("r2-full"), "r2-full");
    req.r2_reduced = parse_double(a.required("r2-reduced"), "r2-reduced");
    req.f2 = f2_from_r2(*req.r2_full, *req.r2_reduced);
    if (*req.f2 == 0)
        throw InputError("--r2-full equals --r2-reduced (" + given(*req.r2_full) +
                         "): the tested terms add nothing (f2 = 0), so there is no effect to plan for");
}

PowerRequest read_request(const Arguments& a) {
    PowerRequest req;
    req.mode = read_mode(a);
    req.design = read_design(a);
    read_effect_size(a, req);
    if (a.has("n")) req.n = parse_integer(a.required("n"), "n", 1, 1'000'000'000'000LL);
    if (a.has("power")) req.target = parse_double(a.required("power"), "power");
    return req;
}

PowerAnswer compute(const PowerRequest& req) {
    PowerAnswer out;
    switch (req.mode) {
        case Mode::power:
            out.r = power_of_test(*req.f2, *req.n, req.design);
            break;
        case Mode::sample_size: {
            const auto s = smallest_n_for_power(*req.f2, *req.target, req.design);
            out.r = s.at_n;
            out.power_one_fewer = s.power_one_fewer;
            break;
        }
        case Mode::detectable:
            out.r = smallest_detectable_f2(*req.n, *req.target, req.design).at_f2;
            break;
    }
    return out;
}

std::string power_json(const PowerRequest& req, const PowerAnswer& ans) {
    const PowerResult& r = ans.r;
    JsonWriter w = begin_document();
    w.field("mode", mode_name(req.mode));
    w.field("f2", r.f2);
    w.field("partial_r2", partial_r2_from_f2(r.f2));
    if (req.r2_full) w.field("r2_full", *req.r2_full).field("r2_reduced", *req.r2_reduced);
    w.field("tested_terms", r.tested_terms);
    w.field("total_predictors", r.total_predictors);
    w.field("alpha", r.alpha);
    w.field("sample_size", r.n);
    w.field("df1", r.df1);
    w.field("df2", r.df2);
    w.field("noncentrality", r.noncentrality);
    w.field("noncentrality_convention", noncentrality_name(r.convention));
    w.field("noncentrality_formula", noncentrality_formula(r.convention));
    w.field("critical_value", r.critical_f);
    w.field("power", r.power);
    if (req.target) w.field("target_power", *req.target);
    if (req.mode == Mode::sample_size) w.field("power_one_fewer", ans.power_one_fewer);  // NaN -> null
    w.end_object();
    return w.str();
}

std::string heading(const PowerRequest& req, const PowerResult& r) {
    const std::string design_words = plural(r.tested_terms, "tested term") + " among " +
                                     plural(r.total_predictors, "predictor") + " (plus an intercept)";
    switch (req.mode) {
        case Mode::power:
            return "Power of the F test for " + design_words + "\n";
        case Mode::sample_size:
            return "Smallest sample reaching power " + given(*req.target) + " for " + design_words + "\n";
        case Mode::detectable:
            return "Smallest effect detectable with power " + given(*req.target) +
                   " and n = " + format_count(static_cast<long long>(r.n)) + " for " + design_words + "\n";
    }
    return "";
}

std::string power_text(const PowerRequest& req, const PowerAnswer& ans) {
    const PowerResult& r = ans.r;
    std::string text = heading(req, r);
    const auto row = [&](const std::string& label, const std::string& value) {
        char buf[512];
        std::snprintf(buf, sizeof buf, "  %-22s %s\n", label.c_str(), value.c_str());
        text += buf;
    };
    std::string f2_note = "(partial R² " + num(partial_r2_from_f2(r.f2)) + ")";
    if (req.r2_full)
        f2_note =
            "(from R² " + given(*req.r2_full) + " with and " + given(*req.r2_reduced) + " without the tested terms)";
    row(req.mode == Mode::detectable ? "smallest f2" : "effect size f2", num(r.f2) + "  " + f2_note);
    row("alpha", given(r.alpha));
    std::string n_note;
    if (req.mode == Mode::sample_size && !std::isnan(ans.power_one_fewer))
        n_note =
            "  (with " + format_count(static_cast<long long>(r.n) - 1) + ": " + power_words(ans.power_one_fewer) + ")";
    row("n", format_count(static_cast<long long>(r.n)) + n_note);
    row("degrees of freedom", format_count(std::llround(r.df1)) + " and " + format_count(std::llround(r.df2)));
    row("noncentrality", num(r.noncentrality) + "  (" + noncentrality_formula(r.convention) + ", " +
                             (r.convention == Noncentrality::cohen ? "Cohen's convention" : "n convention") + ")");
    row("critical F", num(r.critical_f));
    row("power", power_words(r.power));
    text +=
        "Assumes a linear model with normal errors of constant variance; f2 is the variance the tested terms\n"
        "explain, relative to the variance the full model leaves unexplained.\n";
    return text;
}

}  // namespace

int run_power(const std::vector<std::string>& args) {
    const Arguments a(
        args, {"detectable"},
        {"f2", "r2-full", "r2-reduced", "tested", "predictors", "alpha", "n", "power", "noncentrality", "format"});
    if (!a.positional.empty()) throw InputError("unexpected argument '" + a.positional.front() + "'\n" + kPowerUsage);
    const std::string format = output_format(a);
    const PowerRequest req = read_request(a);
    const PowerAnswer ans = compute(req);
    std::cout << (format == "json" ? power_json(req, ans) : power_text(req, ans));
    return 0;
}

}  // namespace moderato::cli
