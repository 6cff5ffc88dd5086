// The JSON a successful moderato-cli run printed: records a test failure (and
// returns an empty object) when the run failed, wrote to stderr, or printed
// something that is not JSON.
#pragma once

#include <gtest/gtest.h>

#include <nlohmann/json.hpp>

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

}  // namespace moderato::test
