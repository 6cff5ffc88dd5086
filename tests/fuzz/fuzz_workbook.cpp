// libFuzzer target: the workbook (.xlsx) reader on XML parts the fuzzer
// writes, in a zip archive made here (a mutated archive would mostly fail
// its checksums before any XML is read). The input is the parts in order,
// separated by "\n@@part@@\n": xl/workbook.xml, xl/_rels/workbook.xml.rels,
// xl/worksheets/sheet1.xml, xl/sharedStrings.xml, xl/styles.xml; missing
// parts are left out of the archive. Property: listing the sheets and
// reading the first one give a table or an InputError, never anything else,
// and a table's columns all have its row count.
#include <unistd.h>
#include <zip.h>

#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <string_view>
#include <vector>

#include "fuzz_common.hpp"
#include "moderato/reading/workbook.hpp"

namespace {

using namespace moderato;

constexpr const char* kTarget = "fuzz_workbook";
constexpr std::string_view kSeparator = "\n@@part@@\n";
constexpr const char* kParts[] = {"xl/workbook.xml", "xl/_rels/workbook.xml.rels", "xl/worksheets/sheet1.xml",
                                  "xl/sharedStrings.xml", "xl/styles.xml"};

constexpr const char* kRootRels =
    "<?xml version=\"1.0\"?><Relationships xmlns=\"http://schemas.openxmlformats.org/package/2006/relationships\">"
    "<Relationship Id=\"rId1\" Type=\"http://schemas.openxmlformats.org/officeDocument/2006/relationships/"
    "officeDocument\" Target=\"xl/workbook.xml\"/></Relationships>";

constexpr const char* kContentTypes =
    "<?xml version=\"1.0\"?><Types xmlns=\"http://schemas.openxmlformats.org/package/2006/content-types\">"
    "<Default Extension=\"xml\" ContentType=\"application/xml\"/></Types>";

std::vector<std::string> split_parts(std::string_view input) {
    std::vector<std::string> parts;
    while (parts.size() + 1 < std::size(kParts)) {
        const std::size_t at = input.find(kSeparator);
        if (at == std::string_view::npos) break;
        parts.emplace_back(input.substr(0, at));
        input.remove_prefix(at + kSeparator.size());
    }
    parts.emplace_back(input);
    return parts;
}

// Writes the archive to `path`; false when libzip cannot (not the reader's fault).
bool write_archive(const std::string& path, const std::vector<std::string>& parts) {
    int error = 0;
    zip_t* z = zip_open(path.c_str(), ZIP_CREATE | ZIP_TRUNCATE, &error);
    if (!z) return false;
    const auto add = [z](const char* name, const std::string& bytes) {
        zip_source_t* s = zip_source_buffer(z, bytes.data(), bytes.size(), 0);
        if (s && zip_file_add(z, name, s, ZIP_FL_OVERWRITE) < 0) zip_source_free(s);
    };
    const std::string root = kRootRels, types = kContentTypes;
    add("[Content_Types].xml", types);
    add("_rels/.rels", root);
    for (std::size_t i = 0; i < parts.size(); ++i) add(kParts[i], parts[i]);
    return zip_close(z) == 0;  // the buffers must live until here
}

const std::string& scratch_path() {
    static const std::string path = [] {
        char name[] = "/tmp/moderato-fuzz-workbook-XXXXXX.xlsx";
        const int fd = ::mkstemps(name, 5);
        if (fd >= 0) ::close(fd);
        std::atexit([] { std::remove(scratch_path().c_str()); });
        return std::string(name);
    }();
    return path;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::vector<std::string> parts = split_parts({reinterpret_cast<const char*>(data), size});
    const std::string& path = scratch_path();
    if (!write_archive(path, parts)) return 0;
    fuzz::run_guarded(kTarget, [&] { workbook_sheets(path); });
    fuzz::run_guarded(kTarget, [&] {
        const Table t = read_workbook(path, "");
        for (const Column& c : t.columns)
            fuzz::require(c.size() == t.rows(), kTarget, "a column's length differs from the table's rows");
    });
    return 0;
}
