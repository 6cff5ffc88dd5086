// Opening a big project in the workbench until it is interactive.
//
//   moderato_bench_open [--rows N] [--repeats R] [--dir DIR] [--keep] [--json FILE]
//
// Writes a seeded CSV (default 1,000,000 rows, 6 columns: outcome y, focal
// predictor x1, moderator x3, group region, controls c1 and c2; the rows of
// bench_data.hpp) and a project for it (core write_project_file, one
// analysis: y on x1, x3, x1×x3, c1, c2, region, HC3) into a temporary folder.
// Then, R times and interleaved, in this one process on the offscreen
// platform:
//   open   MainWindow::openProject(path) and its load + waiting for the analysis's first
//          result (runner->result(id)) + one processEvents and a full paint of
//          the window (QWidget::grab) = "until interactive";
//   read   core read_csv of the same file alone (the reference);
//   hash   core sha256_file of the same file alone;
//   fit    core run_analysis on the table in memory (for the breakdown).
// Prints every run, the medians, the ratio open / read, and the target
// (open <= 3 s). The file is in the page cache for every run (it was just
// written), so the times are CPU times of parsing, hashing and fitting.
// --json FILE also writes the numbers as JSON (run_benchmarks.py reads it).
#include <QApplication>
#include <QElapsedTimer>
#include <QEventLoop>
#include <QPixmap>
#include <QStandardPaths>
#include <QString>
#include <algorithm>
#include <charconv>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <string>
#include <thread>
#include <vector>

#include "bench_project.hpp"
#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "moderato/project/analysis_run.hpp"
#include "moderato/project/project.hpp"
#include "moderato/project/project_loader.hpp"
#include "moderato/reading/csv.hpp"
#include "moderato/support/sha256.hpp"
#include "shell/main_window.hpp"

namespace fs = std::filesystem;
using Clock = std::chrono::steady_clock;

namespace {

double seconds_since(Clock::time_point t0) { return std::chrono::duration<double>(Clock::now() - t0).count(); }

double median(std::vector<double> v) {
    std::sort(v.begin(), v.end());
    const std::size_t n = v.size();
    return n == 0 ? 0.0 : n % 2 ? v[n / 2] : 0.5 * (v[n / 2 - 1] + v[n / 2]);
}

struct OpenTiming {
    double total = 0, load = 0, result = 0, paint = 0;
    bool ok = false;
    std::string error;
};

OpenTiming time_open(const QString& project, const QString& id) {
    OpenTiming t;
    moderato::ui::MainWindow w;
    w.setInteractive(false);
    w.resize(1360, 860);
    w.show();
    QCoreApplication::processEvents();
    const auto t0 = Clock::now();
    // Opening is asynchronous: wait in an event loop for the load to end.
    moderato::ui::MainWindow::LoadResult loaded = moderato::ui::MainWindow::Failed;
    {
        QEventLoop loop;
        QObject::connect(&w, &moderato::ui::MainWindow::loadFinished, &loop,
                         [&](const QString&, moderato::ui::MainWindow::LoadResult r) {
                             loaded = r;
                             loop.quit();
                         });
        w.openProject(project);
        if (w.isLoading()) loop.exec();
    }
    if (loaded != moderato::ui::MainWindow::Loaded) {
        t.error = w.lastMessage().toStdString();
        return t;
    }
    t.load = seconds_since(t0);
    const auto t1 = Clock::now();
    // Wait in an event loop as the application does (the UI thread sleeps
    // while the worker fits; a polling loop would take a core from the fit).
    const auto done = [&] { return w.runner()->result(id) || !w.runner()->error(id).isEmpty(); };
    if (!done()) {
        QEventLoop loop;
        QObject::connect(w.runner(), &moderato::ui::AnalysisRunner::resultChanged, &loop, [&](const QString& changed) {
            if (changed == id && done()) loop.quit();
        });
        loop.exec();
    }
    t.result = seconds_since(t1);
    if (!w.runner()->error(id).isEmpty()) {
        t.error = w.runner()->error(id).toStdString();
        return t;
    }
    const auto t2 = Clock::now();
    QCoreApplication::processEvents();
    const QPixmap shot = w.grab();
    t.paint = seconds_since(t2);
    t.total = seconds_since(t0);
    t.ok = !shot.isNull();
    return t;
}

void usage(std::FILE* to) {
    std::fputs(
        "usage: moderato_bench_open [--rows N] [--repeats R] [--dir DIR] [--keep]\n"
        "  --rows N     data rows (default 1000000)\n"
        "  --repeats R  runs of each measurement; medians are reported (default 3)\n"
        "  --dir DIR    folder for the CSV and the project (default: a new temporary folder)\n"
        "  --keep       keep the files afterwards\n"
        "  --json FILE  also write the results as JSON\n",
        to);
}

}  // namespace

int main(int argc, char** argv) {
    if (qEnvironmentVariableIsEmpty("QT_QPA_PLATFORM")) qputenv("QT_QPA_PLATFORM", "offscreen");
    QStandardPaths::setTestModeEnabled(true);  // recent files and window state stay out of the user's settings
    std::uint64_t rows = 1000000;
    int repeats = 3;
    std::string dir;
    bool keep = false;
    std::string json_path;
    for (int i = 1; i < argc; ++i) {
        const std::string a = argv[i];
        const bool has_value = i + 1 < argc;
        if (a == "--help" || a == "-h") {
            usage(stdout);
            return 0;
        } else if (a == "--rows" && has_value) {
            rows = std::strtoull(argv[++i], nullptr, 10);
        } else if (a == "--repeats" && has_value) {
            repeats = std::max(1, std::atoi(argv[++i]));
        } else if (a == "--dir" && has_value) {
            dir = argv[++i];
        } else if (a == "--json" && has_value) {
            json_path = argv[++i];
        } else if (a == "--keep") {
            keep = true;
        } else {
            std::fprintf(stderr, "moderato_bench_open: unexpected argument '%s'\n", argv[i]);
            usage(stderr);
            return 2;
        }
    }
    QApplication app(argc, argv);
    QApplication::setOrganizationName(QStringLiteral("Moderato-bench"));
    QApplication::setApplicationName(QStringLiteral("Moderato-bench"));

    bool made_dir = false;
    if (dir.empty()) {
        std::string pattern = (fs::temp_directory_path() / "moderato_bench_open_XXXXXX").string();
        if (!::mkdtemp(pattern.data())) {
            std::perror("mkdtemp");
            return 1;
        }
        dir = pattern;
        made_dir = true;
    }
    fs::create_directories(dir);
    const std::string csv = (fs::path(dir) / "big.csv").string();
    const std::string project = (fs::path(dir) / "big.moderato").string();

    auto t0 = Clock::now();
    moderato::bench::write_csv(csv, rows);
    const double t_write = seconds_since(t0);
    const moderato::Project p = moderato::bench::make_project(csv);
    moderato::write_project_file(p, project);
    const auto bytes = fs::file_size(csv);
    std::printf("moderato_bench_open: %llu rows, 6 columns, %.1f MB (10^6 bytes) written in %.2f s to %s\n",
                static_cast<unsigned long long>(rows), static_cast<double>(bytes) / 1e6, t_write, dir.c_str());
    std::printf("hardware threads: %u; platform: %s\n\n", std::thread::hardware_concurrency(),
                qgetenv("QT_QPA_PLATFORM").constData());

    const QString id = QString::fromStdString(p.analyses.front().id);
    std::vector<double> open, load, result, paint, read, hash, fit;
    std::printf(
        "| run | open (s) | = load | + first result | + paint | read_csv (s) | sha256_file (s) | run_analysis (s) |\n");
    std::printf("| --- | --- | --- | --- | --- | --- | --- | --- |\n");
    for (int r = 0; r < repeats; ++r) {
        const OpenTiming o = time_open(QString::fromStdString(project), id);
        if (!o.ok) {
            std::fprintf(stderr, "moderato_bench_open: opening failed: %s\n", o.error.c_str());
            return 1;
        }
        t0 = Clock::now();
        auto table = std::make_shared<const moderato::Table>(moderato::read_csv(csv));
        const double t_read = seconds_since(t0);
        t0 = Clock::now();
        const std::string h = moderato::sha256_file(csv);
        const double t_hash = seconds_since(t0);
        if (h != p.datasets.front().sha256) {
            std::fprintf(stderr, "moderato_bench_open: the file changed during the benchmark\n");
            return 1;
        }
        t0 = Clock::now();
        const moderato::AnalysisRun run = moderato::run_analysis(table, p.analyses.front());
        const double t_fit = seconds_since(t0);
        (void)run;
        open.push_back(o.total), load.push_back(o.load), result.push_back(o.result), paint.push_back(o.paint);
        read.push_back(t_read), hash.push_back(t_hash), fit.push_back(t_fit);
        std::printf("| %d | %.3f | %.3f | %.3f | %.3f | %.3f | %.3f | %.3f |\n", r + 1, o.total, o.load, o.result,
                    o.paint, t_read, t_hash, t_fit);
        std::fflush(stdout);
    }
    const double m_open = median(open), m_read = median(read);
    std::printf("| median | %.3f | %.3f | %.3f | %.3f | %.3f | %.3f | %.3f |\n\n", m_open, median(load), median(result),
                median(paint), m_read, median(hash), median(fit));
    std::printf("open / read_csv = %.2f; sha256_file / read_csv = %.2f\n", m_open / m_read, median(hash) / m_read);
    std::printf("target: open <= 3 s (until interactive): %s (median %.2f s)\n", m_open <= 3.0 ? "met" : "MISSED",
                m_open);

    if (!json_path.empty()) {
        const auto list = [](const std::vector<double>& v) {
            std::string out = "[";
            for (std::size_t i = 0; i < v.size(); ++i) out += (i ? ", " : "") + std::to_string(v[i]);
            return out + "]";
        };
        std::FILE* f = std::fopen(json_path.c_str(), "w");
        if (!f) {
            std::fprintf(stderr, "moderato_bench_open: cannot write %s\n", json_path.c_str());
            return 1;
        }
        std::fprintf(f,
                     "{\"rows\": %llu, \"file_bytes\": %llu, \"repeats\": %d,\n"
                     " \"open_s_runs\": %s,\n \"read_csv_s_runs\": %s,\n"
                     " \"open_s_median\": %.6f, \"load_s_median\": %.6f, \"first_result_s_median\": %.6f,"
                     " \"paint_s_median\": %.6f,\n \"read_csv_s_median\": %.6f, \"sha256_s_median\": %.6f,"
                     " \"run_analysis_s_median\": %.6f,\n \"ratio_open_read\": %.6f, \"target_s\": 3.0,"
                     " \"met\": %s}\n",
                     static_cast<unsigned long long>(rows), static_cast<unsigned long long>(bytes), repeats,
                     list(open).c_str(), list(read).c_str(), m_open, median(load), median(result), median(paint),
                     m_read, median(hash), median(fit), m_open / m_read, m_open <= 3.0 ? "true" : "false");
        std::fclose(f);
    }
    if (!keep && made_dir) {
        std::error_code ec;
        fs::remove_all(dir, ec);
    } else {
        std::printf("files kept in %s\n", dir.c_str());
    }
    return 0;
}
