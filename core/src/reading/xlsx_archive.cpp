// The zip container of a workbook and the streaming XML parse of its parts.
#include "reading/xlsx_archive.hpp"

#include <algorithm>
#include <cstring>
#include <exception>
#include <filesystem>
#include <fstream>

#include <expat.h>
#include <zip.h>

#include "moderato/support/error.hpp"

namespace moderato::xlsx_detail {

namespace {

constexpr unsigned char kOle[8] = {0xD0, 0xCF, 0x11, 0xE0, 0xA1, 0xB1, 0x1A, 0xE1};
constexpr std::size_t kChunk = std::size_t{1} << 18;

// An OLE compound file holding a stream named "EncryptedPackage" is an
// encrypted Office Open XML document (ECMA-376 part 2 / MS-OFFCRYPTO); the
// directory entry's name is UTF-16LE.
bool holds_encrypted_package(const std::string& path) {
    static const std::string needle = [] {
        std::string s;
        for (const char c : std::string("EncryptedPackage")) s += c, s += '\0';
        return s;
    }();
    std::ifstream in(path, std::ios::binary);
    std::string buf(kChunk + needle.size(), '\0');
    std::size_t keep = 0;
    while (in) {
        in.read(buf.data() + keep, static_cast<std::streamsize>(kChunk));
        const auto got = static_cast<std::size_t>(in.gcount());
        if (got == 0) break;
        const std::string_view view(buf.data(), keep + got);
        if (view.find(needle) != std::string_view::npos) return true;
        keep = std::min(needle.size(), keep + got);
        std::memmove(buf.data(), buf.data() + (view.size() - keep), keep);
    }
    return false;
}

struct ParseState {
    XmlHandler* handler = nullptr;
    XML_Parser parser = nullptr;
    std::exception_ptr error;
    bool doctype = false;
};

template <class Fn>
void guarded(void* data, Fn&& fn) {
    auto* st = static_cast<ParseState*>(data);
    if (st->error) return;
    try {
        fn(*st);
    } catch (...) {
        st->error = std::current_exception();
        XML_StopParser(st->parser, XML_FALSE);
    }
}

void XMLCALL on_start(void* data, const XML_Char* name, const XML_Char** atts) {
    guarded(data, [&](ParseState& st) { st.handler->start(local_name(name), atts); });
}
void XMLCALL on_end(void* data, const XML_Char* name) {
    guarded(data, [&](ParseState& st) { st.handler->end(local_name(name)); });
}
void XMLCALL on_text(void* data, const XML_Char* s, int len) {
    guarded(data, [&](ParseState& st) { st.handler->text(std::string_view(s, static_cast<std::size_t>(len))); });
}
// Office Open XML parts never declare a document type; one that does is
// refused (no entity tricks).
void XMLCALL on_doctype(void* data, const XML_Char*, const XML_Char*, const XML_Char*, int) {
    auto* st = static_cast<ParseState*>(data);
    st->doctype = true;
    XML_StopParser(st->parser, XML_FALSE);
}

}  // namespace

std::string_view local_name(const char* name) {
    const char* colon = std::strchr(name, ':');
    return colon ? std::string_view(colon + 1) : std::string_view(name);
}

const char* attribute(const char** atts, std::string_view local) {
    for (; atts && *atts; atts += 2)
        if (local_name(atts[0]) == local) return atts[1];
    return nullptr;
}

struct Archive::Zip {
    zip_t* z = nullptr;
    ~Zip() {
        if (z) zip_discard(z);
    }
};

Archive::Archive(const std::string& path, const std::string& name) : name_(name), zip_(std::make_unique<Zip>()) {
    std::error_code ec;
    const auto st = std::filesystem::status(path, ec);
    if (st.type() == std::filesystem::file_type::not_found) fail("file not found; check the path and the file name");
    if (st.type() == std::filesystem::file_type::directory) fail("is a folder, not a file; choose a workbook");
    std::ifstream in(path, std::ios::binary);
    if (!in) fail("cannot be opened; check that you may read the file");
    unsigned char head[8] = {};
    in.read(reinterpret_cast<char*>(head), 8);
    const auto got = static_cast<std::size_t>(in.gcount());
    if (got == 8 && std::memcmp(head, kOle, 8) == 0) {
        if (holds_encrypted_package(path))
            fail(
                "is an encrypted (password-protected) workbook, which Moderato cannot read; save a copy without "
                "the password in your spreadsheet program and read that copy");
        fail(
            "is a legacy binary workbook (.xls, an OLE compound file), which Moderato does not read; save it "
            "as .xlsx or as CSV in your spreadsheet program and read that file");
    }
    if (got < 4 || head[0] != 'P' || head[1] != 'K')
        fail(
            "is not a workbook: an .xlsx file is a zip archive and this file is not one (it may be another "
            "format with the wrong extension); save it as .xlsx or CSV and read that file");
    int err = 0;
    zip_->z = zip_open(path.c_str(), ZIP_RDONLY | ZIP_CHECKCONS, &err);
    if (!zip_->z) {
        zip_error_t ze;
        zip_error_init_with_code(&ze, err);
        const std::string why = zip_error_strerror(&ze);
        zip_error_fini(&ze);
        fail("the workbook's zip archive is damaged (" + why +
             "); open it in your spreadsheet program and save it again, or read a CSV copy");
    }
}

Archive::~Archive() = default;

void Archive::fail(const std::string& rest) const { throw InputError(name_ + ": " + rest); }

bool Archive::has(const std::string& part) const { return zip_name_locate(zip_->z, part.c_str(), 0) >= 0; }

std::size_t Archive::size(const std::string& part) const {
    zip_stat_t st;
    zip_stat_init(&st);
    if (zip_stat(zip_->z, part.c_str(), 0, &st) != 0 || !(st.valid & ZIP_STAT_SIZE)) return 0;
    return static_cast<std::size_t>(st.size);
}

void Archive::parse(const std::string& part, const std::string& what, XmlHandler& handler,
                    const std::function<void(std::size_t, std::size_t)>& progress) const {
    zip_file_t* f = zip_fopen(zip_->z, part.c_str(), 0);
    if (!f)
        fail(what + " (" + part + ") is missing from the archive or cannot be unpacked (" + zip_strerror(zip_->z) +
             "); the workbook is damaged");
    std::unique_ptr<zip_file_t, int (*)(zip_file_t*)> file(f, zip_fclose);
    std::unique_ptr<XML_ParserStruct, void (*)(XML_Parser)> parser(XML_ParserCreate(nullptr), XML_ParserFree);
    ParseState st{&handler, parser.get(), nullptr, false};
    XML_SetUserData(parser.get(), &st);
    XML_SetElementHandler(parser.get(), on_start, on_end);
    XML_SetCharacterDataHandler(parser.get(), on_text);
    XML_SetStartDoctypeDeclHandler(parser.get(), on_doctype);
    const std::size_t total = size(part);
    std::string buf(kChunk, '\0');
    std::size_t done = 0;
    for (;;) {
        const zip_int64_t n = zip_fread(f, buf.data(), kChunk);
        if (n < 0)
            fail(what + " (" + part + ") cannot be unpacked (" + zip_file_strerror(f) +
                 "); the workbook is damaged. Open it in your spreadsheet program and save it again");
        done += static_cast<std::size_t>(n);
        const bool last = n == 0;
        const XML_Status ok = XML_Parse(parser.get(), buf.data(), static_cast<int>(n), last ? XML_TRUE : XML_FALSE);
        if (st.error) std::rethrow_exception(st.error);
        if (st.doctype) fail(what + " (" + part + ") declares a document type, which workbooks never do; refused");
        if (ok != XML_STATUS_OK)
            fail(what + " (" + part + "), line " + std::to_string(XML_GetCurrentLineNumber(parser.get())) +
                 ", column " + std::to_string(XML_GetCurrentColumnNumber(parser.get()) + 1) + ": damaged XML (" +
                 XML_ErrorString(XML_GetErrorCode(parser.get())) + "); the workbook is damaged");
        if (progress) progress(done, total);
        if (last) break;
    }
}

std::string resolve_target(const std::string& from_part, const std::string& target) {
    std::string path;
    if (!target.empty() && target[0] == '/') {
        path = target.substr(1);
    } else {
        const auto slash = from_part.rfind('/');
        path = (slash == std::string::npos ? std::string() : from_part.substr(0, slash + 1)) + target;
    }
    std::vector<std::string> parts;
    std::size_t b = 0;
    while (b <= path.size()) {
        const std::size_t e = std::min(path.find('/', b), path.size());
        const std::string seg = path.substr(b, e - b);
        if (seg == "..") {
            if (!parts.empty()) parts.pop_back();
        } else if (!seg.empty() && seg != ".") {
            parts.push_back(seg);
        }
        b = e + 1;
    }
    std::string out;
    for (const auto& p : parts) out += (out.empty() ? "" : "/") + p;
    return out;
}

}  // namespace moderato::xlsx_detail
