"""Pie geometry: centre, radius, slices (start angle, angular span, share, colour) and the
percentages printed on or beside the slices.

Vector: wedges are closed filled paths whose outer arc lies on one circle; each slice's
span is the arc it covers (360 degrees minus the largest gap between its arc points).
Raster: the pie is the largest round foreground region; slices are runs of one colour
along three circles inside the pie (their per-angle majority ignores labels printed on
the slices).
"""

from __future__ import annotations

from dataclasses import dataclass

import cv2
import numpy as np

from corpusaudit.measure import measurement
from corpusaudit.measure.legend import in_any
from corpusaudit.measure.shapes import background_rgb, colour_key, component_stats, ink_mask, is_vector, require_pixels
from corpusaudit.measure.text import merge_words_into_lines, ocr_words, parse_percentage
from corpusaudit.model import BBox, Figure, MeasurementUnavailable

CLOSURE_TOLERANCE = 0.03  # slices must cover the full circle within 3 % to be a pie


@dataclass(frozen=True)
class Slice:
    start: float  # degrees counter-clockwise from 3 o'clock (y up)
    span: float  # degrees
    colour: tuple[int, int, int]

    @property
    def share(self) -> float:
        return self.span / 360.0

    @property
    def middle(self) -> float:
        return (self.start + self.span / 2.0) % 360.0


@dataclass(frozen=True)
class Pie:
    centre: tuple[float, float]
    radius: float
    slices: tuple[Slice, ...]  # in counter-clockwise order of their start angles

    @property
    def shares(self) -> list[float]:
        return [s.share for s in self.slices]

    @property
    def bbox(self) -> BBox:
        cx, cy = self.centre
        return (cx - self.radius, cy - self.radius, cx + self.radius, cy + self.radius)


def _angles(points: np.ndarray, centre: tuple[float, float]) -> np.ndarray:
    return np.degrees(np.arctan2(-(points[:, 1] - centre[1]), points[:, 0] - centre[0])) % 360.0


def _arc_cover(angles: np.ndarray) -> tuple[float, float]:
    """(start, span) of the arc covered by a set of angles: everything but the largest gap."""
    ordered = np.sort(angles)
    gaps = np.diff(np.concatenate([ordered, [ordered[0] + 360.0]]))
    widest = int(np.argmax(gaps))
    start = ordered[(widest + 1) % len(ordered)]
    return float(start), float(360.0 - gaps[widest])


def _vector_pie(figure: Figure, frames: list[BBox]) -> Pie:
    candidates = [p for p in figure.vector.paths
                  if "f" in p.kind and not p.is_rect and len(p.points) >= 6 and p.fill is not None
                  and not in_any(p.bbox, frames)]
    if len(candidates) < 2:
        raise MeasurementUnavailable("no pie wedges found")
    # The largest curved group fixes the pie: its union box is the circle's bounding square.
    boxes = np.array([p.bbox for p in candidates])
    x0, y0 = boxes[:, 0].min(), boxes[:, 1].min()
    x1, y1 = boxes[:, 2].max(), boxes[:, 3].max()
    if abs((x1 - x0) - (y1 - y0)) > 0.04 * max(x1 - x0, y1 - y0):
        raise MeasurementUnavailable("wedges do not form a round pie (exploded, tilted or mixed shapes)")
    centre = ((x0 + x1) / 2.0, (y0 + y1) / 2.0)
    radius = ((x1 - x0) + (y1 - y0)) / 4.0
    slices = []
    for path in candidates:
        points = np.asarray(path.points)
        distance = np.hypot(points[:, 0] - centre[0], points[:, 1] - centre[1])
        if distance.max() > 1.03 * radius:
            raise MeasurementUnavailable("a shape reaches beyond the pie's circle")
        arc = points[distance >= 0.97 * radius]
        if len(arc) < 2:
            continue
        start, span = _arc_cover(_angles(arc, centre))
        slices.append(Slice(start=start, span=span, colour=colour_key(path.fill)))
    total = sum(s.span for s in slices)
    if len(slices) < 2 or abs(total - 360.0) > CLOSURE_TOLERANCE * 360.0:
        raise MeasurementUnavailable(f"wedges cover {total:.0f} degrees, not a full circle")
    slices = [Slice(s.start, s.span * 360.0 / total, s.colour) for s in slices]
    return Pie(centre=centre, radius=radius, slices=tuple(sorted(slices, key=lambda s: s.start)))


def _raster_circle(rgb: np.ndarray) -> tuple[tuple[float, float], float]:
    background = background_rgb(rgb)
    ink = ink_mask(rgb, background, threshold=30.0).astype(np.uint8)
    solid = cv2.morphologyEx(ink, cv2.MORPH_OPEN, np.ones((5, 5), np.uint8))
    solid = cv2.morphologyEx(solid, cv2.MORPH_CLOSE, np.ones((5, 5), np.uint8))
    labels, stats, _ = component_stats(solid, min_area=200)
    if len(stats) == 0:
        raise MeasurementUnavailable("no pie found")
    best = stats[np.argmax(stats[:, 5])]
    contours, _ = cv2.findContours((labels == best[0]).astype(np.uint8), cv2.RETR_EXTERNAL, cv2.CHAIN_APPROX_NONE)
    contour = max(contours, key=cv2.contourArea)
    if len(contour) < 20:
        raise MeasurementUnavailable("no pie found")
    (ex, ey), (major, minor), _ = cv2.fitEllipse(contour)
    if min(major, minor) < 0.93 * max(major, minor):
        raise MeasurementUnavailable("the pie is not round (tilted or squeezed)")
    centre, radius = (float(ex), float(ey)), (major + minor) / 4.0
    height, width = ink.shape
    theta = np.radians(np.arange(0, 360, 1.0))
    for fraction, low, high in ((0.88, 0.97, 1.01), (1.1, 0.0, 0.6)):
        xs = np.clip(np.round(centre[0] + fraction * radius * np.cos(theta)).astype(int), 0, width - 1)
        ys = np.clip(np.round(centre[1] - fraction * radius * np.sin(theta)).astype(int), 0, height - 1)
        coverage = ink[ys, xs].mean()
        if not low <= coverage <= high:
            raise MeasurementUnavailable("no round pie found")
    return centre, radius


def _raster_pie(rgb: np.ndarray) -> Pie:
    centre, radius = _raster_circle(rgb)
    steps = 720
    theta = np.radians(np.arange(steps) * 360.0 / steps)
    height, width = rgb.shape[:2]
    rings = []
    for fraction in (0.76, 0.84, 0.92):
        xs = np.clip(np.round(centre[0] + fraction * radius * np.cos(theta)).astype(int), 0, width - 1)
        ys = np.clip(np.round(centre[1] - fraction * radius * np.sin(theta)).astype(int), 0, height - 1)
        rings.append(rgb[ys, xs].astype(np.float32))
    samples = np.concatenate(rings)
    centres: list[np.ndarray] = []  # greedy colour clusters, most common first
    labels = np.full(len(samples), -1)
    order = np.argsort(-np.bincount(_quantised(samples))[_quantised(samples)], kind="stable")
    for index in order:
        if labels[index] >= 0:
            continue
        colour = samples[index]
        near = (np.sqrt(((samples - colour) ** 2).sum(axis=1)) < 30) & (labels < 0)
        labels[near] = len(centres)
        centres.append(samples[near].mean(axis=0))
    per_ring = labels.reshape(3, steps)
    majority = np.where(per_ring[1] == per_ring[2], per_ring[1], np.where(per_ring[0] == per_ring[2], per_ring[0], per_ring[1]))
    runs = _runs(majority)
    minimum = 3  # samples: 1.5 degrees; shorter runs are edges or antialiasing
    long_runs = [r for r in runs if r[2] >= minimum]
    if len(long_runs) < 1:
        raise MeasurementUnavailable("no slices found along the pie")
    if len(long_runs) == 1 and long_runs[0][2] >= steps - minimum:
        raise MeasurementUnavailable("one colour all round: a circle, not a pie")
    # Boundaries sit halfway through the short runs between long ones.
    boundaries = []
    for current, following in zip(long_runs, long_runs[1:] + long_runs[:1]):
        end = current[0] + current[2]
        gap = (following[0] - end) % steps
        boundaries.append((end + gap / 2.0) % steps)
    slices = []
    for index, run in enumerate(long_runs):
        start = boundaries[index - 1]
        end = boundaries[index]
        span = ((end - start) % steps) * 360.0 / steps
        colour = tuple(int(round(v)) for v in centres[run[1]])
        slices.append(Slice(start=start * 360.0 / steps, span=span, colour=colour))
    return Pie(centre=centre, radius=float(radius), slices=tuple(sorted(slices, key=lambda s: s.start)))


def _quantised(samples: np.ndarray) -> np.ndarray:
    q = samples.astype(np.int32) >> 4
    return (q[:, 0] << 8) | (q[:, 1] << 4) | q[:, 2]


def _runs(labels: np.ndarray) -> list[tuple[int, int, int]]:
    """(start, label, length) of cyclic runs, starting at a change of label."""
    changes = np.flatnonzero(labels != np.roll(labels, 1))
    if len(changes) == 0:
        return [(0, int(labels[0]), len(labels))]
    runs = []
    for begin, finish in zip(changes, np.roll(changes, -1)):
        length = (finish - begin) % len(labels) or len(labels)
        runs.append((int(begin), int(labels[begin]), int(length)))
    return runs


@measurement("pie")
def pie(figure: Figure, measurements) -> Pie:
    if is_vector(figure):
        return _vector_pie(figure, measurements.get("legend_boxes"))
    return _raster_pie(require_pixels(figure))


@dataclass(frozen=True)
class Percentage:
    value: float
    bbox: BBox


@measurement("pie_percentages")
def pie_percentages(figure: Figure, measurements) -> list[Percentage]:
    """Percentages printed on or beside the slices (within 1.5 radii of the centre)."""
    geometry = measurements.get("pie")
    cx, cy = geometry.centre
    reach = 1.5 * geometry.radius
    if is_vector(figure):
        spans = figure.vector.texts
    else:
        rgb = require_pixels(figure)
        spans = merge_words_into_lines(ocr_words(rgb, (cx - reach, cy - reach, cx + reach, cy + reach), psm=11))
    found = []
    for span in spans:
        value = parse_percentage(span.text)
        sx, sy = (span.bbox[0] + span.bbox[2]) / 2, (span.bbox[1] + span.bbox[3]) / 2
        if value is not None and np.hypot(sx - cx, sy - cy) <= reach:
            found.append(Percentage(value=value, bbox=span.bbox))
    return found
