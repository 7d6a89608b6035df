"""Vector charts drawn the way other producers draw them, not as matplotlib does.

Each chart is written with PyMuPDF's drawing operators (the PDF's own rectangle operator for
square markers and frames, Bezier corners for rounded bars, thin filled bars for medians,
unframed circle symbols beside a pie) and read back as extraction reads a chart. Geometry
and names are invented; the expected values follow from the drawing.
"""

from __future__ import annotations

import math

import pymupdf
import pytest

from corpusaudit.extract.vector_evidence import figure_from_chart_pdf
from corpusaudit.measure import Measurements

GREY = (0.3, 0.3, 0.3)


def _chart(draw, width: float = 300, height: float = 220) -> bytes:
    doc = pymupdf.open()
    page = doc.new_page(width=width, height=height)
    draw(page)
    return doc.tobytes()


def _axes(page, x0=40, y0=20, x1=280, y1=190):
    page.draw_line((x0, y1), (x1, y1), color=GREY, width=1)
    page.draw_line((x0, y0), (x0, y1), color=GREY, width=1)


def _measure(draw, chart_type: str, name: str):
    figure = figure_from_chart_pdf(_chart(draw), name, chart_type)
    return Measurements(figure)


def test_square_markers_drawn_as_rectangles_are_markers():
    def draw(page):
        _axes(page)
        for k in range(60):  # a dense clump: squares 4 pt wide every 1.5 pt
            x, y = 120 + 1.5 * (k % 10), 80 + 1.5 * (k // 10)
            page.draw_rect(pymupdf.Rect(x, y, x + 4, y + 4), color=None, fill=(0.2, 0.4, 0.7))
    markers = _measure(draw, "scatter", "squares").get("markers")
    assert markers.count == 60
    assert markers.hidden_share > 0.5  # each square is mostly under its neighbours


def test_an_outline_frame_is_the_plot_area():
    def draw(page):
        page.draw_rect(pymupdf.Rect(40, 20, 280, 190), color=GREY, width=1)  # frame, no axis lines
        for k, height in enumerate([60, 120, 90]):
            page.draw_rect(pymupdf.Rect(70 + 70 * k, 190 - height, 110 + 70 * k, 190), color=None, fill=(0.8, 0.4, 0.1))
    measurements = _measure(draw, "bar", "framed")
    scale = 150 / 72
    plot = measurements.get("plot_area")
    assert plot == pytest.approx((40 * scale, 20 * scale, 280 * scale, 190 * scale), abs=2.5)


def test_bars_with_rounded_corners_are_bars():
    def draw(page):
        _axes(page)
        for k, height in enumerate([60, 120, 90, 40]):
            page.draw_rect(pymupdf.Rect(60 + 55 * k, 190 - height, 95 + 55 * k, 190), color=None,
                           fill=(0.2, 0.5, 0.3), radius=0.15)
    bars = _measure(draw, "bar", "rounded").get("bars")
    assert len(bars.stacks) == 4


def test_medians_drawn_as_thin_filled_bars():
    def draw(page):
        _axes(page)
        for k, (low, median, high) in enumerate([(60, 90, 120), (100, 130, 150), (40, 70, 110)]):
            x0, x1 = 70 + 70 * k, 110 + 70 * k
            middle = (x0 + x1) / 2
            page.draw_line((middle, low - 20), (middle, low), color=GREY)  # whiskers
            page.draw_line((middle, high), (middle, high + 20), color=GREY)
            page.draw_rect(pymupdf.Rect(x0, low, x1, high), color=None, fill=(0.5, 0.6, 0.8))
            page.draw_rect(pymupdf.Rect(x0, median - 0.75, x1, median + 0.75), color=None, fill=(1, 1, 1))
    boxes = _measure(draw, "box", "medians").get("boxes")
    scale = 150 / 72
    assert [round(b.median / scale) for b in boxes] == [90, 130, 70]


def test_legend_circles_beside_a_pie_are_not_wedges():
    def draw(page):
        centre, radius = (110, 110), 80
        shares = [0.5, 0.3, 0.2]
        colours = [(0.1, 0.4, 0.7), (0.9, 0.5, 0.1), (0.2, 0.6, 0.2)]
        start = 0.0
        for share, colour in zip(shares, colours):
            end = start + 360 * share
            page.draw_sector(centre, (centre[0] + radius * math.cos(math.radians(start)),
                                      centre[1] + radius * math.sin(math.radians(start))),
                             360 * share, color=None, fill=colour, fullSector=True)
            start = end
        for k, colour in enumerate(colours):  # unframed legend symbols and their names
            page.draw_circle((230, 80 + 25 * k), 4, color=None, fill=colour)
            page.insert_text((240, 84 + 25 * k), ["Kelp", "Sand", "Rock"][k], fontsize=9)
    pie = _measure(draw, "pie", "legend-circles").get("pie")
    assert sorted(round(share, 2) for share in pie.shares) == [0.2, 0.3, 0.5]
