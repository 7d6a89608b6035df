"""Dashboard at scale: a synthetic audit of 20,000 figures (invented rows, one tiny shared thumbnail).

Prints the size of report.html, the time write_report takes, and, when chromium and playwright
are installed, the browser's time to first render and to apply filters.
Targets: generation < 10 s, first render < 2 s, filter < 200 ms.

    python benchmarks/dashboard.py [--figures 20000] [--out DIR]
"""

from __future__ import annotations

import argparse
import random
import shutil
import statistics
import tempfile
import time
from pathlib import Path

from PIL import Image, ImageDraw

from corpusaudit.model import CHART_TYPES
from corpusaudit.report.html import render_report, write_report
from corpusaudit.report.letters import write_letters

RULES = ("bar-baseline", "bar-order", "pie-slice-count", "tick-label-rotation", "palette-cvd", "text-contrast",
         "text-size", "raster-resolution", "caption-missing", "line-series-count", "scatter-overplotting",
         "colormap-rainbow")
SEVERITY_OF = {rule: ("warning", "info", "error")[n % 3] for n, rule in enumerate(RULES)}
DEPARTMENTS = ("Coastal Studies", "Glass Physics", "Applied Folklore", "Orbital Botany", "Quiet Engineering",
               "Urban Mycology", "Tidal Economics", "Lantern Chemistry", "Harbour Law", "Cloud Geography")
CHARACTERS = "abcdefghijklmnopqrstuvwxyz "


def synthetic_audit(out_dir: Path, figure_count: int, figures_per_document: int = 10, seed: int = 7):
    random_ = random.Random(seed)
    assets = out_dir / "assets"
    assets.mkdir(parents=True, exist_ok=True)
    image = Image.new("RGB", (120, 80), "white")
    ImageDraw.Draw(image).rectangle((10, 20, 90, 40), fill=(0, 114, 178))
    image.save(assets / "shared.png")
    image.save(assets / "shared.full.png")
    documents, figures, findings = [], [], []
    for d in range(max(1, figure_count // figures_per_document)):
        document_id = f"d{d:05d}"
        path = f"corpus/{random_.choice(DEPARTMENTS).lower().replace(' ', '-')}/report-{d:05d}.pdf"
        documents.append({"document_id": document_id, "path": path, "sha256": f"{d:064x}", "bytes": 100_000 + d,
                          "pages": 12, "status": "ok" if d % 97 else "error",
                          "error": "" if d % 97 else "cannot open broken document", "figures": 0, "findings": 0,
                          "manifest": {"department": random_.choice(DEPARTMENTS), "year": str(2019 + d % 6)},
                          "cache_key": "bench", "decorations": 0})
    for n in range(figure_count):
        document = documents[n % len(documents)]
        figure_id = f"{document['document_id']}-f{n:06d}"
        page = 1 + (n // len(documents)) % 12
        caption = "Figure. " + "".join(random_.choice(CHARACTERS) for _ in range(random_.randint(20, 90)))
        figures.append({"figure_id": figure_id, "document_id": document["document_id"], "path": document["path"],
                        "page": page, "index": 0, "x0": 72.0, "y0": 90.0, "x1": 520.0, "y1": 380.0,
                        "source": random_.choice(("raster", "vector")), "chart_type": random_.choice(CHART_TYPES),
                        "confidence": round(random_.uniform(0.3, 1.0), 3), "width_px": 1200, "height_px": 800,
                        "effective_ppi": round(random_.uniform(72, 600), 1), "caption": caption,
                        "thumbnail": "assets/shared.png", "unmeasured": "text-size" if n % 13 == 0 else "",
                        "low_confidence": int(n % 11 == 0), "classified_by": "model", "figure_number": str(n % 40 + 1)})
        for k in range(random_.choice((0, 0, 1, 1, 2, 3))):
            rule = random_.choice(RULES)
            findings.append({"finding_id": f"{figure_id}-{rule}-{k}", "figure_id": figure_id,
                             "document_id": document["document_id"], "path": document["path"], "page": page,
                             "rule": rule, "severity": SEVERITY_OF[rule], "message": f"{rule}: invented measurement",
                             "value": "7", "threshold": "5", "fx0": 10.0, "fy0": 10.0, "fx1": 300.0, "fy1": 200.0})
    per_document_figures: dict[str, int] = {}
    per_document_findings: dict[str, int] = {}
    for figure in figures:
        per_document_figures[figure["document_id"]] = per_document_figures.get(figure["document_id"], 0) + 1
    for finding in findings:
        per_document_findings[finding["document_id"]] = per_document_findings.get(finding["document_id"], 0) + 1
    for document in documents:
        document["figures"] = per_document_figures.get(document["document_id"], 0)
        document["findings"] = per_document_findings.get(document["document_id"], 0)
    return documents, figures, findings, ["department", "year"]


FILTER_SCRIPT = """
async ([name, value]) => {
  const control = document.querySelector(`#filters [name=${name}]`);
  const started = performance.now();
  control.value = value;
  control.dispatchEvent(new Event("change", { bubbles: true }));
  await new Promise((done) => requestAnimationFrame(() => requestAnimationFrame(done)));
  return performance.now() - started;
}
"""


def browser_timings(report: Path) -> dict[str, float] | None:
    chromium = shutil.which("chromium") or shutil.which("chromium-browser")
    try:
        from playwright.sync_api import sync_playwright
    except ImportError:
        return None
    if not chromium:
        return None
    args = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
            "--disable-background-networking", "--disable-component-update", "--disable-sync"]
    timings: dict[str, float] = {}
    with sync_playwright() as playwright:
        browser = playwright.chromium.launch(executable_path=chromium, args=args)
        page = browser.new_page(viewport={"width": 1360, "height": 900})
        for label, fragment in (("first render, overview", ""), ("first render, figures view", "#figures")):
            page.goto("about:blank")
            page.goto(report.as_uri() + fragment)
            page.wait_for_selector("html[data-ready=true]")
            timings[f"{label} (ms)"] = page.evaluate("performance.getEntriesByName('dashboard-ready')[0].startTime")
        filters = [("rule", "bar-baseline"), ("sev", "error"), ("type", "pie"), ("conf", "low"), ("sort", "confidence"),
                   ("q", "figure abc"), ("rule", ""), ("sev", ""), ("type", ""), ("conf", ""), ("q", "")]
        durations = [page.evaluate(FILTER_SCRIPT, list(f)) for f in filters]
        timings["filter, median (ms)"] = statistics.median(durations)
        timings["filter, slowest (ms)"] = max(durations)
        browser.close()
    return timings


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--figures", type=int, default=20_000)
    parser.add_argument("--out", type=Path, help="keep the synthetic audit here (default: a temporary folder)")
    args = parser.parse_args()
    out_dir = args.out or Path(tempfile.mkdtemp(prefix="dashboard-bench-"))
    out_dir.mkdir(parents=True, exist_ok=True)
    documents, figures, findings, groups = synthetic_audit(out_dir, args.figures)
    started = time.perf_counter()
    report = write_report(out_dir, documents, figures, findings, groups)
    generation = time.perf_counter() - started
    # The parts, to tell computing from disk writes on a busy machine.
    started = time.perf_counter()
    render_report(out_dir, documents, figures, findings, groups)
    page_only = time.perf_counter() - started
    started = time.perf_counter()
    write_letters(out_dir, documents, figures, findings)
    letters_only = time.perf_counter() - started
    print(f"audit: {len(documents):,} documents, {len(figures):,} figures, {len(findings):,} findings")
    print(f"report.html size: {report.stat().st_size / 1e6:.2f} MB")
    print(f"generation (write_report, letters included): {generation:.2f} s  (target < 10 s)")
    print(f"  of which: page in memory {page_only:.2f} s, {2 * len(documents):,} letter files {letters_only:.2f} s")
    timings = browser_timings(report)
    if timings is None:
        print("browser timings skipped: chromium or playwright not installed")
    else:
        for name, value in timings.items():
            print(f"{name}: {value:.0f}")
        print("targets: first render < 2000 ms, filter < 200 ms")
    if args.out is None:
        shutil.rmtree(out_dir)


if __name__ == "__main__":
    main()
