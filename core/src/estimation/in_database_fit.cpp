// The passes of an in-database fit (in_database_fit.hpp): levels, means,
// centred cross-products, and the robust kinds' residual sums, each an
// aggregate query; the solve and statistics are the streamed fit's.
#include "moderato/estimation/in_database_fit.hpp"

#include <algorithm>
#include <cmath>
#include <map>
#include <set>

#include "estimation/covariance.hpp"
#include "estimation/design_layout.hpp"
#include "estimation/in_database_sql.hpp"
#include "estimation/streamed_factor.hpp"
#include "estimation/streamed_statistics.hpp"
#include "moderato/reading/postgres_source.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/report_text.hpp"
#include "reading/postgres_connection.hpp"
#include "support/text_util.hpp"

namespace moderato {

namespace {

using LD = long double;
using detail::DesignQuery;
using detail::MatL;
using detail::PgConnection;
using detail::PgResult;
using detail::VecL;

// Relative pivot below which a column counts as aliased (see the header).
constexpr double kCrossProductRankTolerance = 1e-6;

struct Context {
    const PgConnection& c;
    const ModelSpec& spec;
    DesignQuery q;
    std::vector<std::string> used;  // the model's columns (v<i> is used[i])
    InDatabaseRun* run;

    PgResult exec(const std::string& sql, const std::string& what) const {
        if (run) run->statements.push_back(sql);
        return c.exec(sql, what);
    }
    std::string v(const std::string& column) const {
        return "v" + std::to_string(std::find(used.begin(), used.end(), column) - used.begin());
    }
};

void refuse_unsupported(const ModelSpec& spec, const std::string& source) {
    const std::string what = generalized(spec.family)   ? std::string("a ") + to_string(spec.family) + " model"
                             : spec.multilevel.active() ? std::string("a multilevel model")
                             : !spec.exposure.empty()   ? std::string("an exposure")
                                                        : std::string();
    if (!what.empty())
        throw InputError(source + ": fits in the database are linear (OLS or WLS); " + what +
                         " needs the rows here: fit it without --in-database");
}

// The partition key's columns of a partitioned table (empty otherwise).
std::vector<std::string> partition_key(const PgConnection& c) {
    if (c.source().table.empty()) return {};
    const PgResult r = c.exec(
        "SELECT a.attname FROM pg_partitioned_table p CROSS JOIN LATERAL unnest(p.partattrs) "
        "WITH ORDINALITY AS k(attnum, i) JOIN pg_attribute a ON a.attrelid = p.partrelid AND "
        "a.attnum = k.attnum WHERE p.partrelid = " +
            c.literal(c.from_clause()) + "::regclass ORDER BY k.i",
        "reading the partition key");
    std::vector<std::string> key;
    for (int i = 0; i < r.rows(); ++i) key.push_back(r.text(i, 0));
    return key;
}

// The table of the source's columns (no rows), with the kinds read_postgres gives them.
Table schema_table(const std::vector<detail::PgColumn>& columns, const CsvOptions& options, const std::string& name) {
    Table t;
    t.source = name;
    for (const auto& pg : columns) {
        Column col;
        col.name = pg.name;
        col.kind = detail::target_kind(pg, options);
        col.kind_forced = options.column_kinds.count(pg.name) || options.text_as_missing.count(pg.name);
        t.columns.push_back(std::move(col));
    }
    return t;
}

// The levels of each categorical factor among the complete rows, into the schema.
detail::LevelsPresent find_levels(const Context& x, const std::vector<DesignTerm>& terms, Table& schema) {
    detail::LevelsPresent present;
    for (const auto& t : terms)
        for (const auto& f : t.factors) {
            Column& col = *schema.find(f.first);
            if (col.kind != ColumnKind::Categorical || present.count(f.first)) continue;
            const std::string v = x.v(f.first);
            const std::string sql = x.q.keys.empty() ? "SELECT DISTINCT " + v + " FROM (" + x.q.level0() +
                                                           x.q.fence_text() + ") AS l0 WHERE " + x.q.complete
                                                     : "SELECT " + v + " FROM (" + x.q.level0() + ") AS l0 WHERE " +
                                                           x.q.complete + x.q.group_by(v);
            const PgResult r = x.exec(sql, "finding the levels of " + detail::quoted(f.first));
            std::set<std::string> levels;
            for (int i = 0; i < r.rows(); ++i) levels.insert(r.text(i, 0));
            col.levels.assign(levels.begin(), levels.end());
            col.codes.clear();
            present[f.first] = std::vector<char>(col.levels.size(), 1);
        }
    return present;
}

// Pass 1's sums, over the groups of the partition key.
struct Means {
    std::size_t rows = 0, complete = 0;
    std::vector<std::size_t> missing_per;  // per model column
    LD sum_w = 0, sum_log_w = 0;
    std::vector<LD> sums;           // w d_j for each non-intercept design column, then w y
    std::vector<double> low, high;  // per model column (numeric ones)
    double min_w = 0;
};

// One scan, grouped by whether the row is complete (and by the partition
// key): the condition is then evaluated once a row, not once an aggregate.
Means means_pass(const Context& x, const Table& schema) {
    const DesignQuery& q = x.q;
    std::vector<std::string> aggs{"count(*)", "sum(w)", "sum(ln(w))", "min(w)"};
    for (std::size_t i = 0; i < x.used.size(); ++i) aggs.push_back("count(v" + std::to_string(i) + ")");
    for (std::size_t j = 0; j < q.design.size(); ++j) aggs.push_back("sum(w * d" + std::to_string(j + 1) + ")");
    aggs.push_back("sum(w * y)");
    std::vector<std::size_t> numeric;
    for (std::size_t i = 0; i < x.used.size(); ++i)
        if (schema.at(x.used[i]).kind == ColumnKind::Numeric) {
            numeric.push_back(i);
            aggs.push_back("min(s" + std::to_string(i) + ")");
            aggs.push_back("max(s" + std::to_string(i) + ")");
        }
    const PgResult r = x.exec("SELECT " + q.key_list() + "ok, " + detail::join(aggs, ", ") + " FROM (SELECT *, (" +
                                  q.complete + ") AS ok FROM (" + q.level1(false) + ") AS l1) AS l2" + q.group_by("ok"),
                              "computing the means");
    Means m;
    const std::size_t u = x.used.size(), p1 = q.design.size() + 1;
    m.missing_per.assign(u, 0);
    m.sums.assign(p1, 0);
    m.low.assign(u, INFINITY);
    m.high.assign(u, -INFINITY);
    m.min_w = INFINITY;
    const int k0 = static_cast<int>(q.keys.size()) + 1;
    for (int g = 0; g < r.rows(); ++g) {
        const auto num = [&](std::size_t i) { return r.number(g, k0 + static_cast<int>(i)); };
        const auto count = static_cast<std::size_t>(num(0));
        m.rows += count;
        for (std::size_t i = 0; i < u; ++i) m.missing_per[i] += count - static_cast<std::size_t>(num(4 + i));
        if (r.text(g, k0 - 1) != "t") continue;  // incomplete rows: counted, not summed
        m.complete += count;
        m.sum_w += num(1);
        m.sum_log_w += num(2);
        m.min_w = std::min(m.min_w, num(3));
        for (std::size_t j = 0; j < p1; ++j) m.sums[j] += num(4 + u + j);
        for (std::size_t a = 0; a < numeric.size(); ++a) {
            m.low[numeric[a]] = std::min(m.low[numeric[a]], num(4 + u + p1 + 2 * a));
            m.high[numeric[a]] = std::max(m.high[numeric[a]], num(5 + u + p1 + 2 * a));
        }
    }
    return m;
}

// The checks build_design makes once the rows are known, in its order.
void check_rows(const Context& x, const Table& schema, const Means& m, const std::vector<std::string>& notes,
                Design& d) {
    detail::record_exclusions(schema, x.used, m.missing_per, m.rows, m.complete, d);
    for (std::size_t i = 0; i < x.used.size(); ++i)
        if (schema.at(x.used[i]).kind == ColumnKind::Numeric && (std::isinf(m.low[i]) || std::isinf(m.high[i])))
            throw InputError(schema.source + ", column " + detail::quoted(x.used[i]) +
                             ": holds an infinite value; filter it out or replace it in a query");
    if (!x.spec.weights.empty() && !(m.min_w > 0))
        throw InputError("weights " + detail::quoted(x.spec.weights) + " must be positive: " + schema.source +
                         " holds " + exact_text(m.min_w) + "; fix those rows or choose another weights column");
    if (x.spec.intercept)
        for (const auto& t : d.terms) {
            if (t.degree != 1 || t.factors.size() != 1) continue;
            const std::string& col = t.factors[0].first;
            const auto i = static_cast<std::size_t>(std::find(x.used.begin(), x.used.end(), col) - x.used.begin());
            if (schema.at(col).kind == ColumnKind::Numeric && m.low[i] == m.high[i])
                detail::refuse_constant(col, m.low[i]);
        }
    detail::check_enough_rows(schema, d.columns, m.complete);
    detail::add_notes(notes, m.rows, d);
}

// When a categorical factor has no level, no row is complete: say so as build_design does.
void refuse_no_complete(const Context& x, const Table& schema) {
    std::vector<std::string> aggs{"count(*)"};
    for (std::size_t i = 0; i < x.used.size(); ++i) aggs.push_back("count(v" + std::to_string(i) + ")");
    const PgResult r =
        x.exec("SELECT " + detail::join(aggs, ", ") + " FROM (" + x.q.level0() + ") AS l0", "counting the rows");
    const auto rows = static_cast<std::size_t>(r.number(0, 0));
    std::vector<std::size_t> missing;
    for (std::size_t i = 0; i < x.used.size(); ++i)
        missing.push_back(rows - static_cast<std::size_t>(r.number(0, 1 + static_cast<int>(i))));
    Design d;
    detail::record_exclusions(schema, x.used, missing, rows, 0, d);
    throw InputError(schema.source + ": no complete rows");
}

// Pass 2: the weighted cross-products of z = [1, d - mean, y - mean], as
// sums of s_a s_b with s = sqrt(w) z.
MatL cross_products(const Context& x, const Means& m) {
    const DesignQuery& q = x.q;
    const std::size_t p1 = q.design.size() + 1, nz = p1 + 1;
    // Each z_a is scaled by sqrt(w) once a row (s_a), so an aggregate is one
    // product s_a s_b rather than w z_a z_b.
    std::vector<std::string> items{"sqrt(w) AS s0"};
    for (std::size_t j = 0; j < p1; ++j) {
        const std::string col = j + 1 < p1 ? "d" + std::to_string(j + 1) : "y";
        const double mean = static_cast<double>(m.sums[j] / m.sum_w);
        items.push_back("sqrt(w) * (" + col + " - " + detail::float8_literal(mean) + ") AS s" + std::to_string(j + 1));
    }
    for (std::size_t i = 0; i < q.keys.size(); ++i) items.push_back("k" + std::to_string(i));
    std::vector<std::string> aggs;
    for (std::size_t a = 0; a < nz; ++a)
        for (std::size_t b = a; b < nz; ++b)
            aggs.push_back("sum(s" + std::to_string(a) + " * s" + std::to_string(b) + ")");
    const PgResult r =
        x.exec("SELECT " + q.key_list() + detail::join(aggs, ", ") + " FROM (SELECT " + detail::join(items, ", ") +
                   " FROM (" + q.level1(true) + ") AS l1" + q.fence_text() + ") AS l2" + q.group_by(),
               "computing the cross-products");
    MatL G = MatL::Zero(static_cast<Eigen::Index>(nz), static_cast<Eigen::Index>(nz));
    const int k0 = static_cast<int>(q.keys.size());
    for (int g = 0; g < r.rows(); ++g) {
        int at = k0;
        for (Eigen::Index a = 0; a < G.rows(); ++a)
            for (Eigen::Index b = a; b < G.rows(); ++b, ++at)
                if (!r.null(g, at)) G(a, b) += static_cast<LD>(r.number(g, at));
    }
    return G.selfadjointView<Eigen::Upper>();
}

// Rows B with B'B = G (from G's eigen decomposition in long double, negative
// rounding clamped to 0), turned into rows of [X | y] (d = z + mean, the
// intercept the 1 of z) and factored as the streamed fit factors its rows.
detail::StreamedSums solve_from_cross_products(const MatL& G, const Means& m, const Design& d,
                                               const FitOptions& options) {
    Eigen::SelfAdjointEigenSolver<MatL> eig(G);
    const MatL B = eig.eigenvalues().cwiseMax(0.0L).cwiseSqrt().asDiagonal() * eig.eigenvectors().transpose();
    const Eigen::Index nz = G.rows(), p = static_cast<Eigen::Index>(d.columns.size());
    const Eigen::Index p1 = nz - 1;  // non-intercept design columns + outcome
    Eigen::MatrixXd X(nz, p);
    Eigen::VectorXd y(nz);
    for (Eigen::Index i = 0; i < nz; ++i) {
        Eigen::Index col = 0;
        if (d.intercept) X(i, col++) = static_cast<double>(B(i, 0));
        for (Eigen::Index j = 1; j < p1; ++j)
            X(i, col++) = static_cast<double>(B(i, j) + m.sums[static_cast<std::size_t>(j - 1)] / m.sum_w * B(i, 0));
        y[i] = static_cast<double>(B(i, p1) + m.sums[static_cast<std::size_t>(p1 - 1)] / m.sum_w * B(i, 0));
    }
    detail::StreamedFactor factor(p, true, 1);
    factor.add(X, y, Eigen::VectorXd());
    detail::StreamedSums s;
    s.n = m.complete;
    s.sum_log_w = m.sum_log_w;
    LeastSquaresOptions lso;
    lso.extended_budget = options.extended_budget;
    lso.rank_tolerance = std::max(lso.rank_tolerance, kCrossProductRankTolerance);
    VecL coef_long;
    s.ls = factor.finish(m.complete, lso, coef_long);
    s.factor = factor.factor();
    s.scales = factor.scales();
    return s;
}

// Level 2 of pass 3: the residual e and u = A' x of each complete row.
std::string residual_rows(const Context& x, const Design& d, const detail::StreamedSums& s, bool with_cluster) {
    const std::vector<int>& kept = s.ls.kept;
    const Eigen::MatrixXd& A = s.ls.inverse_factor;
    const auto col = [&](int j) {
        return d.intercept && j == 0 ? std::string("'1'::float8") : "d" + std::to_string(j + (d.intercept ? 0 : 1));
    };
    std::vector<std::string> fit, items{"w"};
    for (int j : kept) fit.push_back(detail::float8_literal(s.ls.coef[j]) + " * " + col(j));
    items.push_back("(y - (" + detail::join(fit, " + ") + ")) AS e");
    for (Eigen::Index a = 0; a < A.cols(); ++a) {
        std::vector<std::string> terms;
        for (Eigen::Index b = 0; b < A.rows(); ++b)
            if (A(b, a) != 0)
                terms.push_back(detail::float8_literal(A(b, a)) + " * " + col(kept[static_cast<std::size_t>(b)]));
        items.push_back("(" + (terms.empty() ? std::string("'0'::float8") : detail::join(terms, " + ")) + ") AS u" +
                        std::to_string(a));
    }
    for (std::size_t i = 0; i < x.q.keys.size(); ++i) items.push_back("k" + std::to_string(i));
    if (with_cluster) items.push_back(x.v(x.spec.cluster) + " AS c");
    return "SELECT " + detail::join(items, ", ") + " FROM (" + x.q.level1(true) + ") AS l1" + x.q.fence_text();
}

// sqrt(omega_i) times the sign of the score, over level 2's columns (omega as
// covariance.cpp's weigh_rows), so the meat is the sum of t t' with t = that
// times u; the leverage h appears once in it (its square, the outcome of
// HC3, would repeat it in every aggregate once the planner flattens the SELECTs).
std::string root_omega_sql(SeKind se, std::size_t k, std::size_t n) {
    std::vector<std::string> squares;
    for (std::size_t a = 0; a < k; ++a) squares.push_back("u" + std::to_string(a) + " * u" + std::to_string(a));
    const std::string h = "(w * (" + detail::join(squares, " + ") + "))";
    switch (se) {
        case SeKind::HC2:
            return "w * e / sqrt(1 - " + h + ")";
        case SeKind::HC3:
            return "w * e / (1 - " + h + ")";
        case SeKind::HC4: {
            const std::string ratio =
                detail::float8_literal(static_cast<double>(n) / static_cast<double>(k)) + " * " + h;
            return "w * e / sqrt(power(1 - " + h + ", CASE WHEN " + ratio + " < 4 THEN " + ratio + " ELSE 4 END))";
        }
        default:
            return "w * e";
    }
}

// Pass 3 of the HC kinds: the RSS and the meat sum omega u u'.
void hc_pass(const Context& x, const Design& d, detail::StreamedSums& s) {
    const auto k = static_cast<std::size_t>(s.ls.kept.size());
    const DesignQuery& q = x.q;
    // Level 3 computes t (sqrt omega) once a row, level 4 each t u_a once a
    // row (both fenced when the source is not partitioned), so an aggregate
    // is one product: about a third less work than t u_a t u_b in each.
    std::vector<std::string> items{"w * e * e AS r", root_omega_sql(x.spec.se, k, s.n) + " AS t"}, scaled{"r"},
        aggs{"sum(r)"};
    for (std::size_t a = 0; a < k; ++a) {
        items.push_back("u" + std::to_string(a));
        scaled.push_back("t * u" + std::to_string(a) + " AS v" + std::to_string(a));
    }
    for (std::size_t i = 0; i < q.keys.size(); ++i) {
        items.push_back("k" + std::to_string(i));
        scaled.push_back("k" + std::to_string(i));
    }
    for (std::size_t a = 0; a < k; ++a)
        for (std::size_t b = 0; b <= a; ++b)
            aggs.push_back("sum(v" + std::to_string(a) + " * v" + std::to_string(b) + ")");
    const std::string level3 =
        "SELECT " + detail::join(items, ", ") + " FROM (" + residual_rows(x, d, s, false) + ") AS l2" + q.fence_text();
    const std::string level4 = "SELECT " + detail::join(scaled, ", ") + " FROM (" + level3 + ") AS l3" + q.fence_text();
    const PgResult r =
        x.exec("SELECT " + q.key_list() + detail::join(aggs, ", ") + " FROM (" + level4 + ") AS l4" + q.group_by(),
               "computing the robust covariance");
    const auto kk = static_cast<Eigen::Index>(k);
    Eigen::MatrixXd meat = Eigen::MatrixXd::Zero(kk, kk);
    LD rss = 0;
    const int k0 = static_cast<int>(q.keys.size());
    for (int g = 0; g < r.rows(); ++g) {
        if (r.null(g, k0)) continue;
        rss += r.number(g, k0);
        int at = k0 + 1;
        for (Eigen::Index a = 0; a < kk; ++a)
            for (Eigen::Index b = 0; b <= a; ++b) meat(a, b) += r.number(g, at++);
    }
    s.residual_rss = true;
    s.rss = static_cast<double>(rss);
    const double nd = static_cast<double>(s.n), kd = static_cast<double>(k);
    s.sandwich = detail::sandwich_from_meat(meat, s.ls.inverse_factor, detail::sandwich_factor(x.spec.se, nd, kd, 0));
}

// Pass 3 of the cluster-robust kind: per-cluster score sums, GROUP BY the cluster.
void cluster_pass(const Context& x, const Design& d, detail::StreamedSums& s) {
    const auto k = static_cast<std::size_t>(s.ls.kept.size());
    const DesignQuery& q = x.q;
    std::vector<std::string> aggs{"sum(w * e * e)"};
    for (std::size_t a = 0; a < k; ++a) aggs.push_back("sum(w * e * u" + std::to_string(a) + ")");
    const PgResult r = x.exec("SELECT " + q.key_list() + "c, " + detail::join(aggs, ", ") + " FROM (" +
                                  residual_rows(x, d, s, true) + ") AS l2" + q.group_by("c"),
                              "computing the cluster sums");
    std::map<std::string, Eigen::VectorXd> sums;
    LD rss = 0;
    const int k0 = static_cast<int>(q.keys.size());
    for (int g = 0; g < r.rows(); ++g) {
        auto [it, fresh] = sums.try_emplace(r.text(g, k0), Eigen::VectorXd::Zero(static_cast<Eigen::Index>(k)));
        rss += r.number(g, k0 + 1);
        for (std::size_t a = 0; a < k; ++a)
            it->second[static_cast<Eigen::Index>(a)] += r.number(g, k0 + 2 + static_cast<int>(a));
    }
    detail::check_clusters(x.spec, sums.size(), s.n);
    s.n_clusters = static_cast<int>(sums.size());
    Eigen::MatrixXd U(static_cast<Eigen::Index>(sums.size()), static_cast<Eigen::Index>(k));
    Eigen::Index i = 0;
    for (const auto& [name, u] : sums) U.row(i++) = u.transpose();
    Eigen::MatrixXd meat = Eigen::MatrixXd::Zero(U.cols(), U.cols());
    meat.selfadjointView<Eigen::Lower>().rankUpdate(U.transpose());
    s.residual_rss = true;
    s.rss = static_cast<double>(rss);
    const double nd = static_cast<double>(s.n), kd = static_cast<double>(k);
    s.sandwich = detail::sandwich_from_meat(meat, s.ls.inverse_factor,
                                            detail::sandwich_factor(SeKind::Cluster, nd, kd, s.n_clusters));
}

// The number of clusters, for a cluster column given with another SE kind.
int count_clusters(const Context& x) {
    const std::string v = x.v(x.spec.cluster);
    const PgResult r = x.exec("SELECT count(*) FROM (SELECT " + v + " FROM (" + x.q.level0() + ") AS l0 WHERE " +
                                  x.q.complete + x.q.group_by(v) + ") AS g",
                              "counting the clusters");
    return static_cast<int>(r.number(0, 0));
}

// The query's model columns, their values and the design's layout.
DesignQuery design_query(const PgConnection& c, const std::vector<detail::PgColumn>& columns,
                         const std::vector<std::string>& used, const CsvOptions& options) {
    DesignQuery q;
    q.from = c.from_clause();
    std::vector<std::string> complete;
    for (std::size_t i = 0; i < used.size(); ++i) {
        const auto pg = std::find_if(columns.begin(), columns.end(), [&](const auto& p) { return p.name == used[i]; });
        q.values.push_back(detail::value_expression(c, *pg, options));
        q.simple.push_back(detail::complete_value_expression(c, *pg, options));
        complete.push_back("v" + std::to_string(i) + " IS NOT NULL");
    }
    q.complete = detail::join(complete, " AND ");
    for (const auto& k : partition_key(c)) q.keys.push_back(c.identifier(k));
    q.fence = q.keys.empty();
    return q;
}

}  // namespace

std::size_t in_database_queries(SeKind se) { return se == SeKind::Classical ? 2 : 3; }

FitResult fit_in_database(const SourceSpec& source, const ModelSpec& spec, const CsvOptions& options,
                          const std::string& password, const FitOptions& fit_options, InDatabaseRun* run) {
    refuse_unsupported(spec, describe_postgres(source));
    InDatabaseRun local;
    if (!run) run = &local;
    run->statements.clear();
    PgConnection c(source, password);
    c.begin_read_only();
    const std::vector<detail::PgColumn> columns = c.describe_columns();
    detail::check_overrides(columns, options, c.name());
    Table schema = schema_table(columns, options, c.name());
    std::vector<std::string> notes;
    const Column& outcome = detail::outcome_column(schema, spec);
    const std::vector<DesignTerm> terms = detail::model_terms(schema, spec, notes);
    Context x{c, spec, {}, detail::used_columns(schema, spec, outcome, terms), run};
    x.q = design_query(c, columns, x.used, options);
    run->partition_key = partition_key(c);
    const detail::LevelsPresent present = find_levels(x, terms, schema);
    for (const auto& [name, held] : present)
        if (held.empty()) refuse_no_complete(x, schema);
    Design d;
    d.outcome = spec.outcome;
    d.intercept = spec.intercept;
    const detail::LevelMap cat_map = detail::categorical_levels(schema, spec, terms, present, d);
    detail::check_design_size(schema, terms, cat_map, spec.intercept, 0);
    detail::design_columns(schema, terms, cat_map, spec.intercept, d);
    for (const auto& col : d.columns)
        if (!col.atoms.empty()) x.q.design.push_back(detail::design_expression(c, col, x.used));
    x.q.y = "s" + x.v(spec.outcome).substr(1);
    if (!spec.weights.empty()) x.q.w = "s" + x.v(spec.weights).substr(1);
    const Means m = means_pass(x, schema);
    check_rows(x, schema, m, notes, d);
    detail::StreamedSums s = solve_from_cross_products(cross_products(x, m), m, d, fit_options);
    if (spec.se == SeKind::Cluster) cluster_pass(x, d, s);
    else if (spec.se != SeKind::Classical) hc_pass(x, d, s);
    if (!spec.cluster.empty() && spec.se != SeKind::Cluster) {
        s.n_clusters = count_clusters(x);
        detail::check_clusters(spec, static_cast<std::size_t>(s.n_clusters), s.n);
    }
    d.n_clusters = s.n_clusters;
    c.exec("COMMIT", "ending the read-only transaction");
    FitResult f = detail::streamed_result(d, spec, fit_options, s);
    const std::size_t queries = run->statements.size();
    f.notes.push_back("fitted inside the database by " + std::to_string(queries) +
                      " aggregate queries (only sums were read); fitted values and residuals were not kept");
    return f;
}

}  // namespace moderato
