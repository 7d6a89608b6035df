"""Pie and bar measurements on pixels, against charts drawn with known geometry.

Reference: matplotlib draws the given shares, segment heights and labels exactly; the
circle fit is checked against points of a circle known analytically.
"""

from __future__ import annotations

import numpy as np
import pytest

from corpusaudit.checks.cases import Case, raster_figure, vector_figure
from corpusaudit.checks.runner import check_figure
from corpusaudit.config import build_config
from corpusaudit.measure import Measurements
from corpusaudit.measure.pie import _fit_circle
from corpusaudit.measure.text import ocr_available

needs_ocr = pytest.mark.skipif(not ocr_available(), reason="text recognition not installed")


def _pie(shares, colours=None, donut=False, labels=None, label_radius=0.62):
    def draw(fig):
        ax = fig.add_subplot()
        props = {"edgecolor": "white", "linewidth": 1.2}
        if donut:
            props["width"] = 0.45
        wedges, *_ = ax.pie(shares, colors=colours, startangle=90, counterclock=False, wedgeprops=props)
        for wedge, text in zip(wedges, labels or []):
            if text:
                angle = np.radians((wedge.theta1 + wedge.theta2) / 2)
                ax.text(label_radius * np.cos(angle), label_radius * np.sin(angle), text, ha="center", va="center",
                        fontsize=9)
    return draw


def _measure(draw, chart_type, source, style="default"):
    case = Case("fixture", chart_type, draw, {}, style=style)
    figure = vector_figure(case) if source == "vector" else raster_figure(case, np.random.default_rng(1))
    return figure, Measurements(figure)


def test_circle_fit_recovers_a_known_circle():
    # points on the circle of centre (3, -2) and radius 5 (analytic geometry)
    theta = np.linspace(0.3, 2.0, 12)
    points = np.column_stack([3 + 5 * np.cos(theta), -2 + 5 * np.sin(theta)])
    centre, radius = _fit_circle(points)
    assert centre == pytest.approx((3, -2), abs=1e-9) and radius == pytest.approx(5, abs=1e-9)


def test_raster_donut_slices_survive_labels_across_the_band():
    shares = [0.40, 0.25, 0.15, 0.12, 0.05, 0.03]
    labels = [f"{100 * s:.1f}%" for s in shares]
    _, measurements = _measure(_pie(shares, donut=True, labels=labels, label_radius=0.78), "pie", "raster")
    pie = measurements.get("pie")
    assert len(pie.slices) == len(shares)
    assert sorted(pie.shares) == pytest.approx(sorted(shares), abs=0.01)
    assert pie.hole == pytest.approx(0.55 * pie.radius, rel=0.1)  # matplotlib: width 0.45 of radius 1


def test_raster_pie_splits_same_coloured_neighbours_at_the_separator_line():
    _, measurements = _measure(_pie([0.5, 0.3, 0.2], colours=["C0", "C0", "C1"]), "pie", "raster")
    assert sorted(measurements.get("pie").shares) == pytest.approx([0.2, 0.3, 0.5], abs=0.01)


def test_raster_pie_keeps_a_thin_slice():
    shares = [0.55, 0.3, 0.14, 0.01]
    _, measurements = _measure(_pie(shares), "pie", "raster")
    assert len(measurements.get("pie").slices) == 4


@needs_ocr
def test_raster_percentages_are_read_and_summed():
    shares = [0.5, 0.3, 0.2]
    _, measurements = _measure(_pie(shares, labels=["50%", "40%", "20%"]), "pie", "raster")
    assert sorted(p.value for p in measurements.get("pie_percentages")) == [20, 40, 50]
    assert measurements.get("pie_label_total").total == pytest.approx(110)


@needs_ocr
def test_labels_run_together_are_split_into_their_percentages():
    # the labels of two slices drawn edge to edge read as one line, '20.0%40.0%'; matplotlib
    # draws the given text, so the labels are 50, 20 and 40 and add up to 110
    def draw(fig):
        ax = fig.add_subplot()
        ax.pie([0.5, 0.3, 0.2], startangle=90, counterclock=False, colors=["#f0c080", "#a0d0f0", "#c0e0a0"])
        ax.text(0.0, 0.5, "50.0%", ha="center", fontsize=9)
        ax.text(-0.2, -0.45, "20.0%", ha="right", fontsize=9)
        ax.text(-0.2, -0.45, "40.0%", ha="left", fontsize=9)
    _, measurements = _measure(draw, "pie", "raster")
    assert sorted(p.value for p in measurements.get("pie_percentages")) == [20, 40, 50]
    total = measurements.get("pie_label_total")
    assert total.total == pytest.approx(110) and total.estimated == 0


@needs_ocr
def test_dark_slices_do_not_fill_the_glyphs_of_their_labels():
    # dark text on a saturated red slice: read against the slice's own luma, '8.9%' stays
    # '8.9%' (read against white, the red around the glyphs closes the 8 and the 9)
    shares = [0.5, 0.3, 0.2]
    labels = ["50.0%", "30.0%", "8.9%"]
    _, measurements = _measure(_pie(shares, colours=["C0", "C1", "C3"], labels=labels), "pie", "raster")
    assert 8.9 in [p.value for p in measurements.get("pie_percentages")]


@pytest.mark.parametrize("source", ["vector", "raster"])
def test_a_pie_with_one_wedge_pulled_out(source):
    # matplotlib's explode= moves a wedge along its middle direction; the shares are unchanged
    shares = [0.4, 0.25, 0.15, 0.12, 0.08]
    def draw(fig):
        ax = fig.add_subplot()
        ax.pie(shares, startangle=90, counterclock=False, explode=[0, 0.15, 0, 0, 0])
    _, measurements = _measure(draw, "pie", source)
    pie = measurements.get("pie")
    assert len(pie.slices) == 5
    assert sorted(pie.shares) == pytest.approx(sorted(shares), abs=0.005)


def test_a_vector_pie_with_every_wedge_pulled_out():
    # every wedge moved by 5 % of the radius: each wedge's apex lies on its middle direction
    # from the centre the wedges would share unexploded
    shares = [0.4, 0.25, 0.15, 0.12, 0.08]
    def draw(explode):
        def drawing(fig):
            fig.add_subplot().pie(shares, startangle=90, counterclock=False, explode=explode)
        return drawing
    exploded = _measure(draw([0.05] * 5), "pie", "vector")[1].get("pie")
    whole = _measure(draw(None), "pie", "vector")[1].get("pie")
    assert sorted(exploded.shares) == pytest.approx(sorted(shares), abs=1e-3)
    assert exploded.centre == pytest.approx(whole.centre, abs=0.5)
    assert exploded.radius == pytest.approx(whole.radius, rel=0.005)


def test_a_raster_pie_with_every_wedge_pulled_out():
    # each wedge is its own piece; pushed back apex to apex they make the whole pie again
    shares = [0.4, 0.25, 0.15, 0.12, 0.08]
    def draw(fig):
        fig.add_subplot().pie(shares, startangle=90, counterclock=False, explode=[0.05] * 5)
    pie = _measure(draw, "pie", "raster")[1].get("pie")
    assert len(pie.slices) == 5
    assert sorted(pie.shares) == pytest.approx(sorted(shares), abs=0.01)


@pytest.mark.parametrize("second_label, flagged", [("40%", True), ("30%", False)])
def test_unlabelled_slices_count_by_their_drawn_share(second_label, flagged):
    # two of three slices labelled: the third (20 %) counts by its angle, so 50 + 40 + 20 = 110
    figure, measurements = _measure(_pie([0.5, 0.3, 0.2], labels=["50%", second_label, ""]), "pie", "vector")
    total = measurements.get("pie_label_total")
    assert total.estimated == 1 and total.labelled == 2
    results, _ = check_figure(figure, build_config({}), measurements, strict=True)
    assert ("pie-total" in {r.rule for r in results}) is flagged


def test_raster_stacked_segments_are_counted_under_grid_lines():
    # the bmh style draws its grid over the bars; separator lines split the segments
    def draw(fig):
        ax = fig.add_subplot()
        bottom = np.zeros(4)
        for k in range(6):
            heights = np.array([3.0, 4.0, 2.0, 5.0]) + k
            ax.bar(["Kalo", "Mireb", "Sator", "Quni"], heights, bottom=bottom, color=f"C{k}", edgecolor="white")
            bottom += heights
    _, measurements = _measure(draw, "bar", "raster", style="bmh")
    chart = measurements.get("bars")
    assert len(chart.stacks) == 4 and chart.max_segments == 6


@pytest.mark.parametrize("shares", [[0.203, 0.201, 0.275, 0.117, 0.205], [0.162, 0.3, 0.324, 0.066, 0.147]])
def test_separator_edges_smeared_by_jpeg_are_no_slices(shares):
    # Reference renderer: matplotlib, white separators 1.5 pt wide, saved as JPEG at quality 40
    # (OpenCV's encoder, 4:2:0 chroma): the separators' edges take pale colours of their own.
    import io

    import cv2
    from matplotlib.figure import Figure as PlotFigure

    from corpusaudit.model import Figure

    plot = PlotFigure(figsize=(5.3, 3.2), layout="constrained")
    plot.add_subplot().pie(shares, startangle=90, counterclock=False,
                           wedgeprops={"edgecolor": "white", "linewidth": 1.5})
    buffer = io.BytesIO()
    plot.savefig(buffer, format="png", dpi=150)
    pixels = cv2.imdecode(np.frombuffer(buffer.getvalue(), np.uint8), cv2.IMREAD_COLOR)
    _, coded = cv2.imencode(".jpg", pixels, [cv2.IMWRITE_JPEG_QUALITY, 40])
    rgb = cv2.imdecode(coded, cv2.IMREAD_COLOR)[:, :, ::-1].copy()
    figure = Figure(figure_id="pie-jpeg", document_id="d", path="pie.jpg", page=1, index=0,
                    bbox=(0, 0, rgb.shape[1], rgb.shape[0]), source="raster", width_px=rgb.shape[1],
                    height_px=rgb.shape[0], pixels=rgb, chart_type="pie")
    pie = Measurements(figure).get("pie")
    assert len(pie.slices) == 5
    assert sorted(pie.shares) == pytest.approx(sorted(shares), abs=0.01)
