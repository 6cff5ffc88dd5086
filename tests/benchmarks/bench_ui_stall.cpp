// Stalls of the workbench's event loop while it does long work.
//
//   moderato_bench_ui_stall [--rows N] [--mid-rows N] [--boot-rows N] [--replicates R] [--dir DIR] [--keep]
//                           [--json FILE]
//
// Writes seeded projects (bench_project.hpp: y on x1, x3, x1×x3, c1, c2,
// region, HC3) with 1,000,000 rows ("big"), 150,000 rows ("mid": below the
// size at which the workbench used to move a fit into a worker) and 20,000
// rows (the bootstrap's data) into a temporary folder. Then drives a
// MainWindow (1360 × 860, offscreen unless QT_QPA_PLATFORM says otherwise)
// through these phases, each started from inside the event loop as a click
// would be, and waits (in the event loop) until the work is done plus 300 ms:
//
//   open big       MainWindow::openProject + the first fit
//   refit big      the SE kind changed (HC3 → HC1): a new fit
//   checks big     the Checks section shown: diagnostics of 1,000,000 rows
//   bootstrap      core bootstrap_probe (R replicates, 20,000 rows) in a BackgroundJob
//   open mid       the 150,000-row project opened, its first fit
//   refit mid      three SE kind changes, one after the other
//   checks mid     the Checks section shown
//
// A precise 5 ms QTimer runs all along; each tick records its lateness (the
// time since the previous tick less 5 ms): how long the event loop could not
// answer. Prints, per phase and in all, the ticks, median, p90, p99 and max
// lateness and the count above 50 ms. Goal: max <= 50 ms. A benchmark, not a
// test: it exits non-zero only when the work itself fails.
#include <QAbstractButton>
#include <QApplication>
#include <QElapsedTimer>
#include <QEventLoop>
#include <QStandardPaths>
#include <QTimer>
#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <functional>
#include <map>
#include <memory>
#include <stdexcept>
#include <string>
#include <thread>
#include <vector>

#include "bench_project.hpp"
#include "common/background_job.hpp"
#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "moderato/probing/probe_bootstrap.hpp"
#include "moderato/project/analysis_run.hpp"
#include "moderato/project/project.hpp"
#include "moderato/reading/csv.hpp"
#include "sections/checks_section.hpp"
#include "sections/probe_section.hpp"
#include "shell/analysis_page.hpp"
#include "shell/main_window.hpp"

namespace fs = std::filesystem;
using moderato::ui::AnalysisPage;
using moderato::ui::MainWindow;

namespace {

constexpr int kTickMs = 5;

// Lateness of a precise 5 ms timer, per phase.
class StallMeter {
public:
    StallMeter() {
        timer_.setTimerType(Qt::PreciseTimer);
        timer_.setInterval(kTickMs);
        QObject::connect(&timer_, &QTimer::timeout, [this] { tick(); });
    }
    void begin(const std::string& phase) {
        phase_ = phase;
        order_.push_back(phase);
        clock_.start();
        last_ = 0;
        timer_.start();
    }
    void end() { timer_.stop(); }
    const std::vector<std::string>& phases() const { return order_; }
    const std::vector<double>& lateness(const std::string& phase) const { return late_.at(phase); }

private:
    void tick() {
        const qint64 now = clock_.nsecsElapsed();
        const double gap_ms = static_cast<double>(now - last_) / 1e6;
        last_ = now;
        late_[phase_].push_back(std::max(0.0, gap_ms - kTickMs));
    }
    QTimer timer_;
    QElapsedTimer clock_;
    qint64 last_ = 0;
    std::string phase_;
    std::vector<std::string> order_;
    std::map<std::string, std::vector<double>> late_;
};

struct Summary {
    std::size_t ticks = 0, over50 = 0;
    double median = 0, p90 = 0, p99 = 0, max = 0;
};

double quantile(const std::vector<double>& sorted, double q) {
    if (sorted.empty()) return 0.0;
    const auto i = static_cast<std::size_t>(std::ceil(q * static_cast<double>(sorted.size()))) - (q > 0 ? 1 : 0);
    return sorted[std::min(i, sorted.size() - 1)];
}

Summary summarise(std::vector<double> v) {
    std::sort(v.begin(), v.end());
    Summary s;
    s.ticks = v.size();
    s.median = quantile(v, 0.5), s.p90 = quantile(v, 0.9), s.p99 = quantile(v, 0.99);
    s.max = v.empty() ? 0.0 : v.back();
    s.over50 = static_cast<std::size_t>(std::count_if(v.begin(), v.end(), [](double x) { return x > 50.0; }));
    return s;
}

// Starts `action` from inside the event loop, runs the loop until `done`
// holds (polled every 10 ms) and 300 ms more, measuring all along.
bool run_phase(StallMeter& meter, const std::string& name, const std::function<void()>& action,
               const std::function<bool()>& done) {
    meter.begin(name);
    QEventLoop loop;
    QTimer poll;
    poll.setInterval(10);
    bool finished = false;
    QObject::connect(&poll, &QTimer::timeout, &loop, [&] {
        if (!done()) return;
        poll.stop();
        finished = true;
        QTimer::singleShot(300, &loop, &QEventLoop::quit);
    });
    QTimer::singleShot(0, &loop, [&] {
        action();
        poll.start();
    });
    QTimer::singleShot(300000, &loop, &QEventLoop::quit);  // give up after 5 minutes
    loop.exec();
    meter.end();
    if (!finished) std::fprintf(stderr, "moderato_bench_ui_stall: phase '%s' did not finish\n", name.c_str());
    return finished;
}

// Counts the results that arrive for one analysis.
struct ResultCounter {
    int count = 0;
    explicit ResultCounter(MainWindow& w, const QString& id) {
        QObject::connect(w.runner(), &moderato::ui::AnalysisRunner::resultChanged, w.runner(),
                         [this, id](const QString& changed) { count += changed == id; });
    }
};

bool idle(MainWindow& w, const QString& id) {
    return !w.isLoading() && !w.runner()->busy(id) && !w.analysisPage()->probe()->isPreparing() &&
           (w.runner()->result(id) || !w.runner()->error(id).isEmpty());
}

bool checks_idle(MainWindow& w) { return !w.analysisPage()->checks()->isComputing(); }

void set_se(MainWindow& w, const QString& id, moderato::SeKind se) {
    moderato::Analysis a = *w.document()->analysis(id);
    a.se = se;
    w.document()->setAnalysis(a, QStringLiteral("Standard errors"));
}

bool drive_project(StallMeter& meter, MainWindow& w, const QString& path, const QString& id, const std::string& tag,
                   const std::vector<moderato::SeKind>& refits) {
    w.analysisPage()->showSection(AnalysisPage::Probe);
    ResultCounter results(w, id);
    if (!run_phase(
            meter, "open " + tag, [&] { w.openProject(path); }, [&] { return idle(w, id); }))
        return false;
    const int before = results.count;
    std::size_t next = 0;
    const auto refit_done = [&] {
        if (!idle(w, id) || results.count < before + static_cast<int>(next)) return false;
        if (next == refits.size()) return true;
        set_se(w, id, refits[next++]);  // the next change, as the user's next click
        return false;
    };
    if (!run_phase(
            meter, "refit " + tag, [&] { set_se(w, id, refits[next++]); }, refit_done))
        return false;
    return run_phase(
        meter, "checks " + tag, [&] { w.analysisPage()->showSection(AnalysisPage::Checks); },
        [&] { return checks_idle(w); });
}

bool drive_bootstrap(StallMeter& meter, const std::string& csv, int replicates) {
    auto table = std::make_shared<const moderato::Table>(moderato::read_csv(csv));
    const moderato::Project p = moderato::bench::make_project(csv);
    auto run = std::make_shared<const moderato::AnalysisRun>(moderato::run_analysis(table, p.analyses.front()));
    moderato::ui::BackgroundJob job;
    bool done = false;
    QObject::connect(&job, &moderato::ui::BackgroundJob::finished, [&](bool) { done = true; });
    const auto work = [run, replicates](const moderato::ui::BackgroundJob::Progress& progress) {
        moderato::ProbeSpec spec;
        spec.focal = "x1";
        spec.moderator = "x3";
        moderato::BootstrapOptions o;
        o.replicates = replicates;
        o.seed = 7;
        o.progress = [&progress](int d, int t) {
            return progress(static_cast<std::size_t>(d), static_cast<std::size_t>(t));
        };
        (void)moderato::bootstrap_probe(run->design, run->spec, spec, *run->probe, o);
    };
    return run_phase(
        meter, "bootstrap", [&] { job.start(work); }, [&] { return done; });
}

void print_summary(const StallMeter& meter, std::FILE* json) {
    std::printf(
        "| phase | ticks | median (ms) | p90 | p99 | max | > 50 ms |\n| --- | --- | --- | --- | --- | --- | --- |\n");
    std::vector<double> all;
    if (json) std::fprintf(json, "{\"tick_ms\": %d, \"phases\": [\n", kTickMs);
    const auto row = [&](const std::string& name, const Summary& s, bool last) {
        std::printf("| %s | %zu | %.2f | %.2f | %.2f | %.1f | %zu |\n", name.c_str(), s.ticks, s.median, s.p90, s.p99,
                    s.max, s.over50);
        if (json)
            std::fprintf(json,
                         "  {\"phase\": \"%s\", \"ticks\": %zu, \"median_ms\": %.3f, \"p90_ms\": %.3f, "
                         "\"p99_ms\": %.3f, \"max_ms\": %.3f, \"over_50ms\": %zu}%s\n",
                         name.c_str(), s.ticks, s.median, s.p90, s.p99, s.max, s.over50, last ? "" : ",");
    };
    for (const std::string& phase : meter.phases()) {
        const auto& v = meter.lateness(phase);
        all.insert(all.end(), v.begin(), v.end());
        row(phase, summarise(v), false);
    }
    const Summary s = summarise(all);
    row("all", s, true);
    std::printf("\ngoal: longest stall <= 50 ms: %s (max %.1f ms, %zu ticks above 50 ms)\n",
                s.max <= 50.0 ? "met" : "MISSED", s.max, s.over50);
    if (json)
        std::fprintf(json, "], \"max_ms\": %.3f, \"goal_ms\": 50, \"met\": %s}\n", s.max,
                     s.max <= 50 ? "true" : "false");
}

struct Options {
    std::uint64_t rows = 1000000, mid_rows = 150000, boot_rows = 20000;
    int replicates = 500;
    std::string dir, json;
    bool keep = false;
};

int parse(int argc, char** argv, Options& o) {
    for (int i = 1; i < argc; ++i) {
        const std::string a = argv[i];
        const bool v = i + 1 < argc;
        if (a == "--rows" && v) o.rows = std::strtoull(argv[++i], nullptr, 10);
        else if (a == "--mid-rows" && v) o.mid_rows = std::strtoull(argv[++i], nullptr, 10);
        else if (a == "--boot-rows" && v) o.boot_rows = std::strtoull(argv[++i], nullptr, 10);
        else if (a == "--replicates" && v) o.replicates = std::max(100, std::atoi(argv[++i]));
        else if (a == "--dir" && v) o.dir = argv[++i];
        else if (a == "--json" && v) o.json = argv[++i];
        else if (a == "--keep") o.keep = true;
        else {
            std::fprintf(stderr,
                         "usage: moderato_bench_ui_stall [--rows N] [--mid-rows N] [--boot-rows N] [--replicates R]"
                         " [--dir DIR] [--keep] [--json FILE]\n");
            return a == "--help" || a == "-h" ? 0 : 2;
        }
    }
    return -1;
}

std::string write_project(const std::string& dir, const std::string& stem, std::uint64_t rows) {
    const std::string csv = (fs::path(dir) / (stem + ".csv")).string();
    moderato::bench::write_csv(csv, rows);
    const std::string project = (fs::path(dir) / (stem + ".moderato")).string();
    moderato::write_project_file(moderato::bench::make_project(csv), project);
    return project;
}

}  // namespace

int main(int argc, char** argv) {
    if (qEnvironmentVariableIsEmpty("QT_QPA_PLATFORM")) qputenv("QT_QPA_PLATFORM", "offscreen");
    QStandardPaths::setTestModeEnabled(true);
    Options o;
    if (const int rc = parse(argc, argv, o); rc >= 0) return rc;
    QApplication app(argc, argv);
    QApplication::setOrganizationName(QStringLiteral("Moderato-bench"));
    QApplication::setApplicationName(QStringLiteral("Moderato-bench"));
    const bool made_dir = o.dir.empty();
    if (made_dir) {
        std::string pattern = (fs::temp_directory_path() / "moderato_bench_stall_XXXXXX").string();
        if (!::mkdtemp(pattern.data())) return std::perror("mkdtemp"), 1;
        o.dir = pattern;
    }
    fs::create_directories(o.dir);
    const std::string big = write_project(o.dir, "big", o.rows);
    const std::string mid = write_project(o.dir, "mid", o.mid_rows);
    write_project(o.dir, "boot", o.boot_rows);
    std::printf(
        "moderato_bench_ui_stall: %llu / %llu rows (fits), %llu rows × %d replicates (bootstrap); "
        "%u hardware threads; platform %s\n\n",
        static_cast<unsigned long long>(o.rows), static_cast<unsigned long long>(o.mid_rows),
        static_cast<unsigned long long>(o.boot_rows), o.replicates, std::thread::hardware_concurrency(),
        qgetenv("QT_QPA_PLATFORM").constData());

    StallMeter meter;
    bool ok = true;
    {
        MainWindow w;
        w.setInteractive(false);
        w.resize(1360, 860);
        w.show();
        QCoreApplication::processEvents();
        const QString id = QStringLiteral("big-model");
        using moderato::SeKind;
        ok = drive_project(meter, w, QString::fromStdString(big), id, "big", {SeKind::HC1}) &&
             drive_bootstrap(meter, (fs::path(o.dir) / "boot.csv").string(), o.replicates) &&
             drive_project(meter, w, QString::fromStdString(mid), id, "mid", {SeKind::HC1, SeKind::HC2, SeKind::HC3});
        if (!w.runner()->error(id).isEmpty()) std::fprintf(stderr, "%s\n", qPrintable(w.runner()->error(id)));
    }
    std::FILE* json = o.json.empty() ? nullptr : std::fopen(o.json.c_str(), "w");
    print_summary(meter, json);
    if (json) std::fclose(json);
    if (!o.keep && made_dir) {
        std::error_code ec;
        fs::remove_all(o.dir, ec);
    } else {
        std::printf("files kept in %s\n", o.dir.c_str());
    }
    return ok ? 0 : 1;
}
