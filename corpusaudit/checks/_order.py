"""Order tests shared by the chart checks (sorted values, natural label order)."""

from __future__ import annotations

import re

_CLEAN_LABEL = re.compile(r"[A-Za-z0-9][A-Za-z0-9 .'-]*")


def monotone(values: list[float], tolerance: float) -> bool:
    """Non-increasing or non-decreasing, steps within tolerance counting as ties."""
    steps = [b - a for a, b in zip(values, values[1:])]
    return all(s >= -tolerance for s in steps) or all(s <= tolerance for s in steps)


def cyclic_monotone(values: list[float], tolerance: float) -> bool:
    """Monotone when read round a circle from some starting element, either way."""
    for start in range(len(values)):
        rotated = values[start:] + values[:start]
        if monotone(rotated, tolerance):
            return True
    return False


def clean_label(text: str) -> bool:
    """Looks like a word or number, not text recognition debris such as '=npim' or 'fo}'."""
    return bool(_CLEAN_LABEL.fullmatch(text.strip()))


def labels_at(positions: list[float], ticks, spacing_share: float = 0.4) -> list[str] | None:
    """The tick label nearest each position, or None when one has no label close enough."""
    ticks = list(ticks)
    if len(ticks) < len(positions) or len(positions) < 2:
        return None
    spacing = min(b - a for a, b in zip(positions, positions[1:]))
    labels = []
    for position in positions:
        nearest = min(ticks, key=lambda t: abs(t.pixel - position))
        if abs(nearest.pixel - position) > spacing_share * spacing:
            return None
        labels.append(nearest.text)
    return labels if len(set(labels)) == len(labels) else None


def labels_read_at(positions: list[float], ticks, spacing_share: float = 0.4) -> list[str]:
    """The labels that could be read at the positions, in order, skipping positions without one.

    A label counts only when it is the only one near its position and looks like a word or
    number (text recognition debris such as '=npim' or 'fo}' is left out). A subsequence of
    a sorted or naturally ordered sequence keeps that order, so labels read here that are in
    no natural order prove the full sequence is in none either.
    """
    ticks = list(ticks)
    if len(positions) < 2:
        return []
    spacing = min(b - a for a, b in zip(positions, positions[1:]))
    labels = []
    for position in positions:
        near = [t for t in ticks if abs(t.pixel - position) <= spacing_share * spacing]
        if len(near) == 1 and clean_label(near[0].text):
            labels.append(near[0].text.strip())
    return labels if len(set(labels)) == len(labels) else []
