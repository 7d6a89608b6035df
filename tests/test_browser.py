"""The dashboard in a real browser: Debian's chromium driven by playwright.

Skipped (with the reason) when chromium or the playwright package is missing; CI installs both.
Screenshots go to $CORPUSAUDIT_ARTIFACTS (default ci-artifacts/screenshots).
"""

from __future__ import annotations

import functools
import http.server
import os
import shutil
import sys
import threading
from pathlib import Path

import pytest

import pymupdf

from tests.conftest import write_page_thumbnails
from corpusaudit.report.html import write_report
from corpusaudit.report.tables import write_tables

sys.path.insert(0, str(Path(__file__).parent))  # the shared invented audit lives beside this file
from test_report_html import HOSTILE_CAPTION, HOSTILE_PATH, LINE_SEPARATORS, REGISTERED, make_audit

playwright_api = pytest.importorskip("playwright.sync_api", reason="the playwright package is not installed")

CHROMIUM = os.environ.get("CORPUSAUDIT_CHROMIUM") or shutil.which("chromium") or shutil.which("chromium-browser")
if not CHROMIUM:
    pytest.skip("no chromium executable (apt-get install chromium)", allow_module_level=True)

CHROMIUM_ARGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
                 "--disable-background-networking", "--disable-component-update", "--disable-sync"]
ARTIFACTS = Path(os.environ.get("CORPUSAUDIT_ARTIFACTS", "ci-artifacts/screenshots"))


@pytest.fixture(scope="module")
def audit_dir(tmp_path_factory):
    out_dir = tmp_path_factory.mktemp("dashboard")
    rows = make_audit(out_dir)
    # doc1 gets real page thumbnails from an invented US-letter PDF, the other documents outlines.
    source = out_dir / "doc1-source.pdf"
    with pymupdf.open() as pdf:
        for _ in range(3):
            pdf.new_page(width=612, height=792).insert_text((72, 72), "Invented page")
        pdf.save(source)
    write_page_thumbnails(source, out_dir, "doc1", pages=[2, 3])
    write_tables(out_dir, *rows)
    write_report(out_dir, *rows)
    return out_dir, rows


@pytest.fixture(scope="module")
def browser():
    with playwright_api.sync_playwright() as playwright:
        instance = playwright.chromium.launch(executable_path=CHROMIUM, args=CHROMIUM_ARGS)
        yield instance
        instance.close()


@pytest.fixture
def page(browser):
    context = browser.new_context(viewport={"width": 1360, "height": 900})
    tab = context.new_page()
    tab.console_errors = []
    tab.on("console", lambda message: message.type == "error" and tab.console_errors.append(message.text))
    tab.on("pageerror", lambda error: tab.console_errors.append(str(error)))
    yield tab
    context.close()


def _open(page, out_dir: Path, fragment: str = "") -> None:
    page.goto((out_dir / "report.html").as_uri() + fragment)
    page.wait_for_selector("html[data-ready=true]")


def _card_figure_ids(page) -> list[str]:
    hrefs = page.eval_on_selector_all("#cards .card-title a", "links => links.map(a => a.getAttribute('href'))")
    return [href.split("?")[0].removeprefix("#figure/") for href in hrefs]


def _figures_with_rule(findings: list[dict], rule: str) -> set[str]:
    return {f["figure_id"] for f in findings if f["rule"] == rule}


def test_loads_without_errors_and_shows_every_figure(page, audit_dir):
    out_dir, _ = audit_dir
    _open(page, out_dir)
    assert page.is_visible("#view-overview") and page.is_hidden("#view-figures")
    with open(out_dir / "figures.csv", encoding="utf-8") as handle:
        expected = sum(1 for _ in handle) - 1
    page.click(".tabs a[data-view=figures]")
    page.wait_for_selector("#view-figures #cards .card")  # the view renders after the click's handler
    assert page.locator("#cards .card").count() == expected
    assert page.text_content("#figure-count").startswith(f"Showing 1\u2013{expected} of {expected} figures")
    # Thumbnails load from assets/ under the page's Content-Security-Policy.
    page.wait_for_function("() => [...document.querySelectorAll('#cards img')].every(i => i.complete)")
    assert page.eval_on_selector_all("#cards img", "imgs => imgs.filter(i => i.naturalWidth === 0).length") == 0
    assert page.console_errors == []


def test_rule_filter_shows_exactly_the_figures_with_that_rule(page, audit_dir):
    out_dir, (_, _, findings, _) = audit_dir
    _open(page, out_dir, "#figures")
    page.select_option("#filters select[name=rule]", REGISTERED)
    assert set(_card_figure_ids(page)) == _figures_with_rule(findings, REGISTERED)
    assert len(_card_figure_ids(page)) == len(_figures_with_rule(findings, REGISTERED))
    assert f"rule={REGISTERED}" in page.evaluate("location.hash")
    page.select_option("#filters select[name=sev]", "info")
    expected = {f["figure_id"] for f in findings if f["rule"] == REGISTERED and f["severity"] == "info"}
    assert set(_card_figure_ids(page)) == expected
    page.click("#clear-filters")
    assert page.locator("#cards .card").count() == len(audit_dir[1][1])
    assert page.console_errors == []


def test_url_fragment_restores_a_filter(page, audit_dir):
    out_dir, (documents, figures, findings, _) = audit_dir
    _open(page, out_dir, "#figures?rule=pie-slice-count&type=pie")
    assert page.input_value("#filters select[name=rule]") == "pie-slice-count"
    assert page.input_value("#filters select[name=type]") == "pie"
    assert set(_card_figure_ids(page)) == _figures_with_rule(findings, "pie-slice-count")
    _open(page, out_dir, "#figures?group=department%3DGlass+Physics")
    in_group = {f["figure_id"] for f in figures if f["document_id"] in
                {d["document_id"] for d in documents if d["manifest"]["department"] == "Glass Physics"}}
    assert set(_card_figure_ids(page)) == in_group
    _open(page, out_dir, "#figures?q=invented+alloys")
    assert _card_figure_ids(page) == [f["figure_id"] for f in figures if "invented alloys" in f["caption"].lower()]
    assert page.console_errors == []


def test_hostile_strings_render_as_text_and_never_run(page, audit_dir):
    out_dir, (documents, figures, findings, _) = audit_dir
    for fragment in ("", "#figures", "#figure/fig0", "#document/doc0", "#documents", "#figures?q=%3Cimg"):
        _open(page, out_dir, fragment)
        page.wait_for_timeout(50)  # an injected onerror would fire once the broken image fails
        assert page.evaluate("typeof window.__pwned") == "undefined", fragment
    _open(page, out_dir, "#figure/fig0")
    assert page.text_content("#view-figure .caption-full") == HOSTILE_CAPTION
    assert HOSTILE_PATH in page.text_content("#figure-h")
    assert page.locator("#view-figure img[src=x]").count() == 0
    _open(page, out_dir, "#figure/fig2")
    assert page.text_content("#view-figure .caption-full") == LINE_SEPARATORS
    assert page.console_errors == []


def test_detail_outlines_regions_scaled_to_the_displayed_image(page, audit_dir):
    out_dir, (_, figures, findings, _) = audit_dir
    _open(page, out_dir, "#figure/fig0")
    page.wait_for_function("() => document.querySelector('.figure-frame img').complete")
    regions = [f for f in findings if f["figure_id"] == "fig0" and f["fx0"] is not None]
    assert page.locator(".region").count() == len(regions) == 2
    image = page.locator(".figure-frame img").bounding_box()
    first = page.locator(".region").first.bounding_box()
    figure = figures[0]
    # Figure pixels scale to the displayed image by displayed width / width_px (borders are drawn inside).
    assert first["x"] - image["x"] == pytest.approx(regions[0]["fx0"] * image["width"] / figure["width_px"], abs=1.5)
    assert first["width"] == pytest.approx((regions[0]["fx1"] - regions[0]["fx0"]) * image["width"] / figure["width_px"], abs=1.5)
    text = page.text_content("#view-figure")
    assert "Measured: 96" in text and "Threshold: 150" in text
    assert "Why it matters." in text and "Suggested fix." in text
    _open(page, out_dir, "#figure/fig3")
    assert "Not measured (2)" in page.text_content("#view-figure")
    assert page.console_errors == []


def test_keyboard_opens_a_figure_and_escape_returns(page, audit_dir):
    out_dir, _ = audit_dir
    _open(page, out_dir, "#figures?rule=" + REGISTERED)
    page.focus("#cards .card-title a")
    page.keyboard.press("Enter")
    page.wait_for_selector("#view-figure:not([hidden]) h1")
    assert page.evaluate("location.hash").startswith("#figure/")
    assert page.evaluate("document.activeElement.id") == "figure-h"
    page.keyboard.press("ArrowRight")
    page.wait_for_function("() => location.hash.includes('fig2') || location.hash.includes('fig4')")
    page.keyboard.press("Escape")
    page.wait_for_selector("#view-figures:not([hidden])")
    assert f"rule={REGISTERED}" in page.evaluate("location.hash")
    assert page.console_errors == []


_CONTRAST_SCRIPT = """
() => {
  const parse = (c) => { const m = c.match(/rgba?\\(([^)]+)\\)/); if (!m) return null;
    const p = m[1].split(/[ ,\\/]+/).filter(Boolean).map(Number); return [p[0], p[1], p[2], p.length > 3 ? p[3] : 1]; };
  // WCAG 2.x relative luminance and contrast ratio.
  const lum = ([r, g, b]) => [r, g, b].map(v => v / 255).map(v => v <= 0.04045 ? v / 12.92 : ((v + 0.055) / 1.055) ** 2.4)
    .reduce((s, v, i) => s + v * [0.2126, 0.7152, 0.0722][i], 0);
  const background = (node) => { for (let n = node; n && n.nodeType === 1; n = n.parentElement) {
      const c = parse(getComputedStyle(n).backgroundColor); if (c && c[3] > 0.5) return c; } return [255, 255, 255, 1]; };
  const failures = [];
  const walker = document.createTreeWalker(document.body, NodeFilter.SHOW_TEXT);
  for (let t = walker.nextNode(); t; t = walker.nextNode()) {
    const node = t.parentElement; if (!t.textContent.trim() || !node.getClientRects().length) continue;
    if (node.closest('[hidden], .visually-hidden, .skip, noscript')) continue;
    const style = getComputedStyle(node);
    const fg = parse(node instanceof SVGElement ? style.fill : style.color); if (!fg) continue;
    const bg = node instanceof SVGElement ? [255, 255, 255, 1] : background(node);
    const [a, b] = [lum(fg), lum(bg)].sort((x, y) => y - x);
    const ratio = (a + 0.05) / (b + 0.05);
    if (ratio < 4.5) failures.push(`${t.textContent.trim().slice(0, 30)}: ${ratio.toFixed(2)}`);
  }
  return failures;
}
"""


def test_text_contrast_at_least_4_5_to_1(page, audit_dir):
    # WCAG 2.x success criterion 1.4.3 (contrast, minimum): 4.5:1 for text.
    out_dir, _ = audit_dir
    for fragment in ("", "#figures", "#figure/fig0", "#document/doc0", "#documents", "#rules"):
        _open(page, out_dir, fragment)
        assert page.evaluate(_CONTRAST_SCRIPT) == [], fragment


def test_severity_is_shown_in_words_and_images_have_alt_text(page, audit_dir):
    out_dir, (_, _, findings, _) = audit_dir
    _open(page, out_dir, "#figures")
    badges = page.eval_on_selector_all("#cards .sev", "nodes => nodes.map(n => n.textContent.trim())")
    assert badges and all(b.split(" ", 1)[1].split()[0] in {"error", "warning", "info", "no"} for b in badges)
    alts = page.eval_on_selector_all("#cards img", "imgs => imgs.map(i => i.alt)")
    assert all(alt and "chart" in alt for alt in alts)
    assert any(REGISTERED in alt for alt in alts)


def test_document_view_draws_figure_boxes_and_findings_in_page_order(page, audit_dir):
    out_dir, (_, figures, findings, _) = audit_dir
    _open(page, out_dir, "#document/doc0")
    boxes = page.locator("#view-document .fig-box")
    assert boxes.count() == sum(f["document_id"] == "doc0" for f in figures)
    pages = page.eval_on_selector_all("#view-document .page-label", "n => n.map(x => x.textContent)")
    assert pages == ["Page 1", "Page 4", "Page 5"]
    links = page.eval_on_selector_all("#view-document a", "links => links.map(a => a.getAttribute('href'))")
    assert "letters/doc0.html" in links and "letters/doc0.md" in links
    sheet = page.locator("#view-document .page-sheet").first.bounding_box()
    assert sheet["height"] / sheet["width"] == pytest.approx(842 / 595, rel=0.02)  # A4 outline
    assert page.console_errors == []


class _QuietHandler(http.server.SimpleHTTPRequestHandler):
    def log_message(self, *args):
        pass


def test_document_view_uses_page_thumbnails_when_written(page, audit_dir):
    out_dir, _ = audit_dir
    _open(page, out_dir, "#document/doc1")
    page.wait_for_function("() => [...document.images].every(i => i.complete)")
    images = page.eval_on_selector_all("#view-document img.page-image",
                                       "imgs => imgs.map(i => [i.getAttribute('src'), i.naturalWidth])")
    assert images == [["assets/pages/doc1-p2.png", 325], ["assets/pages/doc1-p3.png", 325]]  # 420 * 612 / 792
    sheet = page.locator("#view-document .page-sheet").first.bounding_box()
    assert sheet["height"] / sheet["width"] == pytest.approx(792 / 612, rel=0.02)
    assert page.console_errors == []


def test_works_from_a_static_web_server(page, audit_dir):
    out_dir, _ = audit_dir
    handler = functools.partial(_QuietHandler, directory=str(out_dir))
    server = http.server.ThreadingHTTPServer(("127.0.0.1", 0), handler)
    thread = threading.Thread(target=server.serve_forever, daemon=True)
    thread.start()
    try:
        page.goto(f"http://127.0.0.1:{server.server_address[1]}/report.html#figures")
        page.wait_for_selector("html[data-ready=true]")
        page.wait_for_function("() => [...document.querySelectorAll('#cards img')].every(i => i.complete)")
        assert page.eval_on_selector_all("#cards img", "imgs => imgs.filter(i => i.naturalWidth === 0).length") == 0
        assert page.console_errors == []
    finally:
        server.shutdown()
        server.server_close()


def test_screenshots(page, audit_dir):
    out_dir, _ = audit_dir
    ARTIFACTS.mkdir(parents=True, exist_ok=True)
    shots = {"overview": "", "figures": "#figures", "figure-detail": "#figure/fig0", "document": "#document/doc0"}
    for name, fragment in shots.items():
        _open(page, out_dir, fragment)
        page.wait_for_function("() => [...document.images].every(i => i.complete)")
        path = ARTIFACTS / f"dashboard-{name}.png"
        page.screenshot(path=str(path), full_page=True)
        assert path.stat().st_size > 0
    assert page.console_errors == []
