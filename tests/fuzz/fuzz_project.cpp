// libFuzzer target: the project reader (project_from_json, the same entry
// point read_project_file uses after reading the bytes). Properties
// (project.hpp): bad text is an InputError; a project that reads is written
// back (project_to_json) to text that reads as an equal project, and writing
// that again gives the same bytes.
#include <cstddef>
#include <cstdint>
#include <string>

#include "fuzz_common.hpp"
#include "moderato/project/project.hpp"

namespace {

constexpr const char* kTarget = "fuzz_project";

void round_trip(const moderato::Project& p) {
    using moderato::fuzz::require;
    const std::string once = moderato::project_to_json(p);
    moderato::Project again;
    try {
        again = moderato::project_from_json(once, "written.moderato");
    } catch (const moderato::InputError& e) {
        moderato::fuzz::internal_error(kTarget, (std::string("a written project does not read: ") + e.what()).c_str());
    }
    require(again == p, kTarget, "a written project reads back different");
    require(moderato::project_to_json(again) == once, kTarget, "writing a project twice gives different bytes");
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string text(reinterpret_cast<const char*>(data), size);
    moderato::fuzz::run_guarded(kTarget, [&] { round_trip(moderato::project_from_json(text, "fuzz.moderato")); });
    return 0;
}
