// A recovery copy: the unsaved edits of a running workbench, kept in the
// user's state folder so a crash or a killed session loses nothing. It holds
// the project as JSON and what is needed to put it back: the project file it
// belongs to, that file's SHA-256 when it was opened or saved (to notice a
// file that changed meanwhile), the data files as absolute paths, and the
// process that wrote it (a live process's copy is never offered).
#pragma once

#include <map>
#include <string>

#include "moderato/project/project.hpp"

namespace moderato {

struct RecoveryCopy {
    long long pid = 0;                              // the workbench process that wrote it
    long long process_start = 0;                    // its start time (see process_start_time); 0: unknown
    std::string written;                            // when, UTC, ISO 8601 ("2026-12-04T05:06:07Z")
    std::string project_path;                       // absolute; empty: a project never saved
    std::string project_sha256;                     // of that file as opened or last saved; empty: unknown
    std::map<std::string, std::string> data_paths;  // dataset id -> absolute data file
    Project project;                                // the edited project
};

// The copy as JSON text (its own small envelope around project_to_json).
std::string recovery_to_json(const RecoveryCopy& copy);

// Parses a copy. InputError naming `name` and what is wrong (not JSON, not
// a recovery copy, a field of the wrong type, a project that does not parse).
RecoveryCopy recovery_from_json(const std::string& text, const std::string& name);

// The start time of process `pid` in clock ticks since boot (Linux
// /proc/<pid>/stat, field 22); 0 when it cannot be read.
long long process_start_time(long long pid);

// Whether the process that wrote a copy still runs: `pid` exists and, when
// both start times are known, started at `start` (a reused pid is not it).
bool process_alive(long long pid, long long start);

}  // namespace moderato
