#include "moderato/reporting/linearity_report.hpp"

#include <cstdio>
#include <sstream>

#include "moderato/reporting/output_json.hpp"
#include "moderato/support/report_text.hpp"
#include "support/text_util.hpp"

namespace moderato {

namespace {

void write_bin(JsonWriter& w, const EffectBin& b) {
    w.begin_object();
    w.field("moderator_value", b.moderator_value);
    w.field("effect", b.estimate);
    w.field("se", b.std_error);
    w.field("low", b.ci_lower);
    w.field("high", b.ci_upper);
    w.field("p", b.p_value);
    w.field("rows", b.rows);
    write_pair(w, "range", {b.min, b.max});
    write_pair(w, "cuts", {b.lower, b.upper});
    w.field("straight_line_effect", b.linear.estimate);
    w.field("thin", b.thin);
    w.end_object();
}

void write_test(JsonWriter& w, const LinearityTest& t) {
    w.key("linearity_test").begin_object();
    const bool chi = std::isinf(t.df2);
    w.field("distribution", chi ? "chi-square" : "F");
    w.field("value", chi ? t.chi_square : t.statistic);
    w.field("df1", t.df1);
    w.key("df2");
    if (chi) w.null();
    else w.value(t.df2);
    w.field("p", t.p_value);
    w.field("covariance", to_string(t.covariance));
    w.end_object();
}

std::string line(const char* format, auto... args) {
    char buf[400];
    std::snprintf(buf, sizeof buf, format, args...);
    return buf;
}

void texts(std::ostringstream& o, const std::vector<std::string>& notes, const std::vector<std::string>& cautions) {
    for (const auto& n : notes) o << "  " << n << "\n";
    for (const auto& c : cautions) o << "  Caution: " << c << "\n";
}

}  // namespace

void write_binned(JsonWriter& w, const BinnedEffects& b) {
    w.begin_object();
    w.field("focal", b.focal);
    w.field("moderator", b.moderator);
    w.field("scale", "model");
    w.field("count", b.bins.size());
    w.field("level", b.level);
    write_numbers(w, "cut_points", b.cuts);
    w.key("bins").begin_array();
    for (const auto& bin : b.bins) write_bin(w, bin);
    w.end_array();
    write_test(w, b.linearity);
    w.field("straight_line_contradicted", b.linear_contradicted);
    w.field("sentence", linearity_sentence(b));
    write_texts(w, "notes", b.notes);
    write_texts(w, "cautions", b.cautions);
    w.end_object();
}

void write_smooth(JsonWriter& w, const SmoothEffects& s) {
    w.begin_object();
    w.field("focal", s.focal);
    w.field("moderator", s.moderator);
    w.field("scale", "model");
    w.field("bandwidth", s.bandwidth);
    w.field("bandwidth_method", to_string(s.method));
    w.key("folds");
    if (s.method == BandwidthMethod::CrossValidation) w.value(s.folds);
    else w.null();
    w.key("cross_validation").begin_array();
    for (const auto& c : s.scores) {
        w.begin_object();
        w.field("bandwidth", c.bandwidth);
        w.field("mean_squared_error", c.score);
        w.end_object();
    }
    w.end_array();
    w.field("replicates", s.replicates);
    w.field("failed_replicates", s.failed_replicates);
    w.field("seed", static_cast<long long>(s.seed));
    w.field("level", s.level);
    w.key("points").begin_array();
    for (const auto& p : s.points) {
        w.begin_object();
        w.field("moderator_value", p.moderator_value);
        w.field("effect", p.effect);
        w.field("low", p.low);
        w.field("high", p.high);
        w.field("effective_rows", p.effective_rows);
        w.field("thin", p.thin);
        w.end_object();
    }
    w.end_array();
    write_texts(w, "notes", s.notes);
    write_texts(w, "cautions", s.cautions);
    w.end_object();
}

void write_common_support(JsonWriter& w, const CommonSupport& s) {
    w.begin_object();
    w.field("focal", s.focal);
    w.field("moderator", s.moderator);
    w.field("rows", s.rows);
    w.field("rule", s.rule);
    write_numbers(w, "moderator_edges", s.moderator_edges);
    if (s.binary_focal) {
        std::vector<double> zero(s.counts_zero.begin(), s.counts_zero.end()),
            one(s.counts_one.begin(), s.counts_one.end());
        write_numbers(w, "counts_focal_0", zero);
        write_numbers(w, "counts_focal_1", one);
    } else {
        write_numbers(w, "focal_edges", s.focal_edges);
        w.key("joint_counts").begin_array();
        for (Eigen::Index r = 0; r < s.joint.rows(); ++r) {
            w.begin_array();
            for (Eigen::Index c = 0; c < s.joint.cols(); ++c) w.value(s.joint(r, c));
            w.end_array();
        }
        w.end_array();
    }
    write_intervals(w, "thin_stretches", s.thin);
    w.end_object();
}

std::string binned_to_text(const BinnedEffects& b) {
    std::ostringstream o;
    o << "\nBinned effects of " << b.focal << " across " << b.moderator << " (" << b.bins.size()
      << " bins at its quantiles" << (b.family == Family::Logistic ? ", log-odds scale" : "") << "):\n";
    o << line("  %-4s %-24s %7s %11s %11s %25s %15s\n", "bin", "range", "rows", "at median", "effect",
              (level_text(b.level) + " interval").c_str(), "straight line");
    for (std::size_t j = 0; j < b.bins.size(); ++j) {
        const auto& e = b.bins[j];
        o << line("  %-4zu %-24s %7s %11s %11s %25s %15s%s\n", j + 1, format_range(e.min, e.max).c_str(),
                  format_count(static_cast<long long>(e.rows)).c_str(), format_sig(e.moderator_value).c_str(),
                  format_sig(e.estimate).c_str(), format_range(e.ci_lower, e.ci_upper).c_str(),
                  format_sig(e.linear.estimate).c_str(), e.thin ? "  (few rows)" : "");
    }
    o << "  " << linearity_sentence(b) << ".\n";
    texts(o, b.notes, b.cautions);
    return o.str();
}

std::string smooth_to_text(const SmoothEffects& s, std::size_t step) {
    std::ostringstream o;
    o << "\nSmooth effect of " << s.focal << " across " << s.moderator << " (kernel, bandwidth "
      << format_sig(s.bandwidth) << ", " << to_string(s.method)
      << (s.family == Family::Logistic ? "; log-odds scale" : "") << "):\n";
    o << line("  %11s %11s %25s %15s\n", s.moderator.c_str(), "effect", (level_text(s.level) + " band").c_str(),
              "effective rows");
    for (std::size_t g = 0; g < s.points.size(); ++g) {
        if (g % step != 0 && g + 1 != s.points.size()) continue;
        const auto& p = s.points[g];
        o << line("  %11s %11s %25s %15s%s\n", format_sig(p.moderator_value).c_str(), format_sig(p.effect).c_str(),
                  format_range(p.low, p.high).c_str(), format_sig(p.effective_rows).c_str(),
                  p.thin ? "  (few rows)" : "");
    }
    texts(o, s.notes, s.cautions);
    return o.str();
}

std::string common_support_to_text(const CommonSupport& s) {
    std::ostringstream o;
    o << "\nCommon support of " << s.focal << " across " << s.moderator << ": ";
    if (s.thin.empty()) o << "no thin stretch.\n";
    else {
        std::vector<std::string> parts;
        for (const auto& r : s.thin) parts.push_back(format_range(r.lo, r.hi));
        o << "thin where " << s.moderator << " is " << detail::join_and(parts) << ".\n";
    }
    o << "  Rule: " << s.rule << ".\n";
    return o.str();
}

}  // namespace moderato
