"""Tests of corpusaudit.measure.colour against published data and reference libraries."""

from __future__ import annotations

import warnings

import numpy as np
import pytest

import colour as colour_science  # colour-science, reference implementation
import matplotlib
import skimage.color

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
from PIL import Image, ImageDraw  # noqa: E402

from corpusaudit.measure import colour as cm  # noqa: E402

RNG_SEED = 20240601

# Sharma, Wu & Dalal (2005), "The CIEDE2000 color-difference formula: implementation
# notes, supplementary test data, and mathematical observations", Color Res. Appl. 30(1),
# Table 1: L1 a1 b1 L2 a2 b2 dE00 for the 34 test pairs.
SHARMA_2005_TABLE_1 = [
    (50.0000, 2.6772, -79.7751, 50.0000, 0.0000, -82.7485, 2.0425),
    (50.0000, 3.1571, -77.2803, 50.0000, 0.0000, -82.7485, 2.8615),
    (50.0000, 2.8361, -74.0200, 50.0000, 0.0000, -82.7485, 3.4412),
    (50.0000, -1.3802, -84.2814, 50.0000, 0.0000, -82.7485, 1.0000),
    (50.0000, -1.1848, -84.8006, 50.0000, 0.0000, -82.7485, 1.0000),
    (50.0000, -0.9009, -85.5211, 50.0000, 0.0000, -82.7485, 1.0000),
    (50.0000, 0.0000, 0.0000, 50.0000, -1.0000, 2.0000, 2.3669),
    (50.0000, -1.0000, 2.0000, 50.0000, 0.0000, 0.0000, 2.3669),
    (50.0000, 2.4900, -0.0010, 50.0000, -2.4900, 0.0009, 7.1792),
    (50.0000, 2.4900, -0.0010, 50.0000, -2.4900, 0.0010, 7.1792),
    (50.0000, 2.4900, -0.0010, 50.0000, -2.4900, 0.0011, 7.2195),
    (50.0000, 2.4900, -0.0010, 50.0000, -2.4900, 0.0012, 7.2195),
    (50.0000, -0.0010, 2.4900, 50.0000, 0.0009, -2.4900, 4.8045),
    (50.0000, -0.0010, 2.4900, 50.0000, 0.0010, -2.4900, 4.8045),
    (50.0000, -0.0010, 2.4900, 50.0000, 0.0011, -2.4900, 4.7461),
    (50.0000, 2.5000, 0.0000, 50.0000, 0.0000, -2.5000, 4.3065),
    (50.0000, 2.5000, 0.0000, 73.0000, 25.0000, -18.0000, 27.1492),
    (50.0000, 2.5000, 0.0000, 61.0000, -5.0000, 29.0000, 22.8977),
    (50.0000, 2.5000, 0.0000, 56.0000, -27.0000, -3.0000, 31.9030),
    (50.0000, 2.5000, 0.0000, 58.0000, 24.0000, 15.0000, 19.4535),
    (50.0000, 2.5000, 0.0000, 50.0000, 3.1736, 0.5854, 1.0000),
    (50.0000, 2.5000, 0.0000, 50.0000, 3.2972, 0.0000, 1.0000),
    (50.0000, 2.5000, 0.0000, 50.0000, 1.8634, 0.5757, 1.0000),
    (50.0000, 2.5000, 0.0000, 50.0000, 3.2592, 0.3350, 1.0000),
    (60.2574, -34.0099, 36.2677, 60.4626, -34.1751, 39.4387, 1.2644),
    (63.0109, -31.0961, -5.8663, 62.8187, -29.7946, -4.0864, 1.2630),
    (61.2901, 3.7196, -5.3901, 61.4292, 2.2480, -4.9620, 1.8731),
    (35.0831, -44.1164, 3.7933, 35.0232, -40.0716, 1.5901, 1.8645),
    (22.7233, 20.0904, -46.6940, 23.0331, 14.9730, -42.5619, 2.0373),
    (36.4612, 47.8580, 18.3852, 36.2715, 50.5065, 21.2231, 1.4146),
    (90.8027, -2.0831, 1.4410, 91.1528, -1.6435, 0.0447, 1.4441),
    (90.9257, -0.5406, -0.9208, 88.6381, -0.8985, -0.7239, 1.5381),
    (6.7747, -0.2908, -2.4247, 5.8714, -0.0985, -2.2286, 0.6377),
    (2.0776, 0.0795, -1.1350, 0.9033, -0.0636, -0.5514, 0.9082),
]


def hex_rgb(code: str) -> np.ndarray:
    code = code.lstrip("#")
    return np.array([int(code[k : k + 2], 16) for k in (0, 2, 4)], dtype=np.uint8)


def colormap_samples(name: str, n: int = 256) -> np.ndarray:
    return matplotlib.colormaps[name](np.linspace(0.0, 1.0, n))[:, :3]


# ----------------------------------------------------------------------------- CIEDE2000


def test_ciede2000_sharma_table_1():
    # Sharma, Wu & Dalal (2005), Table 1: all 34 pairs to 1e-4 (the table's 4 decimals).
    table = np.array(SHARMA_2005_TABLE_1)
    assert len(table) == 34
    computed = cm.delta_e_ciede2000(table[:, 0:3], table[:, 3:6])
    np.testing.assert_allclose(computed, table[:, 6], atol=1e-4)
    # The formula is symmetric in its arguments (Sharma et al. 2005, section 3).
    np.testing.assert_allclose(cm.delta_e_ciede2000(table[:, 3:6], table[:, 0:3]), table[:, 6], atol=1e-4)


def test_ciede2000_matches_scikit_image_on_random_pairs():
    # Reference: skimage.color.deltaE_ciede2000 (scikit-image), 1000 random Lab pairs.
    rng = np.random.default_rng(RNG_SEED)
    low, high = [0.0, -110.0, -110.0], [100.0, 110.0, 110.0]
    lab1 = rng.uniform(low, high, size=(1000, 3))
    lab2 = rng.uniform(low, high, size=(1000, 3))
    # Half the pairs close together, where the hue terms matter most.
    lab2[:500] = lab1[:500] + rng.normal(0.0, 3.0, size=(500, 3))
    expected = skimage.color.deltaE_ciede2000(lab1, lab2)
    np.testing.assert_allclose(cm.delta_e_ciede2000(lab1, lab2), expected, atol=1e-6)


# ----------------------------------------------------------------------------- conversions


def test_srgb_to_lab_matches_scikit_image_and_colour_science():
    rng = np.random.default_rng(RNG_SEED + 1)
    rgb = rng.uniform(0.0, 1.0, size=(2000, 3))
    ours = cm.srgb_to_lab(rgb)
    # Reference 1: skimage.color.rgb2lab (D65, 2 degree observer). The libraries derive
    # the sRGB matrix with more digits than IEC 61966-2-1's 4, so agreement is to ~0.1.
    np.testing.assert_allclose(ours, skimage.color.rgb2lab(rgb[None])[0], atol=0.15)
    # Reference 2: colour-science, sRGB -> XYZ -> Lab with the D65 white.
    d65 = colour_science.CCS_ILLUMINANTS["CIE 1931 2 Degree Standard Observer"]["D65"]
    xyz = colour_science.RGB_to_XYZ(rgb, colour_science.RGB_COLOURSPACES["sRGB"], apply_cctf_decoding=True)
    np.testing.assert_allclose(ours, colour_science.XYZ_to_Lab(xyz, d65), atol=0.15)


def test_srgb_transfer_and_white_point():
    # IEC 61966-2-1: the decoding and encoding functions are inverse; white -> L*=100, a*=b*=0.
    values = np.linspace(0.0, 1.0, 1001)
    np.testing.assert_allclose(cm.linear_to_srgb(cm.srgb_to_linear(values)), values, atol=1e-12)
    np.testing.assert_allclose(cm.srgb_to_lab([1.0, 1.0, 1.0]), [100.0, 0.0, 0.0], atol=1e-9)
    # uint8 input (float32 table look-up) equals the float64 path to float32 precision.
    codes = np.arange(256, dtype=np.uint8)
    np.testing.assert_allclose(cm.srgb_to_linear(codes), cm.srgb_to_linear(codes / 255.0), rtol=1e-6, atol=0)
    # colour-science's IEC 61966-2-1 decoding function (reference).
    np.testing.assert_allclose(cm.srgb_to_linear(values), colour_science.models.eotf_sRGB(values), atol=1e-12)


def test_lab_to_lch_hue_in_degrees():
    # CIE 15:2004 hue angle h_ab = atan2(b*, a*) in 0..360; colour-science as reference.
    rng = np.random.default_rng(RNG_SEED + 2)
    lab = rng.uniform([0, -100, -100], [100, 100, 100], size=(500, 3))
    np.testing.assert_allclose(cm.lab_to_lch(lab), colour_science.Lab_to_LCHab(lab), atol=1e-9)


# ----------------------------------------------------------------------------- WCAG


def wcag_luminance_by_hand(code: str) -> float:
    """Independent restatement of the WCAG 2.x relative luminance definition."""
    channels = []
    for value in hex_rgb(code):
        c = value / 255.0
        channels.append(c / 12.92 if c <= 0.03928 else ((c + 0.055) / 1.055) ** 2.4)
    red, green, blue = channels
    return 0.2126 * red + 0.7152 * green + 0.0722 * blue


def test_wcag_contrast_ratio():
    # WCAG 2.x: black on white is 21:1; a colour against itself is 1:1.
    assert cm.contrast_ratio(hex_rgb("#000000"), hex_rgb("#ffffff")) == pytest.approx(21.0, abs=1e-9)
    assert cm.contrast_ratio(hex_rgb("#3a7bd5"), hex_rgb("#3a7bd5")) == pytest.approx(1.0, abs=1e-12)
    # #777777 on white is the well-known just-below-AA grey, ~4.48:1 (WCAG 2.x formula by hand).
    by_hand = (wcag_luminance_by_hand("#ffffff") + 0.05) / (wcag_luminance_by_hand("#777777") + 0.05)
    assert by_hand == pytest.approx(4.48, abs=0.005)
    assert cm.contrast_ratio(hex_rgb("#777777"), hex_rgb("#ffffff")) == pytest.approx(by_hand, rel=1e-12)
    # Order of the arguments does not matter; several pairs at once broadcast.
    fg = np.array([hex_rgb("#595959"), hex_rgb("#1f77b4")])
    bg = np.array([hex_rgb("#ffffff"), hex_rgb("#ffffff")])
    expected = [(1.05) / (wcag_luminance_by_hand(c) + 0.05) for c in ("#595959", "#1f77b4")]
    np.testing.assert_allclose(cm.contrast_ratio(bg, fg), expected, rtol=1e-12)


# ----------------------------------------------------------------------------- CVD


@pytest.mark.parametrize("deficiency,reference_name", [
    ("protan", "Protanomaly"), ("deutan", "Deuteranomaly"), ("tritan", "Tritanomaly"),
])
@pytest.mark.parametrize("severity", [0.3, 0.55, 1.0])
def test_cvd_matches_colour_science_machado_2009(deficiency, reference_name, severity):
    # Reference: colour-science colour.matrix_cvd_Machado2009 (Machado et al. 2009),
    # applied in linear RGB and clipped, as simulate_cvd documents. Off the published 0.1
    # grid, colour-science 0.4.x brackets s with the grid points at and above
    # searchsorted(s) (0.6 and 0.7 for 0.55) and extrapolates; we interpolate between the
    # enclosing grid points (0.5 and 0.6), so off-grid we compare with colour-science's
    # matrices at those two grid points, interpolated linearly.
    lower = np.floor(severity * 10.0 + 1e-9) / 10.0
    upper = min(lower + 0.1, 1.0)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # colour-science warns about its tritanomaly model
        at_lower = colour_science.matrix_cvd_Machado2009(reference_name, lower)
        at_upper = colour_science.matrix_cvd_Machado2009(reference_name, upper)
    weight = 0.0 if upper == lower else (severity - lower) / (upper - lower)
    reference = (1.0 - weight) * at_lower + weight * at_upper
    np.testing.assert_allclose(cm.cvd_matrix(deficiency, severity), reference, atol=1e-9)
    rng = np.random.default_rng(RNG_SEED + 3)
    rgb = rng.uniform(0.0, 1.0, size=(500, 3))
    linear = colour_science.models.eotf_sRGB(rgb)
    expected = colour_science.models.eotf_inverse_sRGB(np.clip(linear @ reference.T, 0.0, 1.0))
    np.testing.assert_allclose(cm.simulate_cvd(rgb, deficiency, severity), expected, atol=1e-9)


def test_cvd_severity_zero_is_identity_and_grey_is_kept():
    # Machado et al. (2009): severity 0 is normal vision; rows of every matrix sum to 1, so
    # neutral greys (R=G=B) look the same to everyone.
    rng = np.random.default_rng(RNG_SEED + 4)
    rgb = rng.uniform(0.0, 1.0, size=(100, 3))
    greys = np.repeat(np.linspace(0, 1, 11)[:, None], 3, axis=1)
    for deficiency in cm.DEFICIENCIES:
        np.testing.assert_allclose(cm.simulate_cvd(rgb, deficiency, 0.0), rgb, atol=1e-12)
        np.testing.assert_allclose(cm.simulate_cvd(greys, deficiency, 1.0), greys, atol=1e-5)
    with pytest.raises(ValueError):
        cm.simulate_cvd(rgb, "achromat")
    with pytest.raises(ValueError):
        cm.simulate_cvd(rgb, "protan", 1.5)


def test_confusable_pairs_red_green_and_blue_orange():
    # matplotlib "tab10" colours: #d62728 (red) and #2ca02c (green) are the textbook
    # deuteranopia confusion; #1f77b4 (blue) / #ff7f0e (orange) is the usual safe pair.
    # Threshold 10 dE00: common practice for "clearly distinguishable" categorical colours.
    red_green = np.array([hex_rgb("#d62728"), hex_rgb("#2ca02c")])
    pairs = cm.confusable_pairs(red_green, threshold_de=10.0, deficiencies=("deutan",))
    assert [(p.i, p.j, p.deficiency) for p in pairs] == [(0, 1, "deutan")]
    assert pairs[0].de_normal >= 10.0 > pairs[0].de_simulated
    blue_orange = np.array([hex_rgb("#1f77b4"), hex_rgb("#ff7f0e")])
    assert cm.confusable_pairs(blue_orange, threshold_de=10.0) == []


def test_confusable_pairs_property_severity_zero_gives_none():
    rng = np.random.default_rng(RNG_SEED + 5)
    for _ in range(20):
        palette = rng.integers(0, 256, size=(8, 3), dtype=np.uint8)
        threshold = float(rng.uniform(2.0, 30.0))
        assert cm.confusable_pairs(palette, threshold, severity=0.0) == []
        # Every reported pair really crosses the threshold (dE00 recomputed independently
        # with scikit-image's CIEDE2000 and colour-science's CVD matrices).
        for pair in cm.confusable_pairs(palette, threshold):
            lab = skimage.color.rgb2lab(palette[[pair.i, pair.j]][None] / 255.0)[0]
            assert skimage.color.deltaE_ciede2000(lab[0], lab[1]) >= threshold - 0.2
            assert pair.de_simulated < threshold


# ----------------------------------------------------------------------------- colour scales

RAINBOW_LIKE = ["jet", "hsv", "rainbow", "gist_rainbow", "turbo", "nipy_spectral"]
NOT_RAINBOW = ["viridis", "cividis", "magma", "plasma", "inferno", "Greys", "Blues", "RdBu", "coolwarm", "YlOrRd"]


@pytest.mark.parametrize("name", RAINBOW_LIKE)
def test_rainbow_colormaps_are_flagged(name):
    # matplotlib's own colormap data is the reference; the rainbow list is common practice
    # (Borland & Taylor 2007, "Rainbow color map (still) considered harmful").
    profile = cm.analyse_scale(colormap_samples(name))
    assert profile.is_rainbow, f"{name} (matplotlib {matplotlib.__version__}): {profile.reason}"
    assert profile.kind == "rainbow"


@pytest.mark.parametrize("name", NOT_RAINBOW)
def test_perceptual_sequential_and_diverging_colormaps_are_not_flagged(name):
    profile = cm.analyse_scale(colormap_samples(name))
    assert not profile.is_rainbow, f"{name} (matplotlib {matplotlib.__version__}): {profile.reason}"


def test_scale_profile_shapes():
    # viridis: designed with monotonic lightness (van der Walt & Smith, matplotlib 2015)
    # while its hue moves more than 180 degrees.
    viridis = cm.analyse_scale(colormap_samples("viridis"))
    assert viridis.lightness_monotonic and viridis.n_lightness_reversals == 0
    assert viridis.hue_span_deg > 180.0 and viridis.kind == "sequential"
    assert len(viridis.lightness) == 256
    # RdBu is diverging: one lightness peak in the middle.
    rdbu = cm.analyse_scale(colormap_samples("RdBu"))
    assert rdbu.n_lightness_reversals == 1 and rdbu.kind == "diverging"
    # A coarse 8-swatch jet is still rainbow-like.
    assert cm.analyse_scale(colormap_samples("jet", 8)).is_rainbow


def render(fig) -> np.ndarray:
    fig.canvas.draw()
    pixels = np.asarray(fig.canvas.buffer_rgba())[..., :3].copy()
    plt.close(fig)
    return pixels


def heatmap_image(cmap: str, colorbar: bool, orientation: str = "vertical") -> np.ndarray:
    y, x = np.mgrid[0:12, 0:16]
    field = np.sin(x / 5.0) + np.cos(y / 4.0) + 0.1 * x  # invented smooth field
    fig, ax = plt.subplots(figsize=(5, 4), dpi=100)
    image = ax.imshow(field, cmap=cmap, interpolation="nearest")
    ax.set_title("Invented measurements")
    if colorbar:
        fig.colorbar(image, ax=ax, orientation=orientation)
    return render(fig)


def nearest_colormap_de(colours: np.ndarray, cmap: str) -> np.ndarray:
    reference = cm.srgb_to_lab(colormap_samples(cmap, 1024))
    found = cm.srgb_to_lab(colours)
    return cm.delta_e_ciede2000(found[:, None], reference[None]).min(axis=1)


@pytest.mark.parametrize("cmap,rainbow", [("jet", True), ("viridis", False), ("turbo", True), ("RdBu", False)])
@pytest.mark.parametrize("orientation", ["vertical", "horizontal"])
def test_find_colour_scales_in_a_rendered_heatmap(cmap, rainbow, orientation):
    # Reference: matplotlib draws the colour bar from the colormap, so every colour found
    # must be one of the colormap's colours and the bar must span most of the map.
    scales = cm.find_colour_scales(heatmap_image(cmap, colorbar=True, orientation=orientation))
    assert len(scales) == 1, scales
    scale = scales[0]
    assert scale.orientation == orientation
    x0, y0, x1, y1 = scale.bbox
    long_side, short_side = (y1 - y0, x1 - x0) if orientation == "vertical" else (x1 - x0, y1 - y0)
    assert long_side >= 4 * short_side
    assert nearest_colormap_de(scale.colours, cmap).max() < 3.0
    ends = cm.srgb_to_lab(scale.colours[[0, -1]])
    low_high = cm.srgb_to_lab(colormap_samples(cmap, 2))
    assert cm.delta_e_ciede2000(ends, low_high).max() < 5.0  # low end at the bottom / left
    assert cm.analyse_scale(scale.colours).is_rainbow == rainbow


def test_find_colour_scales_ignores_bar_charts_and_heatmap_cells():
    fig, ax = plt.subplots(figsize=(5, 4), dpi=100)
    ax.bar(["North", "South", "East", "West"], [3, 7, 5, 2], color=["#1f77b4", "#ff7f0e", "#2ca02c", "#d62728"])
    assert cm.find_colour_scales(render(fig)) == []
    # A heatmap of shuffled values without a colour bar: its cell columns are not scales.
    rng = np.random.default_rng(RNG_SEED + 6)
    fig, ax = plt.subplots(figsize=(5, 4), dpi=100)
    ax.imshow(rng.permutation(np.arange(80)).reshape(8, 10), cmap="viridis", interpolation="nearest")
    assert cm.find_colour_scales(render(fig)) == []


@pytest.mark.parametrize("cmap,rainbow", [("jet", True), ("viridis", False), ("magma", False), ("turbo", True)])
def test_continuous_fill_scale_orders_heatmap_cells(cmap, rainbow):
    colours = cm.continuous_fill_scale(heatmap_image(cmap, colorbar=False))
    assert len(colours) >= 20
    assert cm.analyse_scale(colours).is_rainbow == rainbow


# ----------------------------------------------------------------------------- palettes

PALETTE_TRUTH = ["#d62728", "#2ca02c", "#1f77b4", "#ff7f0e"]


def antialiased_chart(scale: int = 4):
    """A pie of three wedges, a square and a black axis with text, drawn at 4x and
    box-filtered down, so every edge is anti-aliased. Returns the image and, from the
    high-resolution drawing, the true share of each colour among non-white pixels."""
    size = 400
    big = Image.new("RGB", (size * scale, size * scale), "white")
    draw = ImageDraw.Draw(big)
    s = scale
    draw.pieslice([30 * s, 30 * s, 250 * s, 250 * s], 0, 150, fill=PALETTE_TRUTH[0])
    draw.pieslice([30 * s, 30 * s, 250 * s, 250 * s], 150, 260, fill=PALETTE_TRUTH[1])
    draw.pieslice([30 * s, 30 * s, 250 * s, 250 * s], 260, 360, fill=PALETTE_TRUTH[2])
    draw.rectangle([280 * s, 60 * s, 370 * s, 190 * s], fill=PALETTE_TRUTH[3])
    draw.line([(20 * s, 300 * s), (380 * s, 300 * s)], fill="black", width=2 * s)
    draw.line([(20 * s, 300 * s), (20 * s, 380 * s)], fill="black", width=2 * s)
    high = np.asarray(big)
    truth_counts = {code: int((high == hex_rgb(code)).all(axis=2).sum()) for code in PALETTE_TRUTH}
    ink = int((high != 255).any(axis=2).sum())
    small = np.asarray(big.resize((size, size), Image.Resampling.BOX))
    return small, {code: count / ink for code, count in truth_counts.items()}


def test_extract_palette_finds_the_four_colours_with_their_shares():
    image, truth = antialiased_chart()
    palette = cm.extract_palette(image)
    chromatic = [c for c in palette if not c.is_grey]
    assert len(chromatic) == 4, [(np.round(np.array(c.rgb) * 255), round(c.share, 4)) for c in palette]
    for code, share in truth.items():
        target = cm.srgb_to_lab(hex_rgb(code))
        distances = [float(cm.delta_e_ciede2000(target, np.array(c.lab))) for c in chromatic]
        best = chromatic[int(np.argmin(distances))]
        assert min(distances) < 3.0, code
        assert abs(best.share - share) < 0.02, (code, best.share, share)
    # The black axis is reported, flagged as grey.
    greys = [c for c in palette if c.is_grey]
    assert greys and max(c.lab[0] for c in greys) < 20


def test_extract_palette_respects_mask_and_background():
    image, _ = antialiased_chart()
    mask = np.zeros(image.shape[:2], dtype=bool)
    mask[40:200, 260:390] = True  # only the orange square and white around it
    palette = cm.extract_palette(image, mask=mask)
    assert len(palette) == 1
    assert float(cm.delta_e_ciede2000(cm.srgb_to_lab(hex_rgb("#ff7f0e")), np.array(palette[0].lab))) < 3.0
    assert palette[0].share == pytest.approx(1.0)
    assert cm.estimate_background(image) == pytest.approx((1.0, 1.0, 1.0))


def test_extract_palette_on_a_matplotlib_bar_chart_with_a_dark_background():
    # Dark theme: the background is the modal border colour, not white.
    with plt.style.context("dark_background"):
        fig, ax = plt.subplots(figsize=(5, 4), dpi=100)
        ax.bar(["A", "B", "C"], [4, 6, 3], color=["#e377c2", "#bcbd22", "#17becf"])
        ax.set_title("Invented totals")
        image = render(fig)
    chromatic = [c for c in cm.extract_palette(image) if not c.is_grey]
    found = np.array([c.lab for c in chromatic])
    truth = cm.srgb_to_lab(np.array([hex_rgb(h) for h in ("#e377c2", "#bcbd22", "#17becf")]))
    assert len(chromatic) == 3
    assert cm.delta_e_ciede2000(truth[:, None], found[None]).min(axis=1).max() < 3.0


def test_palette_from_colours_merges_near_identical_fills():
    # Two fills 1 code value apart are one colour (dE00 < 2); weights add up.
    colours = np.array([hex_rgb("#1f77b4"), hex_rgb("#1f77b5"), hex_rgb("#ff7f0e"), hex_rgb("#ffffff")])
    palette = cm.palette_from_colours(colours, weights=[30.0, 10.0, 50.0, 10.0])
    chromatic = [c for c in palette if not c.is_grey]
    assert [round(c.share, 6) for c in chromatic] == [0.5, 0.4]
    assert np.allclose(chromatic[1].rgb, hex_rgb("#1f77b4") / 255.0)  # heaviest member kept
    assert chromatic[1].pixels == pytest.approx(40.0)
    assert [c.is_grey for c in palette] == [False, False, True]
    # Colours 2 dE00 or more apart stay separate.
    lab_a = cm.srgb_to_lab(hex_rgb("#1f77b4"))
    far = next(c for c in (hex_rgb("#1f7fb4"), hex_rgb("#2277c0")) if cm.delta_e_ciede2000(lab_a, cm.srgb_to_lab(c)) >= 2)
    assert len(cm.palette_from_colours([hex_rgb("#1f77b4"), far])) == 2
