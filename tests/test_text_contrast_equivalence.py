"""The contrast of stated (vector) text colours, read with one inRange pass and histograms of
the text's box, is to the bit what the float comparison of every pixel with the ink and the
sorted exact colours of the modal bin give."""

from __future__ import annotations

import numpy as np
import pytest

from corpusaudit.measure import appearance, colour


def _reference_modal_colour(samples: np.ndarray) -> np.ndarray:
    bins = colour.colour_bins(samples)
    members = samples[bins == np.bincount(bins).argmax()].astype(np.int32)
    codes = (members[:, 0] << 16) | (members[:, 1] << 8) | members[:, 2]
    values, counts = np.unique(codes, return_counts=True)
    code = int(values[counts.argmax()])
    return np.array([(code >> 16) & 255, (code >> 8) & 255, code & 255]) / 255.0


def _reference_contrast(line: appearance.TextLine, pixels: np.ndarray) -> tuple[float, tuple, tuple] | None:
    samples = appearance._box_patch(pixels, line.bbox, margin=2).reshape(-1, 3)
    if len(samples) < 4:
        return None
    ink = np.asarray(line.colour)
    away = np.abs(samples / 255.0 - ink).max(axis=1) > 0.12
    background = _reference_modal_colour(samples[away] if away.sum() >= 0.2 * len(samples) else samples)
    return float(colour.contrast_ratio(ink, background)), tuple(ink.tolist()), tuple(background.tolist())


@pytest.mark.parametrize("seed", range(60))
def test_vector_contrast_matches_the_per_pixel_reading(seed):
    """Boxes over a figure of a few colours with noise (ties between bins and between exact
    colours), inks on, near and between the figure's levels, some boxes past the edges."""
    rng = np.random.default_rng(seed)
    height, width = int(rng.integers(8, 60)), int(rng.integers(8, 80))
    palette = rng.integers(0, 256, (int(rng.integers(1, 5)), 3))
    pixels = palette[rng.integers(0, len(palette), (height, width))]
    pixels = np.clip(pixels + rng.integers(-12, 13, pixels.shape) * (rng.random((height, width)) < 0.4)[..., None], 0, 255)
    pixels = pixels.astype(np.uint8)
    for _ in range(10):
        x0, y0 = rng.uniform(-4, width), rng.uniform(-4, height)
        box = (x0, y0, x0 + rng.uniform(0, 30), y0 + rng.uniform(0, 20))
        source = palette[int(rng.integers(0, len(palette)))]
        ink = tuple(float(v) for v in np.clip(source / 255.0 + rng.choice([0.0, 0.12, -0.12, 0.5 / 255, 0.3, -0.7, 0.7], 3), -0.5, 1.5))
        line = appearance.TextLine("t", box, 10.0, ink, False, "vector", 10.0)
        found = appearance._vector_contrast(line, pixels)
        expected = _reference_contrast(line, pixels)
        if expected is None:
            assert found is None
        else:
            assert (found.ratio, found.foreground, found.background) == expected
