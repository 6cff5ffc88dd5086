#include "mixed_random_part.hpp"

#include <algorithm>

#include "moderato/estimation/mixed_df.hpp"
#include "moderato/support/error.hpp"
#include "support/text_util.hpp"

namespace moderato::detail {

namespace {

void check_options(const ModelSpec& spec) {
    const std::string& g = spec.multilevel.groups;
    if (spec.family != Family::Linear)
        throw InputError("a multilevel model (groups " + quoted(g) + ") is offered for a linear outcome only");
    if (spec.se != SeKind::Classical || !spec.cluster.empty())
        throw InputError("a multilevel model (groups " + quoted(g) +
                         ") takes its standard errors from the model; drop the standard-error choice and the "
                         "cluster column");
    if (!spec.weights.empty())
        throw InputError("a multilevel model (groups " + quoted(g) + ") does not take weights; drop " +
                         quoted(spec.weights));
}

// The design column of a random slope, after its checks.
int slope_column(const Design& d, const std::string& groups, const std::string& s) {
    const std::string what = "random slope for " + quoted(s) + ": ";
    if (d.categorical(s))
        throw InputError(what +
                         "the column is categorical; random slopes are offered for numeric columns (a "
                         "two-level column coded 0/1 can take one)");
    const int j = d.main_column(s);
    if (j < 0)
        throw InputError(what +
                         "it is not a predictor of the model; a random slope lets a predictor's slope "
                         "differ between groups, so add " +
                         quoted(s) + " to the predictors first");
    const auto col = d.X.col(j);
    if ((col.array() == col[0]).all())
        throw InputError(what + "the column is constant in the used rows, so it has no slope to vary");
    if (constant_within_groups(d.X, j, d.group, d.group_names.size()))
        throw InputError(what + "it does not vary within any group of " + quoted(groups) +
                         ", so its slope cannot differ between groups (it is a group-level column); drop the "
                         "random slope");
    return j;
}

// Each product of `slope`'s column with other factors: the product's column
// and the column of those other factors (-1 when the design has none).
std::vector<std::pair<int, int>> slope_products(const Design& d, int slope) {
    std::vector<std::pair<int, int>> out;
    const Atom& s = d.columns[static_cast<std::size_t>(slope)].atoms.front();
    for (std::size_t j = 0; j < d.columns.size(); ++j) {
        std::vector<Atom> rest = d.columns[j].atoms;
        const auto it = std::find(rest.begin(), rest.end(), s);
        if (rest.size() < 2 || it == rest.end()) continue;
        rest.erase(it);
        out.emplace_back(static_cast<int>(j), d.column_of(rest));
    }
    return out;
}

// The slope's column and its products with group-level columns only.
std::vector<int> cross_level_products(const Design& d, int slope) {
    std::vector<int> out{slope};
    for (const auto [j, r] : slope_products(d, slope))
        if (r >= 0 && constant_within_groups(d.X, r, d.group, d.group_names.size())) out.push_back(j);
    return out;
}

}  // namespace

RandomPart random_part(const Design& d, const ModelSpec& spec) {
    check_options(spec);
    const auto& ml = spec.multilevel;
    RandomPart part;
    part.group_sizes.assign(d.group_names.size(), 0);
    for (std::size_t g : d.group) ++part.group_sizes[g];
    if (*std::max_element(part.group_sizes.begin(), part.group_sizes.end()) < 2)
        throw InputError("every group of " + quoted(ml.groups) +
                         " has a single used row, so differences between "
                         "groups cannot be told apart from differences between rows; a multilevel model needs "
                         "groups with several rows");
    part.terms.push_back("intercept");
    part.term_columns.push_back(d.intercept ? 0 : -1);
    std::vector<int> slopes;
    for (const auto& s : ml.random_slopes) {
        if (std::find(part.terms.begin(), part.terms.end(), s) != part.terms.end()) continue;
        const int j = slope_column(d, ml.groups, s);
        part.terms.push_back(s);
        part.term_columns.push_back(j);
        part.slope_members.push_back(cross_level_products(d, j));
        slopes.push_back(j);
    }
    part.Z.resize(d.X.rows(), static_cast<Eigen::Index>(part.terms.size()));
    part.Z.col(0).setOnes();
    for (std::size_t k = 0; k < slopes.size(); ++k) part.Z.col(static_cast<Eigen::Index>(k + 1)) = d.X.col(slopes[k]);
    return part;
}

std::vector<std::string> group_warnings(const Design& d, const ModelSpec& spec, const RandomPart& part) {
    std::vector<std::string> out;
    const std::string& g = spec.multilevel.groups;
    const std::size_t G = d.group_names.size();
    if (G < 30)
        out.push_back("only " + std::to_string(G) + " groups of " + quoted(g) +
                      ": variance components and cross-level interactions rest on the number of groups and are "
                      "imprecise with fewer than about 30");
    for (const auto& e : d.exclusions)
        if (e.column == g)
            out.push_back(std::to_string(e.rows) + (e.rows == 1 ? " row has" : " rows have") + " no group in " +
                          quoted(g) + " and were left out");
    for (std::size_t k = 1; k < part.terms.size(); ++k)
        for (const auto [j, r] : slope_products(d, part.term_columns[k])) {
            if (r < 0 || constant_within_groups(d.X, r, d.group, G)) continue;
            out.push_back(quoted(d.columns[static_cast<std::size_t>(r)].label) + " varies within groups of " +
                          quoted(g) + " but moderates the random slope of " + quoted(part.terms[k]) +
                          "; if it is meant as a group-level moderator, use its group means");
        }
    return out;
}

}  // namespace moderato::detail
