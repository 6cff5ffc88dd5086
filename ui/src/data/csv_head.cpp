#include "data/csv_head.hpp"

#include <fstream>

namespace moderato::ui {

std::size_t csvHeadLength(std::string_view text, std::size_t records, char delimiter) {
    if (records == 0) return 0;
    std::size_t p = 0;
    // A UTF-8 byte order mark is not part of the first field.
    if (text.size() >= 3 && static_cast<unsigned char>(text[0]) == 0xEF &&
        static_cast<unsigned char>(text[1]) == 0xBB && static_cast<unsigned char>(text[2]) == 0xBF)
        p = 3;
    const auto fieldStartAfter = [delimiter](char prev) {
        if (prev == '\n') return true;
        if (delimiter) return prev == delimiter;
        return prev == ',' || prev == ';' || prev == '\t';
    };
    bool quoted = false, atStart = true;
    std::size_t seen = 0;
    for (; p < text.size(); ++p) {
        const char c = text[p];
        if (quoted) {
            if (c == '"') {
                if (p + 1 < text.size() && text[p + 1] == '"') {
                    ++p;  // a doubled quote inside the field
                } else if (p + 1 == text.size()) {
                    return kNoCut;  // cannot tell yet whether a second quote follows
                } else {
                    quoted = false;
                }
            }
            continue;
        }
        if (c == '"' && (atStart || fieldStartAfter(text[p - 1]))) {
            quoted = true;
        } else if (c == '\n') {
            if (++seen == records) return p + 1;
        }
        atStart = false;
    }
    return kNoCut;
}

CsvHead readCsvHead(const std::string& path, std::size_t records, char delimiter, std::size_t maxBytes) {
    CsvHead head;
    std::ifstream in(path, std::ios::binary);
    if (!in) {
        head.error = path + ": cannot be opened for reading";
        return head;
    }
    constexpr std::size_t kChunk = 64 * 1024;
    std::string buf;
    for (;;) {
        const std::size_t old = buf.size();
        buf.resize(old + kChunk);
        in.read(buf.data() + old, static_cast<std::streamsize>(kChunk));
        buf.resize(old + static_cast<std::size_t>(in.gcount()));
        const bool eof = buf.size() < old + kChunk || in.peek() == std::ifstream::traits_type::eof();
        const std::size_t cut = csvHeadLength(buf, records, delimiter);
        if (cut != kNoCut) {
            head.wholeFile = eof && cut == buf.size();
            buf.resize(cut);
            break;
        }
        if (eof) {
            head.wholeFile = true;
            break;
        }
        if (buf.size() >= maxBytes) {
            // Still inside a quoted field (or one enormous line): hand over
            // what was read; the reader names the line of the open quote.
            head.truncated = true;
            break;
        }
    }
    if (in.bad()) {
        head.error = path + ": reading failed";
        head.text.clear();
        return head;
    }
    head.text = std::move(buf);
    return head;
}

}  // namespace moderato::ui
