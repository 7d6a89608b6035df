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
    mode = np.bincount(codes).argmax()
    return border[codes == mode].mean(0)


def _hog(thumb: np.ndarray) -> np.ndarray:
    """Histogram of oriented gradients: unsigned orientation, L2-Hys normalised 2x2-cell blocks."""
    t = thumb.astype(np.float32)
    gx = cv2.Sobel(t, cv2.CV_32F, 1, 0, ksize=1)
    gy = cv2.Sobel(t, cv2.CV_32F, 0, 1, ksize=1)
    mag = np.hypot(gx, gy)
    bins = ((np.degrees(np.arctan2(gy, gx)) % 180.0) / (180.0 / HOG_BINS)).astype(np.int32) % HOG_BINS
    n = t.shape[0] // HOG_CELL
    cell = (np.arange(t.shape[0]) // HOG_CELL)
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


def _profile_steps(mask: np.ndarray) -> list[float]:
    """How the top edge of filled regions moves across columns: plateaus and jumps (bars, histograms)."""
    cols = mask.any(0)
    if cols.sum() < 4:
        return [0.0, 0.0, 0.0]
    top = np.where(cols, mask.argmax(0), -1)[cols].astype(np.float32)
    d = np.abs(np.diff(top))
    flat = float((d == 0).mean())
    jumps = float((d > 2).mean())
    small = float(((d > 0) & (d <= 2)).mean())
    return [flat, jumps, small]


MARK_NAMES = ["log_dots", "dot_share", "dot_cells", "dot_inner", "dot_area_cv", "dot_row_aligned",
              "dot_col_aligned", "dot_hollow", "log_strokes", "stroke_share", "longest_extent", "longest_fill",
              "longest_thickness", "log_halo_ratio"]
DOT_SIDE = 16  # px at WORK_SIDE, after a 1 px dilation: a marker or a glyph, not a stroke across the plot


def _marks(diff: np.ndarray, ink: np.ndarray) -> list[float]:
    """Connected components of ink after removing long horizontal/vertical rules (axes, grids, frames)."""
    h, w = ink.shape
    ink8 = ink.astype(np.uint8)
    rule_len = max(12, min(h, w) // 6)
    rules = cv2.morphologyEx(ink8, cv2.MORPH_OPEN, np.ones((1, rule_len), np.uint8)) | \
        cv2.morphologyEx(ink8, cv2.MORPH_OPEN, np.ones((rule_len, 1), np.uint8))
    marks = ink8 & (1 - rules)
    # removing a rule also cuts every curve that crosses it: bridge gaps of up to 2 px again
    n, labels, stats, cents = cv2.connectedComponentsWithStats(cv2.dilate(marks, np.ones((3, 3), np.uint8)),
                                                               connectivity=8)
    own_ink = np.bincount(labels[marks > 0], minlength=n)[1:]  # undilated pixels: rings stay hollow
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
    vals[13] = float(np.log1p(((diff > 15) & (diff <= 40)).sum() / max(int(ink.sum()), 1)))
    return [float(v) for v in vals]


def extract(rgb: np.ndarray) -> np.ndarray:
    """Feature vector (float32, len(feature_names())) for an HxWx3 uint8 RGB image."""
    return _extract(rgb)[1]


def feature_names() -> list[str]:
    return _extract(np.full((64, 64, 3), 255, np.uint8))[0]


def _extract(rgb: np.ndarray) -> tuple[list[str], np.ndarray]:
    img = _working_image(rgb)
    h, w = img.shape[:2]
    names: list[str] = []
    values: list[np.ndarray] = []

    def add(prefix: str, vals, labels=None):
        vals = np.atleast_1d(np.asarray(vals, np.float64))
        labels = labels or [str(i) for i in range(vals.size)]
        names.extend(f"{prefix}{lab}" for lab in labels)
        values.append(vals)

    add("shape_", [np.log(rgb.shape[1] / rgb.shape[0])], ["log_aspect"])

    # colour
    bg = _background(img)
    # |img - bg| per channel by OpenCV (the same integers as numpy's int16 copy, several times faster)
    per_channel = cv2.absdiff(img, tuple(float(v) for v in bg.astype(np.int16)) + (0.0,))
    diff = np.maximum(np.maximum(per_channel[..., 0], per_channel[..., 1]), per_channel[..., 2]).astype(np.int16)
    ink = diff > 40
    ink_share = ink.mean()
    hsv = cv2.cvtColor(img, cv2.COLOR_RGB2HSV)
    sat = hsv[..., 1] / 255.0
    val = hsv[..., 2] / 255.0
    saturated = (sat > 0.25) & (val > 0.2) & ink
    q = (img // 32).astype(np.int32)
    codes = (q[..., 0] * 64 + q[..., 1] * 8 + q[..., 2])[ink]
    counts = np.sort(np.bincount(codes, minlength=512))[::-1] if codes.size else np.zeros(512)
    share = _norm(counts)
    cum = np.cumsum(share)
    n90 = float(np.searchsorted(cum, 0.9) + 1) if codes.size else 0.0
    entropy = float(-(share[share > 0] * np.log2(share[share > 0])).sum())
    grey = cv2.cvtColor(img, cv2.COLOR_RGB2GRAY)
    hue_hist = _norm(np.bincount((hsv[..., 0][saturated].astype(np.int32) * 6) // 180, minlength=6)[:6])
    grey_hist = _norm(np.bincount(grey[ink] // 32, minlength=8))
    add("colour_", [bg.mean() / 255, float(bg.mean() < 100), ink_share, saturated.mean(),
                    saturated.sum() / max(ink.sum(), 1), np.log1p(n90), float((share > 0.01).sum()), entropy,
                    sat[ink].mean() if ink.any() else 0.0, sat[ink].std() if ink.any() else 0.0],
        ["bg_level", "bg_dark", "ink", "saturated", "saturated_of_ink", "log_n90", "n_over_1pct", "entropy",
         "sat_mean", "sat_std"])
    add("colour_hue", hue_hist)
    add("colour_grey", grey_hist)

    # gradients
    g = grey.astype(np.float32)
    gx = cv2.Sobel(g, cv2.CV_32F, 1, 0, ksize=3)
    gy = cv2.Sobel(g, cv2.CV_32F, 0, 1, ksize=3)
    mag = np.hypot(gx, gy)
    strong = mag > 80
    # Orientations are only read on edges (mag > 30 below): the arctangent of every pixel
    # was a tenth of the features' time.
    ang = np.zeros_like(mag)
    edge = mag > 30
    ang[edge] = np.degrees(np.arctan2(gy[edge], gx[edge])) % 180.0
    orient = _norm(np.bincount((ang[strong] // 10).astype(np.int32) % 18, weights=mag[strong], minlength=18))
    axis_aligned = orient[[0, 8, 9, 17]].sum()
    medium = (mag > 10) & (mag <= 80)
    lap = cv2.Laplacian(g, cv2.CV_32F)
    flat = float((mag < 2).mean())
    levels = float(np.count_nonzero(np.bincount(grey.ravel(), minlength=256))) / 256
    add("edge_orient", orient)
    add("edge_", [strong.mean(), medium.mean(), axis_aligned, flat, levels, np.log1p(lap.var()),
                  np.log1p(mag.mean())],
        ["strong", "medium", "axis_aligned", "flat", "grey_levels", "log_lap_var", "log_mag"])

    # HOG on a square thumbnail
    thumb = cv2.resize(grey, (64, 64), interpolation=cv2.INTER_AREA)
    add("hog", _hog(thumb))

    # layout grid
    def grid(mask):
        return cv2.resize(mask.astype(np.float32), (4, 4), interpolation=cv2.INTER_AREA).ravel()
    add("grid_ink", grid(ink))
    add("grid_sat", grid(saturated))
    add("grid_edge", grid(strong))

    # filled regions: ink minus thin strokes and text
    thick = cv2.morphologyEx(ink.astype(np.uint8), cv2.MORPH_OPEN, np.ones((5, 5), np.uint8)).astype(bool)
    n_lab, lab, stats, cents = cv2.connectedComponentsWithStats(thick.astype(np.uint8), connectivity=4)
    stats, cents = stats[1:], cents[1:]
    areas = stats[:, 4].astype(np.float64)
    keep = areas >= 20
    stats, cents, areas = stats[keep], cents[keep], areas[keep]
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
    col_runs = _runs(thick.any(0))
    row_runs = _runs(thick.any(1))
    steps = _profile_steps(thick)
    steps_t = _profile_steps(thick.T[:, ::-1])
    add("blob_", blob + [thick.mean(), thick.sum() / max(ink.sum(), 1), np.log1p(col_runs[0]), col_runs[1],
                         col_runs[2], np.log1p(row_runs[0]), row_runs[1], row_runs[2]] + steps + steps_t,
        ["log_count", "rect_share", "rect_mean", "largest_share", "largest_rect", "largest_ellipse",
         "log_rects", "same_bottom", "same_left", "width_cv", "height_cv", "small_share", "thick", "thick_of_ink",
         "log_col_runs", "col_run_cv", "col_gap_ratio", "log_row_runs", "row_run_cv", "row_gap_ratio",
         "top_flat", "top_jumps", "top_small", "side_flat", "side_jumps", "side_small"])

    # boundaries between colours inside filled regions (heatmap cell grid vs map borders)
    interior = cv2.erode(thick.astype(np.uint8), np.ones((3, 3), np.uint8)).astype(bool)
    inner = (mag > 30) & interior
    n_inner = int(inner.sum())
    if n_inner > 20:
        inner_orient = _norm(np.bincount((ang[inner] // 30).astype(np.int32) % 6, minlength=6))
        vertical = inner & (np.abs(gx) > 2 * np.abs(gy))
        horizontal = inner & (np.abs(gy) > 2 * np.abs(gx))
        span_h = max(int(interior.any(1).sum()), 1)
        span_w = max(int(interior.any(0).sum()), 1)
        col_sum, row_sum = vertical.sum(0), horizontal.sum(1)
        # share of boundary pixels on columns/rows crossing much of the region: a cell grid
        col_conc = col_sum[col_sum > 0.3 * span_h].sum() / max(vertical.sum(), 1)
        row_conc = row_sum[row_sum > 0.3 * span_w].sum() / max(horizontal.sum(), 1)
        diagonal = 1.0 - (vertical.sum() + horizontal.sum()) / n_inner
        inner_vals = list(inner_orient) + [n_inner / max(interior.sum(), 1), col_conc, row_conc, diagonal]
    else:
        inner_vals = [0.0] * 10
    add("inner_", inner_vals, [f"orient{i}" for i in range(6)] + ["density", "col_grid", "row_grid", "diagonal"])

    # radial structure around the centre of the filled regions (pies, donuts)
    ys, xs = np.nonzero(thick)
    if xs.size > 30:
        cx, cy = xs.mean(), ys.mean()
        radius = np.sqrt(xs.size / np.pi)
        ey, ex = np.nonzero(strong)
        rx, ry = ex - cx, ey - cy
        rn = np.hypot(rx, ry) + 1e-6
        cosang = np.abs(gx[ey, ex] * rx + gy[ey, ex] * ry) / (mag[ey, ex] * rn + 1e-6)
        near = rn < radius * 1.3
        radial_hist = _norm(np.bincount(np.minimum((cosang[near] * 4).astype(int), 3), minlength=4))
        dist = np.hypot(xs - cx, ys - cy) / radius
        dist_hist = _norm(np.bincount(np.minimum((dist * 3).astype(int), 5), minlength=6))
        theta = np.arctan2(ys - cy, xs - cx)
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
    thin = ink & ~thick
    n_small, _, s_stats, s_cent = cv2.connectedComponentsWithStats(thin.astype(np.uint8), connectivity=8)
    s_stats, s_cent = s_stats[1:], s_cent[1:]
    glyph = (s_stats[:, 3] >= 3) & (s_stats[:, 3] <= 20) & (s_stats[:, 2] <= 25) & (s_stats[:, 4] >= 3)
    gy_c = s_cent[glyph, 1] if glyph.any() else np.zeros(0)
    if gy_c.size >= 3:
        rows = np.bincount((gy_c // 3).astype(int))
        aligned = float(rows[rows >= 4].sum() / gy_c.size)
        n_text_rows = float((rows >= 4).sum())
    else:
        aligned, n_text_rows = 0.0, 0.0
    row_profile = ink.mean(1) > 0.01
    alternations = _runs(row_profile)[0]
    add("text_", [np.log1p(glyph.sum()), glyph.sum() / max(len(s_stats), 1), aligned, np.log1p(n_text_rows),
                  np.log1p(alternations), thin.sum() / max(ink.sum(), 1)],
        ["log_glyphs", "glyph_share", "aligned", "log_rows", "log_row_alternations", "thin_of_ink"])

    add("mark_", _marks(diff, ink), MARK_NAMES)

    # symmetry
    t = thumb.astype(np.float32)
    t = t - t.mean()
    denom = float((t * t).sum()) + 1e-6
    add("sym_", [(t * t[:, ::-1]).sum() / denom, (t * t[::-1]).sum() / denom], ["lr", "ud"])

    return names, np.concatenate(values).astype(np.float32)
