#include "moderato/reporting/bootstrap_report.hpp"

#include <cmath>
#include <cstdio>
#include <sstream>

#include "moderato/reporting/output_json.hpp"
#include "moderato/support/report_text.hpp"
#include "support/text_util.hpp"

namespace moderato {

namespace {

void write_bounds(JsonWriter& w, const char* key, double low, double high) {
    w.key(key).begin_object();
    w.field("low", low);
    w.field("high", high);
    w.end_object();
}

// One bootstrapped quantity: its full-sample value, bootstrap SE, and the
// percentile and BCa intervals.
void write_resampled(JsonWriter& w, const ProbeBootstrap& b, std::size_t k) {
    const auto& iv = b.result.intervals[k];
    w.begin_object();
    w.field("label", b.labels[k]);
    w.field("kind", to_string(b.kinds[k]));
    if (b.kinds[k] == ProbeStatistic::Effect) w.field("moderator_value", b.at[k]);
    w.field("value", iv.estimate);
    w.field("se", iv.std_error);
    write_bounds(w, "percentile", iv.percentile_lower, iv.percentile_upper);
    write_bounds(w, "bca", iv.bca_lower, iv.bca_upper);
    w.field("valid_replicates", iv.valid_replicates);
    w.end_object();
}

}  // namespace

void write_probe_bootstrap(JsonWriter& w, const ProbeBootstrap& b) {
    const auto& r = b.result;
    w.begin_object();
    w.field("replicates", r.requested);
    w.field("completed", r.completed);
    w.field("seed", static_cast<long long>(b.seed));
    w.field("resampling", resampling_text(r));
    w.field("level", r.level);
    w.field("jackknife", jackknife_text(r));
    w.key("failures").begin_array();
    for (const auto& [reason, count] : r.failures) {
        w.begin_object();
        w.field("reason", reason);
        w.field("replicates", count);
        w.end_object();
    }
    w.end_array();
    w.key("resampled").begin_array();
    for (std::size_t k = 0; k < b.labels.size() && k < r.intervals.size(); ++k) write_resampled(w, b, k);
    w.end_array();
    write_texts(w, "warnings", r.warnings);
    w.end_object();
}

std::string probe_bootstrap_to_text(const ProbeBootstrap& b) {
    const auto& r = b.result;
    std::ostringstream o;
    char line[320];
    o << "\nBootstrap (" << resampling_text(r) << ", " << r.completed << " of " << r.requested << " replicates, seed "
      << b.seed << "; " << level_text(r.level) << " intervals):\n";
    // value, intervals, SE: the order of every estimate table of ours.
    std::snprintf(line, sizeof line, "  %-44s %11s %23s %23s %11s\n", "", "value", "percentile", "BCa", "boot. SE");
    o << line;
    for (std::size_t k = 0; k < b.labels.size() && k < r.intervals.size(); ++k) {
        const auto& iv = r.intervals[k];
        const std::string pct = format_range(iv.percentile_lower, iv.percentile_upper);
        const std::string bca = format_range(iv.bca_lower, iv.bca_upper);
        std::snprintf(line, sizeof line, "  %-44s %11s %23s %23s %11s\n", b.labels[k].c_str(),
                      format_sig(iv.estimate).c_str(), pct.c_str(), bca.c_str(), format_sig(iv.std_error).c_str());
        o << line;
    }
    for (const auto& [reason, count] : r.failures) o << "  failed replicates: " << count << " (" << reason << ")\n";
    for (const auto& s : r.warnings) o << "  ! " << s << "\n";
    return o.str();
}

}  // namespace moderato
