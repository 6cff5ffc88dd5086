// Command-line arguments: "--name value", "--name=value" and flags; options
// may repeat. Unknown options and missing values are usage errors.
#pragma once

#include <map>
#include <optional>
#include <set>
#include <string>
#include <vector>

namespace moderato::cli {

class Arguments {
public:
    // `flags`: options without a value; `valued`: options that take one;
    // `repeatable`: valued options that may be given more than once.
    Arguments(const std::vector<std::string>& args, const std::set<std::string>& flags,
              const std::set<std::string>& valued, const std::set<std::string>& repeatable = {});

    bool has(const std::string& name) const { return values_.count(name) > 0; }
    std::optional<std::string> get(const std::string& name) const;  // last occurrence
    std::vector<std::string> all(const std::string& name) const;    // every occurrence
    std::string required(const std::string& name) const;
    std::vector<std::string> positional;

private:
    std::map<std::string, std::vector<std::string>> values_;
};

// "a,b,c" -> {"a","b","c"}; empty parts are a usage error naming the option.
std::vector<std::string> split_list(const std::string& text, const std::string& option);
double parse_double(const std::string& text, const std::string& option);
// A whole number in [lo, hi]; usage error naming the option otherwise.
long long parse_integer(const std::string& text, const std::string& option, long long lo, long long hi);

}  // namespace moderato::cli
