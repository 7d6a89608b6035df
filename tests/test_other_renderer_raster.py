"""Raster measurements on chart styles other renderers use: bars reaching the plot's edges,
pieces of bar colour that only a morphological closing makes solid, hollow markers, and y
tick labels set close beside a bold axis title.

Figures are drawn here with known geometry (numpy/OpenCV pixels, or matplotlib where text is
needed), so the expected counts and values are those drawn.
"""

from __future__ import annotations

import cv2
import numpy as np
import pytest

from corpusaudit.checks.cases import Case, raster_figure
from corpusaudit.measure import Measurements
from corpusaudit.measure.axes import _raster_plot_area
from corpusaudit.measure.bars import RASTER_TOUCH, _raster_rects, bar_chart_from_rects
from corpusaudit.measure.scatter import _raster_markers
from corpusaudit.measure.text import ocr_available
from corpusaudit.model import MeasurementUnavailable

needs_ocr = pytest.mark.skipif(not ocr_available(), reason="text recognition not installed")

WHITE = (255, 255, 255)
PURPLE = (178, 121, 162)
GREY_AXIS = (136, 136, 136)
PLOT = (60.0, 20.0, 300.0, 260.0)  # x0, y0, x1, y1 of the drawn plot area


def _page(width: int = 340, height: int = 300) -> np.ndarray:
    rgb = np.full((height, width, 3), 255, np.uint8)
    x0, y0, x1, y1 = (int(v) for v in PLOT)
    cv2.line(rgb, (x0, y0), (x0, y1), GREY_AXIS, 1)  # y axis
    cv2.line(rgb, (x0, y1), (x1, y1), GREY_AXIS, 1)  # x axis
    return rgb


def _columns(rgb: np.ndarray, tops: list[int], colour=PURPLE, gap: int = 10) -> list[tuple[int, int, int, int]]:
    """Vertical bars filling the band from the plot's left edge to its right edge."""
    x0, _, x1, y1 = (int(v) for v in PLOT)
    width = (x1 - x0 - gap * (len(tops) - 1)) / len(tops)
    boxes = []
    for k, top in enumerate(tops):
        left = int(round(x0 + k * (width + gap)))
        right = int(round(x0 + k * (width + gap) + width))
        cv2.rectangle(rgb, (left, top), (right - 1, y1 - 1), colour, -1)
        boxes.append((left, top, right, y1))
    return boxes


def _bars(rgb: np.ndarray):
    return bar_chart_from_rects(_raster_rects(rgb, PLOT), PLOT, touch=RASTER_TOUCH)


def test_bars_covering_most_of_the_plot_rim_are_still_bars():
    # Bars flush with the left and right edges, one at the top: most of the plot's rim is bar colour
    # (the carbon-like theme failure), so the rim's modal colour is not the panel.
    rgb = _page()
    tops = [60, 190, 215, 20]
    _columns(rgb, tops)
    chart = _bars(rgb)
    assert chart.orientation == "vertical"
    assert len(chart.stacks) == 4
    # lengths as drawn, to the raster tolerance of the snapping (RASTER_TOUCH pixels)
    assert [s.length for s in chart.stacks] == pytest.approx([PLOT[3] - t for t in tops], abs=RASTER_TOUCH)


def test_a_flat_tinted_panel_alone_is_not_a_bar():
    # A grey panel with white grid lines and no data: the panel colour fills the whole plot.
    rgb = _page()
    x0, y0, x1, y1 = (int(v) for v in PLOT)
    rgb[y0 + 1:y1, x0 + 1:x1] = (229, 229, 229)
    for y in range(y0 + 40, y1, 40):
        rgb[y, x0 + 1:x1] = WHITE
    with pytest.raises(MeasurementUnavailable):
        _bars(rgb)


def test_pieces_joined_only_by_the_closing_are_not_a_bar():
    # A hatched patch in the bar colour on the baseline (a hatched key swatch, lines beside an edge):
    # 1-pixel lines 3 pixels apart, which the closing that bridges grid lines makes solid.
    rgb = _page()
    boxes = _columns(rgb, [80, 140, 200], gap=50)
    left = boxes[0][2] + 16  # in the gap after the first bar
    for x in range(left, left + 18, 3):
        rgb[int(PLOT[3]) - 18:int(PLOT[3]), x] = PURPLE
    chart = _bars(rgb)
    assert len(chart.stacks) == 3


def test_bars_crossed_by_grid_lines_stay_whole():
    # The positive counterpart: white grid lines 2 pixels wide over the bars cut them, and the
    # closing rejoins them (RASTER_TOUCH), with most of each box still bar colour.
    rgb = _page()
    tops = [40, 120, 90, 200, 150]
    _columns(rgb, tops)
    x0, y0, x1, y1 = (int(v) for v in PLOT)
    for y in range(y0 + 30, y1 - 10, 30):
        rgb[y:y + 2, x0 + 1:x1] = WHITE
    chart = _bars(rgb)
    assert len(chart.stacks) == 5
    assert [s.length for s in chart.stacks] == pytest.approx([y1 - t for t in tops], abs=RASTER_TOUCH)


def _rings(centres: np.ndarray, radius: int = 8, thickness: int = 2, filled: bool = False) -> np.ndarray:
    rgb = _page()
    for x, y in centres:
        cv2.circle(rgb, (int(round(x)), int(round(y))), radius, (228, 87, 86), -1 if filled else thickness,
                   lineType=cv2.LINE_AA)
    return rgb


def _grid_centres(side: int = 5) -> np.ndarray:
    x0, y0, x1, y1 = PLOT
    xs = np.linspace(x0 + 25, x1 - 25, side)
    ys = np.linspace(y0 + 25, y1 - 25, side)
    return np.array([(x, y) for x in xs for y in ys])


def test_sparse_hollow_markers_are_counted_and_not_overplotted():
    markers = _raster_markers(_rings(_grid_centres()), PLOT)
    assert markers.count == 25
    assert markers.radius == pytest.approx(8.5, abs=1.5)  # drawn radius 8 plus half the 2-pixel stroke
    assert markers.hidden_share < 0.05


def test_dense_hollow_markers_are_measured_as_overplotted():
    rng = np.random.default_rng(4)
    x0, y0, x1, y1 = PLOT
    centres = rng.normal(((x0 + x1) / 2, (y0 + y1) / 2), 30, (500, 2))
    centres = centres[(centres[:, 0] > x0 + 12) & (centres[:, 0] < x1 - 12) & (centres[:, 1] > y0 + 12) & (centres[:, 1] < y1 - 12)]
    # a few isolated markers far out give the size of one marker, as in any real scatter
    isolated = _grid_centres(3)[[0, 2, 6, 8]]
    markers = _raster_markers(_rings(np.vstack([centres, isolated])), PLOT)
    # 0.2: the rule's default max_hidden_share (common practice, no source)
    assert markers.hidden_share > 0.2


def test_filled_markers_are_measured_as_before():
    # Filled markers have no holes: filling holes changes nothing, the count is the markers drawn.
    markers = _raster_markers(_rings(_grid_centres(), filled=True), PLOT)
    assert markers.count == 25 and markers.hidden_share < 0.05


def _level_bars_with_title(fig):
    ax = fig.add_subplot()
    ax.bar(range(4), [50.6, 55.5, 66.3, 53.9], color="#4c78a8")
    ax.set_ylim(50, 68)
    ax.set_yticks(range(50, 69, 2))
    ax.tick_params(axis="both", colors="#9a9a9a", labelcolor="#9a9a9a")  # light grey labels and ticks
    ax.set_xticks(range(4), ["Port Ost", "Vel Haven", "Port Kel", "Dun Haven"])
    ax.set_ylabel("Landed tonnage", fontsize=15, fontweight="bold", labelpad=1)


@needs_ocr
def test_y_labels_beside_a_close_axis_title_are_read_one_by_one():
    figure = raster_figure(Case("title-beside-y-labels", "bar", _level_bars_with_title, {}), np.random.default_rng(0))
    axis = Measurements(figure).get("axes").y
    assert axis.kind == "numeric" and axis.fit is not None
    assert [t.value for t in axis.ticks] == [float(v) for v in range(68, 49, -2)]  # top to bottom, as drawn
    assert axis.value_range[0] == pytest.approx(50, abs=0.5)


def _hairline_frame(ticks: bool = True) -> np.ndarray:
    """A plot drawn as a hairline frame in a light grey (ggplot-like styles on a white page), too
    faint to read as axis lines, with grey tick marks standing 3 pixels off it."""
    rgb = np.full((300, 340, 3), 255, np.uint8)
    x0, y0, x1, y1 = (int(v) for v in PLOT)
    cv2.rectangle(rgb, (x0, y0), (x1, y1), (246, 246, 246), 1)
    if ticks:
        for x in range(x0 + 20, x1, 50):
            rgb[y1 + 3:y1 + 13, x:x + 2] = (127, 127, 127)
        for y in range(y0 + 20, y1, 50):
            rgb[y:y + 2, x0 - 13:x0 - 3] = (127, 127, 127)
    for x, y in _grid_centres(4):  # some data
        cv2.circle(rgb, (int(x), int(y)), 5, (76, 120, 168), -1)
    return rgb


def test_hairline_frame_is_found_from_the_tick_marks_and_the_faint_lines():
    plot = _raster_plot_area(_hairline_frame())
    assert plot == pytest.approx(PLOT, abs=1.5)


def test_no_plot_area_without_frame_lines_or_tick_rows():
    with pytest.raises(MeasurementUnavailable):
        _raster_plot_area(_hairline_frame(ticks=False))
