// Private: the zip container of a workbook (libzip) and its XML parts
// (expat). Opening refuses, naming the file: an encrypted workbook or a
// legacy .xls (both OLE compound files), a binary .xlsb, a file that is not
// a zip archive, a damaged one; parsing refuses malformed XML, naming the
// part, line and column.
#pragma once

#include <cstddef>
#include <functional>
#include <memory>
#include <string>
#include <string_view>
#include <vector>

namespace moderato::xlsx_detail {

// Element and attribute names without their prefix ("x:c" is "c"). The
// parser does no namespace processing (less work a cell on large sheets);
// the element and attribute names we read do not clash across the
// namespaces a part uses, so the local part is enough.
std::string_view local_name(const char* name);

// The value of an attribute (by local name) in expat's attribute list, or nullptr.
const char* attribute(const char** atts, std::string_view local);

// What a part's parser is told: element starts and ends, and text.
struct XmlHandler {
    virtual ~XmlHandler() = default;
    virtual void start(std::string_view name, const char** atts) = 0;
    virtual void end(std::string_view name) = 0;
    virtual void text(std::string_view) {}
};

class Archive {
public:
    // `path` is opened read-only; `name` (the file as the user gave it) goes into messages.
    Archive(const std::string& path, const std::string& name);
    ~Archive();
    Archive(const Archive&) = delete;
    Archive& operator=(const Archive&) = delete;

    const std::string& name() const { return name_; }
    bool has(const std::string& part) const;
    // The part's uncompressed size (0 when absent).
    std::size_t size(const std::string& part) const;
    // Parses a part through `handler`; `progress(done, total)` is called now
    // and then with uncompressed bytes. `what` names the part in messages
    // ("sheet Sheet1"). A part that handler throws out of stops the parse.
    void parse(const std::string& part, const std::string& what, XmlHandler& handler,
               const std::function<void(std::size_t, std::size_t)>& progress = {}) const;
    // Throws InputError "<name>: <rest>".
    [[noreturn]] void fail(const std::string& rest) const;

private:
    std::string name_;
    struct Zip;
    std::unique_ptr<Zip> zip_;
};

// Resolves a relationship target against the folder of the part that holds
// it ("xl/workbook.xml" + "worksheets/sheet1.xml" = "xl/worksheets/sheet1.xml";
// "/xl/x.xml" is absolute; "../" steps up).
std::string resolve_target(const std::string& from_part, const std::string& target);

}  // namespace moderato::xlsx_detail
