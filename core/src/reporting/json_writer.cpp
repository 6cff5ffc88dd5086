#include "moderato/reporting/json_writer.hpp"

#include <cmath>
#include <cstdio>

#include "reading/csv_internal.hpp"

namespace moderato {

std::string JsonWriter::number(double v) {
    if (!std::isfinite(v)) return "null";
    if (v == 0) return std::signbit(v) ? "-0" : "0";
    char buf[40];
    std::snprintf(buf, sizeof buf, "%.17g", v);
    return buf;
}

std::string JsonWriter::quote(const std::string& text) {
    // JSON text is UTF-8 (RFC 8259): a byte that does not start a valid UTF-8
    // sequence (a file name in another encoding, say) is written as U+FFFD.
    std::string s;
    s.reserve(text.size());
    for (const char* p = text.data(); p < text.data() + text.size();) {
        const char* bad = csv_detail::find_invalid_utf8(p, text.data() + text.size());
        if (!bad) {
            s.append(p, text.data() + text.size());
            break;
        }
        s.append(p, bad);
        s += "\xEF\xBF\xBD";
        p = bad + 1;
    }
    std::string out;
    out.reserve(s.size() + 2);
    out += '"';
    for (unsigned char c : s) {
        switch (c) {
            case '"':
                out += "\\\"";
                break;
            case '\\':
                out += "\\\\";
                break;
            case '\n':
                out += "\\n";
                break;
            case '\r':
                out += "\\r";
                break;
            case '\t':
                out += "\\t";
                break;
            case '\b':
                out += "\\b";
                break;
            case '\f':
                out += "\\f";
                break;
            default:
                if (c < 0x20) {
                    char buf[8];
                    std::snprintf(buf, sizeof buf, "\\u%04x", c);
                    out += buf;
                } else {
                    out += static_cast<char>(c);
                }
        }
    }
    out += '"';
    return out;
}

void JsonWriter::newline() {
    if (indent_ <= 0) return;
    out_ += '\n';
    out_.append(first_.size() * static_cast<std::size_t>(indent_), ' ');
}

void JsonWriter::before_value() {
    if (after_key_) {
        after_key_ = false;
        return;
    }
    if (!first_.empty()) {
        if (!first_.back()) out_ += ',';
        first_.back() = false;
        newline();
    }
}

JsonWriter& JsonWriter::begin_object() {
    before_value();
    out_ += '{';
    first_.push_back(true);
    return *this;
}

JsonWriter& JsonWriter::end_object() {
    const bool empty = first_.back();
    first_.pop_back();
    if (!empty) newline();
    out_ += '}';
    if (first_.empty() && indent_ > 0) out_ += '\n';
    return *this;
}

JsonWriter& JsonWriter::begin_array() {
    before_value();
    out_ += '[';
    first_.push_back(true);
    return *this;
}

JsonWriter& JsonWriter::end_array() {
    const bool empty = first_.back();
    first_.pop_back();
    if (!empty) newline();
    out_ += ']';
    if (first_.empty() && indent_ > 0) out_ += '\n';
    return *this;
}

JsonWriter& JsonWriter::key(const std::string& k) {
    before_value();
    out_ += quote(k);
    out_ += indent_ > 0 ? ": " : ":";
    after_key_ = true;
    return *this;
}

JsonWriter& JsonWriter::value(double v) {
    before_value();
    out_ += number(v);
    return *this;
}

JsonWriter& JsonWriter::value(long long v) {
    before_value();
    out_ += std::to_string(v);
    return *this;
}

JsonWriter& JsonWriter::value(bool v) {
    before_value();
    out_ += v ? "true" : "false";
    return *this;
}

JsonWriter& JsonWriter::value(const std::string& v) {
    before_value();
    out_ += quote(v);
    return *this;
}

JsonWriter& JsonWriter::null() {
    before_value();
    out_ += "null";
    return *this;
}

}  // namespace moderato
