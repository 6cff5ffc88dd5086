// Google Benchmark of the fitting path on the benchmark table held in memory
// (no CSV parsing): design building, the least-squares solve, and the whole
// fit with classical and HC3 covariance. The model is the one run_benchmarks.py
// times through moderato-cli: y on x1*x2*x3 (all lower-order terms) plus
// c1..c5, 13 coefficients.
//
// Arguments: rows, threads (0: all hardware threads). Wall-clock time is
// reported (the work runs on several threads).
#include <benchmark/benchmark.h>

#include <cstddef>
#include <map>
#include <memory>
#include <string>

#include "bench_data.hpp"
#include "moderato/estimation/design.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/estimation/least_squares.hpp"
#include "moderato/estimation/model.hpp"
#include "moderato/reading/table.hpp"

namespace {

using moderato::Column;
using moderato::ColumnKind;
using moderato::Table;

// The table of make_bench_table (same seed), built directly; cached per size.
const Table& bench_table(std::size_t rows) {
    static std::map<std::size_t, std::unique_ptr<Table>> cache;
    auto& slot = cache[rows];
    if (slot) return *slot;
    slot = std::make_unique<Table>();
    Table& t = *slot;
    const char* names[] = {"y", "x1", "x2", "x3", "treated", "c1", "c2", "c3", "c4", "c5", "cluster_id"};
    for (const char* name : names) {
        Column c;
        c.name = name;
        c.kind = ColumnKind::Numeric;
        c.numbers.reserve(rows);
        t.columns.push_back(std::move(c));
    }
    Column region;
    region.name = "region";
    region.kind = ColumnKind::Categorical;
    for (const char* level : moderato::bench::kRegions) region.levels.emplace_back(level);
    region.codes.reserve(rows);
    moderato::bench::Generator gen;
    for (std::size_t i = 0; i < rows; ++i) {
        const auto r = gen.next();
        const double values[] = {r.y,    r.x1,   r.x2,   r.x3,   static_cast<double>(r.treated),   r.c[0],
                                 r.c[1], r.c[2], r.c[3], r.c[4], static_cast<double>(r.cluster_id)};
        for (std::size_t j = 0; j < std::size(values); ++j) t.columns[j].numbers.push_back(values[j]);
        region.codes.push_back(r.region);
    }
    t.columns.push_back(std::move(region));
    return t;
}

moderato::ModelSpec bench_spec(moderato::SeKind se, unsigned threads) {
    moderato::ModelSpec s;
    s.outcome.assign(1, 'y');  // not = "y": GCC 12 warns falsely (-Wrestrict) there
    s.predictors = {"c1", "c2", "c3", "c4", "c5"};
    s.interactions = {{"x1", "x2", "x3"}};
    s.se = se;
    s.threads = threads;
    return s;
}

std::size_t rows_arg(const benchmark::State& state) { return static_cast<std::size_t>(state.range(0)); }
unsigned threads_arg(const benchmark::State& state) { return static_cast<unsigned>(state.range(1)); }

void BM_BuildDesign(benchmark::State& state) {
    const Table& t = bench_table(rows_arg(state));
    const auto spec = bench_spec(moderato::SeKind::HC3, threads_arg(state));
    for (auto _ : state) benchmark::DoNotOptimize(moderato::build_design(t, spec));
    state.SetItemsProcessed(state.iterations() * static_cast<std::int64_t>(t.rows()));
}

void BM_LeastSquares(benchmark::State& state) {
    const Table& t = bench_table(rows_arg(state));
    const auto d = moderato::build_design(t, bench_spec(moderato::SeKind::HC3, threads_arg(state)));
    moderato::LeastSquaresOptions options;
    options.threads = threads_arg(state);
    for (auto _ : state) benchmark::DoNotOptimize(moderato::least_squares(d.X, d.y, {}, options));
    state.SetItemsProcessed(state.iterations() * static_cast<std::int64_t>(d.n()));
}

template <moderato::SeKind kSe, bool kCompare>
void BM_FitDesign(benchmark::State& state) {
    const Table& t = bench_table(rows_arg(state));
    const auto spec = bench_spec(kSe, threads_arg(state));
    const auto d = moderato::build_design(t, spec);
    moderato::FitOptions options;
    options.compare_without_products = kCompare;
    for (auto _ : state) benchmark::DoNotOptimize(moderato::fit_design(d, spec, options));
    state.SetItemsProcessed(state.iterations() * static_cast<std::int64_t>(d.n()));
}

void sizes(benchmark::internal::Benchmark* b) {
    b->ArgNames({"rows", "threads"});
    for (long threads : {1L, 0L}) b->Args({1000000, threads});
    b->Unit(benchmark::kMillisecond)->UseRealTime();
}

}  // namespace

BENCHMARK(BM_BuildDesign)->Apply(sizes);
BENCHMARK(BM_LeastSquares)->Apply(sizes);
// What moderato-cli fit does: the fit plus the nested comparison without the products.
BENCHMARK(BM_FitDesign<moderato::SeKind::Classical, true>)->Name("BM_Fit/classical")->Apply(sizes);
BENCHMARK(BM_FitDesign<moderato::SeKind::HC3, true>)->Name("BM_Fit/hc3")->Apply(sizes);
BENCHMARK(BM_FitDesign<moderato::SeKind::HC3, false>)->Name("BM_Fit/hc3_no_comparison")->Apply(sizes);

BENCHMARK_MAIN();
