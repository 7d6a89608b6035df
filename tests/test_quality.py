"""Tests of corpusaudit.measure.quality on drawn charts and reference photographs."""

from __future__ import annotations

import io

import numpy as np
import pytest
import scipy.ndimage
import skimage.data
from PIL import Image, ImageDraw

from corpusaudit.measure import quality as qm

BAR_COLOURS = ["#1f77b4", "#ff7f0e", "#2ca02c", "#d62728", "#9467bd", "#8c564b"]


def drawn_chart(width: int = 640, height: int = 480) -> np.ndarray:
    """A bar chart with axes, ticks, labels, grid lines and a line series (invented data)."""
    image = Image.new("RGB", (width, height), "white")
    draw = ImageDraw.Draw(image)
    base = height - 50
    for y in range(base, 20, -50):
        draw.line([(60, y), (width - 20, y)], fill="#dddddd")
        draw.line([(55, y), (60, y)], fill="black")
        draw.text((22, y - 6), str(base - y), fill="black")
    values = [300, 220, 340, 150, 260, 190]
    for i, value in enumerate(values):
        x = 75 + i * 93
        draw.rectangle([x, base - value, x + 61, base - 1], fill=BAR_COLOURS[i])
        draw.text((x + 12, base + 10), f"Group {i + 1}", fill="black")
    draw.line([(75 + i * 93 + 30, base - v - 20) for i, v in enumerate(values)], fill="#333333", width=3)
    draw.line([(60, 20), (60, base), (width - 20, base)], fill="black", width=2)
    draw.text((250, 5), "Invented totals by group", fill="black")
    return np.asarray(image)


def jpeg_round_trip(pixels: np.ndarray, quality: int) -> np.ndarray:
    buffer = io.BytesIO()
    Image.fromarray(pixels).save(buffer, "JPEG", quality=quality)
    return np.asarray(Image.open(io.BytesIO(buffer.getvalue())).convert("RGB"))


def png_round_trip(pixels: np.ndarray) -> np.ndarray:
    buffer = io.BytesIO()
    Image.fromarray(pixels).save(buffer, "PNG")
    return np.asarray(Image.open(io.BytesIO(buffer.getvalue())).convert("RGB"))


def test_blockiness_rises_with_jpeg_compression():
    # JPEG (ITU-T T.81) codes 8x8 blocks; coarser quantisation (lower Pillow quality)
    # leaves stronger block edges. PNG is lossless: no block grid at all.
    chart = drawn_chart()
    lossless = qm.blockiness(png_round_trip(chart))
    scores = [qm.blockiness(jpeg_round_trip(chart, q)) for q in (95, 60, 30)]
    assert lossless == pytest.approx(1.0, abs=0.1)
    assert lossless < scores[0] < scores[1] < scores[2]
    assert scores[2] > 2.0 * lossless


@pytest.mark.parametrize("photo", ["astronaut", "coffee"])
def test_blockiness_of_photographs(photo):
    # scikit-image's reference photographs, stored losslessly (PNG): ~1 as stored,
    # and the same ordering with compression.
    pixels = getattr(skimage.data, photo)()
    scores = [qm.blockiness(pixels)] + [qm.blockiness(jpeg_round_trip(pixels, q)) for q in (95, 60, 30)]
    assert scores[0] == pytest.approx(1.0, abs=0.1)
    assert scores == sorted(scores) and scores[-1] > 3.0


def test_ringing_is_zero_for_a_clean_chart_and_grows_with_compression():
    chart = drawn_chart()
    assert qm.ringing(png_round_trip(chart)) == 0.0
    values = [qm.ringing(jpeg_round_trip(chart, q)) for q in (95, 60, 30)]
    assert 0.0 < values[0] < values[1] < values[2]
    assert qm.ringing(np.full((64, 64), 128, dtype=np.uint8)) == 0.0  # no edges, nothing to ring


def test_line_art_versus_photographs():
    # Common practice: charts are few flat colours, photographs are continuous tone.
    chart = drawn_chart()
    assert qm.is_line_art(chart)
    assert qm.is_line_art(jpeg_round_trip(chart, 30))  # still line art after lossy coding
    for photo in ("astronaut", "coffee"):
        assert not qm.is_line_art(getattr(skimage.data, photo)())
    assert 0.0 <= qm.line_art_score(skimage.data.astronaut()) < qm.line_art_score(chart) <= 1.0


def test_compression_artefacts_report():
    chart = drawn_chart()
    clean = qm.compression_artefacts(png_round_trip(chart))
    assert not clean.lossy_likely and clean.line_art_score > 0.6
    for quality in (95, 60, 30):
        assert qm.compression_artefacts(jpeg_round_trip(chart, quality)).lossy_likely
    photo = skimage.data.coffee()
    assert not qm.compression_artefacts(photo).lossy_likely
    assert qm.compression_artefacts(jpeg_round_trip(photo, 30)).lossy_likely


def test_laplacian_and_sharpness():
    gray = qm.to_gray(skimage.data.astronaut())
    # Reference: scipy.ndimage.laplace, the same [1, -2, 1] stencil per axis, edge
    # handling "nearest" = replication.
    reference = scipy.ndimage.laplace(gray, mode="nearest")
    assert qm.laplacian_variance(gray) == pytest.approx(float(reference.var()), rel=1e-12)
    # Blur lowers the focus measure (Pech-Pacheco et al. 2000); contrast does not change it.
    blurred = [qm.sharpness(scipy.ndimage.gaussian_filter(gray, sigma)) for sigma in (0.5, 1.0, 2.0, 4.0)]
    assert qm.sharpness(gray) > blurred[0] > blurred[1] > blurred[2] > blurred[3]
    assert qm.sharpness(0.5 * gray) == pytest.approx(qm.sharpness(gray), rel=1e-9)
    assert qm.sharpness(np.zeros((32, 32))) == 0.0


def test_to_gray_uses_bt601_luma():
    # ITU-R BT.601 / JFIF luma weights, as Pillow's "L" conversion uses.
    pixels = skimage.data.coffee()
    pillow = np.asarray(Image.fromarray(pixels).convert("L"), dtype=np.float64)
    assert np.abs(qm.to_gray(pixels) - pillow).max() <= 1.0


def test_colour_bins_of_the_histogram_match_the_top_four_bits():
    # OpenCV's histogram path against the plain bit-shift binning (the path for non-uint8 input)
    rng = np.random.default_rng(7)
    image = rng.integers(0, 256, (61, 47, 3), dtype=np.uint8)
    image[10:40, 5:30] = (200, 17, 64)  # one large flat colour, as in a chart
    assert qm._top_colour_share(image) == qm._top_colour_share(image.astype(np.float64))
    assert 0.26 < qm._top_colour_share(image) < 0.30  # 750 of 2,867 pixels plus the 15 next-fullest bins
