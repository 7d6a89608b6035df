"""Line series and filled areas in the plot area.

Vector: stroked polylines grouped by colour, dash pattern and width (one group is one
series), markers as small closed paths on the series' vertices, filled areas as closed
polygons with their lower boundary. Raster: series are the chromatic palette colours drawn
as thin strokes inside the plot area; stacked areas are columns where bands of different
palette colours touch.
"""

from __future__ import annotations

from dataclasses import dataclass

import cv2
import numpy as np

from corpusaudit.measure import measurement
from corpusaudit.measure.legend import in_any
from corpusaudit.measure.shapes import (
    axis_aligned_segment, background_rgb, bbox_area, colour_distance, colour_key, intersect, is_neutral, is_vector,
    polyline_length, require_pixels,
)
from corpusaudit.model import BBox, Figure, MeasurementUnavailable


@dataclass(frozen=True)
class Series:
    colour: tuple[int, int, int]
    dashes: str
    points: tuple[tuple[float, float], ...]  # vertices in drawing order (vector); () for rasters
    has_markers: bool | None  # None: not measured
    bbox: BBox


def _marker_centres(figure: Figure, plot: BBox, frames: list[BBox]) -> list[tuple[float, float, tuple]]:
    size = 0.05 * max(plot[2] - plot[0], plot[3] - plot[1])
    found = []
    for path in figure.vector.paths:
        x0, y0, x1, y1 = path.bbox
        if not path.closed or max(x1 - x0, y1 - y0) > size or max(x1 - x0, y1 - y0) < 1.0:
            continue
        if intersect(path.bbox, plot) is None or in_any(path.bbox, frames):
            continue
        found.append(((x0 + x1) / 2, (y0 + y1) / 2, colour_key(path.fill or path.stroke)))
    return found


def _vector_series(figure: Figure, plot: BBox, frames: list[BBox]) -> list[Series]:
    width = plot[2] - plot[0]
    marker_size = 0.05 * max(width, plot[3] - plot[1])  # as _marker_centres
    groups: dict[tuple, list] = {}
    for path in figure.vector.paths:
        if "s" not in path.kind or path.stroke is None or path.is_rect or len(path.points) < 2:
            continue
        if path.closed and (len(path.points) <= 8 or max(path.bbox[2] - path.bbox[0],
                                                          path.bbox[3] - path.bbox[1]) <= marker_size):
            continue  # markers (polygons, or circles drawn as Bezier curves) and frames, not lines
        if axis_aligned_segment(path) and (is_neutral(path.stroke) or len(path.points) == 2):
            continue  # grid, spines, ticks, error bars, reference lines
        if intersect(path.bbox, plot) is None or in_any(path.bbox, frames):
            continue
        dashes = "" if path.dashes in ("", "[] 0") else path.dashes
        key = (colour_key(path.stroke), dashes, round(path.width, 1))
        groups.setdefault(key, []).append(path)
    markers = _marker_centres(figure, plot, frames)
    series = []
    for (colour, dashes, _), paths in groups.items():
        points = [pt for p in paths for pt in p.points]
        if sum(polyline_length(p.points) for p in paths) < 0.1 * width:
            continue
        array = np.asarray(points)
        box = (float(array[:, 0].min()), float(array[:, 1].min()), float(array[:, 0].max()), float(array[:, 1].max()))
        on_vertices = 0
        if markers:
            centres = np.array([(x, y) for x, y, _ in markers])
            distance = np.hypot(array[:, None, 0] - centres[None, :, 0], array[:, None, 1] - centres[None, :, 1])
            on_vertices = int((distance.min(axis=1) <= 1.5).sum())
        series.append(Series(colour=colour, dashes=dashes, points=tuple(map(tuple, points)),
                             has_markers=on_vertices >= 0.6 * len(points), bbox=box))
    return series


def _raster_series(rgb: np.ndarray, plot: BBox) -> list[Series]:
    from corpusaudit.measure.colour import extract_palette

    x0, y0, x1, y1 = (int(round(v)) for v in plot)
    inner = np.ascontiguousarray(rgb[y0 + 3:y1 - 2, x0 + 3:x1 - 2])
    if inner.size == 0:
        raise MeasurementUnavailable("empty plot area")
    palette = [c for c in extract_palette(inner, max_colours=12, min_share=0.01) if not c.is_grey]
    series = []
    for colour in palette:
        rgb255 = np.asarray(colour.rgb) * 255.0
        mask = (colour_distance(inner, rgb255) < 40).astype(np.uint8)
        thick = cv2.morphologyEx(mask, cv2.MORPH_OPEN, np.ones((9, 9), np.uint8))
        if thick.sum() > 0.3 * mask.sum():
            continue  # a filled region (area, bar), not a stroke
        columns = np.flatnonzero(mask.any(axis=0))
        if len(columns) < 0.2 * inner.shape[1]:
            continue
        ys, xs = np.nonzero(mask)
        series.append(Series(colour=tuple(int(round(v)) for v in rgb255), dashes="", points=(), has_markers=None,
                             bbox=(float(x0 + 3 + xs.min()), float(y0 + 3 + ys.min()),
                                   float(x0 + 3 + xs.max()), float(y0 + 3 + ys.max()))))
    return series


@measurement("line_series")
def line_series(figure: Figure, measurements) -> list[Series]:
    plot = measurements.get("plot_area")
    if is_vector(figure):
        return _vector_series(figure, plot, measurements.get("legend_boxes"))
    return _raster_series(require_pixels(figure), plot)


@dataclass(frozen=True)
class AreaLayers:
    count: int  # filled bands found
    stacked: bool  # some band starts on top of another band (moving baseline)
    region: BBox


def _lower_and_upper(points: list[tuple[float, float]], plot: BBox, columns: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The polygon's lowest and highest y at each sample column (nan outside it)."""
    polygon = np.round(np.asarray(points) - [plot[0], plot[1]]).astype(np.int32)
    width, height = int(plot[2] - plot[0]) + 2, int(plot[3] - plot[1]) + 2
    mask = np.zeros((height, width), np.uint8)
    cv2.fillPoly(mask, [polygon], 1)
    sub = mask[:, np.clip(columns, 0, width - 1)]
    filled = sub.any(axis=0)
    bottom = np.where(filled, height - 1 - np.argmax(sub[::-1], axis=0), np.nan)
    top = np.where(filled, np.argmax(sub, axis=0), np.nan)
    return bottom, top


def _vector_areas(figure: Figure, plot: BBox, frames: list[BBox]) -> AreaLayers:
    polygons = [p for p in figure.vector.paths
                if "f" in p.kind and not p.is_rect and len(p.points) >= 4 and p.fill is not None
                and intersect(p.bbox, plot) is not None and not in_any(p.bbox, frames)
                and bbox_area(intersect(p.bbox, plot)) >= 0.02 * bbox_area(plot)]
    if not polygons:
        raise MeasurementUnavailable("no filled areas in the plot")
    columns = np.linspace(0, plot[2] - plot[0], 60).astype(int)[5:-5]
    profiles = [_lower_and_upper(p.points, plot, columns) for p in polygons]
    height = plot[3] - plot[1]
    stacked = False
    for index, (bottom, _) in enumerate(profiles):
        if np.nanstd(bottom) < 0.02 * height:
            continue  # flat baseline
        for other, (_, top) in enumerate(profiles):
            both = ~np.isnan(bottom) & ~np.isnan(top)
            if other != index and both.sum() >= 10 and np.mean(np.abs(bottom[both] - top[both]) <= 2.5) >= 0.8:
                stacked = True
    boxes = np.array([p.bbox for p in polygons])
    region = (float(boxes[:, 0].min()), float(boxes[:, 1].min()), float(boxes[:, 2].max()), float(boxes[:, 3].max()))
    region = intersect(region, plot) or plot
    return AreaLayers(count=len(polygons), stacked=stacked, region=region)


def _raster_areas(rgb: np.ndarray, plot: BBox) -> AreaLayers:
    from corpusaudit.measure.colour import extract_palette

    x0, y0, x1, y1 = (int(round(v)) for v in plot)
    inner = np.ascontiguousarray(rgb[y0 + 3:y1 - 2, x0 + 3:x1 - 2])
    palette = [np.asarray(c.rgb) * 255.0 for c in extract_palette(inner, max_colours=10, min_share=0.02)
               if not c.is_grey]
    if not palette:
        raise MeasurementUnavailable("no filled areas in the plot")
    distances = np.stack([colour_distance(inner, colour) for colour in palette])
    labels = np.where(distances.min(axis=0) < 30, distances.argmin(axis=0), -1)
    solid = [cv2.morphologyEx((labels == k).astype(np.uint8), cv2.MORPH_OPEN, np.ones((5, 5), np.uint8))
             for k in range(len(palette))]
    bands = [k for k, mask in enumerate(solid) if mask.sum() >= 0.02 * inner.shape[0] * inner.shape[1]]
    if not bands:
        raise MeasurementUnavailable("no filled areas in the plot")
    background = background_rgb(inner)
    blends = {(a, b) for a in bands for b in bands
              if a != b and _is_blend(palette[a], palette[b], [palette[c] for c in bands if c != a], background)}
    touching_columns = 0
    columns_with_area = 0
    for column in range(0, inner.shape[1], 4):
        present = [k for k in bands if solid[k][:, column].any()]
        if not present:
            continue
        columns_with_area += 1
        for a in present:
            for b in present:
                if a == b or (a, b) in blends:
                    continue
                a_top = np.argmax(solid[a][:, column])  # a band directly below b: a starts where b ends
                b_rows = np.flatnonzero(solid[b][:, column])
                if b_rows.size and 0 <= a_top - b_rows.max() <= 4:
                    touching_columns += 1
                    break
            else:
                continue
            break
    stacked = columns_with_area > 0 and touching_columns >= 0.5 * columns_with_area and len(bands) >= 2
    return AreaLayers(count=len(bands), stacked=stacked, region=plot)


def _is_blend(lower: np.ndarray, upper: np.ndarray, others: list[np.ndarray], background: np.ndarray) -> bool:
    """lower is upper seen through another translucent band (areas overlap, not stacked).

    Over a light background, alpha compositing adds the layers' deficits from the
    background: (bg - lower) ~ (bg - upper) + k (bg - other) with 0.2 <= k <= 1.
    """
    residual_of = lower - upper  # = -(deficit of lower - deficit of upper)
    for other in others:
        deficit = background - other
        norm2 = float((deficit ** 2).sum())
        if norm2 < 1:
            continue
        k = float((-residual_of * deficit).sum() / norm2)
        if 0.2 <= k <= 1.0 and np.linalg.norm(-residual_of - k * deficit) < 20:
            return True
    return False


@measurement("areas")
def areas(figure: Figure, measurements) -> AreaLayers:
    plot = measurements.get("plot_area")
    if is_vector(figure):
        return _vector_areas(figure, plot, measurements.get("legend_boxes"))
    return _raster_areas(require_pixels(figure), plot)
