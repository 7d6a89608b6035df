"""3D perspective effects: slanted faces of 3D bars, tilted (elliptic) pies.

Vector: filled four-sided paths with a slanted edge; the aspect of the union of the curved
wedges. Raster: regions of one colour whose outline is a quadrilateral with two parallel
slanted edges (the top or side of a box in perspective); the pie's outline, closed over
the separators between wedges, fitted with an ellipse.
"""

from __future__ import annotations

from dataclasses import dataclass

import cv2
import numpy as np

from corpusaudit.measure import measurement
from corpusaudit.measure.shapes import background_rgb, ink_mask, is_vector, require_pixels
from corpusaudit.model import BBox, Figure


@dataclass(frozen=True)
class Perspective:
    slanted_faces: int  # filled quadrilaterals with a pair of parallel slanted edges (3D box faces)
    pie_aspect: float | None  # minor/major axis of the pie outline; < 1 for a tilted pie
    region: BBox | None


def _slanted(points: np.ndarray) -> bool:
    """A quadrilateral whose edges are not all horizontal/vertical and that is a parallelogram-ish face."""
    edges = np.roll(points, -1, axis=0) - points
    angles = np.degrees(np.arctan2(edges[:, 1], edges[:, 0])) % 180
    off_axis = np.minimum(np.abs(angles - 90), np.minimum(angles, 180 - angles)) > 8
    return bool(off_axis.any())


def _vector_perspective(figure: Figure) -> Perspective:
    faces, boxes = 0, []
    for path in figure.vector.paths:
        if "f" not in path.kind or path.is_rect or path.fill is None:
            continue
        points = np.asarray(path.points)
        if len(points) >= 2 and np.allclose(points[0], points[-1]):
            points = points[:-1]
        if len(points) == 4 and _slanted(points) and (path.bbox[2] - path.bbox[0]) * (path.bbox[3] - path.bbox[1]) > 4:
            faces += 1
            boxes.append(path.bbox)
    curved = [p for p in figure.vector.paths if "f" in p.kind and not p.is_rect and len(p.points) >= 12]
    aspect = None
    if len(curved) >= 2:
        array = np.array([p.bbox for p in curved])
        w, h = array[:, 2].max() - array[:, 0].min(), array[:, 3].max() - array[:, 1].min()
        aspect = float(min(w, h) / max(w, h)) if max(w, h) > 0 else None
        if aspect is not None and aspect < 0.85:
            boxes.append((array[:, 0].min(), array[:, 1].min(), array[:, 2].max(), array[:, 3].max()))
    region = None
    if boxes:
        array = np.array(boxes)
        region = (float(array[:, 0].min()), float(array[:, 1].min()), float(array[:, 2].max()), float(array[:, 3].max()))
    return Perspective(slanted_faces=faces, pie_aspect=aspect, region=region)


MIN_FACE_EDGE = 6.0  # pixels: shorter quadrilateral edges are antialiasing or JPEG noise
SLANT_DEGREES = 10.0  # an edge this far from horizontal and vertical is slanted
PARALLEL_DEGREES = 6.0  # opposite edges of a face seen in parallel projection


def _edge_angles(quad: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    edges = np.roll(quad, -1, axis=0) - quad
    return np.hypot(edges[:, 0], edges[:, 1]), np.degrees(np.arctan2(edges[:, 1], edges[:, 0])) % 180


def _is_slanted_face(contour: np.ndarray) -> bool:
    """A region outlined by a polygon of four to eight straight edges, two of them slanted
    and parallel: the top or side of a box seen in perspective (or such faces merged when
    they share a colour). The outline must follow the polygon closely, so that a rectangle
    clipped by bars and grid lines, simplified to a few corners, does not count."""
    polygon = cv2.approxPolyDP(contour, 0.02 * cv2.arcLength(contour, True), True).reshape(-1, 2).astype(float)
    if not 4 <= len(polygon) <= 8:
        return False
    polygon_area = cv2.contourArea(polygon.astype(np.float32))
    if polygon_area <= 0 or not 0.9 <= cv2.contourArea(contour) / polygon_area <= 1.1:
        return False
    lengths, angles = _edge_angles(polygon)
    long_enough = lengths >= max(MIN_FACE_EDGE, 0.15 * lengths.max())
    slanted = long_enough & (np.minimum(np.abs(angles - 90), np.minimum(angles, 180 - angles)) > SLANT_DEGREES)
    candidates = np.flatnonzero(slanted)
    for i, first in enumerate(candidates):
        for second in candidates[i + 1:]:
            gap = abs(angles[first] - angles[second]) % 180
            if min(gap, 180 - gap) <= PARALLEL_DEGREES:
                return True
    return False


def _pie_outline(rgb: np.ndarray) -> tuple[float, BBox] | None:
    """Minor/major axis ratio of the pie's outline, and its box.

    The foreground is closed over the thin separators between wedges and its holes (a
    donut's centre, labels on the slices) are filled, so the pie is one region. An
    ellipse is fitted to its outline, leaving out points far from it (labels touching the
    rim); the outline must lie mostly on that ellipse, or the region is not a pie.
    """
    height, width = rgb.shape[:2]
    ink = ink_mask(rgb, background_rgb(rgb), threshold=25.0).astype(np.uint8)
    size = max(5, int(round(0.008 * max(height, width))) | 1)
    closed = cv2.morphologyEx(ink, cv2.MORPH_CLOSE, cv2.getStructuringElement(cv2.MORPH_ELLIPSE, (size, size)))
    contours, _ = cv2.findContours(closed, cv2.RETR_EXTERNAL, cv2.CHAIN_APPROX_NONE)
    if not contours:
        return None
    contour = max(contours, key=cv2.contourArea)
    if cv2.contourArea(contour) < 0.02 * height * width or len(contour) < 20:
        return None
    points = contour.reshape(-1, 2).astype(np.float32)
    on_outline = np.ones(len(points), bool)
    for _ in range(4):
        centre, axes, angle = cv2.fitEllipse(points[on_outline])
        fitted = _ellipse_distance(points, centre, axes, angle) <= max(2.0, 0.015 * max(axes))
        if fitted.sum() < 20:
            return None
        if np.array_equal(fitted, on_outline):
            break
        on_outline = fitted
    if on_outline.mean() < 0.6:
        return None
    x, y, w, h = cv2.boundingRect(points[on_outline].astype(np.int32))
    return float(min(axes) / max(axes)), (float(x), float(y), float(x + w), float(y + h))


def _ellipse_distance(points: np.ndarray, centre: tuple[float, float], axes: tuple[float, float], angle: float) -> np.ndarray:
    """Approximate distance (pixels) of points from an ellipse given as cv2.fitEllipse returns it."""
    theta = np.radians(angle)
    dx, dy = points[:, 0] - centre[0], points[:, 1] - centre[1]
    u = dx * np.cos(theta) + dy * np.sin(theta)
    v = -dx * np.sin(theta) + dy * np.cos(theta)
    a, b = max(axes[0], 1e-6) / 2, max(axes[1], 1e-6) / 2
    radius = np.hypot(u / a, v / b)
    return np.abs(radius - 1.0) * np.hypot(u, v) / np.maximum(radius, 1e-6)


def _raster_perspective(rgb: np.ndarray, chart_type: str) -> Perspective:
    faces, boxes, aspect = 0, [], None
    if chart_type == "pie":
        outline = _pie_outline(rgb)
        if outline is not None:
            aspect, box = outline
            boxes.append(box)
    else:
        from corpusaudit.measure.colour import extract_palette
        from corpusaudit.measure.shapes import colour_distance, distinct_colours

        palette = extract_palette(rgb, max_colours=12, min_share=0.005)
        table, index = distinct_colours(rgb) if palette else (None, None)
        for colour in palette:
            mask = (colour_distance(table, np.asarray(colour.rgb) * 255.0) < 20).astype(np.uint8).ravel()[index]
            mask = cv2.morphologyEx(mask, cv2.MORPH_OPEN, np.ones((3, 3), np.uint8))
            contours, _ = cv2.findContours(mask, cv2.RETR_EXTERNAL, cv2.CHAIN_APPROX_NONE)
            for contour in contours:
                if cv2.contourArea(contour) >= 40 and _is_slanted_face(contour):
                    faces += 1
                    x, y, w, h = cv2.boundingRect(contour)
                    boxes.append((float(x), float(y), float(x + w), float(y + h)))
    region = None
    if boxes:
        array = np.array(boxes)
        region = (float(array[:, 0].min()), float(array[:, 1].min()), float(array[:, 2].max()), float(array[:, 3].max()))
    return Perspective(slanted_faces=faces, pie_aspect=aspect, region=region)


@measurement("perspective")
def perspective(figure: Figure, measurements) -> Perspective:
    if is_vector(figure):
        return _vector_perspective(figure)
    return _raster_perspective(require_pixels(figure), figure.chart_type)
