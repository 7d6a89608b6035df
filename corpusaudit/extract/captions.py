"""Captions: the "Figure 3." text just below, above or beside a figure.

A caption starts at a text line matching the caption pattern and runs to the end of its
text block. Captions are assigned page-wide, nearest first, so that each caption goes to
one figure and each figure gets at most one caption.
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


@dataclass(frozen=True)
class Caption:
    text: str
    number: str
    bbox: BBox


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
            captions.append(Caption(text, _number(match), box))
    return captions


def caption_distance(figure_box: BBox, caption: Caption, gap: float) -> float | None:
    """How far the caption sits from the figure (lower is likelier), or None when it is not its caption."""
    x0, y0, x1, y1 = figure_box
    bx0, by0, bx1, by1 = caption.bbox
    horizontal = _overlap(x0, x1, bx0, bx1) / max(min(x1 - x0, bx1 - bx0), 1e-6)
    vertical = _overlap(y0, y1, by0, by1) / max(min(y1 - y0, by1 - by0), 1e-6)
    if horizontal > 0.3 and -3 <= by0 - y1 <= gap:
        return max(by0 - y1, 0.0)  # below: the usual place
    if horizontal > 0.3 and -3 <= y0 - by1 <= gap:
        return max(y0 - by1, 0.0) + gap  # above: some styles; any caption below comes first
    if vertical > 0.3 and (-3 <= bx0 - x1 <= gap or -3 <= x0 - bx1 <= gap):
        return min(abs(bx0 - x1), abs(x0 - bx1)) + 1.0  # beside: side captions
    return None


def assign_captions(figure_boxes: list[BBox], captions: list[Caption], gap: float) -> list[Caption | None]:
    """Nearest pairs first; each caption and each figure used at most once."""
    pairs = []
    for f, box in enumerate(figure_boxes):
        for c, caption in enumerate(captions):
            distance = caption_distance(box, caption, gap)
            if distance is not None:
                pairs.append((distance, f, c))
    assigned: list[Caption | None] = [None] * len(figure_boxes)
    used: set[int] = set()
    for _, f, c in sorted(pairs):
        if assigned[f] is None and c not in used:
            assigned[f] = captions[c]
            used.add(c)
    return assigned
