"""Box plots: boxes with their medians, in order along the category axis (vertical boxes).

Vector: rectangles (stroked or filled) in the plot area that hold a horizontal median
segment spanning their width and have a whisker at their centre. Raster: rectangular
outlines or fills whose interior holds a full-width line of another colour.
"""

from __future__ import annotations

from dataclasses import dataclass

import cv2
import numpy as np

from corpusaudit.measure import measurement
from corpusaudit.measure.legend import in_any
from corpusaudit.measure.shapes import (
    axis_aligned_segment, bbox_area, colour_distance, intersect, is_vector, require_pixels,
)
from corpusaudit.model import BBox, Figure, MeasurementUnavailable


@dataclass(frozen=True)
class Box:
    bbox: BBox
    median: float  # y pixel of the median line
    position: float  # x pixel of the box centre


def _vector_boxes(figure: Figure, plot: BBox, frames: list[BBox]) -> list[Box]:
    segments = [(axis_aligned_segment(p), p.bbox) for p in figure.vector.paths]
    horizontal = [b for d, b in segments if d == "h"]
    vertical = [b for d, b in segments if d == "v"]
    boxes = []
    for path in figure.vector.paths:
        if not path.is_rect or intersect(path.bbox, plot) is None or in_any(path.bbox, frames):
            continue
        x0, y0, x1, y1 = path.bbox
        if bbox_area(path.bbox) > 0.5 * bbox_area(plot) or x1 - x0 < 2:
            continue
        medians = [b for b in horizontal if abs(b[0] - x0) <= 1.5 and abs(b[2] - x1) <= 1.5 and y0 - 0.5 <= b[1] <= y1 + 0.5]
        middle = (x0 + x1) / 2
        whiskers = [b for b in vertical if abs(b[0] - middle) <= 1.5 and (abs(b[3] - y0) <= 1.5 or abs(b[1] - y1) <= 1.5)]
        if medians and whiskers:
            boxes.append(Box(bbox=path.bbox, median=medians[0][1], position=middle))
    return boxes


def _raster_boxes(rgb: np.ndarray, plot: BBox) -> list[Box]:
    x0, y0, x1, y1 = (int(round(v)) for v in plot)
    inner = np.ascontiguousarray(rgb[y0 + 2:y1 - 1, x0 + 2:x1 - 1])
    panel = inner[0, 0].astype(float)
    ink = (colour_distance(inner, panel) > 50).astype(np.uint8)
    contours, hierarchy = cv2.findContours(ink, cv2.RETR_CCOMP, cv2.CHAIN_APPROX_SIMPLE)
    boxes = []
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
        if len(rows) == 0 or len(rows) > 6:
            continue
        bottom_ink = ink[min(ink.shape[0] - 1, by + bh + 2), bx + bw // 2 - 1:bx + bw // 2 + 2]
        top_ink = ink[max(0, by - 3), bx + bw // 2 - 1:bx + bw // 2 + 2]
        if not (bottom_ink.any() or top_ink.any()):
            continue  # no whisker: a bar or a legend swatch
        boxes.append(Box(bbox=(float(x0 + 2 + bx), float(y0 + 2 + by), float(x0 + 2 + bx + bw), float(y0 + 2 + by + bh)),
                         median=float(y0 + 2 + by + 3 + rows.mean()), position=float(x0 + 2 + bx + bw / 2)))
    unique: list[Box] = []
    for box in sorted(boxes, key=lambda b: -bbox_area(b.bbox)):  # outer outline and inner fill: keep one
        if not any(abs(box.position - other.position) < 3 for other in unique):
            unique.append(box)
    return unique


@measurement("boxes")
def boxes(figure: Figure, measurements) -> list[Box]:
    plot = measurements.get("plot_area")
    if is_vector(figure):
        found = _vector_boxes(figure, plot, measurements.get("legend_boxes"))
    else:
        found = _raster_boxes(require_pixels(figure), plot)
    if len(found) < 2:
        raise MeasurementUnavailable("fewer than two boxes found")
    return sorted(found, key=lambda b: b.position)
