// Accuracy on the NIST StRD linear least-squares datasets through the
// moderato-cli process and its JSON output. Check values: NIST StRD certified
// values (../shared/reference/nist-strd/*.json, read at run time).
#include <gtest/gtest.h>

#include <array>
#include <cstdio>
#include <memory>
#include <nlohmann/json.hpp>
#include <string>

#include "common/nist.hpp"
#include "common/shell_command.hpp"

using namespace moderato::test;

TEST(NistStrdCli, JsonOutputMeetsCertifiedDigits) {
    ASSERT_TRUE(nist_available()) << nist_missing_message();
    std::printf("\nNIST StRD through moderato-cli fit --format json: minimum LRE\n");
    std::printf("%-9s %7s %7s %7s %7s %9s\n", "dataset", "coef", "SE", "res.SD", "R²", "required");
    for (const auto& name : nist_datasets()) {
        const NistCase c = load_nist(name);
        std::string cmd =
            std::string(MODERATO_CLI) + " fit --format json --data " + shell_quote(c.csv.string()) + " --outcome y";
        if (!c.intercept) cmd += " --no-intercept";
        if (c.degree < 0) {
            std::string list;
            for (const auto& p : c.predictors) list += (list.empty() ? "" : ",") + p;
            cmd += " --predictors " + list;
        } else {
            cmd += " --poly x=" + std::to_string(c.degree);
        }
        int status = 0;
        const std::string out = run_command(cmd + " 2>/dev/null", &status);
        ASSERT_EQ(status, 0) << cmd;
        const auto j = nlohmann::json::parse(out);
        double coef = 15, se = 15;
        ASSERT_EQ(j.at("output_version"), 2) << name;
        ASSERT_EQ(j.at("terms").size(), c.coefficients.size()) << name;
        for (std::size_t k = 0; k < c.coefficients.size(); ++k) {
            const std::string term = nist_term(c, k);
            bool found = false;
            for (const auto& row : j.at("terms"))
                if (row.at("name") == term) {
                    found = true;
                    coef = std::min(coef, lre(row.at("value").get<double>(), c.coefficients[k]));
                    se = std::min(se, lre(row.at("se").get<double>(), c.standard_errors[k]));
                }
            EXPECT_TRUE(found) << name << " " << term;
        }
        const double sd = lre(j.at("residual_sd").get<double>(), c.residual_sd);
        const double r2 = lre(j.at("r2").get<double>(), c.r_squared);
        const double need = nist_required_lre(name);
        std::printf("%-9s %7.2f %7.2f %7.2f %7.2f %9.0f\n", name.c_str(), coef, se, sd, r2, need);
        EXPECT_GE(coef, need) << name;
        EXPECT_GE(se, need) << name;
        EXPECT_GE(sd, need) << name;
        EXPECT_GE(r2, need) << name;
    }
}
