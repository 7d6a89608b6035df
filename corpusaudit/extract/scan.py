"""Scanned pages: find the figures inside a page that is one big picture.

The page render is reduced to an ink mask (darker than the paper or clearly coloured),
cleaned of speckle, and split into connected regions. Regions large in both directions
seed figures (axes frames, bar groups, photos); the small regions around a seed (tick
labels, legend text, axis titles) join it, while long text lines (body text, captions)
and ruled tables do not.
"""

from __future__ import annotations

import cv2
import numpy as np

WORK_DPI = 72.0  # segmentation resolution: one pixel per point
SEED_MIN_PT = 30.0  # both sides at least this: larger than any text glyph or word height
JOIN_GAP_PT = 6.0  # labels join a seed when this close
TEXT_LINE_MIN_PT = 120.0  # a smeared text line this long is body text or a caption
WORD_SMEAR_PT = 6.0
INK_BELOW_PAPER = 25  # grey levels darker than the paper that count as ink (light plot backgrounds too)
COLOURED_SATURATION = 60


def ink_mask(rgb: np.ndarray) -> np.ndarray:
    grey = cv2.cvtColor(rgb, cv2.COLOR_RGB2GRAY)
    grey = cv2.medianBlur(grey, 3)  # scanner noise and speckle
    paper = float(np.percentile(grey, 90))
    saturation = cv2.cvtColor(cv2.medianBlur(rgb, 3), cv2.COLOR_RGB2HSV)[:, :, 1]
    ink = (grey < paper - INK_BELOW_PAPER) | (saturation > COLOURED_SATURATION)
    return ink.astype(np.uint8)


def _boxes(mask: np.ndarray) -> np.ndarray:
    count, _, stats, _ = cv2.connectedComponentsWithStats(mask, connectivity=8)
    return stats[1:count, :4].astype(float)  # x, y, w, h


def _is_ruled_table(mask: np.ndarray, box: np.ndarray, text_boxes: np.ndarray) -> bool:
    """Mostly long straight rules with several rows of text between them."""
    x, y, w, h = (int(v) for v in box)
    crop = mask[y:y + h, x:x + w]
    if crop.sum() == 0:
        return False
    horizontal = cv2.morphologyEx(crop, cv2.MORPH_OPEN, cv2.getStructuringElement(cv2.MORPH_RECT, (max(w // 2, 3), 1)))
    vertical = cv2.morphologyEx(crop, cv2.MORPH_OPEN, cv2.getStructuringElement(cv2.MORPH_RECT, (1, max(h // 2, 3))))
    rules = float(((horizontal | vertical) & crop).sum()) / float(crop.sum())
    inside = text_boxes[(text_boxes[:, 0] >= x) & (text_boxes[:, 0] + text_boxes[:, 2] <= x + w)
                        & (text_boxes[:, 1] >= y) & (text_boxes[:, 1] + text_boxes[:, 3] <= y + h)]
    rows = len(np.unique(np.round((inside[:, 1] + inside[:, 3] / 2) / 6.0))) if len(inside) else 0
    return rules >= 0.6 and rows >= 3 and len(inside) >= 6


def figure_boxes(rgb: np.ndarray, dpi: float, min_size_pt: float) -> list[tuple[float, float, float, float]]:
    """Figure boxes in page points (of the rendered, displayed page)."""
    factor = WORK_DPI / dpi
    small = cv2.resize(rgb, (max(int(rgb.shape[1] * factor), 1), max(int(rgb.shape[0] * factor), 1)),
                       interpolation=cv2.INTER_AREA)
    mask = ink_mask(small)
    closed = cv2.morphologyEx(mask, cv2.MORPH_CLOSE, cv2.getStructuringElement(cv2.MORPH_RECT, (3, 3)))
    boxes = _boxes(closed)
    if not len(boxes):
        return []
    page_w, page_h = mask.shape[1], mask.shape[0]
    is_seed = (boxes[:, 2] >= SEED_MIN_PT) & (boxes[:, 3] >= SEED_MIN_PT) & \
        (boxes[:, 2] * boxes[:, 3] < 0.8 * page_w * page_h)  # not the scanner's page edge
    # Words smeared into lines: long lines are body text or captions and never join a figure.
    small_mask = closed.copy()
    for x, y, w, h in boxes[is_seed].astype(int):
        small_mask[y:y + h, x:x + w] = 0
    smeared = cv2.dilate(small_mask, cv2.getStructuringElement(cv2.MORPH_RECT, (int(WORD_SMEAR_PT), 1)))
    text_lines = _boxes(smeared)
    joinable = text_lines[text_lines[:, 2] < TEXT_LINE_MIN_PT] if len(text_lines) else text_lines
    # words and numbers: text-high and wider than high (plot markers are small squares)
    wordlike = joinable[(joinable[:, 3] >= 4) & (joinable[:, 3] <= 16) & (joinable[:, 2] >= 1.5 * joinable[:, 3])] \
        if len(joinable) else joinable
    seeds = [box for box in boxes[is_seed] if not _is_ruled_table(closed, box, wordlike)]
    figures = [[x, y, x + w, y + h] for x, y, w, h in seeds]
    for _ in range(3):
        grown = False
        for figure in figures:
            for x, y, w, h in joinable:
                if x >= figure[0] and y >= figure[1] and x + w <= figure[2] and y + h <= figure[3]:
                    continue
                if x <= figure[2] + JOIN_GAP_PT and x + w >= figure[0] - JOIN_GAP_PT and \
                        y <= figure[3] + JOIN_GAP_PT and y + h >= figure[1] - JOIN_GAP_PT:
                    figure[:] = [min(figure[0], x), min(figure[1], y), max(figure[2], x + w), max(figure[3], y + h)]
                    grown = True
        figures = _merge_overlapping(figures)
        if not grown:
            break
    to_points = 72.0 / WORK_DPI
    return [tuple(float(v) * to_points for v in f) for f in figures
            if min(f[2] - f[0], f[3] - f[1]) * to_points >= min_size_pt]


def _merge_overlapping(boxes: list[list[float]]) -> list[list[float]]:
    merged = True
    while merged:
        merged = False
        for i in range(len(boxes)):
            for j in range(i + 1, len(boxes)):
                a, b = boxes[i], boxes[j]
                if a[0] < b[2] and b[0] < a[2] and a[1] < b[3] and b[1] < a[3]:
                    boxes[i] = [min(a[0], b[0]), min(a[1], b[1]), max(a[2], b[2]), max(a[3], b[3])]
                    del boxes[j]
                    merged = True
                    break
            if merged:
                break
    return boxes
