"""raster-resolution, raster-compression and caption-missing on generated charts and PDFs.

References: effective ppi thresholds 150 / 300 are common practice for print; JPEG codes
8x8 blocks (ITU-T T.81), encoded here with OpenCV's libjpeg at chosen qualities against
lossless PNG; photographs are synthetic continuous-tone images (benchmarks.colour_cases).
"""

from __future__ import annotations

import numpy as np
import pymupdf
import pytest

from benchmarks.colour_cases import ColourCase, jpeg_roundtrip, photo_pixels, raster_figure, render, vector_figure
from corpusaudit.extract import ExtractConfig, extract_document
from corpusaudit.model import Document, Figure
from tests.conftest import pdf_with_rasters, run_rule


def run(figure, rule: str, data: dict | None = None):
    """(severity, value, threshold) of the rule's findings, and whether it was unmeasured."""
    results, unmeasured = run_rule(figure, rule, data)
    return [(r.severity, r.draft.value, r.draft.threshold) for r in results], unmeasured


def chart_case() -> ColourCase:
    def draw(fig):
        ax = fig.add_subplot()
        ax.bar(["Kalo", "Mitor", "Velqu", "Sanib"], [3, 5, 2, 4], color="#3b6ea5")
        ax.plot([-0.4, 3.4], [4.5, 4.5], color="#c0392b", linewidth=1)
        ax.set_title("Harvest per plot")

    return ColourCase("chart", "bar", draw, {})


CHART = chart_case()


# ------------------------------------------------------------------ raster-resolution


@pytest.mark.parametrize("ppi, expected", [
    (100, [("warning", "100", "150")]),
    (200, [("info", "200", "300")]),
    (300, []),
])
def test_resolution_of_a_raster_chart(ppi, expected):
    figure = raster_figure(CHART, ppi=ppi)
    assert figure.bbox[2] == pytest.approx(figure.width_px * 72 / ppi)  # the fixture is consistent
    assert run(figure, "raster-resolution") == (expected, False)


def test_resolution_does_not_judge_vector_figures_or_image_files():
    assert run(vector_figure(CHART), "raster-resolution") == ([], False)
    assert run(raster_figure(CHART, source="image"), "raster-resolution") == ([], False)


def test_resolution_config():
    figure = raster_figure(CHART, ppi=200)
    assert run(figure, "raster-resolution", {"rules": {"raster-resolution": {"info_below_ppi": 200}}})[0] == []
    assert run(figure, "raster-resolution", {"rules": {"raster-resolution": {"warn_below_ppi": 250}}})[0] == \
        [("warning", "200", "250")]


# ------------------------------------------------------------------ raster-compression


@pytest.mark.parametrize("source", ["raster", "image"])
def test_jpeg_line_art_gets_a_note(source):
    findings, unmeasured = run(raster_figure(CHART, ppi=150, jpeg_quality=50, source=source), "raster-compression")
    assert not unmeasured and len(findings) == 1 and findings[0][0] == "info"


@pytest.mark.parametrize("source", ["raster", "image"])
def test_png_line_art_passes(source):
    assert run(raster_figure(CHART, ppi=150, source=source), "raster-compression") == ([], False)


def photo_figure(quality: int) -> Figure:
    pixels = jpeg_roundtrip(photo_pixels(np.random.default_rng(3)), quality)
    return Figure(figure_id="photo", document_id="d", path="p.pdf", page=1, index=0, bbox=(0, 0, 288, 201.6),
                  source="raster", width_px=pixels.shape[1], height_px=pixels.shape[0], effective_ppi=150,
                  pixels=pixels, native_pixels=pixels, image_info={"filter": "DCTDecode"}, chart_type="not_chart")


@pytest.mark.parametrize("quality", [30, 60, 90])
def test_photographs_are_never_flagged(quality):
    assert run(photo_figure(quality), "raster-compression") == ([], False)


def test_compression_without_own_pixels():
    figure = raster_figure(CHART, ppi=150, jpeg_quality=50)
    figure.native_pixels = None
    # Declared JPEG: ringing is still read in the rendered pixels.
    assert run(figure, "raster-compression")[0]
    figure.image_info = {"filter": "FlateDecode"}
    assert run(figure, "raster-compression") == ([], False)
    figure.image_info = {}
    assert run(figure, "raster-compression") == ([], True)
    assert run(vector_figure(CHART), "raster-compression") == ([], False)  # not a raster: not judged


def test_compression_config():
    figure = raster_figure(CHART, ppi=150, jpeg_quality=50)
    lenient = {"rules": {"raster-compression": {"ringing_limit": 50.0}}}
    assert run(figure, "raster-compression", lenient)[0] == []
    # Calling everything a photograph turns the rule off for this chart as well.
    assert run(figure, "raster-compression", {"rules": {"raster-compression": {"line_art_threshold": 1.0}}})[0] == []


# ------------------------------------------------------------------ caption-missing


def _extract(path):
    doc = Document(document_id="d", path=str(path), sha256="", bytes=0, kind="pdf", local_path=str(path))
    return extract_document(doc, ExtractConfig()).figures


@pytest.mark.parametrize("caption", [True, False])
def test_caption_of_extracted_raster_figures(tmp_path, caption):
    figures = _extract(pdf_with_rasters(tmp_path / "r.pdf", [300], caption=caption))
    assert len(figures) == 1 and figures[0].source == "raster"
    findings, unmeasured = run(figures[0], "caption-missing")
    assert not unmeasured and findings == ([] if caption else [("info", "", "a caption")])


@pytest.mark.parametrize("caption", [True, False])
def test_caption_of_extracted_vector_figures(tmp_path, caption):
    source = pymupdf.open("pdf", render(CHART, "pdf", 72))
    doc = pymupdf.open()
    page = doc.new_page(width=612, height=792)
    rect = pymupdf.Rect(72, 72, 72 + source[0].rect.width, 72 + source[0].rect.height)
    page.show_pdf_page(rect, source, 0)
    page.insert_text((72, rect.y1 + 60), "Body text of an invented report on plot yields.", fontsize=10)
    if caption:
        page.insert_text((72, rect.y1 + 16), "Figure 1. Harvest per plot in the invented trial.", fontsize=10)
    path = tmp_path / "v.pdf"
    doc.save(path)
    figures = [f for f in _extract(path) if f.source == "vector"]
    assert len(figures) == 1
    assert run(figures[0], "caption-missing")[0] == ([] if caption else [("info", "", "a caption")])


def test_image_files_are_not_judged_for_captions():
    assert run(raster_figure(CHART, source="image"), "caption-missing") == ([], False)
