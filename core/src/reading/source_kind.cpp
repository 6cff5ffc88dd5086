// The words for a source's kind in project files (data_source.hpp). Kept
// apart from reading so that the project file's code links without the
// readers.
#include <string>

#include "moderato/reading/data_source.hpp"

namespace moderato {

const char* to_string(SourceKind kind) {
    switch (kind) {
        case SourceKind::TextFile:
            return "text-file";
        case SourceKind::Workbook:
            return "workbook";
        case SourceKind::SQLite:
            return "sqlite";
        case SourceKind::PostgreSQL:
            return "postgresql";
    }
    return "text-file";
}

bool source_kind_from_string(const std::string& word, SourceKind& kind) {
    for (const SourceKind k : {SourceKind::TextFile, SourceKind::Workbook, SourceKind::SQLite, SourceKind::PostgreSQL})
        if (word == to_string(k)) {
            kind = k;
            return true;
        }
    return false;
}

}  // namespace moderato
