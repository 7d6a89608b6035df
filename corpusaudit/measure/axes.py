"""Plot area, axes, tick marks and tick labels, for vector and raster figures.

The value range of an axis is extrapolated from its labelled ticks: a linear fit
value = a * pixel + b through at least two numeric tick labels, checked for linearity,
then evaluated at the plot-area edges. So a truncated axis is measured, not guessed.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import numpy as np

from corpusaudit.measure import measurement
from corpusaudit.measure.shapes import (
    axis_aligned_segment, background_rgb, bbox_area, colour_distance, component_stats, ink_mask,
    is_neutral, is_vector, require_pixels, thin_lines,
)
from corpusaudit.measure.text import merge_words_into_lines, ocr_words, parse_number
from corpusaudit.model import BBox, Figure, MeasurementUnavailable, TextSpan

LINEARITY_TOLERANCE = 0.02  # largest fit residual, as a share of the labelled value range
_OCR_DIGIT_FIXES = str.maketrans({"O": "0", "o": "0", "D": "0", "l": "1", "I": "1", "|": "1", "S": "5", "—": "-"})


@dataclass(frozen=True)
class Tick:
    pixel: float  # position along the axis: x for the x axis, y for the y axis (figure pixels)
    text: str
    value: float | None  # the number the label states, if it is one
    angle: float  # label direction, degrees counter-clockwise
    bbox: BBox


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
    raise MeasurementUnavailable("no plot area (no axes frame or axis lines found)")


def _raster_plot_area(rgb: np.ndarray) -> BBox:
    height, width = rgb.shape[:2]
    background = background_rgb(rgb)
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
    # No dark frame: look for a flat panel that differs slightly from the page (ggplot-like styles).
    near = colour_distance(rgb, background) > 6
    if near.sum() < 0.1 * width * height:
        raise MeasurementUnavailable("no plot area (no axis lines or plot panel found)")
    pixels = rgb[near].astype(np.int32)
    keys = (pixels[:, 0] >> 2 << 12) | (pixels[:, 1] >> 2 << 6) | (pixels[:, 2] >> 2)
    modal = pixels[keys == np.bincount(keys).argmax()].mean(axis=0)
    panel = colour_distance(rgb, modal) < 8
    _, stats, _ = component_stats(panel, min_area=int(0.05 * width * height))
    if len(stats) == 0:
        raise MeasurementUnavailable("no plot area (no axis lines or plot panel found)")
    best = stats[np.argmax(stats[:, 5])]
    x, y, w, h = (float(v) for v in best[1:5])
    if w * h < 0.15 * width * height:
        raise MeasurementUnavailable("no plot area (plot panel too small)")
    return (x, y, x + w, y + h)


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


def _raster_tick_marks(rgb: np.ndarray, plot: BBox) -> dict[str, list[float]]:
    ink = ink_mask(rgb, threshold=45.0)
    height, width = ink.shape
    x0, y0, x1, y1 = (int(round(v)) for v in plot)
    result = {}
    below = ink[min(height - 1, y1 + 1):min(height, y1 + 4), max(0, x0 - 2):min(width, x1 + 3)]
    left = ink[max(0, y0 - 2):min(height, y1 + 3), max(0, x0 - 4):max(0, x0 - 1)]
    for side, strip, offset in (("x", below, max(0, x0 - 2)), ("y", left.T, max(0, y0 - 2))):
        if strip.size == 0 or strip.shape[0] < 2:
            result[side] = []
            continue
        column = strip.all(axis=0)
        edges = np.flatnonzero(np.diff(np.concatenate([[0], column.astype(np.int8), [0]])))
        runs = [(start, stop) for start, stop in zip(edges[::2], edges[1::2]) if stop - start <= 5]
        result[side] = [offset + (start + stop - 1) / 2.0 for start, stop in runs]
    return result


@measurement("tick_marks")
def tick_marks(figure: Figure, measurements) -> dict[str, list[float]]:
    """Major tick mark positions: {'x': [x pixels], 'y': [y pixels]}."""
    plot = measurements.get("plot_area")
    if is_vector(figure):
        return _vector_tick_marks(figure, plot)
    return _raster_tick_marks(require_pixels(figure), plot)


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


def _number(span: TextSpan) -> float | None:
    value = parse_number(span.text)
    if value is None and span.font == "ocr" and any(ch.isdigit() for ch in span.text):
        value = parse_number(span.text.translate(_OCR_DIGIT_FIXES))
    return value


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


def _build_axis(side: str, labels: list[TextSpan], marks: list[float], extent: tuple[float, float]) -> Axis:
    if side == "x":
        positions = [(s.bbox[0] + s.bbox[2]) / 2 for s in labels]
    else:
        positions = [(s.bbox[1] + s.bbox[3]) / 2 for s in labels]
    if marks and len(marks) == len(labels):  # one label per major tick: pair them in order
        positions = sorted(marks)
    elif marks:
        spacing = float(np.median(np.diff(marks))) if len(marks) > 1 else float("inf")
        positions = [min(marks, key=lambda m: abs(m - p)) if min(abs(m - p) for m in marks) < 0.4 * spacing else p
                     for p in positions]
    ticks = tuple(Tick(pixel=float(p), text=s.text, value=_number(s), angle=s.angle, bbox=s.bbox)
                  for p, s in zip(positions, labels))
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
    return max(lengths, default=0) + 3


def _raster_label_spans(rgb: np.ndarray, plot: BBox, marks: dict[str, list[float]]) -> list[TextSpan]:
    height, width = rgb.shape[:2]
    reach = _tick_length(ink_mask(rgb, threshold=45.0), plot, marks)
    pad_y, pad_x = 0.06 * height, 0.06 * width
    left = ocr_words(rgb, (0, plot[1] - pad_y, plot[0] - reach, plot[3] + pad_y), psm=6)
    below = ocr_words(rgb, (plot[0] - pad_x, plot[3] + reach, plot[2] + pad_x, min(height, plot[3] + 0.25 * height)), psm=6)
    return merge_words_into_lines(left) + merge_words_into_lines(below)


@measurement("axes")
def axes(figure: Figure, measurements) -> Axes:
    """Plot area with both axes: tick labels, their numbers and the linear value scale."""
    plot = measurements.get("plot_area")
    marks = measurements.get("tick_marks")
    if is_vector(figure):
        spans, scale = figure.vector.texts, figure.vector.scale
    else:
        spans, scale = _raster_label_spans(require_pixels(figure), plot, marks), 1.0
    x_labels = _select_labels(spans, plot, "x", scale)
    y_labels = _select_labels(spans, plot, "y", scale)
    return Axes(plot=plot,
                x=_build_axis("x", x_labels, marks["x"], (plot[0], plot[2])),
                y=_build_axis("y", y_labels, marks["y"], (plot[1], plot[3])))


# ------------------------------------------------------------------ label angle


@dataclass(frozen=True)
class LabelAngle:
    angle: float  # magnitude of the rotation of the x tick labels, degrees (0..90)
    region: BBox  # where the labels are
    count: int  # labels the angle was read from


def _raster_label_angle(rgb: np.ndarray, plot: BBox, marks: dict[str, list[float]]) -> LabelAngle:
    import cv2

    height, width = rgb.shape[:2]
    top = int(plot[3]) + _tick_length(ink_mask(rgb, threshold=45.0), plot, marks)
    bottom = min(height, int(plot[3] + 0.35 * height))
    x0, x1 = max(0, int(plot[0]) + 1), min(width, int(plot[2] + 0.08 * width))
    if bottom - top < 5:
        raise MeasurementUnavailable("no room below the plot area for tick labels")
    background = background_rgb(rgb)
    ink = ink_mask(rgb[top:bottom, x0:x1], background, threshold=80.0).astype(np.uint8)
    merged = cv2.dilate(ink, np.ones((3, 3), np.uint8), iterations=2)
    labels, stats, _ = component_stats(merged, min_area=12)
    if len(stats) == 0:
        raise MeasurementUnavailable("no tick labels below the plot area")
    first_row = stats[:, 2].min()
    row = stats[stats[:, 2] <= first_row + max(4, 0.02 * height)]
    angles, elongated_any = [], False
    for index, bx, by, bw, bh, _ in row:
        ys, xs = np.nonzero((labels[by:by + bh, bx:bx + bw] == index) & (ink[by:by + bh, bx:bx + bw] > 0))
        if len(xs) < 8:
            continue
        coords = np.column_stack([xs, ys]).astype(float)
        coords -= coords.mean(axis=0)
        eigenvalues, eigenvectors = np.linalg.eigh(np.cov(coords.T))
        elongation = np.sqrt(eigenvalues[1] / max(eigenvalues[0], 1e-9))
        if elongation >= 2.2:
            vx, vy = eigenvectors[:, 1]
            angles.append(abs(np.degrees(np.arctan2(-vy, vx))) % 180)
            elongated_any = True
        elif bw >= 0.6 * bh:
            angles.append(0.0)
    if not angles:
        raise MeasurementUnavailable("tick label direction not readable")
    folded = [min(a, 180 - a) for a in angles]
    region = (float(x0 + row[:, 1].min()), float(top + row[:, 2].min()),
              float(x0 + (row[:, 1] + row[:, 3]).max()), float(top + (row[:, 2] + row[:, 4]).max()))
    if elongated_any and len(row) >= 2 and len(folded) < 0.5 * len(row):
        raise MeasurementUnavailable("tick label direction not readable")
    return LabelAngle(angle=float(np.median(folded)), region=region, count=len(folded))


@measurement("tick_label_angle")
def tick_label_angle(figure: Figure, measurements) -> LabelAngle:
    """Rotation of the x-axis tick labels (vector: stated angle; raster: label blob direction)."""
    plot = measurements.get("plot_area")
    if is_vector(figure):
        labels = _select_labels(figure.vector.texts, plot, "x", figure.vector.scale)
        if not labels:
            raise MeasurementUnavailable("no x tick labels")
        folded = [min(abs(s.angle) % 180, 180 - abs(s.angle) % 180) for s in labels]
        region = (min(s.bbox[0] for s in labels), min(s.bbox[1] for s in labels),
                  max(s.bbox[2] for s in labels), max(s.bbox[3] for s in labels))
        return LabelAngle(angle=float(np.median(folded)), region=region, count=len(labels))
    return _raster_label_angle(require_pixels(figure), plot, measurements.get("tick_marks"))


_MONTHS = ["jan", "feb", "mar", "apr", "may", "jun", "jul", "aug", "sep", "oct", "nov", "dec"]
_WEEKDAYS = ["mon", "tue", "wed", "thu", "fri", "sat", "sun"]


def _ordinal_key(label: str) -> float | None:
    """Position of a label in a natural sequence (month, weekday, Q1.., numbers), else None."""
    text = label.strip().lower()
    number = parse_number(text)
    if number is not None:
        return number
    for vocabulary in (_MONTHS, _WEEKDAYS):
        if text[:3] in vocabulary and text.isalpha():
            return float(vocabulary.index(text[:3]))
    match = re.fullmatch(r"([a-z]{0,8}?)\s*[-#]?\s*(\d+)", text)  # 'Q1', 'Week 3', 'Grade 10'
    if match:
        return float(match.group(2))
    return None


def natural_order(labels: list[str]) -> str | None:
    """'numeric'/'calendar'/'ordinal' or 'alphabetical' when labels follow that order, else None."""
    if len(labels) < 2:
        return None
    keys = [_ordinal_key(label) for label in labels]
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
    return bool(labels) and all(_ordinal_key(label) is not None for label in labels)
