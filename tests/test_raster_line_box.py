"""Raster measurements of line, area, box and 3D charts against charts drawn with known
geometry (matplotlib draws the given series, medians and aspect exactly), plus the
compositing arithmetic of translucent areas.

References: the alpha compositing 'over' operator, C = alpha * L + (1 - alpha) * B
(Porter and Duff, 1984, from memory); a pie drawn with ax.set_aspect(a) is an ellipse
whose minor/major axis ratio is a.
"""

from __future__ import annotations

import numpy as np
import pytest

from corpusaudit.checks.cases import Case, raster_figure
from corpusaudit.measure import Measurements
from corpusaudit.measure.depth import _pie_outline
from corpusaudit.measure.lines import _between, _is_blend


def _measure(draw, chart_type):
    return Measurements(raster_figure(Case("known", chart_type, draw, {})))


def _lines(count, markers=False):
    def draw(fig):
        ax = fig.add_subplot()
        x = np.arange(8.0)
        for k in range(count):
            ax.plot(x, 2.5 * k + np.sin(x + k), color=f"C{k}", marker="o" if markers else None)
    return draw


@pytest.mark.parametrize("count", [1, 3, 6, 8])
def test_series_are_counted_by_colour(count):
    # tab10 holds a grey (C7): grey series count too, grid lines do not
    assert len(_measure(_lines(count), "line").get("line_series")) == count


@pytest.mark.parametrize("style, count", [("tableau-colorblind10", 9), ("bmh", 7), ("classic", 4)])
def test_light_series_and_grids_of_other_styles(style, count):
    # matplotlib's style sheets as reference palettes: tableau-colorblind10 draws light blue,
    # light orange and four greys that are blends of one another and the panel; bmh draws
    # dashed grey grid lines on a grey panel, classic dotted black ones
    def draw(fig):
        ax = fig.add_subplot()
        x = np.arange(8.0)
        for k in range(count):
            ax.plot(x, 2.5 * k + np.sin(x + k), color=f"C{k}")
        ax.grid(True)
    case = Case("known", "line", draw, {}, style=style)
    assert len(Measurements(raster_figure(case)).get("line_series")) == count


def test_a_nearly_level_line_is_not_a_grid_line():
    # a line rising 2 % of the plot height across the whole width fills its neighbouring
    # rows as much as its own; the grid lines beside it fill one row each
    def draw(fig):
        ax = fig.add_subplot()
        x = np.arange(8.0)
        ax.plot(x, 0.02 * x, color="C1")
        ax.plot(x, 0.5 + 0.1 * np.sin(x), color="C0")
        ax.set_ylim(-0.5, 1.0)
        ax.grid(True)
    colours = {s.colour for s in _measure(draw, "line").get("line_series")}
    assert len(colours) == 2


def test_markers_give_the_sample_positions():
    series = _measure(_lines(2, markers=True), "line").get("line_series")
    assert len(series) == 2 and all(s.has_markers for s in series)
    assert all(len(s.points) >= 7 for s in series)
    plain = _measure(_lines(2), "line").get("line_series")
    assert not any(s.has_markers for s in plain)


@pytest.mark.xfail(strict=True, reason="one orange marker of eight (x=3) is missed since the cases use constrained "
                                       "layout; a plain colour mask finds it, so the loss is in the series' masks")
def test_every_marker_gives_its_sample_position():
    series = _measure(_lines(2, markers=True), "line").get("line_series")
    assert all(len(s.points) == 8 for s in series)


def _boxes(medians, filled=False):
    def draw(fig):
        ax = fig.add_subplot()
        rng = np.random.default_rng(2)
        ax.boxplot([m + rng.normal(0, 2, 80) for m in medians], patch_artist=filled)
    return draw


@pytest.mark.parametrize("filled", [False, True])
def test_box_medians_follow_the_data(filled):
    medians = [30, 10, 20, 40]
    boxes = _measure(_boxes(medians, filled), "box").get("boxes")
    assert len(boxes) == 4
    # y pixels grow downwards: the order of the medians is reversed
    assert np.argsort([-b.median for b in boxes]).tolist() == np.argsort(medians).tolist()


@pytest.mark.parametrize("aspect", [0.4, 0.6, 1.0])
def test_pie_outline_aspect(aspect):
    def draw(fig):
        ax = fig.add_subplot()
        ax.pie([4, 3, 2, 1], wedgeprops={"edgecolor": "white", "linewidth": 1.5}, labels=list("ABCD"))
        ax.set_aspect(aspect)
    measured, _ = _pie_outline(raster_figure(Case("known", "pie", draw, {})).pixels)
    assert measured == pytest.approx(aspect, abs=0.03)


def test_flat_bars_have_no_slanted_faces_and_3d_bars_do():
    def flat(fig):
        ax = fig.add_subplot()
        ax.bar(["Kalo", "Mireb", "Sator"], [3, 5, 4])
        ax.grid(True, linestyle="--")

    def extruded(fig):
        ax = fig.add_subplot(projection="3d")
        ax.bar3d(np.arange(4), np.zeros(4), np.zeros(4), 0.6, 0.6, [3, 5, 2, 4], color="C2")

    assert _measure(flat, "bar").get("perspective").slanted_faces == 0
    assert _measure(extruded, "bar").get("perspective").slanted_faces >= 3


def test_translucent_blend_arithmetic():
    white = np.array([255.0, 255.0, 255.0])
    orange, blue = np.array([255.0, 127.0, 14.0]), np.array([31.0, 119.0, 180.0])
    alpha = 0.35
    seen_alone = alpha * blue + (1 - alpha) * white
    under_orange = alpha * orange + (1 - alpha) * seen_alone  # Porter-Duff 'over'
    assert _is_blend(under_orange, seen_alone, [], white)
    # two opaque, distinct bands stacked on one another are not a blend
    assert not _is_blend(blue, orange, [], white)
    # an anti-aliased edge pixel lies between its line's colour and the panel
    assert _between(0.5 * blue + 0.5 * white, blue, white)
    assert not _between(orange, blue, white)


def test_a_median_in_the_page_colour_splits_no_box():
    # Drawn with Pillow as some libraries draw box plots: the median a white bar across a filled
    # box, so the box's ink is two halves. Geometry invented; medians at rows 120, 150, 90.
    from PIL import Image, ImageDraw

    from corpusaudit.model import Figure

    image = Image.new("RGB", (420, 300), "white")
    draw = ImageDraw.Draw(image)
    draw.line((40, 20, 40, 260), fill=(60, 60, 60), width=2)
    draw.line((40, 260, 400, 260), fill=(60, 60, 60), width=2)
    for k, (q3, median, q1) in enumerate([(90, 120, 160), (120, 150, 190), (60, 90, 130)]):
        x0 = 80 + 110 * k
        middle = x0 + 25
        draw.line((middle, q3 - 30, middle, q1 + 30), fill=(60, 60, 60), width=2)  # whiskers
        draw.rectangle((x0, q3, x0 + 50, q1), fill=(76, 120, 168))
        draw.rectangle((x0, median - 1, x0 + 50, median + 1), fill="white")
    rgb = np.asarray(image).copy()
    figure = Figure(figure_id="split-boxes", document_id="d", path="boxes.png", page=1, index=0,
                    bbox=(0, 0, 420, 300), source="raster", width_px=420, height_px=300, pixels=rgb,
                    chart_type="box")
    boxes = Measurements(figure).get("boxes")
    assert [round(b.median) for b in boxes] == [120, 150, 90]
