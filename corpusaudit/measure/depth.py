"""3D perspective effects: slanted faces of 3D bars, tilted (elliptic) pies."""

from __future__ import annotations

from dataclasses import dataclass

import cv2
import numpy as np

from corpusaudit.measure import measurement
from corpusaudit.measure.shapes import background_rgb, component_stats, ink_mask, is_vector, require_pixels
from corpusaudit.model import BBox, Figure


@dataclass(frozen=True)
class Perspective:
    slanted_faces: int  # filled quadrilaterals with no right angle at a corner (3D box faces)
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


def _raster_perspective(rgb: np.ndarray, chart_type: str) -> Perspective:
    background = background_rgb(rgb)
    ink = ink_mask(rgb, background, threshold=30.0).astype(np.uint8)
    solid = cv2.morphologyEx(ink, cv2.MORPH_OPEN, np.ones((5, 5), np.uint8))
    faces, boxes, aspect = 0, [], None
    if chart_type == "pie":
        labels, stats, _ = component_stats(solid, min_area=200)
        if len(stats):
            best = stats[np.argmax(stats[:, 5])]
            contours, _ = cv2.findContours((labels == best[0]).astype(np.uint8), cv2.RETR_EXTERNAL, cv2.CHAIN_APPROX_NONE)
            contour = max(contours, key=cv2.contourArea)
            if len(contour) >= 20:
                _, (major, minor), _ = cv2.fitEllipse(contour)
                aspect = float(min(major, minor) / max(major, minor))
                x, y, w, h = cv2.boundingRect(contour)
                boxes.append((float(x), float(y), float(x + w), float(y + h)))
    else:
        from corpusaudit.measure.colour import extract_palette
        from corpusaudit.measure.shapes import colour_distance

        for colour in extract_palette(rgb, max_colours=12, min_share=0.005):
            mask = (colour_distance(rgb, np.asarray(colour.rgb) * 255.0) < 20).astype(np.uint8)
            mask = cv2.morphologyEx(mask, cv2.MORPH_OPEN, np.ones((3, 3), np.uint8))
            contours, _ = cv2.findContours(mask, cv2.RETR_EXTERNAL, cv2.CHAIN_APPROX_SIMPLE)
            for contour in contours:
                if cv2.contourArea(contour) < 40:
                    continue
                approx = cv2.approxPolyDP(contour, 0.04 * cv2.arcLength(contour, True), True).reshape(-1, 2)
                if len(approx) == 4 and cv2.isContourConvex(approx) and _slanted(approx.astype(float)):
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
