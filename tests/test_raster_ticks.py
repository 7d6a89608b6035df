"""Raster tick labels: their angle and their text, against figures whose geometry is known exactly.

References: matplotlib draws tick labels at the rotation it is given and places the axes at
ax.get_window_extent(); Pillow's Image.rotate turns a rendered label by the angle given
(counter-clockwise, as the Pillow documentation states). Names and numbers are invented.
"""

from __future__ import annotations

import io

import numpy as np
import pytest

from corpusaudit.checks.cases import Case, vector_figure
from corpusaudit.checks.runner import check_figure
from corpusaudit.config import build_config
from corpusaudit.measure import Measurements
from corpusaudit.measure.text import ocr_available
from corpusaudit.model import Figure

needs_ocr = pytest.mark.skipif(not ocr_available(), reason="text recognition not installed")
NAMES = ["Kalovel", "Mirebsa", "Satorul", "Quniren", "Dragopim"]
MONTHS = ["Jan", "Feb", "Mar", "Apr", "May"]
DPI = 150


def _figure(pixels: np.ndarray, chart_type: str = "bar") -> Figure:
    pixels = np.ascontiguousarray(pixels)
    return Figure(figure_id="ticks-r", document_id="test", path="ticks.png", page=1, index=0,
                  bbox=(0, 0, pixels.shape[1], pixels.shape[0]), source="raster", width_px=pixels.shape[1],
                  height_px=pixels.shape[0], effective_ppi=float(DPI), pixels=pixels, chart_type=chart_type)


def _matplotlib(draw, style: str = "default", size=(5.5, 4.2)) -> tuple[Figure, tuple[float, float, float, float]]:
    """A chart rendered to pixels, undegraded, with the axes rectangle matplotlib placed (pixels)."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.style
    from matplotlib.figure import Figure as MplFigure
    from PIL import Image

    with matplotlib.style.context(style):
        fig = MplFigure(figsize=size, dpi=DPI)
        ax = draw(fig)
        buffer = io.BytesIO()
        fig.savefig(buffer, format="png", dpi=DPI)
        extent = ax.get_window_extent()
        height = fig.get_size_inches()[1] * DPI
    pixels = np.asarray(Image.open(buffer).convert("RGB"))
    return _figure(pixels), (extent.x0, height - extent.y1, extent.x1, height - extent.y0)


def _bars(values, labels, rotation=0.0, horizontal=False, low=None, label_rotation=None):
    def draw(fig):
        ax = fig.add_subplot()
        if horizontal:
            ax.barh(range(len(values)), values, tick_label=labels, color="C0")
            ax.invert_yaxis()
            if label_rotation:
                for label in ax.get_yticklabels():
                    label.set_rotation(label_rotation)
                    label.set_va("center")
        else:
            ax.bar(range(len(values)), values, tick_label=labels, color="C0")
            for label in ax.get_xticklabels():
                label.set_rotation(rotation)
                label.set_ha("right" if 0 < rotation < 90 else "center")
        if low is not None:
            ax.set_ylim(low, 100)
        fig.subplots_adjust(bottom=0.3, left=0.22)  # room for the rotated labels: none cut off
        return ax
    return draw


def _found(figure):
    results, unmeasured = check_figure(figure, build_config({}), Measurements(figure), strict=True)
    return {r.rule for r in results}, set(unmeasured)


@pytest.mark.parametrize("angle", [0, 30, 45, 60, 90])
def test_matplotlib_label_angle_is_measured_to_a_degree(angle):
    figure, _ = _matplotlib(_bars([30, 80, 50, 60, 40], NAMES, rotation=angle))
    measured = Measurements(figure).get("tick_label_angle")
    assert measured.angle == pytest.approx(angle, abs=1.0)
    assert measured.count == len(NAMES)


def _pillow_labels(angle: float, words=NAMES) -> Figure:
    """An axis frame drawn with Pillow and labels rendered upright, then turned by Image.rotate."""
    from matplotlib import font_manager
    from PIL import Image, ImageDraw, ImageFont

    font = ImageFont.truetype(font_manager.findfont("DejaVu Sans"), 20)
    image = Image.new("RGB", (900, 620), "white")
    pen = ImageDraw.Draw(image)
    pen.line([(100, 40), (100, 360), (860, 360)], fill="black", width=2)
    for index, word in enumerate(words):
        x = 170 + 150 * index
        pen.line([(x, 360), (x, 368)], fill="black", width=2)
        left, top, right, bottom = font.getbbox(word)
        label = Image.new("L", (right + 8, bottom + 8), 0)
        ImageDraw.Draw(label).text((4, 4), word, font=font, fill=255)
        turned = label.rotate(angle, expand=True, resample=Image.BICUBIC)
        # the label's end nearest the axis sits at its tick, as a right-aligned rotated label does
        position = (x - turned.width + 4, 376) if angle else (x - turned.width // 2, 376)
        image.paste(Image.new("RGB", turned.size, "black"), position, turned)
    return _figure(np.asarray(image))


@pytest.mark.parametrize("angle", [0, 45, 90])
def test_pillow_label_angle_is_measured_to_a_degree(angle):
    measured = Measurements(_pillow_labels(angle)).get("tick_label_angle")
    assert measured.angle == pytest.approx(angle, abs=1.0)


def test_descenders_do_not_tilt_the_measured_angle():
    # short words with one descender (p, y, g) at their end: a fitted rectangle tilts on it
    measured = Measurements(_pillow_labels(30, ["Amy", "Bog", "Kap", "Ray", "Tug"])).get("tick_label_angle")
    assert measured.angle == pytest.approx(30, abs=1.0)


def test_single_glyph_labels_upright_read_as_unrotated():
    measured = Measurements(_pillow_labels(0, ["A", "B", "C", "D", "E"])).get("tick_label_angle")
    assert measured.angle == 0.0


@pytest.mark.parametrize("rotation, flagged", [(45, True), (0, False)])
def test_rotation_rule_on_raster(rotation, flagged):
    found, unmeasured = _found(_matplotlib(_bars([30, 80, 50, 60, 40], NAMES, rotation=rotation))[0])
    assert "tick-label-rotation" not in unmeasured
    assert ("tick-label-rotation" in found) is flagged


@pytest.mark.parametrize("source", ["raster", "vector"])
@pytest.mark.parametrize("label_rotation, flagged", [(90, True), (None, False)])
def test_rotation_rule_reads_the_category_labels_of_horizontal_bars(label_rotation, flagged, source):
    draw = _bars([30, 80, 50], ["Kalo", "Mire", "Sato"], horizontal=True, label_rotation=label_rotation)
    if source == "raster":
        figure = _matplotlib(draw, size=(5.5, 5.0))[0]
    else:
        figure = vector_figure(Case("ticks", "bar", draw, {}, size=(5.5, 5.0)))
    found, unmeasured = _found(figure)
    assert "tick-label-rotation" not in unmeasured
    assert ("tick-label-rotation" in found) is flagged


@needs_ocr
@pytest.mark.parametrize("rotation", [45, 90])
def test_rotated_labels_are_read_turned_to_their_angle(rotation):
    figure, _ = _matplotlib(_bars([30, 80, 50, 60, 40], NAMES, rotation=rotation))
    texts = [tick.text for tick in Measurements(figure).get("x_label_texts")]
    assert texts == NAMES


@needs_ocr
@pytest.mark.parametrize("labels, flagged", [(NAMES, True), (MONTHS, False)])
def test_bar_order_on_rotated_raster_labels(labels, flagged):
    # values out of order: unsorted names are a finding, months keep their own order
    found, unmeasured = _found(_matplotlib(_bars([30, 80, 50, 60, 40], labels, rotation=45))[0])
    assert "bar-order" not in unmeasured
    assert ("bar-order" in found) is flagged


@needs_ocr
def test_labels_cut_off_by_the_image_edge_are_not_trusted():
    def draw(fig):  # long rotated labels with no room below the axes: matplotlib cuts them off
        ax = fig.add_subplot()
        ax.bar(range(4), [30, 80, 50, 60], tick_label=MONTHS[:4], color="C0")
        for label in ax.get_xticklabels():
            label.set_rotation(90)
        fig.subplots_adjust(bottom=0.03)
        return ax
    figure, _ = _matplotlib(draw)
    blobs = Measurements(figure).get("label_blobs")["x"]
    assert blobs and all(blob.clipped for blob in blobs)
    found, unmeasured = _found(figure)
    assert "bar-order" in unmeasured and "bar-order" not in found


@pytest.mark.parametrize("style", ["ggplot", "seaborn-v0_8-darkgrid"])
def test_filled_panel_is_the_plot_area(style):
    figure, expected = _matplotlib(_bars([50, 70, 90, 65], NAMES[:4], low=40), style=style)
    assert Measurements(figure).get("plot_area") == pytest.approx(expected, abs=2.0)


@needs_ocr
@pytest.mark.parametrize("low, flagged", [(40, True), (None, False)])
def test_baseline_rule_on_a_filled_panel(low, flagged):
    # bars of 50..90 on an axis from 40 to 100 (truncated) or from 0 (matplotlib's default)
    found, unmeasured = _found(_matplotlib(_bars([50, 70, 90, 65], NAMES[:4], low=low), style="ggplot")[0])
    assert "bar-baseline" not in unmeasured
    assert ("bar-baseline" in found) is flagged
