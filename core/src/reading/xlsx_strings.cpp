// The shared strings part: one string per <si>, the text of its <t>
// elements (plain or rich-text runs), without phonetic guides (<rPh>).
#include <algorithm>
#include <cstdlib>

#include "reading/xlsx_workbook.hpp"

namespace moderato::xlsx_detail {

namespace {

struct StringsHandler : XmlHandler {
    std::vector<std::string> strings;
    std::string current;
    bool in_si = false, in_t = false;
    int in_phonetic = 0;
    void start(std::string_view name, const char** atts) override {
        if (name == "sst") {
            const char* n = attribute(atts, "uniqueCount");
            if (n) strings.reserve(std::min<std::size_t>(std::strtoull(n, nullptr, 10), std::size_t{1} << 20));
        } else if (name == "si") {
            in_si = true;
            current.clear();
        } else if (name == "rPh") {
            ++in_phonetic;
        } else if (name == "t") {
            in_t = in_si && in_phonetic == 0;
        }
    }
    void end(std::string_view name) override {
        if (name == "si") {
            strings.push_back(current);
            in_si = false;
        } else if (name == "rPh") {
            --in_phonetic;
        } else if (name == "t") {
            in_t = false;
        }
    }
    void text(std::string_view s) override {
        if (in_t) current.append(s);
    }
};

}  // namespace

std::vector<std::string> read_shared_strings(const Archive& a, const std::string& part) {
    if (part.empty() || !a.has(part)) return {};
    StringsHandler h;
    a.parse(part, "the shared strings part", h);
    return std::move(h.strings);
}

}  // namespace moderato::xlsx_detail
