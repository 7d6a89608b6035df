"""Horizontal box plots (boxes along the y axis, groups named beside it): found on vector and
raster figures, medians in order, and the box-order rule read against the y axis labels.

References: matplotlib draws ax.boxplot(..., orientation="horizontal") with each box's median
line at the median of its sample (numpy.median) and the first sample at y = 1, the bottom of the
axes (matplotlib's boxplot documentation); its data-to-pixel mapping is the axes transform
ax.transData, a linear map on linear axes. Group names and readings are invented.
"""

from __future__ import annotations

import numpy as np
import pytest

from corpusaudit.checks.cases import Case, raster_figure, vector_figure
from corpusaudit.checks.runner import check_figure
from corpusaudit.config import build_config
from corpusaudit.measure import Measurements
from corpusaudit.measure.text import ocr_available
from corpusaudit.model import Figure

needs_ocr = pytest.mark.skipif(not ocr_available(), reason="text recognition not installed")
GROUPS = ["Tarn Ward", "Oskel Ward", "Brime Ward", "Velop Ward"]
MEDIANS = [30.0, 10.0, 20.0, 40.0]  # out of order


def _samples(medians):
    rng = np.random.default_rng(11)
    return [m + rng.normal(0, 2, 60) for m in medians]


def _horizontal(medians, labels=None, filled=False):
    def draw(fig):
        ax = fig.add_subplot()
        ax.boxplot(_samples(medians), orientation="horizontal", patch_artist=filled, showfliers=False)
        if labels is not None:
            ax.set_yticks(range(1, len(labels) + 1), labels)
    return draw


def _figure(draw, source: str) -> Figure:
    case = Case("horizontal-boxes", "box", draw, {}, size=(5.5, 4.0))
    return vector_figure(case) if source == "vector" else raster_figure(case)


def _found(figure: Figure):
    results, unmeasured = check_figure(figure, build_config({}), Measurements(figure), strict=True)
    return {r.rule for r in results}, set(unmeasured)


@pytest.mark.parametrize("source, filled", [("vector", False), ("vector", True), ("raster", False), ("raster", True)])
def test_horizontal_boxes_are_found_with_their_medians(source, filled):
    boxes = Measurements(_figure(_horizontal(MEDIANS, filled=filled), source)).get("boxes")
    assert len(boxes) == len(MEDIANS)
    assert all(box.orientation == "horizontal" for box in boxes)
    # boxes come top to bottom; matplotlib puts the first sample at the bottom
    drawn = [float(np.median(s)) for s in _samples(MEDIANS)][::-1]
    pixels = np.array([box.median for box in boxes])
    # the median lines lie on one linear map from value to pixel (ax.transData), growing rightwards
    slope, intercept = np.polyfit(drawn, pixels, 1)
    assert slope > 0
    assert np.abs(slope * np.array(drawn) + intercept - pixels).max() <= 2.0  # within two pixels
    # each box holds its median line and its centre
    assert all(box.bbox[0] < box.median < box.bbox[2] and box.bbox[1] < box.position < box.bbox[3] for box in boxes)


@pytest.mark.parametrize("source", ["vector", "raster"])
def test_vertical_boxes_stay_vertical(source):
    def draw(fig):
        fig.add_subplot().boxplot(_samples(MEDIANS), showfliers=False)
    boxes = Measurements(_figure(draw, source)).get("boxes")
    assert len(boxes) == len(MEDIANS) and all(box.orientation == "vertical" for box in boxes)


def _box_order(draw, source):
    found, unmeasured = _found(_figure(draw, source))
    assert "box-order" not in unmeasured
    return "box-order" in found


@pytest.mark.parametrize("source", ["vector", pytest.param("raster", marks=needs_ocr)])
def test_box_order_reads_the_group_names_beside_the_y_axis(source):
    # unordered names with unsorted medians: a finding
    assert _box_order(_horizontal(MEDIANS, GROUPS), source)


@pytest.mark.parametrize("source", ["vector", pytest.param("raster", marks=needs_ocr)])
def test_box_order_keeps_a_natural_order_of_horizontal_groups(source):
    # groups named in their own order (Wave 1..4) keep it, medians unsorted or not
    assert not _box_order(_horizontal(MEDIANS, [f"Wave {k}" for k in range(1, 5)]), source)


@pytest.mark.parametrize("source", ["vector", "raster"])
def test_sorted_horizontal_boxes_are_no_finding(source):
    # sorted by median: passes without reading a label
    assert not _box_order(_horizontal(sorted(MEDIANS), GROUPS), source)


def test_filled_horizontal_boxes_cut_by_a_median_in_the_page_colour():
    # Drawn with Pillow as some libraries draw box plots (filled boxes, the median a white bar
    # across the box, whiskers from the middle of the ends), turned to run along the y axis.
    # Geometry invented; medians at columns 150, 220, 120.
    from PIL import Image, ImageDraw

    image = Image.new("RGB", (420, 320), "white")
    pen = ImageDraw.Draw(image)
    pen.line([(40, 20), (40, 290), (400, 290)], fill="black", width=2)
    for centre, (low, median, high) in zip((70, 150, 230), ((110, 150, 190), (180, 220, 270), (90, 120, 160))):
        pen.line([(low - 40, centre), (high + 40, centre)], fill="black", width=1)  # whiskers
        pen.rectangle([low, centre - 18, high, centre + 18], fill=(76, 120, 168))
        pen.rectangle([median - 1, centre - 18, median + 1, centre + 18], fill="white")
    pixels = np.asarray(image)
    figure = Figure(figure_id="split-hboxes", document_id="d", path="boxes.png", page=1, index=0,
                    bbox=(0, 0, 420, 320), source="raster", width_px=420, height_px=320, pixels=pixels,
                    chart_type="box")
    boxes = Measurements(figure).get("boxes")
    assert [b.orientation for b in boxes] == ["horizontal"] * 3
    assert [round(b.median) for b in boxes] == [150, 220, 120]
    assert [round(b.position) for b in boxes] == pytest.approx([70, 150, 230], abs=1)
