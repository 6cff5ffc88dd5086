// The JSON a successful moderato-cli run printed: records a test failure (and
// returns an empty object) when the run failed, wrote to stderr, or printed
// something that is not JSON. And the checks every document of output_version
// 2 must pass (docs/cli-output.md).
#pragma once

#include <gtest/gtest.h>

#include <nlohmann/json.hpp>
#include <set>
#include <string>

#include "cli/cli_runner.hpp"

namespace moderato::test {

inline nlohmann::json json_output(const RunResult& r) {
    EXPECT_TRUE(r.exited && r.exit_code == 0) << r.describe();
    EXPECT_EQ(r.err, "");
    try {
        return nlohmann::json::parse(r.out);
    } catch (const std::exception& e) {
        ADD_FAILURE() << "stdout is not JSON: " << e.what() << "\n" << r.out;
        return nlohmann::json::object();
    }
}

// Every key of every object in the document, at any depth.
inline void collect_keys(const nlohmann::json& j, std::set<std::string>& keys) {
    if (j.is_object())
        for (auto it = j.begin(); it != j.end(); ++it) {
            keys.insert(it.key());
            collect_keys(it.value(), keys);
        }
    else if (j.is_array())
        for (const auto& e : j) collect_keys(e, keys);
}

// Every text value in the document, at any depth.
inline void collect_texts(const nlohmann::json& j, std::set<std::string>& texts) {
    if (j.is_string()) texts.insert(j.get<std::string>());
    else if (j.is_object() || j.is_array())
        for (const auto& e : j) collect_texts(e, texts);
}

// The vocabulary of output_version 1 that must not appear in version 2
// (the originality review; ARCHITECTURE.md "The headless CLI" has the new ones).
inline const std::set<std::string>& old_keys() {
    static const std::set<std::string> keys{"term",
                                            "estimate",
                                            "std_error",
                                            "statistic",
                                            "p_value",
                                            "ci_lower",
                                            "ci_upper",
                                            "aliased",
                                            "df_residual",
                                            "rank",
                                            "se_type",
                                            "link",
                                            "response",
                                            "n",
                                            "n_excluded",
                                            "coefficients",
                                            "r_squared",
                                            "adj_r_squared",
                                            "f_statistic",
                                            "f_p_value",
                                            "critical_t",
                                            "conditional_effects",
                                            "johnson_neyman",
                                            "simultaneous_band",
                                            "crossover",
                                            "significant_regions",
                                            "focal_value",
                                            "ci_kind",
                                            "within_observed_range"};
    return keys;
}
inline const std::set<std::string>& old_values() {
    static const std::set<std::string> values{"classical", "link", "response"};
    return values;
}

// The document's first key is "output_version": 2, and no old key or value
// appears anywhere in it.
inline void expect_version_two(const std::string& raw, const nlohmann::json& j, const std::string& what) {
    SCOPED_TRACE(what);
    EXPECT_EQ(raw.rfind("{\n  \"output_version\": 2,\n", 0), 0u) << raw.substr(0, 80);
    EXPECT_EQ(j.value("output_version", 0), 2);
    std::set<std::string> keys, texts;
    collect_keys(j, keys);
    collect_texts(j, texts);
    for (const auto& k : old_keys()) EXPECT_EQ(keys.count(k), 0u) << "old key \"" << k << "\" in " << what;
    for (const auto& v : old_values()) EXPECT_EQ(texts.count(v), 0u) << "old value \"" << v << "\" in " << what;
}

}  // namespace moderato::test
