// Record boundaries (quote-aware), single-record parsing for the header and
// the delimiter sniffer.
#include <cstring>

#include "reading/csv_internal.hpp"

namespace moderato::csv_detail {

namespace {

// Last '\n' in [b, e), or nullptr.
const char* last_newline(const char* b, const char* e) {
#if defined(__GLIBC__)
    return static_cast<const char*>(memrchr(b, '\n', static_cast<std::size_t>(e - b)));
#else
    while (e > b)
        if (*--e == '\n') return e;
    return nullptr;
#endif
}

}  // namespace

void Scanner::scan(const char* buf, std::size_t len, const std::vector<std::size_t>& targets,
                   std::vector<std::size_t>& splits) {
    std::size_t p = pos;
    std::size_t ti = 0;
    while (ti < targets.size() && targets[ti] < p) ++ti;
    while (p < len) {
        switch (state) {
            case Unquoted: {
                // Up to the next quote there are no quotes: every '\n' ends a record.
                const void* hit = std::memchr(buf + p, '"', len - p);
                const std::size_t q = hit ? static_cast<std::size_t>(static_cast<const char*>(hit) - buf) : len;
                while (ti < targets.size() && targets[ti] < q) {
                    const std::size_t from = targets[ti] > p ? targets[ti] : p;
                    const void* nl = std::memchr(buf + from, '\n', q - from);
                    if (!nl) break;
                    const std::size_t split = static_cast<std::size_t>(static_cast<const char*>(nl) - buf) + 1;
                    splits.push_back(split);
                    while (ti < targets.size() && targets[ti] < split) ++ti;
                }
                if (q > p)
                    if (const char* nl = last_newline(buf + p, buf + q))
                        record_start = static_cast<std::size_t>(nl - buf) + 1;
                if (!hit) {
                    p = len;
                    break;
                }
                // A quote opens a quoted field only at the start of a field.
                if (q == 0 || buf[q - 1] == delim || buf[q - 1] == '\n') {
                    state = Quoted;
                    quote_open = q;
                }
                p = q + 1;
                break;
            }
            case Quoted: {
                const void* hit = std::memchr(buf + p, '"', len - p);
                if (!hit) {
                    p = len;
                    break;
                }
                p = static_cast<std::size_t>(static_cast<const char*>(hit) - buf) + 1;
                state = QuoteInQuoted;
                break;
            }
            case QuoteInQuoted:
                if (buf[p] == '"') {  // a doubled quote: still inside
                    state = Quoted;
                    ++p;
                } else {
                    state = Unquoted;
                }
                break;
        }
    }
    pos = p;
}

RecordParse parse_record(const char* buf, std::size_t begin, std::size_t end, char delim, bool at_eof,
                         std::size_t max_fields) {
    RecordParse r;
    std::size_t p = begin;
    if (p >= end) return r;  // Incomplete: nothing there
    if (buf[p] == '\n' || (buf[p] == '\r' && p + 1 < end && buf[p + 1] == '\n') ||
        (buf[p] == '\r' && p + 1 == end && at_eof)) {
        r.status = RecordStatus::Blank;
        r.newlines = buf[p] == '\n' || p + 1 < end ? 1 : 0;
        r.next = buf[p] == '\n' ? p + 1 : (p + 1 < end ? p + 2 : p + 1);
        return r;
    }
    for (;;) {
        RawField f;
        if (p < end && buf[p] == '"') {
            f.quoted = true;
            ++p;
            for (;;) {
                if (p >= end) return r;  // Incomplete
                const char c = buf[p];
                if (c == '"') {
                    if (p + 1 < end && buf[p + 1] == '"') {
                        f.text += '"';
                        p += 2;
                        continue;
                    }
                    if (p + 1 == end && !at_eof) return r;  // the next byte may be a quote
                    ++p;
                    break;
                }
                if (c == '\n') ++r.newlines;
                f.text += c;
                ++p;
            }
            while (p < end && is_blank(buf[p], delim)) ++p;
            if (p < end && buf[p] == '\r') {
                if (p + 1 == end) {
                    if (!at_eof) return r;
                    ++p;
                } else if (buf[p + 1] == '\n') {
                    ++p;
                }
            }
            if (p < end && buf[p] != delim && buf[p] != '\n') {
                r.status = RecordStatus::TextAfterQuote;
                r.bad_field = r.fields.size();
                r.bad_newlines = r.newlines;
                return r;
            }
        } else {
            while (p < end && buf[p] != delim && buf[p] != '\n') f.text += buf[p++];
            if (p == end && !at_eof) return r;
            if ((p == end || buf[p] == '\n') && !f.text.empty() && f.text.back() == '\r') f.text.pop_back();
        }
        r.fields.push_back(std::move(f));
        if (r.fields.size() > max_fields) {
            r.status = RecordStatus::TooManyFields;
            return r;
        }
        if (p >= end) {
            if (!at_eof) return r;
            r.status = RecordStatus::Ok;
            r.next = end;
            return r;
        }
        if (buf[p] == '\n') {
            ++r.newlines;
            r.status = RecordStatus::Ok;
            r.next = p + 1;
            return r;
        }
        ++p;  // the delimiter
    }
}

char sniff_delimiter(std::string_view sample, bool sample_is_whole, bool decimal_comma) {
    constexpr std::size_t kRecords = 30;
    const char candidates[] = {'\t', ';', ','};  // ties go to the earlier one
    char best = 0, widest = 0;
    std::size_t best_count = 0, widest_count = 1;
    for (const char d : candidates) {
        if (d == ',' && decimal_comma) continue;
        std::vector<std::size_t> counts;
        std::size_t p = 0;
        bool broken = false;
        while (p < sample.size() && counts.size() < kRecords) {
            const RecordParse r = parse_record(sample.data(), p, sample.size(), d, sample_is_whole);
            if (r.status == RecordStatus::Incomplete) break;
            if (r.status == RecordStatus::TextAfterQuote) {
                broken = true;
                break;
            }
            p = r.next;
            if (r.status == RecordStatus::Ok) counts.push_back(r.fields.size());
        }
        if (counts.empty()) continue;
        if (counts.front() > widest_count) {
            widest = d;
            widest_count = counts.front();
        }
        bool consistent = !broken;
        for (const auto c : counts) consistent = consistent && c == counts.front();
        if (consistent && counts.front() > 1 && counts.front() > best_count) {
            best = d;
            best_count = counts.front();
        }
    }
    if (best) return best;
    if (widest) return widest;  // no consistent choice: the parse will name the odd line
    return decimal_comma ? ';' : ',';
}

std::size_t field_index_at(const char* buf, std::size_t begin, std::size_t at, char delim) {
    std::size_t field = 0;
    bool in_quotes = false, field_start = true;
    for (std::size_t p = begin; p < at; ++p) {
        const char c = buf[p];
        if (in_quotes) {
            if (c == '"') {
                if (p + 1 < at && buf[p + 1] == '"') ++p;
                else in_quotes = false;
            }
            continue;
        }
        if (c == '"' && field_start) {
            in_quotes = true;
            field_start = false;
        } else if (c == delim) {
            ++field;
            field_start = true;
        } else {
            field_start = false;
        }
    }
    return field;
}

}  // namespace moderato::csv_detail
