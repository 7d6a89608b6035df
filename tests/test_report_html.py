"""The reviewer's dashboard (report.html), its charts, the letters and the annotated PDFs.

Browser behaviour (filters, URL fragment, hostile strings) is tested in test_browser.py;
this file checks what the Python side writes. make_audit builds a small invented audit
that both files use.
"""

from __future__ import annotations

import base64
import hashlib
import json
import re
from html.parser import HTMLParser
from pathlib import Path

import numpy as np
import pymupdf
import pytest
from PIL import Image, ImageDraw

from corpusaudit.checks.registry import all_rules
from corpusaudit.checks.runner import check_figure
from corpusaudit.config import load_config
from corpusaudit.extract.vector_evidence import vector_evidence
from corpusaudit.measure import Measurements
from corpusaudit.model import Figure
from corpusaudit.report.annotate import annotate_pdf
from tests.conftest import write_page_thumbnails
from corpusaudit.report.html import ADVISORY, json_for_script, overview_charts, render_report, write_report
from corpusaudit.report.letters import letter_markdown
from corpusaudit.report.svg import Bar, bar_chart, nice_ticks
from corpusaudit.rows import DOCUMENT_COLUMNS, FIGURE_COLUMNS, FIGURE_EXTRA_COLUMNS, FINDING_COLUMNS

HOSTILE_CAPTION = "<img src=x onerror=window.__pwned=1> \"quoted\" 'single' </script><script>window.__pwned=2</script>"
HOSTILE_PATH = "reports/Annual <script>window.__pwned=3</script> \"review\".pdf"
LINE_SEPARATORS = "line\u2028separator\u2029paragraph"
REGISTERED = "raster-resolution"  # registered from the start; its rationale and fix reach the page


def _thumbnail(path: Path, bars: int, size=(320, 200)) -> None:
    image = Image.new("RGB", size, "white")
    draw = ImageDraw.Draw(image)
    for n in range(bars):
        top = 20 + 25 * n
        draw.rectangle((40, top, 40 + 50 * (n + 1), top + 18), fill=(0, 114, 178))
    draw.line((40, 10, 40, size[1] - 10), fill=(60, 60, 60), width=2)
    image.save(path)


def make_audit(out_dir: Path) -> tuple[list[dict], list[dict], list[dict], list[str]]:
    """Four invented documents (one unreadable, one image file), seven figures, six findings."""
    assets = out_dir / "assets"
    assets.mkdir(parents=True, exist_ok=True)
    groups = ["department", "year"]
    specs = [  # path, status, pages, department, year
        (HOSTILE_PATH, "ok", 6, "Coastal Studies", "2023"),
        ("theses/Ortolan-Vance 'draft'.pdf", "ok", 3, "Glass Physics", "2024"),
        ("broken/unreadable.pdf", "error", 0, "Glass Physics", "2024"),
        ("images/chart.png", "ok", 1, "Coastal Studies", "2024"),
    ]
    documents = []
    for n, (path, status, pages, department, year) in enumerate(specs):
        documents.append({
            "document_id": f"doc{n}", "path": path, "sha256": hashlib.sha256(path.encode()).hexdigest(),
            "bytes": 1000 + n, "pages": pages, "status": status,
            "error": "cannot open broken document" if status == "error" else "", "figures": 0, "findings": 0,
            "manifest": {"department": department, "year": year}, "cache_key": "test", "decorations": 0})
    figure_specs = [  # document, page, index, chart type, confidence, low, caption, source
        (0, 1, 0, "bar", 0.97, 0, HOSTILE_CAPTION, "raster"),
        (0, 1, 1, "pie", 0.91, 0, "Share of invented budget lines", "vector"),
        (0, 4, 0, "line", 0.42, 1, LINE_SEPARATORS, "raster"),
        (0, 5, 0, "scatter", 0.88, 0, "", "vector"),
        (1, 2, 0, "bar", 0.95, 0, "Melting points of invented alloys", "raster"),
        (1, 3, 0, "heatmap", 0.99, 0, "Invented sensor grid", "vector"),
        (3, 1, 0, "bar", 0.93, 0, "", "image"),
    ]
    figures = []
    for n, (doc, page, index, chart_type, confidence, low, caption, source) in enumerate(figure_specs):
        figure_id = f"fig{n}"
        _thumbnail(assets / f"{figure_id}.png", 2 + n % 4)
        _thumbnail(assets / f"{figure_id}.full.png", 2 + n % 4, size=(640, 400))
        x0, y0 = (0.0, 0.0) if source == "image" else (72.0 + 40 * index, 90.0 + 260 * index)
        x1, y1 = (640.0, 400.0) if source == "image" else (x0 + 300, y0 + 200)
        figures.append({
            "figure_id": figure_id, "document_id": f"doc{doc}", "path": documents[doc]["path"], "page": page,
            "index": index, "x0": x0, "y0": y0, "x1": x1, "y1": y1, "source": source,
            "chart_type": chart_type, "confidence": confidence, "width_px": 640, "height_px": 400,
            "effective_ppi": 96.0 if source == "raster" else None, "caption": caption,
            "thumbnail": f"assets/{figure_id}.png", "unmeasured": "text-contrast;text-size" if n == 3 else "",
            "low_confidence": low, "classified_by": "model", "figure_number": str(n + 1) if caption else ""})
    finding_specs = [  # figure, rule, severity, message, value, threshold, region
        (0, REGISTERED, "warning", "96 ppi at print size", "96", "150", (40, 20, 200, 120)),
        (0, "bar-baseline", "warning", "value axis starts at 40, not zero", "40", "0", (0, 0, 60, 400)),
        (1, "pie-slice-count", "warning", "9 slices", "9", "5", None),
        (2, REGISTERED, "warning", "96 ppi at print size", "96", "150", None),
        (4, REGISTERED, "info", "250 ppi at print size", "250", "300", None),
        (5, "colormap-rainbow", "error", "rainbow colour scale <b>bold</b>", "0.91", "0.5", (500, 40, 620, 380)),
    ]
    findings = []
    for n, (fig, rule, severity, message, value, threshold, region) in enumerate(finding_specs):
        figure = figures[fig]
        fx0, fy0, fx1, fy1 = region or (None, None, None, None)
        findings.append({"finding_id": f"find{n}", "figure_id": figure["figure_id"],
                         "document_id": figure["document_id"], "path": figure["path"], "page": figure["page"],
                         "rule": rule, "severity": severity, "message": message, "value": value,
                         "threshold": threshold, "fx0": fx0, "fy0": fy0, "fx1": fx1, "fy1": fy1})
    for document in documents:
        document["figures"] = sum(f["document_id"] == document["document_id"] for f in figures)
        document["findings"] = sum(f["document_id"] == document["document_id"] for f in findings)
    return documents, figures, findings, groups


@pytest.fixture
def audit(tmp_path):
    rows = make_audit(tmp_path)
    write_report(tmp_path, *rows)
    return tmp_path, rows


def _embedded_payload(html: str) -> dict:
    match = re.search(r'<script type="application/json" id="audit-data">(.*?)</script>', html, re.S)
    assert match, "the audit rows are embedded once as JSON"
    return json.loads(match.group(1))


class _Collector(HTMLParser):
    def __init__(self):
        super().__init__()
        self.tags: list[tuple[str, dict]] = []
        self.scripts: list[str] = []
        self._in_script = False

    def handle_starttag(self, tag, attrs):
        self.tags.append((tag, dict(attrs)))
        self._in_script = tag == "script"
        if tag == "script":
            self.scripts.append("")

    def handle_data(self, data):
        if self._in_script:
            self.scripts[-1] += data

    def handle_endtag(self, tag):
        if tag == "script":
            self._in_script = False


def test_rows_contract_is_what_the_fixture_builds(tmp_path):
    documents, figures, findings, _ = make_audit(tmp_path)
    assert set(DOCUMENT_COLUMNS) <= set(documents[0])
    assert set(FIGURE_COLUMNS) | set(FIGURE_EXTRA_COLUMNS) <= set(figures[0])
    assert set(FINDING_COLUMNS) <= set(findings[0])


def test_page_is_self_contained_and_keeps_the_advisory(audit):
    out_dir, _ = audit
    html = (out_dir / "report.html").read_text(encoding="utf-8")
    collector = _Collector()
    collector.feed(html)
    assert ADVISORY in html.replace("&#x27;", "'")
    # No network: no external script, style sheet, font or image source.
    for tag, attrs in collector.tags:
        for key in ("src", "href"):
            value = attrs.get(key) or ""
            assert not re.match(r"^(https?:)?//", value), f"{tag} {key}={value} reaches the network"
        assert not (tag == "link" and attrs.get("rel") == "stylesheet")
        assert not (tag == "script" and "src" in attrs)
    assert "@import" not in html and "url(http" not in html


def test_content_security_policy_allows_only_this_page_script(audit):
    out_dir, _ = audit
    html = (out_dir / "report.html").read_text(encoding="utf-8")
    collector = _Collector()
    collector.feed(html)
    policy = next(a["content"] for t, a in collector.tags if t == "meta" and a.get("http-equiv") == "Content-Security-Policy")
    directives = dict(d.strip().split(" ", 1) for d in policy.split(";") if d.strip())
    assert directives["default-src"] == "'none'"
    assert directives["img-src"] == "'self' data:"
    assert directives["style-src"] == "'unsafe-inline'"
    executable = [s for (t, a), s in zip([x for x in collector.tags if x[0] == "script"], collector.scripts)
                  if a.get("type") != "application/json"]
    assert len(executable) == 1
    # CSP Level 3 hash source: base64 of the SHA-256 of the script's text, as the browser computes it.
    digest = base64.b64encode(hashlib.sha256(executable[0].encode("utf-8")).digest()).decode()
    assert directives["script-src"] == f"'sha256-{digest}'"


def test_hostile_strings_stay_inside_the_json(audit):
    out_dir, (documents, figures, findings, _) = audit
    html = (out_dir / "report.html").read_text(encoding="utf-8")
    # The only </script> sequences are the closing tags of the two script elements.
    assert html.lower().count("</script") == 2
    assert "\u2028" not in html and "\u2029" not in html
    payload = _embedded_payload(html)
    captions = [row[payload["figure_fields"].index("caption")] for row in payload["figures"]]
    assert HOSTILE_CAPTION in captions and LINE_SEPARATORS in captions
    assert payload["documents"][0][payload["document_fields"].index("path")] == HOSTILE_PATH
    # Written by Python: the overview and the ranking escape the hostile file name.
    assert "<script>window.__pwned=3" not in html
    assert "&lt;script&gt;window.__pwned=3&lt;/script&gt;" in html


def test_json_for_script_round_trips_and_cannot_close_its_element():
    value = {"caption": "</script><!-- \u2028 \u2029 </SCRIPT >", "n": [1, 2.5, None]}
    text = json_for_script(value)
    assert "<" not in text and "\u2028" not in text and "\u2029" not in text
    assert json.loads(text) == value


def test_payload_counts_match_the_rows(audit):
    out_dir, (documents, figures, findings, groups) = audit
    payload = _embedded_payload((out_dir / "report.html").read_text(encoding="utf-8"))
    assert len(payload["documents"]) == len(documents)
    assert len(payload["figures"]) == len(figures)
    assert len(payload["findings"]) == len(findings)
    assert payload["groups"] == groups
    rules = {r["id"]: r for r in payload["rules"]}
    registered = {r.id: r for r in all_rules()}
    assert rules[REGISTERED]["fix"] == registered[REGISTERED].fix
    assert rules[REGISTERED]["rationale"] == registered[REGISTERED].rationale
    assert {f["rule"] for f in findings} <= set(rules)


def test_overview_ranks_documents_and_compares_groups_by_rate(audit):
    out_dir, (documents, figures, findings, _) = audit
    html = (out_dir / "report.html").read_text(encoding="utf-8")
    ranking = html[html.index("Documents ranked"):html.index("</table>", html.index("Documents ranked"))]
    # The document with an error-severity finding ranks above the one with more warnings only when
    # severity comes first: doc1 has the error, doc0 has four warnings.
    assert ranking.index("Ortolan-Vance") < ranking.index("Annual")
    # Findings per figure by department: Coastal Studies 4 findings / 5 figures, Glass Physics 2 / 2.
    group_section = html[html.index("Findings per figure by department"):]
    assert "0.80 (4 / 5)" in group_section and "1.00 (2 / 2)" in group_section
    assert group_section.index("Glass Physics") < group_section.index("Coastal Studies")
    assert "Files that could not be audited (1)" in html


def test_nice_ticks():
    # Heckbert's "nice numbers" (Graphics Gems, 1990): steps of 1, 2 or 5 times a power of ten.
    assert nice_ticks(47) == [0, 10, 20, 30, 40, 50]
    assert nice_ticks(0.8, integer=False) == [0, 0.2, 0.4, 0.6, 0.8]
    assert nice_ticks(3) == [0, 1, 2, 3]


def test_bar_chart_sorted_from_zero_direct_labels_no_legend():
    svg = bar_chart("Findings by rule", [Bar("b", 3), Bar("a", 10), Bar("c <x>", 7)], "findings")
    labels = re.findall(r'text-anchor="end"[^>]*>([^<]*)</text>', svg)
    assert labels == ["a", "c &lt;x&gt;", "b"]  # largest first
    widths = [float(w) for w in re.findall(r'<rect x="[\d.]+" y="[\d.]+" width="([\d.]+)" height="15"', svg)]
    assert widths == sorted(widths, reverse=True)
    assert widths[0] / widths[2] == pytest.approx(10 / 3, rel=0.02)  # lengths proportional: axis from zero
    assert re.search(r'text-anchor="middle"[^>]*>0</text>', svg), "the value axis is labelled from 0"
    assert ">10</text>" in svg and ">7</text>" in svg and ">3</text>" in svg  # direct labels
    assert "legend" not in svg.lower() and "rotate" not in svg
    # Okabe & Ito (2008) blue for every bar: a single series needs no colour key.
    assert set(re.findall(r'<rect x="\d[\d.]*" y="[\d.]+" width="[\d.]+" height="15" fill="([^"]+)"', svg)) == {"#0072B2"}


def _wcag_contrast(foreground: str, background: str) -> float:
    """WCAG 2.x contrast ratio from sRGB hex colours (relative luminance, section 'Definitions')."""
    def luminance(hex_colour: str) -> float:
        channels = np.array([int(hex_colour[i:i + 2], 16) for i in (1, 3, 5)]) / 255
        linear = np.where(channels <= 0.04045, channels / 12.92, ((channels + 0.055) / 1.055) ** 2.4)
        return float(linear @ [0.2126, 0.7152, 0.0722])
    lighter, darker = sorted((luminance(foreground), luminance(background)), reverse=True)
    return (lighter + 0.05) / (darker + 0.05)


def test_chart_text_contrast_meets_wcag():
    # Worked example from WCAG 2.x understanding docs: #767676 on white is 4.54:1, the lightest grey that passes.
    assert _wcag_contrast("#767676", "#ffffff") == pytest.approx(4.54, abs=0.01)
    svg = bar_chart("t", [Bar("a", 1)], "v")
    for colour in set(re.findall(r'<text[^>]*fill="(#[0-9a-fA-F]{6})"', svg)):
        assert _wcag_contrast(colour, "#ffffff") >= 4.5, colour


def _figure_from_svg(svg: str, caption: str, zoom: float = 2.0) -> Figure:
    """The chart as corpusaudit sees a vector figure in a PDF: pixels plus vector evidence."""
    pdf = pymupdf.open("pdf", pymupdf.open(stream=svg.encode("utf-8"), filetype="svg").convert_to_pdf())
    page = pdf[0]
    pixmap = page.get_pixmap(matrix=pymupdf.Matrix(zoom, zoom), alpha=False)
    pixels = np.frombuffer(pixmap.samples, dtype=np.uint8).reshape(pixmap.height, pixmap.width, 3).copy()
    return Figure(figure_id="dashboard-chart", document_id="dashboard", path="report.html", page=1, index=0,
                  bbox=tuple(page.rect), source="vector", width_px=pixmap.width, height_px=pixmap.height,
                  caption=caption, figure_number="1", pixels=pixels,
                  vector=vector_evidence(page, page.rect, zoom), chart_type="bar", confidence=1.0,
                  classified_by="vector")


def test_dashboard_charts_pass_corpusaudits_own_checks(tmp_path):
    documents, figures, findings, _ = make_audit(tmp_path)
    charts = overview_charts(documents, figures, findings)
    assert [heading for heading, _ in charts] == ["Findings by rule", "Findings by severity", "Figures by chart type"]
    config = load_config(None)
    for heading, svg in charts:
        figure = _figure_from_svg(svg, caption=heading)
        # The evidence is real: one filled bar per row and every label as text.
        bars = [p for p in figure.vector.paths if p.is_rect and p.fill and p.fill != (1.0, 1.0, 1.0)]
        rows = len(re.findall(r'text-anchor="end"', svg))
        assert len(bars) == rows and rows > 0
        assert "0" in {t.text for t in figure.vector.texts}
        results, _unmeasured = check_figure(figure, config, Measurements(figure), strict=True)
        assert results == [], f"{heading}: {[(r.rule, r.draft.message) for r in results]}"


_BAR_WIDTH = re.compile(r'(<rect x="[\d.]+" y="[\d.]+" width=")([\d.]+)(" height="15")')


def test_the_chart_check_can_fail_on_an_unsorted_variant():
    """Control for the test above: the same chart with its bar lengths shuffled must be flagged."""
    if "bar-order" not in {rule.id for rule in all_rules()}:
        pytest.skip("bar-order is not registered in this version")
    svg = bar_chart("Findings by rule", [Bar("alpha-rule", 3), Bar("beta-rule", 10), Bar("gamma-rule", 7),
                                         Bar("delta-rule", 5)], "findings")
    widths = [m.group(2) for m in _BAR_WIDTH.finditer(svg)]
    shuffled = iter([widths[1], widths[0], widths[3], widths[2]])
    unsorted = _BAR_WIDTH.sub(lambda m: m.group(1) + next(shuffled) + m.group(3), svg)
    config = load_config(None)
    for chart, expected in ((svg, set()), (unsorted, {"bar-order"})):
        figure = _figure_from_svg(chart, caption="Findings by rule")
        results, _ = check_figure(figure, config, Measurements(figure), strict=True)
        assert expected <= {r.rule for r in results} and (expected or not results)


def test_letters_list_findings_page_by_page_with_fixes(audit):
    out_dir, (documents, figures, findings, _) = audit
    markdown = (out_dir / "letters" / "doc0.md").read_text(encoding="utf-8")
    html = (out_dir / "letters" / "doc0.html").read_text(encoding="utf-8")
    fix = next(r.fix for r in all_rules() if r.id == REGISTERED)
    for text in (markdown, html):
        assert text.index("Page 1") < text.index("Page 4")
        assert "advice, not verdicts" in text
    assert fix.split()[0] in markdown and fix in html.replace("&#x27;", "'")
    assert "Page 5" not in markdown  # a page whose figure has no finding is left out
    # The hostile caption is text in both formats.
    assert "<img src=x" not in html and "&lt;img src=x onerror" in html
    assert "<img" not in markdown and "<script" not in markdown
    broken = (out_dir / "letters" / "doc2.md").read_text(encoding="utf-8")
    assert "could not be read" in broken


def test_letter_markdown_escapes_markup():
    document = {"document_id": "d", "path": "a_b*c*.pdf", "status": "ok", "error": ""}
    figure = {"figure_id": "f", "document_id": "d", "page": 2, "index": 0, "caption": "[link](javascript:x) <b>",
              "chart_type": "bar", "unmeasured": "", "figure_number": "3"}
    finding = {"figure_id": "f", "document_id": "d", "page": 2, "rule": "bar-baseline", "severity": "warning",
               "message": "axis *starts* at 5", "value": "5", "threshold": "0"}
    text = letter_markdown(document, [figure], [finding])
    assert r"a\_b\*c\*.pdf" in text and r"\[link\](javascript:x) &lt;b&gt;" in text
    assert r"axis \*starts\* at 5" in text


def _pdf_with_figure(path: Path) -> tuple[dict, dict]:
    pdf = pymupdf.open()
    page = pdf.new_page(width=595, height=842)
    page.draw_rect(pymupdf.Rect(100, 120, 400, 320), color=(0, 0, 0), fill=(0, 0.45, 0.7))
    page.insert_text((100, 350), "Figure 1. Invented values.")
    pdf.save(path)
    figure = {"figure_id": "f1", "document_id": "d1", "page": 1, "index": 0, "x0": 100.0, "y0": 120.0,
              "x1": 400.0, "y1": 320.0, "figure_number": "1"}
    finding = {"finding_id": "n1", "figure_id": "f1", "document_id": "d1", "page": 1, "rule": REGISTERED,
               "severity": "warning", "message": "96 ppi at print size"}
    return figure, finding


def test_annotate_pdf_adds_box_and_note_and_leaves_the_original(tmp_path):
    source = tmp_path / "source.pdf"
    figure, finding = _pdf_with_figure(source)
    before = source.read_bytes()
    unflagged = {**figure, "figure_id": "f2", "y0": 400.0, "y1": 500.0}
    count = annotate_pdf(source, tmp_path / "out" / "annotated.pdf", [figure, unflagged], [finding])
    assert count == 1
    assert source.read_bytes() == before
    with pymupdf.open(tmp_path / "out" / "annotated.pdf") as pdf:
        page = pdf[0]  # annotations stay bound to a page only while the page object lives
        annotations = list(page.annots())
        kinds = sorted(a.type[1] for a in annotations)
        assert kinds == ["Square", "Text"]  # PDF 32000-1, 12.5.6: Square is the rectangle annotation
        square = next(a for a in annotations if a.type[1] == "Square")
        assert square.rect.x0 == pytest.approx(100, abs=2) and square.rect.y1 == pytest.approx(320, abs=2)
        assert "96 ppi" in square.info["content"] and "Suggested fix" in square.info["content"]
    with pytest.raises(ValueError):
        annotate_pdf(source, source, [figure], [finding])


def test_page_thumbnails_feed_the_document_view(tmp_path):
    source = tmp_path / "source.pdf"
    figure, finding = _pdf_with_figure(source)
    written = write_page_thumbnails(source, tmp_path, "d1", pages=[1])
    assert [p.name for p in written] == ["d1-p1.png"]
    with Image.open(written[0]) as image:
        assert max(image.size) == 420 and image.size[0] / image.size[1] == pytest.approx(595 / 842, rel=0.01)
    document = {"document_id": "d1", "path": "source.pdf", "sha256": "", "bytes": 1, "pages": 1, "status": "ok",
                "error": "", "figures": 1, "findings": 1, "manifest": {}}
    row = {**figure, "path": "source.pdf", "source": "vector", "chart_type": "bar", "confidence": 0.9,
           "width_px": 600, "height_px": 400, "effective_ppi": None, "caption": "", "thumbnail": "",
           "unmeasured": "", "low_confidence": 0}
    payload = _embedded_payload(render_report(tmp_path, [document], [row], [{**finding, "path": "source.pdf",
        "value": "96", "threshold": "150", "fx0": None, "fy0": None, "fx1": None, "fy1": None}], []))
    page_info = payload["documents"][0][payload["document_fields"].index("page_info")]
    assert page_info == {"1": [595.0, 842.0, "assets/pages/d1-p1.png"]}


def test_write_report_from_a_real_audit(tmp_path):
    from corpusaudit.run import audit as run_audit

    corpus = tmp_path / "corpus"
    corpus.mkdir()
    pdf = pymupdf.open()
    page = pdf.new_page(width=595, height=842)
    pixels = np.full((60, 90, 3), 255, np.uint8)
    pixels[10:50, 10:30] = (0, 114, 178)
    pixmap = pymupdf.Pixmap(pymupdf.csRGB, 90, 60, pixels.tobytes(), False)
    page.insert_image(pymupdf.Rect(72, 72, 372, 272), pixmap=pixmap)  # 90 px over 300 pt: 21.6 ppi
    page.insert_text((72, 300), "Figure 1. Invented <b>values</b>.")
    pdf.save(corpus / "one.pdf")
    out = tmp_path / "out"
    summary = run_audit([str(corpus)], out, load_config(None))
    html = (out / "report.html").read_text(encoding="utf-8")
    payload = _embedded_payload(html)
    assert len(payload["figures"]) == summary.figures >= 1
    assert (out / "letters").is_dir() and len(list((out / "letters").glob("*.md"))) == 1
