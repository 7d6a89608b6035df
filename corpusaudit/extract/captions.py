"""Captions: the "Figure 3." text block just below, above or beside a figure."""

from __future__ import annotations

import re
from dataclasses import dataclass

from corpusaudit.model import BBox


@dataclass(frozen=True)
class TextBlock:
    bbox: BBox
    text: str


@dataclass(frozen=True)
class Caption:
    text: str
    number: str
    bbox: BBox


def _overlap(a0: float, a1: float, b0: float, b1: float) -> float:
    return max(0.0, min(a1, b1) - max(a0, b0))


def find_caption(figure_box: BBox, blocks: list[TextBlock], pattern: re.Pattern, gap: float) -> Caption | None:
    """The nearest caption block below, above or beside the figure, or None."""
    x0, y0, x1, y1 = figure_box
    best: tuple[float, Caption] | None = None
    for block in blocks:
        match = pattern.match(block.text)
        if not match:
            continue
        bx0, by0, bx1, by1 = block.bbox
        horizontal = _overlap(x0, x1, bx0, bx1) / max(min(x1 - x0, bx1 - bx0), 1e-6)
        vertical = _overlap(y0, y1, by0, by1) / max(min(y1 - y0, by1 - by0), 1e-6)
        if horizontal > 0.3 and -2 <= by0 - y1 <= gap:
            distance = by0 - y1  # below: the usual place
        elif horizontal > 0.3 and -2 <= y0 - by1 <= gap:
            distance = (y0 - by1) + 0.5  # above: tables and some styles
        elif vertical > 0.5 and (-2 <= bx0 - x1 <= gap or -2 <= x0 - bx1 <= gap):
            distance = min(abs(bx0 - x1), abs(x0 - bx1)) + 1.0  # beside: side captions
        else:
            continue
        caption = Caption(" ".join(block.text.split()), match.group(2), block.bbox)
        if best is None or distance < best[0]:
            best = (distance, caption)
    return best[1] if best else None
