"""Figure regions of a page: drawn paths and raster pictures grouped by proximity, plus their labels.

Grouping paints every path's footprint (and every picture's box) into a coarse occupancy
mask, grows it by the merge distance and takes connected components: linear in the number
of paths, unlike pairwise clustering, whose cost grows at least quadratically. A region
with a picture is a raster figure (vector axes and labels around a heatmap are part of it);
a region of paths alone is a vector figure unless it looks like a table, a rule, a border
or a frame around text. Labels join a region when they lie inside it or within a tick
label's distance of it; a chart title may sit further off when it is centred on the chart.
Boxes are joined by coordinates (union), since straight lines have zero-width rects.
"""

from __future__ import annotations

import math
from collections import Counter
from dataclasses import dataclass, field

import cv2
import numpy as np
import pymupdf

from corpusaudit.extract.captions import TextLine, in_reading_frame, upright
from corpusaudit.extract.vector_evidence import is_rectangular_quad, rect_columns

MASK_PX_PER_PT = 1.0
PATH_MERGE_PT = 4.0  # paths closer than this belong to one drawing (ticks to axes, bars to baseline)
LABEL_GAP_PT = 5.0  # tick labels sit ~3.5 pt from tick ends; axis titles ~4 pt beyond the labels
LABEL_PASSES = 3  # tick labels, then axis titles, then a colour-bar title
LABEL_MAX_CHARS = 60
BACKGROUND_PAGE_SHARE = 0.8  # a path covering this much of the page is a page background
SCATTER_MERGE_PT = 16.0  # markers of a frameless scatter plot, bars of a chart without axes lines
TICK_MAX_PT = 9.0
TITLE_CENTRE_SHARE = 0.15  # a chart title's centre lies this share of the chart's width from its centre
TITLE_GAP_LINES = 1.5  # and at most this many of its own line heights from the chart's ink
WHITE = 0.94  # fills this light carry no visible ink on white paper
WINDOWS_ONE_BY_ONE = 4000  # fewer path boxes are painted one by one (about 1 us each), more at once (~3 ms)


@dataclass
class Region:
    paths: list[int] = field(default_factory=list)  # indices into the page's drawings
    pictures: list[int] = field(default_factory=list)  # indices into the page's piece groups
    box: pymupdf.Rect = field(default_factory=pymupdf.Rect)  # ink and labels, unrotated points
    labels: list[int] = field(default_factory=list)  # indices into the page's text lines


def union(rects) -> pymupdf.Rect:
    """The box around rects (Rects or (x0, y0, x1, y1) tuples) by coordinates: Rect's | drops the
    zero-width rects of straight lines."""
    x0, y0, x1, y1 = list(zip(*rects)) or ((), (), (), ())
    return pymupdf.Rect(min(x0), min(y0), max(x1), max(y1))


def _sides(rect) -> tuple[float, float]:
    """Rect.width and Rect.height of a rect tuple."""
    return max(0, rect[2] - rect[0]), max(0, rect[3] - rect[1])


def _is_white(colour) -> bool:
    if not colour:
        return False
    if len(colour) == 4:  # CMYK: white is no ink at all
        return max(colour) <= 1 - WHITE
    return min(colour) >= WHITE


def visible(drawing: dict) -> bool:
    """Does the path put ink on white paper? (a white fill alone does not)"""
    kind = drawing.get("type", "")
    if "s" in kind:
        colour, opacity = drawing.get("color"), drawing.get("stroke_opacity")
        if colour is not None and not _is_white(colour) and (opacity is None or opacity > 0):
            return True
    if "f" in kind:
        colour, opacity = drawing.get("fill"), drawing.get("fill_opacity")
        if colour is not None and not _is_white(colour) and (opacity is None or opacity > 0):
            return True
    return False


def _rectilinear(drawing: dict) -> bool:
    """Only axis-aligned rectangles and horizontal/vertical segments (the stuff of tables and bars)."""
    for item in drawing["items"]:
        op = item[0]
        if op == "re":
            continue
        if op == "qu":
            if not is_rectangular_quad(item[1]):
                return False
            continue
        if op == "l":
            p, q = item[1], item[2]
            if abs(p[0] - q[0]) > 0.5 and abs(p[1] - q[1]) > 0.5:
                return False
            continue
        return False  # curves
    return True


def _is_tick(drawing: dict) -> bool:
    width, height = _sides(drawing["rect"])
    long_side, short_side = max(width, height), min(width, height)
    return "s" in drawing.get("type", "") and 1.0 <= long_side <= TICK_MAX_PT and short_side <= 0.5


def _outline(mask: np.ndarray, drawing: dict, x0: int, y0: int, x1: int, y1: int) -> None:
    """A big outline (page border, frame) painted as its outline only, or it would swallow the
    page; drawn into the rect's window: a clipped outline paints nothing beyond its clip."""
    s = MASK_PX_PER_PT
    for item in drawing["items"]:
        op = item[0]
        if op == "l":
            points = [item[1], item[2]]
        elif op == "re":
            left, top, right, bottom = item[1]
            left, right = (right, left) if right < left else (left, right)  # Rect.normalize
            top, bottom = (bottom, top) if bottom < top else (top, bottom)
            points = [(left, top), (right, top), (right, bottom), (left, bottom), (left, top)]
        elif op == "qu":
            upper_left, upper_right, lower_left, lower_right = item[1]
            points = [upper_left, upper_right, lower_right, lower_left, upper_left]
        else:
            points = [item[1], item[4]]
        polyline = np.array([[p[0] * s - x0, p[1] * s - y0] for p in points], dtype=np.int32)
        cv2.polylines(mask[y0:y1 + 1, x0:x1 + 1], [polyline], False, 1, 1)


def _as_int(values: np.ndarray, low: float, high: float) -> np.ndarray:
    """int() of each value (toward zero), raising as int() does on the first that is not finite.
    Values are first clipped to low..high, so that they fit in 64 bits: callers choose a range
    wide enough that the clipping changes none of their results."""
    bad = ~np.isfinite(values)
    if bad.any():
        int(float(values.ravel()[np.flatnonzero(bad.ravel())[0]]))
    return np.trunc(np.minimum(np.maximum(values, low), high)).astype(np.int64)


def _painted_windows(rects: np.ndarray, width: int, height: int) -> np.ndarray:
    """Each rect's mask window x0, y0, x1, y1 (inclusive), as int(max(x0 * s, 0)) ..
    int(min(x1 * s, width - 1)) give it; empty where x1 < x0 or y1 < y0. A start beyond the
    mask is brought to just past it and an end before it to just before it: an empty window
    stays empty and the others keep their values."""
    scaled = rects * MASK_PX_PER_PT
    x0, y0, x1, y1 = scaled.T
    x0, y0 = np.where(0 > x0, 0, x0), np.where(0 > y0, 0, y0)  # max(v, 0) keeps v unless 0 > v
    x1, y1 = np.where(width - 1 < x1, width - 1, x1), np.where(height - 1 < y1, height - 1, y1)
    return _as_int(np.stack([x0, y0, x1, y1], axis=1), -2, max(width, height) + 1)


def _fill_windows(mask: np.ndarray, windows: np.ndarray) -> None:
    """mask[y0:y1 + 1, x0:x1 + 1] = 1 for every window. Many windows are painted all at once:
    +1/-1 at the corners of a difference array, summed along both axes (its integral image),
    which costs a few milliseconds whatever their number."""
    if len(windows) < WINDOWS_ONE_BY_ONE:
        for x0, y0, x1, y1 in windows.tolist():
            mask[y0:y1 + 1, x0:x1 + 1] = 1
        return
    height, width = mask.shape
    x0, y0, x1, y1 = windows.T
    corners = np.concatenate([y0 * (width + 1) + x0, y0 * (width + 1) + x1 + 1,
                              (y1 + 1) * (width + 1) + x0, (y1 + 1) * (width + 1) + x1 + 1])
    signs = np.repeat(np.array([1, -1, -1, 1], dtype=np.int32), len(windows))
    difference = np.bincount(corners, weights=signs, minlength=(height + 1) * (width + 1))
    covered = cv2.integral(difference.reshape(height + 1, width + 1))[1:height + 1, 1:width + 1]
    mask[covered > 0.5] = 1


def _anchors(drawings: list[dict], rects: np.ndarray, width: int, height: int) -> np.ndarray:
    """A pixel each path certainly painted (its first point when not clipped away, else its
    box corner), before clamping to the mask, as int() gives it."""
    firsts = [(items[0][1][0], items[0][1][1]) if items and items[0][0] in ("l", "c") else (math.nan, math.nan)
              for items in (drawing["items"] for drawing in drawings)]
    px, py = np.array(firsts, dtype=np.float64).reshape(-1, 2).T
    x0, y0, x1, y1 = rects.T
    inside = (x0 <= px) & (px <= x1) & (y0 <= py) & (py <= y1)  # never for the missing (nan) points
    # the caller clamps to the mask: clipping to one pixel beyond it changes nothing
    return _as_int(np.stack([np.where(inside, px, x0) * MASK_PX_PER_PT,
                             np.where(inside, py, y0) * MASK_PX_PER_PT], axis=1), -1, max(width, height))


def _paint_paths(mask: np.ndarray, drawings: list[dict], candidates: list[int], page_area: float
                 ) -> tuple[list[int], np.ndarray]:
    """Paint the footprint of each candidate path but page background fills into mask; the
    paths painted (indices into drawings) and their rects."""
    if not candidates:
        return [], np.zeros((0, 4))
    height, width = mask.shape
    rects = rect_columns([drawings[i] for i in candidates])
    filled = np.array(["f" in drawings[i].get("type", "") for i in candidates], dtype=bool)
    sides = rects[:, 2:] - rects[:, :2]
    sides = np.where(sides > 0, sides, 0.0)  # Rect.width, Rect.height
    area = sides[:, 0] * sides[:, 1]
    kept = ~((area >= BACKGROUND_PAGE_SHARE * page_area) & filled)
    used = [index for index, keep in zip(candidates, kept.tolist()) if keep]
    rects, filled, area = rects[kept], filled[kept], area[kept]
    windows = _painted_windows(rects, width, height)
    painted = (windows[:, 2] >= windows[:, 0]) & (windows[:, 3] >= windows[:, 1])
    outlined = painted & (area > 0.05 * page_area) & ~filled
    _fill_windows(mask, windows[painted & ~outlined])
    for index, (x0, y0, x1, y1) in zip(np.flatnonzero(outlined).tolist(), windows[outlined].tolist()):
        _outline(mask, drawings[used[index]], x0, y0, x1, y1)
    return used, rects


def group_ink(bounds: pymupdf.Rect, drawings: list[dict], pictures: list[pymupdf.Rect],
              merge_pt: float = PATH_MERGE_PT, only: list[int] | None = None) -> list[Region]:
    """Paths and pictures within merge_pt of each other, as regions (box = their ink).

    only: restrict to these drawing indices (a second, wider grouping of scattered pieces).
    The paths' geometry is read into arrays once: a scatter plot's page has tens of thousands."""
    width = int(bounds.width * MASK_PX_PER_PT) + 2
    height = int(bounds.height * MASK_PX_PER_PT) + 2
    mask = np.zeros((height, width), dtype=np.uint8)
    candidates = list(range(len(drawings))) if only is None else list(only)
    used, rects = _paint_paths(mask, drawings, candidates, bounds.get_area())
    for rect in pictures:
        s = MASK_PX_PER_PT
        mask[int(max(rect.y0 * s, 0)):int(rect.y1 * s) + 1, int(max(rect.x0 * s, 0)):int(rect.x1 * s) + 1] = 1
    radius = int(round(merge_pt * MASK_PX_PER_PT / 2))
    grown = cv2.dilate(mask, cv2.getStructuringElement(cv2.MORPH_RECT, (2 * radius + 1, 2 * radius + 1)))
    _, labels = cv2.connectedComponents(grown, connectivity=8)
    regions: dict[int, Region] = {}
    if used:
        anchors = _anchors([drawings[i] for i in used], rects, width, height)
        xs = np.minimum(np.maximum(anchors[:, 0], 0), width - 1)
        ys = np.minimum(np.maximum(anchors[:, 1], 0), height - 1)
        for index, label in zip(used, labels[ys, xs].tolist()):
            if label == 0:
                continue
            region = regions.get(label)
            if region is None:  # not setdefault: a Region per path would be built for nothing
                region = regions[label] = Region()
            region.paths.append(index)
    for index, rect in enumerate(pictures):
        cx, cy = int((rect.x0 + rect.x1) / 2 * MASK_PX_PER_PT), int((rect.y0 + rect.y1) / 2 * MASK_PX_PER_PT)
        label = int(labels[min(max(cy, 0), height - 1), min(max(cx, 0), width - 1)])
        regions.setdefault(label, Region()).pictures.append(index)
    for region in regions.values():
        box = union([drawings[i]["rect"] for i in region.paths] + [pictures[i] for i in region.pictures])
        region.box = pymupdf.Rect(max(box.x0, bounds.x0), max(box.y0, bounds.y0),
                                  min(box.x1, bounds.x1), min(box.y1, bounds.y1))
    return list(regions.values())


def label_like(lines: list[TextLine], caption_blocks: set[int]) -> list[bool]:
    """Lines that may be a figure's labels: short, not in a caption, not in a paragraph."""
    by_block: dict[int, list[TextLine]] = {}
    for line in lines:
        by_block.setdefault(line.block, []).append(line)
    paragraph_blocks = {block for block, members in by_block.items()
                        if len(members) >= 3 and np.mean([len(m.text) for m in members]) > 45}
    return [line.block not in caption_blocks and line.block not in paragraph_blocks
            and len(line.text.strip()) <= LABEL_MAX_CHARS for line in lines]


def _near(box: pymupdf.Rect, line: tuple[float, float, float, float], gap: float) -> bool:
    x0, y0, x1, y1 = line
    return x0 <= box.x1 + gap and x1 >= box.x0 - gap and y0 <= box.y1 + gap and y1 >= box.y0 - gap


def _inside(box: pymupdf.Rect, line: tuple[float, float, float, float]) -> bool:
    cx, cy = (line[0] + line[2]) / 2, (line[1] + line[3]) / 2
    return box.x0 <= cx <= box.x1 and box.y0 <= cy <= box.y1


def attach_labels(region: Region, lines: list[TextLine], attachable: list[bool]) -> None:
    """Grow the region by the text inside it and the label-like lines just around it."""
    taken = set(region.labels)
    for _ in range(LABEL_PASSES):
        added = False
        for index, line in enumerate(lines):
            if index in taken:
                continue
            if _inside(region.box, line.bbox) or (attachable[index] and _near(region.box, line.bbox, LABEL_GAP_PT)):
                taken.add(index)
                region.box = union((region.box, pymupdf.Rect(line.bbox)))
                added = True
        if not added:
            break
    region.labels = sorted(taken)


def attach_titles(regions: list[Region], lines: list[TextLine], attachable: list[bool]) -> None:
    """Chart titles: a short line centred on a drawn region, above or below it, further off than
    a tick label (pies and charts on transparent canvases leave a wide margin under the title).

    A title is a text block of one line (a paragraph has more) with letters in it (not a page
    number), no wider than its chart, centred on it, and within TITLE_GAP_LINES of its own
    height; it goes to the nearest such region only."""
    per_block = Counter(line.block for line in lines)
    taken = {i for region in regions for i in region.labels}
    for index, line in enumerate(lines):
        if index in taken or not attachable[index] or per_block[line.block] > 1 \
                or not any(ch.isalpha() for ch in line.text):
            continue  # taken, body text, or a page number
        frame = upright(line.direction)
        lx0, ly0, lx1, ly1 = in_reading_frame(line.bbox, frame)
        nearest = None
        for region in regions:
            if not region.paths:
                continue  # a picture's title is in its pixels
            x0, y0, x1, y1 = in_reading_frame(tuple(region.box), frame)
            width = x1 - x0
            if lx1 - lx0 > width or abs((lx0 + lx1 - x0 - x1) / 2) > TITLE_CENTRE_SHARE * width:
                continue
            gap = max(y0 - ly1, ly0 - y1)
            if 0 <= gap <= TITLE_GAP_LINES * (ly1 - ly0) and (nearest is None or gap < nearest[0]):
                nearest = (gap, region)
        if nearest is not None:
            region = nearest[1]
            region.box = union((region.box, pymupdf.Rect(line.bbox)))
            region.labels = sorted(set(region.labels) | {index})
            taken.add(index)


def merge_overlapping(regions: list[Region]) -> list[Region]:
    """Regions whose grown boxes overlap (a legend joined to its chart by its labels) become one."""
    merged = True
    while merged:
        merged = False
        for i in range(len(regions)):
            for j in range(i + 1, len(regions)):
                a, b = regions[i].box, regions[j].box
                if a.x0 < b.x1 and b.x0 < a.x1 and a.y0 < b.y1 and b.y0 < a.y1:
                    regions[i].paths += regions[j].paths
                    regions[i].pictures += regions[j].pictures
                    regions[i].labels = sorted(set(regions[i].labels) | set(regions[j].labels))
                    regions[i].box = union((a, b))
                    del regions[j]
                    merged = True
                    break
            if merged:
                break
    return regions


def vector_verdict(region: Region, drawings: list[dict], lines: list[TextLine], min_size: float) -> str:
    """"figure", or why the region is not one (table, rule, frame, blank, small)."""
    inked = [drawings[i] for i in region.paths if visible(drawings[i])]
    if not inked:
        return "blank"
    ink = union(d["rect"] for d in inked)
    if min(region.box.width, region.box.height) < min_size or max(ink.width, ink.height) < min_size:
        return "small"
    if not all(_rectilinear(d) for d in inked):
        return "figure"  # curves and slanted lines: a chart or diagram, not a table
    if len(inked) <= 2:
        return "frame"  # underline, rule, page border, box around a text block
    text_inside = [line for line in lines if _inside(ink, line.bbox)]
    if len(text_inside) < 3:
        return "figure"
    ticks = sum(1 for d in inked if _is_tick(d))
    filled = [d for d in inked if "f" in d.get("type", "") and min(_sides(d["rect"])) > 1.0]
    bars = sum(1 for d in filled for box in (pymupdf.Rect(d["rect"]),)
               if not any(_inside(box, line.bbox) for line in text_inside))
    if ticks >= 3 or bars >= 2:
        return "figure"  # tick marks along an axis, filled bars without text in them
    return "table"
