// Reading a JSON document from text a user (or anything else) may have
// written: every way the text can fail to be a document we can hold is an
// InputError naming the file, the line and column, and the JSON path of the
// value being read, e.g. "analyses[2].probe.pinned[0]".
#pragma once

#include <cstddef>
#include <nlohmann/json.hpp>
#include <string>

namespace moderato::detail {

// Deeper nesting than this is refused before the parser sees it. Moderato's
// own documents nest five levels; the bound keeps the parser, the copies and
// the destructor (recursive in places) far from the end of the stack.
inline constexpr std::size_t kMaxJsonDepth = 64;

// Parses `text`. InputError "<name>: line L, column C[ (at PATH)]: ..." for
// text that is not JSON (the parser's reason), a number beyond the range of
// a double ("1e999"), nesting deeper than kMaxJsonDepth, and an empty text.
// `kind` completes "so it is not <kind>" in the syntax message.
nlohmann::json parse_json_document(const std::string& text, const std::string& name, const std::string& kind);

// Line and column (1-based; the column counts characters, not bytes) of the
// character at byte offset `at`.
std::pair<std::size_t, std::size_t> line_and_column(const std::string& text, std::size_t at);

}  // namespace moderato::detail
