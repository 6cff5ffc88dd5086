// Which cell styles show dates and times, and date serials as days since
// 1970-01-01 in both date systems.
#include <algorithm>
#include <cctype>
#include <charconv>
#include <cmath>
#include <cstdlib>
#include <map>

#include "reading/xlsx_workbook.hpp"

namespace moderato::xlsx_detail {

namespace {

// ECMA-376 part 1, 18.8.30 (numFmt): the built-in formats that show dates
// and times. 27-36 and 50-58 are the East Asian built-in date formats.
DateStyle builtin_style(int id) {
    if ((id >= 14 && id <= 17) || (id >= 27 && id <= 36) || (id >= 50 && id <= 58)) return DateStyle::Date;
    if (id == 22) return DateStyle::DateTime;
    if ((id >= 18 && id <= 21) || (id >= 45 && id <= 47)) return DateStyle::Time;
    return DateStyle::None;
}

std::string lower(std::string s) {
    for (char& c : s) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    return s;
}

// The format code with quoted text, escaped characters, fill and padding
// characters and the words "general", "am/pm", "a/p" taken out; [h], [m],
// [s] (elapsed time) kept as h, m, s and any other bracket dropped.
std::string code_tokens(const std::string& code, bool& ampm) {
    std::string s = lower(code), out;
    ampm = s.find("am/pm") != std::string::npos || s.find("a/p") != std::string::npos;
    for (std::size_t i = 0; i < s.size(); ++i) {
        const char c = s[i];
        if (c == '"') {
            const auto close = s.find('"', i + 1);
            i = close == std::string::npos ? s.size() : close;
        } else if (c == '\\' || c == '_' || c == '*') {
            ++i;
        } else if (c == '[') {
            const auto close = s.find(']', i + 1);
            const std::string inside = s.substr(i + 1, (close == std::string::npos ? s.size() : close) - i - 1);
            if (!inside.empty() && inside.find_first_not_of(inside[0]) == std::string::npos &&
                (inside[0] == 'h' || inside[0] == 'm' || inside[0] == 's'))
                out += inside[0];
            i = close == std::string::npos ? s.size() : close;
        } else if (s.compare(i, 7, "general") == 0) {
            i += 6;
        } else if (s.compare(i, 5, "am/pm") == 0) {
            i += 4;
        } else if (s.compare(i, 3, "a/p") == 0) {
            i += 2;
        } else {
            out += c;
        }
    }
    return out;
}

struct StylesHandler : XmlHandler {
    std::map<int, std::string> custom;
    std::vector<int> xf_formats;
    int depth_cell_xfs = 0;
    void start(std::string_view name, const char** atts) override {
        if (name == "numFmt") {
            const char* id = attribute(atts, "numFmtId");
            const char* code = attribute(atts, "formatCode");
            if (id && code) custom[std::atoi(id)] = code;
        } else if (name == "cellXfs") {
            ++depth_cell_xfs;
        } else if (name == "xf" && depth_cell_xfs > 0) {
            const char* id = attribute(atts, "numFmtId");
            xf_formats.push_back(id ? std::atoi(id) : 0);
        }
    }
    void end(std::string_view name) override {
        if (name == "cellXfs") --depth_cell_xfs;
    }
};

}  // namespace

DateStyle classify_format(int id, const std::string& code) {
    if (code.empty()) return builtin_style(id);
    bool ampm = false;
    const std::string t = code_tokens(code, ampm);
    const bool y_or_d = t.find_first_of("yd") != std::string::npos;
    const bool m = t.find('m') != std::string::npos;
    const bool time = ampm || t.find_first_of("hs") != std::string::npos;
    if (y_or_d && time) return DateStyle::DateTime;
    if (y_or_d || (m && !time)) return DateStyle::Date;
    if (time) return DateStyle::Time;
    return DateStyle::None;
}

std::vector<DateStyle> read_date_styles(const Archive& a, const std::string& part) {
    std::vector<DateStyle> out;
    if (part.empty() || !a.has(part)) return out;
    StylesHandler h;
    a.parse(part, "the styles part", h);
    out.reserve(h.xf_formats.size());
    for (const int id : h.xf_formats) {
        const auto it = h.custom.find(id);
        out.push_back(classify_format(id, it == h.custom.end() ? std::string() : it->second));
    }
    return out;
}

bool serial_to_days(double serial, bool date1904, double& days) {
    if (date1904) {
        days = serial - 24107.0;  // 1904-01-01 is 24,107 days before 1970-01-01
        return true;
    }
    if (serial >= 60.0 && serial < 61.0) return false;  // 1900-02-29
    // Serial 61 is 1900-03-01, 25,569 serials before 1970-01-01 (serial 25,569);
    // below 60 the count has no phantom day, so it is one day less behind.
    days = serial < 60.0 ? serial - 25568.0 : serial - 25569.0;
    return true;
}

}  // namespace moderato::xlsx_detail
