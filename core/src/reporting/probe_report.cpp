#include "moderato/reporting/probe_report.hpp"

#include <cmath>
#include <cstdio>
#include <sstream>

#include "moderato/reporting/fit_report.hpp"
#include "support/text_util.hpp"

namespace moderato {

namespace {

void write_regions(JsonWriter& w, const std::vector<Region>& regions) {
    w.key("significant_regions").begin_array();
    for (const auto& r : regions) {
        w.begin_array();
        w.value(r.lo);  // non-finite -> null (unbounded)
        w.value(r.hi);
        w.end_array();
    }
    w.end_array();
}

void write_significance(JsonWriter& w, const SignificanceRegions& s) {
    w.field("critical_value", s.critical_value);
    w.key("boundaries").begin_array();
    for (double b : s.boundaries) w.value(b);
    w.end_array();
    write_regions(w, s.significant);
    w.field("kind", kind_text(s));
}

void write_crossover(JsonWriter& w, const Crossover& c) {
    w.begin_object();
    w.field("groups", c.groups);
    w.field("focal_value", c.focal_value);
    w.field("ci_lower", c.ci_lower);
    w.field("ci_upper", c.ci_upper);
    w.field("ci_kind", to_string(c.ci_kind));
    w.field("within_observed_range", c.within_observed_range);
    w.field("form", to_string(c.form));
    w.key("group_gap").begin_object();
    write_significance(w, c.gap_regions);
    w.end_object();
    w.end_object();
}

std::string num(double v) {
    if (std::isnan(v)) return "—";
    if (std::isinf(v)) return v > 0 ? "∞" : "−∞";
    char buf[40];
    std::snprintf(buf, sizeof buf, "%.4g", v);
    return buf;
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
        else out += "from " + num(r.lo) + " to " + num(r.hi);
    }
    return out;
}

}  // namespace

void write_probe_fields(JsonWriter& w, const ProbeResult& r) {
    w.field("focal", r.focal);
    w.field("moderator", r.moderator);
    w.field("scale", to_string(r.scale));
    if (r.scale == ProbeScale::Outcome) w.field("averaging", to_string(r.averaging));
    w.field("level", r.level);
    w.field("df", r.df);
    w.field("critical_t", r.critical_t);
    if (!r.categorical_moderator) {
        w.field("moderator_mean", r.moderator_mean);
        w.field("moderator_sd", r.moderator_sd);
    }
    w.key("conditional_effects").begin_array();
    for (const auto& e : r.effects) {
        w.begin_object();
        w.field("moderator_value", e.moderator_value);
        if (!e.level.empty()) w.field("level", e.level);
        w.field("effect", e.estimate);
        w.field("std_error", e.std_error);
        w.field("statistic", e.statistic);
        w.field("p_value", e.p_value);
        w.field("ci_lower", e.ci_lower);
        w.field("ci_upper", e.ci_upper);
        w.field("beyond_data", e.beyond_data);
        w.end_object();
    }
    w.end_array();
    w.key("johnson_neyman");
    if (r.johnson_neyman) {
        w.begin_object();
        write_significance(w, *r.johnson_neyman);
        w.key("boundary_beyond_data").begin_array();
        for (bool b : r.jn_beyond_data) w.value(b);
        w.end_array();
        w.key("observed_range").begin_array().value(r.observed_range.first).value(r.observed_range.second).end_array();
        w.end_object();
    } else {
        w.null();
    }
    w.key("simultaneous_band");
    if (r.simultaneous) {
        w.begin_object();
        write_significance(w, *r.simultaneous);
        w.end_object();
    } else {
        w.null();
    }
    w.key("crossover");
    if (!r.crossovers.empty()) write_crossover(w, r.crossovers.front());
    else w.null();
    w.key("crossovers").begin_array();
    for (const auto& c : r.crossovers) write_crossover(w, c);
    w.end_array();
    w.key("focal_range").begin_array().value(r.focal_range.first).value(r.focal_range.second).end_array();
    if (r.interaction_effect) {
        const auto& ie = *r.interaction_effect;
        w.key("interaction_effect").begin_object();
        w.field("kind", to_string(ie.kind));
        w.field("estimate", ie.estimate);
        w.field("std_error", ie.std_error);
        w.field("statistic", ie.statistic);
        w.field("p_value", ie.p_value);
        w.field("ci_lower", ie.ci_lower);
        w.field("ci_upper", ie.ci_upper);
        w.end_object();
    }
    w.key("notes").begin_array();
    for (const auto& s : r.notes) w.value(s);
    w.end_array();
    w.key("cautions").begin_array();
    for (const auto& s : r.cautions) w.value(s);
    w.end_array();
}

std::string probe_to_text(const ProbeResult& r, const FitResult& fit) {
    std::ostringstream o;
    const bool response = r.scale == ProbeScale::Outcome;
    char lvl[16];
    std::snprintf(lvl, sizeof lvl, "%g%%", r.level * 100);
    o << "Effect of " << r.focal << " by " << r.moderator
      << (response ? " on the probability scale" : (fit.family == Family::Logistic ? " on the log-odds scale" : ""))
      << "\n";
    std::string se = to_string(fit.se);
    if (se.size() == 3 && se[0] == 'h') se = "HC" + se.substr(2);
    o << "Standard errors: " << se << " · " << lvl << " intervals · "
      << (std::isinf(r.df) ? std::string("z") : "t with " + detail::fmt_num(r.df) + " df") << " · n = " << fit.n
      << "\n";
    if (!r.categorical_moderator)
        o << r.moderator << " observed from " << num(r.observed_range.first) << " to " << num(r.observed_range.second)
          << " (mean " << num(r.moderator_mean) << ", SD " << num(r.moderator_sd) << ")\n";
    o << "\n";
    char line[256];
    std::snprintf(line, sizeof line, "%-18s %11s %11s %8s %10s %11s %11s\n",
                  r.categorical_moderator ? "level" : "moderator", "effect", "std. error", std::isinf(r.df) ? "z" : "t",
                  "p-value", "CI low", "CI high");
    o << line;
    for (const auto& e : r.effects) {
        const std::string at = e.level.empty() ? num(e.moderator_value) + (e.beyond_data ? " *" : "") : e.level;
        std::snprintf(line, sizeof line, "%-18s %11s %11s %8.2f %10s %11s %11s\n", at.c_str(), num(e.estimate).c_str(),
                      num(e.std_error).c_str(), e.statistic, format_p(e.p_value).c_str(), num(e.ci_lower).c_str(),
                      num(e.ci_upper).c_str());
        o << line;
    }
    bool beyond = false;
    for (const auto& e : r.effects) beyond |= e.beyond_data;
    if (beyond) o << "  * beyond the data (extrapolation)\n";
    if (r.johnson_neyman) {
        o << "\nRegion of significance (Johnson–Neyman, pointwise " << lvl << "): the effect differs from zero "
          << (r.johnson_neyman->significant.empty()
                  ? "nowhere"
                  : "for " + r.moderator + " " + regions_text(r.johnson_neyman->significant))
          << "\n";
        if (r.scale == ProbeScale::Outcome) o << "  (" << kind_text(*r.johnson_neyman) << ")\n";
        for (std::size_t i = 0; i < r.johnson_neyman->boundaries.size(); ++i)
            o << "  boundary " << num(r.johnson_neyman->boundaries[i])
              << (r.jn_beyond_data[i] ? "  (beyond the data)" : "") << "\n";
    }
    if (r.simultaneous)
        o << "Simultaneous band (critical value " << num(r.simultaneous->critical_value) << "): "
          << (r.simultaneous->significant.empty() ? std::string("nowhere")
                                                  : r.moderator + " " + regions_text(r.simultaneous->significant))
          << "\n";
    for (const auto& c : r.crossovers) {
        o << "\nCrossover (" << c.groups << "): ";
        if (c.ci_kind == FiellerInterval::None) {
            o << "the lines do not cross (parallel or curved)\n";
            continue;
        }
        o << r.focal << " = " << num(c.focal_value) << ", " << lvl << " Fieller interval ";
        if (c.ci_kind == FiellerInterval::Bounded) o << "[" << num(c.ci_lower) << ", " << num(c.ci_upper) << "]";
        else if (c.ci_kind == FiellerInterval::WholeLine) o << "the whole line";
        else o << "outside (" << num(c.ci_lower) << ", " << num(c.ci_upper) << ")";
        o << " — " << (c.within_observed_range ? "inside" : "outside") << " the observed " << r.focal << " range ("
          << num(r.focal_range.first) << " to " << num(r.focal_range.second) << "): " << to_string(c.form) << "\n";
        o << "  the groups differ for " << r.focal << " " << regions_text(c.gap_regions.significant) << "\n";
    }
    if (r.interaction_effect) {
        const auto& ie = *r.interaction_effect;
        o << "\nInteraction on the probability scale (" << to_string(ie.kind) << ", Ai & Norton): " << num(ie.estimate)
          << " (SE " << num(ie.std_error) << ", p " << format_p(ie.p_value) << ", CI " << num(ie.ci_lower) << " to "
          << num(ie.ci_upper) << ")\n";
    }
    if (!r.notes.empty()) {
        o << "\nNotes:\n";
        for (const auto& s : r.notes) o << "  - " << s << "\n";
    }
    o << "\nCautions:\n";
    for (const auto& s : r.cautions) o << "  ! " << s << "\n";
    return o.str();
}

}  // namespace moderato
