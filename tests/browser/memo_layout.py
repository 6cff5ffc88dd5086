#!/usr/bin/env python3
"""The memo as a browser lays it out: headless Chromium at 800 and 1200 px.

Renders sample projects with `moderato-cli render`, opens each first
analysis's memo.html in headless Chromium and checks the layout a reader
sees (issue 12: the estimates table broke "< 0.001" over two lines, and each
figure's name sat under it reading as the heading of the next figure):

* every number on the page (outside the checksum footer) and every "< 0.001"
  stays on one line: the text's client rectangles are one line box (a copy
  of the memo with a measuring script, read back with --dump-dom);
* every table fits the page's width (not cut off at the right);
* each figure's caption ("Figure N. title", the title its image's alt text
  gives) sits right under its own image, and the next figure starts clearly
  further down than that caption is from its own image;
* printed to PDF (--print-to-pdf, a third width: the paper's) and read with
  pdftotext -layout: as many "< 0.001" as the page has, none broken, and the
  captions in order with nothing but their images between them.

The screenshots a person looks at are written to the output folder as
<sample>-memo-<width>.png (a pair of the orchard's, reduced to 192 colours,
is kept in tests/browser/screenshots/). Exit 1 with one line per problem;
77 (skipped) without Chromium or pdftotext.

Usage: memo_layout.py --cli MODERATO_CLI --samples SAMPLE_PROJECTS_DIR --out DIR
"""
import argparse
import html
import json
import os
import pathlib
import re
import shutil
import subprocess
import sys

SAMPLES = ["orchard-nitrogen", "turbine-repairs"]
WIDTHS = [800, 1200]
CHROMIUM_FLAGS = ["--headless=new", "--no-sandbox", "--disable-gpu", "--hide-scrollbars", "--no-first-run",
                  "--disable-extensions", "--run-all-compositor-stages-before-draw", "--virtual-time-budget=10000"]

# Runs in a copy of the memo once everything (the embedded figures too) is
# loaded; writes what it measured as JSON into <pre id="layout-check">.
MEASURE = r"""
<script>
window.addEventListener("load", function () {
  function lineCount(node, start, end) {
    var r = document.createRange();
    r.setStart(node, start);
    r.setEnd(node, end);
    var rects = Array.prototype.slice.call(r.getClientRects()).filter(function (q) { return q.width > 0; });
    rects.sort(function (a, b) { return a.top - b.top; });
    var lines = 0, bottom = -1e9;
    rects.forEach(function (q) { if (q.top >= bottom - 1) { lines++; bottom = q.bottom; } else bottom = Math.max(bottom, q.bottom); });
    return lines;
  }
  var out = {problems: [], numbers: 0, lessThan: 0, figures: [], height: 0};
  var footer = document.querySelector("table.footer");
  var walker = document.createTreeWalker(document.body, NodeFilter.SHOW_TEXT);
  var number = /[\u2212]?[0-9](?:[0-9.,]*[0-9])?(?:\u00d710[\u207b\u2070\u00b9\u00b2\u00b3\u2074-\u2079]+)?/g;
  var less = /<[ \u00a0]0\.001/g;
  for (var node = walker.nextNode(); node; node = walker.nextNode()) {
    if ((footer && footer.contains(node)) || node.parentNode.closest("script, style, title")) continue;
    var text = node.nodeValue, m;
    while ((m = number.exec(text)) !== null) {
      out.numbers++;
      if (lineCount(node, m.index, m.index + m[0].length) !== 1)
        out.problems.push("number '" + m[0] + "' broken over lines in: " + text.trim().slice(0, 80));
    }
    while ((m = less.exec(text)) !== null) {
      out.lessThan++;
      if (lineCount(node, m.index, m.index + m[0].length) !== 1)
        out.problems.push("'< 0.001' broken over lines in: " + text.trim().slice(0, 80));
    }
  }
  // Nothing wider than the page: a table that does not fit is cut off on screen.
  var page = document.documentElement.clientWidth;
  document.querySelectorAll("table.moderato-table").forEach(function (t) {
    var r = t.getBoundingClientRect();
    if (r.left < -0.5 || r.right > page + 0.5)
      out.problems.push("table '" + (t.caption ? t.caption.textContent : "") + "' spans " + Math.round(r.left) +
                        " to " + Math.round(r.right) + " px on a page " + page + " px wide");
  });
  var figs = document.querySelectorAll("figure");
  for (var i = 0; i < figs.length; i++) {
    var img = figs[i].querySelector("img"), cap = figs[i].querySelector("figcaption");
    if (!img || !cap) { out.problems.push("figure " + (i + 1) + " without image or caption"); continue; }
    var ir = img.getBoundingClientRect(), cr = cap.getBoundingClientRect();
    var own = cr.top - ir.bottom;
    var f = {caption: cap.textContent, alt: img.alt, imageHeight: ir.height, gapToOwnImage: own, gapToNextImage: null};
    if (!(img.naturalWidth > 0 && ir.height > 50)) out.problems.push("figure " + (i + 1) + " image not shown");
    if (cap.textContent !== "Figure " + (i + 1) + ". " + img.alt)
      out.problems.push("caption '" + cap.textContent + "' does not name its own image '" + img.alt + "'");
    if (own < 0 || own > 16) out.problems.push("caption of figure " + (i + 1) + " is " + own + " px from its image");
    if (cr.left < ir.left - 1 || cr.left > ir.right) out.problems.push("caption of figure " + (i + 1) + " not under its image");
    if (i + 1 < figs.length) {
      var next = figs[i + 1].querySelector("img").getBoundingClientRect();
      f.gapToNextImage = next.top - cr.bottom;
      if (f.gapToNextImage < 2 * Math.max(own, 0) + 16)
        out.problems.push("caption of figure " + (i + 1) + " is " + f.gapToNextImage +
                          " px above the next figure: it reads as that figure's heading");
    }
    out.figures.push(f);
  }
  out.height = Math.ceil(document.documentElement.scrollHeight);
  var pre = document.createElement("pre");
  pre.id = "layout-check";
  pre.textContent = JSON.stringify(out);
  document.body.appendChild(pre);
});
</script>
"""


def fail(problems, message):
    problems.append(message)
    print("memo_layout: " + message, file=sys.stderr)


def chromium_binary():
    for name in ("chromium", "chromium-browser", "google-chrome"):
        path = shutil.which(name)
        if path:
            return path
    return None


def run(cmd, **kw):
    """Runs a command; headless Chromium now and then hangs on a page it
    renders in a second (seen once in twenty runs, on a fresh machine too),
    so a run that takes 90 s is stopped and tried again, at most 3 times."""
    for attempt in range(3):
        try:
            return subprocess.run(cmd, capture_output=True, text=True, timeout=90, **kw)
        except subprocess.TimeoutExpired:
            print("memo_layout: %s timed out after 90 s (attempt %d of 3)" % (os.path.basename(cmd[0]), attempt + 1),
                  file=sys.stderr)
    raise RuntimeError("%s timed out three times: %s" % (cmd[0], " ".join(cmd[1:])))


def measure(chromium, memo, width, work):
    copy = os.path.join(work, "measure-%d.html" % width)
    text = open(memo, encoding="utf-8").read()
    with open(copy, "w", encoding="utf-8") as f:
        f.write(text.replace("</body>", MEASURE + "</body>"))
    r = run([chromium, *CHROMIUM_FLAGS, "--window-size=%d,900" % width, "--dump-dom", pathlib.Path(copy).resolve().as_uri()])
    m = re.search(r'<pre id="layout-check">(.*?)</pre>', r.stdout, re.S)
    if not m:
        raise RuntimeError("Chromium measured nothing (exit %d): %s" % (r.returncode, r.stderr[-500:]))
    return json.loads(html.unescape(m.group(1)))


def screenshot(chromium, memo, width, height, png):
    height = max(600, min(height, 16000))
    r = run([chromium, *CHROMIUM_FLAGS, "--window-size=%d,%d" % (width, height), "--screenshot=" + png,
             pathlib.Path(memo).resolve().as_uri()])
    return r.returncode == 0 and os.path.getsize(png) > 0 if os.path.exists(png) else False


def check_pdf(chromium, memo, work, expected_less, captions, problems, name):
    pdf = os.path.join(work, "memo.pdf")
    run([chromium, *CHROMIUM_FLAGS, "--no-pdf-header-footer", "--print-to-pdf=" + pdf, pathlib.Path(memo).resolve().as_uri()])
    if not os.path.exists(pdf):
        return fail(problems, "%s: Chromium printed no PDF" % name)
    r = run(["pdftotext", "-layout", pdf, "-"])
    text = r.stdout.replace("\u00a0", " ")
    found = text.count("< 0.001")
    if found != expected_less:
        fail(problems, "%s: the PDF has %d whole '< 0.001' where the page has %d (one broken over lines?)" %
             (name, found, expected_less))
    lines = [ln.strip() for ln in text.splitlines() if ln.strip()]
    at = [i for i, ln in enumerate(lines) if re.match(r"Figure \d+\. ", ln)]
    got = [lines[i] for i in at]
    if got != captions:
        fail(problems, "%s: the PDF's captions %s, the page's %s" % (name, got, captions))
    for a, b in zip(at, at[1:]):
        if b != a + 1:  # images carry no text: caption k, then caption k + 1
            fail(problems, "%s: text between the captions of two figures: %s" % (name, lines[a + 1:b]))


def check_sample(args, chromium, sample, problems):
    work = os.path.abspath(os.path.join(args.out, sample))
    shutil.rmtree(work, ignore_errors=True)
    os.makedirs(work)
    project = os.path.join(args.samples, sample, sample + ".moderato")
    r = run([args.cli, "render", project, "--out", os.path.join(work, "render")])
    memos = sorted(p for p in r.stdout.splitlines() if p.endswith("memo.html"))
    if r.returncode != 0 or not memos:
        return fail(problems, "%s: render failed (exit %d): %s" % (sample, r.returncode, r.stderr[-500:]))
    memo = os.path.abspath(memos[0])
    results = {}
    for width in WIDTHS:
        res = measure(chromium, memo, width, work)
        results[width] = res
        for p in res["problems"]:
            fail(problems, "%s at %d px: %s" % (sample, width, p))
        # The checks must have had something to check.
        if res["numbers"] < 40:
            fail(problems, "%s at %d px: only %d numbers found on the page" % (sample, width, res["numbers"]))
        if len(res["figures"]) < 2:
            fail(problems, "%s at %d px: %d figures (expected the Lines and Effect plots at least)" %
                 (sample, width, len(res["figures"])))
        png = os.path.join(args.out, "%s-memo-%d.png" % (sample, width))
        if not screenshot(chromium, memo, width, res["height"], png):
            fail(problems, "%s: no screenshot at %d px" % (sample, width))
    with open(os.path.join(work, "layout.json"), "w", encoding="utf-8") as f:
        json.dump(results, f, indent=1)
    if sample == "orchard-nitrogen" and results[WIDTHS[0]]["lessThan"] < 1:
        fail(problems, "%s: no '< 0.001' on the page (its interaction has p < 0.001)" % sample)
    captions = [f["caption"] for f in results[WIDTHS[0]]["figures"]]
    check_pdf(chromium, memo, work, results[WIDTHS[0]]["lessThan"], captions, problems, sample)


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--cli", required=True)
    ap.add_argument("--samples", required=True)
    ap.add_argument("--out", required=True)
    args = ap.parse_args()
    chromium = chromium_binary()
    if not chromium:
        print("memo_layout: Chromium is not installed (Debian package chromium; ./deps.sh test)", file=sys.stderr)
        return 77  # skipped
    if not shutil.which("pdftotext"):
        print("memo_layout: pdftotext is not installed (Debian package poppler-utils)", file=sys.stderr)
        return 77
    os.makedirs(args.out, exist_ok=True)
    problems = []
    for sample in SAMPLES:
        check_sample(args, chromium, sample, problems)
    print("memo_layout: %d problem(s); screenshots in %s" % (len(problems), args.out))
    return 1 if problems else 0


if __name__ == "__main__":
    sys.exit(main())
