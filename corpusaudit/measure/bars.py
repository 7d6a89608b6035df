"""Bars: rectangles in the plot area, their orientation, baseline, stacks and series.

Vector: filled rectangles as the PDF states them, clipped to the plot area (a bar cut by
the plot edge keeps the evidence that the axis was truncated). Raster: rectangular
connected regions of each palette colour inside the plot area.
"""

from __future__ import annotations

from dataclasses import dataclass

import cv2
import numpy as np

from corpusaudit.measure import measurement
from corpusaudit.measure.colour import colour_bins, extract_palette
from corpusaudit.measure.legend import in_any
from corpusaudit.measure.shapes import (
    background_rgb, bbox_area, colour_distance, colour_key, component_stats, intersect, is_rect_like, is_vector,
    require_pixels,
)
from corpusaudit.model import BBox, Figure, MeasurementUnavailable


PAGE_TINT = 30.0  # palette colours this close to the page (0..255 sRGB distance) are edge halos
RASTER_TOUCH = 4  # pixels: raster rectangles this close (a separator line, antialiasing) touch
# A bar is its colour before the closing too, but for grid lines over it and its antialiased rim
# (0.94 of the box or more on the second-renderer benchmark): a box under half its colour is
# pieces joined by the closing. Common practice (no source).
RAW_SHARE = 0.5


@dataclass(frozen=True)
class Bar:
    bbox: BBox  # clipped to the plot area, figure pixels
    colour: tuple[int, int, int]  # 8-bit sRGB


@dataclass(frozen=True)
class Stack:
    """The bars drawn at one category position; one segment unless stacked."""

    segments: tuple[Bar, ...]
    position: float  # centre along the category axis (pixels)
    start: float  # value-axis pixel at the baseline end
    end: float  # value-axis pixel at the far end
    bbox: BBox

    @property
    def length(self) -> float:
        return abs(self.end - self.start)


@dataclass(frozen=True)
class BarChart:
    orientation: str  # "vertical" (columns) or "horizontal"
    stacks: tuple[Stack, ...]  # in order along the category axis (left to right, top to bottom)
    baseline: float  # value-axis pixel where the bars start
    grouped: bool  # several series side by side per category
    colours: tuple[tuple[int, int, int], ...]

    @property
    def max_segments(self) -> int:
        return max(len(stack.segments) for stack in self.stacks)


def _vector_rects(figure: Figure, plot: BBox, frames: list[BBox]) -> list[Bar]:
    bars = []
    plot_area = bbox_area(plot)
    for path in figure.vector.paths:
        if not is_rect_like(path) or "f" not in path.kind or path.fill is None or path.fill_opacity < 0.05:
            continue
        clipped = intersect(path.bbox, plot)
        if clipped is None or bbox_area(clipped) > 0.9 * plot_area or in_any(path.bbox, frames):
            continue
        if min(clipped[2] - clipped[0], clipped[3] - clipped[1]) < 0.5:
            continue
        bars.append(Bar(bbox=clipped, colour=colour_key(path.fill)))
    return bars


def _raster_rects(rgb: np.ndarray, plot: BBox) -> list[Bar]:
    x0, y0, x1, y1 = (int(round(v)) for v in plot)
    inner = rgb[y0 + 2:y1 - 1, x0 + 2:x1 - 1]
    if inner.size == 0:
        return []
    bars = []
    page = background_rgb(rgb)
    for colour in extract_palette(_framed(inner), max_colours=12, min_share=0.01):
        rgb255 = np.asarray(colour.rgb) * 255.0
        if float(np.linalg.norm(rgb255 - page)) < PAGE_TINT:
            continue  # the halo of antialiased or JPEG-blurred edges against the page, not a bar
        raw = (colour_distance(inner, rgb255) < 28).astype(np.uint8)
        # Grid lines drawn over the bars and separator lines cut a bar into pieces: closing
        # bridges cuts up to RASTER_TOUCH pixels wide; opening then drops text and thin lines.
        mask = cv2.morphologyEx(raw, cv2.MORPH_CLOSE, np.ones((RASTER_TOUCH + 1, RASTER_TOUCH + 1), np.uint8))
        mask = cv2.morphologyEx(mask, cv2.MORPH_OPEN, np.ones((4, 4), np.uint8))
        _, stats, _ = component_stats(mask, min_area=12)
        for _, bx, by, bw, bh, area in stats:
            if area < 0.88 * bw * bh:
                continue  # not a rectangle: text, markers, a line
            if bw >= 0.9 * inner.shape[1] and bh >= 0.9 * inner.shape[0]:
                continue  # the plot's own panel colour (a tinted panel), not a bar
            if raw[by:by + bh, bx:bx + bw].mean() < RAW_SHARE:
                continue  # made by the closing from lines and edges (a grid line beside a bar's edge)
            box = (float(x0 + 2 + bx), float(y0 + 2 + by), float(x0 + 2 + bx + bw), float(y0 + 2 + by + bh))
            bars.append(Bar(bbox=_snap_to_plot(box, plot), colour=tuple(int(round(v)) for v in rgb255)))
    # Antialiased or JPEG-shifted edges of a bar form slivers of a near colour: larger rectangles win.
    kept: list[Bar] = []
    for bar in sorted(bars, key=lambda b: -bbox_area(b.bbox)):
        if all(bbox_area(intersect(bar.bbox, other.bbox) or (0, 0, 0, 0)) < 0.25 * bbox_area(bar.bbox) for other in kept):
            kept.append(bar)
    return kept


def _framed(inner: np.ndarray) -> np.ndarray:
    """The plot's inside with a rim of its own modal rim colour only where that colour is not
    covered by bars: bars that reach the plot's edges on most sides (a bar at the axis maximum,
    bars filling the band) must not make their colour the palette's background. The rim added
    is the lightest of the rim's common colours, which is the panel (bars are drawn on it)."""
    rim = np.concatenate([inner[0], inner[-1], inner[:, 0], inner[:, -1]], axis=0)
    keys = colour_bins(rim)
    rim = rim.astype(np.int32)
    counts = np.bincount(keys)
    common = np.flatnonzero(counts >= 0.1 * len(rim))  # colours along a tenth of the rim or more
    panel = max((rim[keys == key].mean(axis=0) for key in common), key=lambda c: float(c.sum()))
    return np.ascontiguousarray(cv2.copyMakeBorder(inner, 2, 2, 2, 2, cv2.BORDER_CONSTANT,
                                                   value=tuple(float(v) for v in panel)))


def _snap_to_plot(box: BBox, plot: BBox, tolerance: float = 3.5) -> BBox:
    """A raster bar that reaches the plot frame is taken to reach it exactly (antialiasing)."""
    x0, y0, x1, y1 = box
    return (plot[0] if x0 - plot[0] <= tolerance else x0, plot[1] if y0 - plot[1] <= tolerance else y0,
            plot[2] if plot[2] - x1 <= tolerance else x1, plot[3] if plot[3] - y1 <= tolerance else y1)


def _separable(intervals: list[tuple[float, float]], tolerance: float) -> bool:
    """Every pair of intervals is either the same interval or disjoint (bars side by side)."""
    ordered = sorted(intervals)
    for (a0, a1), (b0, b1) in zip(ordered, ordered[1:]):
        same = abs(a0 - b0) <= tolerance and abs(a1 - b1) <= tolerance
        if not same and b0 < a1 - tolerance:
            return False
    return True


def _orientation(bars: list[Bar], touch: float) -> str | None:
    xs = [(b.bbox[0], b.bbox[2]) for b in bars]
    ys = [(b.bbox[1], b.bbox[3]) for b in bars]
    vertical, horizontal = _separable(xs, touch), _separable(ys, touch)
    if vertical and not horizontal:
        return "vertical"
    if horizontal and not vertical:
        return "horizontal"
    if not vertical:
        return None
    widths = np.array([b.bbox[2] - b.bbox[0] for b in bars])
    heights = np.array([b.bbox[3] - b.bbox[1] for b in bars])
    return "vertical" if np.std(heights) / np.mean(heights) >= np.std(widths) / np.mean(widths) else "horizontal"


def bar_chart_from_rects(bars: list[Bar], plot: BBox, touch: float = 1.5) -> BarChart:
    """Group rectangles into stacks along the category axis and find the baseline.

    touch: how far apart (pixels) two edges may be and still count as one edge; exact for
    vector rectangles, a few pixels for raster ones (antialiasing, separator lines).
    """
    if len(bars) < 2:
        raise MeasurementUnavailable("fewer than two bars found")
    orientation = _orientation(bars, touch)
    if orientation is None:
        raise MeasurementUnavailable("rectangles do not form bars side by side")
    vertical = orientation == "vertical"
    across = (lambda b: (b.bbox[0], b.bbox[2])) if vertical else (lambda b: (b.bbox[1], b.bbox[3]))
    along = (lambda b: (b.bbox[1], b.bbox[3])) if vertical else (lambda b: (b.bbox[0], b.bbox[2]))
    groups: list[list[Bar]] = []
    for bar in sorted(bars, key=lambda b: across(b)[0]):
        if groups and abs(across(groups[-1][0])[0] - across(bar)[0]) <= touch and abs(across(groups[-1][0])[1] - across(bar)[1]) <= touch:
            groups[-1].append(bar)
        else:
            groups.append([bar])
    # Each stack contributes its two ends once (inner segment boundaries would outvote the base).
    ends = np.round(np.array([v for g in groups for v in (min(along(b)[0] for b in g), max(along(b)[1] for b in g))]))
    counts = np.array([(np.abs(ends - end) <= max(0.5, touch / 2)).sum() for end in ends])
    baseline = float(np.median(ends[np.abs(ends - ends[np.argmax(counts)]) <= max(0.5, touch / 2)]))
    if counts.max() < 0.5 * len(groups):
        raise MeasurementUnavailable("bars share no baseline")
    stacks = []
    for group in groups:
        lo = min(along(b)[0] for b in group)
        hi = max(along(b)[1] for b in group)
        if min(abs(lo - baseline), abs(hi - baseline)) > max(2.0, touch):
            continue  # floating rectangle: a legend swatch or an annotation, not a bar
        start, end = (lo, hi) if abs(lo - baseline) <= abs(hi - baseline) else (hi, lo)
        group = sorted(group, key=lambda b: abs(np.mean(along(b)) - baseline))
        contiguous = [group[0]]
        for bar in group[1:]:  # segments must touch the one before: a stack, not an overlay
            if min(abs(along(bar)[0] - along(contiguous[-1])[1]), abs(along(bar)[1] - along(contiguous[-1])[0])) <= touch:
                contiguous.append(bar)
        a0, a1 = across(group[0])
        box = (a0, min(lo, hi), a1, max(lo, hi)) if vertical else (min(lo, hi), a0, max(lo, hi), a1)
        stacks.append(Stack(segments=tuple(contiguous), position=(a0 + a1) / 2, start=start, end=end, bbox=box))
    if len(stacks) < 2:
        raise MeasurementUnavailable("fewer than two bars found")
    colours = tuple(dict.fromkeys(seg.colour for stack in stacks for seg in stack.segments))
    return BarChart(orientation=orientation, stacks=tuple(stacks), baseline=baseline,
                    grouped=_grouped(stacks, across), colours=colours)


def _grouped(stacks: list[Stack], across) -> bool:
    """Series side by side: bars touching their neighbours in runs, with the colours cycling."""
    if len(stacks) < 4:
        return False
    sequence = [stack.segments[0].colour for stack in stacks]
    distinct = len(set(sequence))
    if distinct < 2:
        return False
    width = np.median([across(s.segments[0])[1] - across(s.segments[0])[0] for s in stacks])
    gaps = np.array([across(b.segments[0])[0] - across(a.segments[0])[1] for a, b in zip(stacks, stacks[1:])])
    touching = gaps < 0.25 * width
    periodic = all(sequence[i] == sequence[i % distinct] for i in range(len(sequence)))
    return bool(periodic and touching.any() and not touching.all())


@measurement("bars")
def bars(figure: Figure, measurements) -> BarChart:
    plot = measurements.get("plot_area")
    if is_vector(figure):
        rects = _vector_rects(figure, plot, measurements.get("legend_boxes"))
    else:
        return bar_chart_from_rects(_raster_rects(require_pixels(figure), plot), plot, touch=RASTER_TOUCH)
    return bar_chart_from_rects(rects, plot)
