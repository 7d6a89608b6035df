"""The classifier's features take shortcuts (OpenCV histograms, lookup tables, plain float32
arithmetic in place of numpy's float remainder); each is compared here with the straightforward
computation it replaces, over every input the features can give it or over generated images.
The model's predictions depend on the features bit for bit, so equality is exact."""

from __future__ import annotations

import cv2
import numpy as np
import pytest

from corpusaudit.classify import features


def _sobel_gradients(limit: int) -> tuple[np.ndarray, np.ndarray]:
    """Every (gx, gy) pair of integers in [-limit, limit], as float32 like cv2.Sobel's output."""
    steps = np.arange(-limit, limit + 1, dtype=np.float32)
    gx, gy = np.meshgrid(steps, steps)
    return gx, gy


def _images(count: int) -> list[np.ndarray]:
    rng = np.random.default_rng(7)
    out = []
    for k in range(count):
        h, w = int(rng.integers(20, 200)), int(rng.integers(20, 200))
        img = np.full((h, w, 3), 255 if k % 3 else 30, np.uint8)
        for _ in range(int(rng.integers(1, 12))):  # filled boxes, thin rules, noise: flat and busy areas
            y, x = int(rng.integers(0, h)), int(rng.integers(0, w))
            img[y:y + int(rng.integers(1, h)), x:x + int(rng.integers(1, w))] = rng.integers(0, 256, 3)
        if k % 4 == 0:
            img = np.where(rng.random((h, w, 1)) < 0.1, rng.integers(0, 256, (h, w, 3)), img).astype(np.uint8)
        out.append(img)
    return out


def test_magnitude_of_integer_gradients_is_hypot():
    gx, gy = _sobel_gradients(1020)  # a 3x3 Sobel of 8-bit pixels stays within 4 * 255
    assert np.array_equal(np.sqrt(gx * gx + gy * gy), np.hypot(gx, gy))


@pytest.mark.parametrize("width", [10, 30])
def test_orientation_bins_match_remainder_and_floor_division(width):
    gx, gy = _sobel_gradients(1020)
    deg = np.degrees(np.arctan2(gy, gx)).ravel()
    # and the float32 neighbours of every bin edge, where rounding would show
    edges = np.arange(-180, 181, width, dtype=np.float32)
    near = edges[:, None].view(np.int32) + np.arange(-3000, 3001, dtype=np.int32)[None, :]
    near = near.view(np.float32).ravel()
    near = np.concatenate([near, -near, np.float32([0.0, -0.0, 180.0, -180.0])])
    for angles in (deg, near[np.abs(near) <= 180]):
        expected = ((angles % 180.0) // width).astype(np.int32) % (180 // width)
        assert np.array_equal(features._orientation_bins(angles, width), expected)


def _reference_hog(thumb: np.ndarray) -> np.ndarray:
    t = thumb.astype(np.float32)
    gx = cv2.Sobel(t, cv2.CV_32F, 1, 0, ksize=1)
    gy = cv2.Sobel(t, cv2.CV_32F, 0, 1, ksize=1)
    mag = np.hypot(gx, gy)
    bins = ((np.degrees(np.arctan2(gy, gx)) % 180.0) / (180.0 / features.HOG_BINS)).astype(np.int32)
    bins %= features.HOG_BINS
    n = t.shape[0] // features.HOG_CELL
    cell = np.arange(t.shape[0]) // features.HOG_CELL
    index = (cell[:, None] * n + cell[None, :]) * features.HOG_BINS + bins
    hist = np.bincount(index.ravel(), weights=mag.ravel(), minlength=n * n * features.HOG_BINS)
    hist = hist.reshape(n, n, features.HOG_BINS)
    blocks = np.concatenate([hist[:-1, :-1], hist[1:, :-1], hist[:-1, 1:], hist[1:, 1:]], axis=2)
    blocks = blocks / (np.linalg.norm(blocks, axis=2, keepdims=True) + 1e-6)
    blocks = np.minimum(blocks, 0.2)
    blocks = blocks / (np.linalg.norm(blocks, axis=2, keepdims=True) + 1e-6)
    return blocks.ravel()


def test_hog_matches_direct_arctangent():
    rng = np.random.default_rng(3)
    ramp = np.add.outer(np.arange(64), np.arange(64)).astype(np.uint8) * 2
    thumbs = [rng.integers(0, 256, (64, 64), dtype=np.uint8), ramp, np.full((64, 64), 128, np.uint8),
              np.kron(rng.integers(0, 2, (8, 8)), np.ones((8, 8))).astype(np.uint8) * 255]
    thumbs += [cv2.resize(cv2.cvtColor(img, cv2.COLOR_RGB2GRAY), (64, 64), interpolation=cv2.INTER_AREA)
               for img in _images(20)]
    for thumb in thumbs:
        assert np.array_equal(features._hog(thumb), _reference_hog(thumb))


def test_saturation_and_value_bounds_match_the_float_thresholds():
    s, v = np.meshgrid(np.arange(256, dtype=np.uint8), np.arange(256, dtype=np.uint8))
    hsv = np.dstack([np.zeros_like(s), s, v])
    expected = (hsv[..., 1] / 255.0 > 0.25) & (hsv[..., 2] / 255.0 > 0.2)
    assert np.array_equal(cv2.inRange(hsv, (0, 64, 52), (255, 255, 255)) > 0, expected)


def test_background_matches_mean_of_mode_colour():
    for img in _images(30):
        border = np.concatenate([img[:2].reshape(-1, 3), img[-2:].reshape(-1, 3),
                                 img[:, :2].reshape(-1, 3), img[:, -2:].reshape(-1, 3)])
        q = (border // 16).astype(np.int32)
        codes = q[:, 0] * 256 + q[:, 1] * 16 + q[:, 2]
        assert np.array_equal(features._background(img), border[codes == np.bincount(codes).argmax()].mean(0))


def test_histograms_match_bincount():
    rng = np.random.default_rng(5)
    for img in _images(20):
        mask = rng.random(img.shape[:2]) < 0.3
        q = (img // 32).astype(np.int32)
        codes = (q[..., 0] * 64 + q[..., 1] * 8 + q[..., 2])[mask]
        assert np.array_equal(features._colour_counts(img, mask.view(np.uint8)), np.bincount(codes, minlength=512))
        grey = cv2.cvtColor(img, cv2.COLOR_RGB2GRAY)
        assert np.array_equal(features._count_hist(grey, mask.view(np.uint8), 8, 256),
                              np.bincount(grey[mask] // 32, minlength=8))
        hue = cv2.cvtColor(img, cv2.COLOR_RGB2HSV)[..., 0].copy()
        assert np.array_equal(features._count_hist(hue, mask.view(np.uint8), 180, 180).reshape(6, 30).sum(1),
                              np.bincount((hue[mask].astype(np.int32) * 6) // 180, minlength=6)[:6])


def test_coordinates_match_nonzero():
    rng = np.random.default_rng(11)
    for share in (0.0, 0.001, 0.3, 1.0):
        mask = rng.random((57, 91)) < share
        xs, ys = features._coordinates(mask.view(np.uint8))
        ref_y, ref_x = np.nonzero(mask)
        assert np.array_equal(xs, ref_x) and np.array_equal(ys, ref_y)


def _reference_profile_steps(mask: np.ndarray) -> list[float]:
    cols = mask.any(0)
    if cols.sum() < 4:
        return [0.0, 0.0, 0.0]
    top = np.where(cols, mask.argmax(0), -1)[cols].astype(np.float32)
    d = np.abs(np.diff(top))
    return [float((d == 0).mean()), float((d > 2).mean()), float(((d > 0) & (d <= 2)).mean())]


def test_profile_steps_from_the_top_and_the_side():
    rng = np.random.default_rng(13)
    for k in range(40):
        mask = rng.random((int(rng.integers(3, 60)), int(rng.integers(3, 60)))) < (0.02 * k)
        assert features._profile_steps(mask.any(0), mask.argmax(0)) == _reference_profile_steps(mask)
        assert (features._profile_steps(mask.any(1)[::-1], mask.argmax(1)[::-1])
                == _reference_profile_steps(mask.T[:, ::-1]))


def test_names_and_values_line_up():
    names = features.feature_names()
    assert len(names) == len(set(names))
    for img in _images(3):
        assert features.extract(img).shape == (len(names),)
