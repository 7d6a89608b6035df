"""Order tests shared by the chart checks (sorted values, natural label order)."""

from __future__ import annotations


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
