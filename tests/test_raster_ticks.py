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


# ------------------------------------------------------------------ x labels one per tick (issue #5)
# matplotlib is the reference renderer: it centres level tick labels on their ticks, turns rotated ones
# by the angle given, and plots a list of strings as categories at equal spacing (its documented
# categorical axis), so the truth of each chart below is how it was drawn. Words are invented.


def _line(labels, rotation=0.0, bottom=0.3):
    def draw(fig):
        ax = fig.add_subplot()
        ax.plot(list(labels), [3, 1, 4, 1, 5, 9, 2][:len(labels)], marker="o")
        for label in ax.get_xticklabels():
            label.set_rotation(rotation)
        fig.subplots_adjust(bottom=bottom)
        return ax
    return draw


def _line_figure(draw) -> Figure:
    figure, _ = _matplotlib(draw)
    return Figure(**{**figure.__dict__, "chart_type": "line"})


@needs_ocr
@pytest.mark.parametrize("rotation", [0, 45, 90, -90])
def test_category_labels_of_a_line_are_read_at_any_rotation(rotation):
    # -90 reads down the page, 90 up it: both turns are read and the surer reading kept
    figure = _line_figure(_line(NAMES, rotation))
    axis = Measurements(figure).get("axes").x
    assert axis.labels == NAMES and not any(t.clipped for t in axis.ticks)
    found, unmeasured = _found(figure)
    assert "line-on-categories" in found and "line-on-categories" not in unmeasured


@needs_ocr
def test_month_labels_of_a_line_turned_upright_are_no_finding():
    found, unmeasured = _found(_line_figure(_line(MONTHS, 90)))
    assert "line-on-categories" not in found and "line-on-categories" not in unmeasured


@needs_ocr
@pytest.mark.parametrize("rotation", [0, 90])
@pytest.mark.parametrize("labels, flagged", [(["1", "2", "5", "10", "20"], True), (["0", "5", "10", "15", "20"], False)])
def test_uneven_numeric_labels_drawn_evenly(labels, flagged, rotation):
    # matplotlib places string labels at equal steps: 1, 2, 5, 10, 20 then step by 1..10 (ratio 10)
    figure = _line_figure(_line(labels, rotation))
    assert Measurements(figure).get("axes").x.labels == labels
    found, unmeasured = _found(figure)
    assert "line-uneven-axis" not in unmeasured
    assert ("line-uneven-axis" in found) is flagged


def test_single_glyph_labels_do_not_turn_a_level_row():
    # three one-digit labels are taller than wide; the two-digit ones show the row is level
    figure = _line_figure(_line(["1", "2", "5", "10", "20"]))
    assert Measurements(figure).get("tick_label_angle").angle == pytest.approx(0.0, abs=1.0)


@needs_ocr
@pytest.mark.parametrize("rotation", [90, -90])
def test_bar_order_reads_upright_labels_either_way(rotation):
    figure, _ = _matplotlib(_bars([30, 80, 50, 60, 40], NAMES, rotation=rotation))
    assert [t.text for t in Measurements(figure).get("x_label_texts")] == NAMES
    found, unmeasured = _found(figure)
    assert "bar-order" in found and "bar-order" not in unmeasured


def _level_labels(words, centres, ticks) -> Figure:
    """An axis frame drawn with Pillow: tick marks at `ticks`, level labels centred at `centres`."""
    from matplotlib import font_manager
    from PIL import Image, ImageDraw, ImageFont

    font = ImageFont.truetype(font_manager.findfont("DejaVu Sans"), 20)
    image = Image.new("RGB", (int(max(centres + ticks)) + 220, 460), "white")
    pen = ImageDraw.Draw(image)
    pen.line([(100, 40), (100, 360), (image.width - 60, 360)], fill="black", width=2)
    for tick in ticks:
        pen.line([(tick, 360), (tick, 367)], fill="black", width=2)
    for centre, word in zip(centres, words):
        left, _, right, _ = font.getbbox(word)
        pen.text((centre - (right - left) / 2 - left, 374), word, font=font, fill="black")
    return _figure(np.asarray(image))


def _touching_labels(words, gap: int = 3) -> tuple[Figure, list[int]]:
    """Level labels each centred on its tick mark, neighbours `gap` pixels apart: closer than the
    space that separates labels' blobs, so they are found as one."""
    from matplotlib import font_manager
    from PIL import ImageFont

    font = ImageFont.truetype(font_manager.findfont("DejaVu Sans"), 20)
    widths = [font.getbbox(word)[2] - font.getbbox(word)[0] for word in words]
    centres, x = [], 140.0
    for index, width in enumerate(widths):
        x += width / 2 if index == 0 else (widths[index - 1] + width) / 2 + gap
        centres.append(int(round(x)))
    return _level_labels(words, centres, centres), centres


@needs_ocr
def test_labels_touching_their_neighbours_are_cut_at_their_ticks():
    words = ["Kalo", "Mirebsa", "Tor", "Quniren"]
    figure, centres = _touching_labels(words)
    measurements = Measurements(figure)
    assert len(measurements.get("label_blobs")["x"]) < len(words)  # found joined
    assert measurements.get("tick_marks")["x"] == pytest.approx(centres, abs=1.5)
    assert [t.text for t in measurements.get("x_label_texts")] == words


def test_a_label_running_past_the_image_edge_is_cut_off_and_one_clear_of_it_is_not():
    def draw(fig):  # upright labels hang down from their ticks; only the long one reaches the bottom
        ax = fig.add_subplot()
        ax.bar(range(3), [3, 8, 5], tick_label=["Kal", "Mirebsatorulkalovel", "Sat"], color="C0")
        for label in ax.get_xticklabels():
            label.set_rotation(90)
        fig.subplots_adjust(bottom=0.18)
        return ax
    figure, _ = _matplotlib(draw)
    assert [b.clipped for b in Measurements(figure).get("label_blobs")["x"]] == [False, True, False]


def test_what_is_left_of_a_cut_off_label_may_end_a_month_or_a_number():
    from corpusaudit.measure.axes import could_end_ordered_label

    assert could_end_ordered_label("ember") and could_end_ordered_label("ept") and could_end_ordered_label("ek 3")
    assert not could_end_ordered_label("ovel") and not could_end_ordered_label("rsator")


def test_jpeg_halo_on_a_white_page_is_not_a_filled_panel():
    # faint JPEG ringing round many lines on a white page is a light tint, but no flat panel
    import cv2

    def draw(fig):
        ax = fig.add_subplot()
        for k in range(7):
            ax.plot(NAMES, np.linspace(k, k + 2, len(NAMES)) + np.sin(np.arange(len(NAMES)) + k), color=f"C{k}")
        return ax
    figure, expected = _matplotlib(draw, size=(5.1, 3.4))
    ok, encoded = cv2.imencode(".jpg", np.ascontiguousarray(figure.pixels[:, :, ::-1]), [cv2.IMWRITE_JPEG_QUALITY, 80])
    pixels = cv2.imdecode(encoded, cv2.IMREAD_COLOR)[:, :, ::-1]
    assert Measurements(_figure(pixels, "line")).get("plot_area") == pytest.approx(expected, abs=3.0)


@needs_ocr
def test_minor_ticks_are_not_label_positions():
    # matplotlib draws minor ticks shorter than major ones (2 pt against 3.5 pt in its default style)
    def draw(fig):
        ax = fig.add_subplot()
        ax.plot([0, 4, 10], [1, 3, 2])
        ax.set_xlim(0, 10)
        ax.set_xticks([0, 2, 4, 6, 8, 10])
        ax.minorticks_on()
        return ax
    figure, (x0, _, x1, _) = _matplotlib(draw)
    measurements = Measurements(figure)
    expected = [x0 + (x1 - x0) * v / 10 for v in (0, 2, 4, 6, 8, 10)]
    assert measurements.get("tick_marks")["x"] == pytest.approx(expected, abs=1.5)
    assert measurements.get("axes").x.labels == ["0", "2", "4", "6", "8", "10"]


# Two-word labels whose word space (three spaces wide) parts them into two blobs each.
TWO_WORDS = ["Kal   Vesh", "Mir   Tob", "Sat   Quen", "Dor   Fim"]


@needs_ocr
def test_words_of_one_label_are_joined_at_its_tick():
    centres = [200, 400, 600, 800]
    measurements = Measurements(_level_labels(TWO_WORDS, centres, centres))
    assert len(measurements.get("label_blobs")["x"]) == 2 * len(TWO_WORDS)  # found apart
    assert [" ".join(t.text.split()) for t in measurements.get("x_label_texts")] == [" ".join(w.split()) for w in TWO_WORDS]


@needs_ocr
def test_labels_between_their_ticks_are_not_regrouped():
    # ticks at the category boundaries, labels midway (a layout some spreadsheet charts use): words
    # nearest one tick belong to two labels, so no label may be joined across a boundary
    centres = [200, 400, 600, 800]
    measurements = Measurements(_level_labels(TWO_WORDS, centres, [100, 300, 500, 700, 900]))
    texts = [t.text for t in measurements.get("x_label_texts")]
    assert texts == [word for label in TWO_WORDS for word in label.split()]


@needs_ocr
@pytest.mark.parametrize("labels, flagged", [
    (["Kalovelmirebo", "Satorulquniren", "Dragopimfenul", "Ulkasabortovel", "Mirebsatorkalo"], True),
    (["September", "October", "November", "December", "January"], False),
])
def test_line_labels_cut_off_by_the_edge_still_show_words(labels, flagged):
    # long upright labels with little room below the axes: matplotlib cuts their starts off at the
    # image edge; what is left of invented names ends no month name, what is left of month names may
    figure = _line_figure(_line(labels, 90, bottom=0.12))
    ticks = Measurements(figure).get("axes").x.ticks
    assert sum(t.clipped for t in ticks) >= 3
    found, unmeasured = _found(figure)
    assert ("line-on-categories" in found) is flagged


def test_tick_positions_as_numpy_scalars_pair_with_labels():
    # Tick marks come from numpy; a label far from every tick must not be compared with them
    # elementwise (a figure of the sample corpus failed so). Geometry invented.
    from corpusaudit.measure.axes import LabelBlob, labels_per_tick

    def blob(x0, x1):
        return LabelBlob(bbox=(x0, 100.0, x1, 112.0), angle=0.0, glyphs=2, mask=np.ones((12, int(x1 - x0)), bool),
                         glyph_ids=np.ones((12, int(x1 - x0)), np.int32), clipped=False)

    marks = [np.float64(50.0), np.float64(150.0), np.float64(250.0)]
    found = labels_per_tick((blob(40, 60), blob(140, 160), blob(330, 350)), 0.0, marks, "x")
    assert [b.bbox[0] for b in found] == [40, 140, 330]
