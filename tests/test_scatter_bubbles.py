"""Bubble charts: markers sized by a variable are not clumps of small markers.

Reference renderer: matplotlib scatter with per-point sizes (area in points squared), laid
out on a grid so that no two markers touch: nothing is hidden, whatever the sizes.
"""

from __future__ import annotations

import numpy as np

from corpusaudit.checks.cases import Case, raster_figure
from corpusaudit.measure import Measurements


def _bubbles(fig):
    ax = fig.add_subplot()
    xs, ys = np.meshgrid(np.arange(6), np.arange(4))
    sizes = np.resize([20, 60, 140, 260, 420, 600], xs.size)  # areas over a 30-fold range
    ax.scatter(xs.ravel(), ys.ravel(), s=sizes, color="#3a7fb8")
    ax.set_xlim(-0.8, 5.8)
    ax.set_ylim(-0.8, 3.8)


def test_separate_bubbles_hide_nothing():
    markers = Measurements(raster_figure(Case("bubbles", "scatter", _bubbles, {}))).get("markers")
    assert markers.hidden_share < 0.05
    assert markers.count == 24
