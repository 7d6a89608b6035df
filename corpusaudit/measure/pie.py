"""Pie geometry: centre, radius, donut hole, slices (start angle, angular span, share,
colour), the percentages printed on or beside the slices and what they add up to.

Vector: wedges are closed filled paths whose outer arcs lie on one circle (fitted by least
squares to the rim points); each slice's span is the arc it covers (360 degrees minus the
largest gap between its arc points).
Raster: the pie is the largest round foreground region; slices are runs of one colour going
round it, voted by 16 rings across its outer part (or a donut's band), so that labels,
antialiasing, JPEG noise and thin separator lines do not count as slices. Percentages are
read by OCR from the label pixels only, in one page of stacked lines."""

from __future__ import annotations

import re
from dataclasses import dataclass

import cv2
import numpy as np

from corpusaudit.measure import measurement
from corpusaudit.measure.legend import in_any
from corpusaudit.measure.shapes import background_rgb, colour_distance, colour_key, component_stats, ink_mask, is_vector, require_pixels
from corpusaudit.measure.text import ocr_words
from corpusaudit.model import BBox, Figure, MeasurementUnavailable, TextSpan

CLOSURE_TOLERANCE = 0.03  # slices must cover the full circle within 3 % to be a pie
MIN_ARC_PX = 2.0  # raster: narrower colour runs along the rim are edges or antialiasing, not slices


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
    hole: float = 0.0  # radius of a donut's hole (0 for a full pie)

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


def _fit_circle(points: np.ndarray) -> tuple[tuple[float, float], float]:
    """Least-squares circle through points (the algebraic fit of Kasa, 1976)."""
    x, y = points[:, 0], points[:, 1]
    design = np.column_stack([x, y, np.ones_like(x)])
    (a, b, c), *_ = np.linalg.lstsq(design, x * x + y * y, rcond=None)
    cx, cy = a / 2.0, b / 2.0
    return (float(cx), float(cy)), float(np.sqrt(max(c + cx * cx + cy * cy, 0.0)))


def _rim_circle(points: np.ndarray) -> tuple[tuple[float, float], float]:
    """The circle of the wedges' outer arcs, ignoring the apices and a donut's inner arcs.

    Starts from the bounding square and refits on the points near the current rim, so that
    a thin slice or a label-sized bump of the outline does not move the centre.
    """
    x0, y0 = points.min(axis=0)
    x1, y1 = points.max(axis=0)
    if abs((x1 - x0) - (y1 - y0)) > 0.06 * max(x1 - x0, y1 - y0):
        raise MeasurementUnavailable("wedges do not form a round pie (exploded, tilted or mixed shapes)")
    centre, radius = ((x0 + x1) / 2.0, (y0 + y1) / 2.0), ((x1 - x0) + (y1 - y0)) / 4.0
    for tolerance in (0.1, 0.03, 0.01):
        distance = np.hypot(points[:, 0] - centre[0], points[:, 1] - centre[1])
        rim = points[np.abs(distance - radius) <= tolerance * radius]
        if len(rim) < 6:
            raise MeasurementUnavailable("no round pie rim found")
        centre, radius = _fit_circle(rim)
    distance = np.hypot(rim[:, 0] - centre[0], rim[:, 1] - centre[1])
    if np.abs(distance - radius).max() > 0.01 * radius:
        raise MeasurementUnavailable("wedge arcs do not lie on one circle (exploded or tilted pie)")
    return centre, radius


WEDGE_MIN_EXTENT = 0.1  # a wedge's box spans at least this share of the largest wedge's


MAX_WEDGES = 360  # one per degree: a narrower wedge is no visible slice (a scatter's markers are no pie)


def _vector_pie(figure: Figure, frames: list[BBox]) -> Pie:
    shapes = [p for p in figure.vector.paths
              if "f" in p.kind and not p.is_rect and len(p.points) >= 6 and p.fill is not None]
    if len(shapes) > MAX_WEDGES:
        raise MeasurementUnavailable(f"{len(shapes)} filled shapes: too many for the wedges of a pie")
    candidates = [p for p in shapes if not in_any(p.bbox, frames)]
    # Legend symbols without a frame (small circles) are no wedges: even a thin wedge spans
    # from the centre (or the hole) to the rim, a good share of the largest wedge's extent.
    extent = [max(p.bbox[2] - p.bbox[0], p.bbox[3] - p.bbox[1]) for p in candidates]
    candidates = [p for p, size in zip(candidates, extent) if size >= WEDGE_MIN_EXTENT * max(extent, default=0.0)]
    if len(candidates) < 2:
        raise MeasurementUnavailable("no pie wedges found")
    try:
        return _round_vector_pie(candidates)
    except MeasurementUnavailable as round_failure:
        try:
            return _exploded_vector_pie(candidates)
        except MeasurementUnavailable:
            raise round_failure from None


def _round_vector_pie(candidates: list) -> Pie:
    centre, radius = _rim_circle(np.concatenate([np.asarray(p.points) for p in candidates]))
    slices = []
    for path in candidates:
        points = np.asarray(path.points)
        distance = np.hypot(points[:, 0] - centre[0], points[:, 1] - centre[1])
        if distance.max() > 1.03 * radius:
            raise MeasurementUnavailable("a shape reaches beyond the pie's circle (exploded, tilted or mixed shapes)")
        arc = points[np.abs(distance - radius) <= 0.01 * radius]
        if len(arc) < 2:
            continue
        start, span = _arc_cover(_angles(arc, centre))
        slices.append(Slice(start=start, span=span, colour=colour_key(path.fill)))
    total = sum(s.span for s in slices)
    if len(slices) < 2 or abs(total - 360.0) > CLOSURE_TOLERANCE * 360.0:
        raise MeasurementUnavailable(f"wedges cover {total:.0f} degrees, not a full circle")
    slices = [Slice(s.start, s.span * 360.0 / total, s.colour) for s in slices]
    return Pie(centre=centre, radius=radius, slices=tuple(sorted(slices, key=lambda s: s.start)))


def _wedge_circle(points: np.ndarray) -> tuple[tuple[float, float], float] | None:
    """Apex and radius of one wedge: the circle through its outer arc, when the apex sits
    at its centre. The apex is the vertex between the two long straight edges (the arc's
    samples lie close together)."""
    step = np.hypot(*np.diff(np.vstack([points, points[:1]]), axis=0).T)
    apex_index = int(np.argmax(np.minimum(step, np.roll(step, 1))))
    apex = points[apex_index]
    reach = np.hypot(points[:, 0] - apex[0], points[:, 1] - apex[1])
    off_apex = reach > 1e-6
    arc = points[off_apex]
    # The tests below put every arc point within 4% of the radius from the apex; a shape
    # whose points lie at very different distances from its apex (a marker, a bar) fails
    # here without a circle fit.
    if len(arc) < 3 or reach[off_apex].min() < 0.9 * reach.max():
        return None
    centre, radius = _fit_circle(arc)
    residual = np.abs(np.hypot(arc[:, 0] - centre[0], arc[:, 1] - centre[1]) - radius)
    if residual.max() > 0.01 * radius or np.hypot(apex[0] - centre[0], apex[1] - centre[1]) > 0.03 * radius:
        return None
    return centre, radius


def _exploded_vector_pie(candidates: list) -> Pie:
    """A pie whose wedges are pulled out from the centre (exploded): each wedge is a sector
    of one common radius around its own apex. The pie's centre is the point from which
    every apex lies along its wedge's middle direction (least squares); the slices' spans
    are their arcs around their own apexes."""
    wedges = []
    for path in candidates:
        points = np.asarray(path.points)
        circle = _wedge_circle(points)
        if circle is None:
            continue
        (ax, ay), radius = circle
        distance = np.hypot(points[:, 0] - ax, points[:, 1] - ay)
        start, span = _arc_cover(_angles(points[np.abs(distance - radius) <= 0.01 * radius], (ax, ay)))
        wedges.append(((ax, ay), radius, Slice(start=start, span=span, colour=colour_key(path.fill))))
    if len(wedges) < 2:
        raise MeasurementUnavailable("no pie wedges found")
    radii = np.array([r for _, r, _ in wedges])
    if np.abs(radii - np.median(radii)).max() > 0.03 * np.median(radii):
        raise MeasurementUnavailable("wedges of different radii: not one pie")
    total = sum(s.span for *_, s in wedges)
    if abs(total - 360.0) > CLOSURE_TOLERANCE * 360.0:
        raise MeasurementUnavailable(f"wedges cover {total:.0f} degrees, not a full circle")
    # apex_i = centre + offset_i * direction_i (y down in pixels, angles counter-clockwise)
    n = len(wedges)
    design = np.zeros((2 * n, 2 + n))
    target = np.zeros(2 * n)
    for i, ((ax, ay), _, piece) in enumerate(wedges):
        angle = np.radians(piece.middle)
        design[2 * i, 0], design[2 * i + 1, 1] = 1.0, 1.0
        design[2 * i, 2 + i], design[2 * i + 1, 2 + i] = np.cos(angle), -np.sin(angle)
        target[2 * i], target[2 * i + 1] = ax, ay
    solution, *_ = np.linalg.lstsq(design, target, rcond=None)
    slices = [Slice(s.start, s.span * 360.0 / total, s.colour) for *_, s in wedges]
    return Pie(centre=(float(solution[0]), float(solution[1])), radius=float(np.median(radii)),
               slices=tuple(sorted(slices, key=lambda s: s.start)))


def _raster_circle(rgb: np.ndarray, background: np.ndarray) -> tuple[tuple[float, float], float]:
    """Centre and radius of the pie: the largest solid, round foreground region."""
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
    # Inside the rim the ring is (nearly) all ink: thin separator lines between slices leave
    # a few per cent; outside it, at most scattered labels.
    for fraction, low, high in ((0.9, 0.9, 1.01), (1.12, 0.0, 0.6)):
        coverage = _ring(ink, centre, fraction * radius, 720).mean()
        if not low <= coverage <= high:
            raise MeasurementUnavailable("no round pie found")
    return centre, radius


def _ring(image: np.ndarray, centre: tuple[float, float], radius: float, steps: int) -> np.ndarray:
    """Samples of image along a circle, counter-clockwise from 3 o'clock (nearest pixel)."""
    theta = np.radians(np.arange(steps) * 360.0 / steps)
    height, width = image.shape[:2]
    xs = np.clip(np.round(centre[0] + radius * np.cos(theta)).astype(int), 0, width - 1)
    ys = np.clip(np.round(centre[1] - radius * np.sin(theta)).astype(int), 0, height - 1)
    return image[ys, xs]


def _hole_radius(rgb: np.ndarray, background: np.ndarray, centre: tuple[float, float], radius: float) -> float:
    """Radius of a donut's hole (0 for a full pie): how far out from the centre background reigns."""
    hole = 0.0
    for fraction in np.arange(0.02, 0.9, 0.02):
        ring = _ring(rgb, centre, fraction * radius, 360)
        if (colour_distance(ring, background) < 30).mean() < 0.9:
            break
        hole = float(fraction * radius)
    return hole


def _polar_samples(rgb: np.ndarray, centre: tuple[float, float], radii: np.ndarray, steps: int) -> np.ndarray:
    """Colours (len(radii), steps, 3) on circles, angles counter-clockwise from 3 o'clock, bilinear."""
    theta = np.arange(steps) * (2 * np.pi / steps)
    map_x = (centre[0] + radii[:, None] * np.cos(theta)[None, :]).astype(np.float32)
    map_y = (centre[1] - radii[:, None] * np.sin(theta)[None, :]).astype(np.float32)
    return cv2.remap(rgb, map_x, map_y, cv2.INTER_LINEAR, borderMode=cv2.BORDER_REPLICATE).astype(np.float32)


def _colour_clusters(samples: np.ndarray, radius: float = 30.0) -> tuple[np.ndarray, np.ndarray]:
    """Greedy clusters of colours, most common first: (centres, label per sample).

    Works on 4-bit-per-channel bins with their counts, so it costs little however many
    samples there are; a bin joins the first (most common) cluster within radius.
    """
    keys = _quantised(samples)
    unique, inverse, counts = np.unique(keys, return_inverse=True, return_counts=True)
    sums = np.zeros((len(unique), 3))
    np.add.at(sums, inverse, samples)
    means = sums / counts[:, None]
    bin_label = np.full(len(unique), -1)
    centres = []
    for index in np.argsort(-counts, kind="stable"):
        if bin_label[index] >= 0:
            continue
        near = (np.sqrt(((means - means[index]) ** 2).sum(axis=1)) < radius) & (bin_label < 0)
        bin_label[near] = len(centres)
        weights = counts[near][:, None]
        centres.append((means[near] * weights).sum(axis=0) / weights.sum())
    return np.array(centres), bin_label[inverse]


def _sector_apex(contour: np.ndarray) -> tuple[np.ndarray, float]:
    """Apex, radius and the unit direction towards the arc of a sector, from its outline:
    the apex is the outline point from which the most outline points lie at the greatest
    distance (the whole arc); from any other point only a point or two does."""
    points = contour[:: max(1, len(contour) // 400)].astype(np.float32)
    distance = np.hypot(points[:, None, 0] - points[None, :, 0], points[:, None, 1] - points[None, :, 1])
    farthest = distance.max(axis=1)
    on_arc = (np.abs(distance - farthest[:, None]) <= 1.5).sum(axis=1)
    best = int(np.argmax(on_arc))
    arc = points[np.abs(distance[best] - farthest[best]) <= 1.5]
    towards_arc = arc.mean(axis=0) - points[best]
    return points[best], float(farthest[best]), towards_arc / max(float(np.linalg.norm(towards_arc)), 1e-6)


def _reassembled(rgb: np.ndarray, background: np.ndarray) -> np.ndarray:
    """An exploded pie with its wedges pushed back: every solid piece (a wedge pulled out,
    or the rest of the pie) is moved so that its apex meets the largest piece's apex, on
    a canvas of the background colour. Raises when the pieces are not sectors of one
    radius."""
    ink = ink_mask(rgb, background, threshold=30.0).astype(np.uint8)
    solid = cv2.morphologyEx(ink, cv2.MORPH_OPEN, np.ones((5, 5), np.uint8))
    labels, stats, _ = component_stats(solid, min_area=200)
    if len(stats) < 2:
        raise MeasurementUnavailable("no exploded pie found")
    pieces = []
    for label in stats[np.argsort(-stats[:, 5]), 0]:
        # the piece's own ink: opening rounds off a thin wedge's apex
        mask = cv2.dilate((labels == label).astype(np.uint8), np.ones((7, 7), np.uint8)) & ink
        contours, _ = cv2.findContours(mask, cv2.RETR_EXTERNAL, cv2.CHAIN_APPROX_NONE)
        pieces.append((mask, *_sector_apex(max(contours, key=cv2.contourArea)[:, 0, :])))
    radius = pieces[0][2]
    # A thin wedge's faint tip is lost to the ink threshold and the opening: its apex is put
    # back at the pie's radius from its arc.
    pieces = [(mask, apex - (radius - reach) * direction, reach) for mask, apex, reach, direction in pieces
              if abs(reach - radius) <= 0.08 * radius or _lost_tip(mask, apex, reach, direction, radius)]
    if len(pieces) < 2:
        raise MeasurementUnavailable("pieces are not sectors of one pie")
    canvas = np.empty_like(rgb)
    canvas[:] = np.round(background).astype(rgb.dtype)
    target = pieces[0][1]
    for mask, apex, _ in pieces:
        dx, dy = (int(round(v)) for v in target - apex)
        ys, xs = np.nonzero(cv2.dilate(mask, np.ones((3, 3), np.uint8)))
        inside = (ys + dy >= 0) & (ys + dy < rgb.shape[0]) & (xs + dx >= 0) & (xs + dx < rgb.shape[1])
        canvas[ys[inside] + dy, xs[inside] + dx] = rgb[ys[inside], xs[inside]]
    return canvas


LOST_TIP_PX = 12.0  # widest wedge tip the 5 px opening, the ink threshold and antialiasing together erase
SECTOR_AREA = (0.7, 1.15)  # a piece's area over that of the sector it would be (edges lose a few per cent)


def _lost_tip(mask: np.ndarray, apex: np.ndarray, reach: float, direction: np.ndarray, radius: float) -> bool:
    """Whether a piece shorter than the pie's radius is a thin wedge that lost its tip: put
    back at the radius from its arc, what is missing is no wider than LOST_TIP_PX, and the
    piece fills the sector it then spans (a bar or a legend patch does not)."""
    lost = radius - reach
    if not 0.0 < lost <= 0.5 * radius:
        return False
    tip = apex - lost * direction
    ys, xs = np.nonzero(mask)
    points = np.column_stack([xs, ys]).astype(float)
    distance = np.hypot(points[:, 0] - tip[0], points[:, 1] - tip[1])
    if distance.max() > 1.03 * radius:
        return False
    far = points[distance > 0.5 * radius]
    if len(far) < 2:
        return False
    _, span = _arc_cover(_angles(far, (float(tip[0]), float(tip[1]))))
    half = np.radians(span) / 2.0
    if 2.0 * lost * np.tan(half) > LOST_TIP_PX:
        return False
    area = half * (radius ** 2 - lost ** 2)  # the sector less its lost tip
    return SECTOR_AREA[0] <= len(points) / max(area, 1.0) <= SECTOR_AREA[1]


def _raster_pie(rgb: np.ndarray) -> Pie:
    try:
        return _round_raster_pie(rgb)
    except MeasurementUnavailable as round_failure:
        try:
            background = background_rgb(rgb)
            canvas = _reassembled(rgb, background)
            reassembled = _round_raster_pie(canvas)
            _require_no_missing_piece(canvas, background, reassembled)
            return reassembled
        except MeasurementUnavailable:
            raise round_failure from None


MISSING_PIECE_PX = 12.0  # background wider than this across the reassembled pie is a piece left out, not a separator


def _require_no_missing_piece(canvas: np.ndarray, background: np.ndarray, geometry: Pie) -> None:
    """Raise when the reassembled pie has a gap: a piece not recognised as a sector of the
    pie (two thin wedges joined into one piece) was left out, and its share would be given
    to its neighbours."""
    radius = geometry.hole + 0.7 * (geometry.radius - geometry.hole)
    steps = int(np.ceil(2 * np.pi * radius))  # one sample per pixel of the ring
    empty = colour_distance(_ring(canvas, geometry.centre, radius, steps), background) < 30
    widest = max((length for _, label, length in _runs(empty.astype(int)) if label == 1), default=0)
    if widest > MISSING_PIECE_PX:
        raise MeasurementUnavailable("a piece of the exploded pie could not be put back")


def _round_raster_pie(rgb: np.ndarray) -> Pie:
    """Slices as runs of one colour going round the pie.

    The pie is sampled on rings across its outer part (or across a donut's band); each angle
    takes the colour most rings agree on, ignoring the background (white separator lines) and
    rare mixed colours, so labels printed on a slice, antialiasing and JPEG noise do not vote.
    A run must be at least MIN_ARC_PX wide along the outermost ring to count as a slice;
    runs of one colour separated by a separator line are two slices.
    """
    background = background_rgb(rgb)
    centre, radius = _raster_circle(rgb, background)
    hole = _hole_radius(rgb, background, centre, radius)
    inner = max(hole + 0.12 * (radius - hole), 0.45 * radius)
    outer = radius - max(2.0, 0.03 * radius)
    radii = np.linspace(inner, outer, 16)
    steps = int(np.clip(np.ceil(2 * np.pi * outer / 0.5), 720, 4320))
    samples = _polar_samples(rgb, centre, radii, steps)
    flat = samples.reshape(-1, 3)
    foreground = colour_distance(flat, background) >= 30
    centres, labels = _colour_clusters(flat[foreground])
    # Samples far from their cluster's centre are mixtures (edges): they do not vote.
    pure = np.sqrt(((flat[foreground] - centres[labels]) ** 2).sum(axis=1)) < 30
    per_sample = np.full(len(flat), -1)
    per_sample[np.flatnonzero(foreground)[pure]] = labels[pure]
    grid = per_sample.reshape(len(radii), steps)
    rows = len(radii)
    votes = np.stack([(grid == c).sum(axis=0) for c in range(len(centres))])
    ranked = np.sort(votes, axis=0)
    best, second = ranked[-1], ranked[-2] if len(centres) > 1 else np.zeros(steps)
    winner = np.where((best >= 0.3 * rows) & (best >= 1.5 * second), np.argmax(votes, axis=0), -1)
    min_columns = max(1, int(np.ceil(MIN_ARC_PX / (outer * 2 * np.pi / steps))))
    long_runs = []
    for run in _runs(winner):
        start, label, length = run
        columns = np.arange(start, start + length) % steps
        # A slice fills the band: labels printed on it cover only part of the rings.
        if label >= 0 and length >= min_columns and best[columns].mean() >= 0.4 * rows:
            long_runs.append(run)
    long_runs = _merge_interrupted(long_runs, votes, rows)
    long_runs = _without_separator_blends(long_runs, centres, background, steps)
    if not long_runs:
        raise MeasurementUnavailable("no slices found along the pie")
    if len(long_runs) == 1 and long_runs[0][2] >= steps - 2 * min_columns:
        raise MeasurementUnavailable("one colour all round: a circle, not a pie")
    # Boundaries sit halfway through whatever lies between two slices (separator, antialiasing).
    boundaries = []
    for current, following in zip(long_runs, long_runs[1:] + long_runs[:1]):
        end = current[0] + current[2]
        gap = (following[0] - end) % steps
        boundaries.append((end + gap / 2.0) % steps)
    slices = []
    for index, run in enumerate(long_runs):
        start, end = boundaries[index - 1], boundaries[index]
        span = ((end - start) % steps or steps) * 360.0 / steps
        colour = tuple(int(round(v)) for v in centres[run[1]])
        slices.append(Slice(start=start * 360.0 / steps, span=span, colour=colour))
    return Pie(centre=centre, radius=float(radius), slices=tuple(sorted(slices, key=lambda s: s.start)),
               hole=hole)


SEPARATOR_BLEND_DEG = 2.5  # narrower runs whose colour mixes a neighbour with the separator are its edge
BLEND_TOLERANCE = 12.0  # sRGB distance from the mixing segment


def _without_separator_blends(runs: list[tuple[int, int, int]], centres: np.ndarray, background: np.ndarray,
                              steps: int) -> list[tuple[int, int, int]]:
    """Drop narrow runs whose colour is a mix of the separator (background) colour and the
    neighbouring slices' colours: the antialiased edge of a separator line, smeared by JPEG's
    chroma subsampling into a colour of its own (white, red and green give a pale yellow)."""
    if len(runs) < 3:
        return runs
    kept = []
    for index, (start, label, length) in enumerate(runs):
        neighbours = [centres[n].astype(float) for n in (runs[index - 1][1], runs[(index + 1) % len(runs)][1])
                      if n != label]
        narrow = length * 360.0 / steps < SEPARATOR_BLEND_DEG
        if narrow and neighbours and \
                _mix_distance(centres[label].astype(float), [np.asarray(background, float)] + neighbours) < BLEND_TOLERANCE:
            continue
        kept.append((start, label, length))
    return kept


# sRGB -> Y, Cb, Cr (ITU-R BT.601, as JPEG codes colour)
_YCBCR = np.array([[0.299, 0.587, 0.114], [-0.168736, -0.331264, 0.5], [0.5, -0.418688, -0.081312]])


def _mix_distance(colour: np.ndarray, sources: list[np.ndarray]) -> float:
    """How far colour is from what antialiasing and JPEG make of the source colours: its
    chroma a mix of theirs (JPEG averages chroma over 2x2 pixels but keeps each pixel's
    luma) and its luma within theirs. Chroma distance (Cb, Cr) from the nearest mix with
    non-negative weights summing to one, or the luma overshoot if larger."""
    from scipy.optimize import nnls

    ycc = _YCBCR @ np.column_stack(sources)
    own = _YCBCR @ colour
    weight = 1000.0  # a heavily weighted row enforces the weights' sum
    mix, _ = nnls(np.vstack([ycc[1:], np.full(len(sources), weight)]), np.append(own[1:], weight))
    chroma = float(np.linalg.norm(ycc[1:] @ mix - own[1:]))
    luma = max(0.0, float(own[0] - ycc[0].max()), float(ycc[0].min() - own[0]))
    return max(chroma, luma)


def _merge_interrupted(runs: list[tuple[int, int, int]], votes: np.ndarray, rows: int) -> list[tuple[int, int, int]]:
    """Join runs of one colour interrupted by something other than a separator line.

    A separator line is radial: at its angle the slice colour is missing from (nearly) every
    ring. A label printed across the slice hides the colour on some rings only.
    """
    steps = votes.shape[1]
    merged = list(runs)
    index = 0
    while len(merged) > 1 and index < len(merged):
        current, following = merged[index], merged[(index + 1) % len(merged)]
        end = current[0] + current[2]
        between = np.arange(end, end + (following[0] - end) % steps) % steps
        separated = len(between) > 0 and votes[current[1], between].min() <= 0.3 * rows
        if current[1] == following[1] and not separated:
            joined = (current[0], current[1], current[2] + len(between) + following[2])
            if index + 1 < len(merged):
                merged[index:index + 2] = [joined]
            else:  # wrapped round: the last run continues into the first
                merged = [joined] + merged[1:-1]
                index = 0
            continue
        index += 1
    return merged


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


_LUMA = np.array([0.299, 0.587, 0.114], np.float32)  # ITU-R BT.601 luma weights
# A minus sign counts only where it starts the number: '10-15%' is a range, not -15 %.
_PERCENTAGE = re.compile(r"((?<![\d.,])[-\u2212])?(\d+(?:[.,]\d+)?)\s*%")


def _value(match: re.Match) -> float:
    """The signed number of a percentage match (a negative label is itself a faulty total)."""
    return (-1.0 if match.group(1) else 1.0) * float(match.group(2).replace(",", "."))


@measurement("pie_percentages")
def pie_percentages(figure: Figure, measurements) -> list[Percentage]:
    """Percentages printed on or beside the slices (within 1.5 radii of the centre).

    Vector: the stated text. Raster: the text lines found by colour (pixels that are neither
    a slice colour nor background), redrawn black on white and read by OCR in one page (lines
    read at some scales only are read again on a page of their own).
    Two labels that touch ('7.9%15.5%') are both read; labels printed over one another are
    read again one by one where each is expected (see _reread_overlapping).
    """
    geometry = measurements.get("pie")
    spans = figure.vector.texts if is_vector(figure) else _raster_label_lines(require_pixels(figure), geometry)
    found, near = [], []
    for span in spans:
        for match in _PERCENTAGE.finditer(span.text):
            found.append(Percentage(value=_value(match), bbox=span.bbox))
            near.append(_near(geometry, span.bbox))
    if len(found) == len(geometry.slices):
        return found  # one percentage per slice, wherever printed (a legend with values)
    return [label for label, close in zip(found, near) if close]


@dataclass(frozen=True)
class LabelTotal:
    """What the slices' printed percentages add up to.

    Slices without a readable percentage count with their drawn share, so a pie whose
    labels are faithful totals 100 even when some labels cannot be read.
    """

    total: float  # percentage points
    labelled: int  # slices whose own label was read
    estimated: int  # slices counted by their drawn share
    uncertainty: float  # points the estimate may be off by (drawn shares are measured)


SHARE_UNCERTAINTY = 0.5  # points: error allowed for a slice counted by its drawn share


@measurement("pie_label_total")
def pie_label_total(figure: Figure, measurements) -> LabelTotal:
    geometry = measurements.get("pie")
    labels = measurements.get("pie_percentages")
    if not labels:
        raise MeasurementUnavailable("no percentage labels read")
    if len(labels) == len(geometry.slices):  # one per slice, wherever printed (a legend with values)
        return LabelTotal(total=sum(p.value for p in labels), labelled=len(labels), estimated=0, uncertainty=0.0)
    # Otherwise each read label stands for the slice it sits on; one on a boundary cannot be
    # placed, nor can two on one slice unless they label neighbouring slices of one colour
    # that the geometry sees as one; an unplaced slice counts by its share.
    owners = [_slice_at(geometry, label.bbox) for label in labels]
    fraction = _label_radius(geometry, labels)
    placed = {}
    for owner in set(owners) - {None}:
        own = [label for o, label in zip(owners, labels) if o == owner]
        if len(own) == 1 or (fraction is not None and _labels_divide(geometry, owner, own, fraction)):
            placed[owner] = own
    if not placed:
        raise MeasurementUnavailable(f"{len(labels)} percentages read for {len(geometry.slices)} slices, none placed")
    missing = [piece for index, piece in enumerate(geometry.slices) if index not in placed]
    return LabelTotal(total=sum(p.value for own in placed.values() for p in own) + 100.0 * sum(p.share for p in missing),
                      labelled=sum(len(own) for own in placed.values()), estimated=len(missing),
                      uncertainty=SHARE_UNCERTAINTY * len(missing))


def _labels_divide(geometry: Pie, index: int, labels: list[Percentage], fraction: float) -> bool:
    """Whether several labels on one measured slice are those of neighbouring slices drawn
    in one colour without a separator (a colour cycle shorter than the slices): each sits at
    the chart's label distance on the middle of its own part, so that, going round from the
    slice's start, every label's angle is halfway between the boundary before it and the
    next, and the last part ends where the slice does. The chain of boundaries must close
    within what the labels' positions allow: a quarter of a label's height each, as in
    _label_radius, which a boundary (twice the label's angle less the previous boundary)
    carries twice."""
    piece, (cx, cy) = geometry.slices[index], geometry.centre
    placed = []
    for label in labels:
        dx, dy = (label.bbox[0] + label.bbox[2]) / 2 - cx, -((label.bbox[1] + label.bbox[3]) / 2 - cy)
        reach = float(np.hypot(dx, dy))
        if abs(reach / geometry.radius - fraction) > LABEL_RADIUS_SPREAD:
            return False
        along = (np.degrees(np.arctan2(dy, dx)) - piece.start) % 360.0
        placed.append((along, np.degrees(0.25 * (label.bbox[3] - label.bbox[1]) / reach)))
    boundary, slack = 0.0, 0.0
    for along, error in sorted(placed):
        following = 2.0 * along - boundary
        if not boundary < along < following:
            return False
        boundary, slack = following, slack + 2.0 * error  # each boundary carries twice its label's error
    return bool(abs(boundary - piece.span) <= slack)


def _near(geometry: Pie, box: BBox) -> bool:
    """Whether a label lies on or beside the pie: its nearest point within 1.5 radii of the
    centre (a long label beside the pie starts close to it)."""
    cx, cy = geometry.centre
    gap = float(np.hypot(max(box[0] - cx, 0.0, cx - box[2]), max(box[1] - cy, 0.0, cy - box[3])))
    return gap <= 1.5 * geometry.radius


def _slice_at(geometry: Pie, box: BBox) -> int | None:
    """Index of the slice a label sits on or beside (by its angle from the centre), or None
    when its centre lies within half its height of a boundary between slices, away from the
    slice's middle: which of the two it labels cannot be told. (A label centred on a slice
    thinner than itself is placed.)"""
    cx, cy = geometry.centre
    dx, dy = (box[0] + box[2]) / 2 - cx, -((box[1] + box[3]) / 2 - cy)
    angle, reach = float(np.degrees(np.arctan2(dy, dx)) % 360.0), float(np.hypot(dx, dy))
    for index, piece in enumerate(geometry.slices):
        along = (angle - piece.start) % 360.0
        if along < piece.span:
            # distance from the nearer of the slice's two radial edges
            edge = min(along, piece.span - along)
            clearance = reach * np.sin(np.radians(edge)) if edge < 90.0 else reach
            return index if clearance >= 0.5 * (box[3] - box[1]) or edge >= 0.3 * piece.span else None
    return None


BLEND_REACH = 0.1  # of the radius
DARK_SLICE = 100.0  # sRGB distance from black within which a slice colour may be that of the labels


def _text_ink(rgb: np.ndarray, geometry: Pie) -> tuple[np.ndarray, tuple[int, int]]:
    """Mask of label pixels within 1.5 radii of the pie, and the mask's offset in the figure.

    Text is ink that is far from the background and, on a slice, neither a slice colour nor
    a blend of a slice colour with the background: so the separator lines between slices and
    their antialiasing drop out. On the pie a slice's colour and its blends count only on and
    near its own slice (within BLEND_REACH of the radius of its boundaries), so that the edges
    of black glyphs on a light grey slice are not taken for a dark grey slice; a dark slice
    colour, which text may share, only within antialiasing reach of its own slice, so that a
    thin black slice does not erase the black labels of the others. Off the pie every slice
    colour is excluded (legend swatches). The pie's rim and
    the hole's edge are removed. Text in the background colour (white labels on dark slices)
    is not read.
    """
    height, width = rgb.shape[:2]
    cx, cy = geometry.centre
    radius, reach = geometry.radius, 1.5 * geometry.radius
    x0, y0 = max(0, int(cx - reach)), max(0, int(cy - reach))
    x1, y1 = min(width, int(np.ceil(cx + reach))), min(height, int(np.ceil(cy + reach)))
    crop = rgb[y0:y1, x0:x1]
    background = background_rgb(rgb)
    # Only pixels far from the background can be text: the rest is measured at those alone
    # (about half the crop is background around a pie).
    rows, cols = np.nonzero(colour_distance(crop, background) > 60)
    pixels = np.ascontiguousarray(crop[rows, cols]).reshape(-1, 1, 3)
    xs, ys = cols + x0, rows + y0
    distance = np.hypot(xs - cx, ys - cy)
    on_slices = (distance < radius) & (distance > geometry.hole)
    angle = _angles(np.column_stack([xs, ys]), geometry.centre)
    margin = np.degrees(3.0 / np.maximum(distance, 1.0))  # antialiasing reaches ~3 px across a boundary
    # A slice's blends with the background (its edges along separators) lie at most this far
    # off its measured boundaries, allowing for wedges measured reassembled or pulled out a little.
    blend_margin = np.degrees((3.0 + BLEND_REACH * radius) / np.maximum(distance, 1.0))
    nearest_slice = np.full(rows.shape, np.inf, np.float32)
    blend = np.full(rows.shape, np.inf, np.float32)
    for piece in geometry.slices:
        colour = np.asarray(piece.colour, np.float32)
        near = colour_distance(pixels, colour).ravel()
        mixed = _distance_to_segment(pixels, colour, background).ravel()
        along = (angle - piece.start) % 360.0
        outside = np.where(along < piece.span, 0.0, np.minimum(along - piece.span, 360.0 - along))  # degrees
        # Inside other slices this slice's colour and its blends with the background are text
        # antialiasing (the greys of black glyphs' edges on a light grey slice are a dark
        # grey slice's colour and its blends with white).
        away = on_slices & (outside > blend_margin)
        near, mixed = np.where(away, np.inf, near), np.where(away, np.inf, mixed)
        if float(np.linalg.norm(colour)) < DARK_SLICE:
            elsewhere = on_slices & (outside > margin)
            near, mixed = np.where(elsewhere, np.inf, near), np.where(elsewhere, np.inf, mixed)
        nearest_slice, blend = np.minimum(nearest_slice, near), np.minimum(blend, mixed)
    text = (nearest_slice > 40) & np.where(on_slices, blend > 25, True)
    edges = (np.abs(distance - radius) < 3) | ((geometry.hole > 0) & (np.abs(distance - geometry.hole) < 3))
    # Where three colours meet (two slices and the separator) blends are not on one segment:
    # along the boundaries only dark pixels (text crossing them) are kept.
    boundaries = np.zeros(crop.shape[:2], np.uint8)
    for piece in geometry.slices:
        rad = np.radians(piece.start)
        rim = (int(round(cx + radius * np.cos(rad) - x0)), int(round(cy - radius * np.sin(rad) - y0)))
        cv2.line(boundaries, (int(round(cx - x0)), int(round(cy - y0))), rim, 1, 3)
    light = pixels.reshape(-1, 3).astype(np.float32) @ _LUMA > 80
    keep = text & ~edges & ~(boundaries[rows, cols].astype(bool) & light)
    ink = np.zeros(crop.shape[:2], bool)
    ink[rows[keep], cols[keep]] = True
    return ink, (x0, y0)


def _distance_to_segment(rgb: np.ndarray, a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Distance of every pixel's colour from the blends of colours a and b (0..255 sRGB)."""
    a, b = np.asarray(a, np.float32), np.asarray(b, np.float32)
    direction = b - a
    pixels = rgb.astype(np.float32) - a
    t = np.clip((pixels @ direction) / max(float(direction @ direction), 1e-6), 0.0, 1.0)
    return np.sqrt(((pixels - t[..., None] * direction) ** 2).sum(axis=-1))


def _underlying_luma(rgb: np.ndarray, geometry: Pie, xs: np.ndarray, ys: np.ndarray) -> np.ndarray:
    """Luma of what lies under each pixel (xs, ys) of the figure: its slice's colour on the
    pie (by angle), the background elsewhere."""
    cx, cy = geometry.centre
    distance = np.hypot(xs - cx, ys - cy)
    angle = _angles(np.column_stack([xs, ys]), geometry.centre)
    under = np.full(xs.shape, float(background_rgb(rgb) @ _LUMA), np.float32)
    on_pie = (distance < geometry.radius) & (distance > geometry.hole)
    for piece in geometry.slices:
        inside = on_pie & ((angle - piece.start) % 360.0 < piece.span)
        under[inside] = float(np.asarray(piece.colour, np.float32) @ _LUMA)
    return np.maximum(under, 1.0)


UNMEASURED_SOLID = 0.05  # of the radius: ink this thick on the pie is a surface, not a text stroke


def _require_measured_colours(ink: np.ndarray, geometry: Pie, offset: tuple[int, int]) -> None:
    """Raise when part of the pie is a surface in none of the measured slices' colours (a
    slice the geometry missed, shading, a pattern): that slice's share and label would both
    be lost, and the labels read would not add up for a reason of the measurement's own."""
    ox, oy = offset
    rows, cols = np.nonzero(ink)
    distance = np.hypot(cols + ox - geometry.centre[0], rows + oy - geometry.centre[1])
    side = max(5, int(round(UNMEASURED_SOLID * geometry.radius)))
    on_pie = np.zeros(ink.shape, np.uint8)
    inside = (distance < geometry.radius) & (distance > geometry.hole)
    on_pie[rows[inside], cols[inside]] = 1
    solid = cv2.morphologyEx(on_pie, cv2.MORPH_OPEN, np.ones((side, side), np.uint8))
    if int(solid.sum()) >= 2 * side * side:
        raise MeasurementUnavailable("part of the pie is in no measured slice's colour (a missed slice or shading)")


def _raster_label_lines(rgb: np.ndarray, geometry: Pie) -> list[TextSpan]:
    """Label lines near the pie, read by OCR; a line counts when three readings agree.

    Labels of thin neighbouring slices printed over one another merge into one line that
    reads partly or not at all; where the chart puts its labels at one distance from the
    centre along each slice's middle, each of them is read again on its own, in a window
    where it is expected."""
    ink, (ox, oy) = _text_ink(rgb, geometry)
    _require_measured_colours(ink, geometry, (ox, oy))
    closed = cv2.dilate(ink.astype(np.uint8), np.ones((3, 7), np.uint8))
    _, stats, _ = component_stats(closed, min_area=12)
    limit = 0.4 * geometry.radius
    boxes = [(int(bx), int(by), int(bw), int(bh)) for _, bx, by, bw, bh, _ in stats
             if 5 <= bh <= limit and bh <= bw <= 2.5 * limit]  # a percentage is wider than tall
    if not boxes:
        return []
    # Text keeps its antialiased levels, measured against what lies under it (a dark slice
    # would otherwise blacken the glyphs' edges and fill their holes); all else turns white.
    crop = rgb[oy:oy + ink.shape[0], ox:ox + ink.shape[1]]
    rows, cols = np.nonzero(cv2.dilate(ink.astype(np.uint8), np.ones((3, 3), np.uint8)))  # near text
    luma = crop[rows, cols].astype(np.float32) @ _LUMA
    grey = np.full(ink.shape, 255, np.uint8)
    grey[rows, cols] = np.clip(255.0 * luma / _underlying_luma(rgb, geometry, cols + ox, rows + oy), 0, 255)
    per_box = _read_lines(grey, boxes, (ox, oy))
    _reread_overlapping(grey, geometry, (ox, oy), boxes, per_box)
    return _restore_decimal_points([line for lines in per_box for line in lines])


@dataclass
class _BoxReadings:
    texts: list[tuple[str, ...]]  # per box, what each scale read
    lines: list[list[TextSpan]]  # per box, the percentages all scales agree on


def _read_boxes(grey: np.ndarray, boxes: list[tuple[int, int, int, int]], offset: tuple[int, int]) -> _BoxReadings:
    """What each scale reads in each box, and the percentages they agree on (placed in the
    figure: the box moved by offset)."""
    ox, oy = offset
    readings = _BoxReadings([], [])
    for (bx, by, bw, bh), words in zip(boxes, _ocr_boxes(grey, boxes)):
        texts = tuple("".join(w.text for w in scale) for scale in words)
        readings.texts.append(texts)
        readings.lines.append(_agreed_percentages(texts, (ox + bx, oy + by, ox + bx + bw, oy + by + bh)))
    return readings


def _read_lines(grey: np.ndarray, boxes: list[tuple[int, int, int, int]],
                offset: tuple[int, int]) -> list[list[TextSpan]]:
    """The percentages all three scales agree on in each box (its place in the figure: the
    box moved by offset). A page that also holds fragments (separator and rim antialiasing)
    misleads recognition and sets its scales by their height: lines that read as a
    percentage at some scale but not at all three are read again on a page of their own."""
    first = _read_boxes(grey, boxes, offset)
    doubtful = [index for index, texts in enumerate(first.texts)
                if not first.lines[index] and any(_PERCENTAGE.search(text) for text in texts)]
    if doubtful and len(doubtful) < len(boxes):
        for index, lines in zip(doubtful, _read_boxes(grey, [boxes[index] for index in doubtful], offset).lines):
            first.lines[index] = lines
    return first.lines


def _ocr_boxes(grey: np.ndarray, boxes: list[tuple[int, int, int, int]]) -> list[list[list[TextSpan]]]:
    """The words OCR reads in each (x, y, width, height) box of a greyscale image, at three
    scales (a misread digit seldom repeats at another scale): per box, per scale, the words
    left to right, their boxes relative to the box's corner. The boxes are stacked on one
    white page, each in its own band, so that one call per scale reads them all."""
    pad = 6
    page_width = max(bw for _, _, bw, _ in boxes) + 2 * pad
    page = np.full((sum(bh + 2 * pad for *_, bh in boxes), page_width), 255, np.uint8)
    bands, top = [], 0
    for bx, by, bw, bh in boxes:
        page[top + pad:top + pad + bh, pad:pad + bw] = grey[by:by + bh, bx:bx + bw]
        bands.append((top, top + bh + 2 * pad))
        top += bh + 2 * pad
    glyph = float(np.median([bh for *_, bh in boxes]))
    per_scale = []
    for target in (20.0, 30.0, 40.0):
        words = ocr_words(np.dstack([page] * 3), (0, 0, page_width, top), psm=6, whitelist="0123456789.,%-",
                          upscale=float(np.clip(target / glyph, 1.5, 5.0)))
        per_scale.append([[TextSpan(text=w.text, bbox=(w.bbox[0] - pad, w.bbox[1] - b0 - pad, w.bbox[2] - pad,
                                                       w.bbox[3] - b0 - pad), size_pt=0.0, angle=0.0, font="ocr")
                           for w in sorted(words, key=lambda w: w.bbox[0]) if b0 <= (w.bbox[1] + w.bbox[3]) / 2 < b1]
                          for b0, b1 in bands])
    return [list(scales) for scales in zip(*per_scale)]


LABEL_RADIUS_SPREAD = 0.03  # of the radius: labels put at one distance from the centre agree this well


def _label_radius(geometry: Pie, labels: list[TextSpan] | list[Percentage]) -> float | None:
    """The distance from the centre (in radii) at which the chart prints its labels, when
    the labels read sit on their slices' middle directions at one distance (as matplotlib's
    autopct and most tools place them); None when fewer than three do or they disagree."""
    cx, cy = geometry.centre
    fractions = []
    for label in labels:
        index = _slice_at(geometry, label.bbox)
        if index is None:
            continue
        dx, dy = (label.bbox[0] + label.bbox[2]) / 2 - cx, -((label.bbox[1] + label.bbox[3]) / 2 - cy)
        turn = np.radians(np.degrees(np.arctan2(dy, dx)) - geometry.slices[index].middle)
        # within a quarter of the label's height of the slice's middle direction
        if np.cos(turn) > 0 and np.hypot(dx, dy) * abs(np.sin(turn)) <= 0.25 * (label.bbox[3] - label.bbox[1]):
            fractions.append(float(np.hypot(dx, dy)) / geometry.radius)
    if len(fractions) < 3:
        return None
    middle = float(np.median(fractions))
    agreeing = sum(abs(f - middle) <= LABEL_RADIUS_SPREAD for f in fractions)
    return middle if agreeing >= 2 * len(fractions) / 3 else None


WINDOW_CHARS = (4.0, 4.5, 5.0, 5.5)  # widths, in characters, of the windows a label is read in again


def _reread_overlapping(grey: np.ndarray, geometry: Pie, offset: tuple[int, int],
                        boxes: list[tuple[int, int, int, int]], per_box: list[list[TextSpan]]) -> None:
    """Read again, each on its own, the labels of a line that holds the expected places of
    more labels than it read (labels printed over one another), replacing its reading.

    A label is expected at the chart's label distance along its slice's middle direction,
    and read in windows of a line's height and WINDOW_CHARS characters' width centred there:
    a narrow window leaves out the neighbours' glyphs but may cut a long label ('4.1%' of
    '24.1%'), a wide one holds the whole label. The reading of the narrowest window on which
    all three scales agree counts, unless a wider window reads another percentage there (a
    narrower one may read part of it)."""
    singles = [(lines[0], box) for lines, box in zip(per_box, boxes) if len(lines) == 1]
    fraction = _label_radius(geometry, [line for lines in per_box for line in lines])
    if fraction is None or len(singles) < 2:
        return
    ox, oy = offset
    # a character's width: the lines' boxes are 6 px wider than their text (the dilation's 7 columns)
    pitch = float(np.median([(bw - 6) / len(line.text) for line, (_, _, bw, _) in singles]))
    height = int(round(np.median([bh for _, (_, _, _, bh) in singles])))
    cx, cy = geometry.centre
    expected = [(cx + fraction * geometry.radius * np.cos(np.radians(p.middle)) - ox,
                 cy - fraction * geometry.radius * np.sin(np.radians(p.middle)) - oy) for p in geometry.slices]
    crowded = []
    for index, (bx, by, bw, bh) in enumerate(boxes):
        inside = [(ex, ey) for ex, ey in expected if bx <= ex < bx + bw and by <= ey < by + bh]
        if len(inside) >= 2 and len(per_box[index]) < len(inside):
            crowded.append((index, inside))
    if not crowded:
        return
    rows, cols = grey.shape
    windows = []
    for _, inside in crowded:
        for ex, ey in inside:
            for chars in WINDOW_CHARS:
                x0, y0 = max(0, int(round(ex - chars * pitch / 2))), max(0, int(round(ey - height / 2)))
                windows.append((x0, y0, min(cols, x0 + int(round(chars * pitch))) - x0, min(rows, y0 + height) - y0))
    read = _read_boxes(grey, windows, offset)
    readings = iter(zip(read.texts, read.lines))
    for index, inside in crowded:
        found = []
        for _ in inside:
            agreed, seen = [], []
            for texts, lines in (next(readings) for _ in WINDOW_CHARS):
                seen.append({_value(m) for text in texts for m in _PERCENTAGE.finditer(text)})
                agreed.append(lines)
            narrowest = next((k for k, a in enumerate(agreed) if len(a) == 1), None)
            if narrowest is None:
                continue
            reading = agreed[narrowest][0]
            if set().union(*seen[narrowest:]) == {_value(_PERCENTAGE.match(reading.text))}:
                found.append(reading)
        per_box[index] = found


def _decimals(text: str) -> int:
    number = _PERCENTAGE.match(text).group(2)
    return len(re.split(r"[.,]", number)[1]) if re.search(r"[.,]", number) else 0


def _restore_decimal_points(labels: list[TextSpan]) -> list[TextSpan]:
    """The labels of one chart share a number format, and the decimal point is the glyph
    text recognition loses most often ('119%' for '11.9%', the same at every scale). When
    most other labels have d decimals, a label read with none and more than d digits gets
    its point back d digits from the end. One with no more digits than d ('8%' among
    'x.x%' labels: part of it lost under an overlapping label) is no reading and is dropped."""
    kept = []
    for index, label in enumerate(labels):
        others = [_decimals(other.text) for k, other in enumerate(labels) if k != index]
        match = _PERCENTAGE.match(label.text)
        sign, digits = match.group(1) or "", match.group(2)
        common = max(set(others), key=others.count) if others else 0
        if common and others.count(common) > len(others) / 2 and _decimals(label.text) == 0:
            if len(digits) <= common:
                continue
            label = TextSpan(text=f"{sign}{digits[:-common]}.{digits[-common:]}%", bbox=label.bbox,
                             size_pt=label.size_pt, angle=label.angle, font=label.font)
        if _value(_PERCENTAGE.match(label.text)) <= 100.0:  # no part exceeds the whole
            kept.append(label)
    return kept


def _agreed_percentages(texts: tuple[str, ...], box: BBox) -> list[TextSpan]:
    """The percentages of one label line when every reading gives the same ones (a misread
    digit seldom repeats at another scale). Labels run together ('7.9%15.5%', overlapping
    labels of thin slices) are split into their percentages, each with its share of the
    line's box (by character position), so each can be placed on its own slice."""
    found = [[m for m in _PERCENTAGE.finditer(text)] for text in texts]
    values = [[_value(m) for m in matches] for matches in found]
    if not values[0] or any(v != values[0] for v in values):
        return []
    text = texts[0]
    x0, y0, x1, y1 = box
    scale = (x1 - x0) / max(len(text), 1)
    return [TextSpan(text=match.group(0), bbox=(x0 + match.start() * scale, y0, x0 + match.end() * scale, y1),
                     size_pt=0.0, angle=0.0, font="ocr") for match in found[0]]
