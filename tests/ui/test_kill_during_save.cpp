// Kill during save: each saving process is killed with SIGKILL at a random
// moment (seeded; the seed is printed) and every file it writes must then be
// the old complete file or the new complete file, never torn or empty. The
// old and new versions are made first by runs that are not killed. The
// temporary files a killed writer leaves (".<name>.tmp-<pid>-<n>") must be
// gone after the next save into that folder, the next render, or the next
// workbench start on the project's folder; files of a live process, and
// files that only look like ours, stay.
//
// The saves are the workbench's own: tests/ui/save_driver.cpp opens the
// project in the main window and calls File ▸ Save, the Memo section's saves
// and the figure export dialog; `moderato-cli render` is run as it is.
//
// The rules checked, from outside: rename(2) replaces the target atomically
// (POSIX: another process sees the old or the new file, never a mix), and
// SIGKILL cannot be caught (POSIX signal.h), so nothing of the writer runs
// after the kill.
#include <gtest/gtest.h>

#include <cstdlib>
#include <iostream>
#include <sstream>

#include "common/sample_projects.hpp"
#include "common/temp_dir.hpp"
#include "kill_trials.hpp"

namespace moderato::test {
namespace {

// The seed of every test in this run: MODERATO_KILL_SEED, else a new one.
std::uint64_t run_seed() {
    static const std::uint64_t seed = [] {
        if (const char* s = std::getenv("MODERATO_KILL_SEED"))
            return static_cast<std::uint64_t>(std::strtoull(s, nullptr, 10));
        return (static_cast<std::uint64_t>(std::random_device{}()) << 32) ^ std::random_device{}();
    }();
    return seed;
}

// Trials per kind: MODERATO_KILL_TRIALS, else `release` (a quarter, at least
// 8, in the sanitizer build, whose runs are several times slower).
int trial_count(int release) {
    if (const char* s = std::getenv("MODERATO_KILL_TRIALS")) return std::max(1, std::atoi(s));
#ifdef MODERATO_SANITIZED_BUILD
    return std::max(8, release / 4);
#else
    return release;
#endif
}

struct Tally {
    int trials = 0;
    int midWrite = 0;       // the killed writer's temporary file was there: killed between open and rename
    int someNew = 0;        // at least one target already replaced by the new file
    int allNew = 0;         // every target replaced (killed after the last rename)
    int cleanedLater = 0;   // stale temporary files of an earlier kill removed by a later run
    int finishedFirst = 0;  // the save had ended by itself before the kill
};

std::string describe(const std::string& kind, const Tally& t, std::uint64_t seed) {
    std::ostringstream s;
    s << "kill-during-save " << kind << ": seed " << seed << ", " << t.trials << " kills, " << t.midWrite
      << " mid-write (temporary file present), " << t.someNew << " after some rename, " << t.allNew
      << " after every rename (" << t.finishedFirst << " of them ended before the kill), " << t.cleanedLater
      << " stale temporary files removed by a later run";
    return s.str();
}

// Puts the old files back where they differ (temporary files are left for the next run to clean).
void restore(const fs::path& folder, const Files& old) {
    const Files now = target_files(folder);
    for (const auto& [rel, bytes] : old)
        if (!now.count(rel) || now.at(rel) != bytes) write_file(folder / rel, bytes);
}

// Folders (relative) in which the run killed as `pid` started writing: its own
// temporary file is there, or a file there is already the new one.
std::set<fs::path> folders_written(const fs::path& folder, pid_t pid, const Files& now, const Files& old,
                                   const Files& fresh) {
    std::set<fs::path> out;
    for (const auto& [path, owner] : temp_files(folder))
        if (owner == pid) out.insert(fs::relative(path, folder).parent_path());
    for (const auto& [rel, bytes] : now)
        if (old.at(rel) != fresh.at(rel) && bytes == fresh.at(rel)) out.insert(fs::path(rel).parent_path());
    return out;
}

// Every target is the old or the new complete file.
void expect_old_or_new(const Files& now, const Files& old, const Files& fresh, const std::string& where, Tally& t) {
    int changed = 0, replaced = 0;
    for (const auto& [rel, bytes] : old) {
        ASSERT_TRUE(now.count(rel)) << where << ": " << rel << " is missing";
        const std::string& got = now.at(rel);
        EXPECT_TRUE(got == bytes || got == fresh.at(rel))
            << where << ": " << rel << " is neither the old (" << bytes.size() << " bytes) nor the new ("
            << fresh.at(rel).size() << " bytes) file but " << got.size() << " bytes";
        if (bytes != fresh.at(rel)) {
            ++changed;
            replaced += got == fresh.at(rel);
        }
    }
    t.someNew += replaced > 0;
    t.allNew += replaced == changed;
}

struct KillPlan {
    std::string kind;
    SaveRun run;                                     // the new version's save
    Files old, fresh;                                // every file of the folder before and after an unkilled save
    double seconds = 0;                              // one unkilled save
    std::vector<std::pair<double, double>> windows;  // when its temporary files existed (from its start)
    bool startCleans = false;  // the driver's start (opening the project there) removes stale temporary files
};

// When to kill: even trials anywhere in [0, one unkilled save]; odd ones
// within a moment at which the unkilled save had a temporary file open (the
// writes are a small part of a save: most of it is drawing and laying out).
double kill_delay(const KillPlan& p, std::mt19937_64& rng, int trial) {
    if (trial % 2 == 0 || p.windows.empty()) return std::uniform_real_distribution<double>(0.0, p.seconds)(rng);
    const auto& w = p.windows[std::uniform_int_distribution<std::size_t>(0, p.windows.size() - 1)(rng)];
    return std::uniform_real_distribution<double>(w.first, w.second)(rng);
}

// One trial: the old files, a save killed after a random delay (kill_delay), then the checks.
void one_trial(const KillPlan& p, std::mt19937_64& rng, int trial, std::uint64_t seed, Tally& t) {
    restore(p.run.folder, p.old);
    std::map<fs::path, pid_t> stale = temp_files(p.run.folder);
    const double delay = kill_delay(p, rng, trial);
    const std::string where = p.kind + " trial " + std::to_string(trial) + " (seed " + std::to_string(seed) +
                              ", killed " + std::to_string(delay) + " s into the save)";
    pid_t pid = 0;
    const RunResult r = run_save(
        p.run, delay,
        [&] {
            if (!p.startCleans) return;
            EXPECT_TRUE(temp_files(p.run.folder).empty())
                << where << ": the workbench start left stale temporary files";
        },
        &pid);
    ASSERT_TRUE(r.ok) << where << ": " << r.why;
    ++t.trials;
    t.finishedFirst += r.finishedFirst;
    const Files now = target_files(p.run.folder);
    ASSERT_NO_FATAL_FAILURE(expect_old_or_new(now, p.old, p.fresh, where, t));
    bool own = false;
    for (const auto& [path, owner] : temp_files(p.run.folder)) own |= owner == pid;
    t.midWrite += own;
    // A run that wrote into a folder removed the stale files an earlier kill left there.
    const std::set<fs::path> written = folders_written(p.run.folder, pid, now, p.old, p.fresh);
    for (const auto& [path, owner] : stale) {
        const fs::path dir = fs::relative(path, p.run.folder).parent_path();
        if (!p.startCleans && !written.count(dir)) continue;
        EXPECT_FALSE(fs::exists(path)) << where << ": " << path << " of the killed run " << owner << " is still there";
        t.cleanedLater += !fs::exists(path);
    }
}

// The trials, then one unkilled save that must leave the new files and no temporary file.
void kill_trials(KillPlan& p, int trials) {
    const std::uint64_t seed = run_seed() ^ std::hash<std::string>{}(p.kind);
    std::mt19937_64 rng(seed);
    Tally t;
    for (int i = 0; i < trials && !::testing::Test::HasFatalFailure(); ++i) one_trial(p, rng, i, seed, t);
    const std::map<fs::path, pid_t> stale = temp_files(p.run.folder);
    const RunResult last = run_save(p.run, -1, [] {});
    ASSERT_TRUE(last.ok) << last.why;
    EXPECT_EQ(target_files(p.run.folder), p.fresh) << "an unkilled save after the kills";
    EXPECT_TRUE(temp_files(p.run.folder).empty()) << "the next save left temporary files of killed runs";
    t.cleanedLater += static_cast<int>(stale.size());
    const std::string line = describe(p.kind, t, seed);
    std::cout << line << std::endl;
    ::testing::Test::RecordProperty("kills", t.trials);
    ::testing::Test::RecordProperty("mid_write", t.midWrite);
    ::testing::Test::RecordProperty("summary", line);
    EXPECT_EQ(t.trials, trials);
}

// Runs `run` unkilled; the files of its folder afterwards, how long it took
// and when its temporary files existed.
Files unkilled(const SaveRun& run, double* seconds = nullptr,
               std::vector<std::pair<double, double>>* windows = nullptr) {
    const RunResult r = run_save(
        run, -1, [] {}, nullptr, windows);
    EXPECT_TRUE(r.ok) << r.why;
    if (seconds) *seconds = r.seconds;
    return target_files(run.folder);
}

// Old and new files differ in `changedAtLeast` targets; none is empty.
void check_versions(const KillPlan& p, int changedAtLeast) {
    ASSERT_EQ(p.old.size(), p.fresh.size());
    int changed = 0;
    for (const auto& [rel, bytes] : p.old) {
        ASSERT_TRUE(p.fresh.count(rel)) << rel;
        EXPECT_FALSE(bytes.empty()) << rel;
        EXPECT_FALSE(p.fresh.at(rel).empty()) << rel;
        changed += bytes != p.fresh.at(rel);
    }
    EXPECT_GE(changed, changedAtLeast) << "the old and new versions must differ for the check to mean anything";
    double writing = 0;
    for (const auto& [from, to] : p.windows) writing += to - from;
    std::cout << p.kind << ": " << p.old.size() << " files, " << changed << " differ; one save takes " << p.seconds
              << " s, of which " << writing << " s with a temporary file (" << p.windows.size() << " writes seen)"
              << std::endl;
}

class KillDuringSave : public ::testing::Test {
protected:
    TempDir dir{"killsave"};

    SaveRun driver(const std::string& kind, const fs::path& project, const fs::path& out, const char* variant,
                   int noteBytes) const {
        SaveRun r;
        r.argv = {MODERATO_SAVE_DRIVER, kind, project.string(), out.string(), variant, std::to_string(noteBytes)};
        r.folder = out;
        r.env = {"QT_QPA_PLATFORM=offscreen", "MODERATO_DRIVER_SETTINGS=" + (dir / "settings").string()};
        r.errLog = dir / (kind + ".log");
        return r;
    }
    // A copy of the sample whose analysis has the variant's settings, saved by the workbench.
    fs::path savedVariant(const std::string& name, const char* variant, int noteBytes) const {
        const fs::path folder = dir / ("project-" + std::string(variant));
        const fs::path project = copy_sample("orchard-nitrogen", folder);
        const fs::path target = folder / name;
        EXPECT_TRUE(unkilled(driver("project", project, folder, variant, noteBytes)).size() > 0);
        fs::rename(project, target);
        return target;
    }
    // A driver kind that writes into an output folder: the old files from the
    // old variant, the new ones from the new variant, then the trials.
    void outputKind(const std::string& kind, int noteBytes, int trials, int changedAtLeast) {
        const fs::path project = copy_sample("orchard-nitrogen", dir / "project");
        const fs::path out = dir / "out";
        fs::create_directories(out);
        KillPlan p;
        p.kind = kind;
        p.old = unkilled(driver(kind, project, out, "old", noteBytes));
        p.run = driver(kind, project, out, "new", noteBytes);
        p.fresh = unkilled(p.run, &p.seconds, &p.windows);
        ASSERT_NO_FATAL_FAILURE(check_versions(p, changedAtLeast));
        kill_trials(p, trial_count(trials));
    }
};

// File ▸ Save over the project file, with 1 MB of memo notes (a long file;
// measured: the temporary file exists for about a tenth of the save, most of
// it the fsync); the next trial's driver opens the project first, which must
// remove the stale temporary file of the killed save.
TEST_F(KillDuringSave, ProjectSave) {
    const fs::path folder = dir / "project";
    const fs::path project = copy_sample("orchard-nitrogen", folder);
    constexpr int kNotes = 1 << 20;
    KillPlan p;
    p.kind = "project-save";
    p.old = unkilled(driver("project", project, folder, "old", kNotes));
    p.run = driver("project", project, folder, "new", kNotes);
    p.fresh = unkilled(p.run, &p.seconds, &p.windows);
    // The quicker of two saves: one slowed by other work on the machine would
    // put most kills after the save has ended.
    double again = 0;
    EXPECT_EQ(unkilled(p.run, &again), p.fresh) << "a second save of the same project wrote other bytes";
    p.seconds = std::min(p.seconds, again);
    p.startCleans = true;
    ASSERT_NO_FATAL_FAILURE(check_versions(p, 1));
    kill_trials(p, trial_count(76));
}

// Memo ▸ Save as HTML, Markdown (and its figure files) and PDF into one folder.
TEST_F(KillDuringSave, MemoSave) { outputKind("memo", 2000, 20, 3); }

// Memo ▸ Save tables in CSV, Markdown, LaTeX and HTML into one folder.
TEST_F(KillDuringSave, TableExport) { outputKind("tables", 100, 24, 4); }

// File ▸ Export Figure at 300 DPI (print resolution) as PNG, SVG and PDF.
TEST_F(KillDuringSave, FigureExport) { outputKind("figure", 100, 40, 3); }

// `moderato-cli render` of the new project over the output of the old one.
TEST_F(KillDuringSave, Render) {
    const fs::path oldProject = savedVariant("old.moderato", "old", 4000);
    const fs::path newProject = savedVariant("new.moderato", "new", 4000);
    const fs::path out = dir / "render";
    const auto render = [&](const fs::path& project) {
        SaveRun r;
        r.argv = {MODERATO_CLI, "render", project.string(), "--out", out.string()};
        r.handshake = false;
        r.folder = out;
        r.env = {"QT_QPA_PLATFORM=offscreen"};
        r.errLog = dir / "render.log";
        return r;
    };
    fs::create_directories(out);
    KillPlan p;
    p.kind = "render";
    p.old = unkilled(render(oldProject));
    p.run = render(newProject);
    p.fresh = unkilled(p.run, &p.seconds, &p.windows);
    ASSERT_NO_FATAL_FAILURE(check_versions(p, 5));
    kill_trials(p, trial_count(40));
}

// The workbench start on a project's folder removes the temporary files of
// dead writers only: a live process's file, and names that merely look like
// ours, stay (by construction of the name: ".<target>.tmp-<pid>-<number>").
TEST_F(KillDuringSave, WorkbenchStartRemovesOnlyDeadWritersFiles) {
    const fs::path folder = dir / "project";
    const fs::path project = copy_sample("orchard-nitrogen", folder);
    pid_t dead = 0;
    {
        Child gone({"/bin/true"}, {}, dir / "true.log", false);
        dead = gone.pid();
        ASSERT_GT(dead, 0);
        gone.wait();
    }
    const std::string live = std::to_string(::getpid());  // this test runs while the driver starts
    const std::string d = std::to_string(dead);
    const std::vector<std::string> removed{".orchard-nitrogen.moderato.tmp-" + d + "-123",
                                           ".plots.csv.tmp-" + d + "-7"};
    const std::vector<std::string> kept{
        ".orchard-nitrogen.moderato.tmp-" + live + "-123",  // a live writer
        "orchard-nitrogen.moderato.tmp-" + d + "-1",        // no leading dot
        ".notes.tmp-" + d + "-",                            // no number
        ".notes.tmp-" + d + "-12a",                         // not only digits
        ".notes.tmp-x" + d + "-12",                         // not a pid
        ".notes.tmp-" + d,                                  // no number part
        ".tmp-" + d + "-1",                                 // no target name
        ".notes.tmp-" + d + "-1.bak",                       // something after the number
    };
    for (const auto& n : removed) write_file(folder / n, "left by a killed save");
    for (const auto& n : kept) write_file(folder / n, "someone else's");
    fs::create_directory(folder / (".folder.tmp-" + d + "-5"));  // a folder is never ours
    const fs::path link = folder / (".link.tmp-" + d + "-6");    // nor a symbolic link
    fs::create_symlink(folder / "plots.csv", link);
    ASSERT_TRUE(unkilled(driver("open", project, folder, "old", 10)).size() > 0);
    for (const auto& n : removed) EXPECT_FALSE(fs::exists(folder / n)) << n << " of a dead writer is still there";
    for (const auto& n : kept) EXPECT_EQ(read_file(folder / n), "someone else's") << n << " was removed or changed";
    EXPECT_TRUE(fs::is_directory(folder / (".folder.tmp-" + d + "-5")));
    EXPECT_TRUE(fs::is_symlink(fs::symlink_status(link)));
}

}  // namespace
}  // namespace moderato::test
