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

from collections import Counter
from dataclasses import dataclass, field

import cv2
import numpy as np
import pymupdf

from corpusaudit.extract.captions import TextLine, in_reading_frame, upright

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


@dataclass
class Region:
    paths: list[int] = field(default_factory=list)  # indices into the page's drawings
    pictures: list[int] = field(default_factory=list)  # indices into the page's piece groups
    box: pymupdf.Rect = field(default_factory=pymupdf.Rect)  # ink and labels, unrotated points
    labels: list[int] = field(default_factory=list)  # indices into the page's text lines


def union(rects) -> pymupdf.Rect:
    """The box around rects by coordinates: Rect's | drops the zero-width rects of straight lines."""
    rects = list(rects)
    return pymupdf.Rect(min(r.x0 for r in rects), min(r.y0 for r in rects),
                        max(r.x1 for r in rects), max(r.y1 for r in rects))


def _is_white(colour) -> bool:
    if not colour:
        return False
    if len(colour) == 4:  # CMYK: white is no ink at all
        return max(colour) <= 1 - WHITE
    return min(colour) >= WHITE


def visible(drawing: dict) -> bool:
    """Does the path put ink on white paper? (a white fill alone does not)"""
    kind = drawing.get("type", "")
    stroke = "s" in kind and drawing.get("color") is not None and not _is_white(drawing.get("color")) \
        and (drawing.get("stroke_opacity") is None or drawing["stroke_opacity"] > 0)
    fill = "f" in kind and drawing.get("fill") is not None and not _is_white(drawing.get("fill")) \
        and (drawing.get("fill_opacity") is None or drawing["fill_opacity"] > 0)
    return bool(stroke or fill)


def _rectilinear(drawing: dict) -> bool:
    """Only axis-aligned rectangles and horizontal/vertical segments (the stuff of tables and bars)."""
    for item in drawing["items"]:
        op = item[0]
        if op == "re":
            continue
        if op == "qu":
            if not item[1].is_rectangular:
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
    rect = drawing["rect"]
    long_side, short_side = max(rect.width, rect.height), min(rect.width, rect.height)
    return "s" in drawing.get("type", "") and 1.0 <= long_side <= TICK_MAX_PT and short_side <= 0.5


def _paint(mask: np.ndarray, drawing: dict, page_area: float) -> None:
    rect = drawing["rect"]
    s = MASK_PX_PER_PT
    x0, y0 = int(max(rect.x0 * s, 0)), int(max(rect.y0 * s, 0))
    x1, y1 = int(min(rect.x1 * s, mask.shape[1] - 1)), int(min(rect.y1 * s, mask.shape[0] - 1))
    if x1 < x0 or y1 < y0:
        return
    large = rect.width * rect.height > 0.05 * page_area
    if large and "f" not in drawing.get("type", ""):
        # A big outline (page border, frame): its outline only, or it would swallow the page.
        for item in drawing["items"]:
            points = [item[1], item[2]] if item[0] == "l" else \
                [item[1].tl, item[1].tr, item[1].br, item[1].bl, item[1].tl] if item[0] == "re" else \
                [item[1].ul, item[1].ur, item[1].lr, item[1].ll, item[1].ul] if item[0] == "qu" else \
                [item[1], item[4]]
            # drawn into the rect's window: a clipped outline paints nothing beyond its clip
            polyline = np.array([[p[0] * s - x0, p[1] * s - y0] for p in points], dtype=np.int32)
            cv2.polylines(mask[y0:y1 + 1, x0:x1 + 1], [polyline], False, 1, 1)
        return
    mask[y0:y1 + 1, x0:x1 + 1] = 1


def _anchor(drawing: dict) -> tuple[int, int]:
    """A pixel the path certainly painted (its first point when not clipped away, else its box corner)."""
    rect = drawing["rect"]
    first = drawing["items"][0] if drawing["items"] else None
    if first is not None and first[0] in ("l", "c") and rect.x0 <= first[1][0] <= rect.x1 \
            and rect.y0 <= first[1][1] <= rect.y1:
        return int(first[1][0] * MASK_PX_PER_PT), int(first[1][1] * MASK_PX_PER_PT)
    return int(rect.x0 * MASK_PX_PER_PT), int(rect.y0 * MASK_PX_PER_PT)


def group_ink(bounds: pymupdf.Rect, drawings: list[dict], pictures: list[pymupdf.Rect],
              merge_pt: float = PATH_MERGE_PT, only: list[int] | None = None) -> list[Region]:
    """Paths and pictures within merge_pt of each other, as regions (box = their ink).

    only: restrict to these drawing indices (a second, wider grouping of scattered pieces)."""
    width = int(bounds.width * MASK_PX_PER_PT) + 2
    height = int(bounds.height * MASK_PX_PER_PT) + 2
    mask = np.zeros((height, width), dtype=np.uint8)
    page_area = bounds.get_area()
    used = []
    for index in range(len(drawings)) if only is None else only:
        drawing = drawings[index]
        rect = drawing["rect"]
        if rect.width * rect.height >= BACKGROUND_PAGE_SHARE * page_area and "f" in drawing.get("type", ""):
            continue  # page background fill
        _paint(mask, drawing, page_area)
        used.append(index)
    for rect in pictures:
        s = MASK_PX_PER_PT
        mask[int(max(rect.y0 * s, 0)):int(rect.y1 * s) + 1, int(max(rect.x0 * s, 0)):int(rect.x1 * s) + 1] = 1
    radius = int(round(merge_pt * MASK_PX_PER_PT / 2))
    grown = cv2.dilate(mask, cv2.getStructuringElement(cv2.MORPH_RECT, (2 * radius + 1, 2 * radius + 1)))
    _, labels = cv2.connectedComponents(grown, connectivity=8)
    regions: dict[int, Region] = {}
    for index in used:
        x, y = _anchor(drawings[index])
        label = int(labels[min(max(y, 0), height - 1), min(max(x, 0), width - 1)])
        if label == 0:
            continue
        region = regions.setdefault(label, Region())
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
    filled = [d for d in inked if "f" in d.get("type", "") and min(d["rect"].width, d["rect"].height) > 1.0]
    bars = sum(1 for d in filled if not any(_inside(d["rect"], line.bbox) for line in text_inside))
    if ticks >= 3 or bars >= 2:
        return "figure"  # tick marks along an axis, filled bars without text in them
    return "table"
