"""Shared raster helpers of measure/shapes.py against reference computations."""

from __future__ import annotations

import numpy as np
from scipy.spatial.distance import cdist

from corpusaudit.measure.shapes import colour_distance, distinct_colours, nearest_colour


def _chart_like_image() -> np.ndarray:
    """Flat fills, a few strokes and a noisy patch (the colours of an anti-aliased JPEG corner)."""
    rng = np.random.default_rng(11)
    image = np.full((90, 120, 3), 255, np.uint8)
    image[10:60, 10:40] = (31, 119, 180)
    image[30:80, 50:80] = (255, 127, 14)
    image[5:7, :] = (120, 120, 120)
    image[70:90, 90:120] = rng.integers(0, 256, (20, 30, 3), dtype=np.uint8)
    return image


def test_distinct_colours_rebuild_the_image():
    image = _chart_like_image()
    colours, index = distinct_colours(image)
    assert np.array_equal(colours[index.ravel(), 0].reshape(image.shape), image)
    assert len(colours) == len(np.unique(image.reshape(-1, 3), axis=0))


def test_nearest_colour_matches_scipy_euclidean_distances():
    # Reference: scipy.spatial.distance.cdist (Euclidean) in float64 over every pixel.
    image = _chart_like_image()
    colours = [np.array([255.0, 255.0, 255.0]), np.array([30.2, 118.7, 181.0]), np.array([250.0, 130.0, 10.0])]
    closest, distance = nearest_colour(image, colours)
    reference = cdist(image.reshape(-1, 3).astype(np.float64), np.array(colours))
    assert np.array_equal(closest.ravel(), reference.argmin(axis=1))
    assert np.allclose(distance.ravel(), reference.min(axis=1), atol=1e-3)


def test_nearest_colour_equals_per_pixel_distances_exactly():
    # The per-colour table gives the very float32 values of colour_distance over the whole image.
    image = _chart_like_image()
    colours = [np.array([12.5, 200.25, 7.0]), np.array([255.0, 255.0, 255.0])]
    stacked = np.stack([colour_distance(image, colour) for colour in colours])
    closest, distance = nearest_colour(image, colours)
    assert np.array_equal(closest, stacked.argmin(axis=0)) and np.array_equal(distance, stacked.min(axis=0))
