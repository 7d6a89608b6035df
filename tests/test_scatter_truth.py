"""The chart-rule benchmark's truth for scatter-overplotting is the hidden share of what was
drawn (markers' data positions and size through the laid-out axes), checked here against the
circle-circle intersection area (the lens formula, e.g. Weisstein, "Circle-Circle
Intersection", MathWorld)."""

from __future__ import annotations

import math
from types import SimpleNamespace

import numpy as np
import pytest

from corpusaudit.checks import cases
from corpusaudit.checks.registry import all_rules


class _PixelAxes:
    """Axes whose data coordinates are display pixels, 400 x 300 px."""

    transData = SimpleNamespace(transform=lambda points: np.asarray(points, float))

    @staticmethod
    def get_window_extent():
        return SimpleNamespace(x0=0.0, y0=0.0, width=400.0, height=300.0)


def _lens(r: float, d: float) -> float:
    return 2 * r * r * math.acos(d / (2 * r)) - d / 2 * math.sqrt(4 * r * r - d * d)


@pytest.mark.parametrize("distance", [10.0, 40.0, 70.0])
def test_two_overlapping_markers_hide_the_lens(distance):
    r = 40.0
    expected = _lens(r, distance) / (2 * math.pi * r * r)
    measured = cases.hidden_share(_PixelAxes(), np.array([[150.0, 150.0], [150.0 + distance, 150.0]]), r)
    assert measured == pytest.approx(expected, abs=0.01)


def test_apart_markers_hide_nothing_and_a_stack_hides_all_but_one():
    points = np.array([[50.0, 50.0], [150.0, 50.0], [250.0, 50.0]])
    assert cases.hidden_share(_PixelAxes(), points, 20.0) == 0.0
    assert cases.hidden_share(_PixelAxes(), np.full((5, 2), 150.0), 20.0) == pytest.approx(0.8)


def test_truth_threshold_is_the_rule_default():
    rule = next(r for r in all_rules() if r.id == "scatter-overplotting")
    assert rule.options[0].key == "max_hidden_share" and rule.options[0].default == cases._OVERPLOTTING_LIMIT


def test_every_scatter_case_has_a_drawn_overplotting_truth():
    scatters = [c for c in cases.generate(60, 20240517) if c.chart_type == "scatter"]
    assert scatters and all(isinstance(c.truth["scatter-overplotting"], bool) for c in scatters)
