"""Image-quality measurements of raster figures: JPEG blocking and ringing, line-art
versus continuous-tone content, and sharpness.

All functions are pure and take numpy arrays: a grey image (HxW uint8) or an RGB image
(HxWx3 uint8; grey is derived with the ITU-R BT.601 luma weights that JPEG uses).

The JPEG grid is assumed to start at the image's top-left pixel, as it does for an image
extracted from a file or a PDF image object; crops or rescaled renderings lose it.
"""

from __future__ import annotations

from dataclasses import dataclass

import cv2
import numpy as np

_BT601_LUMA = np.array([0.299, 0.587, 0.114])  # ITU-R BT.601, JPEG/JFIF's Y
_BLOCK = 8  # JPEG DCT block size (ITU-T T.81)


def to_gray(image: np.ndarray) -> np.ndarray:
    """HxW grey (float64, 0..255) from a grey or an RGB uint8/float image."""
    array = np.asarray(image, dtype=np.float64)
    if array.ndim == 3:
        return array[..., :3] @ _BT601_LUMA
    if array.ndim != 2:
        raise ValueError("expected an HxW grey or HxWx3 RGB image")
    return array


def blockiness(gray: np.ndarray, edge_limit: float = 24.0) -> float:
    """JPEG blocking: how much more isolated small steps fall on 8x8 block boundaries
    than inside blocks.

    An isolated step is a neighbour difference of 1..`edge_limit` grey levels more than
    twice both adjacent differences: a discontinuity in an otherwise smooth run. Block
    coding smooths the inside of each block and leaves such steps on the block grid;
    content (texture, anti-aliased edges, ringing) puts them at every position. The score
    is (summed steps at the boundary position + prior) / (mean summed steps per inside
    position + prior), rows and columns together, with a small prior proportional to the
    image size: about 1.0 without block coding (or with too little signal to tell),
    higher with stronger compression.
    """
    g = to_gray(gray)
    if min(g.shape) < 2 * _BLOCK:
        return 1.0
    per_phase = np.zeros(_BLOCK)
    for axis in (0, 1):
        steps = np.abs(np.diff(g, axis=axis))
        if axis == 0:
            steps = steps.T  # positions run along the last axis from here on
        middle, before, after = steps[:, 1:-1], steps[:, :-2], steps[:, 2:]
        isolated = (middle >= 1.0) & (middle <= edge_limit) & (middle > 2.0 * np.maximum(before, after))
        # Step k lies between pixels k and k+1; k % 8 == 7 is a block boundary.
        phase = (np.arange(middle.shape[1]) + 1) % _BLOCK
        summed = np.where(isolated, middle, 0.0).sum(axis=0)
        per_phase += np.bincount(phase, weights=summed, minlength=_BLOCK)
    # Prior of 0.002 grey levels per position: a few stray steps in a clean chart stay ~1.
    prior = 0.002 * g.size * 2 / _BLOCK
    return float((per_phase[_BLOCK - 1] + prior) / (per_phase[: _BLOCK - 1].mean() + prior))


def _dilate(mask: np.ndarray, radius: int) -> np.ndarray:
    kernel = np.ones((2 * radius + 1, 2 * radius + 1), dtype=np.uint8)
    return cv2.dilate(mask.astype(np.uint8), kernel) > 0


def _laplacian(g: np.ndarray) -> np.ndarray:
    """4-neighbour Laplacian with edge replication (the [1, -2, 1] stencil on each axis)."""
    padded = np.pad(g, 1, mode="edge")
    return (
        padded[:-2, 1:-1] + padded[2:, 1:-1] + padded[1:-1, :-2] + padded[1:-1, 2:] - 4.0 * g
    )


def ringing(gray: np.ndarray, edge_threshold: float = 48.0, oscillation_limit: float = 24.0) -> float:
    """Mosquito noise: mean |Laplacian| (grey levels) of the near-flat pixels 2..5 px from
    strong edges (neighbour step > `edge_threshold`). A clean rendering is flat beside its
    edges (0.0); lossy coding leaves small ripples there. Pixels with |Laplacian| above
    `oscillation_limit` are texture or other edges and are left out. 0.0 when the image
    has no strong edge.
    """
    g = to_gray(gray)
    step = np.zeros_like(g)
    step[:, 1:] = np.abs(np.diff(g, axis=1))
    step[1:, :] = np.maximum(step[1:, :], np.abs(np.diff(g, axis=0)))
    edges = step > edge_threshold
    if not edges.any():
        return 0.0
    zone = _dilate(edges, 5) & ~_dilate(edges, 2)
    response = np.abs(_laplacian(g))[zone]
    response = response[response <= oscillation_limit]
    return float(response.mean()) if response.size else 0.0


def line_art_score(rgb: np.ndarray) -> float:
    """0..1, high for line art (charts, diagrams, text) and low for continuous tone.

    The mean of two fractions: pixels whose colour is one of the 16 most frequent colours
    (16 levels per channel, so JPEG noise stays in its bin), and flat pixels (both
    neighbour steps <= 2 grey levels). Charts have few colours over large flat areas;
    photographs spread over thousands of colours with texture and noise everywhere.
    """
    array = np.asarray(rgb)
    if array.ndim == 2:
        array = np.repeat(array[..., None], 3, axis=2)
    return _line_art_score(array, to_gray(array))


def _line_art_score(array: np.ndarray, gray: np.ndarray) -> float:
    return float(0.5 * _top_colour_share(array) + 0.5 * _flat_share(gray))


def _top_colour_share(array: np.ndarray) -> float:
    """Share of the pixels in the 16 fullest of 16 x 16 x 16 colour bins."""
    if array.dtype == np.uint8 and array.shape[2] == 3 and array.size // 3 < 2**24:
        # OpenCV's histogram (float32 counts: exact below 2**24 pixels) in one pass; with
        # uniform bins over 0..256 its bin is the value's top four bits, as below
        counts = cv2.calcHist([np.ascontiguousarray(array)], [0, 1, 2], None, [16, 16, 16], [0, 256] * 3)
        counts = counts.ravel().astype(np.int64)
    else:
        quantised = (array[..., :3].astype(np.uint8) >> 4).astype(np.int32)
        index = (quantised[..., 0] << 8) | (quantised[..., 1] << 4) | quantised[..., 2]
        counts = np.bincount(index.ravel(), minlength=4096)
    return float(np.partition(counts, -16)[-16:].sum() / (array.size // array.shape[2]))


def _flat_share(gray: np.ndarray) -> float:
    """Share of the pixels whose steps to the left and upper neighbours are both <= 2 grey levels."""
    flat = np.ones(gray.shape, dtype=bool)
    flat[:, 1:] = cv2.absdiff(gray[:, 1:], gray[:, :-1]) <= 2.0
    flat[1:, :] &= cv2.absdiff(gray[1:, :], gray[:-1, :]) <= 2.0
    return np.count_nonzero(flat) / flat.size


def is_line_art(rgb: np.ndarray, threshold: float = 0.6) -> bool:
    """line_art_score(rgb) >= threshold (common practice, tuned on charts vs photographs)."""
    return line_art_score(rgb) >= threshold


def laplacian_variance(gray: np.ndarray) -> float:
    """Variance of the 4-neighbour Laplacian (Pech-Pacheco et al. 2000 focus measure)."""
    return float(_laplacian(to_gray(gray)).var())


def sharpness(gray: np.ndarray) -> float:
    """Blur estimate: variance of the Laplacian divided by the image's grey variance.

    Dividing by the variance makes the number independent of contrast, so a faint but
    sharp figure is not called blurred. Falls as blur grows; 0.0 for a flat image.
    """
    g = to_gray(gray)
    variance = g.var()
    if variance < 1e-9:
        return 0.0
    return float(_laplacian(g).var() / variance)


@dataclass(frozen=True)
class ArtefactReport:
    """Lossy-compression evidence for one raster image.

    blockiness: see blockiness() (~1 clean). ringing: see ringing() (grey levels, 0 clean).
    line_art_score: see line_art_score() (0..1). lossy_likely: block edges show, or the
    image is line art with ripples beside its edges.
    """

    blockiness: float
    ringing: float
    line_art_score: float
    lossy_likely: bool


def compression_artefacts(
    rgb: np.ndarray,
    *,
    blockiness_limit: float = 1.3,
    ringing_limit: float = 0.5,
    line_art_threshold: float = 0.6,
) -> ArtefactReport:
    """Blocking, ringing and line-art score of an image, with a lossy verdict.

    Ringing only counts on line art: in a photograph texture beside edges looks alike.
    Limits are common practice, set on charts saved as PNG and as JPEG at quality 30..95.
    """
    gray = to_gray(rgb)
    block = blockiness(gray)
    ripple = ringing(gray)
    array = np.asarray(rgb)
    score = _line_art_score(array, gray) if array.ndim == 3 else line_art_score(array)  # the grey once
    lossy = block >= blockiness_limit or (score >= line_art_threshold and ripple >= ringing_limit)
    return ArtefactReport(blockiness=block, ringing=ripple, line_art_score=score, lossy_likely=bool(lossy))
