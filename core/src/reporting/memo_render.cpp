// Writing a memo as one self-contained HTML document or as Markdown.
#include <algorithm>
#include <sstream>

#include "moderato/reporting/memo.hpp"
#include "moderato/reporting/table_export.hpp"

namespace moderato {
namespace {

// Plain text (notes) as paragraphs: blank lines separate them, single line
// breaks are kept.
std::vector<std::string> paragraphs(const std::string& text) {
    std::vector<std::string> out;
    std::string cur;
    std::istringstream in(text);
    std::string line;
    while (std::getline(in, line)) {
        if (!line.empty() && line.back() == '\r') line.pop_back();
        if (line.find_first_not_of(" \t") == std::string::npos) {
            if (!cur.empty()) out.push_back(cur), cur.clear();
            continue;
        }
        cur += (cur.empty() ? "" : "\n") + line;
    }
    if (!cur.empty()) out.push_back(cur);
    return out;
}

const char* const kStyle =
    "body{font-family:'DejaVu Sans',Helvetica,Arial,sans-serif;color:#1F2A44;max-width:46em;margin:2em auto;"
    "padding:0 1em;line-height:1.45;font-size:11pt}"
    "h1{font-size:1.6em;margin-bottom:0.2em}h2{font-size:1.2em;margin-top:1.6em;border-bottom:1px solid #E6E6E1}"
    ".subtitle{color:#4A4E69;margin-top:0}"
    ".equation{font-family:'DejaVu Serif',Georgia,serif;font-size:1.05em;margin:0.6em 0 0.6em 1.5em}"
    "table.moderato-table{border-collapse:collapse;margin:0.8em 0;font-size:0.92em}"
    "table.moderato-table caption{text-align:left;font-weight:bold;padding-bottom:0.3em}"
    "table.moderato-table th{border-top:1.5px solid #1F2A44;border-bottom:1px solid #1F2A44;padding:0.2em 0.45em;"
    "text-align:left;vertical-align:bottom}"
    "table.moderato-table td{padding:0.15em 0.45em}"
    "table.moderato-table tbody tr:last-child td{border-bottom:1.5px solid #1F2A44}"
    ".table-note{font-size:0.85em;color:#4A4E69;margin-top:0}"
    // A caption sits right under its own image and a wide gap follows it, so it
    // never reads as the heading of the next figure.
    "figure{margin:1.2em 0 2.6em;break-inside:avoid}figure img{display:block;max-width:100%;height:auto}"
    "figcaption{font-size:0.9em;color:#4A4E69;margin-top:0.35em;padding-top:0.3em;border-top:1px solid #E6E6E1}"
    ".cautions li{margin-bottom:0.3em}"
    ".footer{font-size:0.8em;color:#4A4E69}.footer td{padding:0.05em 0.8em 0.05em 0;vertical-align:top;"
    "word-break:break-all}"
    "@media print{body{margin:0;max-width:none}h2{page-break-after:avoid}figure,table{page-break-inside:avoid}}";

// For Qt's rich-text engine (preview and PDF): the subset it reads.
const char* const kQtStyle =
    "body{font-family:'DejaVu Sans';color:#1F2A44;font-size:10pt}"
    "h1{font-size:16pt}h2{font-size:12pt;margin-top:14px}"
    ".subtitle{color:#4A4E69}.equation{font-family:'DejaVu Serif';margin-left:20px}"
    "table{font-size:9pt}th{text-align:left;padding:2px 5px}td{padding:1px 5px}"
    "caption{font-weight:bold;text-align:left}"
    ".table-note{font-size:8pt;color:#4A4E69}p.figure{margin-bottom:0}"
    "p.figcaption{font-size:9pt;color:#4A4E69;margin-top:2px;margin-bottom:22px}"
    ".footer{font-size:7pt;color:#4A4E69}";

// Markdown paragraph text: escaped, line breaks as hard breaks.
std::string md_paragraph(const std::string& text) {
    std::string out;
    std::istringstream in(text);
    std::string line;
    bool first = true;
    while (std::getline(in, line)) {
        if (!first) out += "  \n";
        out += markdown_escape(line);
        first = false;
    }
    return out;
}

// A figure with its numbered caption right under it ("Figure 1. Lines plot"):
// one <figure> in a browser; for Qt's reader, which knows no <figure>, the
// image and the caption as two paragraphs spaced the same way.
std::string figure_html(const MemoFigure& f, std::size_t number, bool embed) {
    char width[32];
    std::snprintf(width, sizeof width, "%.3gin", f.width_in);
    const std::string src = embed ? "data:image/png;base64," + base64_encode(f.png) : f.file;
    const std::string size = embed
                                 ? std::string(" style=\"width:") + width + "\""
                                 : " width=\"" + std::to_string(static_cast<int>(f.width_in * 96 + 0.5)) +
                                       "\" height=\"" + std::to_string(static_cast<int>(f.height_in * 96 + 0.5)) + "\"";
    const std::string img = "<img alt=\"" + html_escape(f.title) + "\"" + size + " src=\"" + src + "\">";
    const std::string caption = "Figure " + std::to_string(number) + ". " + html_escape(f.title);
    if (embed) return "<figure>" + img + "<figcaption>" + caption + "</figcaption></figure>\n";
    return "<p class=\"figure\">" + img + "</p>\n<p class=\"figcaption\">" + caption + "</p>\n";
}

// Sentence text for HTML: escaped, and "< 0.001" held on one line (a
// no-break space), as in the tables.
std::string sentence_html(const std::string& text) {
    std::string out = html_escape(text);
    const std::string loose = "&lt; 0.", tight = "&lt;&#160;0.";
    for (std::size_t at = out.find(loose); at != std::string::npos; at = out.find(loose, at + tight.size()))
        out.replace(at, loose.size(), tight);
    return out;
}

}  // namespace

std::string base64_encode(const std::string& bytes) {
    static const char* const table = "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
    std::string out;
    out.reserve((bytes.size() + 2) / 3 * 4);
    std::size_t i = 0;
    for (; i + 2 < bytes.size(); i += 3) {
        const unsigned v = (static_cast<unsigned char>(bytes[i]) << 16) |
                           (static_cast<unsigned char>(bytes[i + 1]) << 8) | static_cast<unsigned char>(bytes[i + 2]);
        out += table[(v >> 18) & 63];
        out += table[(v >> 12) & 63];
        out += table[(v >> 6) & 63];
        out += table[v & 63];
    }
    if (i + 1 == bytes.size()) {
        const unsigned v = static_cast<unsigned char>(bytes[i]) << 16;
        out += table[(v >> 18) & 63];
        out += table[(v >> 12) & 63];
        out += "==";
    } else if (i + 2 == bytes.size()) {
        const unsigned v =
            (static_cast<unsigned char>(bytes[i]) << 16) | (static_cast<unsigned char>(bytes[i + 1]) << 8);
        out += table[(v >> 18) & 63];
        out += table[(v >> 12) & 63];
        out += table[(v >> 6) & 63];
        out += '=';
    }
    return out;
}

namespace {

// The tables shown with the model (the rest follow under "Probe").
bool model_table(const std::string& key) {
    return key == "estimates" || key == "fit-statistics" || key == "variance-components" ||
           key == "random-slope-tests" || key == "model-comparison";
}

bool has_probe_part(const Memo& m) {
    return !m.figures.empty() ||
           std::any_of(m.tables.begin(), m.tables.end(), [](const NamedTable& t) { return !model_table(t.key); });
}

}  // namespace

std::string memo_to_html(const Memo& m, bool embed_figures) {
    std::string h;
    h += "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n";
    h += "<meta name=\"generator\" content=\"" +
         html_escape(m.footer.empty() ? std::string() : m.footer.front().second) + "\">\n";
    h += "<title>" + html_escape(m.title) + "</title>\n<style>" + (embed_figures ? kStyle : kQtStyle) +
         "</style>\n</head>\n<body>\n";
    h += "<h1>" + html_escape(m.title) + "</h1>\n";
    if (!m.subtitle.empty()) h += "<p class=\"subtitle\">" + html_escape(m.subtitle) + "</p>\n";
    if (!m.notes.empty()) {
        h += "<h2>Notes</h2>\n";
        for (const auto& p : paragraphs(m.notes)) {
            std::string escaped = html_escape(p);
            std::string with_breaks;
            for (char c : escaped) with_breaks += c == '\n' ? std::string("<br>\n") : std::string(1, c);
            h += "<p class=\"notes\">" + with_breaks + "</p>\n";
        }
    }
    h += "<h2>Findings</h2>\n<ul class=\"findings\">\n";
    for (const auto& s : m.findings) h += "<li>" + sentence_html(s) + "</li>\n";
    h += "</ul>\n";
    h += "<h2>Model</h2>\n<p class=\"equation\">" + m.equation_html + "</p>\n";
    h += "<p>Fitted: " + html_escape(m.fitted_text) + "</p>\n";
    for (const auto& t : m.tables)
        if (model_table(t.key)) h += table_to_html(t.table) + "\n";
    // On paper the figures start a page (Qt's printer cannot keep a heading with what follows).
    if (has_probe_part(m))
        h += embed_figures ? "<h2>Probe</h2>\n" : "<h2 style=\"page-break-before:always\">Probe</h2>\n";
    for (std::size_t i = 0; i < m.figures.size(); ++i) h += figure_html(m.figures[i], i + 1, embed_figures);
    for (const auto& t : m.tables)
        if (!model_table(t.key)) h += table_to_html(t.table) + "\n";
    h += "<h2>Cautions</h2>\n<ul class=\"cautions\">\n";
    for (const auto& c : m.cautions) h += "<li>" + sentence_html(c) + "</li>\n";
    h += "</ul>\n";
    h += "<h2>Reproducibility</h2>\n<table class=\"footer\">\n";
    for (const auto& [k, v] : m.footer)
        h += "<tr><td>" + html_escape(k) + "</td><td>" + html_escape(v) + "</td></tr>\n";
    h += "</table>\n</body>\n</html>\n";
    return h;
}

std::string memo_to_markdown(const Memo& m) {
    std::string s;
    s += "# " + markdown_escape(m.title) + "\n\n";
    if (!m.subtitle.empty()) s += "*" + markdown_escape(m.subtitle) + "*\n\n";
    if (!m.notes.empty()) {
        s += "## Notes\n\n";
        for (const auto& p : paragraphs(m.notes)) s += md_paragraph(p) + "\n\n";
    }
    s += "## Findings\n\n";
    for (const auto& f : m.findings) s += "- " + markdown_escape(f) + "\n";
    s += "\n## Model\n\n$$\n" + m.equation_latex + "\n$$\n\n";
    s += "Fitted: " + markdown_escape(m.fitted_text) + "\n\n";
    for (const auto& t : m.tables)
        if (model_table(t.key)) s += table_to_markdown(t.table) + "\n";
    if (has_probe_part(m)) s += "## Probe\n\n";
    // Each figure with its numbered caption on the line under it, as in the HTML memo.
    for (std::size_t i = 0; i < m.figures.size(); ++i) {
        const std::string title = markdown_escape(m.figures[i].title);
        s += "![" + title + "](" + m.figures[i].file + ")\n\n*Figure " + std::to_string(i + 1) + ". " + title + "*\n\n";
    }
    for (const auto& t : m.tables)
        if (!model_table(t.key)) s += table_to_markdown(t.table) + "\n";
    s += "## Cautions\n\n";
    for (const auto& c : m.cautions) s += "- " + markdown_escape(c) + "\n";
    s += "\n## Reproducibility\n\n";
    for (const auto& [k, v] : m.footer) s += "- " + markdown_escape(k) + ": " + markdown_escape(v) + "\n";
    return s;
}

}  // namespace moderato
