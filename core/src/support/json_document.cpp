// JSON documents from untrusted text: the depth is bounded before parsing,
// and parsing goes through a SAX handler that remembers where it is, so a
// failure names the JSON path as well as the line and column.
#include "support/json_document.hpp"

#include <algorithm>
#include <vector>

#include "moderato/support/error.hpp"

namespace moderato::detail {

using nlohmann::json;

namespace {

// Byte offset of the first '[' or '{' that opens level kMaxJsonDepth + 1
// (outside strings), or npos. Strings are skipped with their escapes; text
// that is not JSON is left for the parser to describe.
std::size_t too_deep_at(const std::string& text) {
    std::size_t depth = 0;
    bool in_string = false;
    for (std::size_t i = 0; i < text.size(); ++i) {
        const char c = text[i];
        if (in_string) {
            if (c == '\\') ++i;
            else if (c == '"') in_string = false;
        } else if (c == '"') {
            in_string = true;
        } else if (c == '[' || c == '{') {
            if (++depth > kMaxJsonDepth) return i;
        } else if ((c == ']' || c == '}') && depth > 0) {
            --depth;
        }
    }
    return std::string::npos;
}

// The DOM builder of nlohmann::json, plus the path of the value being read
// and the first error the parser reports (instead of an exception).
class PathSax {
public:
    using dom_t = nlohmann::detail::json_sax_dom_parser<json>;

    explicit PathSax(json& root) : dom_(root, false) {}

    bool null() { return done(dom_.null()); }
    bool boolean(bool v) { return done(dom_.boolean(v)); }
    bool number_integer(json::number_integer_t v) { return done(dom_.number_integer(v)); }
    bool number_unsigned(json::number_unsigned_t v) { return done(dom_.number_unsigned(v)); }
    bool number_float(json::number_float_t v, const json::string_t& s) { return done(dom_.number_float(v, s)); }
    bool string(json::string_t& v) { return done(dom_.string(v)); }
    bool binary(json::binary_t& v) { return done(dom_.binary(v)); }
    bool start_object(std::size_t n) {
        frames_.push_back({false, 0, {}});
        return dom_.start_object(n);
    }
    bool key(json::string_t& k) {
        frames_.back().key = k;
        return dom_.key(k);
    }
    bool end_object() { return close(dom_.end_object()); }
    bool start_array(std::size_t n) {
        frames_.push_back({true, 0, {}});
        return dom_.start_array(n);
    }
    bool end_array() { return close(dom_.end_array()); }
    bool parse_error(std::size_t position, const std::string& token, const nlohmann::detail::exception& e) {
        failed_ = true;
        position_ = position;
        token_ = token;
        id_ = e.id;
        reason_ = e.what();
        return false;
    }

    bool failed() const { return failed_; }
    std::size_t position() const { return position_; }
    const std::string& token() const { return token_; }
    int id() const { return id_; }
    const std::string& reason() const { return reason_; }

    // "analyses[2].probe.pinned[0]"; empty at the top level.
    std::string path() const {
        std::string out;
        for (const auto& f : frames_) {
            if (f.array) out += "[" + std::to_string(f.index) + "]";
            else if (!f.key.empty()) out += (out.empty() ? "" : ".") + f.key;
        }
        return out;
    }

private:
    struct Frame {
        bool array;
        std::size_t index;
        std::string key;
    };

    // A value is complete: the next one in a list has the next index.
    bool done(bool ok) {
        if (!frames_.empty()) {
            if (frames_.back().array) ++frames_.back().index;
            else frames_.back().key.clear();
        }
        return ok;
    }
    bool close(bool ok) {
        frames_.pop_back();
        return done(ok);
    }

    dom_t dom_;
    std::vector<Frame> frames_;
    bool failed_ = false;
    std::size_t position_ = 0;
    std::string token_;
    int id_ = 0;
    std::string reason_;
};

std::string place(const std::string& text, const std::string& name, std::size_t at, const std::string& path) {
    const auto [line, column] = line_and_column(text, at);
    return name + ": line " + std::to_string(line) + ", column " + std::to_string(column) +
           (path.empty() ? std::string() : " (at " + path + ")");
}

[[noreturn]] void report(const std::string& text, const std::string& name, const std::string& kind,
                         const PathSax& sax) {
    if (sax.id() == 406) {  // out_of_range: a number beyond a double; the position is just past it
        const std::size_t length = std::min(sax.token().size(), sax.position());
        throw InputError(place(text, name, sax.position() - length, sax.path()) + ": the number " + sax.token() +
                         " is too large to hold (a number must lie within about ±1.8e308); the file was not changed");
    }
    // The position counts the bytes read up to and including the offending
    // one (one past the end for text that stops too early).
    std::string reason = sax.reason();
    const auto colon = reason.find(": ");
    if (colon != std::string::npos && reason.find("parse error") != std::string::npos)
        reason = reason.substr(colon + 2);
    throw InputError(place(text, name, sax.position() > 0 ? sax.position() - 1 : 0, sax.path()) +
                     ": the file is not valid JSON, so it is not " + kind + " (" + reason + ")");
}

}  // namespace

std::pair<std::size_t, std::size_t> line_and_column(const std::string& text, std::size_t at) {
    at = std::min(at, text.size());
    std::size_t line = 1, column = 1;
    for (std::size_t i = 0; i < at; ++i) {
        const auto c = static_cast<unsigned char>(text[i]);
        if (c == '\n') {
            ++line;
            column = 1;
        } else if ((c & 0xC0) != 0x80) {  // not a UTF-8 continuation byte
            ++column;
        }
    }
    return {line, column};
}

json parse_json_document(const std::string& text, const std::string& name, const std::string& kind) {
    if (const std::size_t deep = too_deep_at(text); deep != std::string::npos)
        throw InputError(place(text, name, deep, "") + ": lists and objects nest more than " +
                         std::to_string(kMaxJsonDepth) + " levels deep here, so it is not " + kind +
                         " (which nests a few levels); the file was not changed");
    json doc;
    PathSax sax(doc);
    const bool ok = json::sax_parse(text, &sax, json::input_format_t::json, true);
    if (sax.failed()) report(text, name, kind, sax);
    if (!ok) throw InputError(name + ": the file is not valid JSON, so it is not " + kind);
    return doc;
}

}  // namespace moderato::detail
