"""Chart measurements against figures whose geometry is known exactly.

Reference: matplotlib draws the given shares, bar heights, axis limits and label
rotations exactly; the measurements must read them back from the PDF (vector) and from
the rendered pixels (raster).
"""

from __future__ import annotations

import numpy as np
import pytest

from corpusaudit.checks.cases import Case, raster_figure, vector_figure
from corpusaudit.measure import Measurements
from corpusaudit.measure.axes import natural_order
from corpusaudit.measure.text import ocr_available, parse_number, parse_percentage

needs_ocr = pytest.mark.skipif(not ocr_available(), reason="tesseract-ocr not installed")
SHARES = [0.4, 0.25, 0.2, 0.1, 0.05]
HEIGHTS = [50.0, 70.0, 90.0, 65.0]


def _pie(fig):
    fig.add_subplot().pie(SHARES)


def _bars(colour):
    def draw(fig):
        ax = fig.add_subplot()
        ax.bar(["Kalo", "Mireb", "Sator", "Quni"], HEIGHTS, color=colour)
        ax.set_ylim(40, 100)
    return draw


def _rotated(angle):
    def draw(fig):
        ax = fig.add_subplot()
        ax.bar(["Kalo", "Mireb", "Sator"], [3, 5, 4])
        for label in ax.get_xticklabels():
            label.set_rotation(angle)
    return draw


def _figure(draw, source, chart_type):
    case = Case("known", chart_type, draw, {})
    return vector_figure(case) if source == "vector" else raster_figure(case)


@pytest.mark.parametrize("source, tolerance", [("vector", 0.005), ("raster", 0.01)])
def test_pie_shares_match_the_drawn_data(source, tolerance):
    pie = Measurements(_figure(_pie, source, "pie")).get("pie")
    assert len(pie.slices) == 5
    # counter-clockwise from 3 o'clock, as matplotlib draws them: the same order as the data
    start = int(np.argmax(pie.shares))
    ordered = pie.shares[start:] + pie.shares[:start]
    assert np.allclose(ordered, SHARES, atol=tolerance)


# Grey bars: matplotlib draws each bar from zero and clips it at 40, so the bar's own path
# reaches over the tick labels below the axis; only the clipped part is painted, and a grey
# box over text must not be taken for a legend frame.
@pytest.mark.parametrize("colour", ["C2", "0.5"])
@pytest.mark.parametrize("source", ["vector", pytest.param("raster", marks=needs_ocr)])
def test_value_axis_range_is_extrapolated_from_tick_labels(source, colour):
    measurements = Measurements(_figure(_bars(colour), source, "bar"))
    low, high = measurements.get("axes").y.value_range
    assert low == pytest.approx(40, abs=0.5) and high == pytest.approx(100, abs=0.5)
    chart = measurements.get("bars")
    assert chart.orientation == "vertical" and len(chart.stacks) == 4
    axis = measurements.get("axes").y
    tops = [axis.value_at(stack.end) for stack in chart.stacks]
    assert np.allclose(tops, HEIGHTS, atol=0.6)


@pytest.mark.parametrize("source, tolerance", [("vector", 0.01), ("raster", 8.0)])
@pytest.mark.parametrize("angle", [0, 45, 90])
def test_label_angle(source, tolerance, angle):
    measured = Measurements(_figure(_rotated(angle), source, "bar")).get("tick_label_angle")
    assert measured.angle == pytest.approx(angle, abs=tolerance)


def test_number_parsing():
    # matplotlib writes negative ticks with U+2212 MINUS SIGN (Unicode standard)
    assert parse_number("\u221220") == -20
    assert parse_number("1,000") == 1000
    assert parse_number("2.5k") == 2500
    assert parse_number("Kalo") is None
    assert parse_percentage("Alpha 12.5%") == 12.5


def test_natural_order():
    assert natural_order(["Jan", "Feb", "Mar"]) == "ordinal"
    assert natural_order(["Q1", "Q2", "Q3"]) == "ordinal"
    assert natural_order(["Apple", "Kiwi", "Pear"]) == "alphabetical"
    assert natural_order(["Kiwi", "Apple", "Pear"]) is None


def _pie_labelled_beside(fig):
    # Long names with their percentages, placed beside the slices by matplotlib: the labels'
    # centres lie well outside the pie, their near ends do not. They add up to 104.
    labels = ["Word of mouth 42%", "Harbour website 26%", "Social media 18%", "Posters 12%", "Radio 6%"]
    fig.add_subplot().pie([42, 26, 18, 12, 6], labels=labels)


def _pie_with_value_legend(fig):
    # The values only in a legend at the figure's right edge, far from the pie.
    ax = fig.add_axes((0.02, 0.1, 0.5, 0.8))
    wedges, _ = ax.pie([42, 26, 18, 12, 6])
    fig.legend(wedges, ["Alder 42%", "Birch 26%", "Cedar 18%", "Dogwood 12%", "Elm 6%"], loc="center right")


@pytest.mark.parametrize("draw", [_pie_labelled_beside, _pie_with_value_legend])
def test_vector_pie_labels_beside_or_in_a_legend_are_summed(draw):
    figure = vector_figure(Case("pie-labels", "pie", draw, {}))
    total = Measurements(figure).get("pie_label_total")
    assert (total.total, total.labelled, total.estimated) == (pytest.approx(104.0), 5, 0)


def _filled_boxes(fig):
    # Filled, outlined boxes: PDF output may paint the fill and the outline as two paths.
    rng = np.random.default_rng(5)
    samples = [rng.normal(centre, 4.0, 40) for centre in (30, 20, 40, 25)]
    fig.add_subplot().boxplot(samples, tick_labels=["Wrenfold", "Tansy", "Oxley", "Marram"], patch_artist=True,
                              boxprops={"facecolor": "#DCE9F5", "edgecolor": "#333333"})


def test_each_vector_box_is_found_once():
    boxes = Measurements(_figure(_filled_boxes, "vector", "box")).get("boxes")
    assert len(boxes) == 4
