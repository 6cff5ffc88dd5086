// A small streaming JSON writer: keys in the order written, numbers with 17
// significant digits (nothing lost in a round trip), non-finite numbers as
// null, strings escaped per RFC 8259.
#pragma once

#include <optional>
#include <string>
#include <vector>

namespace moderato {

class JsonWriter {
public:
    explicit JsonWriter(int indent = 2) : indent_(indent) {}

    JsonWriter& begin_object();
    JsonWriter& end_object();
    JsonWriter& begin_array();
    JsonWriter& end_array();
    JsonWriter& key(const std::string& k);
    JsonWriter& value(double v);
    JsonWriter& value(long long v);
    JsonWriter& value(std::size_t v) { return value(static_cast<long long>(v)); }
    JsonWriter& value(int v) { return value(static_cast<long long>(v)); }
    JsonWriter& value(bool v);
    JsonWriter& value(const std::string& v);
    JsonWriter& value(const char* v) { return value(std::string(v)); }
    JsonWriter& null();
    JsonWriter& value(std::optional<double> v) { return v ? value(*v) : null(); }

    template <class T>
    JsonWriter& field(const std::string& k, const T& v) {
        key(k);
        return value(v);
    }

    const std::string& str() const { return out_; }

    static std::string number(double v);  // "%.17g" or "null"
    // A JSON string; bytes that are not UTF-8 are written as U+FFFD.
    static std::string quote(const std::string& s);

private:
    void before_value();
    void newline();
    std::string out_;
    std::vector<bool> first_;  // per open container: nothing written yet
    bool after_key_ = false;
    int indent_;
};

}  // namespace moderato
