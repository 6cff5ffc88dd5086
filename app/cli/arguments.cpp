#include "arguments.hpp"

#include <charconv>
#include <cmath>

#include "moderato/support/error.hpp"

namespace moderato::cli {

namespace {

// Options that were renamed: the old spelling is refused with the new one.
std::string renamed_option_message(const std::string& name) {
    if (name == "at")
        return "option --at is now called --moderator-values (probe: --moderator-values v1,v2,...); see "
               "moderato-cli --help";
    if (name == "at-percentiles")
        return "option --at-percentiles is now called --moderator-percentiles (probe: --moderator-percentiles "
               "10,50,90); see moderato-cli --help";
    return "";
}

}  // namespace

Arguments::Arguments(const std::vector<std::string>& args, const std::set<std::string>& flags,
                     const std::set<std::string>& valued, const std::set<std::string>& repeatable) {
    for (std::size_t i = 0; i < args.size(); ++i) {
        const std::string& a = args[i];
        if (a.rfind("--", 0) != 0 || a == "--") {
            positional.push_back(a);
            continue;
        }
        std::string name = a.substr(2), value;
        bool inline_value = false;
        if (auto eq = name.find('='); eq != std::string::npos) {
            value = name.substr(eq + 1);
            name = name.substr(0, eq);
            inline_value = true;
        }
        if (flags.count(name)) {
            if (inline_value) throw InputError("option --" + name + " takes no value");
            if (values_.count(name)) throw InputError("option --" + name + " is given twice");
            values_[name].push_back("");
        } else if (valued.count(name)) {
            if (!inline_value) {
                if (i + 1 >= args.size()) throw InputError("option --" + name + " needs a value");
                value = args[++i];
            }
            if (values_.count(name) && !repeatable.count(name))
                throw InputError("option --" + name + " is given twice ('" + values_[name].front() + "' and '" + value +
                                 "'); give it once");
            values_[name].push_back(value);
        } else if (const std::string renamed = renamed_option_message(name); !renamed.empty()) {
            throw InputError(renamed);
        } else {
            throw InputError("unknown option --" + name + "; see moderato-cli --help");
        }
    }
}

std::optional<std::string> Arguments::get(const std::string& name) const {
    auto it = values_.find(name);
    if (it == values_.end()) return std::nullopt;
    return it->second.back();
}

std::vector<std::string> Arguments::all(const std::string& name) const {
    auto it = values_.find(name);
    return it == values_.end() ? std::vector<std::string>{} : it->second;
}

std::string Arguments::required(const std::string& name) const {
    auto v = get(name);
    if (!v || v->empty()) throw InputError("option --" + name + " is required");
    return *v;
}

std::vector<std::string> split_list(const std::string& text, const std::string& option) {
    std::vector<std::string> out;
    std::size_t start = 0;
    while (true) {
        const std::size_t comma = text.find(',', start);
        std::string part = text.substr(start, comma == std::string::npos ? std::string::npos : comma - start);
        if (part.empty()) throw InputError("option --" + option + " has an empty name in '" + text + "'");
        out.push_back(part);
        if (comma == std::string::npos) break;
        start = comma + 1;
    }
    return out;
}

double parse_double(const std::string& text, const std::string& option) {
    double v = 0;
    auto [p, ec] = std::from_chars(text.data(), text.data() + text.size(), v);
    if (ec != std::errc() || p != text.data() + text.size() || !std::isfinite(v))
        throw InputError("option --" + option + " needs a number, got '" + text + "'");
    return v;
}

long long parse_integer(const std::string& text, const std::string& option, long long lo, long long hi) {
    long long v = 0;
    auto [p, ec] = std::from_chars(text.data(), text.data() + text.size(), v);
    if (ec != std::errc() || p != text.data() + text.size() || v < lo || v > hi)
        throw InputError("option --" + option + " needs a whole number from " + std::to_string(lo) + " to " +
                         std::to_string(hi) + ", got '" + text + "'");
    return v;
}

}  // namespace moderato::cli
