"""Box plots: boxes with their medians, in order along the category axis.

Described for vertical boxes (categories along x, values up y). Vector: rectangles (stroked
or filled) in the plot area that hold a horizontal median segment spanning their width and
have a whisker at their centre. Raster: outlined boxes are three or more horizontal strokes
of one width joined by vertical sides, the inner one the median; filled boxes are solid
rectangles holding a full-width line of another colour; both need a whisker leaving the
middle of the box. Horizontal boxes (categories down y, values along x) are the same figure
with x and y swapped, so they are found by the same steps on the transposed geometry; the
orientation holding more boxes wins, vertical on a tie.
"""

from __future__ import annotations

from dataclasses import dataclass

import cv2
import numpy as np

from corpusaudit.measure import measurement
from corpusaudit.measure.legend import in_any
from corpusaudit.measure.shapes import (
    axis_aligned_segment, background_rgb, bbox_area, colour_distance, intersect, is_vector, require_pixels,
)
from corpusaudit.model import BBox, Figure, MeasurementUnavailable


@dataclass(frozen=True)
class Box:
    bbox: BBox
    median: float  # pixel of the median line along the value axis (y for vertical boxes, x for horizontal)
    position: float  # pixel of the box centre along the category axis (x for vertical boxes, y for horizontal)
    orientation: str = "vertical"  # "vertical" (boxes stand on the x axis) or "horizontal" (along the y axis)


MEDIAN_BAR_PX = 4.0  # a filled bar at most this tall across a box is its median line


def _swap(box: BBox) -> BBox:
    """A box with x and y swapped: a horizontal box plot turned into a vertical one."""
    return (box[1], box[0], box[3], box[2])


def _rectangle(path) -> bool:
    """A rectangle: flagged so at extraction, or a polygon of four corners (a fifth closing it)
    each within half a pixel of a corner of its box (rounding can split a corner's coordinates)."""
    if path.is_rect:
        return True
    if not 4 <= len(path.points) <= 5:
        return False
    x0, y0, x1, y1 = path.bbox
    return all(min(abs(x - x0), abs(x - x1)) <= 0.5 and min(abs(y - y0), abs(y - y1)) <= 0.5 for x, y in path.points) \
        and len({(abs(x - x0) <= 0.5, abs(y - y0) <= 0.5) for x, y in path.points}) == 4


_SWAPPED = {"h": "v", "v": "h", None: None}


def _vector_boxes(figure: Figure, plot: BBox, frames: list[BBox], orientation: str) -> list[Box]:
    """Boxes of one orientation, found in the frame of vertical boxes (horizontal ones swapped x-y)."""
    vertical = orientation == "vertical"
    turn = (lambda box: box) if vertical else _swap
    plot, frames = turn(plot), [turn(frame) for frame in frames]
    paths = [(axis_aligned_segment(p) if vertical else _SWAPPED[axis_aligned_segment(p)], turn(p.bbox), p)
             for p in figure.vector.paths]
    # medians: stroked segments, or thin filled bars (how some libraries draw a median)
    thin = [b for _, b, p in paths if p.is_rect and "f" in p.kind
            and b[3] - b[1] <= MEDIAN_BAR_PX and b[2] - b[0] >= 2 * MEDIAN_BAR_PX]
    horizontal = [b for d, b, _ in paths if d == "h"] + thin
    vertical_segments = [b for d, b, _ in paths if d == "v"]
    found: list[tuple[BBox, float, float]] = []  # (box, median, middle) in the turned frame
    for _, bbox, path in paths:
        if not _rectangle(path) or intersect(bbox, plot) is None or in_any(bbox, frames):
            continue
        if bbox[3] - bbox[1] <= MEDIAN_BAR_PX:
            continue  # a median bar, not a box
        x0, y0, x1, y1 = bbox
        if bbox_area(bbox) > 0.5 * bbox_area(plot) or x1 - x0 < 2:
            continue
        medians = [b for b in horizontal if abs(b[0] - x0) <= 1.5 and abs(b[2] - x1) <= 1.5 and y0 - 0.5 <= b[1] <= y1 + 0.5]
        middle = (x0 + x1) / 2
        whiskers = [b for b in vertical_segments
                    if abs(b[0] - middle) <= 1.5 and (abs(b[3] - y0) <= 1.5 or abs(b[1] - y1) <= 1.5)]
        # A box filled and outlined as two paths is one box.
        if medians and whiskers and not any(max(abs(a - b) for a, b in zip(box, bbox)) <= 1.0 for box, _, _ in found):
            found.append((bbox, (medians[0][1] + medians[0][3]) / 2, middle))
    return [Box(bbox=turn(box), median=median, position=middle, orientation=orientation) for box, median, middle in found]


def _horizontal_segments(ink: np.ndarray, min_length: int) -> list[tuple[int, int, float]]:
    """(x0, x1, y) of the horizontal strokes of a mask at least min_length long."""
    runs = cv2.morphologyEx(ink, cv2.MORPH_OPEN, np.ones((1, min_length), np.uint8))
    count, _, stats, centroids = cv2.connectedComponentsWithStats(runs, connectivity=8)
    return [(int(stats[k, 0]), int(stats[k, 0] + stats[k, 2] - 1), float(centroids[k, 1]))
            for k in range(1, count) if stats[k, 3] <= 6]


def _outlined_boxes(inner: np.ndarray, ink: np.ndarray) -> list[tuple[BBox, float]]:
    """Unfilled boxes: three or more horizontal strokes of one width (Q3, median, Q1)
    joined by vertical sides at both ends, with a whisker leaving the middle of the top or
    the bottom. Caps are narrower and grid lines span the plot, so neither groups with a box."""
    height, width = ink.shape
    segments = [s for s in _horizontal_segments(ink, 8) if s[1] - s[0] <= 0.5 * width]
    found = []
    used: set[int] = set()
    for i, (x0, x1, _) in enumerate(segments):
        if i in used:
            continue
        group = [j for j, (a, b, _) in enumerate(segments) if abs(a - x0) <= 3 and abs(b - x1) <= 3]
        rows = sorted(segments[j][2] for j in group)
        used.update(group)
        if len(rows) < 3:
            continue
        top, bottom = int(round(rows[0])), int(round(rows[-1]))
        if bottom - top < 4:
            continue
        sides = [ink[top:bottom + 1, max(0, x - 2):x + 3].any(axis=1).mean() for x in (x0, x1)]
        if min(sides) < 0.8:
            continue
        centre = (x0 + x1) // 2
        above = ink[max(0, top - 6):max(0, top - 2), max(0, centre - 2):centre + 3]
        below = ink[bottom + 3:bottom + 7, max(0, centre - 2):centre + 3]
        if not (above.any() or below.any()):
            continue  # no whisker: a legend frame or a table, not a box plot
        inside = [r for r in rows[1:-1] if top + 1 < r < bottom - 1]
        if not inside:
            continue
        edge_colour = np.median(inner[top, x0:x1 + 1].reshape(-1, 3).astype(float), axis=0)
        # the median is the inner stroke; when several (a mean line), the one in its own colour
        median = max(inside, key=lambda r: float(np.linalg.norm(
            np.median(inner[int(round(r)), x0:x1 + 1].reshape(-1, 3).astype(float), axis=0) - edge_colour)))
        found.append(((float(x0), float(top), float(x1 + 1), float(bottom + 1)), float(median)))
    return found


def _filled_boxes(inner: np.ndarray, ink: np.ndarray) -> list[tuple[BBox, float]]:
    """Filled boxes: solid rectangles whose interior holds a full-width line of another
    colour (the median) and with a whisker at the middle of the top or bottom."""
    solid = cv2.morphologyEx(ink, cv2.MORPH_OPEN, np.ones((5, 5), np.uint8))  # whiskers and caps go
    contours, _ = cv2.findContours(solid, cv2.RETR_CCOMP, cv2.CHAIN_APPROX_SIMPLE)
    found, plain = [], []
    for contour in contours:
        bx, by, bw, bh = cv2.boundingRect(contour)
        if bw < 8 or bh < 6 or cv2.contourArea(contour) < 0.85 * bw * bh:
            continue
        interior = inner[by + 3:by + bh - 3, bx + 3:bx + bw - 3].astype(float)
        if interior.shape[0] < 3 or interior.shape[1] < 3:
            continue
        fill = np.median(interior.reshape(-1, 3), axis=0)
        lined = (colour_distance(interior, fill) > 50).mean(axis=1)
        rows = np.flatnonzero(lined >= 0.8)
        if len(rows) == 0:
            plain.append((bx, by, bw, bh))
        elif len(rows) <= 6 and _has_whisker(ink, bx, by, bw, bh):
            found.append(((float(bx), float(by), float(bx + bw), float(by + bh)), float(by + 3 + rows.mean())))
    # A median drawn in the page colour cuts a filled box in two: halves of one width, one
    # just above the other, joined by the median's gap.
    for upper in plain:
        for lower in plain:
            gap = lower[1] - (upper[1] + upper[3])
            if abs(upper[0] - lower[0]) <= 2 and abs(upper[2] - lower[2]) <= 2 and 0 <= gap <= MEDIAN_BAR_PX + 1:
                bx, by, bw, bh = upper[0], upper[1], upper[2], lower[1] + lower[3] - upper[1]
                if _has_whisker(ink, bx, by, bw, bh):
                    found.append(((float(bx), float(by), float(bx + bw), float(by + bh)), float(upper[1] + upper[3] + gap / 2)))
    return found


def _has_whisker(ink: np.ndarray, bx: int, by: int, bw: int, bh: int) -> bool:
    """Ink just above or below the middle of the box (no whisker: a bar or a legend swatch)."""
    bottom_ink = ink[min(ink.shape[0] - 1, by + bh + 2), bx + bw // 2 - 1:bx + bw // 2 + 2]
    top_ink = ink[max(0, by - 3), bx + bw // 2 - 1:bx + bw // 2 + 2]
    return bool(bottom_ink.any() or top_ink.any())


def _raster_plot_ink(rgb: np.ndarray, plot: BBox) -> tuple[np.ndarray, np.ndarray]:
    """The plot's inside and its ink mask (light grid lines stay out)."""
    x0, y0, x1, y1 = (int(round(v)) for v in plot)
    inner = np.ascontiguousarray(rgb[y0 + 2:y1 - 1, x0 + 2:x1 - 1])
    if inner.size == 0:
        raise MeasurementUnavailable("empty plot area")
    return inner, (colour_distance(inner, background_rgb(inner)) > 80).astype(np.uint8)


def _raster_boxes(inner: np.ndarray, ink: np.ndarray, plot: BBox, orientation: str) -> list[Box]:
    """Boxes of one orientation on a raster, found in the frame of vertical boxes (horizontal ones transposed)."""
    x0, y0 = (int(round(v)) for v in plot[:2])
    vertical = orientation == "vertical"
    if not vertical:
        inner, ink = np.ascontiguousarray(inner.transpose(1, 0, 2)), np.ascontiguousarray(ink.T)
    # the plot's corner in the turned frame, where the boxes' coordinates start
    left, top = (x0 + 2, y0 + 2) if vertical else (y0 + 2, x0 + 2)
    candidates = _outlined_boxes(inner, ink) + _filled_boxes(inner, ink)
    unique: list[Box] = []
    for box, median in sorted(candidates, key=lambda c: -bbox_area(c[0])):  # outline and fill of one box: keep one
        shifted = (box[0] + left, box[1] + top, box[2] + left, box[3] + top)
        position = (shifted[0] + shifted[2]) / 2
        if not any(abs(position - other.position) < 3 for other in unique):
            unique.append(Box(bbox=shifted if vertical else _swap(shifted), median=median + top, position=position,
                              orientation=orientation))
    return unique


@measurement("boxes")
def boxes(figure: Figure, measurements) -> list[Box]:
    """The boxes of a box plot in order along the category axis, all of one orientation."""
    plot = measurements.get("plot_area")
    vector = is_vector(figure)
    if vector:
        frames = measurements.get("legend_boxes")
    else:  # the ink is found once, searched in both orientations
        inner, ink = _raster_plot_ink(require_pixels(figure), plot)
    found: list[Box] = []
    for orientation in ("vertical", "horizontal"):  # more boxes wins; vertical on a tie
        candidates = (_vector_boxes(figure, plot, frames, orientation) if vector
                      else _raster_boxes(inner, ink, plot, orientation))
        if len(candidates) > len(found):
            found = candidates
    if len(found) < 2:
        raise MeasurementUnavailable("fewer than two boxes found")
    return sorted(found, key=lambda b: b.position)
