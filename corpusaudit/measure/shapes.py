"""Geometry helpers shared by the chart measurements: vector path tests and raster masks.

Nothing here is registered as a measurement; axes, bars, pie, lines, scatter and boxes
build on these functions.
"""

from __future__ import annotations

import math

import cv2
import numpy as np

from corpusaudit.measure.colour import colour_bins
from corpusaudit.model import BBox, Figure, MeasurementUnavailable, PathItem, RGB

NEUTRAL_CHROMA = 0.08  # max(rgb) - min(rgb) below this: a grey (axes, grid, text, frames)


def require_pixels(figure: Figure) -> np.ndarray:
    if figure.pixels is None:
        raise MeasurementUnavailable("figure has no pixels")
    return figure.pixels


def is_vector(figure: Figure) -> bool:
    return figure.vector is not None and bool(figure.vector.paths)


def is_neutral(colour: RGB | None) -> bool:
    return colour is not None and (max(colour) - min(colour)) < NEUTRAL_CHROMA


def colour_key(colour: RGB | None) -> tuple[int, int, int] | None:
    """A hashable colour, rounded to 8-bit levels, to group paths by colour."""
    return None if colour is None else tuple(int(round(c * 255)) for c in colour)


def bbox_area(box: BBox) -> float:
    return max(0.0, box[2] - box[0]) * max(0.0, box[3] - box[1])


def intersect(a: BBox, b: BBox) -> BBox | None:
    box = (max(a[0], b[0]), max(a[1], b[1]), min(a[2], b[2]), min(a[3], b[3]))
    return box if box[2] > box[0] and box[3] > box[1] else None


def union_box(boxes: list[BBox]) -> BBox | None:
    """The smallest box holding every box; None for none."""
    if not boxes:
        return None
    return (float(min(b[0] for b in boxes)), float(min(b[1] for b in boxes)),
            float(max(b[2] for b in boxes)), float(max(b[3] for b in boxes)))


def contains(outer: BBox, inner: BBox, tolerance: float = 0.0) -> bool:
    return (inner[0] >= outer[0] - tolerance and inner[1] >= outer[1] - tolerance
            and inner[2] <= outer[2] + tolerance and inner[3] <= outer[3] + tolerance)


def centre(box: BBox) -> tuple[float, float]:
    return ((box[0] + box[2]) / 2.0, (box[1] + box[3]) / 2.0)


def axis_aligned_segment(path: PathItem, tolerance: float = 0.5) -> str | None:
    """'h' or 'v' for a stroked two-point horizontal/vertical segment, else None."""
    if "s" not in path.kind or len(path.points) != 2:
        return None
    (x0, y0), (x1, y1) = path.points
    if abs(y0 - y1) <= tolerance and abs(x1 - x0) > tolerance:
        return "h"
    if abs(x0 - x1) <= tolerance and abs(y1 - y0) > tolerance:
        return "v"
    return None


def polyline_length(points: list[tuple[float, float]]) -> float:
    """Length along the vertices. Plain Python: paths are short and a figure may hold thousands
    (a list, not a generator, for sum: the same additions in the same order, without resuming
    a generator per vertex)."""
    return sum([math.hypot(x1 - x0, y1 - y0) for (x0, y0), (x1, y1) in zip(points, points[1:])], 0.0)


def polygon_area(points: list[tuple[float, float]]) -> float:
    """Shoelace area. Plain Python: paths are short and a figure may hold thousands of them
    (summed from a list as polyline_length is)."""
    if len(points) < 3:
        return 0.0
    twice = sum([x0 * y1 - x1 * y0 for (x0, y0), (x1, y1) in zip(points, points[1:] + points[:1])])
    return abs(twice) / 2.0


ROUNDED_FILL = 0.92  # polygon area / box area from which a closed path is a rectangle with rounded corners


def is_rect_like(path: PathItem) -> bool:
    """A rectangle, or a closed path that nearly fills its box: a rectangle with rounded corners
    (a circle fills 0.785 of its box, a wedge or a rotated rectangle less)."""
    if path.is_rect:
        return True
    x0, y0, x1, y1 = path.bbox
    box = (x1 - x0) * (y1 - y0)
    return path.closed and len(path.points) >= 8 and box > 0 and polygon_area(path.points) >= ROUNDED_FILL * box


# ------------------------------------------------------------------ raster helpers


def background_rgb(rgb: np.ndarray) -> np.ndarray:
    """The modal border colour (0..255 floats): the figure's background."""
    border = np.concatenate([rgb[0], rgb[-1], rgb[:, 0], rgb[:, -1]], axis=0)
    keys = colour_bins(border)
    modal = np.bincount(keys).argmax()
    return border[keys == modal].mean(axis=0)


_CHANNEL_SUM = np.ones((1, 3), np.float32)


def colour_distance(rgb: np.ndarray, colour: np.ndarray) -> np.ndarray:
    """Euclidean distance in 0..255 sRGB of every pixel from one colour (float32)."""
    if rgb.ndim == 3 and rgb.shape[2] == 3 and rgb.dtype == np.uint8 and rgb.strides[2] == 1 and rgb.size:
        # OpenCV converts while it subtracts: about four times faster than numpy's
        # float copy, squares and sum, with the same float32 result.
        r, g, b = (float(v) for v in np.asarray(colour, np.float64).reshape(3))
        difference = cv2.subtract(rgb, (r, g, b, 0.0), dtype=cv2.CV_32F)
        return cv2.sqrt(cv2.transform(cv2.multiply(difference, difference), _CHANNEL_SUM)).reshape(rgb.shape[:2])
    return np.sqrt(((rgb.astype(np.float32) - np.asarray(colour, np.float32)) ** 2).sum(axis=-1))


def distinct_colours(rgb: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The distinct colours of an HxWx3 uint8 image (n x 1 x 3, an image of its own) and each
    pixel's index into them (HxW). A chart holds a few hundred colours over hundreds of
    thousands of pixels: per-colour work is then done once per colour, not once per pixel."""
    red, green, blue = cv2.split(np.ascontiguousarray(rgb))
    codes = (red.astype(np.int32) << 16) | (green.astype(np.int32) << 8) | blue
    unique, index = np.unique(codes.ravel(), return_inverse=True)
    colours = np.stack([unique >> 16, (unique >> 8) & 255, unique & 255], axis=1).astype(np.uint8)
    return colours.reshape(-1, 1, 3), index.reshape(rgb.shape[:2])


def nearest_colour(rgb: np.ndarray, colours: list[np.ndarray]) -> tuple[np.ndarray, np.ndarray]:
    """Per pixel of an HxWx3 uint8 image: the index of the nearest of colours (the first on a
    tie) and the distance to it, as colour_distance measures it (float32)."""
    table, index = distinct_colours(rgb)
    distances = np.stack([colour_distance(table, colour) for colour in colours])
    return distances.argmin(axis=0).ravel()[index], distances.min(axis=0).ravel()[index]


def ink_mask(rgb: np.ndarray, background: np.ndarray | None = None, threshold: float = 60.0) -> np.ndarray:
    """Pixels that differ clearly from the background colour."""
    if background is None:
        background = background_rgb(rgb)
    return colour_distance(rgb, background) > threshold


def thin_lines(mask: np.ndarray, direction: str, min_length: int, max_thickness: int = 5) -> list[tuple[float, float, float]]:
    """Long thin horizontal ('h') or vertical ('v') lines of a binary mask: (position, start, end).

    position is the line's centre row (h) or column (v); start/end its extent. A line is a
    run of at least min_length pixels with background just beside it on one side, so the
    axis line under a row of bars counts and the inside of a wide bar does not.
    """
    ink = mask.astype(np.uint8) if direction == "h" else mask.T.astype(np.uint8)
    runs = cv2.morphologyEx(ink, cv2.MORPH_OPEN, np.ones((1, min_length), np.uint8))
    counts = runs.sum(axis=1)
    rows = np.flatnonzero(counts >= min_length)
    offset = max_thickness // 2 + 2
    # All candidate rows at once (a filled bar makes hundreds of them)
    above = (runs[np.maximum(rows - offset, 0)] & runs[rows]).sum(axis=1)
    below = (runs[np.minimum(rows + offset, len(runs) - 1)] & runs[rows]).sum(axis=1)
    rows = rows[np.minimum(above, below) <= 0.5 * counts[rows]]  # ink on both sides: inside a filled region
    lines: list[tuple[float, float, float]] = []
    group: list[int] = []
    for row in rows.tolist():
        if group and row - group[-1] > 1:
            lines.append(_line_of_rows(runs, group))
            group = []
        group.append(row)
    if group:
        lines.append(_line_of_rows(runs, group))
    return [line[:3] for line in lines if line[3] <= max_thickness]


def _line_of_rows(runs: np.ndarray, rows: list[int]) -> tuple[float, float, float, int]:
    columns = np.flatnonzero(runs[rows].any(axis=0))
    return (float(np.mean(rows)), float(columns.min()), float(columns.max() + 1), len(rows))


def component_stats(mask: np.ndarray, min_area: int = 1) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(labels, stats, centroids) of 8-connected components, stats rows for area >= min_area."""
    count, labels, stats, centroids = cv2.connectedComponentsWithStats(mask.astype(np.uint8), connectivity=8)
    keep = np.flatnonzero(stats[:, cv2.CC_STAT_AREA] >= min_area)
    keep = keep[keep > 0]
    return labels, np.column_stack([keep, stats[keep]]), centroids[keep]
