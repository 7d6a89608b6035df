"""Legend keys: a coloured swatch with a text label beside it, one per series.

A key is a short chromatic mark (a line segment, a small square or a marker) whose right
edge lies just left of a horizontal text span, vertically centred on it. This is how
plotting libraries, office suites and hand-made charts lay out legends, framed or not,
inside or outside the plot. Vector evidence states swatches and labels exactly. On rasters
a swatch is a small isolated chromatic mark with grey or black label ink just right of it
(the words are not read): a plotted line is one long connected mark with its markers.
"""

from __future__ import annotations

from dataclasses import dataclass

import cv2
import numpy as np

from corpusaudit.measure import measurement
from corpusaudit.measure.shapes import (NEUTRAL_CHROMA, colour_key, is_neutral, is_vector, require_pixels,
                                         union_box)
from corpusaudit.model import BBox, Figure, MeasurementUnavailable, PathItem, RGB, TextSpan

GAP_HEIGHTS = 2.0  # the swatch's right edge may lie up to this many text heights left of the label
SWATCH_MAX_HEIGHTS = 4.0  # a swatch is at most this many text heights wide (longer: a data line)
MAX_TILT = 5.0  # degrees: legend labels read horizontally


@dataclass(frozen=True)
class LegendKey:
    colour: tuple[int, int, int]  # 8-bit sRGB of the swatch
    swatch: BBox
    label: str  # "" on rasters: the label's words are not read
    label_box: BBox


@dataclass(frozen=True)
class LegendKeys:
    keys: tuple[LegendKey, ...]  # one per distinct colour, top to bottom
    region: BBox | None  # the union of the keys' swatches and labels


def _swatch_colour(path: PathItem) -> RGB | None:
    """The chromatic colour a path shows, fill before stroke; None for greys (axes, frames)."""
    for colour in (path.fill if "f" in path.kind else None, path.stroke if "s" in path.kind else None):
        if colour is not None and not is_neutral(colour):
            return colour
    return None


def _swatch_for(span: TextSpan, candidates: list[tuple[PathItem, RGB]]) -> tuple[PathItem, RGB] | None:
    """The nearest candidate swatch left of the span and centred on its line."""
    x0, y0, _, y1 = span.bbox
    height = max(1.0, y1 - y0)
    middle = (y0 + y1) / 2.0
    best, best_gap = None, None
    for path, colour in candidates:
        px0, py0, px1, py1 = path.bbox
        gap = x0 - px1
        if not -0.3 * height <= gap <= GAP_HEIGHTS * height:
            continue
        if abs((py0 + py1) / 2.0 - middle) > 0.45 * height:
            continue
        if px1 - px0 > SWATCH_MAX_HEIGHTS * height or py1 - py0 > 1.6 * height:
            continue
        if best_gap is None or gap < best_gap:
            best, best_gap = (path, colour), gap
    return best


def _part_of_data(swatch: PathItem, colour: RGB, data: list[PathItem]) -> bool:
    """True when the mark belongs to a plotted series rather than to a key: a much longer
    path of its colour passes through it (a marker on its line, as at the end of a line
    labelled directly), or another path of its colour starts where it ends (a polyline drawn
    as separate segments). A key's swatch stands alone."""
    key = colour_key(colour)
    x0, y0, x1, y1 = swatch.bbox
    ends = [swatch.points[0], swatch.points[-1]] if swatch.points else []
    for path in data:
        if path is swatch or colour_key(_swatch_colour(path)) != key:
            continue
        if path.bbox[2] - path.bbox[0] > 2 * (x1 - x0) and any(
                x0 - 1 <= x <= x1 + 1 and y0 - 1 <= y <= y1 + 1 for x, y in path.points):
            return True
        if path.points and any(abs(px - ex) <= 1.5 and abs(py - ey) <= 1.5
                               for px, py in (path.points[0], path.points[-1]) for ex, ey in ends):
            return True
    return False


def _aligned(keys: list[LegendKey]) -> list[LegendKey]:
    """The largest set of keys laid out as one legend: swatches in a column or in a row."""
    best: list[LegendKey] = []
    for anchor in keys:
        height = max(1.0, anchor.label_box[3] - anchor.label_box[1])
        column = [k for k in keys if abs(k.swatch[0] - anchor.swatch[0]) <= 0.5 * height]
        row = [k for k in keys if abs((k.swatch[1] + k.swatch[3]) - (anchor.swatch[1] + anchor.swatch[3])) / 2
               <= 0.3 * height]
        for group in (column, row):
            if len(group) > len(best):
                best = group
    return best


def _ink_right_of(ink: np.ndarray, box: tuple[int, int, int, int], reach: int) -> BBox | None:
    """The box of the label-like ink (grey or dark marks) just right of a swatch, if any."""
    x0, y0, x1, y1 = box
    half = max(6, (y1 - y0))
    middle = (y0 + y1) // 2
    top, bottom = max(0, middle - half), min(ink.shape[0], middle + half + 1)
    left, right = x1 + 1, min(ink.shape[1], x1 + 1 + reach)
    window = ink[top:bottom, left:right]
    if window.size == 0 or window.mean() < 0.04:
        return None
    columns = np.flatnonzero(window.any(axis=0))
    if columns[0] > reach // 3:  # the label starts right next to its swatch
        return None
    rows = np.flatnonzero(window.any(axis=1))
    return (left + int(columns[0]), top + int(rows[0]), left + int(columns[-1]) + 1, top + int(rows[-1]) + 1)


def _raster_keys(figure: Figure, measurements) -> list[LegendKey]:
    """Isolated chromatic marks (a short stroke or a small square) with label ink to their right."""
    pixels = require_pixels(figure)
    height, width = pixels.shape[:2]
    # per-pixel channel extremes and sums with OpenCV: numpy's reductions over the last,
    # three-long axis cost about ten times as much
    r, g, b = cv2.split(np.ascontiguousarray(pixels))
    chroma = cv2.subtract(cv2.max(cv2.max(r, g), b), cv2.min(cv2.min(r, g), b))
    chromatic = (chroma > 1.5 * NEUTRAL_CHROMA * 255).astype(np.uint8)
    channel_sum = cv2.add(cv2.add(r, g, dtype=cv2.CV_16U), b, dtype=cv2.CV_16U)
    ink = (chroma <= NEUTRAL_CHROMA * 255) & (channel_sum < 3 * 140)  # grey or black text (mean below 140)
    count, labels, stats, _ = cv2.connectedComponentsWithStats(chromatic, connectivity=8)
    keys = []
    for k in range(1, count):
        x, y, w, h, area = (int(v) for v in stats[k])
        if not (6 <= w <= 0.12 * width and 2 <= h <= 40 and h <= max(8, 1.4 * w) and area >= 0.5 * w * min(h, 3)):
            continue
        label_box = _ink_right_of(ink, (x, y, x + w, y + h), reach=max(3 * w, 40))
        if label_box is None:
            continue
        mine = labels[y:y + h, x:x + w] == k
        strongest = chroma[y:y + h, x:x + w][mine]  # the swatch's core, not its anti-aliased fringe
        core = pixels[y:y + h, x:x + w][mine][strongest >= np.percentile(strongest, 75)]
        colour = np.median(core, axis=0)
        keys.append(LegendKey(colour=tuple(int(v) for v in colour), swatch=(x, y, x + w, y + h),
                              label="", label_box=label_box))
    return keys


def _distinct(keys: list[LegendKey], tolerance: int = 24) -> list[LegendKey]:
    """One key per colour (8-bit channels within tolerance): a legend names each series once."""
    kept: list[LegendKey] = []
    for key in keys:
        if all(max(abs(a - b) for a, b in zip(key.colour, other.colour)) > tolerance for other in kept):
            kept.append(key)
    return kept


@measurement("legend_keys")
def legend_keys(figure: Figure, measurements) -> LegendKeys:
    """Legend keys: swatch colour, swatch box and label (its text on vector figures)."""
    if not is_vector(figure):
        found = _distinct(_raster_keys(figure, measurements))
    else:
        found = _distinct(_vector_keys(figure))
    keys = tuple(_aligned(found)) if len(found) > 1 else tuple(found)
    return LegendKeys(keys=keys, region=union_box([k.swatch for k in keys] + [k.label_box for k in keys]))


def _vector_keys(figure: Figure) -> list[LegendKey]:
    width = float(figure.pixels.shape[1] if figure.pixels is not None else figure.width_px or 1)
    candidates, data = [], []
    for path in figure.vector.paths:
        colour = _swatch_colour(path)
        if colour is None:
            continue
        if path.bbox[2] - path.bbox[0] < 0.25 * width:
            candidates.append((path, colour))
        data.append(path)
    keys = []
    for span in sorted(figure.vector.texts, key=lambda s: (s.bbox[1], s.bbox[0])):
        if abs(span.angle) > MAX_TILT or not any(ch.isalpha() for ch in span.text):
            continue
        match = _swatch_for(span, candidates)
        if match is None or _part_of_data(*match, data):
            continue
        path, colour = match
        keys.append(LegendKey(colour=colour_key(colour), swatch=path.bbox, label=span.text, label_box=span.bbox))
    return keys
