"""Scatter markers: count, size, the share of marker area hidden by overlap, and markers
on or cut by the plot frame.

Hidden share is 1 - (area covered by the union of markers) / (sum of marker areas).
Vector: exact, by painting every marker's disk. Raster: isolated blobs give the size of
one marker; in clumps the number of markers is estimated from local coverage c under a
random-placement model (n a / S = -ln(1 - c)), so heavily overlapped clumps count for the
markers they hide. Markers count as on the frame only on sides where the plot panel ends.
"""

from __future__ import annotations

from dataclasses import dataclass

import cv2
import numpy as np

from corpusaudit.measure import measurement
from corpusaudit.measure.shapes import background_rgb, colour_distance, component_stats, is_vector, require_pixels
from corpusaudit.model import BBox, Figure, MeasurementUnavailable, PathItem


@dataclass(frozen=True)
class Markers:
    count: int  # markers found (raster: estimated)
    radius: float  # typical marker radius, pixels
    hidden_share: float  # 0..1
    edge_count: int  # markers touching or cut by the plot frame
    edge_boxes: tuple[BBox, ...]
    dense_region: BBox | None  # where most overlap is


def _marker_candidates(paths: list[PathItem], plot: BBox, frames: list[BBox], size: float) -> list[BBox]:
    """Boxes of the paths that may be markers: closed, 1 px to size across, in the plot area
    and outside legend frames. All paths are tested at once, by the comparisons intersect and
    in_any make (a scatter plot has thousands of paths)."""
    if not paths:
        return []
    x0, y0, x1, y1 = np.array([path.bbox for path in paths], dtype=np.float64).reshape(-1, 4).T
    closed = np.array([path.closed for path in paths], dtype=bool)
    width, height = x1 - x0, y1 - y0
    across = np.where(height > width, height, width)  # max(width, height)
    keep = closed & ~((across > size) | (across < 1.0))
    # intersect(bbox, plot) is not None: max() and min() keep the first of equals
    left, top = np.where(plot[0] > x0, plot[0], x0), np.where(plot[1] > y0, plot[1], y0)
    right, bottom = np.where(plot[2] < x1, plot[2], x1), np.where(plot[3] < y1, plot[3], y1)
    keep &= (right > left) & (bottom > top)
    for frame in frames:  # in_any: contains(frame, bbox, tolerance=1.0)
        keep &= ~((x0 >= frame[0] - 1.0) & (y0 >= frame[1] - 1.0) & (x1 <= frame[2] + 1.0) & (y1 <= frame[3] + 1.0))
    return [paths[i].bbox for i in np.flatnonzero(keep).tolist()]


def _vector_markers(figure: Figure, plot: BBox, frames: list[BBox]) -> Markers:
    size = 0.06 * max(plot[2] - plot[0], plot[3] - plot[1])
    boxes = _marker_candidates(figure.vector.paths, plot, frames, size)
    if len(boxes) < 3:
        raise MeasurementUnavailable("fewer than three markers found")
    array = np.array(boxes)
    centres = np.column_stack([(array[:, 0] + array[:, 2]) / 2, (array[:, 1] + array[:, 3]) / 2])
    radii = np.maximum((array[:, 2] - array[:, 0]), (array[:, 3] - array[:, 1])) / 2
    scale = 2.0  # paint at 2x for sub-pixel markers
    width, height = int((plot[2] - plot[0] + 4 * radii.max()) * scale) + 2, int((plot[3] - plot[1] + 4 * radii.max()) * scale) + 2
    origin = np.array([plot[0] - 2 * radii.max(), plot[1] - 2 * radii.max()])
    canvas = np.zeros((height, width), np.uint8)
    # every marker's centre and radius in canvas pixels at once, rounded half to even as round() does
    painted = np.rint((centres - origin) * scale).astype(np.int64)
    disk_radii = np.maximum(1, np.rint(radii * scale).astype(np.int64))
    for (cx, cy), radius in zip(painted.tolist(), disk_radii.tolist()):
        cv2.circle(canvas, (cx, cy), radius, 1, thickness=-1)
    sizes, counts = np.unique(disk_radii, return_counts=True)
    own = float(sum(_disk_pixels(radius) * count for radius, count in zip(sizes.tolist(), counts.tolist())))
    hidden = max(0.0, 1.0 - canvas.sum() / own)
    on_edge = (array[:, 0] < plot[0] + 0.5) | (array[:, 1] < plot[1] + 0.5) | (array[:, 2] > plot[2] - 0.5) | \
        (array[:, 3] > plot[3] - 0.5)
    edge = [tuple(boxes[i]) for i in np.flatnonzero(on_edge).tolist()]
    return Markers(count=len(boxes), radius=float(np.median(radii)), hidden_share=float(hidden),
                   edge_count=len(edge), edge_boxes=tuple(edge), dense_region=_dense_region(centres, plot))


_DISKS: dict[int, int] = {}


def _disk_pixels(radius: int) -> int:
    if radius not in _DISKS:
        template = np.zeros((2 * radius + 3, 2 * radius + 3), np.uint8)
        cv2.circle(template, (radius + 1, radius + 1), radius, 1, thickness=-1)
        _DISKS[radius] = int(template.sum())
    return _DISKS[radius]


def _dense_region(centres: np.ndarray, plot: BBox) -> BBox:
    """The box around the densest quarter of the markers."""
    if len(centres) < 4:
        return plot
    middle = np.median(centres, axis=0)
    nearest = centres[np.argsort(np.hypot(*(centres - middle).T))[: max(4, len(centres) // 4)]]
    return (float(nearest[:, 0].min()), float(nearest[:, 1].min()), float(nearest[:, 0].max()), float(nearest[:, 1].max()))


MARKER_SHARE = 0.06  # markers are at most this share of the plot's longer side across (as on vector figures)
BUBBLE_AREA_RANGE = 4.0  # 90th / 10th percentile of isolated marker areas beyond which markers are sized by data


def _raster_markers(rgb: np.ndarray, plot: BBox) -> Markers:
    x0, y0, x1, y1 = (int(round(v)) for v in plot)
    inner = np.ascontiguousarray(rgb[y0 + 2:y1 - 1, x0 + 2:x1 - 1])
    if inner.size == 0:
        raise MeasurementUnavailable("empty plot area")
    panel = background_rgb(inner)
    raw = (colour_distance(inner, panel) > 60).astype(np.uint8)
    opening = np.ones((3, 3), np.uint8)  # grid lines and text strokes go
    ink = cv2.morphologyEx(raw, cv2.MORPH_OPEN, opening)
    labels, stats, centroids, round_blobs = _round_blobs(ink)
    # Hollow markers (rings, open squares): a marker covers its inside as a filled one does (the vector
    # measurement paints disks either way), so holes no larger than a marker may be are filled, when that
    # shows more round markers than the outlines alone.
    filled = cv2.morphologyEx(_fill_holes(raw, MARKER_SHARE * max(plot[2] - plot[0], plot[3] - plot[1])),
                              cv2.MORPH_OPEN, opening)
    hollow = _round_blobs(filled)
    if hollow[3].sum() > round_blobs.sum():
        ink, (labels, stats, centroids, round_blobs) = filled, hollow
    if len(stats) < 3:
        raise MeasurementUnavailable("fewer than three markers found")
    areas = stats[:, 5].astype(float)
    if round_blobs.sum() < 3:
        raise MeasurementUnavailable("no isolated markers to measure their size")
    single = float(np.median(areas[round_blobs & (areas <= 2.5 * np.percentile(areas[round_blobs], 25))]))
    radius = float(np.sqrt(single / np.pi))
    # Bubbles: markers sized by a variable, so a large round blob is one large marker rather
    # than a clump of small ones (their isolated round blobs span a wide range of areas).
    round_areas = areas[round_blobs]
    bubbles = len(round_areas) >= 5 and np.percentile(round_areas, 90) > BUBBLE_AREA_RANGE * np.percentile(round_areas, 10)
    total_area, visible_area, bubble_count = 0.0, 0.0, 0
    cell = max(4, int(6 * radius))
    for index, (_, bx, by, bw, bh, area) in enumerate(stats):
        if area <= 1.6 * single or bubbles and round_blobs[index]:
            total_area += area
            visible_area += area
            bubble_count += 1
            continue
        blob = labels[by:by + bh, bx:bx + bw] == stats[index, 0]
        for cy in range(0, bh, cell):
            for cx in range(0, bw, cell):
                piece = blob[cy:cy + cell, cx:cx + cell]
                covered = float(piece.sum())
                if covered == 0:
                    continue
                coverage = min(covered / piece.size, 0.97)
                total_area += -np.log(1.0 - coverage) * piece.size if coverage > 0.5 else covered
                visible_area += covered
        bubble_count += max(1, round(area / float(np.median(round_areas))))
    hidden = max(0.0, 1.0 - visible_area / total_area) if total_area else 0.0
    frame = ink.shape
    left, top, right, bottom = _framed_sides(rgb, (x0, y0, x1, y1), panel)
    edge = [(float(x0 + 2 + bx), float(y0 + 2 + by), float(x0 + 2 + bx + bw), float(y0 + 2 + by + bh))
            for _, bx, by, bw, bh, area in stats
            if area <= 2.5 * single and (left and bx <= 1 or top and by <= 1 or right and bx + bw >= frame[1] - 1
                                         or bottom and by + bh >= frame[0] - 1)]
    centres = centroids + [x0 + 2, y0 + 2]
    count = bubble_count if bubbles else int(round(total_area / single))
    return Markers(count=count, radius=radius, hidden_share=float(hidden),
                   edge_count=len(edge), edge_boxes=tuple(edge), dense_region=_dense_region(centres, plot))


def _round_blobs(ink: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """Components of the ink with a flag for those shaped like one marker (about as wide as tall, solid)."""
    labels, stats, centroids = component_stats(ink, min_area=4)
    w, h, areas = (stats[:, k].astype(float) for k in (3, 4, 5))
    return labels, stats, centroids, (np.abs(w - h) <= 0.25 * np.maximum(w, h)) & (areas >= 0.6 * w * h)


def _fill_holes(ink: np.ndarray, largest: float) -> np.ndarray:
    """The ink with its enclosed holes filled where the hole is at most largest pixels across."""
    # 4-connected background: the counterpart of 8-connected ink, so a hole does not leak through a corner
    _, background, holes, _ = cv2.connectedComponentsWithStats((ink == 0).astype(np.uint8), connectivity=4)
    x, y, w, h = (holes[:, k] for k in range(4))
    height, width = ink.shape
    enclosed = (x > 0) & (y > 0) & (x + w < width) & (y + h < height) & (np.maximum(w, h) <= largest)
    enclosed[0] = False  # label 0 is the ink itself
    return (ink.astype(bool) | enclosed[background]).astype(np.uint8)


def _framed_sides(rgb: np.ndarray, plot: tuple[int, int, int, int], panel: np.ndarray) -> tuple[bool, ...]:
    """Which sides of the plot area (left, top, right, bottom) are a real boundary: an
    axis line runs along them, or the panel colour stops beyond them (the page). Where
    the panel goes on past a side (the plot area was taken from a grid cell), markers
    there are not cut by any frame."""
    height, width = rgb.shape[:2]
    x0, y0, x1, y1 = plot

    def real(line: np.ndarray, beyond: np.ndarray, axis: int) -> bool:
        if line.size and float((colour_distance(line, panel) > 60).any(axis=axis).mean()) >= 0.6:
            return True
        return beyond.size == 0 or float((colour_distance(beyond, panel) < 12).mean()) < 0.6

    return (real(rgb[y0:y1, max(0, x0 - 2):x0 + 3], rgb[y0:y1, max(0, x0 - 9):max(0, x0 - 3)], 1),
            real(rgb[max(0, y0 - 2):y0 + 3, x0:x1], rgb[max(0, y0 - 9):max(0, y0 - 3), x0:x1], 0),
            real(rgb[y0:y1, max(0, x1 - 2):x1 + 3], rgb[y0:y1, min(width, x1 + 3):min(width, x1 + 9)], 1),
            real(rgb[max(0, y1 - 2):y1 + 3, x0:x1], rgb[min(height, y1 + 3):min(height, y1 + 9), x0:x1], 0))


@measurement("markers")
def markers(figure: Figure, measurements) -> Markers:
    plot = measurements.get("plot_area")
    if is_vector(figure):
        return _vector_markers(figure, plot, measurements.get("legend_boxes"))
    return _raster_markers(require_pixels(figure), plot)
