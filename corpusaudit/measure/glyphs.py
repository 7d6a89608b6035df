"""Text lines in a raster figure found from the shapes of its glyphs, without reading them.

Size and contrast checks need where text is, how tall its letters are and which colours
its ink and background have, not what it says, so no text recognition is needed. The steps:

1. Local background: the median grey over ~36 px windows (text covers well under half of
   any such window, so the median is the paper, the panel or the bar the text sits on).
2. Ink: pixels darker (dark text) or lighter (light text) than that background by at least
   MIN_CONTRAST grey levels and by at least half the strongest contrast within 2 px, so
   anti-aliased fringes stay out and neighbouring letters stay apart.
3. Glyphs: connected components of glyph size whose strokes are thin for their height
   (filled markers, bars, legend patches and thick lines have thick "strokes").
4. Lines: glyphs linked to a neighbour along the reading direction when their baselines
   or their tops align, their heights are alike and the gap is within a word space. Runs
   of identical marks (hollow markers, dashes, grid crossings) are not text. A single
   component counts only when it is a word whose letters have merged (small text).
   Reading directions: horizontal, and rotated 90 degrees either way (axis titles).
5. Heights: in each line the tall glyphs (capitals, digits, ascenders) give the cap height
   and the short ones (x, o, e...) the x-height; either gives the font size in pixels.
6. Colours: ink from the cores of the strokes (the pixels of highest contrast, past their
   blended edges), background the modal colour of the surround outside the ink.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import cv2
import numpy as np

from corpusaudit.measure.colour import BIN_LEVELS, modal_bin
from corpusaudit.model import BBox, RGB

MIN_CONTRAST = 14  # grey levels from the local background: JPEG noise on flat areas stays below
BACKGROUND_STEP = 4  # the background map samples every 4th pixel ...
BACKGROUND_WINDOW = 9  # ... and takes the median over 9x9 samples (36 px)
TOPHAT_PX = 11  # strokes up to ~10 px wide (18 pt bold at 300 ppi) count as thin
MIN_GLYPH_PX = 3  # shorter marks cannot be told from noise and dots
MAX_GLYPH_SHARE = 0.08  # glyphs taller than this share of the figure's short side are shapes, not text
MIN_MAX_GLYPH_PX = 24  # ... except in small images, where text may be relatively tall
STROKE_SHARE = 0.3  # a glyph's widest stroke is under this share of its height (DejaVu Bold: ~0.2)
ALIGN_SHARE = 0.15  # baselines (or tops) within this share of the glyph height are aligned
GAP_SHARE = 0.7  # letter and word gaps: up to this share of the taller glyph's height
UNIFORM_SHARE = 0.6  # this share of a line's surround matches its modal colour: a plain background
INNER_UNIFORM_SHARE = 0.8  # ... and this share of the pixels between its letters
BACKGROUND_TOLERANCE = 24  # grey levels per channel: JPEG noise around a flat colour stays within
HEIGHT_RATIO = 2.2  # a descender letter against an x-height letter is ~1.4; more is another line
SHAPE_PX = 12  # marks are compared as 12x12 resamplings of their contrast ...
SAME_SHAPE = 0.9  # ... and are the same mark above this correlation (distinct letters: well below)
MIN_ROTATED_GLYPHS = 3  # a rotated line of two marks is mostly two stacked markers, not a word
MARK_REPEATS = 10  # a symmetric shape seen this often (itself included) is a scatter's marker
CLEAR_SHARE = 0.85  # of a line's surround (outside its box) is its background: other marks keep off text

# Ink heights in em, measured with Pillow on DejaVu Sans (matplotlib's default font):
# capitals 0.729, digits 0.729-0.756, ascenders (b, d, h, k, l) 0.76-0.77; x-height letters
# 0.547-0.574. Other fonts differ by a few per cent (Arial caps 0.716, from memory).
TALL_EM = 0.74
SHORT_EM = 0.56
# Ink width / height, same source: digits 0.60-0.73 (median 0.66), x-height letters 0.57-1.42
# (median 0.82). A line whose glyphs all share one height reads as digits/capitals below this.
TALL_ASPECT = 0.75
MERGED_ADVANCE = 0.86  # a digit's advance (0.636 em) over its height (0.74 em), same source

ORIENTATIONS = (0, 90, -90)  # horizontal; reading bottom to top; reading top to bottom


@dataclass(frozen=True)
class GlyphLine:
    """One line of text found from its glyphs.

    bbox: figure pixels. angle: 0 horizontal, 90 reads bottom to top, -90 top to bottom.
    glyphs: connected components in the line; a word of merged letters counts its letters
    at one per 0.86 of its height (a DejaVu digit's advance over its height).
    cap_px / x_px: ink height of the tall glyphs / of the short lower-case ones (None when
    the line has none of that kind). em_px: font size in pixels from whichever is known.
    stroke_px: the widest stroke seen (the cores that show the ink's full colour).
    ink / background: sRGB 0..1 of the stroke cores and of the surround outside the ink.
    """

    bbox: BBox
    angle: int
    glyphs: int
    cap_px: float | None
    x_px: float | None
    em_px: float
    stroke_px: float
    dark: bool
    ink: RGB
    background: RGB


@dataclass
class _Components:
    """Glyph-sized components of one polarity, as parallel arrays."""

    labels: np.ndarray  # the label image of that polarity
    ids: np.ndarray  # component label
    x0: np.ndarray
    y0: np.ndarray
    x1: np.ndarray  # exclusive
    y1: np.ndarray
    stroke: np.ndarray  # widest stroke, px
    area: np.ndarray  # ink pixels
    contrast: np.ndarray  # uint8 contrast image of that polarity
    dark: bool
    max_height: float  # tallest glyph taken for text, px
    shapes: dict[int, np.ndarray] = field(default_factory=dict)  # _shape of each component, once

    def member_mask(self, labels: np.ndarray, members: np.ndarray) -> np.ndarray:
        """Which pixels of labels (a window of self.labels) belong to the members."""
        ids = self.ids[members]
        wanted = np.zeros(max(int(labels.max()), int(ids.max())) + 1, dtype=bool)
        wanted[ids] = True
        return wanted[labels]


def local_background(grey: np.ndarray) -> np.ndarray:
    """Median grey over BACKGROUND_STEP * BACKGROUND_WINDOW px windows, full resolution."""
    height, width = grey.shape
    samples = np.ascontiguousarray(grey[::BACKGROUND_STEP, ::BACKGROUND_STEP])
    window = min(BACKGROUND_WINDOW, 2 * (min(samples.shape) // 2) - 1)
    if window >= 3:
        samples = cv2.medianBlur(samples, window)
    return cv2.resize(samples, (width, height), interpolation=cv2.INTER_LINEAR)


def _per_label_max(labels: np.ndarray, values: np.ndarray, count: int, levels: range) -> np.ndarray:
    """Per label, the highest of levels that some of its pixels' values reach (0 if none):
    one bincount per level, far cheaper than an unbuffered maximum.at over every pixel."""
    best = np.zeros(count, dtype=np.int32)
    for level in levels:
        reached = np.bincount(labels[values >= level], minlength=count) > 0
        if not reached.any():
            break
        best[reached] = level
    return best


def _components(contrast: np.ndarray, thin_contrast: np.ndarray, dark: bool, max_height: float) -> _Components:
    """Glyph candidates of one polarity. contrast: difference from the local background;
    thin_contrast: the top-hat (difference from the background with thin features removed),
    which keeps bars, cells and wedges (wider than any stroke) out of the ink."""
    half_peak = cv2.dilate(contrast, np.ones((5, 5), np.uint8)) >> 1
    ink = (cv2.min(contrast, thin_contrast) >= MIN_CONTRAST) & (contrast >= half_peak)
    # Labelling and distances run on the box around the ink (about half of a figure on
    # average), with a margin past the deepest depth read below. Its corner stays on even
    # coordinates so the labeller's 2x2 blocks, and so the label numbers, are the figure's.
    height, width = ink.shape
    bx, by, bw, bh = cv2.boundingRect(ink.view(np.uint8))
    if bw == 0:
        bx, by, bw, bh = 0, 0, width, height
    margin = TOPHAT_PX // 2 + 3
    X0, Y0 = max(0, bx - margin) & ~1, max(0, by - margin) & ~1
    X1, Y1 = min(width, bx + bw + margin), min(height, by + bh + margin)
    box_ink = ink[Y0:Y1, X0:X1].view(np.uint8)
    # Plain labelling and boxes from the ink pixels: connectedComponentsWithStats takes
    # several times longer on a figure than both together.
    count, box_labels = cv2.connectedComponents(box_ink, connectivity=8)
    labels = np.zeros(ink.shape, dtype=box_labels.dtype)
    labels[Y0:Y1, X0:X1] = box_labels
    points = cv2.findNonZero(box_ink)
    points = np.zeros((0, 2), np.int64) if points is None else points.reshape(-1, 2).astype(np.int64)
    xs, ys = points[:, 0], points[:, 1]
    member = box_labels[ys, xs]
    box_xs, box_ys = xs, ys
    xs, ys = xs + X0, ys + Y0
    area = np.bincount(member, minlength=count)
    x0 = np.full(count, sum(ink.shape), dtype=np.int64)  # the dtype of xs: ufunc.at is slow when it casts
    y0 = x0.copy()
    x1 = np.zeros(count, dtype=np.int64)
    y1 = x1.copy()
    np.minimum.at(x0, member, xs)
    np.minimum.at(y0, member, ys)
    np.maximum.at(x1, member, xs + 1)
    np.maximum.at(y1, member, ys + 1)
    w, h = x1 - x0, y1 - y0
    # Stroke widths are read on all of the contrast, top-hat or not: a filled marker that the
    # top-hat hollows to a ring is still thick there. Depth: chessboard distance of an ink
    # pixel from the nearest pixel off the contrast (1 on an edge), up to half the top-hat;
    # the margin holds every off-contrast pixel near enough to lower a depth that is read.
    solid = (contrast[Y0:Y1, X0:X1] >= MIN_CONTRAST).view(np.uint8)
    depth = cv2.distanceTransform(solid, cv2.DIST_C, 3)[box_ys, box_xs]
    widest = _per_label_max(member, depth, count, range(1, TOPHAT_PX // 2 + 2))
    strong = np.bincount(member[contrast[ys, xs] >= 2 * MIN_CONTRAST], minlength=count) > 0
    stroke = 2.0 * widest - 1.0
    chosen = (h >= MIN_GLYPH_PX) & (h <= max_height) & (w <= 12 * h) & (area >= 4) \
        & (stroke <= np.maximum(1.0, STROKE_SHARE * h)) & strong
    chosen[0] = False
    return _Components(labels, np.flatnonzero(chosen), x0[chosen], y0[chosen], x1[chosen], y1[chosen],
                       stroke[chosen], area[chosen], contrast, dark, max_height)


def _frame(parts: _Components, angle: int) -> tuple[np.ndarray, ...]:
    """(along0, along1, top, bottom): extents along and across the reading direction, with
    bottom > top and the baseline at bottom, for text at angle."""
    if angle == 0:
        return parts.x0, parts.x1, parts.y0, parts.y1
    if angle == 90:  # reads upwards: glyph tops point left, baseline on the right
        return -parts.y1, -parts.y0, parts.x0, parts.x1
    return parts.y0, parts.y1, -parts.x1, -parts.x0


def _link(along0, along1, top, bottom, candidates: np.ndarray) -> np.ndarray:
    """Group labels of candidates (indices) linked into lines in one frame."""
    n = len(candidates)
    if n == 0:
        return np.zeros(0, dtype=np.int64)
    a0, a1, t, b = along0[candidates], along1[candidates], top[candidates], bottom[candidates]
    h = (b - t).astype(np.float64)
    order = np.argsort(a0, kind="stable")
    a0s = a0[order]
    reach = a1 + GAP_SHARE * h  # farthest start of a neighbour to the right
    stop = np.searchsorted(a0s, reach, side="right")
    position = np.empty(n, dtype=np.int64)
    position[order] = np.arange(n)
    starts = position + 1
    counts = np.maximum(stop - starts, 0)
    first = np.repeat(np.arange(n), counts)
    offsets = np.arange(counts.sum()) - np.repeat(np.cumsum(counts) - counts, counts)
    second = order[np.repeat(starts, counts) + offsets]
    i, j = first, second
    tall = np.maximum(h[i], h[j])
    short = np.minimum(h[i], h[j])
    tolerance = np.maximum(1.0, ALIGN_SHARE * tall)
    aligned = (np.abs(b[i] - b[j]) <= tolerance) | (np.abs(t[i] - t[j]) <= tolerance)
    overlap = np.minimum(b[i], b[j]) - np.maximum(t[i], t[j]) >= 0.5 * short
    gap = np.maximum(a0[j] - a1[i], a0[i] - a1[j])
    near = (gap <= GAP_SHARE * tall) & (gap >= -0.3 * short)
    linked = aligned & overlap & near & (tall <= HEIGHT_RATIO * short)
    return _union_find(n, i[linked], j[linked])


def _union_find(n: int, first: np.ndarray, second: np.ndarray) -> np.ndarray:
    """Group label of each of n nodes joined by the edges (first[k], second[k]); labels
    are numbered in the order of each group's first node. Min-label propagation with
    pointer jumping: a few vector passes, far cheaper than building a sparse graph for
    the few hundred nodes of a figure."""
    root = np.arange(n, dtype=np.int64)
    while len(first):
        low = np.minimum(root[first], root[second])
        changed = (root[first] != low) | (root[second] != low)
        if not changed.any():
            break
        # Each node's root drops to the lowest root across its edges, then roots are
        # followed to their own roots until every chain is flat.
        np.minimum.at(root, root[first], low)
        np.minimum.at(root, root[second], low)
        while True:
            jumped = root[root]
            if np.array_equal(jumped, root):
                break
            root = jumped
    # Each group's root is its first node, so sorted roots number the groups in that order.
    return np.unique(root, return_inverse=True)[1].astype(np.int64).reshape(-1)


def _shape(parts: _Components, k: int) -> np.ndarray:
    """A component's contrast in its box, blurred by a pixel (so the same mark at another
    sub-pixel offset still matches) and resampled to SHAPE_PX square, zero mean, unit norm.
    Lines are tried in several orientations, so each component's shape is kept."""
    if k in parts.shapes:
        return parts.shapes[k]
    x0, y0, x1, y1 = parts.x0[k], parts.y0[k], parts.x1[k], parts.y1[k]
    own = parts.labels[y0:y1, x0:x1] == parts.ids[k]
    patch = np.zeros((y1 - y0 + 4, x1 - x0 + 4), np.float32)  # a 2 px margin of zeros
    patch[2:-2, 2:-2] = np.where(own, parts.contrast[y0:y1, x0:x1], 0)
    patch = cv2.resize(cv2.GaussianBlur(patch, (0, 0), 1.0), (SHAPE_PX, SHAPE_PX), interpolation=cv2.INTER_AREA)
    patch -= patch.mean()
    parts.shapes[k] = patch / max(float(np.linalg.norm(patch)), 1e-6)
    return parts.shapes[k]


def _repeated_marks(parts: _Components, members: np.ndarray) -> bool:
    """Every member the same mirror-symmetric shape: a row of markers (circles, squares,
    crosses, triangles), dashes or grid crossings, not letters. Boxes agree in size (within a
    pixel or 10%), shapes correlate, and all are symmetric about the same axis: distinct
    letters of one size can correlate as well as one mark at two sub-pixel offsets (a/g,
    Q/S at 12 px), but not while sharing a mirror axis. Two alike glyphs with a mark low
    between them are a decimal number ('0.0'), not marks."""
    width, height = parts.x1[members] - parts.x0[members], parts.y1[members] - parts.y0[members]
    for size in (width, height):
        if np.ptp(size) > max(1.0, 0.1 * float(size.max())):
            return False
    shapes = [_shape(parts, int(k)) for k in members]
    if any(float(np.vdot(shapes[0], other)) < SAME_SHAPE for other in shapes[1:]):
        return False
    if not any(all(float(np.vdot(shape, np.flip(shape, axis))) >= SAME_SHAPE for shape in shapes) for axis in (0, 1)):
        return False
    return not _decimal(parts, members)


def _symmetric(shape: np.ndarray) -> bool:
    return any(float(np.vdot(shape, np.flip(shape, axis))) >= SAME_SHAPE for axis in (0, 1))


def _decimal(parts: _Components, members: np.ndarray) -> bool:
    """Two glyphs with a mark low between them: a decimal number ('0.0')."""
    if len(members) != 2:
        return False
    h = int((parts.y1[members] - parts.y0[members]).min())
    left, right = sorted(members.tolist(), key=lambda k: parts.x0[k])
    gap = parts.labels[parts.y1[left] - max(1, h // 4):parts.y1[left], parts.x1[left]:parts.x0[right]]
    return bool(gap.size and gap.any())


def _markers(parts: _Components, members: np.ndarray) -> bool:
    """Every member a mirror-symmetric mark repeated MARK_REPEATS times or more in the figure
    (a marker of a dense scatter, where marks fall into rows by chance). Letters recur too,
    but a line made only of symmetric ones that often ('o', '0', 'x') is rare."""
    if _decimal(parts, members):
        return False
    width, height = parts.x1 - parts.x0, parts.y1 - parts.y0
    for k in members.tolist():
        alike = np.flatnonzero((np.abs(width - width[k]) <= 1) & (np.abs(height - height[k]) <= 1))
        if len(alike) < MARK_REPEATS:
            return False
        shape = _shape(parts, k)
        if not _symmetric(shape):
            return False
        nearest = alike[np.argsort(np.abs(parts.x0[alike] - parts.x0[k]) + np.abs(parts.y0[alike] - parts.y0[k]))]
        same = sum(float(np.vdot(shape, _shape(parts, int(j)))) >= SAME_SHAPE for j in nearest[:3 * MARK_REPEATS])
        if same < MARK_REPEATS:
            return False
    return True


def _merged_word(parts: _Components, index: int) -> bool:
    """A single horizontal component that is a word of merged letters (small text): wide, and
    crossed along its middle row by three strokes or more, about one per letter width (a
    curve or line segment is crossed once). Rotated text is only taken as separate glyphs."""
    x0, y0, x1, y1 = parts.x0[index], parts.y0[index], parts.x1[index], parts.y1[index]
    if x1 - x0 < 1.5 * (y1 - y0):
        return False
    middle = parts.labels[(y0 + y1) // 2, x0:x1] == parts.ids[index]
    runs = int(np.count_nonzero(np.diff(middle.astype(np.int8)) == 1) + middle[0])
    return runs >= max(3.0, 0.8 * (x1 - x0) / (y1 - y0))


def _median(values: np.ndarray) -> float:
    """np.median of a short 1-d float array, without its general-purpose overhead (lines
    have a handful of glyphs): the middle value, or the mean of the middle two."""
    ordered = np.sort(values)
    middle = len(ordered) // 2
    if len(ordered) % 2:
        return float(ordered[middle])
    return float((ordered[middle - 1] + ordered[middle]) / 2.0)


def _heights(top: np.ndarray, bottom: np.ndarray, aspect: np.ndarray) -> tuple[float | None, float | None]:
    """(cap height, x-height) of a line from its glyphs' extents (frame coordinates)."""
    height = bottom - top
    tallest = float(height.max())
    tolerance = max(1.0, ALIGN_SHARE * tallest)
    baseline = _median(bottom)
    resting = np.abs(bottom - baseline) <= tolerance  # not descenders (g, p, y) nor raised marks
    if not resting.any():
        resting = np.ones(len(height), dtype=bool)
    rest_heights = height[resting]
    upper = rest_heights >= rest_heights.max() - tolerance
    lower = rest_heights <= 0.85 * rest_heights.max()
    if lower.any():
        return _median(rest_heights[upper]), _median(rest_heights[lower])
    if _median(aspect[resting]) <= TALL_ASPECT:
        return _median(rest_heights), None
    return None, _median(rest_heights)


def _modal(patch: np.ndarray, mask: np.ndarray) -> np.ndarray:
    """The mean colour of the most common 8-level bin of the masked pixels: robust to JPEG
    noise and to blends. The sums are exact integers, so the mean is numpy's to the bit."""
    low, count = modal_bin(patch, mask)
    members = cv2.inRange(patch, low, tuple(v + BIN_LEVELS - 1 for v in low)) & mask
    sums = cv2.sumElems(cv2.bitwise_and(patch, patch, mask=members))[:3]
    return np.array(sums) / count / 255.0


def _channel_medians(pixels: np.ndarray) -> np.ndarray:
    """np.median over axis 0 of Nx3 uint8 pixels, without its general-purpose overhead: each
    channel sorted, the mean of its two middle values (the one middle value when N is odd)."""
    ordered = np.sort(pixels, axis=0)
    count = len(ordered)
    return (ordered[(count - 1) // 2].astype(np.float64) + ordered[count // 2]) / 2.0


def _colours(rgb: np.ndarray, parts: _Components, members: np.ndarray, box: tuple[int, int, int, int],
             pad: int) -> tuple[np.ndarray, np.ndarray] | None:
    """(ink, background) sRGB 0..1 of a line, or None when its surround has no single
    background colour (text over cells, markers or a picture: no contrast to speak of, and
    marks there that look like glyphs are mostly not text)."""
    height, width = rgb.shape[:2]
    x0, y0, x1, y1 = box
    X0, Y0, X1, Y1 = max(0, x0 - pad), max(0, y0 - pad), min(width, x1 + pad), min(height, y1 + pad)
    labels = parts.labels[Y0:Y1, X0:X1]
    ink_mask = parts.member_mask(labels, members)
    off_ink = cv2.dilate((labels > 0).view(np.uint8), np.ones((3, 3), np.uint8)) == 0
    patch = rgb[Y0:Y1, X0:X1]
    surround = np.count_nonzero(off_ink)
    if surround < 8 or not ink_mask.any():
        return None
    background = _modal(patch, off_ink.view(np.uint8))
    # Every channel within the tolerance of the background's: one inRange pass.
    level = np.round(background * 255)
    alike = cv2.inRange(patch, tuple((level - BACKGROUND_TOLERANCE).tolist()),
                        tuple((level + BACKGROUND_TOLERANCE).tolist())) > 0
    # The line's box within the patch: the regions below are counted on it by slicing.
    inner = (slice(y0 - Y0, y1 - Y0), slice(x0 - X0, x1 - X0))
    # Between letters and inside their counters lies the background itself; the inside
    # of a ring of markers or the cells under marks is some other colour.
    # Around text lies its background, bar a neighbouring line or an axis; a cluster of
    # markers that passes for a word has more markers all round it (other ink counts here).
    off_own = cv2.dilate(ink_mask.view(np.uint8), np.ones((3, 3), np.uint8)) == 0
    alike_off_ink, alike_off_own = alike & off_ink, alike & off_own
    for alike_count, count, share in (
            (np.count_nonzero(alike_off_ink), surround, UNIFORM_SHARE),
            (np.count_nonzero(alike_off_ink[inner]), np.count_nonzero(off_ink[inner]), INNER_UNIFORM_SHARE),
            (np.count_nonzero(alike_off_own) - np.count_nonzero(alike_off_own[inner]),
             np.count_nonzero(off_own) - np.count_nonzero(off_own[inner]), CLEAR_SHARE)):
        if alike_count < share * count:
            return None
    # Strokes are thin, so all of a glyph's contrast is in its thin ink; marks wider than the
    # top-hat (filled markers hollowed to rings, cell fills) leave contrast off the thin ink.
    contrast_patch = parts.contrast[Y0:Y1, X0:X1]
    solid = off_ink[inner] & (contrast_patch[inner] >= MIN_CONTRAST)
    if np.count_nonzero(solid) > 0.25 * np.count_nonzero(ink_mask):
        return None
    cores = ink_mask & (contrast_patch >= 0.9 * _quantile_95(contrast_patch[ink_mask]))
    return _channel_medians(patch[cores]) / 255.0, background


def _quantile_95(values: np.ndarray) -> float:
    """np.quantile(values, 0.95) of uint8 values: from their histogram when the two order
    statistics it interpolates between are equal (nearly always: few grey levels, many
    pixels), else np.quantile itself, so the result is the same to the bit."""
    position = (len(values) - 1) * 0.95
    low = int(np.floor(position))
    high = min(low + 1, len(values) - 1)
    below = np.cumsum(np.bincount(values, minlength=256))
    # The k-th smallest value (0-based) is the first level with more than k values at or below it.
    low_value, high_value = np.searchsorted(below, (low, high), side="right")
    if low_value == high_value:
        return float(low_value)
    return float(np.quantile(values, 0.95))


def find_text_lines(rgb: np.ndarray) -> list[GlyphLine]:
    """Text lines of an RGB uint8 figure (see the module docstring), in no particular order."""
    grey = cv2.cvtColor(np.ascontiguousarray(rgb), cv2.COLOR_RGB2GRAY)
    background = local_background(grey)
    max_height = max(MIN_MAX_GLYPH_PX, MAX_GLYPH_SHARE * min(grey.shape))
    lines: list[GlyphLine] = []
    kernel = np.ones((TOPHAT_PX, TOPHAT_PX), np.uint8)
    for dark in (True, False):
        contrast = cv2.subtract(background, grey) if dark else cv2.subtract(grey, background)
        thin = cv2.morphologyEx(grey, cv2.MORPH_BLACKHAT if dark else cv2.MORPH_TOPHAT, kernel)
        parts = _components(contrast, thin, dark, max_height)
        free = np.ones(len(parts.ids), dtype=bool)
        for angle in ORIENTATIONS:
            along0, along1, top, bottom = _frame(parts, angle)
            # Glyphs too thin across the line (page width, when rotated) are dots and rules.
            candidates = np.flatnonzero(free & (bottom - top >= MIN_GLYPH_PX))
            groups = _link(along0, along1, top, bottom, candidates)
            sizes = np.bincount(groups, minlength=len(candidates))
            wide = (along1 - along0)[candidates] >= 1.5 * (bottom - top)[candidates]
            # Single components can only be merged words, which are wide and horizontal.
            worth = (sizes[groups] > 1) | (wide & (angle == 0))
            for group in np.unique(groups[worth]):
                members = candidates[groups == group]
                line = _line(rgb, parts, members, angle, along0, along1, top, bottom)
                if line is not None:
                    lines.append(line)
                    free[members] = False
        along0, along1, top, bottom = _frame(parts, 0)
        for members in _tick_label_rows(parts, np.flatnonzero(free)):
            line = _line(rgb, parts, members, 0, along0, along1, top, bottom, labels_apart=True)
            if line is not None:
                lines.append(line)
    return lines


def _tick_label_rows(parts: _Components, free: np.ndarray) -> list[np.ndarray]:
    """Single-glyph labels (tick labels '0', '2', '4'...) that no word holds: three or more
    glyphs of one height, bottom-aligned in a row or right-aligned in a column, at regular
    steps (or whole multiples of one step) of two heights or more, with nothing between them.
    Rows of one repeated shape are marks (see _repeated_marks)."""
    width, height = parts.x1[free] - parts.x0[free], parts.y1[free] - parts.y0[free]
    single = free[(width <= 1.2 * height) & (width >= 0.3 * height)]
    found = []
    for edge, centre in ((parts.y1, (parts.x0 + parts.x1) / 2.0), (parts.x1, (parts.y0 + parts.y1) / 2.0)):
        order = single[np.lexsort((centre[single], edge[single]))]
        breaks = np.flatnonzero(np.diff(edge[order]) > 1) + 1
        for run in np.split(order, breaks):
            if len(run) < 3:
                continue
            run_height = parts.y1[run] - parts.y0[run]
            run = run[np.abs(run_height - np.median(run_height)) <= max(1.0, ALIGN_SHARE * np.median(run_height))]
            if len(run) < 3:
                continue
            run = run[np.argsort(centre[run])]
            steps = np.diff(centre[run])
            tall = float((parts.y1[run] - parts.y0[run]).max())
            # Regular steps, or whole multiples of the smallest (a label not found between).
            if steps.min() < 2 * tall:
                continue
            multiples = steps / steps.min()
            if np.abs(multiples - np.round(multiples)).max() <= 0.1 \
                    and _clear_between(parts, run, across_rows=edge is parts.y1):
                found.append(run)
    return found


def _clear_between(parts: _Components, run: np.ndarray, across_rows: bool) -> bool:
    """Nothing of the labels' polarity between consecutive labels of a run (ordered along it):
    tick labels stand apart, while crossings of dashed grid lines, also at regular steps, lie
    on the dashes that join them."""
    for a, b in zip(run[:-1].tolist(), run[1:].tolist()):
        if across_rows:
            top, bottom = max(parts.y0[a], parts.y0[b]), min(parts.y1[a], parts.y1[b])
            corridor = parts.labels[top:bottom, parts.x1[a]:parts.x0[b]]
        else:
            left, right = max(parts.x0[a], parts.x0[b]), min(parts.x1[a], parts.x1[b])
            corridor = parts.labels[parts.y1[a]:parts.y0[b], left:right]
        if corridor.size == 0 or np.count_nonzero(corridor) > 0.02 * corridor.size:
            return False
    return True


def _line(rgb, parts: _Components, members: np.ndarray, angle: int, along0, along1, top, bottom,
          labels_apart: bool = False) -> GlyphLine | None:
    """The line of members (component indices) in the frame of angle, or None when it is not
    text. labels_apart: the members are separate single-glyph labels (_tick_label_rows)."""
    length = (along1 - along0)[members]
    height = (bottom - top)[members]
    if height.max() > parts.max_height:  # rotated: a glyph's height is its width on the page
        return None
    if len(members) == 1:
        if angle != 0 or not _merged_word(parts, int(members[0])):
            return None
    elif angle != 0 and len(members) < MIN_ROTATED_GLYPHS:
        return None
    elif _repeated_marks(parts, members) or _markers(parts, members):
        return None
    if labels_apart:
        members = members[np.argsort(along0[members])]
    cap, x = _heights(top[members].astype(float), bottom[members].astype(float), length / height)
    count = len(members)
    if count == 1:  # merged letters: the word's full height, read as capitals/digits
        cap, x = float(height[0]), None
        count = max(2, int(round(float(length[0]) / (MERGED_ADVANCE * float(height[0])))))
    em = cap / TALL_EM if cap is not None else x / SHORT_EM
    box = (int(parts.x0[members].min()), int(parts.y0[members].min()),
           int(parts.x1[members].max()), int(parts.y1[members].max()))
    colours = _colours(rgb, parts, members, box, pad=max(2, int(round(0.3 * em))))
    if colours is None:
        return None
    ink, background = colours
    return GlyphLine(bbox=tuple(float(v) for v in box), angle=angle, glyphs=count, cap_px=cap, x_px=x,
                     em_px=float(em), stroke_px=float(parts.stroke[members].max()), dark=parts.dark,
                     ink=tuple(float(v) for v in ink), background=tuple(float(v) for v in background))
