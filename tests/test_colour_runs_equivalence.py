"""The palette's run-length and OpenCV helpers (measure/colour.py) against direct per-pixel
numpy readings of the same definitions: a 15-bit colour bin of the top five bits of each
channel, the mask's 4-neighbour boundary, interior pixels whose four neighbours share their
label, and counts of 4-neighbour pixel pairs between labels."""

from __future__ import annotations

import numpy as np
import pytest

from corpusaudit.measure import colour


def _chart_like(seed: int) -> np.ndarray:
    """Flat fills, thin strokes, a label-sized noisy patch and odd dimensions."""
    rng = np.random.default_rng(seed)
    image = np.full((67, 93, 3), 250, np.uint8)
    image[8:50, 5:30] = (31, 119, 180)
    image[20:60, 40:71] = (255, 127, 14)
    image[3, :] = (90, 90, 90)
    image[:, 85] = (44, 160, 44)
    image[50:67, 75:93] = rng.integers(0, 256, (17, 18, 3), dtype=np.uint8)
    return image


def _reference_bins(rgb: np.ndarray) -> np.ndarray:
    q = (rgb >> 3).astype(np.int64)
    return (q[..., 0] << 10) | (q[..., 1] << 5) | q[..., 2]


def _reference_interior(labels: np.ndarray) -> np.ndarray:
    interior = np.zeros(labels.shape, dtype=bool)
    core = labels[1:-1, 1:-1]
    interior[1:-1, 1:-1] = (
        (core >= 0)
        & (core == labels[:-2, 1:-1])
        & (core == labels[2:, 1:-1])
        & (core == labels[1:-1, :-2])
        & (core == labels[1:-1, 2:])
    )
    return interior


def _reference_adjacency(labels: np.ndarray, n_labels: int) -> np.ndarray:
    counts = np.zeros((n_labels, n_labels))
    height, width = labels.shape
    for y in range(height):
        for x in range(width):
            for ny, nx in ((y, x + 1), (y + 1, x)):
                if ny < height and nx < width:
                    a, b = labels[y, x], labels[ny, nx]
                    if a >= 0 and b >= 0 and a != b:
                        counts[a, b] += 1
    return counts + counts.T


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_colour_bins_equal_the_top_five_bits_of_each_channel(seed):
    image = np.random.default_rng(seed).integers(0, 256, (31, 47, 3), dtype=np.uint8)
    assert np.array_equal(colour.colour_bins(image), _reference_bins(image))
    assert np.array_equal(colour.colour_bins(image[5]), _reference_bins(image[5]))  # a k x 3 list
    assert np.array_equal(colour.colour_bins(image[:, ::2]), _reference_bins(image[:, ::2]))  # a strided view
    assert colour.colour_bins(image[:0]).shape == (0, 47)


def test_border_pixels_are_mask_pixels_with_a_neighbour_outside():
    image = _chart_like(3)
    mask = np.zeros(image.shape[:2], dtype=bool)
    mask[0:40, 0:60] = True  # touches the image edge
    mask[45:60, 20:90] = True
    mask[10:20, 10:20] = False  # a hole
    padded = np.pad(mask, 1)
    inner = padded[1:-1, 1:-1] & padded[:-2, 1:-1] & padded[2:, 1:-1] & padded[1:-1, :-2] & padded[1:-1, 2:]
    assert np.array_equal(colour._border_pixels(image, mask), image[mask & ~inner])


@pytest.mark.parametrize("seed", [4, 5])
def test_runs_rebuild_the_image_and_its_mask(seed):
    image = _chart_like(seed)
    mask = np.random.default_rng(seed).random(image.shape[:2]) > 0.2
    runs = colour._colour_runs(image, mask)
    assert runs.lengths.sum() == mask.size
    assert np.array_equal(np.repeat(runs.rgb, runs.lengths, axis=0).reshape(image.shape), image)
    assert np.array_equal(np.repeat(runs.inside, runs.lengths).reshape(mask.shape), mask)
    assert np.all(np.isin(np.arange(0, mask.size, image.shape[1]), runs.starts))  # every row starts a run


@pytest.mark.parametrize("seed", [6, 7])
def test_interior_and_adjacency_equal_per_pixel_counts(seed):
    image = _chart_like(seed)
    mask = np.ones(image.shape[:2], dtype=bool)
    mask[30:40, :] = False  # unlabelled pixels (label -1) are never interior nor counted
    runs = colour._colour_runs(image, mask)
    # Labels constant along runs, as the palette assigns them: a label per colour bin.
    n_labels = 5
    run_labels = np.where(runs.inside, colour.colour_bins(runs.rgb) % n_labels, -1).astype(np.int16)
    labels = np.repeat(run_labels, runs.lengths).reshape(mask.shape)
    assert np.array_equal(colour._interior(labels).astype(bool), _reference_interior(labels))
    assert np.array_equal(colour._adjacency(labels, runs, run_labels, n_labels), _reference_adjacency(labels, n_labels))
