#!/usr/bin/env python3
"""Opens dwell's report.html in headless Chromium from disk and checks it as a client would.

Standard library only. Usage (from the repository root):

    python3 tests/browser/check_report.py [--dwell target/debug/dwell] [--out DIR] [--chromium chromium]

Steps: `dwell simulate` and `dwell outage` write reports for a shipped (invented) example;
Chromium (Debian package `chromium`) opens each from disk with every host name unresolvable,
so any attempt to fetch something would fail loudly; the script then requires

* no console error or failed load in Chromium's log (the embedded font must decode too),
* a screenshot (PNG, 1200 px wide, non-trivial size) and
* a PDF print with at least one page per report section (the print stylesheet breaks pages
  between sections), starting with `%PDF-`;
* the same printed on A4 and on US Letter (the paper a print dialog would choose, set by an
  @page rule in a copy): the right page size and a page or more per section.

Exit status 0 when every check passes, 1 otherwise; outputs stay in DIR for a look.
"""

import argparse
import os
import re
import shutil
import struct
import subprocess
import sys
import tempfile

ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
SECTIONS = 7  # summary, house, results, charts, method, weather, cautions

FLAGS = [
    "--headless",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-quic",
    "--no-first-run",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
    "--disable-extensions",
    "--hide-scrollbars",
    # Any network fetch fails: a self-contained report never notices.
    "--host-resolver-rules=MAP * ~NOTFOUND",
    "--enable-logging=stderr",
    "--v=0",
]

# Lines of Chromium's log that mean the page misbehaved.
PAGE_ERROR = re.compile(r"CONSOLE|Failed to load|Failed to decode|net::ERR_|Uncaught|OTS parsing error|Refused to", re.I)


def run(cmd, **kw):
    print("+ " + " ".join(cmd), flush=True)
    return subprocess.run(cmd, capture_output=True, text=True, timeout=300, **kw)


def chromium(browser, args, profile):
    return run([browser] + FLAGS + ["--user-data-dir=" + profile] + args)


def png_size(path):
    with open(path, "rb") as f:
        head = f.read(24)
    if head[:8] != b"\x89PNG\r\n\x1a\n":
        return None
    return struct.unpack(">II", head[16:24])


def pdf_pages(path):
    data = open(path, "rb").read()
    return data[:5] == b"%PDF-", len(re.findall(rb"/Type\s*/Page(?!s)", data))


# Paper sizes a client prints on (points, 1/72 inch): ISO 216 A4 and US Letter.
PAPERS = {"A4": (595.28, 841.89), "letter": (612.0, 792.0)}


def pdf_media_box(path):
    m = re.search(rb"/MediaBox\s*\[\s*([-\d.]+)\s+([-\d.]+)\s+([-\d.]+)\s+([-\d.]+)\s*\]", open(path, "rb").read())
    return None if m is None else (float(m.group(3)) - float(m.group(1)), float(m.group(4)) - float(m.group(2)))


def check_paper(browser, report, outdir, name):
    """Prints the report on A4 and on Letter (the page size a print dialog would set, injected
    as an @page rule into a copy) and checks the paper size and one page or more per section."""
    failures = []
    html = open(report, encoding="utf-8").read()
    for paper, (w, h) in PAPERS.items():
        copy = os.path.join(os.path.dirname(report), "report-%s.html" % paper)
        with open(copy, "w", encoding="utf-8") as f:
            f.write(html.replace("</head>", "<style>@page { size: %s; }</style></head>" % paper, 1))
        pdf = os.path.join(outdir, "%s-%s.pdf" % (name, paper))
        profile = tempfile.mkdtemp(prefix="dwell-chromium-")
        try:
            r = chromium(browser, ["--no-pdf-header-footer", "--print-to-pdf=" + pdf, "file://" + os.path.abspath(copy)], profile)
        finally:
            shutil.rmtree(profile, ignore_errors=True)
            os.remove(copy)
        if r.returncode != 0 or not os.path.exists(pdf):
            failures.append("%s %s: no PDF (chromium exited %d)" % (name, paper, r.returncode))
            continue
        box = pdf_media_box(pdf)
        ok, pages = pdf_pages(pdf)
        if box is None or abs(box[0] - w) > 2 or abs(box[1] - h) > 2:
            failures.append("%s %s: page is %s pt, expected %.0f × %.0f" % (name, paper, box, w, h))
        elif not ok or pages < SECTIONS:
            failures.append("%s %s: %d pages, expected at least %d (a page per section)" % (name, paper, pages, SECTIONS))
        else:
            print("%s on %s: %d pages of %.0f × %.0f pt" % (name, paper, pages, box[0], box[1]))
    return failures


def check_report(browser, report, outdir, name):
    failures = []
    url = "file://" + os.path.abspath(report)
    shot = os.path.join(outdir, name + "-screenshot.png")
    pdf = os.path.join(outdir, name + "-print.pdf")
    log_text = ""
    for extra in (["--window-size=1200,2400", "--screenshot=" + shot, url], ["--no-pdf-header-footer", "--print-to-pdf=" + pdf, url]):
        profile = tempfile.mkdtemp(prefix="dwell-chromium-")
        try:
            r = chromium(browser, extra, profile)
        finally:
            shutil.rmtree(profile, ignore_errors=True)
        log_text += r.stderr
        if r.returncode != 0:
            failures.append("%s: chromium exited %d: %s" % (name, r.returncode, r.stderr[-2000:]))
    bad = [l for l in log_text.splitlines() if PAGE_ERROR.search(l) and "report.html" in l or PAGE_ERROR.search(l) and "CONSOLE" in l]
    if bad:
        failures.append("%s: console errors or failed loads:\n  %s" % (name, "\n  ".join(bad)))
    size = png_size(shot) if os.path.exists(shot) else None
    if size is None:
        failures.append("%s: no screenshot PNG at %s" % (name, shot))
    elif size[0] != 1200 or os.path.getsize(shot) < 20_000:
        failures.append("%s: screenshot %s is %s px, %d bytes: expected 1200 px wide and over 20 kB" % (name, shot, size, os.path.getsize(shot)))
    if not os.path.exists(pdf):
        failures.append("%s: no PDF at %s" % (name, pdf))
    else:
        ok, pages = pdf_pages(pdf)
        if not ok or os.path.getsize(pdf) < 50_000 or pages < SECTIONS:
            failures.append("%s: PDF %s: header ok %s, %d bytes, %d pages (expected %%PDF-, over 50 kB, at least %d pages)" % (name, pdf, ok, os.path.getsize(pdf), pages, SECTIONS))
        else:
            print("%s: PDF %d pages, %d bytes; screenshot %s px, %d bytes" % (name, pages, os.path.getsize(pdf), size, os.path.getsize(shot)))
    return failures


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--dwell", default=os.path.join(ROOT, "target", "debug", "dwell"), help="dwell binary")
    ap.add_argument("--out", default=None, help="folder for runs, screenshots and PDFs (default: a new temporary folder)")
    ap.add_argument("--chromium", default=shutil.which("chromium") or "chromium", help="Chromium binary")
    a = ap.parse_args()
    out = a.out or tempfile.mkdtemp(prefix="dwell-browser-")
    os.makedirs(out, exist_ok=True)
    model = os.path.join(ROOT, "zones-examples", "brickworth-house.json")
    runs = {
        "simulate": [a.dwell, "simulate", model, "--from", "2025-01-01", "--to", "2025-02-28", "-q", "--out", os.path.join(out, "simulate")],
        "outage": [a.dwell, "outage", model, "--start", "2025-01-14T18:00", "--hours", "24", "-q", "--out", os.path.join(out, "outage")],
    }
    failures = []
    for name, cmd in runs.items():
        r = run(cmd, cwd=ROOT)
        if r.returncode != 0:
            failures.append("%s: dwell exited %d: %s" % (name, r.returncode, r.stderr))
            continue
        failures += check_report(a.chromium, os.path.join(out, name, "report.html"), out, name)
        failures += check_paper(a.chromium, os.path.join(out, name, "report.html"), out, name)
    if failures:
        print("FAILED:\n" + "\n".join(failures), file=sys.stderr)
        return 1
    print("browser checks passed; outputs in " + out)
    return 0


if __name__ == "__main__":
    sys.exit(main())
