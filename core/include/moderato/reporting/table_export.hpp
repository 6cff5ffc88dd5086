// Result tables written as text for other programs: CSV for machines, and
// Markdown, LaTeX (booktabs) and HTML for reports. No Qt; every writer is a
// pure function of the table.
//
// Each writer first checks the table's shape: a row with the wrong number of
// cells, or a `numeric` list of the wrong non-zero size, throws InputError
// naming the table's title and the row (data rows count from 1).
#pragma once

#include <string>
#include <string_view>
#include <vector>

namespace moderato {

// One cell: `text` is what a reader sees (formatted, may use U+2212 minus,
// "<0.001", "—"); `exact` is the full-precision machine value written to CSV
// ("-0.12345678901234567"); when `exact` is empty, CSV uses `text`.
struct ExportCell {
    std::string text;
    std::string exact;
};

struct ExportTable {
    std::string title;                          // caption / heading
    std::vector<std::string> columns;           // header cells
    std::vector<bool> numeric;                  // per column: right-aligned (size == columns.size(), or empty = none)
    std::vector<std::vector<ExportCell>> rows;  // each row has columns.size() cells
    std::vector<std::string> notes;             // footnotes printed under the table
};

enum class TableFormat { Csv, Markdown, Latex, Html };

// "csv", "md", "tex", "html" (no dot).
std::string table_format_suffix(TableFormat f);

// Defuses a cell a spreadsheet would read as a formula (OWASP CSV-injection
// guidance): a cell beginning with '=', '+', '-', '@', tab or carriage return,
// or with one of the look-alikes U+2212 MINUS SIGN, U+FF1D, U+FF0B, U+FF0D,
// U+FF20, gets a leading single quote ('). A cell that is entirely a plain
// decimal number in the C locale, ^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$, is
// left alone so negative numbers stay numbers ("inf" and "nan" are not numbers
// here). Any other cell is returned unchanged.
std::string csv_neutralise(std::string_view cell);

// RFC 4180: comma-separated, CRLF after every record, a field quoted (inner
// quotes doubled) when it holds ',', '"', CR or LF or begins or ends with a
// space. The header row is `columns`, then one record per row holding each
// cell's `exact` (or `text` when `exact` is empty); every field, header
// included, goes through csv_neutralise first. Title and notes are not
// written. UTF-8, no byte-order mark.
std::string table_to_csv(const ExportTable& t);

// GitHub-flavoured pipe table: a "**title**" line and a blank line, the header,
// a delimiter row ("---:" for numeric columns), the rows (cell `text` through
// markdown_escape), then the notes after a blank line, one paragraph each.
std::string table_to_markdown(const ExportTable& t);

// A booktabs table float: "% requires \usepackage{booktabs}", then
// \begin{table}[htbp] \centering \caption{title} \begin{tabular}{l r ...}
// \toprule header \\ \midrule rows \\ \bottomrule \end{tabular}, the notes in
// small type under the tabular, \end{table}. Every string goes through
// latex_escape; a line's first cell beginning with '[' or '*' is preceded by
// "{}" so \\ and \midrule do not read it as their optional argument.
std::string table_to_latex(const ExportTable& t);

// An HTML fragment (not a document): <table class="moderato-table"> with
// <caption>, <thead> and <tbody>; numeric columns are right-aligned
// (style="text-align:right"), their body cells also white-space:nowrap (a
// number or "< 0.001" never breaks over two lines); other cells get a <wbr>
// after each "×" (a product term may wrap there); notes follow as
// <p class="table-note">. Every string goes through html_escape.
std::string table_to_html(const ExportTable& t);

// Calls the writer for `f`.
std::string table_to_text(const ExportTable& t, TableFormat f);

// & < > " ' -> &amp; &lt; &gt; &quot; &#39;
std::string html_escape(std::string_view s);

// For LaTeX text mode. The ten special characters # $ % & ~ _ ^ \ { } become
// \# \$ \% \& \textasciitilde{} \_ \textasciicircum{} \textbackslash{} \{ \};
// '<', '>' and '|' (which the old OT1 font encoding prints as other glyphs)
// become $<$, $>$ and \textbar{}; a '-' before another '-' becomes "-{}" so
// hyphens never join into dashes. Typographic characters map to LaTeX:
// U+2212 minus -> $-$, × -> $\times$, ≤ ≥ -> $\le$ $\ge$, ± -> $\pm$,
// ≈ -> $\approx$, ² ³ -> $^2$ $^3$, en dash -> --, em dash -> ---,
// no-break space -> ~, thin space -> \,, Greek letters -> $\alpha$ and so on.
// Neighbouring math pieces share one pair of dollars ("χ²" -> $\chi^2$).
// Line breaks become spaces. Other non-ASCII text passes through unchanged
// (UTF-8, for inputenc).
std::string latex_escape(std::string_view s);

// For one cell (or one line) of GitHub-flavoured Markdown: leading spaces and
// tabs are dropped, backslash and '|' are escaped, CR/LF become spaces, the inline markers * _ ` ~ are escaped
// everywhere (as are '<' before a letter, '/', '!' or '?', which would make
// raw HTML, ']' before '(', '[' or ':', which would make a link, and '&'
// starting a character reference such as "&amp;"), and a leading # > =,
// a leading '-' or '+' that does not start a number, or a leading "1. " /
// "1) " (which could start a heading, quote, list or rule) is escaped. The
// result renders as the original text.
std::string markdown_escape(std::string_view s);

// A file name stem safe on every OS, from a label: lower-case ASCII letters,
// digits and '-'; anything else separates words; runs collapse to one '-',
// none at either end; at most 60 characters; "table" when nothing is left; a
// Windows device name (con, nul, com1, ...) gets "-table" appended.
// "discount × loyalty: Lines plot" -> "discount-loyalty-lines-plot".
std::string file_slug(std::string_view label);

}  // namespace moderato
