#include "moderato/reporting/table_export.hpp"

#include <algorithm>
#include <array>
#include <cstddef>
#include <string>

#include "moderato/support/error.hpp"

namespace moderato {

// The "\uXXXX" literals below must come out as UTF-8 bytes (GCC and Clang do
// this by default; MSVC needs /utf-8).
static_assert(sizeof("\u2212") == 4, "the execution character set must be UTF-8");

namespace {

bool is_digit(char c) { return c >= '0' && c <= '9'; }
bool is_letter(char c) { return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z'); }
bool is_alnum(char c) { return is_digit(c) || is_letter(c); }

bool starts_with(std::string_view s, std::size_t at, std::string_view prefix) {
    return s.size() - at >= prefix.size() && s.compare(at, prefix.size(), prefix) == 0;
}

// ^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$ , written out by hand so the
// answer does not depend on a locale.
bool is_plain_number(std::string_view s) {
    std::size_t i = 0;
    const std::size_t n = s.size();
    if (i < n && (s[i] == '+' || s[i] == '-')) ++i;
    std::size_t whole = 0, fraction = 0;
    while (i < n && is_digit(s[i])) ++i, ++whole;
    if (i < n && s[i] == '.') {
        ++i;
        while (i < n && is_digit(s[i])) ++i, ++fraction;
    }
    if (whole == 0 && fraction == 0) return false;
    if (i < n && (s[i] == 'e' || s[i] == 'E')) {
        ++i;
        if (i < n && (s[i] == '+' || s[i] == '-')) ++i;
        std::size_t exponent = 0;
        while (i < n && is_digit(s[i])) ++i, ++exponent;
        if (exponent == 0) return false;
    }
    return i == n;
}

// Line breaks (CR, LF or CRLF) as single spaces.
std::string flatten_lines(std::string_view s) {
    std::string out;
    out.reserve(s.size());
    for (std::size_t i = 0; i < s.size(); ++i) {
        if (s[i] == '\r') {
            if (i + 1 < s.size() && s[i + 1] == '\n') ++i;
            out += ' ';
        } else if (s[i] == '\n') {
            out += ' ';
        } else {
            out += s[i];
        }
    }
    return out;
}

std::string table_name(const ExportTable& t) {
    return t.title.empty() ? std::string("The table") : "Table '" + t.title + "'";
}

// The shape every writer relies on.
void check_shape(const ExportTable& t) {
    const std::size_t columns = t.columns.size();
    if (!t.numeric.empty() && t.numeric.size() != columns)
        throw InputError(table_name(t) + ": the column alignment list has " + std::to_string(t.numeric.size()) +
                         " entries, but there are " + std::to_string(columns) + " columns");
    for (std::size_t r = 0; r < t.rows.size(); ++r)
        if (t.rows[r].size() != columns)
            throw InputError(table_name(t) + ": row " + std::to_string(r + 1) + " (counting data rows from 1) has " +
                             std::to_string(t.rows[r].size()) + (t.rows[r].size() == 1 ? " cell" : " cells") +
                             ", but there are " + std::to_string(columns) + " columns");
}

// Escaped HTML text with a line-break opportunity (<wbr>) after each "×"
// (U+00D7), where a product term such as "dose×moisture" may wrap.
std::string break_after_times(const std::string& escaped) {
    static const std::string times = "\xC3\x97";
    std::string out;
    for (std::size_t at = 0; at < escaped.size();) {
        const std::size_t next = escaped.find(times, at);
        if (next == std::string::npos) {
            out.append(escaped, at, std::string::npos);
            break;
        }
        out.append(escaped, at, next + times.size() - at).append("<wbr>");
        at = next + times.size();
    }
    return out;
}

bool is_numeric(const ExportTable& t, std::size_t column) { return !t.numeric.empty() && t.numeric[column]; }

// ------------------------------------------------------------------ CSV

void append_csv_field(std::string& out, std::string_view raw, bool only_field) {
    const std::string field = csv_neutralise(raw);
    bool quote = field.find_first_of(",\"\r\n") != std::string::npos;
    if (!field.empty() && (field.front() == ' ' || field.back() == ' ')) quote = true;
    // A record of one empty field would otherwise be an empty line, which
    // readers take as no fields at all.
    if (field.empty() && only_field) quote = true;
    if (!quote) {
        out += field;
        return;
    }
    out += '"';
    for (char c : field) {
        if (c == '"') out += '"';
        out += c;
    }
    out += '"';
}

template <class Range, class Get>
void append_csv_record(std::string& out, const Range& fields, Get get) {
    for (std::size_t i = 0; i < fields.size(); ++i) {
        if (i) out += ',';
        append_csv_field(out, get(fields[i]), fields.size() == 1);
    }
    out += "\r\n";
}

// ------------------------------------------------------------------ LaTeX

struct Replacement {
    std::string_view from;  // UTF-8
    std::string_view to;    // LaTeX
};

// Typographic characters that LaTeX spells its own way.
constexpr std::array kLatexReplacements{
    Replacement{"\u2212", "$-$"},        // minus sign
    Replacement{"\u00D7", "$\\times$"},  // multiplication sign
    Replacement{"\u2264", "$\\le$"},
    Replacement{"\u2265", "$\\ge$"},
    Replacement{"\u00B1", "$\\pm$"},
    Replacement{"\u2248", "$\\approx$"},
    Replacement{"\u00B2", "$^2$"},
    Replacement{"\u00B3", "$^3$"},
    Replacement{"\u2013", "--"},      // en dash
    Replacement{"\u2014", "---"},     // em dash
    Replacement{"\u00A0", "~"},       // no-break space
    Replacement{"\u2009", "\\,"},     // thin space
    Replacement{"\u202F", "\\,"},     // narrow no-break space
    Replacement{"\u00B5", "$\\mu$"},  // micro sign
    Replacement{"\u03B1", "$\\alpha$"},
    Replacement{"\u03B2", "$\\beta$"},
    Replacement{"\u03B3", "$\\gamma$"},
    Replacement{"\u03B4", "$\\delta$"},
    Replacement{"\u03B5", "$\\epsilon$"},
    Replacement{"\u03B6", "$\\zeta$"},
    Replacement{"\u03B7", "$\\eta$"},
    Replacement{"\u03B8", "$\\theta$"},
    Replacement{"\u03B9", "$\\iota$"},
    Replacement{"\u03BA", "$\\kappa$"},
    Replacement{"\u03BB", "$\\lambda$"},
    Replacement{"\u03BC", "$\\mu$"},
    Replacement{"\u03BD", "$\\nu$"},
    Replacement{"\u03BE", "$\\xi$"},
    Replacement{"\u03BF", "$o$"},  // omicron has no macro
    Replacement{"\u03C0", "$\\pi$"},
    Replacement{"\u03C1", "$\\rho$"},
    Replacement{"\u03C2", "$\\varsigma$"},
    Replacement{"\u03C3", "$\\sigma$"},
    Replacement{"\u03C4", "$\\tau$"},
    Replacement{"\u03C5", "$\\upsilon$"},
    Replacement{"\u03C6", "$\\phi$"},
    Replacement{"\u03C7", "$\\chi$"},
    Replacement{"\u03C8", "$\\psi$"},
    Replacement{"\u03C9", "$\\omega$"},
    Replacement{"\u0393", "$\\Gamma$"},
    Replacement{"\u0394", "$\\Delta$"},
    Replacement{"\u0398", "$\\Theta$"},
    Replacement{"\u039B", "$\\Lambda$"},
    Replacement{"\u039E", "$\\Xi$"},
    Replacement{"\u03A0", "$\\Pi$"},
    Replacement{"\u03A3", "$\\Sigma$"},
    Replacement{"\u03A5", "$\\Upsilon$"},
    Replacement{"\u03A6", "$\\Phi$"},
    Replacement{"\u03A8", "$\\Psi$"},
    Replacement{"\u03A9", "$\\Omega$"},
};

}  // namespace

std::string table_format_suffix(TableFormat f) {
    switch (f) {
        case TableFormat::Csv:
            return "csv";
        case TableFormat::Markdown:
            return "md";
        case TableFormat::Latex:
            return "tex";
        case TableFormat::Html:
            return "html";
    }
    return "txt";
}

std::string csv_neutralise(std::string_view cell) {
    // OWASP CSV-injection guidance: characters that make a spreadsheet start a
    // formula, and the full-width / Unicode look-alikes some of them accept.
    static constexpr std::string_view kTriggers = "=+-@\t\r";
    static constexpr std::array<std::string_view, 5> kLookAlikes{
        "\u2212",  // MINUS SIGN
        "\uFF1D",  // FULLWIDTH EQUALS SIGN
        "\uFF0B",  // FULLWIDTH PLUS SIGN
        "\uFF0D",  // FULLWIDTH HYPHEN-MINUS
        "\uFF20",  // FULLWIDTH COMMERCIAL AT
    };
    bool risky = !cell.empty() && kTriggers.find(cell.front()) != std::string_view::npos;
    for (std::string_view look_alike : kLookAlikes) risky = risky || starts_with(cell, 0, look_alike);
    if (!risky || is_plain_number(cell)) return std::string(cell);
    return "'" + std::string(cell);
}

std::string table_to_csv(const ExportTable& t) {
    check_shape(t);
    std::string out;
    append_csv_record(out, t.columns, [](const std::string& s) -> std::string_view { return s; });
    for (const auto& row : t.rows)
        append_csv_record(out, row,
                          [](const ExportCell& c) -> std::string_view { return c.exact.empty() ? c.text : c.exact; });
    return out;
}

std::string html_escape(std::string_view s) {
    std::string out;
    out.reserve(s.size());
    for (char c : s) {
        switch (c) {
            case '&':
                out += "&amp;";
                break;
            case '<':
                out += "&lt;";
                break;
            case '>':
                out += "&gt;";
                break;
            case '"':
                out += "&quot;";
                break;
            case '\'':
                out += "&#39;";
                break;
            default:
                out += c;
        }
    }
    return out;
}

std::string latex_escape(std::string_view s) {
    std::string out;
    out.reserve(s.size() + s.size() / 4);
    // Math pieces that follow one another share one pair of dollars
    // ("$\chi^2$", not "$\chi$$^2$").
    std::size_t math_end = std::string::npos;  // out.size() just after the last math piece
    const auto put = [&](std::string_view piece) {
        const bool math = piece.size() >= 2 && piece.front() == '$' && piece.back() == '$';
        if (math && out.size() == math_end) {
            out.pop_back();
            out += piece.substr(1);
        } else {
            out += piece;
        }
        if (math) math_end = out.size();
    };
    for (std::size_t i = 0; i < s.size(); ++i) {
        const char c = s[i];
        switch (c) {
            case '#':
                out += "\\#";
                continue;
            case '$':
                out += "\\$";
                continue;
            case '%':
                out += "\\%";
                continue;
            case '&':
                out += "\\&";
                continue;
            case '_':
                out += "\\_";
                continue;
            case '{':
                out += "\\{";
                continue;
            case '}':
                out += "\\}";
                continue;
            case '~':
                out += "\\textasciitilde{}";
                continue;
            case '^':
                out += "\\textasciicircum{}";
                continue;
            case '\\':
                out += "\\textbackslash{}";
                continue;
            case '<':
                put("$<$");
                continue;
            case '>':
                put("$>$");
                continue;
            case '|':
                out += "\\textbar{}";
                continue;
            case '-':
                out += (i + 1 < s.size() && s[i + 1] == '-') ? "-{}" : "-";
                continue;
            case '\r':
                if (i + 1 < s.size() && s[i + 1] == '\n') ++i;
                out += ' ';
                continue;
            case '\n':
                out += ' ';
                continue;
            default:
                break;
        }
        if (static_cast<unsigned char>(c) >= 0x80) {
            bool replaced = false;
            for (const Replacement& r : kLatexReplacements) {
                if (starts_with(s, i, r.from)) {
                    put(r.to);
                    i += r.from.size() - 1;
                    replaced = true;
                    break;
                }
            }
            if (replaced) continue;
        }
        out += c;  // ASCII, or a byte of a character LaTeX reads as UTF-8
    }
    return out;
}

std::string markdown_escape(std::string_view input) {
    // Leading blanks never show, and four of them would start a code block.
    std::string s = flatten_lines(input);
    s.erase(0, std::min(s.size(), s.find_first_not_of(" \t")));
    std::string out;
    out.reserve(s.size() + 8);

    // What could open a block at the start of a line: an ATX heading ('#'), a
    // block quote ('>'), a setext underline ('='), a bullet list or thematic
    // break ('-' or '+' not starting a number, as "-0.5" does), or an ordered
    // list ("1. " or "1) ").
    const auto ends_marker = [&s](std::size_t i) { return i == s.size() || s[i] == ' ' || s[i] == '\t'; };
    std::size_t start = 0;
    const bool sign = !s.empty() && (s[0] == '-' || s[0] == '+');
    if (!s.empty() &&
        (s[0] == '#' || s[0] == '>' || s[0] == '=' || (sign && !(s.size() > 1 && (is_digit(s[1]) || s[1] == '.'))))) {
        out += '\\';
        out += s[0];
        start = 1;
    } else {
        std::size_t digits = 0;
        while (digits < s.size() && is_digit(s[digits])) ++digits;
        if (digits > 0 && digits < s.size() && (s[digits] == '.' || s[digits] == ')') && ends_marker(digits + 1)) {
            out.append(s, 0, digits);
            out += '\\';
            out += s[digits];
            start = digits + 1;
        }
    }

    for (std::size_t i = start; i < s.size(); ++i) {
        const char c = s[i];
        switch (c) {
            case '\\':
            case '|':
            case '*':
            case '_':
            case '`':
            case '~':
                out += '\\';
                out += c;
                continue;
            case '<':
                // Raw HTML and autolinks open with '<' and a letter, '/', '!' or
                // '?'; "<0.001" stays as it is.
                if (i + 1 < s.size() && (is_letter(s[i + 1]) || s[i + 1] == '/' || s[i + 1] == '!' || s[i + 1] == '?'))
                    out += '\\';
                out += c;
                continue;
            case ']':
                // "[text](url)", "[text][ref]" and "[ref]: url" make links.
                if (i + 1 < s.size() && (s[i + 1] == '(' || s[i + 1] == '[' || s[i + 1] == ':')) out += '\\';
                out += c;
                continue;
            case '&': {
                // "&name;" / "&#123;" would render as the character it names.
                std::size_t j = i + 1;
                while (j < s.size() && (is_alnum(s[j]) || s[j] == '#')) ++j;
                if (j > i + 1 && j < s.size() && s[j] == ';') out += '\\';
                out += c;
                continue;
            }
            default:
                out += c;
        }
    }
    return out;
}

std::string table_to_markdown(const ExportTable& t) {
    check_shape(t);
    std::string out;
    // Bold needs no space just inside the asterisks.
    const std::size_t first = t.title.find_first_not_of(" \t\r\n");
    if (first != std::string::npos) {
        const std::size_t last = t.title.find_last_not_of(" \t\r\n");
        out += "**" + markdown_escape(std::string_view(t.title).substr(first, last - first + 1)) + "**\n\n";
    }
    if (!t.columns.empty()) {
        const auto record = [&out](const auto& cells, auto get) {
            out += '|';
            for (const auto& cell : cells) out += ' ' + markdown_escape(get(cell)) + " |";
            out += '\n';
        };
        record(t.columns, [](const std::string& s) -> std::string_view { return s; });
        out += '|';
        for (std::size_t c = 0; c < t.columns.size(); ++c) out += is_numeric(t, c) ? " ---: |" : " --- |";
        out += '\n';
        for (const auto& row : t.rows)
            record(row, [](const ExportCell& cell) -> std::string_view { return cell.text; });
    }
    for (const std::string& note : t.notes) out += '\n' + markdown_escape(note) + '\n';
    return out;
}

std::string table_to_latex(const ExportTable& t) {
    check_shape(t);
    std::string out = "% requires \\usepackage{booktabs}\n";
    out += "\\begin{table}[htbp]\n\\centering\n";
    if (!t.title.empty()) out += "\\caption{" + latex_escape(t.title) + "}\n";
    if (!t.columns.empty()) {
        out += "\\begin{tabular}{";
        for (std::size_t c = 0; c < t.columns.size(); ++c) {
            if (c) out += ' ';
            out += is_numeric(t, c) ? 'r' : 'l';
        }
        out += "}\n\\toprule\n";
        const auto record = [&out](const auto& cells, auto get) {
            for (std::size_t c = 0; c < cells.size(); ++c) {
                const std::string cell = latex_escape(get(cells[c]));
                if (c) {
                    out += " & ";
                } else if (!cell.empty() && (cell.front() == '[' || cell.front() == '*')) {
                    // A line starts after \\ or \toprule / \midrule, which would
                    // take a leading '[' as their optional argument (and \\ a '*').
                    out += "{}";
                }
                out += cell;
            }
            out += " \\\\\n";
        };
        record(t.columns, [](const std::string& s) -> std::string_view { return s; });
        out += "\\midrule\n";
        for (const auto& row : t.rows)
            record(row, [](const ExportCell& cell) -> std::string_view { return cell.text; });
        out += "\\bottomrule\n\\end{tabular}\n";
    }
    if (!t.notes.empty()) {
        out += "\\par\\smallskip\n{\\small\n";
        for (const std::string& note : t.notes) out += latex_escape(note) + "\\par\n";
        out += "}\n";
    }
    out += "\\end{table}\n";
    return out;
}

std::string table_to_html(const ExportTable& t) {
    check_shape(t);
    // A number is never broken over two lines ("<" on one, "0.001" on the
    // next; "−" apart from its digits): numeric cells do not wrap. Headers
    // may ("95% CI" over "high"), and a product term may break after its
    // "×" (<wbr>), so the table still fits a narrow page.
    static constexpr std::string_view kRight = " style=\"text-align:right\"";
    static constexpr std::string_view kNumber = " style=\"text-align:right;white-space:nowrap\"";
    std::string out = "<table class=\"moderato-table\">\n";
    if (!t.title.empty()) out += "<caption>" + html_escape(t.title) + "</caption>\n";
    out += "<thead>\n<tr>";
    for (std::size_t c = 0; c < t.columns.size(); ++c) {
        out += "<th scope=\"col\"";
        if (is_numeric(t, c)) out += kRight;
        out += '>' + html_escape(t.columns[c]) + "</th>";
    }
    out += "</tr>\n</thead>\n<tbody>\n";
    for (const auto& row : t.rows) {
        out += "<tr>";
        for (std::size_t c = 0; c < row.size(); ++c) {
            out += "<td";
            if (is_numeric(t, c)) out += kNumber;
            out += '>' + (is_numeric(t, c) ? html_escape(row[c].text) : break_after_times(html_escape(row[c].text))) +
                   "</td>";
        }
        out += "</tr>\n";
    }
    out += "</tbody>\n</table>\n";
    for (const std::string& note : t.notes) out += "<p class=\"table-note\">" + html_escape(note) + "</p>\n";
    return out;
}

std::string table_to_text(const ExportTable& t, TableFormat f) {
    switch (f) {
        case TableFormat::Csv:
            return table_to_csv(t);
        case TableFormat::Markdown:
            return table_to_markdown(t);
        case TableFormat::Latex:
            return table_to_latex(t);
        case TableFormat::Html:
            return table_to_html(t);
    }
    return table_to_csv(t);
}

std::string file_slug(std::string_view label) {
    constexpr std::size_t kMaxLength = 60;
    std::string out;
    bool gap = false;  // a separator is pending
    for (char c : label) {
        if (c >= 'A' && c <= 'Z') c = static_cast<char>(c - 'A' + 'a');
        if ((c >= 'a' && c <= 'z') || is_digit(c)) {
            if (gap && !out.empty()) out += '-';
            gap = false;
            out += c;
        } else {
            gap = true;  // punctuation, spaces, '-', and every byte of non-ASCII text
        }
        if (out.size() >= kMaxLength) break;
    }
    if (out.size() > kMaxLength) out.resize(kMaxLength);
    while (!out.empty() && out.back() == '-') out.pop_back();
    if (out.empty()) return "table";

    // Names Windows keeps for devices, with or without an extension.
    static constexpr std::array<std::string_view, 22> kDevices{
        "con",  "prn",  "aux",  "nul",  "com1", "com2", "com3", "com4", "com5", "com6", "com7",
        "com8", "com9", "lpt1", "lpt2", "lpt3", "lpt4", "lpt5", "lpt6", "lpt7", "lpt8", "lpt9"};
    for (std::string_view device : kDevices)
        if (out == device) return out + "-table";
    return out;
}

}  // namespace moderato
