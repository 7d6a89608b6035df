"""Deterministic training-data generator for the chart-type classifier.

render(label, seed) draws one labelled figure; the same (label, seed) always gives the same
pixels. Each chart is drawn by matplotlib or by Pillow/OpenCV primitives (chosen by the seed),
then degraded the way figures in real corpora are (JPEG, downscaling, blur, grey, scan noise,
slight rotation). samples(samples_per_class, seed) walks the whole set for one numeric seed.
"""

from __future__ import annotations

from collections.abc import Iterator

import numpy as np

from ...model import CHART_TYPES
from . import common, mpl_charts, not_chart, pil_charts

MATPLOTLIB_SHARE = 0.55  # the rest is drawn with Pillow/OpenCV


def render(label: str, seed: int) -> np.ndarray:
    """One figure of chart type `label` as HxWx3 uint8, fixed by `seed`."""
    if label not in CHART_TYPES:
        raise ValueError(f"unknown chart type {label!r}; expected one of {', '.join(CHART_TYPES)}")
    rng = np.random.default_rng([CHART_TYPES.index(label), seed])
    if label == "not_chart":
        rgb = not_chart.render(rng)
    elif rng.random() < MATPLOTLIB_SHARE:
        rgb = mpl_charts.render(label, rng)
    else:
        rgb = pil_charts.render(label, rng)
    return common.augment(rgb, rng)


def sample_seeds(samples_per_class: int, seed: int) -> Iterator[tuple[str, int]]:
    """(label, per-figure seed) pairs for a data set fixed by one numeric seed."""
    for i in range(samples_per_class):
        for label in CHART_TYPES:
            yield label, seed * 1_000_003 + i


def samples(samples_per_class: int, seed: int) -> Iterator[tuple[str, np.ndarray]]:
    for label, figure_seed in sample_seeds(samples_per_class, seed):
        yield label, render(label, figure_seed)
