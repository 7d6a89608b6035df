"""Plot area, axes, tick marks and tick labels, for vector and raster figures.

The value range of an axis is extrapolated from its labelled ticks: a linear fit
value = a * pixel + b through at least two numeric tick labels, checked for linearity,
then evaluated at the plot-area edges. So a truncated axis is measured, not guessed.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, replace

import numpy as np
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components

from corpusaudit.measure import measurement
from corpusaudit.measure.shapes import (
    axis_aligned_segment, background_rgb, bbox_area, colour_distance, component_stats, ink_mask,
    is_neutral, is_vector, require_pixels, thin_lines,
)
from corpusaudit.measure.text import merge_words_into_lines, ocr_line, ocr_words, parse_number
from corpusaudit.model import BBox, Figure, MeasurementUnavailable, TextSpan

# Ink for tick marks: clearly darker than a tinted panel (ggplot's grey is 45 levels from white).
TICK_INK = 60.0
LINEARITY_TOLERANCE = 0.02  # largest fit residual, as a share of the labelled value range
_OCR_DIGIT_FIXES = str.maketrans({"O": "0", "o": "0", "D": "0", "l": "1", "I": "1", "|": "1", "S": "5", "—": "-"})


@dataclass(frozen=True)
class Tick:
    pixel: float  # position along the axis: x for the x axis, y for the y axis (figure pixels)
    text: str
    value: float | None  # the number the label states, if it is one
    angle: float  # label direction, degrees counter-clockwise
    bbox: BBox
    clipped: bool = False  # the label reaches the image's edge: its text may be incomplete


@dataclass(frozen=True)
class Axis:
    side: str  # "x" (bottom) or "y" (left)
    ticks: tuple[Tick, ...]
    kind: str  # "numeric" | "categorical" | "none"
    fit: tuple[float, float] | None  # value = fit[0] * pixel + fit[1]; None when not linear
    extent: tuple[float, float]  # plot-area pixel range along the axis (low pixel, high pixel)

    def value_at(self, pixel: float) -> float:
        if self.fit is None:
            raise MeasurementUnavailable(f"{self.side} axis has no linear numeric scale")
        return self.fit[0] * pixel + self.fit[1]

    @property
    def value_range(self) -> tuple[float, float]:
        """Values at the two plot-area edges, low first (raises when not numeric)."""
        a, b = self.value_at(self.extent[0]), self.value_at(self.extent[1])
        return (min(a, b), max(a, b))

    @property
    def labels(self) -> list[str]:
        return [tick.text for tick in self.ticks]


@dataclass(frozen=True)
class Axes:
    plot: BBox
    x: Axis
    y: Axis


# ------------------------------------------------------------------ plot area


def _vector_plot_area(figure: Figure) -> BBox:
    width, height = _figure_size(figure)
    paths = figure.vector.paths
    for path in paths:  # the axes patch: the first large neutral rectangle that is not the page
        if path.is_rect and "f" in path.kind and is_neutral(path.fill):
            share = bbox_area(path.bbox) / (width * height)
            if 0.1 <= share < 0.97:
                return path.bbox
    horizontal = [p.bbox for p in paths if axis_aligned_segment(p) == "h" and is_neutral(p.stroke)
                  and p.bbox[2] - p.bbox[0] >= 0.25 * width]
    vertical = [p.bbox for p in paths if axis_aligned_segment(p) == "v" and is_neutral(p.stroke)
                and p.bbox[3] - p.bbox[1] >= 0.25 * height]
    if horizontal and vertical:
        lines = horizontal + vertical
        return (min(b[0] for b in lines), min(b[1] for b in lines), max(b[2] for b in lines), max(b[3] for b in lines))
    # a frame drawn as an outline around the plot (themes without axis lines)
    frames = [p.bbox for p in paths if p.is_rect and "s" in p.kind and p.stroke is not None and is_neutral(p.stroke)
              and 0.1 <= bbox_area(p.bbox) / (width * height) < 0.97]
    if frames:
        return max(frames, key=bbox_area)
    raise MeasurementUnavailable("no plot area (no axes frame or axis lines found)")


def _light_tint(rgb: np.ndarray, background: np.ndarray) -> np.ndarray:
    """Light neutral pixels that are not page colour: a bar or an area of data colour is not a panel."""
    import cv2

    red, green, blue = cv2.split(rgb)  # OpenCV's per-pixel minimum and maximum: numpy's over the channel axis is slow
    low, high = cv2.min(cv2.min(red, green), blue), cv2.max(cv2.max(red, green), blue)
    return (colour_distance(rgb, background) > 6) & (low >= 180) & (cv2.subtract(high, low) <= 24)


def _filled_panel(rgb: np.ndarray, background: np.ndarray) -> BBox | None:
    """A flat light-neutral panel that differs from the page (ggplot-like styles), or None.

    The panel is the modal light neutral colour that is not page, closed over the grid lines drawn on
    it (white in these styles, so they cut the panel into cells). It must be a rectangle
    (its rim mostly panel colour) and hold something (grid lines, data: holes in the panel
    colour), so a large plain bar is not taken for it. Page colour inside it is only thin grid
    lines, so the halo of faint pixels that JPEG leaves round lines on a white page is not one.
    """
    import cv2

    height, width = rgb.shape[:2]
    # Every third pixel first: most figures have almost no tint and are ruled out at a ninth of the cost.
    if _light_tint(np.ascontiguousarray(rgb[::3, ::3]), background).mean() < 0.025:
        return None
    tint = _light_tint(rgb, background)
    if tint.sum() < 0.05 * width * height:
        return None
    pixels = rgb[tint].astype(np.int32)
    keys = (pixels[:, 0] >> 2 << 12) | (pixels[:, 1] >> 2 << 6) | (pixels[:, 2] >> 2)
    modal = pixels[keys == np.bincount(keys).argmax()].mean(axis=0)
    panel = (colour_distance(rgb, modal) < 8).astype(np.uint8)
    closed = cv2.morphologyEx(panel, cv2.MORPH_CLOSE, np.ones((7, 7), np.uint8))
    _, stats, _ = component_stats(closed, min_area=int(0.05 * width * height))
    if len(stats) == 0:
        return None
    best = stats[np.argmax(stats[:, 5])]
    x, y, w, h = (int(v) for v in best[1:5])
    if w * h < 0.15 * width * height:
        return None
    inside = panel[y:y + h, x:x + w]
    holes = 1.0 - inside.mean()
    box = closed[y:y + h, x:x + w]
    rim = np.concatenate([box[1], box[-2], box[:, 1], box[:, -2]])  # a panel is a rectangle: its rim is panel
    page = (colour_distance(rgb[y:y + h, x:x + w], background) < 8).mean()
    if holes < 0.02 or rim.mean() < 0.6 or best[5] < 0.2 * w * h or page > 0.5 * inside.mean():
        return None
    return (float(x), float(y), float(x + w), float(y + h))


def _raster_plot_area(rgb: np.ndarray) -> BBox:
    height, width = rgb.shape[:2]
    background = background_rgb(rgb)
    panel = _filled_panel(rgb, background)
    if panel is not None:  # before the frame lines: a tinted panel reads as ink and fakes lines
        return panel
    ink = ink_mask(rgb, background, threshold=45.0)
    horizontal = thin_lines(ink, "h", max(8, int(0.25 * width)))
    vertical = thin_lines(ink, "v", max(8, int(0.25 * height)))
    if horizontal and vertical:
        # Positions of the perpendicular lines, not extents: tick marks extend a line's ends.
        columns = [line[0] for line in vertical]
        rows = [line[0] for line in horizontal]
        x0 = min(columns)
        x1 = max(columns) if max(columns) - x0 > 0.25 * width else max(line[2] for line in horizontal)
        y1 = max(rows)
        y0 = min(rows) if y1 - min(rows) > 0.25 * height else min(line[1] for line in vertical)
        if x1 - x0 > 0.2 * width and y1 - y0 > 0.2 * height:
            return (float(x0), float(y0), float(x1), float(y1))
    framed = _tick_frame(rgb, background)
    if framed is not None:
        return framed
    raise MeasurementUnavailable("no plot area (no axis lines or plot panel found)")


FAINT_LINE = 6.0  # distance from the page (0..255 sRGB) of a hairline frame, above JPEG noise on flat page
FRAMED_TICK_INK = 100.0  # a light grey hairline frame (#ddd: 59 from white) stays below it, grey ticks (#888: 206) above
TICK_SPAN = 0.3  # a row of tick marks spans at least this share of the figure (glyph strokes of a word do not)


def _tick_row(stats: np.ndarray, side: str, size: int) -> np.ndarray | None:
    """Tick marks of one axis: short thin strokes across it, of one length and aligned (their
    ends within a pixel), spread along the axis; the largest such set."""
    along, across = (1, 2) if side == "x" else (2, 1)  # stats columns: label, x, y, w, h, area
    thin = (stats[:, 2 + along] <= 3) & (stats[:, 2 + across] >= 3) & (stats[:, 2 + across] <= 0.05 * size) \
        & (stats[:, 2 + across] >= 2 * stats[:, 2 + along])
    strokes = stats[thin]
    best = None
    for start, length in {(int(r[across]), int(r[2 + across])) for r in strokes}:
        group = strokes[(np.abs(strokes[:, across] - start) <= 1) & (np.abs(strokes[:, 2 + across] - length) <= 1)]
        if len(group) >= 3 and np.ptp(group[:, along]) >= TICK_SPAN * size and (best is None or len(group) > len(best)):
            best = group
    return best


def _faint_line(faint: np.ndarray, positions: range, axis: int) -> int | None:
    """The first of positions (rows for axis 1, columns for axis 0 of faint) holding a hairline
    along most (0.6) of its length."""
    for position in positions:
        line = faint[position] if axis == 1 else faint[:, position]
        if line.size and line.mean() >= 0.6:
            return position
    return None


def _tick_frame(rgb: np.ndarray, background: np.ndarray) -> BBox | None:
    """The plot area of a frame too faint to read as lines (a hairline in a light grey): the
    inner ends of the tick marks give its left and bottom sides, the faint frame lines beyond
    them (else the outermost ticks) the others."""
    height, width = rgb.shape[:2]
    import cv2

    # Ink well darker than the hairline, so that ticks touching the frame stand apart from it, and
    # without solid shapes (bars drawn from the frame, which ticks touch): a tick is thinner than 5 px.
    ink = ink_mask(rgb, background, threshold=FRAMED_TICK_INK).astype(np.uint8)
    ink &= 1 - cv2.morphologyEx(ink, cv2.MORPH_OPEN, np.ones((5, 5), np.uint8))
    _, stats, _ = component_stats(ink, min_area=2)
    x_ticks, y_ticks = _tick_row(stats, "x", width), _tick_row(stats, "y", height)
    if x_ticks is None or y_ticks is None:
        return None
    x0 = int(np.median(y_ticks[:, 1] + y_ticks[:, 3]))  # right ends of the y ticks
    y1 = int(np.median(x_ticks[:, 2])) - 1  # tops of the x ticks
    far_x = int(x_ticks[:, 1].max() + x_ticks[:, 3].max())
    near_y = int(y_ticks[:, 2].min())
    if far_x - x0 < 0.2 * width or y1 - near_y < 0.2 * height:
        return None
    faint = colour_distance(rgb, background) > FAINT_LINE
    # A hairline frame stands up to a few pixels off the tick ends (ggplot-like styles leave a gap).
    left = _faint_line(faint[near_y:y1, :], range(x0, min(width, x0 + 6)), 0)
    bottom = _faint_line(faint[:, x0:far_x], range(y1, max(0, y1 - 6), -1), 1)
    x0 = left if left is not None else x0
    y1 = bottom if bottom is not None else y1
    right = _faint_line(faint[near_y:y1, :], range(width - 1, far_x - 2, -1), 0)
    top = _faint_line(faint[:, x0:far_x], range(0, near_y + 2), 1)
    x1 = right if right is not None else far_x
    y0 = top if top is not None else near_y
    return (float(x0), float(y0), float(x1), float(y1))


def _figure_size(figure: Figure) -> tuple[float, float]:
    if figure.pixels is not None:
        return float(figure.pixels.shape[1]), float(figure.pixels.shape[0])
    return float(figure.width_px), float(figure.height_px)


@measurement("plot_area")
def plot_area(figure: Figure, measurements) -> BBox:
    """The data rectangle (x0, y0, x1, y1) in figure pixels."""
    if is_vector(figure):
        return _vector_plot_area(figure)
    return _raster_plot_area(require_pixels(figure))


# ------------------------------------------------------------------ tick marks


def _vector_tick_marks(figure: Figure, plot: BBox) -> dict[str, list[float]]:
    width, height = _figure_size(figure)
    limit = 0.04 * max(width, height)
    marks: dict[str, list[tuple[float, float]]] = {"x": [], "y": []}
    for path in figure.vector.paths:
        direction = axis_aligned_segment(path)
        x0, y0, x1, y1 = path.bbox
        if direction == "v" and y1 - y0 <= limit and plot[0] - 1 <= x0 <= plot[2] + 1 and y0 - 2 <= plot[3] <= y1 + 2:
            marks["x"].append((x0, y1 - y0))
        elif direction == "h" and x1 - x0 <= limit and plot[1] - 1 <= y0 <= plot[3] + 1 and x0 - 2 <= plot[0] <= x1 + 2:
            marks["y"].append((y0, x1 - x0))
    result = {}
    for side, found in marks.items():  # major ticks only: minor ticks are shorter and unlabelled
        longest = max((length for _, length in found), default=0.0)
        result[side] = sorted({round(pos, 2) for pos, length in found if length >= 0.8 * longest})
    return result


def _raster_tick_marks(ink: np.ndarray, plot: BBox) -> dict[str, list[float]]:
    height, width = ink.shape
    x0, y0, x1, y1 = (int(round(v)) for v in plot)
    result = {}
    # A band just outside the frame: ticks touch it, or (ggplot-like panels) start a few pixels off.
    below = ink[min(height - 1, y1 + 1):min(height, y1 + 7), max(0, x0 - 2):min(width, x1 + 3)]
    left = ink[max(0, y0 - 2):min(height, y1 + 3), max(0, x0 - 7):max(0, x0 - 1)]
    for side, strip, offset in (("x", below, max(0, x0 - 2)), ("y", left.T, max(0, y0 - 2))):
        if strip.size == 0 or strip.shape[0] < 3:
            result[side] = []
            continue
        column = strip.sum(axis=0) >= 3  # a tick crosses at least 3 pixels of the band
        edges = np.flatnonzero(np.diff(np.concatenate([[0], column.astype(np.int8), [0]])))
        runs = [(start, stop) for start, stop in zip(edges[::2], edges[1::2]) if stop - start <= 5]
        positions = [offset + (start + stop - 1) / 2.0 for start, stop in runs]
        lengths = [_mark_length(ink, plot, side, position) for position in positions]
        # Major ticks only, as on vector figures: minor ticks are shorter and unlabelled.
        result[side] = [p for p, length in zip(positions, lengths) if length >= 0.8 * max(lengths)]
    return result


def _mark_length(ink: np.ndarray, plot: BBox, side: str, position: float) -> int:
    """How far a tick mark reaches out from the plot frame: its run of ink (pixels)."""
    if side == "x":
        line = ink[min(ink.shape[0], int(round(plot[3])) + 1):int(round(plot[3])) + 41, int(round(position))]
    else:
        x0 = int(round(plot[0]))
        line = ink[int(round(position)), max(0, x0 - 41):max(0, x0 - 1)][::-1]
    if not line.any():
        return 0
    start = int(np.argmax(line))
    rest = line[start:]
    return int(np.argmin(rest)) if not rest.all() else len(rest)


@measurement("tick_marks")
def tick_marks(figure: Figure, measurements) -> dict[str, list[float]]:
    """Major tick mark positions: {'x': [x pixels], 'y': [y pixels]}."""
    plot = measurements.get("plot_area")
    if is_vector(figure):
        return _vector_tick_marks(figure, plot)
    return _raster_tick_marks(measurements.get("tick_ink"), plot)


@measurement("tick_ink")
def tick_ink(figure: Figure, measurements) -> np.ndarray:
    """Raster pixels dark enough for tick marks and frame lines (TICK_INK from the background)."""
    return ink_mask(require_pixels(figure), threshold=TICK_INK)


@measurement("tick_reach")
def tick_reach(figure: Figure, measurements) -> int:
    """How far the raster tick marks reach out of the plot frame (pixels), so label strips skip them."""
    return _tick_length(measurements.get("tick_ink"), measurements.get("plot_area"), measurements.get("tick_marks"))


# ------------------------------------------------------------------ tick labels


def _glyph_height(span: TextSpan, scale: float) -> float:
    if span.size_pt > 0:
        return span.size_pt * scale
    return span.bbox[3] - span.bbox[1]


def _select_labels(spans: list[TextSpan], plot: BBox, side: str, scale: float) -> list[TextSpan]:
    """Tick labels of one axis: the row (x) or column (y) of text nearest the plot area."""
    if side == "y":
        candidates = [s for s in spans if s.bbox[2] <= plot[0] + 2
                      and plot[1] - _glyph_height(s, scale) <= (s.bbox[1] + s.bbox[3]) / 2 <= plot[3] + _glyph_height(s, scale)]
        if not candidates:
            return []
        nearest = max(s.bbox[2] for s in candidates)
        tolerance = 0.6 * float(np.median([_glyph_height(s, scale) for s in candidates]))
        chosen = [s for s in candidates if s.bbox[2] >= nearest - tolerance]
        return sorted(chosen, key=lambda s: s.bbox[1] + s.bbox[3])
    candidates = [s for s in spans if s.bbox[1] >= plot[3] - 2
                  and plot[0] - (s.bbox[2] - s.bbox[0]) <= (s.bbox[0] + s.bbox[2]) / 2 <= plot[2] + (s.bbox[2] - s.bbox[0])]
    if not candidates:
        return []
    nearest = min(s.bbox[1] for s in candidates)
    tolerance = 0.6 * float(np.median([_glyph_height(s, scale) for s in candidates]))
    chosen = [s for s in candidates if s.bbox[1] <= nearest + tolerance]
    return sorted(chosen, key=lambda s: s.bbox[0] + s.bbox[2])


def _split_at_ticks(spans: list[TextSpan], marks: list[float]) -> list[TextSpan]:
    """x labels with one span per tick: a span drawn as several runs that covers two or more
    tick marks (neighbouring labels that touch or overlap) is split, each run going to the
    mark nearest its middle."""
    split: list[TextSpan] = []
    for span in spans:
        covered = [m for m in marks if span.bbox[0] <= m <= span.bbox[2]]
        if len(covered) < 2 or not span.runs:
            split.append(span)
            continue
        by_mark: dict[float, list[tuple[str, BBox]]] = {}
        for text, box in span.runs:
            middle = (box[0] + box[2]) / 2
            by_mark.setdefault(min(covered, key=lambda m: abs(m - middle)), []).append((text, box))
        gap = 0.25 * (span.bbox[3] - span.bbox[1])
        for mark in sorted(by_mark):
            runs = by_mark[mark]
            text = runs[0][0]
            for (_, before), (word, box) in zip(runs, runs[1:]):
                text += (" " if box[0] - before[2] > gap else "") + word
            boxes = np.array([box for _, box in runs])
            bbox = tuple(float(v) for v in (*boxes.min(axis=0)[:2], *boxes.max(axis=0)[2:]))
            split.append(replace(span, text=text, bbox=bbox, runs=()))
    return split


def _number(span: TextSpan) -> float | None:
    return _number_text(span.text) if span.font == "ocr" else parse_number(span.text)


def _linear_fit(pixels: np.ndarray, values: np.ndarray) -> tuple[float, float] | None:
    if len(pixels) < 2 or np.ptp(values) == 0 or np.ptp(pixels) == 0:
        return None
    slope, intercept = np.polyfit(pixels, values, 1)
    residual = np.abs(slope * pixels + intercept - values).max()
    return (float(slope), float(intercept)) if residual <= LINEARITY_TOLERANCE * np.ptp(values) else None


def _robust_fit(pixels: np.ndarray, values: np.ndarray) -> tuple[float, float] | None:
    """Linear fit; with four or more labels one misread label may be left out."""
    fit = _linear_fit(pixels, values)
    if fit is not None or len(pixels) < 4:
        return fit
    for drop in range(len(pixels)):
        keep = np.arange(len(pixels)) != drop
        fit = _linear_fit(pixels[keep], values[keep])
        if fit is not None:
            return fit
    return None


def _span_tick(span: TextSpan, side: str) -> Tick:
    along = 0 if side == "x" else 1
    return Tick(pixel=(span.bbox[along] + span.bbox[along + 2]) / 2, text=span.text, value=_number(span),
                angle=span.angle, bbox=span.bbox)


def _build_axis(side: str, labels: list[Tick], marks: list[float], extent: tuple[float, float]) -> Axis:
    """An axis from its labels in order (pixel: where each label is), moved onto the tick marks."""
    positions = [t.pixel for t in labels]
    if marks and len(marks) == len(labels):  # one label per major tick: pair them in order
        positions = sorted(marks)
    elif marks:
        spacing = float(np.median(np.diff(marks))) if len(marks) > 1 else float("inf")
        positions = [min(marks, key=lambda m: abs(m - p)) if min(abs(m - p) for m in marks) < 0.4 * spacing else p
                     for p in positions]
    ticks = tuple(replace(t, pixel=float(p)) for p, t in zip(positions, labels))
    numeric = [t for t in ticks if t.value is not None]
    fit = None
    if ticks and len(numeric) >= 2 and len(numeric) >= 0.8 * len(ticks):
        fit = _robust_fit(np.array([t.pixel for t in numeric]), np.array([t.value for t in numeric]))
        kind = "numeric"
    elif ticks and len(numeric) <= 0.5 * len(ticks):
        kind = "categorical"
    else:
        kind = "none"
    return Axis(side=side, ticks=ticks, kind=kind, fit=fit, extent=extent)


def _tick_length(ink: np.ndarray, plot: BBox, marks: dict[str, list[float]]) -> int:
    """How far the tick marks reach out of the plot frame (pixels), so OCR strips skip them."""
    x0, y1 = int(round(plot[0])), int(round(plot[3]))
    lengths = []
    for y in marks["y"]:
        row = ink[int(round(y)), max(0, x0 - 40):max(0, x0 - 1)][::-1]
        lengths.append(int(np.argmin(row)) if row.size and not row.all() else 0)
    for x in marks["x"]:
        column = ink[min(ink.shape[0] - 1, y1 + 2):y1 + 40, int(round(x))]
        lengths.append(int(np.argmin(column)) + 1 if column.size and not column.all() else 0)
    return max(lengths, default=0) + 1  # labels stand off their ticks by a padding of 2 px or more (common practice)


def _raster_label_spans(rgb: np.ndarray, plot: BBox, reach: int, side: str) -> list[TextSpan]:
    """Tick labels of one axis read by OCR as one strip (words joined into lines by their gaps)."""
    height, width = rgb.shape[:2]
    if side == "y":
        pad = 0.06 * height
        words = ocr_words(rgb, (0, plot[1] - pad, plot[0] - reach, plot[3] + pad), psm=6)
    else:
        pad = 0.06 * width
        words = ocr_words(rgb, (plot[0] - pad, plot[3] + reach, plot[2] + pad, min(height, plot[3] + 0.25 * height)), psm=6)
    return _select_labels(merge_words_into_lines(words), plot, side, 1.0)


def _axis(figure: Figure, measurements, side: str) -> Axis:
    """One axis of the plot area: its tick labels (stated, or read from the raster) moved onto
    its tick marks, their numbers and the linear value scale."""
    plot = measurements.get("plot_area")
    marks = measurements.get("tick_marks")
    if is_vector(figure):
        spans, scale = figure.vector.texts, figure.vector.scale
        selected = _select_labels(spans, plot, side, scale)
        labels = [_span_tick(s, side) for s in (_split_at_ticks(selected, marks["x"]) if side == "x" else selected)]
    else:
        rgb = require_pixels(figure)
        reach = measurements.get("tick_reach")
        labels = list(measurements.get(f"{side}_label_texts"))
        if not labels:
            labels = [_span_tick(s, side) for s in _raster_label_spans(rgb, plot, reach, side)]
    extent = (plot[0], plot[2]) if side == "x" else (plot[1], plot[3])
    return _build_axis(side, labels, marks[side], extent)


@measurement("x_axis")
def x_axis(figure: Figure, measurements) -> Axis:
    """The x axis alone (see axes), for rules that judge only it: on a raster the y labels
    are then not read, and reading labels is the dearest step of the audit."""
    return _axis(figure, measurements, "x")


@measurement("axes")
def axes(figure: Figure, measurements) -> Axes:
    """Plot area with both axes: tick labels, their numbers and the linear value scale.

    Raster labels are found from their ink, one per tick, and read one by one turned level
    (x_label_texts, y_label_texts): read as a strip, OCR joins neighbouring labels or splits one,
    reads rotated ones as fragments, and reads an axis title set beside the y labels into them
    ('% 62'). The strip is the fallback where no label blobs are found.
    """
    x = measurements.get("x_axis")
    return Axes(plot=measurements.get("plot_area"), x=x, y=_axis(figure, measurements, "y"))


# ------------------------------------------------------------------ label angle


@dataclass(frozen=True)
class LabelAngle:
    angle: float  # magnitude of the rotation of one axis's tick labels, degrees (0..90)
    region: BBox  # where the labels are
    count: int  # labels the angle was read from


@dataclass(frozen=True)
class LabelBlob:
    """One tick label on a raster, found from its ink: the glyphs grouped by proximity."""

    bbox: BBox  # figure pixels
    angle: float | None  # reading direction, degrees counter-clockwise in (-90, 90]; None: not measurable
    glyphs: int  # glyph components in the label
    mask: np.ndarray  # the label's ink inside bbox (bool), so a neighbour's ink can be left out
    glyph_ids: np.ndarray  # inside bbox: a number per glyph of text size, 0 elsewhere (dots left out)
    clipped: bool  # may run on past the image's edge (or the strip read): its text may be incomplete


MIN_ELONGATION = 2.0  # ink spread along / across: text lines are long, single glyphs are not
BASELINE_SEARCH = 12.0  # degrees either side of the rectangles' angle searched for the baseline
GLYPH_GAP_SHARE = 0.45  # glyphs closer than this share of the glyph height belong to one label
# Words of one label: an ink gap along the reading direction up to this share of the text's height
# across it. A word space is 0.25-0.33 em and side bearings add ~0.1 em (Helvetica/Arial/DejaVu
# metrics, from memory), against a text height (ascender to descender) of 0.7-0.95 em.
WORD_GAP_SHARE = 1.0
ACROSS_OVERLAP = 0.6  # words of one line share this share of the thinner one's extent across the line
MAX_LABEL_LINES = 3  # a label wrapped onto more lines than this is not a tick label
CROSSING_SINE = 0.5  # labels stand side by side across their reading direction when it meets the axis at 30 degrees or more


def _fold(angle: float) -> float:
    """A line's direction folded to (-90, 90]: text is read left to right."""
    return angle - 180 if angle > 90 else angle + 180 if angle <= -90 else angle


def _label_angle(ink: np.ndarray, glyph_centres: np.ndarray) -> float | None:
    """A label's reading direction (degrees counter-clockwise), None when it shows none.

    The rectangle of least area around the label's ink lies along its reading direction: its
    long sides touch the glyph tops and bottoms, so glyph shapes do not tilt it (the principal
    axis of the ink does: a capital at the start pulls it by 2-5 degrees). A label that is not
    longer than tall ('Q1' upright or rotated) falls back to the line through its glyph centres;
    a single glyph shows no direction.
    """
    import cv2

    ys, xs = np.nonzero(ink)
    if len(xs) < 8:
        return None
    (_, _), (width, height), angle = cv2.minAreaRect(np.column_stack([xs, ys]).astype(np.float32))
    long, short = max(width, height), min(width, height)
    if long >= MIN_ELONGATION * short or (len(glyph_centres) >= 2 and long >= 1.3 * short):
        long_side = angle if width >= height else angle + 90  # cv2 angle: of the 'width' side, image rows down
        return _fold(-long_side)
    if len(glyph_centres) >= 2:
        centred = glyph_centres - glyph_centres.mean(axis=0)
        vx, vy = np.linalg.eigh(np.cov(centred.T))[1][:, 1]
        return _fold(float(np.degrees(np.arctan2(-vy, vx))))
    return None


def _label_row(stats: np.ndarray, side: str, glyph_height: float) -> np.ndarray:
    """The labels nearest the axis: tops aligned under the x axis, right ends beside the y axis.

    The edge shared by the most labels near the axis wins, so a stray mark nearer the axis
    (an i-dot, a tick label of the other axis) does not set the row.
    """
    edge = stats[:, 2].astype(float) if side == "x" else -(stats[:, 1] + stats[:, 3]).astype(float)
    tolerance = max(4.0, 0.6 * glyph_height)
    near = edge[edge <= edge.min() + 3 * glyph_height]
    support = [(np.abs(near - e) <= tolerance).sum() for e in near]
    reference = min(e for e, n in zip(near, support) if n == max(support))
    return stats[np.abs(edge - reference) <= tolerance]


def _label_strip(shape: tuple[int, int], plot: BBox, reach: int, side: str) -> tuple[int, int, int, int]:
    height, width = shape
    if side == "x":  # below the plot, wide enough for labels rotated away from their tick
        return (max(0, int(plot[0] - 0.08 * width)), min(height, int(plot[3]) + reach),
                min(width, int(plot[2] + 0.08 * width)), min(height, int(plot[3] + 0.35 * height)))
    return (0, max(0, int(plot[1] - 0.04 * height)), max(0, int(plot[0]) - reach),
            min(height, int(plot[3] + 0.04 * height)))


def _glyph_gap(glyph_ids: np.ndarray, angle: float | None) -> float | None:
    """The widest gap between consecutive glyphs of one label along its reading direction (pixels)."""
    ys, xs = np.nonzero(glyph_ids)
    owner = glyph_ids[ys, xs]
    found = np.unique(owner)
    if len(found) < 2:
        return None
    theta = np.radians(angle or 0.0)
    along = xs * np.cos(theta) - ys * np.sin(theta)  # image rows run down
    spans = sorted((along[owner == g].min(), along[owner == g].max()) for g in found)
    ends = np.maximum.accumulate([end for _, end in spans])
    return float(max(0.0, max(start - end for (start, _), end in zip(spans[1:], ends[:-1]))))


def _cut_off(ys: np.ndarray, xs: np.ndarray, angle: float | None, gap: float, shape: tuple[int, int], side: str) -> bool:
    """Whether a label's ink (strip coordinates) may run on past the strip's edge, which is the
    image's edge or the strip's limit: it comes within a pixel of an edge (cut across), or
    within one glyph gap of it along its reading direction, where a next glyph would start."""
    theta = np.radians(angle or 0.0)
    run_x, run_y = abs(np.cos(theta)), abs(np.sin(theta))
    height, width = shape
    edges = {"top": (ys.min(), run_y), "bottom": (height - 1 - ys.max(), run_y),
             "left": (xs.min(), run_x), "right": (width - 1 - xs.max(), run_x)}
    del edges["top" if side == "x" else "right"]  # the edge facing the axis: labels start beyond it
    return any(distance <= 1 + gap * run for distance, run in edges.values())


def _text_sized(labels: np.ndarray, row: np.ndarray, image_height: int, glyph_height: float) -> bool:
    """Whether a blob may be a label: at most 0.3 of the image tall, or a line of text however long
    (a long label turned upright): no thicker across its length than MAX_LABEL_LINES glyphs."""
    import cv2

    index, bx, by, bw, bh, _ = (int(v) for v in row)
    if bh <= 0.3 * image_height:
        return True
    ys, xs = np.nonzero(labels[by:by + bh, bx:bx + bw] == index)
    _, (width, height), _ = cv2.minAreaRect(np.column_stack([xs, ys]).astype(np.float32))
    return min(width, height) <= MAX_LABEL_LINES * glyph_height


def _row_direction(ink: np.ndarray, labels: np.ndarray, stats: np.ndarray) -> float | None:
    """The reading direction shared by the blobs of a row (degrees counter-clockwise, (-90, 90]):
    the axial mean (angles doubled, so that 90 and -90 agree) of the directions of the blobs
    long enough to show one, each weighted by its ink. None when no blob shows one."""
    total = 0j
    for index, bx, by, bw, bh, _ in stats:
        mask = (labels[by:by + bh, bx:bx + bw] == index) & ink[by:by + bh, bx:bx + bw]
        angle = _label_angle(mask, np.zeros((0, 2)))
        if angle is not None:
            total += np.count_nonzero(mask) * np.exp(2j * np.radians(angle))
    if abs(total) == 0:
        return None
    return _fold(float(np.degrees(np.angle(total)) / 2))


def _join_words(ink: np.ndarray, labels: np.ndarray, stats: np.ndarray,
                side: str) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Blobs that are words of one label joined into one: (labels, stats, remap), remap taking an
    old blob number to its label's.

    Where labels stand side by side across their reading direction (rotated labels under the
    x axis, level labels beside the y axis), a label's words lie on one line along it and its
    neighbours on parallel lines: words are joined when they overlap across the line
    (ACROSS_OVERLAP) and the gap along it is a word space (WORD_GAP_SHARE of the text height).
    The gap along the reading direction and the offset across it are judged apart (an
    isotropic reach that closed word spaces would also join neighbours set closer than a word
    space across the line). Level labels along the x axis are collinear with their neighbours and
    are grouped by their tick marks instead (labels_per_tick). Blobs much thicker across the line
    than the row's text (an axis title set the other way) are not words of it.
    """
    remap = np.arange(labels.max() + 1)
    angle = _row_direction(ink, labels, stats)
    axis_direction = 0.0 if side == "x" else 90.0
    if angle is None or len(stats) < 2 or abs(np.sin(np.radians(angle - axis_direction))) < CROSSING_SINE:
        return labels, stats, remap
    row = np.full(labels.max() + 1, -1)
    row[stats[:, 0]] = np.arange(len(stats))
    ys, xs = np.nonzero(ink)
    member = row[labels[ys, xs]]
    ys, xs, member = ys[member >= 0], xs[member >= 0], member[member >= 0]
    theta = np.radians(angle)
    along = xs * np.cos(theta) - ys * np.sin(theta)  # image rows run down
    across = xs * np.sin(theta) + ys * np.cos(theta)
    extents = []
    for values in (along, across):
        low, high = np.full(len(stats), np.inf), np.full(len(stats), -np.inf)
        np.minimum.at(low, member, values)
        np.maximum.at(high, member, values)
        extents.append((low, high + 1.0))
    (along0, along1), (across0, across1) = extents
    thickness = across1 - across0
    typical = float(np.median(thickness))
    i, j = np.triu_indices(len(stats), k=1)
    thin, thick = np.minimum(thickness[i], thickness[j]), np.maximum(thickness[i], thickness[j])
    overlap = np.minimum(across1[i], across1[j]) - np.maximum(across0[i], across0[j])
    gap = np.maximum(along0[j] - along1[i], along0[i] - along1[j])
    joined = (overlap >= ACROSS_OVERLAP * thin) & (gap <= WORD_GAP_SHARE * thick) & (thick <= 1.5 * typical)
    if not joined.any():
        return labels, stats, remap
    groups = connected_components(coo_matrix((np.ones(int(joined.sum())), (i[joined], j[joined])),
                                             shape=(len(stats), len(stats))), directed=False)[1]
    merged = []
    for group in np.unique(groups):
        rows = stats[groups == group]
        x0, y0 = rows[:, 1].min(), rows[:, 2].min()
        x1, y1 = (rows[:, 1] + rows[:, 3]).max(), (rows[:, 2] + rows[:, 4]).max()
        remap[rows[:, 0]] = rows[0, 0]
        merged.append((rows[0, 0], x0, y0, x1 - x0, y1 - y0, rows[:, 5].sum()))
    return remap[labels], np.array(merged, dtype=stats.dtype), remap


def raster_label_blobs(rgb: np.ndarray, plot: BBox, reach: int, side: str) -> tuple[LabelBlob, ...]:
    """Tick labels beside one axis as ink blobs with their reading direction, in order along the axis.

    reach: how far the tick marks stand out of the frame; the labels lie beyond it.
    """
    import cv2

    x0, y0, x1, y1 = _label_strip(rgb.shape[:2], plot, reach, side)
    if x1 - x0 < 5 or y1 - y0 < 5:
        return ()
    ink = ink_mask(rgb[y0:y1, x0:x1], background_rgb(rgb), threshold=80.0)
    glyph_labels, glyphs, centres = component_stats(ink, min_area=4)
    # Marks crossing the strip's edge on the axis side come from above it (the other axis's
    # labels at the corner, long tick marks): tick labels start clear of the ticks.
    facing = glyph_labels[0] if side == "x" else glyph_labels[:, -1]
    crossing = np.zeros(glyph_labels.max() + 1, bool)
    crossing[facing[facing > 0]] = True
    if crossing.any():
        ink &= ~crossing[glyph_labels]
    glyphs_kept = (glyphs[:, 4] <= 0.3 * rgb.shape[0]) & ~crossing[glyphs[:, 0]]  # taller: shapes, not text
    glyphs, centres = glyphs[glyphs_kept], centres[glyphs_kept]
    if len(glyphs) == 0:
        return ()
    glyph_height = float(np.median(np.maximum(glyphs[:, 3], glyphs[:, 4])))
    radius = max(1, int(round(GLYPH_GAP_SHARE * glyph_height / 2)))
    disc = cv2.getStructuringElement(cv2.MORPH_ELLIPSE, (2 * radius + 1, 2 * radius + 1))
    merged = cv2.dilate(ink.astype(np.uint8), disc)
    labels, stats, _ = component_stats(merged, min_area=12)
    stats = stats[np.array([_text_sized(labels, row, rgb.shape[0], glyph_height) for row in stats], bool)]
    if len(stats) == 0:
        return ()
    owner_of = np.zeros(glyph_labels.max() + 1, int)  # the label each glyph belongs to
    owner_of[glyph_labels[ink]] = labels[ink]
    owner = owner_of[glyphs[:, 0]]
    large = glyphs[:, 5] >= 0.15 * np.median(glyphs[:, 5])  # dots and accents do not mark the line
    # A label holds a glyph of text size: fragments of tick marks and frame lines do not.
    texty = np.isin(stats[:, 0], owner[large & (np.maximum(glyphs[:, 3], glyphs[:, 4]) >= 0.5 * glyph_height)])
    # Beside the plot along the axis: the other axis's labels reach into the strip at its corner.
    if side == "x":
        beside = x0 + stats[:, 1] + stats[:, 3] > plot[0]
    else:
        middle = y0 + stats[:, 2] + stats[:, 4] / 2
        beside = (middle >= plot[1] - glyph_height) & (middle <= plot[3] + glyph_height)
    stats = stats[texty & beside]
    if len(stats) == 0:
        return ()
    labels, stats, remap = _join_words(ink, labels, stats, side)
    owner = remap[owner]
    found = []
    for index, bx, by, bw, bh, _ in _label_row(stats, side, glyph_height):
        mask = (labels[by:by + bh, bx:bx + bw] == index) & ink[by:by + bh, bx:bx + bw]
        members = (owner == index) & large
        ids = glyph_labels[by:by + bh, bx:bx + bw] * mask
        ids[~np.isin(ids, glyphs[members, 0])] = 0
        found.append((bx, by, mask, ids, _label_angle(mask, centres[members]), int(members.sum())))
    gaps = [g for g in (_glyph_gap(ids, angle) for _, _, _, ids, angle, _ in found) if g is not None]
    # A label's glyphs lie closer than the merging radius; the widest gap seen within labels of the row is
    # how far off the next glyph of a label running past the edge would start.
    gap = min(max(gaps, default=GLYPH_GAP_SHARE * glyph_height), GLYPH_GAP_SHARE * glyph_height)
    blobs = []
    for bx, by, mask, ids, angle, count in found:
        ys, xs = np.nonzero(mask)
        left, top = float(x0 + bx), float(y0 + by)
        blobs.append(LabelBlob(bbox=(left, top, left + mask.shape[1], top + mask.shape[0]),
                               angle=angle, glyphs=count, mask=mask, glyph_ids=ids,
                               clipped=_cut_off(ys + by, xs + bx, angle, gap, ink.shape, side)))
    along = 0 if side == "x" else 1
    return tuple(sorted(blobs, key=lambda b: b.bbox[along] + b.bbox[along + 2]))


@measurement("label_blobs")
def label_blobs(figure: Figure, measurements) -> dict[str, tuple[LabelBlob, ...]]:
    """Raster tick labels found from their ink, per axis: {'x': (...), 'y': (...)}."""
    rgb, plot, reach = require_pixels(figure), measurements.get("plot_area"), measurements.get("tick_reach")
    return {side: raster_label_blobs(rgb, plot, reach, side) for side in ("x", "y")}


def _rectangle_angle(blobs: tuple[LabelBlob, ...]) -> float | None:
    """The angle at which the labels' bounding rectangles, turned to it, have the least total area.

    Of the two perpendicular answers, the reading direction is the one along which the labels
    are long. Only labels of two glyphs or more show a direction (a lone '1' is tall, yet may
    stand in a level row). None when no label shows one.
    """
    import cv2

    hulls = []  # a rectangle's extent along any direction is set by the convex hull of the ink
    for blob in blobs:
        ys, xs = np.nonzero(blob.mask)
        if len(xs) >= 8 and blob.glyphs >= 2:
            hull = cv2.convexHull(np.column_stack([xs, -ys]).astype(np.float32))
            hulls.append(hull.reshape(-1, 2).astype(float))
    if not hulls or all(b.angle is None for b in blobs):
        return None
    angles = np.arange(0.0, 90.0, 1.0)
    radians = np.radians(angles)
    along = np.stack([np.cos(radians), np.sin(radians)])
    across = np.stack([-np.sin(radians), np.cos(radians)])
    lengths = np.array([np.ptp(h @ along, axis=0) for h in hulls])  # labels x angles
    widths = np.array([np.ptp(h @ across, axis=0) for h in hulls])
    best = int(np.argmin((lengths * widths).sum(axis=0)))
    return _fold(angles[best] if lengths[:, best].sum() >= widths[:, best].sum() else angles[best] + 90.0)


def common_label_angle(blobs: tuple[LabelBlob, ...]) -> float | None:
    """The one reading direction of a row of labels (degrees counter-clockwise, (-90, 90]).

    Labels of one axis share their rotation, so the direction is searched jointly. First
    coarsely, from the labels' bounding rectangles (_rectangle_angle): a capital or a
    descender tilts the rectangle of a short word by several degrees. Then, within
    BASELINE_SEARCH of it, the angle at which the glyphs of each label stand on one
    baseline: their lowest points, in the frame turned to that angle, deviate least from
    the label's median, the third of largest deviations left out (so the descenders of g, p,
    y do not tilt it). None when no label shows a direction.
    """
    coarse = _rectangle_angle(blobs)
    if coarse is None:
        return None
    steps = np.arange(coarse - BASELINE_SEARCH, coarse + BASELINE_SEARCH + 0.01, 0.25)
    radians = np.radians(steps)
    across = np.stack([-np.sin(radians), np.cos(radians)])
    spread = np.zeros(len(steps))
    words = 0
    for blob in blobs:
        ys, xs = np.nonzero(blob.glyph_ids)
        owner = blob.glyph_ids[ys, xs]
        order = np.argsort(owner, kind="stable")
        owner = owner[order]
        starts = np.flatnonzero(np.concatenate([[True], owner[1:] != owner[:-1]]))
        if len(starts) < 3:  # two glyphs ('Q1': the tail of Q) may stand on no common line
            continue
        heights = np.column_stack([xs[order], -ys[order]]).astype(float) @ across  # pixels x angles
        bottoms = np.minimum.reduceat(heights, starts, axis=0)  # glyphs x angles
        deviations = np.sort(np.abs(bottoms - np.median(bottoms, axis=0)), axis=0)
        spread += deviations[:len(starts) - len(starts) // 3].sum(axis=0)  # descenders left out
        words += 1
    if not words:
        return coarse
    return _fold(float(steps[int(np.argmin(spread))]))


@measurement("label_directions")
def label_directions(figure: Figure, measurements) -> dict[str, float | None]:
    """common_label_angle of each raster axis's label blobs, found once for the angle rules and OCR."""
    return {side: common_label_angle(blobs) for side, blobs in measurements.get("label_blobs").items()}


def _raster_label_angle(blobs: tuple[LabelBlob, ...], angle: float | None) -> LabelAngle:
    if not blobs:
        raise MeasurementUnavailable("no tick labels found beside the axis")
    if angle is None:
        # Single glyphs ('A', '5') show no direction; upright glyphs are at most as wide as tall.
        if np.median([(b.bbox[2] - b.bbox[0]) / (b.bbox[3] - b.bbox[1]) for b in blobs]) > 1.0:
            raise MeasurementUnavailable("tick label direction not readable")
        angle = 0.0
    region = (min(b.bbox[0] for b in blobs), min(b.bbox[1] for b in blobs),
              max(b.bbox[2] for b in blobs), max(b.bbox[3] for b in blobs))
    return LabelAngle(angle=abs(angle), region=region, count=len(blobs))


def _vector_label_angle(figure: Figure, plot: BBox, side: str) -> LabelAngle:
    labels = _select_labels(figure.vector.texts, plot, side, figure.vector.scale)
    if not labels:
        raise MeasurementUnavailable(f"no {side} tick labels")
    folded = [min(abs(s.angle) % 180, 180 - abs(s.angle) % 180) for s in labels]
    region = (min(s.bbox[0] for s in labels), min(s.bbox[1] for s in labels),
              max(s.bbox[2] for s in labels), max(s.bbox[3] for s in labels))
    return LabelAngle(angle=float(np.median(folded)), region=region, count=len(labels))


def _side_label_angle(figure: Figure, measurements, side: str) -> LabelAngle:
    if is_vector(figure):
        return _vector_label_angle(figure, measurements.get("plot_area"), side)
    return _raster_label_angle(measurements.get("label_blobs")[side], measurements.get("label_directions")[side])


@measurement("tick_label_angle")
def tick_label_angle(figure: Figure, measurements) -> LabelAngle:
    """Rotation of the x-axis tick labels (vector: stated angle; raster: from the labels' glyphs)."""
    return _side_label_angle(figure, measurements, "x")


@measurement("y_tick_label_angle")
def y_tick_label_angle(figure: Figure, measurements) -> LabelAngle:
    """Rotation of the y-axis tick labels: the category labels of a horizontal bar chart."""
    return _side_label_angle(figure, measurements, "y")


# ------------------------------------------------------------------ label text (rasters)


def _turned_label(rgb: np.ndarray, blob: LabelBlob, angle: float, background: np.ndarray) -> np.ndarray:
    """The label alone (its neighbours' ink blanked), turned so that it reads horizontally."""
    import cv2

    x0, y0, x1, y1 = (int(round(v)) for v in blob.bbox)
    keep = cv2.dilate(blob.mask.astype(np.uint8), np.ones((5, 5), np.uint8)) > 0  # with its antialiased edges
    crop = np.empty((y1 - y0, x1 - x0, 3), np.uint8)
    crop[:] = background.astype(np.uint8)
    crop[keep] = rgb[y0:y1, x0:x1][keep]
    height, width = crop.shape[:2]
    turn = cv2.getRotationMatrix2D((width / 2, height / 2), -angle, 1.0)  # OpenCV: positive turns counter-clockwise
    cos, sin = abs(turn[0, 0]), abs(turn[0, 1])
    size = (int(np.ceil(width * cos + height * sin)) + 8, int(np.ceil(width * sin + height * cos)) + 8)
    turn[0, 2] += size[0] / 2 - width / 2
    turn[1, 2] += size[1] / 2 - height / 2
    colour = tuple(float(v) for v in background)
    return cv2.warpAffine(crop, turn, size, flags=cv2.INTER_CUBIC, borderValue=colour)


def _looks_like_label(text: str) -> bool:
    return bool(re.fullmatch(r"[A-Za-z0-9][A-Za-z0-9 .,'%&()/-]*", text)) and sum(c.isalnum() for c in text) >= 1


# OCR reads a tick mark's end or a speck beside a label as a quote mark.
_STRAY_QUOTES = "\"`\u201c\u201d\u201e\u2018\u2019"


def _read_line(image: np.ndarray) -> tuple[str, float]:
    text, confidence = ocr_line(image)
    return text.strip(_STRAY_QUOTES).strip(), confidence


NEAR_VERTICAL = 75.0  # degrees: text this steep runs up the page or down it, both common


def _read_label(rgb: np.ndarray, blob: LabelBlob, angle: float, background: np.ndarray) -> str:
    """The text of one label, turned level by the row's angle and read as one line.

    Labels of a row read left to right, so a slanted row has one reading direction; steep
    text may run up or down, so both turns are read and the one that reads as a label with
    the higher confidence is kept. A slanted label that does not read as one is tried upside
    down too.
    """
    text, confidence = _read_line(_turned_label(rgb, blob, angle, background))
    if abs(angle) < NEAR_VERTICAL and _looks_like_label(text):
        return text
    other, other_confidence = _read_line(_turned_label(rgb, blob, angle - 180.0, background))
    if (_looks_like_label(other), other_confidence) > (_looks_like_label(text), confidence):
        return other
    return text


def _merge_blobs(blobs: list[LabelBlob]) -> LabelBlob:
    """Blobs of one label (its words, found apart) as one blob."""
    if len(blobs) == 1:
        return blobs[0]
    x0, y0 = int(min(b.bbox[0] for b in blobs)), int(min(b.bbox[1] for b in blobs))
    x1, y1 = int(max(b.bbox[2] for b in blobs)), int(max(b.bbox[3] for b in blobs))
    mask = np.zeros((y1 - y0, x1 - x0), bool)
    ids = np.zeros((y1 - y0, x1 - x0), int)
    for blob in blobs:
        bx, by = int(blob.bbox[0]) - x0, int(blob.bbox[1]) - y0
        h, w = blob.mask.shape
        mask[by:by + h, bx:bx + w] |= blob.mask
        ids[by:by + h, bx:bx + w] = np.maximum(ids[by:by + h, bx:bx + w], blob.glyph_ids)
    return LabelBlob(bbox=(float(x0), float(y0), float(x1), float(y1)), angle=blobs[0].angle,
                     glyphs=sum(b.glyphs for b in blobs), mask=mask, glyph_ids=ids,
                     clipped=any(b.clipped for b in blobs))


def _split_blob(blob: LabelBlob, ticks: list[float]) -> list[LabelBlob]:
    """A level blob holding the labels of several ticks (set so close that they touch), cut
    between glyphs so that each piece is centred on its tick, as level labels are.

    The cuts minimise the summed distance of the pieces' centres from their ticks (dynamic
    programming over the glyphs in reading order).
    """
    ids = blob.glyph_ids
    columns = [np.flatnonzero((ids == g).any(axis=0)) for g in np.unique(ids[ids > 0])]
    spans = sorted((int(c.min()), int(c.max()) + 1) for c in columns)
    count = len(spans)
    if count < len(ticks):
        return [blob]
    starts = [start for start, _ in spans]
    ends = np.maximum.accumulate([stop for _, stop in spans])  # right end of glyphs 0..i
    # cost[i, k]: least summed offset of the first k pieces when they hold glyphs 0..i-1
    cost = np.full((count + 1, len(ticks) + 1), np.inf)
    back = np.zeros((count + 1, len(ticks) + 1), int)
    cost[0, 0] = 0.0
    for k in range(1, len(ticks) + 1):
        for stop in range(k, count + 1):
            for first in range(k - 1, stop):
                centre = blob.bbox[0] + (starts[first] + ends[stop - 1]) / 2
                total = cost[first, k - 1] + abs(centre - ticks[k - 1])
                if total < cost[stop, k]:
                    cost[stop, k], back[stop, k] = total, first
    bounds, stop = [], count
    for k in range(len(ticks), 0, -1):
        bounds.append((back[stop, k], stop))
        stop = back[stop, k]
    pieces = []
    for first, stop in reversed(bounds):  # cut columns midway in the gap between glyphs
        c0 = 0 if first == 0 else (int(ends[first - 1]) + starts[first]) // 2
        c1 = blob.mask.shape[1] if stop == count else (int(ends[stop - 1]) + starts[stop]) // 2
        mask, piece_ids = blob.mask[:, c0:c1], ids[:, c0:c1]
        pieces.append(LabelBlob(bbox=(blob.bbox[0] + c0, blob.bbox[1], blob.bbox[0] + c1, blob.bbox[3]),
                                angle=blob.angle, glyphs=len(np.unique(piece_ids[piece_ids > 0])),
                                mask=mask, glyph_ids=piece_ids, clipped=blob.clipped))
    return pieces


LEVEL_LABELS = 10.0  # degrees: labels this near level are centred on their ticks


def labels_per_tick(blobs: tuple[LabelBlob, ...], angle: float | None, marks: list[float], side: str) -> list[LabelBlob]:
    """The label blobs regrouped so that each tick mark has one: level labels are centred on
    their tick, so blobs nearest the same tick are words of one label, and a blob that
    reaches over several ticks holds several labels.

    The grouping must agree with the spacing of the ink: every gap it closes (between words
    of one label) narrower than every gap it keeps (between labels). Labels set between their
    ticks (a category axis with its ticks at the category boundaries) fail that test and keep
    their blobs as found, as do rotated labels and axes whose tick marks are not found.
    """
    if abs(angle or 0.0) > LEVEL_LABELS or len(marks) < 2 or not blobs:
        return list(blobs)
    along = 0 if side == "x" else 1
    marks = sorted(float(m) for m in marks)  # numpy scalars would compare elementwise with ("alone", x)
    reach = 0.5 * float(np.median(np.diff(marks)))
    pieces: list[tuple[LabelBlob, int]] = []  # with the blob each came from
    for source, blob in enumerate(blobs):
        covered = [m for m in marks if blob.bbox[along] <= m <= blob.bbox[along + 2]]
        found = _split_blob(blob, covered) if side == "x" and len(covered) >= 2 else [blob]
        pieces += [(piece, source) for piece in found]
    pieces.sort(key=lambda item: item[0].bbox[along])
    owners = []
    for piece, _ in pieces:
        middle = float(piece.bbox[along] + piece.bbox[along + 2]) / 2
        nearest = min(marks, key=lambda m: abs(m - middle))
        owners.append(nearest if abs(nearest - middle) <= reach else ("alone", middle))
    closed, kept = [], []
    for (first, source), (second, next_source), owner, next_owner in zip(pieces, pieces[1:], owners, owners[1:]):
        gap = second.bbox[along] - first.bbox[along + 2]
        if owner == next_owner:
            closed.append(gap)
        elif source != next_source:  # cuts made inside one blob are not gaps of the ink
            kept.append(gap)
    if closed and kept and max(closed) >= min(kept):
        return list(blobs)
    groups: dict[object, list[LabelBlob]] = {}
    for (piece, _), owner in zip(pieces, owners):
        groups.setdefault(owner, []).append(piece)
    return sorted((_merge_blobs(group) for group in groups.values()), key=lambda b: b.bbox[along] + b.bbox[along + 2])


def read_label_blobs(rgb: np.ndarray, blobs: list[LabelBlob], angle: float | None, side: str) -> tuple[Tick, ...]:
    """Each label's text, read by OCR with the label turned to read horizontally (_read_label).

    Only the labels are read, never the whole figure: recognition is the dearest step of the audit.
    """
    angle = 0.0 if angle is None else angle
    background = background_rgb(rgb)
    along = 0 if side == "x" else 1
    ticks = []
    for blob in blobs:
        text = _read_label(rgb, blob, angle, background)
        ticks.append(Tick(pixel=(blob.bbox[along] + blob.bbox[along + 2]) / 2, text=text, value=_number_text(text),
                          angle=angle, bbox=blob.bbox, clipped=blob.clipped))
    return tuple(ticks)


def _label_texts(figure: Figure, measurements, side: str) -> tuple[Tick, ...]:
    angle = measurements.get("label_directions")[side]
    blobs = labels_per_tick(measurements.get("label_blobs")[side], angle, measurements.get("tick_marks")[side], side)
    return read_label_blobs(require_pixels(figure), blobs, angle, side)


def _number_text(text: str) -> float | None:
    """The number of a label read by OCR, with the usual misreads of digits undone ('1O' -> 10)."""
    value = parse_number(text)
    if value is None and any(ch.isdigit() for ch in text):
        value = parse_number(text.translate(_OCR_DIGIT_FIXES))
    return value


@measurement("x_label_texts")
def x_label_texts(figure: Figure, measurements) -> tuple[Tick, ...]:
    """Raster x tick labels, one per tick where tick marks show, read one by one turned level (in order)."""
    return _label_texts(figure, measurements, "x")


@measurement("y_label_texts")
def y_label_texts(figure: Figure, measurements) -> tuple[Tick, ...]:
    """Raster y tick labels read one by one (top to bottom)."""
    return _label_texts(figure, measurements, "y")


_MONTHS = ["january", "february", "march", "april", "may", "june", "july", "august", "september", "october",
           "november", "december"]
_WEEKDAYS = ["monday", "tuesday", "wednesday", "thursday", "friday", "saturday", "sunday"]


def ordinal_key(label: str) -> float | None:
    """Position of a label in a natural sequence (month, weekday, Q1.., numbers), else None."""
    text = label.strip().lower()
    number = parse_number(text)
    if number is not None:
        return number
    word = text.rstrip(".")
    for vocabulary in (_MONTHS, _WEEKDAYS):  # the name or its abbreviation ('Sep', 'Sept'), not 'Saturn'
        for index, name in enumerate(vocabulary):
            if len(word) >= 3 and name.startswith(word):
                return float(index)
    match = re.fullmatch(r"([a-z]{0,8}?)\s*[-#]?\s*(\d+)", text)  # 'Q1', 'Week 3', 'Grade 10'
    if match:
        return float(match.group(2))
    return None


def could_end_ordered_label(fragment: str) -> bool:
    """Whether text could be the end of a label that ordinal_key orders (a label cut off at its
    start): it holds a digit, or lies within a month or weekday name (its end, or the end of
    an abbreviation of it)."""
    text = fragment.strip().lower().rstrip(".")
    return any(ch.isdigit() for ch in text) or any(text in name for name in _MONTHS + _WEEKDAYS)


def natural_order(labels: list[str]) -> str | None:
    """'numeric'/'calendar'/'ordinal' or 'alphabetical' when labels follow that order, else None."""
    if len(labels) < 2:
        return None
    keys = [ordinal_key(label) for label in labels]
    if all(k is not None for k in keys):
        ascending = all(a < b for a, b in zip(keys, keys[1:]))
        descending = all(a > b for a, b in zip(keys, keys[1:]))
        if ascending or descending:
            return "ordinal"
    folded = [label.strip().lower() for label in labels]
    if folded == sorted(folded) or folded == sorted(folded, reverse=True):
        return "alphabetical"
    return None


def is_ordered_vocabulary(labels: list[str]) -> bool:
    """Labels that name points of an ordered scale (numbers, months, weekdays, Q1..)."""
    return bool(labels) and all(ordinal_key(label) is not None for label in labels)
