// Recovery copies of unsaved edits: their JSON envelope and whether their writer still runs.
#include "moderato/project/recovery_copy.hpp"

#include <errno.h>
#include <signal.h>

#include <fstream>
#include <nlohmann/json.hpp>
#include <sstream>
#include <vector>

#include "moderato/support/error.hpp"

namespace moderato {

namespace {

using json = nlohmann::json;

constexpr int kRecoveryVersion = 1;

const json& field(const json& doc, const char* key, json::value_t type, const std::string& name) {
    const auto it = doc.find(key);
    const bool number = type == json::value_t::number_integer;
    if (it == doc.end() || !(it->type() == type || (number && it->is_number_unsigned())))
        throw InputError(name + ": not a usable recovery copy: the field \"" + key +
                         "\" is missing or of the wrong type");
    return *it;
}

}  // namespace

std::string recovery_to_json(const RecoveryCopy& copy) {
    json doc;
    doc["moderato_recovery"] = kRecoveryVersion;
    doc["pid"] = copy.pid;
    doc["process_start"] = copy.process_start;
    doc["written"] = copy.written;
    doc["project_path"] = copy.project_path;
    doc["project_sha256"] = copy.project_sha256;
    doc["data_paths"] = copy.data_paths;
    doc["project"] = project_to_json(copy.project);
    return doc.dump(2) + "\n";
}

RecoveryCopy recovery_from_json(const std::string& text, const std::string& name) {
    json doc;
    try {
        doc = json::parse(text);
    } catch (const json::exception& e) {
        throw InputError(name + ": not a usable recovery copy: it is not readable JSON (" + e.what() + ")");
    }
    if (!doc.is_object()) throw InputError(name + ": not a usable recovery copy: expected a JSON object");
    const json::value_t integer = json::value_t::number_integer, string = json::value_t::string;
    if (field(doc, "moderato_recovery", integer, name).get<long long>() != kRecoveryVersion)
        throw InputError(name + ": a recovery copy of another version of Moderato");
    RecoveryCopy copy;
    copy.pid = field(doc, "pid", integer, name).get<long long>();
    copy.process_start = field(doc, "process_start", integer, name).get<long long>();
    copy.written = field(doc, "written", string, name).get<std::string>();
    copy.project_path = field(doc, "project_path", string, name).get<std::string>();
    copy.project_sha256 = field(doc, "project_sha256", string, name).get<std::string>();
    for (const auto& [id, path] : field(doc, "data_paths", json::value_t::object, name).items()) {
        if (!path.is_string())
            throw InputError(name + ": not a usable recovery copy: data_paths." + id + " is not a path");
        copy.data_paths[id] = path.get<std::string>();
    }
    copy.project = project_from_json(field(doc, "project", string, name).get<std::string>(), name + " (project)");
    return copy;
}

namespace {

// Fields 3 and up of /proc/<pid>/stat ("pid (name) state ppid ..."); empty when unreadable.
std::vector<std::string> stat_fields(long long pid) {
    std::ifstream in("/proc/" + std::to_string(pid) + "/stat");
    const std::string text((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
    // The name may hold spaces and parentheses: count from its last ')'.
    const auto close = text.rfind(')');
    std::vector<std::string> fields;
    if (close == std::string::npos) return fields;
    std::istringstream rest(text.substr(close + 1));
    std::string word;
    while (fields.size() < 20 && rest >> word) fields.push_back(word);
    return fields;
}

}  // namespace

long long process_start_time(long long pid) {
    const auto fields = stat_fields(pid);
    return fields.size() >= 20 ? std::strtoll(fields[19].c_str(), nullptr, 10) : 0;  // field 22
}

bool process_alive(long long pid, long long start) {
    if (pid <= 0 || pid > 0x7fffffff) return false;
    if (::kill(static_cast<pid_t>(pid), 0) != 0 && errno == ESRCH) return false;
    const auto fields = stat_fields(pid);
    // A killed process whose parent has not reaped it yet is a zombie (state Z, or X while it goes).
    if (!fields.empty() && (fields[0] == "Z" || fields[0] == "X")) return false;
    const long long now = fields.size() >= 20 ? std::strtoll(fields[19].c_str(), nullptr, 10) : 0;
    return start == 0 || now == 0 || now == start;
}

}  // namespace moderato
