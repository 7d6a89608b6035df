"""Line series and filled areas in the plot area.

Vector: stroked polylines grouped by colour, dash pattern and width (one group is one
series), markers as small closed paths on the series' vertices, filled areas as closed
polygons with their lower boundary. Raster: series are the palette colours drawn
as thin strokes across the plot area (with their markers, when round blobs sit on the
stroke, or else the places where the stroke bends); stacked areas are bands of different
colours that span the filled width and touch, and overlapping translucent areas are
counted by the flat colour runs down each column.
"""

from __future__ import annotations

from dataclasses import dataclass

import cv2
import numpy as np

from corpusaudit.measure import measurement
from corpusaudit.measure.legend import in_any
from corpusaudit.measure.shapes import (
    axis_aligned_segment, background_rgb, bbox_area, colour_distance, colour_key, intersect, is_neutral, is_vector,
    nearest_colour, polyline_length, require_pixels,
)
from corpusaudit.model import BBox, Figure, MeasurementUnavailable


@dataclass(frozen=True)
class Series:
    colour: tuple[int, int, int]
    dashes: str
    points: tuple[tuple[float, float], ...]  # vertices in drawing order (vector); () for rasters
    has_markers: bool | None  # None: not measured
    bbox: BBox
    bends: bool = False  # points are where an unmarked raster stroke bends: the samples that show, not all of them
    # Steps (k: from points[k] to points[k + 1]) over which a bend was seen but could not be
    # placed (too shallow, or where another line or a gap distorts the stroke): a sample may lie there.
    unplaced: tuple[int, ...] = ()


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


MIN_SPAN_SHARE = 0.2  # a series runs across at least this share of the plot width
FILL_SHARE = 0.01  # a solid region of one colour larger than this share of the plot is a fill, not a stroke


def _colour_classes(inner: np.ndarray) -> tuple[np.ndarray, list[np.ndarray]]:
    """Every pixel labelled with its nearest palette colour (greys included), -1 for the
    plot panel and for pixels far from every colour."""
    from corpusaudit.measure.colour import extract_palette

    panel = background_rgb(inner)
    # blends are kept: a grey line lies between a darker grey and the panel; fringes are told apart later by place
    palette = [np.asarray(c.rgb) * 255.0 for c in extract_palette(inner, max_colours=16, min_share=0.002, blend_tolerance=0.0)]
    palette = [c for c in palette if float(np.linalg.norm(c - panel)) > 45]  # JPEG fringes lie close to the panel
    if not palette:
        return np.full(inner.shape[:2], -1), []
    closest, distance = nearest_colour(inner, [panel] + palette)
    nearest = closest - 1  # -1: the panel
    nearest[distance > 25] = -1  # intermediate (anti-aliased) pixels belong to no colour
    _fringes_to_their_lines(inner, nearest, palette, panel)
    return nearest, palette


FRINGE_REACH = 2  # pixels: anti-aliasing spreads a stroke by about one pixel each side, JPEG and resampling by one more


def _fringes_to_their_lines(inner: np.ndarray, classes: np.ndarray, palette: list[np.ndarray], panel: np.ndarray) -> None:
    """Give the anti-aliased fringe pixels of a line to that line, in place.

    A fringe pixel is a blend of its line's colour and the panel, so near the panel all
    lines' fringes look alike and often sit nearest some lighter palette colour (the
    fringe of another line, or a light series). A pixel labelled with a lighter colour
    that lies on the blend of a darker colour with the panel, within FRINGE_REACH of that
    colour's pixels, is that colour's fringe. Darker colours go first, so a fringe of a
    fringe follows its pixels to the line; a light series keeps all but the pixels where
    it crosses a darker line.
    """
    order = np.argsort([-float(np.linalg.norm(c - panel)) for c in palette])
    padded = np.pad(classes, FRINGE_REACH, constant_values=-1)
    offsets = [(dy, dx) for dy in range(2 * FRINGE_REACH + 1) for dx in range(2 * FRINGE_REACH + 1)]
    labelled = np.flatnonzero(classes >= 0)
    labels = classes.ravel()[labelled]
    for rank, k in enumerate(order[1:], start=1):
        # pixels of k change only when k's turn comes (they move to darker colours)
        ys, xs = np.divmod(labelled[labels == k], classes.shape[1])
        if len(ys) == 0:
            continue
        neighbours = np.stack([padded[ys + dy, xs + dx] for dy, dx in offsets])  # labels within FRINGE_REACH
        colours = inner[ys, xs].astype(np.float32)
        best = np.full(len(ys), np.inf)
        owner = np.full(len(ys), -1)
        for j in set(order[:rank].tolist()) & set(np.unique(neighbours).tolist()):
            residual = _blend_residual(colours, palette[j], panel)
            better = (neighbours == j).any(axis=0) & (residual < best)
            best[better], owner[better] = residual[better], j
        moved = owner >= 0
        classes[ys[moved], xs[moved]] = owner[moved]
        padded[ys[moved] + FRINGE_REACH, xs[moved] + FRINGE_REACH] = owner[moved]


def _blend_residual(colours: np.ndarray, source: np.ndarray, panel: np.ndarray, tolerance: float = 18.0,
                    share: tuple[float, float] = (0.05, 0.97)) -> np.ndarray:
    """Per colour (n, 3): distance from the sRGB segment between source and the panel; inf
    where the colour is not such a blend (farther than tolerance, or outside the share of
    the way from source to panel). Computed in the colours' own float type."""
    direction = (panel - source).astype(colours.dtype)
    length2 = float(direction @ direction)
    if length2 < 1:
        return np.full(len(colours), np.inf)
    offset = colours - source.astype(colours.dtype)
    t = offset @ direction / length2
    residual = np.linalg.norm(offset - t[:, None] * direction, axis=1)
    return np.where((t >= share[0]) & (t <= share[1]) & (residual <= tolerance), residual, np.inf)


GRID_SHARE = 0.3  # a grid line fills at least this share of the plot's width (or height)
FRAME_SHARE = 0.9  # a row (column) this full is a frame or axis line, not a data line


def _grid_free(inner: np.ndarray, panel: np.ndarray) -> np.ndarray:
    """False on the rows and columns that ink fills along much of the plot (grid and
    reference lines, dashed or not, whatever their shade), True elsewhere.

    A grid line is thin: the rows three pixels above and below it hold at most half its ink. A
    nearly level data line fills its neighbouring rows as much and stays; rows filled
    from end to end (frames, bands of axis lines) go whatever their neighbours.
    """
    ink = colour_distance(inner, panel) > 15
    keep = np.ones(ink.shape, bool)
    height, width = ink.shape
    for axis, length in ((1, width), (0, height)):
        counts = ink.sum(axis=axis).astype(float)
        padded = np.pad(counts, 3)
        beside = np.maximum(padded[:-6], padded[6:])
        thin = (counts >= GRID_SHARE * length) & (counts >= 2 * beside)
        for index in np.flatnonzero(thin | (counts >= FRAME_SHARE * length)):
            if axis == 1:
                keep[max(0, index - 1):index + 2, :] = False
            else:
                keep[:, max(0, index - 1):index + 2] = False
    return keep


MARKER_WIDTHS = 1.25  # radius, in stroke widths, of the disk a marker holds and a line does not


def _markers_of(mask: np.ndarray) -> tuple[list[tuple[float, float]], float]:
    """Centres of the round blobs on a stroke (markers), when at least three of like size,
    and the stroke's width.

    The width is twice the median distance-to-edge along the stroke's ridge (markers are
    a small share of it). A marker holds a disk 2.5 stroke widths across, which a line
    does not, even where it bends or crosses itself. Holes up to a few stroke widths
    across are filled first: hollow markers, and the pixels JPEG noise moves away from a
    saturated colour inside filled ones.
    """
    closed = cv2.morphologyEx(mask, cv2.MORPH_CLOSE, np.ones((3, 3), np.uint8))
    inside = cv2.distanceTransform(closed, cv2.DIST_L2, 3)
    ridge = (inside > 0) & (inside >= cv2.dilate(inside, np.ones((3, 3), np.uint8)))
    if not ridge.any():
        return [], 0.0
    half_width = float(np.median(inside[ridge]))
    count, labels, stats, _ = cv2.connectedComponentsWithStats(1 - closed, connectivity=4)
    small = np.flatnonzero(stats[:, cv2.CC_STAT_AREA] <= (8 * half_width) ** 2)
    if len(small):
        closed = closed | np.isin(labels, small).astype(np.uint8)
        inside = cv2.distanceTransform(closed, cv2.DIST_L2, 3)
    cores = (inside >= max(2.0, MARKER_WIDTHS * 2 * half_width)).astype(np.uint8)
    count, labels, stats, centroids = cv2.connectedComponentsWithStats(cores, connectivity=8)
    if count <= 3:
        return [], 2 * half_width
    radii = np.array([inside[labels == k].max() for k in range(1, count)])
    w, h = stats[1:, cv2.CC_STAT_WIDTH].astype(float), stats[1:, cv2.CC_STAT_HEIGHT].astype(float)
    typical = np.median(radii)
    round_blobs = (np.abs(w - h) <= np.maximum(1.0, 0.35 * np.maximum(w, h))) & (radii >= 0.7 * typical) & (radii <= 1.4 * typical)
    if round_blobs.sum() < 3:
        return [], 2 * half_width
    return sorted((float(x), float(y)) for x, y in centroids[1:][round_blobs]), 2 * half_width


JOIN_WIDTHS = 3.0  # a line join spreads over about this many stroke widths (common practice, no source)
BEND_TOLERANCE = 1.5  # pixels: a stroke's centre line wanders by up to about a pixel (anti-aliasing, JPEG)
# The round join of a steep bend, or a line passing close by, leaves two vertices on the centre
# line up to about five stroke widths, and for thin strokes up to about 15 pixels, apart (seen
# on matplotlib renderings at 100 to 200 dpi; no published source).
CLOSE_WIDTHS = 5.0
CLOSE_MIN_PX = 16.0


def _one_corner_each(vertices: np.ndarray, centre: np.ndarray, tolerance: float) -> np.ndarray:
    """Vertices with each pair of neighbouring interior ones replaced by the corner where the
    segments beyond them meet, when that one corner follows the centre line (its y in each
    column, from column 0) within tolerance: a rounded or blurred join leaves two vertices
    either side of its corner, however its width compares with the stroke's."""
    merged = [tuple(v) for v in vertices]
    k = 1
    while k + 2 < len(merged):
        (ax, ay), (bx, by), (cx, cy), (dx, dy) = merged[k - 1:k + 3]
        before, after = (by - ay) / max(bx - ax, 1e-6), (dy - cy) / max(dx - cx, 1e-6)
        if abs(before - after) > 1e-6:
            x = (cy - ay + before * ax - after * cx) / (before - after)
            if bx - 1.0 <= x <= cx + 1.0:
                corner = (x, ay + before * (x - ax))
                span = np.arange(int(np.ceil(ax)), int(np.floor(dx)) + 1)
                fitted = np.interp(span, [ax, corner[0], dx], [ay, corner[1], dy])
                if np.abs(fitted - centre[span]).max() <= tolerance:
                    merged[k:k + 2] = [corner]
                    continue
        k += 1
    return np.array(merged)


def _bends(mask: np.ndarray, columns: np.ndarray, stroke: float,
           others: np.ndarray | None) -> tuple[list[tuple[float, float]], tuple[int, ...]]:
    """The vertices of a polyline stroke that can be placed, its ends included, and the steps
    between them that hold a bend that cannot (Series.unplaced).

    Vertices come from the stroke's centre line (the median row of its pixels in each column,
    holes closed first, gaps bridged linearly) simplified by Douglas-Peucker (cv2.approxPolyDP)
    within BEND_TOLERANCE (or most of a stroke width: a sharp bend of a thick stroke flattens
    its centre line over the join). Samples where the line goes on straight leave no bend, so
    this is a subset of the samples. A bend is not placed where it is too shallow to place
    along x within two joins, where another series (others: its pixels) crosses or touches the
    stroke (the centre line is pulled aside), where columns of the stroke are missing
    (another colour on top, JPEG shifting a thin line's colour: the bridge cuts the corner), or
    where two bends are so close that they may be one (CLOSE_WIDTHS, CLOSE_MIN_PX)."""
    part = mask[:, columns.min():columns.max() + 1]
    # bridge the holes that grid-line removal and crossing lines leave (up to 6 pixels)
    part = cv2.morphologyEx(part, cv2.MORPH_CLOSE, np.ones((7, 1), np.uint8))
    part = cv2.morphologyEx(part, cv2.MORPH_CLOSE, np.ones((1, 7), np.uint8))
    present = np.flatnonzero(part.any(axis=0))
    counts = np.cumsum(part[:, present], axis=0, dtype=np.int32)  # the median row: stray pixels do not move it
    total = counts[-1]
    centre = ((counts >= total / 2.0).argmax(axis=0) + (counts >= total / 2.0 + 0.5).argmax(axis=0)) / 2.0
    span = np.arange(present[-1] + 1)
    line = np.stack([span, np.interp(span, present, centre)], axis=1).astype(np.float32)
    vertices = cv2.approxPolyDP(line.reshape(-1, 1, 2), max(BEND_TOLERANCE, 0.75 * stroke), False).reshape(-1, 2)
    # A bend is found along x to within the centre line's wander over its change of slope
    # (a shallow bend is placed loosely), and not closer than its join: vertices closer
    # than the looser one's reach are one bend.
    steps = np.maximum(np.diff(vertices[:, 0]), 1.0)
    slopes = np.diff(vertices[:, 1]) / steps
    turn = np.concatenate([[np.inf], np.abs(np.diff(slopes)), [np.inf]])
    loose = np.maximum(JOIN_WIDTHS * max(stroke, 1.0), BEND_TOLERANCE / np.maximum(turn, 1e-6))
    # a cap runs past the end sample and a sloped stroke's cut end spreads over columns
    loose[[0, -1]] = 2 * JOIN_WIDTHS * max(stroke, 1.0)
    groups = np.concatenate([[0], np.cumsum(steps > np.maximum(loose[:-1], loose[1:]))])
    ends = {0: vertices[0], groups[-1]: vertices[-1]}  # the line's ends stay where they are
    corners = _one_corner_each(np.array([ends.get(g, vertices[groups == g].mean(axis=0)) for g in range(groups[-1] + 1)]),
                               line[:, 1], max(BEND_TOLERANCE, 0.75 * stroke))
    bends = [(float(x + columns.min()), float(y)) for x, y in corners]
    found = np.asarray(bends)
    slopes = np.diff(found[:, 1]) / np.maximum(np.diff(found[:, 0]), 1.0)
    shallow = BEND_TOLERANCE / np.maximum(np.abs(np.diff(slopes)), 1e-6) > 2 * JOIN_WIDTHS * max(stroke, 1.0)
    reach = int(np.ceil(JOIN_WIDTHS * max(stroke, 1.0)))
    crossing = int(np.ceil(max(JOIN_WIDTHS * stroke, CLOSE_MIN_PX)))  # another line pulls vertices this far
    missing = np.ones(len(span), bool)
    missing[present] = False
    placeable = [True]
    for (x, y), too_shallow in zip(bends[1:-1], shallow):
        cx, cy = int(round(x)), int(round(y))
        placeable.append(not (too_shallow or missing[max(0, cx - columns.min() - reach):cx - columns.min() + reach + 1].any()
                              or (others is not None and others[max(0, cy - crossing):cy + crossing + 1,
                                                                max(0, cx - crossing):cx + crossing + 1].any())))
    placeable.append(True)
    # Two bends closer than CLOSE_WIDTHS (or CLOSE_MIN_PX) may be one bend whose rounded join
    # the centre line leaves as two vertices: neither is placed.
    close = np.diff([x for x, _ in bends]) < max(CLOSE_WIDTHS * stroke, CLOSE_MIN_PX)
    for k in np.flatnonzero(close):
        placeable[k] = placeable[k] and k == 0
        placeable[k + 1] = placeable[k + 1] and k + 1 == len(bends) - 1
    kept, unplaced = [], set()
    for bend, ok in zip(bends, placeable):
        if ok:
            kept.append(bend)
        else:
            unplaced.add(len(kept) - 1)
    return kept, tuple(sorted(unplaced))


def _raster_series(rgb: np.ndarray, plot: BBox) -> list[Series]:
    """Series are the colours of the plot drawn as thin strokes across it.

    Pixels are labelled with their nearest palette colour, leaving out rows and columns
    that ink fills across the plot (grid); a colour is dropped when it forms large solid
    regions (areas, bars) or spans too little of the width (legend swatches, text).
    Fringes and colour variants of one line are grouped into one series (_co_located). Round blobs of a stroke's colour at least 2.5 stroke widths across are its
    markers, and their centres its sample points; a solid stroke without markers gives its
    bends instead (_bends), read, like the markers, from its pixels before grid removal
    (grid lines often run through the samples).
    """
    x0, y0, x1, y1 = (int(round(v)) for v in plot)
    inner = np.ascontiguousarray(rgb[y0 + 3:y1 - 2, x0 + 3:x1 - 2])
    if inner.size == 0:
        raise MeasurementUnavailable("empty plot area")
    height, width = inner.shape[:2]
    classes, palette = _colour_classes(inner)
    whole = classes.copy()  # labels before grid removal (for bends)
    classes[~_grid_free(inner, background_rgb(inner))] = -1
    strokes, stroke_classes = [], []
    for index, colour in enumerate(palette):
        mask = (classes == index).astype(np.uint8)
        pixel_count = int(mask.sum())
        if not pixel_count:
            continue
        if pixel_count > FILL_SHARE * width * height:  # fewer pixels cannot hold a fill
            thick = cv2.morphologyEx(mask, cv2.MORPH_OPEN, np.ones((9, 9), np.uint8))
            _, _, stats, _ = cv2.connectedComponentsWithStats(thick, connectivity=8)
            if len(stats) > 1 and stats[1:, cv2.CC_STAT_AREA].max() > FILL_SHARE * width * height:
                continue  # a filled region (area, bar), not a stroke
        strokes.append((colour, mask))
        stroke_classes.append(index)
    kept = []
    for members in _co_located(strokes, background_rgb(inner)):
        mask = np.any([strokes[k][1] for k in members], axis=0).astype(np.uint8)
        columns = np.flatnonzero(mask.any(axis=0))
        if len(columns) >= MIN_SPAN_SHARE * width:
            # grid lines cut strokes where they cross (and hide level stretches): bends are read
            # from the stroke's own colours before grid removal, near what survived it
            near = cv2.dilate(mask, np.ones((7, 7), np.uint8)).astype(bool)
            kept.append((members, mask, columns, np.isin(whole, [stroke_classes[k] for k in members]) & near))
    series = []
    for index, (members, mask, columns, full) in enumerate(kept):
        colour = max((strokes[k] for k in members), key=lambda item: int(item[1].sum()))[0]
        markers, stroke = _markers_of(full.astype(np.uint8))  # grid lines often run through the samples
        covered = np.zeros(width, bool)
        covered[columns] = True
        spread = covered[columns.min():columns.max() + 1]
        dashes = "dashed" if (~spread).mean() > 0.15 else ""
        ys, xs = np.nonzero(mask)
        samples, bends, unplaced = markers, False, ()
        if not markers and not dashes:  # dashes hide bends
            others = np.any([k[3] for j, k in enumerate(kept) if j != index], axis=0) if len(kept) > 1 else None
            (samples, unplaced), bends = _bends(full.astype(np.uint8), columns, stroke, others), True
        series.append(Series(colour=tuple(int(round(v)) for v in colour), dashes=dashes,
                             points=tuple((x0 + 3 + x, y0 + 3 + y) for x, y in samples),
                             has_markers=bool(markers),
                             bbox=(float(x0 + 3 + xs.min()), float(y0 + 3 + ys.min()),
                                   float(x0 + 3 + xs.max()), float(y0 + 3 + ys.max())), bends=bends,
                             unplaced=unplaced))
    return series


FRINGE_CONTRAST = 20.0  # sRGB distance: a fringe is clearly lighter than its line
JPEG_COLOUR_SHIFT = 50.0  # sRGB distance within which a thin line's colour is the same after JPEG (chroma subsampling shifts it)


def _co_located(strokes: list[tuple[np.ndarray, np.ndarray]], panel: np.ndarray) -> list[list[int]]:
    """Groups of strokes that are one line.

    A stroke whose colour lies between darker strokes' colours and the panel, and whose
    pixels run along those strokes, is their anti-aliased fringe and is left out (JPEG
    moves fringe colours off the exact blend: the blend is judged within JPEG's shift). A stroke lying mostly
    within two pixels of a longer one, which lies along it too or which it follows for
    only a stretch, or whose colour is the longer one's shifted as JPEG shifts thin lines'
    colours, is a variant of that line's colour. So is a stroke of such a colour, or of a
    blend of it with the panel, that continues the longer one where it is missing (JPEG
    and resampling give the segments of one thin line different colours, and where a line
    is thinner than a pixel all its pixels are blends). Lines that merely cross share few pixels.
    """
    near = [cv2.dilate(mask, np.ones((5, 5), np.uint8)) for _, mask in strokes]
    pixels = [mask.astype(bool) for _, mask in strokes]
    columns = [p.any(axis=0) for p in pixels]
    depth = [float(np.linalg.norm(colour - panel)) for colour, _ in strokes]
    fringes = set()
    for k in range(len(strokes)):
        darker = [j for j in range(len(strokes)) if j != k and depth[j] > depth[k] + FRINGE_CONTRAST
                  and _between(strokes[k][0], strokes[j][0], panel, tolerance=JPEG_COLOUR_SHIFT)]
        if darker and pixels[k].any() and float(np.any([near[j] for j in darker], axis=0)[pixels[k]].mean()) >= 0.6:
            fringes.add(k)
    kept = [k for k in range(len(strokes)) if k not in fringes and pixels[k].any()]
    spans = {k: int(columns[k].sum()) for k in kept}
    # Each stroke joins the one longer stroke it lies along best (a tree, so a short stroke
    # lying along two lines where they cross does not join the lines).
    parent = {}
    for a in kept:
        along = {b: float(near[b][pixels[a]].mean()) for b in kept
                 if b != a and (spans[b], b) > (spans[a], a)}
        fits = []
        for b, share in along.items():
            alike = float(np.linalg.norm(strokes[a][0] - strokes[b][0])) < JPEG_COLOUR_SHIFT
            variant = share >= 0.6 and (float(near[a][pixels[b]].mean()) >= 0.5 or spans[a] <= 0.5 * spans[b] or alike)
            paler = _between(strokes[a][0], strokes[b][0], panel)  # a thin stretch of b, all partial coverage
            continues = (alike or paler) and share > 0 and (columns[a] & columns[b]).sum() <= 0.3 * spans[a]
            if variant or continues:
                fits.append(b)
        if fits:
            parent[a] = max(fits, key=along.get)

    def root(k: int) -> int:
        while k in parent:
            k = parent[k]
        return k

    groups: dict[int, list[int]] = {}
    for k in kept:
        groups.setdefault(root(k), []).append(k)
    return list(groups.values())


def _between(colour: np.ndarray, source: np.ndarray, panel: np.ndarray, tolerance: float = 18.0) -> bool:
    """colour lies on the sRGB segment from source to the panel colour (a blend of the two)."""
    colours = np.atleast_2d(np.asarray(colour, dtype=np.float64))
    return bool(np.isfinite(_blend_residual(colours, np.asarray(source, np.float64), np.asarray(panel, np.float64),
                                            tolerance, (0.1, 0.95)))[0])


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


SPANNING_SHARE = 0.8  # a stacked band runs across (nearly) every column that holds an area


def _raster_areas(rgb: np.ndarray, plot: BBox) -> AreaLayers:
    """Filled bands are the solid colour regions of the plot (greys included, the plot
    panel excluded). The areas are stacked when at least two bands span the whole width
    of the filled region, sit directly on one another in most columns, and neither is
    the other seen through a translucent band. Translucent areas drawn from a common
    baseline fail the first test wherever their tops cross (the region where one layer
    shows alone stops at the crossing), and the last one elsewhere; they are counted by
    the flat colour runs down each column (_layers_by_runs)."""
    from corpusaudit.measure.colour import extract_palette

    x0, y0, x1, y1 = (int(round(v)) for v in plot)
    inner = np.ascontiguousarray(rgb[y0 + 3:y1 - 2, x0 + 3:x1 - 2])
    if inner.size == 0:
        raise MeasurementUnavailable("empty plot area")
    background = background_rgb(inner)
    palette = [np.asarray(c.rgb) * 255.0 for c in extract_palette(inner, max_colours=10, min_share=0.02)]
    palette = [colour for colour in palette if float(np.linalg.norm(colour - background)) > 20]
    if not palette:
        raise MeasurementUnavailable("no filled areas in the plot")
    closest, distance = nearest_colour(inner, palette)
    labels = np.where(distance < 30, closest, -1)
    solid = [cv2.morphologyEx((labels == k).astype(np.uint8), cv2.MORPH_OPEN, np.ones((5, 5), np.uint8))
             for k in range(len(palette))]
    bands = [k for k, mask in enumerate(solid) if mask.sum() >= 0.02 * inner.shape[0] * inner.shape[1]]
    if not bands:
        raise MeasurementUnavailable("no filled areas in the plot")
    with_area = np.zeros(inner.shape[1], bool)
    for k in bands:
        with_area |= solid[k].any(axis=0)
    spanning = [k for k in bands if solid[k].any(axis=0)[with_area].mean() >= SPANNING_SHARE]
    blends = {(a, b) for a in spanning for b in spanning
              if a != b and _is_blend(palette[a], palette[b], [palette[c] for c in bands if c != a], background)}
    touching_columns = 0
    columns_with_area = 0
    for column in range(0, inner.shape[1], 4):
        present = [k for k in spanning if solid[k][:, column].any()]
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
    stacked = len(spanning) >= 2 and columns_with_area > 0 and touching_columns >= 0.5 * columns_with_area
    ys, xs = np.nonzero(np.any([solid[k] for k in bands], axis=0))
    region = (float(x0 + 3 + xs.min()), float(y0 + 3 + ys.min()), float(x0 + 3 + xs.max()), float(y0 + 3 + ys.max()))
    # stacked: one spanning band per layer; otherwise layers overlap (translucent, from a common
    # baseline) and each column shows one flat run of colour per distinct layer top
    count = len(spanning) if stacked else max(1, _layers_by_runs(inner, background))
    return AreaLayers(count=count, stacked=stacked, region=region)


RUN_WINDOW = 3  # rows averaged each side of a candidate edge (beyond a 1-2 px anti-aliased transition)
MIN_EDGE = 4.0  # sRGB distance between the mean colours either side of an edge, at least (noise-free rasters)
MIN_RUN = 8  # rows: a thinner run is an edge's transition, an outline, or a grid line with its JPEG ringing (8 x 8 blocks, ITU-T T.81)
PANEL_DISTANCE = 20.0  # sRGB distance: a run this close to the panel colour is no layer
SUSTAINED_SHARE = 0.02  # a count holds over at least this share of the columns (a few stray edges do not)


def _column_runs(smooth: np.ndarray, edge: float) -> tuple[np.ndarray, ...]:
    """Runs of flat colour down every column of smooth (float32, h x w x 3), split where the
    mean colour of the RUN_WINDOW rows below a row differs from that of the rows above by
    at least edge (the largest such difference within the window). Returns, per run in
    column-major order: column, first row, end row, mean colour and per-channel variance."""
    height, width = smooth.shape[:2]
    k = RUN_WINDOW
    sums = np.zeros((height + 1, width, 3), np.float32)
    sums[1:] = np.cumsum(smooth, axis=0)
    rows = np.arange(k, height - k)
    strength = np.zeros((height, width), np.float32)
    strength[rows] = np.linalg.norm((sums[rows + 1 + k] - sums[rows + 1]) - (sums[rows] - sums[rows - k]), axis=2) / k
    peaks = (strength >= edge) & (strength >= cv2.dilate(strength, np.ones((2 * k + 1, 1), np.uint8)))
    edge_columns, edge_rows = np.nonzero(peaks.T)
    columns = np.concatenate([edge_columns, np.arange(width), np.arange(width)])
    cuts = np.concatenate([edge_rows, np.zeros(width, int), np.full(width, height)])
    order = np.lexsort((cuts, columns))
    columns, cuts = columns[order], cuts[order]
    same = columns[1:] == columns[:-1]
    column, start, end = columns[:-1][same], cuts[:-1][same] + 2, cuts[1:][same] - 1  # leave the transition out
    keep = end - start >= MIN_RUN
    column, start, end = column[keep], start[keep], end[keep]
    size = (end - start)[:, None]
    means = (sums[end, column].astype(np.float64) - sums[start, column]) / size
    second = np.zeros((height + 1, width, 3))  # float64: the variance is a difference of large sums
    second[1:] = np.cumsum(np.square(smooth, dtype=np.float64), axis=0)
    variance = np.maximum((second[end, column] - second[start, column]) / size - means ** 2, 0.0)
    return column, start, end, means, variance


def _layers_by_runs(inner: np.ndarray, panel: np.ndarray) -> int:
    """Overlapping translucent areas drawn from a common baseline: at each column the rows
    between consecutive layer tops hold one set of layers and so one flat colour, and the
    number of such runs (the panel left out) is the number of layers whose tops are apart
    there. The count is the largest one that holds over SUSTAINED_SHARE of consecutive
    columns.

    A 5 x 5 median first removes grid lines and outlines up to two pixels thick and JPEG
    speckle; the edge threshold rises with the noise left inside runs (4.5 standard
    deviations of the window mean, so chance edges are rare); runs are alike when their
    colours differ by less than that threshold or their own spread. The lowest layers under many
    translucent ones differ from their neighbours by a few levels only and can be missed,
    so the count is a lower bound."""
    # axes leave a margin above the highest area, so the top row shows the panel; the border's
    # modal colour may be a layer's (areas fill the bottom and the sides)
    top = inner[0].astype(np.float32)
    keys, counts = np.unique((top // 8).astype(int), axis=0, return_counts=True)
    if counts.max() >= 0.5 * len(top):
        panel = top[((top // 8).astype(int) == keys[counts.argmax()]).all(axis=1)].mean(axis=0)
    smooth = cv2.blur(cv2.medianBlur(np.ascontiguousarray(inner), 5).astype(np.float32), (3, 1))
    column, start, end, means, variance = _column_runs(smooth, MIN_EDGE)
    if not len(column):
        return 0
    sigma = float(np.sqrt(np.median(variance.mean(axis=1))))
    edge = max(MIN_EDGE, 4.5 * sigma * np.sqrt(2.0 / (3 * RUN_WINDOW)))  # difference of two 3 x k means
    if edge > MIN_EDGE:
        column, start, end, means, variance = _column_runs(smooth, edge)

    def alike(a: np.ndarray, b: np.ndarray) -> np.ndarray:
        spread = 2 * np.sqrt(variance[a].sum(axis=1) + variance[b].sum(axis=1))
        return (column[a] == column[b]) & (np.linalg.norm(means[a] - means[b], axis=1) < np.maximum(edge, spread))

    # Going down a column the set of layers only grows (the panel shows above them all and
    # below the baseline), so no layer's colour shows above and below another: a run between
    # two alike layer runs interrupts them (a grid line, an outline, JPEG ringing) and goes;
    # alike neighbours then join.
    for _ in range(2):
        inside = np.arange(1, len(column) - 1)
        keep = np.ones(len(column), bool)
        flanked = alike(inside - 1, inside + 1) & (np.linalg.norm(means[inside - 1] - panel, axis=1) > PANEL_DISTANCE)
        keep[inside[flanked]] = False
        column, means, variance = column[keep], means[keep], variance[keep]
    new = np.ones(len(column), bool)
    new[1:] = ~alike(np.arange(1, len(column)), np.arange(len(column) - 1))
    layer = np.linalg.norm(means[new] - panel, axis=1) > PANEL_DISTANCE
    per_column = np.bincount(column[new][layer], minlength=inner.shape[1])
    sustain = max(3, int(SUSTAINED_SHARE * inner.shape[1]))
    best = 0
    for count in range(1, int(per_column.max()) + 1):
        steps = np.diff(np.concatenate([[0], (per_column >= count).astype(np.int8), [0]]))
        if (np.flatnonzero(steps == -1) - np.flatnonzero(steps == 1)).max() >= sustain:
            best = count
    return best


MAX_BLEND_ALPHA = 0.6  # translucent areas are drawn at alpha of about 0.2 to 0.5 (common practice)


def _is_blend(lower: np.ndarray, upper: np.ndarray, others: list[np.ndarray], background: np.ndarray) -> bool:
    """lower is upper seen through another translucent band (areas overlap, not stacked).

    Alpha compositing gives lower = alpha * L + (1 - alpha) * upper for the colour L of
    the band drawn over upper; a small alpha leaves L inside the RGB cube only when lower
    is close to upper, so two opaque bands of distinct colours fail. And over a light
    background the layers' deficits add: (bg - lower) ~ (bg - upper) + k (bg - other)
    with 0.2 <= k <= 1 for another band seen alone.
    """
    difference = lower - upper
    needed = np.where(difference > 0, difference / np.maximum(255.0 - upper, 1e-6),
                      -difference / np.maximum(upper, 1e-6))
    if float(needed.max()) <= MAX_BLEND_ALPHA:
        return True
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
