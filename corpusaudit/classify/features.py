"""Cheap, explainable image features for chart-type classification.

Every figure is first brought to a working size (longest side WORK_SIDE px, aspect kept) so the
features do not depend on resolution. Groups (names prefixed accordingly):
  shape_   aspect ratio
  colour_  background, ink share, colour counts, saturation, hue and grey distributions
  edge_    gradient-orientation histogram, share of axis-aligned edges, texture (photo-likeness)
  hog_     histogram of oriented gradients on a 64x64 thumbnail (coarse layout of strokes)
  grid_    4x4 layout of ink, saturated ink and edge density
  blob_    filled regions (ink after removing thin strokes): rectangles, alignment, gaps, steps
  inner_   colour boundaries inside filled regions: their directions and whether they form a regular
           grid (heatmap cells) or irregular borders (map regions)
  radial_  structure around the filled regions' centre: radial/tangential edges, colour sectors
  hough_   straight-line evidence (axes, gridlines, table rules)
  text_    text-likeness: small components aligned in rows
  mark_    connectivity of the marks once axis and grid rules are removed: scatter marks are many
           isolated small blobs spread over the plot area, line marks are long thin connected strokes,
           box outliers sit in columns; soft halos (glow of stars, photo detail) vs crisp drawn marks
  sym_     mirror symmetry
"""

from __future__ import annotations

from functools import lru_cache

import cv2
import numpy as np

FEATURE_VERSION = 3
WORK_SIDE = 320
HOG_CELL = 16  # 64x64 thumbnail -> 4x4 cells, 2x2-cell blocks (Dalal & Triggs 2005 layout)
HOG_BINS = 9


def _working_image(rgb: np.ndarray) -> np.ndarray:
    if rgb.ndim == 2:
        rgb = np.repeat(rgb[..., None], 3, axis=2)
    rgb = np.ascontiguousarray(rgb[..., :3], dtype=np.uint8)
    h, w = rgb.shape[:2]
    scale = WORK_SIDE / max(h, w)
    size = (max(16, round(w * scale)), max(16, round(h * scale)))
    return cv2.resize(rgb, size, interpolation=cv2.INTER_AREA if scale < 1 else cv2.INTER_LINEAR)


def _background(img: np.ndarray) -> np.ndarray:
    """Most common quantised colour on the image border."""
    border = np.concatenate([img[:2].reshape(-1, 3), img[-2:].reshape(-1, 3),
                             img[:, :2].reshape(-1, 3), img[:, -2:].reshape(-1, 3)])
    q = (border // 16).astype(np.int32)
    codes = q[:, 0] * 256 + q[:, 1] * 16 + q[:, 2]
    chosen = codes == np.bincount(codes).argmax()
    # integer sums, then one division: the values of border[chosen].mean(0), without its slow row gather
    return (chosen @ border.astype(np.int64)) / np.count_nonzero(chosen)


@lru_cache(maxsize=1)
def _hog_bin_table() -> np.ndarray:
    """Orientation bin of every gradient a [-1, 0, 1] difference of 8-bit pixels can take, indexed by
    (gy + 255) * 511 + gx + 255: the per-pixel arithmetic of the thumbnail done once for all values."""
    steps = np.arange(-255, 256, dtype=np.float32)
    gx, gy = np.meshgrid(steps, steps)
    bins = ((np.degrees(np.arctan2(gy, gx)) % 180.0) / (180.0 / HOG_BINS)).astype(np.int32) % HOG_BINS
    return bins.astype(np.uint8).ravel()


def _hog(thumb: np.ndarray) -> np.ndarray:
    """Histogram of oriented gradients: unsigned orientation, L2-Hys normalised 2x2-cell blocks."""
    gx = cv2.Sobel(thumb, cv2.CV_32F, 1, 0, ksize=1)
    gy = cv2.Sobel(thumb, cv2.CV_32F, 0, 1, ksize=1)
    # integer gradients: the squares and their sum are exact in float32, so this is np.hypot's value
    mag = np.sqrt(gx * gx + gy * gy)
    bins = _hog_bin_table()[((gy + 255) * 511 + (gx + 255)).astype(np.intp)]
    n = thumb.shape[0] // HOG_CELL
    cell = (np.arange(thumb.shape[0]) // HOG_CELL)
    index = (cell[:, None] * n + cell[None, :]) * HOG_BINS + bins
    hist = np.bincount(index.ravel(), weights=mag.ravel(), minlength=n * n * HOG_BINS).reshape(n, n, HOG_BINS)
    blocks = np.concatenate([hist[:-1, :-1], hist[1:, :-1], hist[:-1, 1:], hist[1:, 1:]], axis=2)
    blocks = blocks / (np.linalg.norm(blocks, axis=2, keepdims=True) + 1e-6)
    blocks = np.minimum(blocks, 0.2)
    blocks = blocks / (np.linalg.norm(blocks, axis=2, keepdims=True) + 1e-6)
    return blocks.ravel()


def _norm(hist: np.ndarray) -> np.ndarray:
    total = hist.sum()
    return hist / total if total > 0 else hist.astype(np.float64)


def _runs(mask_1d: np.ndarray) -> tuple[int, float, float]:
    """Number of runs of True, coefficient of variation of run lengths, mean gap / mean run."""
    padded = np.concatenate([[False], mask_1d, [False]])
    change = np.flatnonzero(padded[1:] != padded[:-1])
    starts, ends = change[::2], change[1::2]
    if starts.size == 0:
        return 0, 0.0, 0.0
    lengths = ends - starts
    gaps = starts[1:] - ends[:-1]
    cv = float(lengths.std() / lengths.mean())
    gap_ratio = float(gaps.mean() / lengths.mean()) if gaps.size else 0.0
    return int(starts.size), cv, gap_ratio


def _profile_steps(filled: np.ndarray, first: np.ndarray) -> list[float]:
    """How the top edge of filled regions moves across columns: plateaus and jumps (bars, histograms).
    filled: which columns hold any region; first: each column's first filled row (argmax of the mask)."""
    if filled.sum() < 4:
        return [0.0, 0.0, 0.0]
    top = first[filled].astype(np.float32)
    d = np.abs(np.diff(top))
    flat = float((d == 0).mean())
    jumps = float((d > 2).mean())
    small = float(((d > 0) & (d <= 2)).mean())
    return [flat, jumps, small]


MARK_NAMES = ["log_dots", "dot_share", "dot_cells", "dot_inner", "dot_area_cv", "dot_row_aligned",
              "dot_col_aligned", "dot_hollow", "log_strokes", "stroke_share", "longest_extent", "longest_fill",
              "longest_thickness", "log_halo_ratio"]
DOT_SIDE = 16  # px at WORK_SIDE, after a 1 px dilation: a marker or a glyph, not a stroke across the plot


def _marks(ink8: np.ndarray, n_ink: int, n_halo: int) -> list[float]:
    """Connected components of ink after removing long horizontal/vertical rules (axes, grids, frames).
    ink8: the ink mask as 0/1 bytes; n_halo: pixels a little off the background but not ink."""
    h, w = ink8.shape
    rule_len = max(12, min(h, w) // 6)
    rules = cv2.morphologyEx(ink8, cv2.MORPH_OPEN, np.ones((1, rule_len), np.uint8)) | \
        cv2.morphologyEx(ink8, cv2.MORPH_OPEN, np.ones((rule_len, 1), np.uint8))
    marks = ink8 & (1 - rules)
    # removing a rule also cuts every curve that crosses it: bridge gaps of up to 2 px again
    n, labels, stats, cents = cv2.connectedComponentsWithStats(cv2.dilate(marks, np.ones((3, 3), np.uint8)),
                                                               connectivity=8)
    own_ink = np.bincount(labels[marks.view(bool)], minlength=n)[1:]  # undilated pixels: rings stay hollow
    stats, cents = stats[1:], cents[1:]
    keep = stats[:, 4] >= 12  # a single dilated pixel (9 px) is noise or JPEG ringing
    stats, cents, own_ink = stats[keep], cents[keep], own_ink[keep]
    total = max(int(stats[:, 4].sum()), 1)
    extent = np.maximum(stats[:, 2], stats[:, 3])
    dots = extent <= DOT_SIDE
    strokes = extent >= 0.2 * min(h, w)
    vals = [0.0] * len(MARK_NAMES)
    vals[0] = np.log1p(dots.sum())
    vals[1] = stats[dots, 4].sum() / total
    if dots.sum() >= 3:
        cx, cy = cents[dots, 0], cents[dots, 1]
        cells = np.unique((np.minimum(cy / h * 8, 7).astype(int)) * 8 + np.minimum(cx / w * 8, 7).astype(int))
        vals[2] = cells.size / 64  # spread over the figure in 2D: scatter fills many cells, text a few rows
        vals[3] = float(((cx > 0.15 * w) & (cx < 0.85 * w) & (cy > 0.1 * h) & (cy < 0.85 * h)).mean())
        areas = stats[dots, 4].astype(np.float64)
        vals[4] = float(areas.std() / areas.mean())
        rows = np.bincount((cy // 3).astype(int))
        cols = np.bincount((cx // 3).astype(int))
        vals[5] = float(rows[rows >= 4].sum() / cy.size)
        vals[6] = float(cols[cols >= 4].sum() / cx.size)
        box = ((stats[dots, 2] - 2) * (stats[dots, 3] - 2)).clip(1).astype(np.float64)  # undo the dilation
        # rings and hollow squares (and some glyphs such as o)
        vals[7] = float(((own_ink[dots] / box < 0.55) & (extent[dots] >= 7)).mean())
    vals[8] = np.log1p(strokes.sum())
    vals[9] = stats[strokes, 4].sum() / total
    if stats.shape[0]:
        k = int(extent.argmax())
        bw, bh, area = float(stats[k, 2]), float(stats[k, 3]), float(stats[k, 4])
        vals[10] = extent[k] / max(h, w)
        vals[11] = area / (bw * bh)
        vals[12] = area / max(extent[k], 1)  # mean stroke width if the component is one stroke
    vals[13] = float(np.log1p(n_halo / max(n_ink, 1)))
    return [float(v) for v in vals]


def extract(rgb: np.ndarray) -> np.ndarray:
    """Feature vector (float32, len(feature_names())) for an HxWx3 uint8 RGB image."""
    return _extract(rgb)


def feature_names() -> list[str]:
    names: list[str] = []
    _extract(np.full((64, 64, 3), 255, np.uint8), names)
    return names


def _orientation_bins(deg: np.ndarray, width: int) -> np.ndarray:
    """((deg % 180.0) // width).astype(np.int32) % (180 // width) for float32 angles in [-180, 180], without
    numpy's float remainder and floor division (about 30 ns a pixel each). A negative angle gets the same
    float32 sum the remainder computes; 180 itself lands in bin 0 either way; and a float32 in [0, 180]
    divided by 10 or 30 never rounds up to the next integer, so truncating the quotient is its floor."""
    half_turn = np.where(deg < 0, deg + np.float32(180.0), deg)
    return (half_turn / np.float32(width)).astype(np.int32) % (180 // width)


def _coordinates(mask8: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """x and y of a 0/1 byte mask's set pixels in row-major order (np.nonzero's order, faster)."""
    points = cv2.findNonZero(mask8)
    if points is None:
        return np.zeros(0, np.int32), np.zeros(0, np.int32)
    points = points.reshape(-1, 2)
    return points[:, 0], points[:, 1]


def _count_hist(image: np.ndarray, mask: np.ndarray, bins: int, upper: int) -> np.ndarray:
    """Counts of a one-channel 8-bit image's values under a 0/1 mask in `bins` equal bins of [0, upper)."""
    return cv2.calcHist([image], [0], mask, [bins], [0, upper]).ravel().astype(np.int64)


def _colour_counts(img: np.ndarray, mask8: np.ndarray) -> np.ndarray:
    """Pixels under a 0/1 mask per colour quantised to 8 levels a channel, at code
    r // 32 * 64 + g // 32 * 8 + b // 32."""
    return cv2.calcHist([img], [0, 1, 2], mask8, [8, 8, 8], [0, 256, 0, 256, 0, 256]).ravel().astype(np.int64)


def _extract(rgb: np.ndarray, names: list[str] | None = None) -> np.ndarray:
    """The feature vector; their names are appended to `names` when given (building them costs time)."""
    img = _working_image(rgb)
    h, w = img.shape[:2]
    size = h * w
    values: list[np.ndarray] = []

    def add(prefix: str, vals, labels=None):
        vals = np.atleast_1d(np.asarray(vals, np.float64))
        if names is not None:
            names.extend(f"{prefix}{lab}" for lab in labels or [str(i) for i in range(vals.size)])
        values.append(vals)

    add("shape_", [np.log(rgb.shape[1] / rgb.shape[0])], ["log_aspect"])

    # colour
    bg = _background(img)
    # |img - bg| per channel by OpenCV (the same integers as numpy's int16 copy, several times faster)
    per_channel = cv2.split(cv2.absdiff(img, tuple(float(v) for v in bg.astype(np.int16)) + (0.0,)))
    diff = cv2.max(cv2.max(per_channel[0], per_channel[1]), per_channel[2])
    ink = diff > 40
    ink8 = ink.view(np.uint8)  # the same mask as 0/1 bytes for OpenCV
    n_ink = np.count_nonzero(ink)
    hsv = cv2.cvtColor(img, cv2.COLOR_RGB2HSV)
    # saturation / 255 > 0.25 and value / 255 > 0.2, on the bytes
    saturated8 = cv2.bitwise_and(cv2.inRange(hsv, (0, 64, 52), (255, 255, 255)), ink8)
    n_saturated = cv2.countNonZero(saturated8)
    counts = np.sort(_colour_counts(img, ink8))[::-1] if n_ink else np.zeros(512)
    share = _norm(counts)
    cum = np.cumsum(share)
    n90 = float(np.searchsorted(cum, 0.9) + 1) if n_ink else 0.0
    entropy = float(-(share[share > 0] * np.log2(share[share > 0])).sum())
    grey = cv2.cvtColor(img, cv2.COLOR_RGB2GRAY)
    # hues 0..179 in six bins of 30
    hue_hist = _norm(_count_hist(cv2.extractChannel(hsv, 0), saturated8, 180, 180).reshape(6, 30).sum(1))
    grey_hist = _norm(_count_hist(grey, ink8, 8, 256))
    sat_of_ink = hsv[..., 1][ink] / 255.0
    add("colour_", [bg.mean() / 255, float(bg.mean() < 100), n_ink / size, n_saturated / size,
                    n_saturated / max(n_ink, 1), np.log1p(n90), float((share > 0.01).sum()), entropy,
                    sat_of_ink.mean() if n_ink else 0.0, sat_of_ink.std() if n_ink else 0.0],
        ["bg_level", "bg_dark", "ink", "saturated", "saturated_of_ink", "log_n90", "n_over_1pct", "entropy",
         "sat_mean", "sat_std"])
    add("colour_hue", hue_hist)
    add("colour_grey", grey_hist)

    # gradients (integers: 3x3 Sobel of 8-bit pixels)
    gx = cv2.Sobel(grey, cv2.CV_32F, 1, 0, ksize=3)
    gy = cv2.Sobel(grey, cv2.CV_32F, 0, 1, ksize=3)
    # |gx|, |gy| <= 1020: the squares and their sum are exact in float32, so this is np.hypot's value
    mag = np.sqrt(gx * gx + gy * gy)
    strong = mag > 80
    # Orientations are only read on edges (mag > 30): the arctangent of every pixel was a tenth of the
    # features' time. Pixels of the edge arrays keep the image's row-major order.
    edge = mag > 30
    mag_e = mag[edge]
    gx_e, gy_e = gx[edge], gy[edge]
    deg_e = np.degrees(np.arctan2(gy_e, gx_e))
    strong_e = mag_e > 80
    n_strong = np.count_nonzero(strong_e)
    orient = _norm(np.bincount(_orientation_bins(deg_e[strong_e], 10), weights=mag_e[strong_e], minlength=18))
    axis_aligned = orient[[0, 8, 9, 17]].sum()
    n_medium = np.count_nonzero(mag > 10) - n_strong
    lap = cv2.Laplacian(grey, cv2.CV_32F)
    flat = np.count_nonzero(mag < 2) / size
    levels = float(np.count_nonzero(cv2.calcHist([grey], [0], None, [256], [0, 256]))) / 256
    add("edge_orient", orient)
    add("edge_", [n_strong / size, n_medium / size, axis_aligned, flat, levels, np.log1p(lap.var()),
                  np.log1p(mag.mean())],
        ["strong", "medium", "axis_aligned", "flat", "grey_levels", "log_lap_var", "log_mag"])

    # HOG on a square thumbnail
    thumb = cv2.resize(grey, (64, 64), interpolation=cv2.INTER_AREA)
    add("hog", _hog(thumb))

    # layout grid
    def grid(mask8):
        return cv2.resize(mask8.astype(np.float32), (4, 4), interpolation=cv2.INTER_AREA).ravel()
    strong8 = strong.view(np.uint8)
    add("grid_ink", grid(ink8))
    add("grid_sat", grid(saturated8))
    add("grid_edge", grid(strong8))

    # filled regions: ink minus thin strokes and text
    thick8 = cv2.morphologyEx(ink8, cv2.MORPH_OPEN, np.ones((5, 5), np.uint8))
    thick = thick8.view(bool)
    n_thick = cv2.countNonZero(thick8)
    _, _, stats, _ = cv2.connectedComponentsWithStats(thick8, connectivity=4)
    stats = stats[1:]
    areas = stats[:, 4].astype(np.float64)
    keep = areas >= 20
    stats, areas = stats[keep], areas[keep]
    thick_area = max(areas.sum(), 1.0)
    if areas.size:
        box_area = (stats[:, 2] * stats[:, 3]).astype(np.float64)
        rect = areas / box_area
        ellipse_fill = areas / (np.pi / 4 * box_area)
        rect_mask = rect > 0.9
        big = int(areas.argmax())
        rect_stats = stats[rect_mask]
        if rect_stats.shape[0] >= 2:
            bottoms = rect_stats[:, 1] + rect_stats[:, 3]
            lefts = rect_stats[:, 0]
            same_bottom = float(np.max(np.bincount(bottoms // 3)) / rect_stats.shape[0])
            same_left = float(np.max(np.bincount(lefts // 3)) / rect_stats.shape[0])
            width_cv = float(rect_stats[:, 2].std() / rect_stats[:, 2].mean())
            height_cv = float(rect_stats[:, 3].std() / rect_stats[:, 3].mean())
        else:
            same_bottom = same_left = width_cv = height_cv = 0.0
        blob = [np.log1p(areas.size), areas[rect_mask].sum() / thick_area, float((rect * areas).sum() / thick_area),
                areas[big] / thick_area, rect[big], ellipse_fill[big], np.log1p(rect_mask.sum()),
                same_bottom, same_left, width_cv, height_cv, float((areas < 80).mean())]
    else:
        blob = [0.0] * 12
    filled_cols, filled_rows = thick.any(0), thick.any(1)
    col_runs = _runs(filled_cols)
    row_runs = _runs(filled_rows)
    steps = _profile_steps(filled_cols, thick.argmax(0))
    # the same profile seen from the right-hand side: the mask turned a quarter, rows become columns
    steps_t = _profile_steps(filled_rows[::-1], thick.argmax(1)[::-1])
    add("blob_", blob + [n_thick / size, n_thick / max(n_ink, 1), np.log1p(col_runs[0]), col_runs[1],
                         col_runs[2], np.log1p(row_runs[0]), row_runs[1], row_runs[2]] + steps + steps_t,
        ["log_count", "rect_share", "rect_mean", "largest_share", "largest_rect", "largest_ellipse",
         "log_rects", "same_bottom", "same_left", "width_cv", "height_cv", "small_share", "thick", "thick_of_ink",
         "log_col_runs", "col_run_cv", "col_gap_ratio", "log_row_runs", "row_run_cv", "row_gap_ratio",
         "top_flat", "top_jumps", "top_small", "side_flat", "side_jumps", "side_small"])

    # boundaries between colours inside filled regions (heatmap cell grid vs map borders)
    interior8 = cv2.erode(thick8, np.ones((3, 3), np.uint8))
    interior = interior8.view(bool)
    inner_e = interior[edge]  # of the edge pixels, those inside filled regions
    n_inner = np.count_nonzero(inner_e)
    if n_inner > 20:
        inner_orient = _norm(np.bincount(_orientation_bins(deg_e[inner_e], 30), minlength=6))
        inner_x, inner_y = _coordinates(cv2.bitwise_and(edge.view(np.uint8), interior8))
        abs_gx, abs_gy = np.abs(gx_e[inner_e]), np.abs(gy_e[inner_e])
        vertical = abs_gx > 2 * abs_gy
        horizontal = abs_gy > 2 * abs_gx
        n_vertical, n_horizontal = np.count_nonzero(vertical), np.count_nonzero(horizontal)
        span_h = max(int(interior.any(1).sum()), 1)
        span_w = max(int(interior.any(0).sum()), 1)
        col_sum = np.bincount(inner_x[vertical], minlength=w)
        row_sum = np.bincount(inner_y[horizontal], minlength=h)
        # share of boundary pixels on columns/rows crossing much of the region: a cell grid
        col_conc = col_sum[col_sum > 0.3 * span_h].sum() / max(n_vertical, 1)
        row_conc = row_sum[row_sum > 0.3 * span_w].sum() / max(n_horizontal, 1)
        diagonal = 1.0 - (n_vertical + n_horizontal) / n_inner
        inner_vals = list(inner_orient) + [n_inner / max(cv2.countNonZero(interior8), 1), col_conc, row_conc,
                                           diagonal]
    else:
        inner_vals = [0.0] * 10
    add("inner_", inner_vals, [f"orient{i}" for i in range(6)] + ["density", "col_grid", "row_grid", "diagonal"])

    # radial structure around the centre of the filled regions (pies, donuts)
    if n_thick > 30:
        xs, ys = _coordinates(thick8)
        cx, cy = xs.mean(), ys.mean()
        radius = np.sqrt(n_thick / np.pi)
        ex, ey = _coordinates(strong8)
        rx, ry = ex - cx, ey - cy
        rn = np.hypot(rx, ry) + 1e-6
        cosang = np.abs(gx_e[strong_e] * rx + gy_e[strong_e] * ry) / (mag_e[strong_e] * rn + 1e-6)
        near = rn < radius * 1.3
        radial_hist = _norm(np.bincount(np.minimum((cosang[near] * 4).astype(int), 3), minlength=4))
        dx, dy = xs - cx, ys - cy
        dist = np.hypot(dx, dy) / radius
        dist_hist = _norm(np.bincount(np.minimum((dist * 3).astype(int), 5), minlength=6))
        theta = np.arctan2(dy, dx)
        sector = ((theta + np.pi) / (2 * np.pi) * 24).astype(int) % 24
        max_r = np.zeros(24)
        np.maximum.at(max_r, sector, dist)
        roundness = float(max_r.std() / (max_r.mean() + 1e-6))
        circle = np.linspace(0, 2 * np.pi, 96, endpoint=False)
        sx = np.clip((cx + 0.6 * radius * np.cos(circle)).astype(int), 0, w - 1)
        sy = np.clip((cy + 0.6 * radius * np.sin(circle)).astype(int), 0, h - 1)
        ring = img[sy, sx].astype(np.int16)
        changes = float((np.abs(np.diff(ring, axis=0, append=ring[:1])).max(1) > 40).sum())
        on_ink = float(thick[sy, sx].mean())
        centre_ink = float(thick[int(cy), int(cx)])
        radial = list(radial_hist) + list(dist_hist) + [roundness, np.log1p(changes), on_ink, centre_ink,
                                                         radius * 2 / min(h, w)]
    else:
        radial = [0.0] * 15
    add("radial_", radial, [f"cos{i}" for i in range(4)] + [f"dist{i}" for i in range(6)] +
        ["roundness", "log_ring_changes", "ring_on_ink", "centre_ink", "diameter"])

    # straight lines
    edges = cv2.Canny(grey, 60, 160)
    lines = cv2.HoughLinesP(edges, 1, np.pi / 180, threshold=40, minLineLength=max(10, min(h, w) // 8), maxLineGap=3)
    if lines is not None:
        seg = lines.reshape(-1, 4).astype(np.float64)  # OpenCV 4 gives Nx1x4, OpenCV 5 Nx4
        dx, dy = seg[:, 2] - seg[:, 0], seg[:, 3] - seg[:, 1]
        length = np.hypot(dx, dy)
        angle = np.degrees(np.arctan2(np.abs(dy), np.abs(dx)))
        horiz, vert = angle < 3, angle > 87
        diag = ~(horiz | vert)
        hough = [np.log1p(horiz.sum()), np.log1p(vert.sum()), np.log1p(diag.sum()),
                 length[horiz].max() / w if horiz.any() else 0.0, length[vert].max() / h if vert.any() else 0.0,
                 length.sum() / (w + h)]
    else:
        hough = [0.0] * 6
    add("hough_", hough, ["log_h", "log_v", "log_diag", "longest_h", "longest_v", "total"])

    # text-likeness: small ink components sharing rows
    thin8 = cv2.subtract(ink8, thick8)  # saturating: ink and not thick, as 0/1 bytes
    _, _, s_stats, s_cent = cv2.connectedComponentsWithStats(thin8, connectivity=8)
    s_stats, s_cent = s_stats[1:], s_cent[1:]
    glyph = (s_stats[:, 3] >= 3) & (s_stats[:, 3] <= 20) & (s_stats[:, 2] <= 25) & (s_stats[:, 4] >= 3)
    gy_c = s_cent[glyph, 1] if glyph.any() else np.zeros(0)
    if gy_c.size >= 3:
        rows = np.bincount((gy_c // 3).astype(int))
        aligned = float(rows[rows >= 4].sum() / gy_c.size)
        n_text_rows = float((rows >= 4).sum())
    else:
        aligned, n_text_rows = 0.0, 0.0
    row_profile = cv2.reduce(ink8, 1, cv2.REDUCE_SUM, dtype=cv2.CV_32S).ravel() / w > 0.01
    alternations = _runs(row_profile)[0]
    add("text_", [np.log1p(glyph.sum()), glyph.sum() / max(len(s_stats), 1), aligned, np.log1p(n_text_rows),
                  np.log1p(alternations), cv2.countNonZero(thin8) / max(n_ink, 1)],
        ["log_glyphs", "glyph_share", "aligned", "log_rows", "log_row_alternations", "thin_of_ink"])

    add("mark_", _marks(ink8, n_ink, np.count_nonzero(diff > 15) - n_ink), MARK_NAMES)

    # symmetry
    t = thumb.astype(np.float32)
    t = t - t.mean()
    denom = float((t * t).sum()) + 1e-6
    add("sym_", [(t * t[:, ::-1]).sum() / denom, (t * t[::-1]).sum() / denom], ["lr", "ud"])

    return np.concatenate(values).astype(np.float32)
