"""Captions: the "Figure 3." text just below, above or beside a figure.

A caption starts at a text line matching the caption pattern and runs to the end of its
text block. Captions are assigned page-wide, nearest first, so that each caption goes to
one figure and each figure gets at most one caption. Below, above and beside are judged in
the caption's own reading frame (its text running left to right), so that a page laid out
upright and then given a /Rotate, or a landscape table turned on a portrait page, still
finds its captions below its figures.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from corpusaudit.model import BBox

CAPTION_PUNCTUATION = ".:-\u2013\u2014"
MAX_CAPTION_CHARS = 600


@dataclass(frozen=True)
class TextLine:
    """One line of the page's text layer, in unrotated page points."""

    bbox: BBox
    text: str
    block: int  # index of its text block on the page
    first_in_block: bool
    size: float  # largest font size on the line (pt)
    direction: tuple[float, float] = (1.0, 0.0)  # writing direction (cos, sin), y downwards


@dataclass(frozen=True)
class Caption:
    text: str
    number: str
    bbox: BBox
    direction: tuple[float, float] = (1.0, 0.0)  # of its first line, in the same coordinates as bbox


def upright(direction: tuple[float, float]) -> tuple[int, int]:
    """The writing direction snapped to the nearest quarter turn."""
    dx, dy = direction
    return (1 if dx > 0 else -1, 0) if abs(dx) >= abs(dy) else (0, 1 if dy > 0 else -1)


def in_reading_frame(box: BBox, direction: tuple[int, int]) -> BBox:
    """box turned so that text written along direction runs left to right (x' along it, y' below it)."""
    dx, dy = direction
    xs = [dx * x + dy * y for x in (box[0], box[2]) for y in (box[1], box[3])]
    ys = [-dy * x + dx * y for x in (box[0], box[2]) for y in (box[1], box[3])]
    return (min(xs), min(ys), max(xs), max(ys))


def _overlap(a0: float, a1: float, b0: float, b1: float) -> float:
    return max(0.0, min(a1, b1) - max(a0, b0))


def _number(match: re.Match) -> str:
    if "number" in match.re.groupindex:
        return match.group("number") or ""
    groups = [g for g in match.groups() if g]
    return groups[1] if len(groups) > 1 else (groups[-1] if groups else "")


def _punctuated(match: re.Match) -> bool:
    return match.group(0).rstrip()[-1:] in CAPTION_PUNCTUATION


def caption_candidates(lines: list[TextLine], pattern: re.Pattern) -> list[Caption]:
    """Caption blocks: from a matching line to the end of its block.

    A matching line inside a block counts only when the match ends with punctuation
    ("Figure 3." / "Fig. 3:"), so a sentence starting "Figure 3 shows" mid-paragraph is not one.
    """
    captions: list[Caption] = []
    by_block: dict[int, list[TextLine]] = {}
    for line in lines:
        by_block.setdefault(line.block, []).append(line)
    for block_lines in by_block.values():
        position = 0
        while position < len(block_lines):
            line = block_lines[position]
            match = pattern.match(line.text)
            position += 1
            if not match or not (line.first_in_block or _punctuated(match)):
                continue
            tail = [line]
            while position < len(block_lines):
                following = pattern.match(block_lines[position].text)
                if following and _punctuated(following):
                    break  # a second caption stacked in the same block starts here
                tail.append(block_lines[position])
                position += 1
            text = " ".join(" ".join(t.text for t in tail).split())[:MAX_CAPTION_CHARS]
            box = (min(t.bbox[0] for t in tail), min(t.bbox[1] for t in tail),
                   max(t.bbox[2] for t in tail), max(t.bbox[3] for t in tail))
            captions.append(Caption(text, _number(match), box, line.direction))
    return captions


def caption_distance(figure_box: BBox, caption: Caption, gap: float,
                     obstacles: list[BBox] | None = None) -> float | None:
    """How far the caption sits from the figure (lower is likelier), or None when it is not its caption.

    Below comes first, then above, then beside: a caption above one figure and level with
    another in the next column is the caption of the one it is above. A caption up to twice
    gap below or above still counts when nothing on the page (obstacles: other text lines
    and figures; None when the page's content is not known) lies between it and the figure:
    a chart drawn on a larger blank canvas leaves that much white around its ink. Such far
    captions come after every near one."""
    frame = upright(caption.direction)
    x0, y0, x1, y1 = in_reading_frame(figure_box, frame)
    bx0, by0, bx1, by1 = in_reading_frame(caption.bbox, frame)
    horizontal = _overlap(x0, x1, bx0, bx1) / max(min(x1 - x0, bx1 - bx0), 1e-6)
    vertical = _overlap(y0, y1, by0, by1) / max(min(y1 - y0, by1 - by0), 1e-6)
    if horizontal > 0.3 and -3 <= by0 - y1 <= gap:
        return max(by0 - y1, 0.0)  # below: the usual place
    if horizontal > 0.3 and -3 <= y0 - by1 <= gap:
        return max(y0 - by1, 0.0) + gap  # above: some styles
    if vertical > 0.3 and (-3 <= bx0 - x1 <= gap or -3 <= x0 - bx1 <= gap):
        return min(abs(bx0 - x1), abs(x0 - bx1)) + 2 * gap  # beside: side captions
    if horizontal <= 0.3 or obstacles is None:
        return None
    lane = (max(x0, bx0), min(x1, bx1))
    if gap < by0 - y1 <= 2 * gap and _clear(lane, (y1, by0), obstacles, frame):
        return by0 - y1 + 2 * gap
    if gap < y0 - by1 <= 2 * gap and _clear(lane, (by1, y0), obstacles, frame):
        return y0 - by1 + 3 * gap
    return None


def _clear(lane: tuple[float, float], span: tuple[float, float], obstacles: list[BBox],
           frame: tuple[int, int]) -> bool:
    """Nothing in the strip between a figure and a caption (reading-frame coordinates)."""
    for box in obstacles:
        ox0, oy0, ox1, oy1 = in_reading_frame(box, frame)
        if ox0 < lane[1] - 0.5 and ox1 > lane[0] + 0.5 and oy0 < span[1] - 0.5 and oy1 > span[0] + 0.5:
            return False
    return True


def assign_captions(figure_boxes: list[BBox], captions: list[Caption], gap: float,
                    text_boxes: list[BBox] | None = None) -> list[Caption | None]:
    """Nearest pairs first; each caption and each figure used at most once.

    text_boxes: the page's text lines (same coordinates), to tell when a far caption has nothing
    between it and its figure; None where the page's text is not known (a scan without OCR)."""
    pairs = []
    for f, box in enumerate(figure_boxes):
        obstacles = None if text_boxes is None else text_boxes + figure_boxes[:f] + figure_boxes[f + 1:]
        for c, caption in enumerate(captions):
            distance = caption_distance(box, caption, gap, obstacles)
            if distance is not None:
                pairs.append((distance, f, c))
    assigned: list[Caption | None] = [None] * len(figure_boxes)
    used: set[int] = set()
    for _, f, c in sorted(pairs):
        if assigned[f] is None and c not in used:
            assigned[f] = captions[c]
            used.add(c)
    return assigned
