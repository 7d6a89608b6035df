"""The cheaper steps of measure/glyphs.py give exactly what the general routines they stand in
for give: the grouping of linked glyphs (scipy's connected components), the median and 95th
percentile (numpy's), the labelling and stroke depths read on the box around the ink (the
same read on the whole figure), and the colours of a line read from histograms of its patch
(its pixels gathered and reduced by numpy)."""

from __future__ import annotations

import cv2
import numpy as np
import pytest
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components

from corpusaudit.measure import glyphs
from corpusaudit.measure.colour import colour_bins, modal_bin


@pytest.mark.parametrize("seed", range(40))
def test_union_find_numbers_groups_as_scipy_does(seed):
    rng = np.random.default_rng(seed)
    n = int(rng.integers(1, 300))
    edges = int(rng.integers(0, 2 * n))
    first, second = rng.integers(0, n, edges), rng.integers(0, n, edges)
    graph = coo_matrix((np.ones(edges, dtype=np.int8), (first, second)), shape=(n, n))
    expected = connected_components(graph, directed=False)[1]
    assert np.array_equal(glyphs._union_find(n, first, second), expected)


@pytest.mark.parametrize("seed", range(40))
def test_median_and_quantile_match_numpy(seed):
    rng = np.random.default_rng(seed)
    values = rng.integers(0, 60, int(rng.integers(1, 12))).astype(float) / 4
    assert glyphs._median(values) == float(np.median(values))
    grey = rng.integers(0, 256, int(rng.integers(1, 500))).astype(np.uint8)
    if seed % 2:  # few levels, as in stroke contrast: the histogram path
        grey = (grey // 64 * 40).astype(np.uint8)
    assert glyphs._quantile_95(grey) == float(np.quantile(grey, 0.95))


def _whole_figure_components(contrast, thin):
    """The labels and stroke widths as read on the whole figure."""
    half_peak = cv2.dilate(contrast, np.ones((5, 5), np.uint8)) >> 1
    ink = (cv2.min(contrast, thin) >= glyphs.MIN_CONTRAST) & (contrast >= half_peak)
    _, labels = cv2.connectedComponents(ink.view(np.uint8), connectivity=8)
    depth = cv2.distanceTransform((contrast >= glyphs.MIN_CONTRAST).view(np.uint8), cv2.DIST_C, 3)
    return labels, depth


@pytest.mark.parametrize("seed", range(12))
def test_components_on_the_ink_box_match_the_whole_figure(seed):
    """Marks of random sizes (thin and solid) away from the edges at odd offsets: the box
    read gives the same label image, and each glyph the widest stroke of the whole read."""
    rng = np.random.default_rng(seed)
    grey = np.full((181, 243), 250, np.uint8)
    for _ in range(30):
        x, y = int(rng.integers(15, 220)), int(rng.integers(13, 160))
        w, h = int(rng.integers(1, 14)), int(rng.integers(3, 16))
        grey[y:y + h, x:x + w] = int(rng.integers(0, 200))
    background = glyphs.local_background(grey)
    contrast = cv2.subtract(background, grey)
    thin = cv2.morphologyEx(grey, cv2.MORPH_BLACKHAT, np.ones((glyphs.TOPHAT_PX, glyphs.TOPHAT_PX), np.uint8))
    parts = glyphs._components(contrast, thin, True, 40.0)
    labels, depth = _whole_figure_components(contrast, thin)
    assert np.array_equal(parts.labels, labels)
    for k, label in enumerate(parts.ids):
        widest = min(float(depth[labels == label].max()), glyphs.TOPHAT_PX // 2 + 1)
        assert parts.stroke[k] == 2.0 * widest - 1.0


def _patch_and_mask(rng):
    """A patch of a few colours (so that bins and exact colours tie) with some noise, on a
    strided view as the figure's patches are, and a random mask."""
    height, width = int(rng.integers(3, 30)), int(rng.integers(3, 40))
    palette = rng.integers(0, 256, (int(rng.integers(1, 5)), 3))
    image = palette[rng.integers(0, len(palette), (height + 4, width + 6))]
    image = np.clip(image + rng.integers(-9, 10, image.shape) * (rng.random(image.shape[:2]) < 0.3)[..., None], 0, 255)
    patch = image.astype(np.uint8)[2:-2, 3:-3]
    mask = rng.random((height, width)) < rng.uniform(0.2, 1.0)
    mask.flat[int(rng.integers(0, mask.size))] = True
    return patch, mask


@pytest.mark.parametrize("seed", range(60))
def test_modal_bin_mean_and_medians_match_numpy(seed):
    """The histogram readings of a masked patch against gathering its pixels and using
    colour_bins, bincount's argmax, the mean and np.median."""
    rng = np.random.default_rng(seed)
    patch, mask = _patch_and_mask(rng)
    samples = patch[mask]
    bins = colour_bins(samples)
    counts = np.bincount(bins)
    mode = int(counts.argmax())
    low, count = modal_bin(patch, mask.view(np.uint8))
    assert low == ((mode >> 10) * 8, ((mode >> 5) & 31) * 8, (mode & 31) * 8) and count == counts[mode]
    assert np.array_equal(glyphs._modal(patch, mask.view(np.uint8)), samples[bins == mode].mean(axis=0) / 255.0)
    assert np.array_equal(glyphs._channel_medians(samples), np.median(samples, axis=0))
