#include "moderato/reporting/probe_report.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <sstream>

#include "moderato/reporting/fit_report.hpp"
#include "moderato/reporting/output_json.hpp"
#include "moderato/support/report_text.hpp"
#include "support/text_util.hpp"

namespace moderato {

namespace {

// ------------------------------------------------------------------ JSON

// Boundaries, the intervals where the effect differs from zero, and how
// they lie ("two boundaries, significant outside", …).
void write_region_fields(JsonWriter& w, const SignificanceRegions& s) {
    write_numbers(w, "boundaries", s.boundaries);
    write_intervals(w, "intervals", s.significant);
    w.field("shape", kind_text(s));
}

const char* points_name(ProbePoints points) {
    switch (points) {
        case ProbePoints::MeanSd:
            return "mean-sd";
        case ProbePoints::Percentiles:
            return "percentiles";
        case ProbePoints::ZeroOne:
            return "zero-one";
        case ProbePoints::Chosen:
            break;
    }
    return "chosen";
}

void write_setting(JsonWriter& w, const ProbeResult& r) {
    w.field("focal", r.focal);
    w.field("moderator", r.moderator);
    w.field("scale", scale_name(r.scale));
    if (r.scale == ProbeScale::Outcome) w.field("averaging", averaging_name(r.averaging));
    w.field("level", r.level);
    w.field("df", r.df);
    w.field("critical_value", r.critical_t);
    if (!r.categorical_moderator) {
        w.field("moderator_mean", r.moderator_mean);
        w.field("moderator_sd", r.moderator_sd);
        w.field("moderator_skew", r.moderator_skew);
        w.key("moderator_percentiles").begin_array();
        for (const double v : r.moderator_percentiles) w.value(v);
        w.end_array();
        w.field("values_from", points_name(r.points));
    }
    w.key("group_slopes");
    if (!r.group_slopes) {
        w.null();
        return;
    }
    w.begin_object();
    w.field("sd", r.group_slopes->sd);
    w.field("critical_value", r.group_slopes->critical_value);
    w.end_object();
}

void write_effects_at(JsonWriter& w, const ProbeResult& r) {
    w.key("effects_at").begin_array();
    for (const auto& e : r.effects) {
        w.begin_object();
        w.field("moderator_value", e.moderator_value);
        if (!e.level.empty()) w.field("moderator_level", e.level);
        write_inference(w, e, "effect");
        w.field("beyond_data", e.beyond_data);
        w.end_object();
    }
    w.end_array();
}

// Johnson–Neyman (pointwise) and the simultaneous band; null where they do
// not apply (a categorical moderator).
void write_regions(JsonWriter& w, const ProbeResult& r) {
    w.key("significance_region");
    if (r.johnson_neyman) {
        w.begin_object();
        write_region_fields(w, *r.johnson_neyman);
        w.key("boundaries_beyond_data").begin_array();
        for (bool b : r.jn_beyond_data) w.value(b);
        w.end_array();
        write_pair(w, "observed_range", r.observed_range);
        w.end_object();
    } else {
        w.null();
    }
    w.key("simultaneous");
    if (r.simultaneous) {
        w.begin_object();
        w.field("critical_value", r.simultaneous->critical_value);
        write_region_fields(w, *r.simultaneous);
        w.end_object();
    } else {
        w.null();
    }
}

// Where two lines cross on the focal axis, its Fieller interval, and where
// the two lines' predictions differ.
void write_crossing(JsonWriter& w, const Crossover& c) {
    w.begin_object();
    w.field("lines", c.groups);
    w.field("at", c.focal_value);
    w.field("low", c.ci_lower);
    w.field("high", c.ci_upper);
    w.field("interval_kind", to_string(c.ci_kind));
    w.field("inside_data", c.within_observed_range);
    w.field("form", to_string(c.form));
    w.key("lines_differ").begin_object();
    w.field("critical_value", c.gap_regions.critical_value);
    write_region_fields(w, c.gap_regions);
    w.end_object();
    w.end_object();
}

void write_crossings(JsonWriter& w, const ProbeResult& r) {
    w.key("crossing");
    if (!r.crossovers.empty()) write_crossing(w, r.crossovers.front());
    else w.null();
    w.key("crossings").begin_array();
    for (const auto& c : r.crossovers) write_crossing(w, c);
    w.end_array();
    write_pair(w, "focal_range", r.focal_range);
}

// The joint test of the interaction, and for a categorical moderator every
// pairwise difference of the effect with its adjusted p-value.
void write_comparisons(JsonWriter& w, const ProbeResult& r) {
    w.key("interaction_test");
    if (r.interaction_test) write_joint_test(w, *r.interaction_test);
    else w.null();
    w.key("slope_contrasts");
    if (!r.categorical_moderator) {
        w.null();
        return;
    }
    w.begin_array();
    for (const auto& c : r.slope_contrasts) {
        w.begin_object();
        w.key("pair").begin_array();
        w.value(c.first);
        w.value(c.second);
        w.end_array();
        write_inference(w, c, "difference");
        w.field("p_adjusted", c.p_adjusted);
        w.end_object();
    }
    w.end_array();
    w.field("adjustment", to_string(r.adjustment));
}

// ------------------------------------------------------------------ text

// The one number formatter (support/report_text): four significant digits
// with trailing zeros, U+2212 minus, "—" for NaN, ∞.
std::string num(double v) { return format_sig(v); }

// `s` right-aligned in `w` columns (U+2212 and "—" are one column each), after a space.
std::string column(const std::string& s, std::size_t w) {
    const std::size_t have = detail::display_width(s);
    return " " + (have >= w ? s : std::string(w - have, ' ') + s);
}

std::string regions_text(const std::vector<Region>& regions) {
    if (regions.empty()) return "nowhere";
    std::string out;
    for (std::size_t i = 0; i < regions.size(); ++i) {
        const auto& r = regions[i];
        if (i) out += " and ";
        if (std::isinf(r.lo) && std::isinf(r.hi)) out += "everywhere";
        else if (std::isinf(r.lo)) out += "below " + num(r.hi);
        else if (std::isinf(r.hi)) out += "above " + num(r.lo);
        else out += "from " + format_range(r.lo, r.hi);
    }
    return out;
}

void write_heading(std::ostringstream& o, const ProbeResult& r, const FitResult& fit) {
    const bool outcome = r.scale == ProbeScale::Outcome;
    const std::string scale =
        outcome ? outcome_scale_text(fit.family, fit.exposure) : model_scale_text(fit.family, !fit.exposure.empty());
    o << "Effect of " << r.focal << " at chosen values of " << r.moderator
      << (scale.empty() ? std::string() : " (" + scale + " scale)") << "\n";
    o << "Standard errors: " << standard_errors_text(fit.se) << " · " << level_text(r.level) << " intervals · "
      << (std::isinf(r.df) ? std::string("z") : "t with " + format_df(r.df) + " df")
      << " · n = " << format_count(static_cast<long long>(fit.n)) << "\n";
    if (!r.categorical_moderator)
        o << r.moderator << " observed from " << format_range(r.observed_range.first, r.observed_range.second)
          << " (mean " << num(r.moderator_mean) << ", SD " << num(r.moderator_sd) << ")\n";
    o << "\n";
}

// moderator value, effect, interval (low, high), SE, test value, p: the one
// order of every conditional-effects table of ours.
void write_effects_table(std::ostringstream& o, const ProbeResult& r, const FitResult& fit) {
    const std::string first = r.categorical_moderator ? "level of " + r.moderator : r.moderator;
    const int w = static_cast<int>(std::max<std::size_t>(18, first.size()));
    char line[512];
    std::snprintf(line, sizeof line, "%-*s %11s %11s %11s %11s %8s %10s\n", w, first.c_str(), "effect",
                  (level_text(r.level) + " low").c_str(), "high", "SE", std::isinf(r.df) ? "z" : "t", "p");
    o << line;
    bool beyond = false;
    for (const auto& e : r.effects) {
        const std::string at = e.level.empty() ? num(e.moderator_value) + (e.beyond_data ? " *" : "") : e.level;
        const std::size_t width = static_cast<std::size_t>(w);
        o << at << std::string(width - std::min(width, detail::display_width(at)), ' ') << column(num(e.estimate), 11)
          << column(num(e.ci_lower), 11) << column(num(e.ci_upper), 11) << column(num(e.std_error), 11)
          << column(num(e.statistic), 8) << column(format_p_value(e.p_value), 10) << "\n";
        beyond |= e.beyond_data;
    }
    if (beyond) o << "  * beyond the data (extrapolation)\n";
    if (!r.rate_ratios.empty()) {
        o << "  as rate ratios (the factor on the " << (fit.exposure.empty() ? "expected count" : "rate") << " for "
          << (r.binary_focal ? r.focal + " 1 against 0" : "one unit more of " + r.focal) << "):";
        for (const RateRatio& q : r.rate_ratios)
            o << (&q == &r.rate_ratios.front() ? " " : "; ") << (q.level.empty() ? num(q.moderator_value) : q.level)
              << ": " << num(q.ratio) << " (" << format_range(q.ci_lower, q.ci_upper) << ")";
        o << "\n";
    }
    if (r.group_slopes)
        o << "  groups' own slopes of " << r.focal << ": the effect ± "
          << num(r.group_slopes->critical_value * r.group_slopes->sd) << " holds " << level_text(r.level)
          << " of groups (random slope SD " << num(r.group_slopes->sd) << ")\n";
}

void write_regions_text(std::ostringstream& o, const ProbeResult& r) {
    if (r.johnson_neyman) {
        const auto& jn = *r.johnson_neyman;
        o << "\nRegion of significance (Johnson–Neyman, pointwise " << level_text(r.level)
          << "): the effect differs from zero "
          << (jn.significant.empty() ? "nowhere" : "for " + r.moderator + " " + regions_text(jn.significant)) << "\n";
        if (r.scale == ProbeScale::Outcome) o << "  (" << kind_text(jn) << ")\n";
        for (std::size_t i = 0; i < jn.boundaries.size(); ++i)
            o << "  boundary " << num(jn.boundaries[i]) << (r.jn_beyond_data[i] ? "  (beyond the data)" : "") << "\n";
    }
    if (r.simultaneous)
        o << "Simultaneous band (critical value " << num(r.simultaneous->critical_value) << "): "
          << (r.simultaneous->significant.empty() ? std::string("nowhere")
                                                  : r.moderator + " " + regions_text(r.simultaneous->significant))
          << "\n";
}

void write_crossings_text(std::ostringstream& o, const ProbeResult& r) {
    for (const auto& c : r.crossovers) {
        o << "\nCrossover (" << c.groups << "): ";
        if (c.ci_kind == FiellerInterval::None) {
            o << "the lines do not cross (parallel or curved)\n";
            continue;
        }
        o << r.focal << " = " << num(c.focal_value) << ", " << level_text(r.level) << " Fieller interval ";
        if (c.ci_kind == FiellerInterval::Bounded) o << "[" << num(c.ci_lower) << ", " << num(c.ci_upper) << "]";
        else if (c.ci_kind == FiellerInterval::WholeLine) o << "the whole line";
        else o << "outside (" << num(c.ci_lower) << ", " << num(c.ci_upper) << ")";
        o << " — " << (c.within_observed_range ? "inside" : "outside") << " the observed " << r.focal << " range ("
          << format_range(r.focal_range.first, r.focal_range.second) << "): " << to_string(c.form) << "\n";
        o << "  the groups differ for " << r.focal << " " << regions_text(c.gap_regions.significant) << "\n";
    }
}

// "Joint test of the interaction (HC3): F(2, 440) = …" and the table of
// pairwise differences.
void write_comparisons_text(std::ostringstream& o, const ProbeResult& r, const FitResult& fit) {
    if (r.interaction_test)
        o << "\nJoint test that the effect of " << r.focal << " does not depend on " << r.moderator << " ("
          << standard_errors_text(fit.se) << " standard errors"
          << (r.scale == ProbeScale::Outcome ? ", " + model_scale_text(fit.family, !fit.exposure.empty()) + " scale"
                                             : "")
          << "): " << joint_test_text(*r.interaction_test) << "\n";
    if (r.slope_contrasts.empty()) return;
    o << "\nDifferences in the effect of " << r.focal << " between levels of " << r.moderator
      << " (second minus first)\n";
    char line[512];
    std::snprintf(line, sizeof line, "%-28s %11s %11s %11s %11s %8s %10s %10s\n", "pair", "difference",
                  (level_text(r.level) + " low").c_str(), "high", "SE", std::isinf(r.df) ? "z" : "t", "p", "adjusted");
    o << line;
    for (const auto& c : r.slope_contrasts) {
        const std::string pair = c.second + " − " + c.first;
        o << pair << std::string(28 - std::min<std::size_t>(28, detail::display_width(pair)), ' ')
          << column(num(c.estimate), 11) << column(num(c.ci_lower), 11) << column(num(c.ci_upper), 11)
          << column(num(c.std_error), 11) << column(num(c.statistic), 8) << column(format_p_value(c.p_value), 10)
          << column(format_p_value(c.p_adjusted), 10) << "\n";
    }
    o << "  p-values " << adjustment_text(r.adjustment) << " over " << r.slope_contrasts.size() << " pairs\n";
}

void write_closing_text(std::ostringstream& o, const ProbeResult& r, const FitResult& fit) {
    if (r.interaction_effect) {
        const auto& ie = *r.interaction_effect;
        o << "\nInteraction on the " << outcome_scale_text(fit.family, fit.exposure) << " scale (" << to_string(ie.kind)
          << ", Ai & Norton): " << num(ie.estimate) << " (interval " << format_range(ie.ci_lower, ie.ci_upper)
          << ", SE " << num(ie.std_error) << ", p " << format_p_value(ie.p_value) << ")\n";
    }
    if (!r.notes.empty()) {
        o << "\nNotes:\n";
        for (const auto& s : r.notes) o << "  - " << s << "\n";
    }
    o << "\nCautions:\n";
    for (const auto& s : r.cautions) o << "  ! " << s << "\n";
}

}  // namespace

void write_probe_fields(JsonWriter& w, const ProbeResult& r) {
    write_setting(w, r);
    write_effects_at(w, r);
    write_regions(w, r);
    write_crossings(w, r);
    write_comparisons(w, r);
    if (!r.rate_ratios.empty()) {
        w.key("rate_ratios").begin_array();
        for (const RateRatio& q : r.rate_ratios) {
            w.begin_object();
            if (q.level.empty()) w.field("moderator_value", q.moderator_value);
            else w.field("level", q.level);
            w.field("ratio", q.ratio);
            w.field("low", q.ci_lower);
            w.field("high", q.ci_upper);
            w.end_object();
        }
        w.end_array();
    }
    if (r.interaction_effect) {
        w.key("interaction_on_outcome_scale").begin_object();
        w.field("kind", to_string(r.interaction_effect->kind));
        write_inference(w, *r.interaction_effect);
        w.end_object();
    }
    write_texts(w, "notes", r.notes);
    write_texts(w, "cautions", r.cautions);
}

std::string probe_to_text(const ProbeResult& r, const FitResult& fit) {
    std::ostringstream o;
    write_heading(o, r, fit);
    write_effects_table(o, r, fit);
    write_regions_text(o, r);
    write_crossings_text(o, r);
    write_comparisons_text(o, r, fit);
    write_closing_text(o, r, fit);
    return o.str();
}

}  // namespace moderato
