// Google Benchmark of probing and the bootstrap on a fitted two-way model:
// y on x1, x3, x1×x3 plus c1, c2 (p = 6), n = 10,000 rows of the seeded
// benchmark table (bench_data.hpp; x1 is the focal predictor, x3 ~ U(0, 10)
// the moderator). The model leaves out terms of the true model, which does not
// matter for timing.
//
//   BM_ProbeFrame           what one frame of a moderator drag needs, given a
//                           cached EffectFunction: Johnson–Neyman regions, the
//                           simultaneous band, 100 conditional effects with SEs
//   BM_ProbeEffectFunction  building that EffectFunction (typical_values +
//                           effect_function): what the slider must cache
//   BM_ProbeFull            the whole probe() (crossover, cautions, ...)
//   BM_Bootstrap            2,000 replicates (+ 200 jackknife fits) of three
//                           conditional effects, 1 and 2 threads; wall time
//   BM_BootstrapPiece...    the parts of one replicate: drawing and copying
//                           the resampled design, its fit (long double, as
//                           the bootstrap makes it, and double for
//                           comparison), and all of it on 1 and 2 threads
//                           without bootstrap()'s waves
//
// After the run the bootstrap speed-up (median 1-thread wall time / median
// 2-thread wall time) is printed. Nothing here is a ctest test.
#include <benchmark/benchmark.h>
#include <sys/resource.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <map>
#include <memory>
#include <random>
#include <string>
#include <vector>

#include "bench_data.hpp"
#include "moderato/estimation/bootstrap.hpp"
#include "moderato/estimation/design.hpp"
#include "moderato/estimation/distributions.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/estimation/model.hpp"
#include "moderato/probing/probe.hpp"
#include "moderato/reading/table.hpp"

namespace {

using moderato::Column;
using moderato::ColumnKind;
using moderato::Table;

constexpr std::size_t kRows = 10000;
constexpr int kReplicates = 2000;
constexpr std::uint64_t kSeed = 20240917;
constexpr int kFrameEffects = 100;

// The first kRows rows of make_bench_table's table (same seed), the columns
// this model uses.
Table probe_table() {
    Table t;
    const char* names[] = {"y", "x1", "x3", "c1", "c2"};
    for (const char* name : names) {
        Column c;
        c.name = name;
        c.kind = ColumnKind::Numeric;
        c.numbers.reserve(kRows);
        t.columns.push_back(std::move(c));
    }
    moderato::bench::Generator gen;
    for (std::size_t i = 0; i < kRows; ++i) {
        const auto r = gen.next();
        const double values[] = {r.y, r.x1, r.x3, r.c[0], r.c[1]};
        for (std::size_t j = 0; j < std::size(values); ++j) t.columns[j].numbers.push_back(values[j]);
    }
    return t;
}

moderato::ModelSpec probe_spec(unsigned threads) {
    moderato::ModelSpec s;
    s.outcome.assign(1, 'y');  // not = "y": GCC 12 warns falsely (-Wrestrict) there
    s.predictors = {"c1", "c2"};
    s.interactions = {{"x1", "x3"}};
    s.threads = threads;
    return s;
}

// The fitted model, built once.
struct Fitted {
    moderato::Design design;
    moderato::FitResult fit;
};

const Fitted& fitted() {
    static const std::unique_ptr<Fitted> f = [] {
        auto out = std::make_unique<Fitted>();
        const Table t = probe_table();
        const auto spec = probe_spec(0);
        out->design = moderato::build_design(t, spec);
        out->fit = moderato::fit_design(out->design, spec);
        return out;
    }();
    return *f;
}

// What one frame of a drag needs: both regions and 100 effects with their
// SEs over the moderator's observed range. The band's critical value depends
// only on the fit and is computed once, like the EffectFunction.
void BM_ProbeFrame(benchmark::State& state) {
    const Fitted& m = fitted();
    const auto f = moderato::effect_function(m.design, m.fit, "x1", "x3", moderato::typical_values(m.design));
    const auto& ms = m.design.summaries.at("x3");
    const double dof = static_cast<double>(f.degree() + 1);
    const double band_q = std::sqrt(dof * moderato::dist::f_quantile(m.fit.level, dof, m.fit.df_inference));
    std::vector<double> effect(kFrameEffects), se(kFrameEffects);
    for (auto _ : state) {
        auto jn = moderato::significance_regions(f, m.fit.critical_value);
        auto band = moderato::significance_regions(f, band_q);
        benchmark::DoNotOptimize(jn);
        benchmark::DoNotOptimize(band);
        for (int k = 0; k < kFrameEffects; ++k) {
            const double z = ms.min + (ms.max - ms.min) * k / (kFrameEffects - 1);
            effect[static_cast<std::size_t>(k)] = f.effect(z);
            se[static_cast<std::size_t>(k)] = std::sqrt(f.variance(z));
        }
        benchmark::DoNotOptimize(effect.data());
        benchmark::DoNotOptimize(se.data());
        benchmark::ClobberMemory();
    }
    // What the frame found (the same every iteration): region boundaries.
    state.counters["jn_bounds"] =
        static_cast<double>(moderato::significance_regions(f, m.fit.critical_value).boundaries.size());
    state.counters["band_bounds"] = static_cast<double>(moderato::significance_regions(f, band_q).boundaries.size());
}

void BM_ProbeEffectFunction(benchmark::State& state) {
    const Fitted& m = fitted();
    for (auto _ : state)
        benchmark::DoNotOptimize(
            moderato::effect_function(m.design, m.fit, "x1", "x3", moderato::typical_values(m.design)));
}

void BM_ProbeFull(benchmark::State& state) {
    const Fitted& m = fitted();
    moderato::ProbeSpec spec;
    spec.focal = std::string("x1");  // not = "x1": GCC 12 warns falsely (-Wmaybe-uninitialized) there
    spec.moderator = std::string("x3");
    for (auto _ : state) benchmark::DoNotOptimize(moderato::probe(m.design, m.fit, spec));
}

// ---- bootstrap ---------------------------------------------------------------

// Three conditional effects of x1 (at the mean of x3 and one SD either side,
// all from the ORIGINAL design): g(m)' b of each replicate's fit.
moderato::BootstrapStatistic effects_statistic() {
    const Fitted& m = fitted();
    const auto f = moderato::effect_function(m.design, m.fit, "x1", "x3", moderato::typical_values(m.design));
    const auto& ms = m.design.summaries.at("x3");
    std::vector<Eigen::VectorXd> g;
    for (double z : {ms.mean - ms.sd, ms.mean, ms.mean + ms.sd}) g.push_back(f.gradient(z));
    return [g](const moderato::Design&, const moderato::FitResult& fit) {
        Eigen::VectorXd v(static_cast<Eigen::Index>(g.size()));
        for (std::size_t k = 0; k < g.size(); ++k) v[static_cast<Eigen::Index>(k)] = g[k].dot(fit.beta);
        return v;
    };
}

// CPU seconds (user + system) of the whole process, all threads.
double process_cpu_seconds() {
    rusage u{};
    getrusage(RUSAGE_SELF, &u);
    auto sec = [](const timeval& t) { return static_cast<double>(t.tv_sec) + 1e-6 * static_cast<double>(t.tv_usec); };
    return sec(u.ru_utime) + sec(u.ru_stime);
}

// The calling thread's time on a CPU and waiting in the run queue for one
// (seconds; /proc/thread-self/schedstat, Linux); NaN where unavailable.
struct SchedStat {
    double run = std::nan(""), queued = std::nan("");
};
SchedStat thread_schedstat() {
    SchedStat s;
    if (std::FILE* f = std::fopen("/proc/thread-self/schedstat", "r")) {
        unsigned long long run = 0, queued = 0;
        if (std::fscanf(f, "%llu %llu", &run, &queued) == 2) {
            s.run = 1e-9 * static_cast<double>(run);
            s.queued = 1e-9 * static_cast<double>(queued);
        }
        std::fclose(f);
    }
    return s;
}

double load_average() {
    double l[1] = {0};
    return getloadavg(l, 1) == 1 ? l[0] : -1;
}

// Wall and process CPU seconds of every bootstrap run, by thread count, for
// the speed-up line.
struct Timings {
    std::vector<double> wall, cpu, load, queued, blocked;
};
std::map<unsigned, Timings>& bootstrap_seconds() {
    static std::map<unsigned, Timings> s;
    return s;
}

void BM_Bootstrap(benchmark::State& state) {
    const Fitted& m = fitted();
    const auto statistic = effects_statistic();
    const auto spec = probe_spec(0);
    moderato::BootstrapOptions options;
    options.replicates = kReplicates;
    options.seed = kSeed;
    options.threads = static_cast<unsigned>(state.range(0));
    int fits = 0;
    for (auto _ : state) {
        const double load = load_average();
        const double c0 = process_cpu_seconds();
        const SchedStat s0 = thread_schedstat();
        const auto t0 = std::chrono::steady_clock::now();
        auto res = moderato::bootstrap(m.design, spec, statistic, options);
        const std::chrono::duration<double> dt = std::chrono::steady_clock::now() - t0;
        const SchedStat s1 = thread_schedstat();
        const double cpu = process_cpu_seconds() - c0;
        const double wall = dt.count();
        // The calling thread (a worker itself) over the run: waiting for a CPU
        // (other work on the machine) and blocked (waiting for the other
        // worker at the end of each wave, or in the kernel), as shares of wall.
        const double queued = (s1.queued - s0.queued) / wall;
        const double blocked = (wall - (s1.run - s0.run) - (s1.queued - s0.queued)) / wall;
        auto& record = bootstrap_seconds()[options.threads];
        record.wall.push_back(wall);
        record.cpu.push_back(cpu);
        record.load.push_back(load);
        record.queued.push_back(queued);
        record.blocked.push_back(blocked);
        // Process CPU over wall: how many cores the run kept busy.
        state.counters["cores_busy"] = cpu / wall;
        state.counters["main_queued"] = queued;
        state.counters["main_blocked"] = blocked;
        state.counters["load_avg"] = load;
        if (res.completed != kReplicates) state.SkipWithError("some bootstrap replicates failed");
        fits = res.requested + res.jackknife_groups;
        benchmark::DoNotOptimize(res);
    }
    // Items: model fits (replicates + jackknife groups).
    state.SetItemsProcessed(state.iterations() * fits);
}

// The pieces of one replicate, on one thread, as bootstrap() does them (the
// resampled design is rebuilt here with the public Design fields; the engine's
// own copy also recomputes the summaries, a few passes over n).
moderato::Design resampled(const moderato::Design& d, std::uint64_t r) {
    std::mt19937_64 gen(kSeed + r);
    const auto n = static_cast<Eigen::Index>(d.n());
    std::vector<Eigen::Index> rows(static_cast<std::size_t>(n));
    for (auto& i : rows) i = static_cast<Eigen::Index>(gen() % static_cast<std::uint64_t>(n));
    moderato::Design out;
    out.X.resize(n, d.X.cols());
    for (Eigen::Index j = 0; j < d.X.cols(); ++j)
        for (Eigen::Index i = 0; i < n; ++i) out.X(i, j) = d.X(rows[static_cast<std::size_t>(i)], j);
    out.y.resize(n);
    for (Eigen::Index i = 0; i < n; ++i) out.y[i] = d.y[rows[static_cast<std::size_t>(i)]];
    out.intercept = d.intercept;
    out.columns = d.columns;
    out.terms = d.terms;
    out.categoricals = d.categoricals;
    out.rows.resize(rows.size());
    for (std::size_t i = 0; i < rows.size(); ++i) out.rows[i] = d.rows[static_cast<std::size_t>(rows[i])];
    out.outcome = d.outcome;
    out.summaries = d.summaries;
    return out;
}

void BM_BootstrapPieceResample(benchmark::State& state) {
    const Fitted& m = fitted();
    std::uint64_t r = 0;
    for (auto _ : state) benchmark::DoNotOptimize(resampled(m.design, r++));
}

// The replicate fit as bootstrap() makes it (n (p + 1)^2 is within the
// long-double budget, so the solve runs in long double); Arg(0) forces the
// blocked double-precision path instead (extended_budget = 0), for comparison.
void BM_BootstrapPieceFit(benchmark::State& state) {
    const Fitted& m = fitted();
    const auto d = resampled(m.design, 0);
    const auto spec = probe_spec(1);
    moderato::FitOptions options{.compare_without_products = false};
    if (state.range(0) == 0) options.extended_budget = 0;
    for (auto _ : state) benchmark::DoNotOptimize(moderato::fit_design(d, spec, options));
}

// Resample + fit + statistic on each of `threads` threads at once, each
// thread doing its own replicates, with no waves in between. Google Benchmark
// reports wall time over the replicates of all threads: half the 1-thread
// time is perfect scaling; less than that shows two concurrent fits slowing
// each other down (memory, shared cores, or other work on the machine).
void BM_BootstrapPieceReplicate(benchmark::State& state) {
    const Fitted& m = fitted();
    static const auto statistic = effects_statistic();
    const auto spec = probe_spec(1);
    std::uint64_t r = static_cast<std::uint64_t>(state.thread_index()) << 32;
    for (auto _ : state) {
        const auto d = resampled(m.design, r++);
        const auto fit = moderato::fit_design(d, spec, moderato::FitOptions{.compare_without_products = false});
        benchmark::DoNotOptimize(statistic(d, fit));
    }
}

void print_speedup() {
    auto median = [](std::vector<double> v) {
        std::sort(v.begin(), v.end());
        const std::size_t h = v.size() / 2;
        return v.size() % 2 ? v[h] : 0.5 * (v[h - 1] + v[h]);
    };
    const auto& s = bootstrap_seconds();
    if (s.empty()) return;
    std::printf("\nBootstrap, %d replicates (+ jackknife), n = %zu, p = 6, medians:\n", kReplicates, kRows);
    std::printf("%8s %5s %9s %8s %11s %12s %13s %9s\n", "threads", "runs", "wall (s)", "CPU (s)", "cores busy",
                "main queued", "main blocked", "load avg");
    for (const auto& [threads, t] : s) {
        if (t.wall.empty()) continue;
        std::vector<double> busy;
        for (std::size_t i = 0; i < t.wall.size(); ++i) busy.push_back(t.cpu[i] / t.wall[i]);
        std::printf("%8u %5zu %9.3f %8.3f %11.2f %11.0f%% %12.0f%% %9.2f\n", threads, t.wall.size(), median(t.wall),
                    median(t.cpu), median(busy), 100 * median(t.queued), 100 * median(t.blocked), median(t.load));
    }
    const auto one = s.find(1), two = s.find(2);
    if (one == s.end() || two == s.end() || one->second.wall.empty() || two->second.wall.empty()) return;
    const double t1 = median(one->second.wall), t2 = median(two->second.wall);
    // Estimate for an otherwise idle machine: each wall time less the
    // calling thread's run-queue wait (time it would have run).
    const double i1 = t1 * (1 - median(one->second.queued)), i2 = t2 * (1 - median(two->second.queued));
    std::printf("speed-up t1/t2 = %.2fx (target >= 1.8x); process CPU with 2 threads / with 1: %.2f\n", t1 / t2,
                median(two->second.cpu) / median(one->second.cpu));
    if (std::isfinite(i1) && std::isfinite(i2))
        std::printf("without the run-queue wait (an idle machine, estimated): %.3f s / %.3f s = %.2fx\n", i1, i2,
                    i1 / i2);
    std::printf(
        "(main queued: share of wall the calling thread waited for a CPU, i.e. other work on the machine;\n"
        " main blocked: share it slept, i.e. waited for the other worker at the end of a wave or in the kernel)\n");
}

}  // namespace

BENCHMARK(BM_ProbeFrame)->Unit(benchmark::kMicrosecond);
BENCHMARK(BM_ProbeEffectFunction)->Unit(benchmark::kMicrosecond);
BENCHMARK(BM_ProbeFull)->Unit(benchmark::kMicrosecond);
BENCHMARK(BM_Bootstrap)
    ->ArgName("threads")
    ->Arg(1)
    ->Arg(2)
    ->Iterations(1)
    ->Repetitions(3)
    ->Unit(benchmark::kSecond)
    ->UseRealTime();
BENCHMARK(BM_BootstrapPieceResample)->Unit(benchmark::kMicrosecond);
BENCHMARK(BM_BootstrapPieceFit)->ArgName("long_double")->Arg(1)->Arg(0)->Unit(benchmark::kMicrosecond);
BENCHMARK(BM_BootstrapPieceReplicate)->Threads(1)->Threads(2)->Unit(benchmark::kMicrosecond)->UseRealTime();

int main(int argc, char** argv) {
    benchmark::Initialize(&argc, argv);
    if (benchmark::ReportUnrecognizedArguments(argc, argv)) return 1;
    benchmark::RunSpecifiedBenchmarks();
    print_speedup();
    benchmark::Shutdown();
    return 0;
}
