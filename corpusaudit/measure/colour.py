"""Colour science shared by the checks: conversions, colour difference, contrast,
colour-vision-deficiency simulation, palette extraction and colour-scale analysis.

Conventions
-----------
* Colours are numpy arrays of shape (..., 3). Float arrays are sRGB in 0..1; integer
  arrays (uint8 images, hex-derived triples) are read as 0..255 and divided by 255.
* Speed: uint8 input to srgb_to_linear / srgb_to_xyz / srgb_to_lab / simulate_cvd is
  decoded by table look-up and computed in float32 (results float32, relative error
  ~1e-6); every other input is computed and returned in float64.
* CIELAB uses the D65 white of the sRGB matrix (the matrix row sums), so sRGB white
  maps to exactly L*=100, a*=b*=0.
* Every function is pure; nothing here reads files or prints.

References
----------
* IEC 61966-2-1:1999, sRGB transfer function and RGB->XYZ matrix.
* CIE 15:2004, CIELAB.
* G. Sharma, W. Wu, E. N. Dalal (2005), "The CIEDE2000 color-difference formula:
  implementation notes, supplementary test data, and mathematical observations",
  Color Research & Application 30(1).
* W3C, Web Content Accessibility Guidelines (WCAG) 2.x, "relative luminance" and
  "contrast ratio" definitions.
* G. M. Machado, M. M. Oliveira, L. A. F. Fernandes (2009), "A physiologically-based
  model for simulation of color vision deficiency", IEEE TVCG 15(6); pre-computed
  matrices published with the paper (also in G. M. Machado's 2010 thesis).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import NamedTuple, Sequence

import numpy as np

# --------------------------------------------------------------------------- conversions

# IEC 61966-2-1:1999 linear sRGB -> CIE XYZ (D65), the 4-decimal matrix of the standard.
SRGB_TO_XYZ = np.array(
    [
        [0.4124, 0.3576, 0.1805],
        [0.2126, 0.7152, 0.0722],
        [0.0193, 0.1192, 0.9505],
    ]
)
# XYZ of sRGB white (R=G=B=1): (0.9505, 1.0000, 1.0890); used as the CIELAB reference white.
D65_WHITE_XYZ = SRGB_TO_XYZ.sum(axis=1)

_LAB_EPSILON = 216.0 / 24389.0  # CIE 15:2004 exact rational constants
_LAB_KAPPA = 24389.0 / 27.0


def as_unit_rgb(rgb: np.ndarray | Sequence) -> np.ndarray:
    """Return rgb as float64 sRGB in 0..1; integer input is read as 0..255."""
    array = np.asarray(rgb)
    if np.issubdtype(array.dtype, np.integer):
        return array.astype(np.float64) / 255.0
    return array.astype(np.float64, copy=False)


def _decode_srgb(c: np.ndarray) -> np.ndarray:
    linear = ((np.maximum(c, 0.04045) + 0.055) / 1.055) ** 2.4
    low = c <= 0.04045
    linear[low] = c[low] / 12.92
    return linear


# Exact decoded value of every 8-bit code: images take a table look-up instead of pow().
# uint8 images are worked in float32 (half the memory traffic; ~1e-6 relative error).
_LINEAR_OF_UINT8 = _decode_srgb(np.arange(256) / 255.0).astype(np.float32)


def _apply_matrix(values: np.ndarray, matrix: np.ndarray) -> np.ndarray:
    """values (..., 3) times matrix (3x3) on each colour; one flat matmul is fastest."""
    # A contiguous transposed matrix keeps numpy on its fast matmul path (~10x on 1M pixels).
    return (values.reshape(-1, 3) @ np.ascontiguousarray(matrix.T, dtype=values.dtype)).reshape(values.shape)


def srgb_to_linear(rgb: np.ndarray | Sequence) -> np.ndarray:
    """sRGB (0..1 floats, or uint8) -> linear-light RGB, IEC 61966-2-1 transfer function."""
    array = np.asarray(rgb)
    if array.dtype == np.uint8:
        return _LINEAR_OF_UINT8[array]
    return _decode_srgb(np.atleast_1d(as_unit_rgb(array))).reshape(array.shape)


def linear_to_srgb(linear: np.ndarray | Sequence) -> np.ndarray:
    """Linear-light RGB -> sRGB 0..1 (IEC 61966-2-1). Values are not clipped."""
    c = np.atleast_1d(np.asarray(linear))
    if c.dtype != np.float32:
        c = c.astype(np.float64)
    encoded = np.maximum(c, c.dtype.type(0.0031308))
    np.power(encoded, c.dtype.type(1.0 / 2.4), out=encoded)
    encoded *= 1.055
    encoded -= 0.055
    low = c <= 0.0031308
    encoded[low] = 12.92 * c[low]
    return encoded.reshape(np.shape(linear))


def srgb_to_xyz(rgb: np.ndarray | Sequence) -> np.ndarray:
    """sRGB -> CIE XYZ (D65, Y of white = 1)."""
    return _apply_matrix(np.atleast_1d(srgb_to_linear(rgb)), SRGB_TO_XYZ).reshape(np.shape(rgb))


def _lab_from_relative_xyz(t: np.ndarray) -> np.ndarray:
    """CIELAB from XYZ already divided by the reference white (t = X/Xn, Y/Yn, Z/Zn)."""
    f = np.cbrt(t)
    low = t <= _LAB_EPSILON
    f[low] = (_LAB_KAPPA * t[low] + 16.0) / 116.0
    lab = np.empty_like(f)
    lab[..., 0] = 116.0 * f[..., 1] - 16.0
    lab[..., 1] = 500.0 * (f[..., 0] - f[..., 1])
    lab[..., 2] = 200.0 * (f[..., 1] - f[..., 2])
    return lab


def xyz_to_lab(xyz: np.ndarray | Sequence, white: np.ndarray = D65_WHITE_XYZ) -> np.ndarray:
    """CIE XYZ -> CIELAB (CIE 15:2004) relative to `white` (default: sRGB's D65 white)."""
    return _lab_from_relative_xyz(np.atleast_1d(np.asarray(xyz, dtype=np.float64) / white)).reshape(np.shape(xyz))


# sRGB -> XYZ/white in one matrix, so images skip a division pass.
_SRGB_TO_RELATIVE_XYZ = SRGB_TO_XYZ / D65_WHITE_XYZ[:, None]


def srgb_to_lab(rgb: np.ndarray | Sequence) -> np.ndarray:
    """sRGB (0..1 floats, or uint8) -> CIELAB (D65)."""
    linear = np.atleast_1d(srgb_to_linear(rgb))
    return _lab_from_relative_xyz(_apply_matrix(linear, _SRGB_TO_RELATIVE_XYZ)).reshape(np.shape(rgb))


def lab_to_lch(lab: np.ndarray | Sequence) -> np.ndarray:
    """CIELAB -> CIE LCh(ab): lightness, chroma, hue angle in degrees 0..360."""
    lab = np.asarray(lab, dtype=np.float64)
    lch = np.empty_like(lab)
    lch[..., 0] = lab[..., 0]
    lch[..., 1] = np.hypot(lab[..., 1], lab[..., 2])
    lch[..., 2] = np.degrees(np.arctan2(lab[..., 2], lab[..., 1])) % 360.0
    return lch


# --------------------------------------------------------------------------- CIEDE2000


def delta_e_ciede2000(
    lab1: np.ndarray | Sequence,
    lab2: np.ndarray | Sequence,
    kL: float = 1.0,
    kC: float = 1.0,
    kH: float = 1.0,
) -> np.ndarray:
    """CIEDE2000 colour difference between Lab arrays (broadcast), as in Sharma et al. (2005)."""
    lab1 = np.asarray(lab1, dtype=np.float64)
    lab2 = np.asarray(lab2, dtype=np.float64)
    L1, a1, b1 = lab1[..., 0], lab1[..., 1], lab1[..., 2]
    L2, a2, b2 = lab2[..., 0], lab2[..., 1], lab2[..., 2]

    c_mean7 = ((np.hypot(a1, b1) + np.hypot(a2, b2)) / 2.0) ** 7
    g = 0.5 * (1.0 - np.sqrt(c_mean7 / (c_mean7 + 25.0**7)))
    a1p, a2p = (1.0 + g) * a1, (1.0 + g) * a2
    c1p, c2p = np.hypot(a1p, b1), np.hypot(a2p, b2)
    h1p = np.degrees(np.arctan2(b1, a1p)) % 360.0
    h2p = np.degrees(np.arctan2(b2, a2p)) % 360.0
    chroma_product = c1p * c2p
    achromatic = chroma_product == 0

    dh = h2p - h1p
    dh = np.where(dh > 180.0, dh - 360.0, np.where(dh < -180.0, dh + 360.0, dh))
    dh = np.where(achromatic, 0.0, dh)
    d_l = L2 - L1
    d_c = c2p - c1p
    d_h = 2.0 * np.sqrt(chroma_product) * np.sin(np.radians(dh / 2.0))

    l_mean = (L1 + L2) / 2.0
    c_mean_p = (c1p + c2p) / 2.0
    h_sum = h1p + h2p
    h_mean = np.where(
        np.abs(h1p - h2p) <= 180.0,
        h_sum / 2.0,
        np.where(h_sum < 360.0, (h_sum + 360.0) / 2.0, (h_sum - 360.0) / 2.0),
    )
    h_mean = np.where(achromatic, h_sum, h_mean)

    t = (
        1.0
        - 0.17 * np.cos(np.radians(h_mean - 30.0))
        + 0.24 * np.cos(np.radians(2.0 * h_mean))
        + 0.32 * np.cos(np.radians(3.0 * h_mean + 6.0))
        - 0.20 * np.cos(np.radians(4.0 * h_mean - 63.0))
    )
    d_theta = 30.0 * np.exp(-(((h_mean - 275.0) / 25.0) ** 2))
    c_mean_p7 = c_mean_p**7
    r_c = 2.0 * np.sqrt(c_mean_p7 / (c_mean_p7 + 25.0**7))
    l_offset2 = (l_mean - 50.0) ** 2
    s_l = 1.0 + 0.015 * l_offset2 / np.sqrt(20.0 + l_offset2)
    s_c = 1.0 + 0.045 * c_mean_p
    s_h = 1.0 + 0.015 * c_mean_p * t
    r_t = -np.sin(np.radians(2.0 * d_theta)) * r_c

    term_l = d_l / (kL * s_l)
    term_c = d_c / (kC * s_c)
    term_h = d_h / (kH * s_h)
    return np.sqrt(term_l**2 + term_c**2 + term_h**2 + r_t * term_c * term_h)


def _pairwise_de00(lab: np.ndarray) -> np.ndarray:
    return delta_e_ciede2000(lab[:, None, :], lab[None, :, :])


# --------------------------------------------------------------------------- WCAG contrast


def relative_luminance(rgb: np.ndarray | Sequence) -> np.ndarray:
    """WCAG 2.x relative luminance of sRGB colours, 0 (black) .. 1 (white).

    WCAG 2.x states the decoding threshold as 0.03928 (taken from an early sRGB draft)
    where IEC 61966-2-1 has 0.04045; we follow WCAG's text so ratios match WCAG tools.
    No 8-bit code lies between the two thresholds (10/255 = 0.0392, 11/255 = 0.0431),
    so for 8-bit colours the choice changes nothing.
    """
    c = as_unit_rgb(rgb)
    linear = np.where(c <= 0.03928, c / 12.92, ((np.maximum(c, 0.03928) + 0.055) / 1.055) ** 2.4)
    return linear @ np.array([0.2126, 0.7152, 0.0722])


def contrast_ratio(rgb1: np.ndarray | Sequence, rgb2: np.ndarray | Sequence) -> np.ndarray:
    """WCAG 2.x contrast ratio (L_lighter + 0.05) / (L_darker + 0.05), 1..21."""
    lum1, lum2 = relative_luminance(rgb1), relative_luminance(rgb2)
    return (np.maximum(lum1, lum2) + 0.05) / (np.minimum(lum1, lum2) + 0.05)


# --------------------------------------------------------------------------- CVD simulation

DEFICIENCIES = ("protan", "deutan", "tritan")

# Machado, Oliveira & Fernandes (2009), pre-computed simulation matrices (linear RGB),
# severities 0.0, 0.1, ..., 1.0 (row-major 3x3). Severity 0 is the identity.
_MACHADO_2009 = {
    "protan": [
        [1.000000, 0.000000, 0.000000, 0.000000, 1.000000, 0.000000, 0.000000, 0.000000, 1.000000],
        [0.856167, 0.182038, -0.038205, 0.029342, 0.955115, 0.015544, -0.002880, -0.001563, 1.004443],
        [0.734766, 0.334872, -0.069637, 0.051840, 0.919198, 0.028963, -0.004928, -0.004209, 1.009137],
        [0.630323, 0.465641, -0.095964, 0.069181, 0.890046, 0.040773, -0.006308, -0.007724, 1.014032],
        [0.539009, 0.579343, -0.118352, 0.082546, 0.866121, 0.051332, -0.007136, -0.011959, 1.019095],
        [0.458064, 0.679578, -0.137642, 0.092785, 0.846313, 0.060902, -0.007494, -0.016807, 1.024301],
        [0.385450, 0.769005, -0.154455, 0.100526, 0.829802, 0.069673, -0.007442, -0.022190, 1.029632],
        [0.319627, 0.849633, -0.169261, 0.106241, 0.815969, 0.077790, -0.007025, -0.028051, 1.035076],
        [0.259411, 0.923008, -0.182420, 0.110296, 0.804340, 0.085364, -0.006276, -0.034346, 1.040622],
        [0.203876, 0.990338, -0.194214, 0.112975, 0.794542, 0.092483, -0.005222, -0.041043, 1.046265],
        [0.152286, 1.052583, -0.204868, 0.114503, 0.786281, 0.099216, -0.003882, -0.048116, 1.051998],
    ],
    "deutan": [
        [1.000000, 0.000000, 0.000000, 0.000000, 1.000000, 0.000000, 0.000000, 0.000000, 1.000000],
        [0.866435, 0.177704, -0.044139, 0.049567, 0.939063, 0.011370, -0.003453, 0.007233, 0.996220],
        [0.760729, 0.319078, -0.079807, 0.090568, 0.889315, 0.020117, -0.006027, 0.013325, 0.992702],
        [0.675425, 0.433850, -0.109275, 0.125303, 0.847755, 0.026942, -0.007950, 0.018572, 0.989378],
        [0.605511, 0.528560, -0.134071, 0.155318, 0.812366, 0.032316, -0.009376, 0.023176, 0.986200],
        [0.547494, 0.607765, -0.155259, 0.181692, 0.781742, 0.036566, -0.010410, 0.027275, 0.983136],
        [0.498864, 0.674741, -0.173604, 0.205199, 0.754872, 0.039929, -0.011131, 0.030969, 0.980162],
        [0.457771, 0.731899, -0.189670, 0.226409, 0.731012, 0.042579, -0.011595, 0.034333, 0.977261],
        [0.422823, 0.781057, -0.203881, 0.245752, 0.709602, 0.044646, -0.011843, 0.037423, 0.974421],
        [0.392952, 0.823610, -0.216562, 0.263559, 0.690210, 0.046232, -0.011910, 0.040281, 0.971630],
        [0.367322, 0.860646, -0.227968, 0.280085, 0.672501, 0.047413, -0.011820, 0.042940, 0.968881],
    ],
    "tritan": [
        [1.000000, 0.000000, 0.000000, 0.000000, 1.000000, 0.000000, 0.000000, 0.000000, 1.000000],
        [0.926670, 0.092514, -0.019184, 0.021191, 0.964503, 0.014306, 0.008437, 0.054813, 0.936750],
        [0.895720, 0.133330, -0.029050, 0.029997, 0.945400, 0.024603, 0.013027, 0.104707, 0.882266],
        [0.905871, 0.127791, -0.033662, 0.026856, 0.941251, 0.031893, 0.013410, 0.148296, 0.838294],
        [0.948035, 0.089490, -0.037526, 0.014364, 0.946792, 0.038844, 0.010853, 0.193991, 0.795156],
        [1.017277, 0.027029, -0.044306, -0.006113, 0.958479, 0.047634, 0.006379, 0.248708, 0.744913],
        [1.104996, -0.046633, -0.058363, -0.032137, 0.971635, 0.060503, 0.001336, 0.317922, 0.680742],
        [1.193214, -0.109812, -0.083402, -0.058496, 0.979410, 0.079086, -0.002346, 0.403492, 0.598854],
        [1.257728, -0.139648, -0.118081, -0.078003, 0.975409, 0.102594, -0.003316, 0.501214, 0.502102],
        [1.278864, -0.125333, -0.153531, -0.084748, 0.957674, 0.127074, -0.000989, 0.601151, 0.399838],
        [1.255528, -0.076749, -0.178779, -0.078411, 0.930809, 0.147602, 0.004733, 0.691367, 0.303900],
    ],
}
_MACHADO_MATRICES = {name: np.array(rows).reshape(11, 3, 3) for name, rows in _MACHADO_2009.items()}


def cvd_matrix(deficiency: str, severity: float = 1.0) -> np.ndarray:
    """3x3 linear-RGB simulation matrix of Machado et al. (2009).

    deficiency: "protan" | "deutan" | "tritan"; severity 0..1, linearly interpolated
    between the published matrices at 0.1 steps (1.0 = dichromacy).
    """
    if deficiency not in _MACHADO_MATRICES:
        raise ValueError(f"deficiency must be one of {DEFICIENCIES}, not {deficiency!r}")
    if not 0.0 <= severity <= 1.0:
        raise ValueError(f"severity must be within 0..1, not {severity}")
    matrices = _MACHADO_MATRICES[deficiency]
    position = severity * 10.0
    lower = min(int(np.floor(position)), 9)
    weight = position - lower
    return (1.0 - weight) * matrices[lower] + weight * matrices[lower + 1]


def simulate_cvd(rgb: np.ndarray | Sequence, deficiency: str, severity: float = 1.0) -> np.ndarray:
    """How sRGB colours appear with a colour-vision deficiency (Machado et al. 2009).

    The matrix is applied to linear RGB; the result is clipped to the sRGB gamut and
    returned as sRGB 0..1 floats with the shape of the input.
    """
    matrix = cvd_matrix(deficiency, severity)
    simulated = _apply_matrix(np.atleast_1d(srgb_to_linear(rgb)), matrix)
    np.clip(simulated, 0.0, 1.0, out=simulated)
    return linear_to_srgb(simulated).reshape(np.shape(rgb))


class ConfusablePair(NamedTuple):
    """Two palette colours (indices i < j) that a deficiency brings closer than the threshold."""

    i: int
    j: int
    deficiency: str
    de_normal: float
    de_simulated: float


def confusable_pairs(
    palette_rgb: np.ndarray | Sequence,
    threshold_de: float,
    severity: float = 1.0,
    deficiencies: Sequence[str] = DEFICIENCIES,
) -> list[ConfusablePair]:
    """Pairs distinct under normal vision (dE00 >= threshold) but closer than the
    threshold under a simulated deficiency. Sorted by deficiency order, then i, j."""
    palette = as_unit_rgb(palette_rgb).reshape(-1, 3)
    if len(palette) < 2:
        return []
    normal = _pairwise_de00(srgb_to_lab(palette))
    upper_i, upper_j = np.triu_indices(len(palette), k=1)
    pairs: list[ConfusablePair] = []
    for deficiency in deficiencies:
        simulated = _pairwise_de00(srgb_to_lab(simulate_cvd(palette, deficiency, severity)))
        hits = (normal[upper_i, upper_j] >= threshold_de) & (simulated[upper_i, upper_j] < threshold_de)
        for i, j in zip(upper_i[hits], upper_j[hits]):
            pairs.append(
                ConfusablePair(int(i), int(j), deficiency, float(normal[i, j]), float(simulated[i, j]))
            )
    return pairs


# --------------------------------------------------------------------------- palettes


@dataclass(frozen=True)
class PaletteColour:
    """One categorical colour of a figure.

    rgb: sRGB 0..1. share: fraction of the figure's classified foreground (every
    non-background pixel that is neither an anti-aliasing blend nor unclustered noise;
    greys included) or of the total weight for vector fills. pixels: pixel count
    (raster) or summed weight (vector fills). lab: CIELAB. is_grey: chroma below the
    grey limit (text, axes, grid lines, neutral fills).
    """

    rgb: tuple[float, float, float]
    share: float
    pixels: float
    lab: tuple[float, float, float]
    is_grey: bool


_CROSS = np.array([[0, 1, 0], [1, 1, 1], [0, 1, 0]], dtype=np.uint8)  # 4-neighbourhood kernel
_QUANT_BITS = 5  # 32 levels per channel: colours within ~8/255 share a bin
_QUANT_SHIFT = 8 - _QUANT_BITS
BIN_LEVELS = 1 << _QUANT_SHIFT  # levels per channel in one bin


def colour_bins(rgb_uint8: np.ndarray) -> np.ndarray:
    """Each colour's bin of 32 levels per channel (colours within ~8/255 share one): 15 bits,
    the top 5 of each channel (red highest), in a uint16."""
    import cv2

    colours = np.ascontiguousarray(rgb_uint8)
    if colours.size == 0:
        return np.zeros(colours.shape[:-1], dtype=np.uint16)
    # OpenCV's 15-bit packing of RGB input (BGR555) is exactly this layout, ten times faster
    # than shifting the channels in numpy.
    packed = cv2.cvtColor(colours.reshape(-1, 1, 3), cv2.COLOR_RGB2BGR555)
    return packed.view(np.uint16).reshape(colours.shape[:-1])


def modal_bin(patch: np.ndarray, mask: np.ndarray | None) -> tuple[tuple[int, int, int], int]:
    """The most common bin of colour_bins among the pixels of an HxWx3 uint8 patch that the
    uint8 mask selects (all when None): its lowest level per channel, and its pixel count. A
    histogram over the patch, without gathering the pixels first; ties go to the lowest bin,
    as the argmax of a bincount of the bins does."""
    import cv2

    hist = cv2.calcHist([patch], [0, 1, 2], mask, [1 << _QUANT_BITS] * 3, [0, 256] * 3)
    peak = np.unravel_index(int(np.argmax(hist)), hist.shape)
    return tuple(int(v) * BIN_LEVELS for v in peak), int(hist[peak])


def _border_pixels(rgb_uint8: np.ndarray, mask: np.ndarray | None) -> np.ndarray:
    if mask is None:
        return np.concatenate(
            [rgb_uint8[0], rgb_uint8[-1], rgb_uint8[1:-1, 0], rgb_uint8[1:-1, -1]], axis=0
        )
    import cv2

    # Mask pixels with a 4-neighbour outside the mask or the image are its boundary.
    mask_uint8 = np.ascontiguousarray(mask, dtype=bool).view(np.uint8)
    inner = cv2.erode(mask_uint8, _CROSS, borderType=cv2.BORDER_CONSTANT, borderValue=0)
    return rgb_uint8[cv2.subtract(mask_uint8, inner).view(bool)]


def _check_image(rgb_uint8: np.ndarray, mask: np.ndarray | None) -> None:
    if rgb_uint8.ndim != 3 or rgb_uint8.shape[2] != 3 or rgb_uint8.dtype != np.uint8:
        raise ValueError("expected an HxWx3 uint8 RGB image")
    if mask is not None and mask.shape != rgb_uint8.shape[:2]:
        raise ValueError("mask must have the image's height and width")


def estimate_background(rgb_uint8: np.ndarray, mask: np.ndarray | None = None) -> tuple[float, float, float]:
    """The most common colour on the image border (or on the mask's boundary), sRGB 0..1.

    Colours are grouped in bins of 8 levels per channel; the mean colour of the modal bin
    is returned, so JPEG noise around a flat background does not matter.
    """
    _check_image(rgb_uint8, mask)
    border = _border_pixels(rgb_uint8, mask)
    if len(border) == 0:
        raise ValueError("the mask selects no pixels")
    bins = colour_bins(border)
    modal = np.bincount(bins).argmax()
    return tuple(float(v) for v in border[bins == modal].mean(axis=0) / 255.0)


def _segment_blend(colour: np.ndarray, ends_a: np.ndarray, ends_b: np.ndarray, tolerance: float) -> np.ndarray:
    """For each endpoint pair, is `colour` (sRGB 0..255) a mix between the two ends?"""
    direction = ends_b - ends_a
    length2 = np.maximum((direction**2).sum(axis=-1), 1e-9)
    t = ((colour - ends_a) * direction).sum(axis=-1) / length2
    closest = ends_a + t[..., None] * direction
    distance = np.sqrt(((colour - closest) ** 2).sum(axis=-1))
    return (t > 0.04) & (t < 0.96) & (distance < tolerance) & (length2 > (3 * tolerance) ** 2)


@dataclass(frozen=True)
class _ColourRuns:
    """Runs of one exact colour along the image rows; a row start and a mask edge end a run
    too. Charts are mostly flat areas: far fewer runs than pixels, so counts and sums over
    pixels are taken over runs, weighted by their lengths."""

    starts: np.ndarray  # flat pixel index of each run's first pixel, in raster order
    lengths: np.ndarray  # pixels
    rgb: np.ndarray  # k x 3 uint8
    inside: np.ndarray  # k bool: the run lies inside the mask


def _colour_runs(rgb_uint8: np.ndarray, mask: np.ndarray | None) -> _ColourRuns:
    import cv2

    # One 32-bit code per pixel (colour, and in the fourth byte whether it is in the mask).
    rgba = cv2.cvtColor(np.ascontiguousarray(rgb_uint8), cv2.COLOR_RGB2RGBA)
    if mask is not None:
        rgba[..., 3] = mask
    codes = rgba.view(np.uint32).ravel()
    changes = np.empty(codes.size, dtype=bool)
    changes[0] = True
    np.not_equal(codes[1:], codes[:-1], out=changes[1:])
    changes[:: rgb_uint8.shape[1]] = True
    starts = np.flatnonzero(changes)
    lengths = np.diff(starts, append=codes.size)
    run_rgba = rgba.reshape(-1, 4)[starts]
    return _ColourRuns(starts, lengths, run_rgba[:, :3], run_rgba[:, 3] != 0)


def _adjacency(labels: np.ndarray, runs: _ColourRuns, run_labels: np.ndarray, n_labels: int) -> np.ndarray:
    """Symmetric count of 4-neighbour pixel pairs between labels (negative labels ignored);
    labels is the image of run_labels, which are constant along each run."""
    width = labels.shape[1]
    meets = runs.starts[1:] % width != 0  # side by side: only where one run meets the next on its row
    flat = labels.ravel()
    differ = np.flatnonzero(flat[:-width] != flat[width:])  # few pixels differ from the one below
    first = np.concatenate([run_labels[:-1][meets], flat[differ]]).astype(np.int64)
    second = np.concatenate([run_labels[1:][meets], flat[differ + width]]).astype(np.int64)
    keep = (first >= 0) & (second >= 0) & (first != second)
    counts = np.bincount(first[keep] * n_labels + second[keep], minlength=n_labels * n_labels).astype(np.float64)
    matrix = counts.reshape(n_labels, n_labels)
    return matrix + matrix.T


def _interior(labels: np.ndarray) -> np.ndarray:
    """uint8 mask (1) of the labelled (>= 0) pixels whose 4 neighbours share their label;
    none on the image edge."""
    import cv2

    # All five labels of the cross agree exactly where their minimum equals their maximum.
    lowest = cv2.erode(labels, _CROSS, borderType=cv2.BORDER_CONSTANT, borderValue=-1)
    highest = cv2.dilate(labels, _CROSS, borderType=cv2.BORDER_CONSTANT, borderValue=-1)
    agree = cv2.compare(lowest, highest, cv2.CMP_EQ)
    return cv2.bitwise_and(agree, cv2.compare(lowest, 0, cv2.CMP_GE)) // 255


@dataclass(frozen=True)
class _Clusters:
    rgb: np.ndarray  # k x 3, 0..255
    pixels: np.ndarray  # k
    interior_fraction: np.ndarray  # k
    is_blend: np.ndarray  # k bool


def _colour_clusters(
    rgb_uint8: np.ndarray,
    mask: np.ndarray | None,
    max_colours: int,
    min_share: float,
    cluster_de: float,
    blend_tolerance: float,
) -> _Clusters | None:
    """Cluster the foreground colours of an image; see extract_palette for the steps."""
    _check_image(rgb_uint8, mask)
    height, width = rgb_uint8.shape[:2]
    n_bins = 1 << (3 * _QUANT_BITS)
    runs = _colour_runs(rgb_uint8, mask)
    # Runs outside the mask go to one extra bin, dropped below.
    run_bins = np.where(runs.inside, colour_bins(runs.rgb), n_bins)
    lengths = runs.lengths.astype(np.float64)
    counts = np.bincount(run_bins, weights=lengths, minlength=n_bins + 1)[:n_bins]
    occupied = np.flatnonzero(counts)
    # Mean colour per bin: the bin fixes the high bits; the low bits are summed per bin
    # (small integers, so the float sums are exact).
    bin_rgb = np.empty((len(occupied), 3))
    for k in range(3):
        low_bits = (runs.rgb[:, k] & (BIN_LEVELS - 1)) * lengths
        low_mean = np.bincount(run_bins, weights=low_bits, minlength=n_bins + 1)[occupied] / counts[occupied]
        high = (occupied >> ((2 - k) * _QUANT_BITS)) & ((1 << _QUANT_BITS) - 1)
        bin_rgb[:, k] = (high << _QUANT_SHIFT) + low_mean  # 0..255
    bin_lab = srgb_to_lab(bin_rgb / 255.0)
    bin_count = counts[occupied]

    background = np.array(estimate_background(rgb_uint8, mask)) * 255.0
    background_lab = srgb_to_lab(background / 255.0)
    is_background = np.linalg.norm(bin_lab - background_lab, axis=1) < cluster_de

    # Greedy clustering: the most populous unassigned bin seeds a cluster of its neighbours.
    cluster_of = np.full(len(occupied), -1)
    cluster_of[is_background] = -2
    foreground_total = bin_count[~is_background].sum()
    if foreground_total == 0:
        return None
    smallest_seed = max(1.0, 0.2 * min_share * foreground_total)
    max_clusters = 4 * max_colours + 48
    n_clusters = 0
    while n_clusters < max_clusters:
        free = cluster_of == -1
        if not free.any():
            break
        candidates = np.where(free, bin_count, -1.0)
        seed = int(candidates.argmax())
        if candidates[seed] < smallest_seed:
            break
        near = free & (np.linalg.norm(bin_lab - bin_lab[seed], axis=1) < cluster_de)
        cluster_of[near] = n_clusters
        n_clusters += 1
    if n_clusters == 0:
        return None

    members = cluster_of >= 0
    cluster_pixels = np.bincount(cluster_of[members], weights=bin_count[members], minlength=n_clusters)
    cluster_sum = np.stack(
        [
            np.bincount(cluster_of[members], weights=bin_rgb[members, k] * bin_count[members], minlength=n_clusters)
            for k in range(3)
        ],
        axis=1,
    )
    cluster_rgb = cluster_sum / cluster_pixels[:, None]

    # Per-pixel cluster labels: background is n_clusters, noise and outside the mask -1.
    label_of_bin = np.full(n_bins + 1, -1, dtype=np.int16)  # at most max_clusters + 1 labels
    label_of_bin[occupied[members]] = cluster_of[members]
    label_of_bin[occupied[is_background]] = n_clusters
    run_labels = label_of_bin[run_bins]
    labels = np.repeat(run_labels, runs.lengths).reshape(height, width)
    interior = _interior(labels)
    # A run of interior pixels along a row has one label (each pixel's right neighbour
    # shares its label), and no run reaches the image edge: count them per label by runs.
    flat = interior.ravel()
    edges = np.flatnonzero(flat[1:] != flat[:-1]) + 1
    starts, ends = edges[0::2], edges[1::2]
    interior_pixels = np.bincount(labels.ravel()[starts], weights=ends - starts, minlength=n_clusters + 1)
    interior_fraction = interior_pixels[:n_clusters] / cluster_pixels
    touching = _adjacency(labels, runs, run_labels, n_clusters + 1)

    # Anti-aliasing blends: mixes of two colours (or a colour and the background) that
    # have almost no interior and are either smaller than both or touch both.
    is_blend = np.zeros(n_clusters, dtype=bool)
    end_rgb = np.vstack([cluster_rgb, background])
    end_pixels = np.append(cluster_pixels, np.inf)
    for k in np.argsort(cluster_pixels):
        if interior_fraction[k] >= 0.25:
            continue
        ends = np.flatnonzero(np.append(~is_blend, True) & (np.arange(n_clusters + 1) != k))
        first, second = (ends[index] for index in np.triu_indices(len(ends), k=1))
        on_segment = _segment_blend(cluster_rgb[k], end_rgb[first], end_rgb[second], blend_tolerance)
        smaller = cluster_pixels[k] < np.minimum(end_pixels[first], end_pixels[second])
        contact = 0.05 * cluster_pixels[k]
        touches = (touching[k, first] >= contact) & (touching[k, second] >= contact)
        is_blend[k] = bool((on_segment & (smaller | touches)).any())

    return _Clusters(cluster_rgb, cluster_pixels, interior_fraction, is_blend)


def extract_palette(
    rgb_uint8: np.ndarray,
    mask: np.ndarray | None = None,
    max_colours: int = 12,
    min_share: float = 0.005,
    *,
    cluster_de: float = 8.0,
    merge_de: float = 3.0,
    grey_chroma: float = 8.0,
    blend_tolerance: float = 12.0,
) -> list[PaletteColour]:
    """The categorical colours of a chart image.

    Steps: quantise to 32 levels per channel; drop the background (the modal border colour
    and everything within `cluster_de` of it, CIE76 in CIELAB); cluster the remaining bins
    greedily in CIELAB (largest bin first, radius `cluster_de`); drop clusters that are
    anti-aliasing blends: their colour lies on the sRGB segment between two larger colours
    (or a colour and the background; `blend_tolerance` in 0..255 units), their pixels
    have almost no interior (a pixel whose 4 neighbours share its colour), and they are
    smaller than both ends or touch both along at least 5% of their pixels; merge clusters
    closer than `merge_de` (CIEDE2000). Colours with chroma C* < `grey_chroma` come back
    flagged is_grey.

    Returns at most `max_colours` chromatic colours (largest first), then at most
    `max_colours` greys, each with share >= `min_share`.

    Limits: a genuine colour that is both a mix of two larger colours and drawn only as
    hairlines (no interior) is taken for a blend; gradients and photographs give many
    clusters of no categorical meaning.
    """
    clusters = _colour_clusters(rgb_uint8, mask, max_colours, min_share, cluster_de, blend_tolerance)
    if clusters is None:
        return []
    kept = ~clusters.is_blend
    weights = clusters.pixels[kept]
    merged = _merge_colours(clusters.rgb[kept] / 255.0, weights, merge_de, keep="mean")
    return _palette_list(merged, weights.sum(), max_colours, min_share, grey_chroma)


def _merge_colours(
    rgb: np.ndarray, weights: np.ndarray, merge_de: float, keep: str
) -> list[tuple[np.ndarray, float]]:
    """Greedy merge, heaviest first, of colours within merge_de (CIEDE2000).

    keep="mean": weighted mean of the members; keep="heaviest": the heaviest member's colour.
    """
    order = np.argsort(-weights, kind="stable")
    rgb, weights = rgb[order], weights[order]
    lab = srgb_to_lab(rgb)
    group = np.full(len(rgb), -1)
    n_groups = 0
    for k in range(len(rgb)):
        if group[k] >= 0:
            continue
        near = (group < 0) & (delta_e_ciede2000(lab[k], lab) < merge_de)
        group[near] = n_groups
        n_groups += 1
    merged = []
    for g in range(n_groups):
        members = group == g
        weight = float(weights[members].sum())
        if keep == "mean":
            colour = (rgb[members] * weights[members, None]).sum(axis=0) / weight
        else:
            colour = rgb[np.flatnonzero(members)[0]]
        merged.append((colour, weight))
    return merged


def _palette_list(
    merged: list[tuple[np.ndarray, float]],
    total: float,
    max_colours: int,
    min_share: float,
    grey_chroma: float,
) -> list[PaletteColour]:
    chromatic: list[PaletteColour] = []
    greys: list[PaletteColour] = []
    for colour, weight in sorted(merged, key=lambda item: -item[1]):
        share = weight / total if total > 0 else 0.0
        if share < min_share:
            continue
        lab = srgb_to_lab(colour)
        entry = PaletteColour(
            rgb=tuple(float(v) for v in np.clip(colour, 0.0, 1.0)),
            share=float(share),
            pixels=float(weight),
            lab=tuple(float(v) for v in lab),
            is_grey=bool(np.hypot(lab[1], lab[2]) < grey_chroma),
        )
        (greys if entry.is_grey else chromatic).append(entry)
    return chromatic[:max_colours] + greys[:max_colours]


def palette_from_colours(
    colours: np.ndarray | Sequence,
    weights: Sequence[float] | np.ndarray | None = None,
    merge_de: float = 2.0,
    *,
    max_colours: int = 64,
    min_share: float = 0.0,
    grey_chroma: float = 8.0,
) -> list[PaletteColour]:
    """Palette of exact colours (vector fills/strokes), weights e.g. areas (default 1 each).

    Colours within `merge_de` (CIEDE2000) are merged into the heaviest one's colour;
    shares are fractions of the total weight. Same ordering and grey flag as
    extract_palette. White and black fills come back as greys.
    """
    rgb = as_unit_rgb(colours).reshape(-1, 3)
    if len(rgb) == 0:
        return []
    weight = np.ones(len(rgb)) if weights is None else np.asarray(weights, dtype=np.float64)
    if weight.shape != (len(rgb),):
        raise ValueError("weights must give one number per colour")
    merged = _merge_colours(rgb, weight, merge_de, keep="heaviest")
    return _palette_list(merged, float(weight.sum()), max_colours, min_share, grey_chroma)


# --------------------------------------------------------------------------- colour scales


@dataclass(frozen=True)
class ScaleProfile:
    """Shape of an ordered colour scale.

    hue_span_deg: longest continuous hue sweep over consecutive chromatic samples
    (C* >= the chroma limit), in degrees; 360 or more means the hue wrapped fully.
    lightness: L* of every sample, in order. lightness_monotonic: L* only rises or only
    falls (changes below the tolerance ignored) over a range of at least the minimum
    ramp. n_lightness_reversals: direction changes of L* beyond the tolerance.
    kind: "rainbow" | "sequential" | "diverging" | "other". is_rainbow: a hue sweep of at
    least the rainbow limit without a monotonic lightness ramp. reason: one sentence.
    """

    hue_span_deg: float
    lightness: list[float]
    lightness_monotonic: bool
    n_lightness_reversals: int
    is_rainbow: bool
    kind: str
    reason: str


def _lightness_reversals(lightness: np.ndarray, tolerance: float) -> int:
    """Direction changes of a sequence, ignoring wiggles smaller than `tolerance`."""
    reversals = 0
    direction = 0
    low = high = extreme = lightness[0]
    for value in lightness[1:]:
        if direction == 0:
            low, high = min(low, value), max(high, value)
            if value - low > tolerance:
                direction, extreme = 1, value
            elif high - value > tolerance:
                direction, extreme = -1, value
        elif direction == 1:
            if value > extreme:
                extreme = value
            elif extreme - value > tolerance:
                reversals, direction, extreme = reversals + 1, -1, value
        else:
            if value < extreme:
                extreme = value
            elif value - extreme > tolerance:
                reversals, direction, extreme = reversals + 1, 1, value
    return reversals


def _longest_hue_sweep(chroma: np.ndarray, hue: np.ndarray, min_chroma: float, max_step: float) -> float:
    """Largest unwrapped hue range over runs of consecutive chromatic samples.

    A run breaks at an achromatic sample or a hue jump above `max_step` degrees, so the
    two arms of a diverging scale (joined through a neutral middle) are not one sweep.
    """
    steps = (np.diff(hue) + 180.0) % 360.0 - 180.0
    chromatic = chroma >= min_chroma
    best = 0.0
    start = 0
    n = len(hue)
    while start < n:
        if not chromatic[start]:
            start += 1
            continue
        end = start
        while end + 1 < n and chromatic[end + 1] and abs(steps[end]) < max_step:
            end += 1
        path = np.concatenate([[0.0], np.cumsum(steps[start:end])])
        best = max(best, float(path.max() - path.min()))
        start = end + 1
    return best


def analyse_scale(
    colours: np.ndarray | Sequence,
    *,
    rainbow_hue_span: float = 200.0,
    min_chroma: float = 15.0,
    lightness_tolerance: float = 3.0,
    min_lightness_ramp: float = 15.0,
) -> ScaleProfile:
    """Classify an ordered colour scale (Nx3 sRGB, N >= 2; 16 or more samples advised).

    Rainbow-like: the chromatic samples sweep at least `rainbow_hue_span` degrees of hue
    and lightness is not a monotonic ramp (it reverses, or stays nearly flat as in hsv).
    viridis sweeps ~225 degrees but its lightness rises steadily: not rainbow. A diverging
    scale has one lightness peak (or trough) and two short hue arms: not rainbow.
    Hue steps above 120 degrees between neighbours break a sweep, so very coarse scales
    (a few swatches) may understate the span.
    """
    rgb = as_unit_rgb(colours).reshape(-1, 3)
    if len(rgb) < 2:
        raise ValueError("a colour scale needs at least two colours")
    lightness, chroma, hue = lab_to_lch(srgb_to_lab(rgb)).T
    hue_span = _longest_hue_sweep(chroma, hue, min_chroma, max_step=120.0)
    reversals = _lightness_reversals(lightness, lightness_tolerance)
    ramp = float(lightness.max() - lightness.min())
    monotonic = reversals == 0 and ramp >= min_lightness_ramp
    is_rainbow = hue_span >= rainbow_hue_span and not monotonic

    if is_rainbow:
        kind = "rainbow"
        if reversals:
            shape = f"lightness reverses {reversals} time(s)"
        else:
            shape = f"lightness only spans {ramp:.0f} L*"
        reason = f"hue sweeps {hue_span:.0f} deg and {shape}"
    elif monotonic:
        kind = "sequential"
        reason = f"lightness ramps monotonically over {ramp:.0f} L* (hue sweep {hue_span:.0f} deg)"
    elif reversals == 1:
        kind = "diverging"
        reason = f"one lightness turn with a hue sweep of only {hue_span:.0f} deg"
    else:
        kind = "other"
        reason = f"hue sweep {hue_span:.0f} deg, {reversals} lightness reversal(s), L* range {ramp:.0f}"
    return ScaleProfile(
        hue_span_deg=hue_span,
        lightness=[float(v) for v in lightness],
        lightness_monotonic=bool(monotonic),
        n_lightness_reversals=int(reversals),
        is_rainbow=bool(is_rainbow),
        kind=kind,
        reason=reason,
    )


@dataclass(frozen=True)
class ColourScale:
    """A colour bar found in a raster image.

    bbox: (x0, y0, x1, y1) pixels, x1/y1 exclusive. orientation: "vertical" | "horizontal".
    colours: Nx3 sRGB 0..1, one per distinct step along the bar, ordered bottom-to-top
    (vertical) or left-to-right (horizontal), the usual low-to-high direction.
    """

    bbox: tuple[int, int, int, int]
    orientation: str
    colours: np.ndarray


def _runs_of_colour(lab: np.ndarray, drift_limit: float) -> list[tuple[int, int]]:
    """Split a sequence into runs: a run ends when the colour has drifted `drift_limit`
    (CIE76) from the run's first colour, so a smooth ramp gives many short runs and a
    stepped one gives one run per step."""
    runs = []
    start = 0
    rows = lab.tolist()  # math.dist on lists: a tenth of the cost of numpy per row
    for index in range(1, len(rows)):
        if math.dist(rows[index], rows[start]) >= drift_limit:
            runs.append((start, index))
            start = index
    runs.append((start, len(rows)))
    return runs


def _run_means(profile: np.ndarray, runs: list[tuple[int, int]]) -> np.ndarray:
    """Mean colour of each run of consecutive rows (runs tile the profile in order)."""
    starts = np.array([a for a, _ in runs])
    lengths = np.array([b - a for a, b in runs], dtype=np.float64)
    return np.add.reduceat(profile[: runs[-1][1]], starts, axis=0) / lengths[:, None]


def _trim_end_blends(profile: np.ndarray, runs: list[tuple[int, int]]) -> list[tuple[int, int]]:
    """Drop end runs of at most 2 px that jump far more than the bar's typical step:
    a frame line, or its anti-aliased blend with the bar's end colour."""
    while len(runs) > 5:
        means = _run_means(profile, runs)
        steps = np.linalg.norm(np.diff(means, axis=0), axis=1)
        limit = max(2.5 * float(np.median(steps)), 3.0)
        if runs[0][1] - runs[0][0] <= 2 and steps[0] > limit:
            runs = runs[1:]
        elif runs[-1][1] - runs[-1][0] <= 2 and steps[-1] > limit:
            runs = runs[:-1]
        else:
            break
    return runs


def ordered_like_a_path(lab: np.ndarray, allowed_misses: float = 0.1) -> bool:
    """True when each colour's nearest other colour is a neighbour in the sequence.

    Holds for samples taken in order along a smooth scale; fails for shuffled colours
    (a column of heatmap cells).
    """
    n = len(lab)
    distance = np.linalg.norm(lab[:, None] - lab[None, :], axis=2)
    np.fill_diagonal(distance, np.inf)
    nearest = distance.argmin(axis=1)
    misses = np.abs(nearest - np.arange(n)) > 1
    return misses.sum() <= allowed_misses * n


def _largest_channel(image: np.ndarray) -> np.ndarray:
    """Per-pixel maximum over the three channels (several times faster than .max(axis=2))."""
    return np.maximum(np.maximum(image[..., 0], image[..., 1]), image[..., 2])


def _bar_candidates(rgb_uint8: np.ndarray, not_background: np.ndarray, axis: int, cross_tolerance: int) -> np.ndarray:
    """uint8 mask of the pixels that do not change across axis (1: along x, for vertical
    bars; 0: along y) and are not the background."""
    import cv2

    if axis == 1:
        across = _largest_channel(cv2.absdiff(rgb_uint8[:, 1:], rgb_uint8[:, :-1])) <= cross_tolerance
        constant = np.zeros(rgb_uint8.shape[:2], dtype=bool)
        constant[:, 1:-1] = across[:, :-1] & across[:, 1:]
    else:
        across = _largest_channel(cv2.absdiff(rgb_uint8[1:], rgb_uint8[:-1])) <= cross_tolerance
        constant = np.zeros(rgb_uint8.shape[:2], dtype=bool)
        constant[1:-1] = across[:-1] & across[1:]
    return (constant & not_background).view(np.uint8)


def _bars_along_columns(
    rgb_uint8: np.ndarray,
    candidate: np.ndarray,
    min_length: int,
    min_aspect: float,
) -> list[tuple[tuple[int, int, int, int], np.ndarray]]:
    """Vertical bars: regions constant across x (candidate, from _bar_candidates) whose
    colour walks smoothly along y. rgb_uint8 may be a transposed view: only the candidates'
    strips are read from it, and only they are converted to CIELAB.
    """
    import cv2

    n_labels, labels, stats, _ = cv2.connectedComponentsWithStats(np.ascontiguousarray(candidate), connectivity=4)
    heights = stats[:, cv2.CC_STAT_HEIGHT]
    tall = np.flatnonzero((heights >= min_length) & (heights >= min_aspect * 3))

    found = []
    for k in tall[tall > 0]:
        x, y, w, h, area = stats[k]
        inside = labels[y : y + h, x : x + w] == k
        # The bar's own columns: those filled on most rows (frame lines glued to its ends
        # are wider than the bar and would inflate the box).
        columns = np.flatnonzero(inside.sum(axis=0) >= 0.8 * h)
        if len(columns) < 1 or columns[-1] - columns[0] + 1 != len(columns):
            continue
        x, w = x + int(columns[0]), len(columns)
        inside = inside[:, columns[0] : columns[-1] + 1]
        if h < min_aspect * (w + 2) or inside.mean() < 0.9:
            continue
        strip = srgb_to_lab(np.ascontiguousarray(rgb_uint8[y : y + h, x : x + w]))
        # Mean colour of each row over the bar's own pixels (the whole row where it has none).
        counts = inside.sum(axis=1)
        weights = np.where(counts[:, None] > 0, inside, True).astype(strip.dtype)
        profile = (strip * weights[:, :, None]).sum(axis=1) / weights.sum(axis=1)[:, None]
        runs = _runs_of_colour(profile, drift_limit=1.5)
        runs = _trim_end_blends(profile, runs)
        if len(runs) < 5:
            continue
        run_lab = _run_means(profile, runs)
        path_length = np.linalg.norm(np.diff(run_lab, axis=0), axis=1).sum()
        if path_length < 30.0 or not ordered_like_a_path(run_lab):
            continue
        top, bottom = y + runs[0][0], y + runs[-1][1]
        colours = np.array(
            [np.median(rgb_uint8[y + a : y + b, x : x + w][inside[a:b]], axis=0) for a, b in runs]
        ) / 255.0
        found.append(((int(x - 1), int(top), int(x + w + 1), int(bottom)), colours))
    return found


def find_colour_scales(
    rgb_uint8: np.ndarray,
    *,
    min_length: int = 24,
    min_aspect: float = 4.0,
    cross_tolerance: int = 6,
    max_samples: int = 256,
) -> list[ColourScale]:
    """Colour bars in a raster chart: long thin strips (long side >= min_aspect x short
    side, >= min_length px) that are constant across their short axis and whose colour
    walks along the long axis through at least 5 distinct steps in order (continuous or
    discrete bars). Returns them largest first.

    Limits: bars drawn with a gradient across their width, bars overlapped by tick marks
    or labels, and bars shorter than min_length are missed; a single column of heatmap
    cells that happens to be sorted looks like a discrete bar.
    """
    _check_image(rgb_uint8, None)
    import cv2

    red, green, blue = (float(v) for v in np.round(np.array(estimate_background(rgb_uint8)) * 255.0))
    not_background = _largest_channel(cv2.absdiff(rgb_uint8, (red, green, blue, 0.0))) > cross_tolerance
    scales = []
    # Horizontal bars are vertical ones of the transposed image; only the mask is transposed.
    for orientation, image, candidate in (
        ("vertical", rgb_uint8, _bar_candidates(rgb_uint8, not_background, 1, cross_tolerance)),
        ("horizontal", rgb_uint8.transpose(1, 0, 2), _bar_candidates(rgb_uint8, not_background, 0, cross_tolerance).T),
    ):
        for (c0, r0, c1, r1), colours in _bars_along_columns(image, candidate, min_length, min_aspect):
            if orientation == "vertical":
                bbox = (c0, r0, c1, r1)
                colours = colours[::-1]  # bottom to top
            else:
                bbox = (r0, c0, r1, c1)
            if len(colours) > max_samples:
                colours = colours[np.linspace(0, len(colours) - 1, max_samples).round().astype(int)]
            scales.append(ColourScale(bbox=bbox, orientation=orientation, colours=colours))
    scales.sort(key=lambda s: -(s.bbox[2] - s.bbox[0]) * (s.bbox[3] - s.bbox[1]))
    return scales


def continuous_fill_scale(
    rgb_uint8: np.ndarray,
    mask: np.ndarray | None = None,
    *,
    min_share: float = 0.002,
    cluster_de: float = 3.0,
    max_colours: int = 256,
    min_interior: float = 0.5,
) -> np.ndarray:
    """Best-effort colour scale of a heatmap-like image that has no colour bar.

    The distinct fill colours (clusters within `cluster_de`, CIE76) whose pixels are
    mostly interior (>= `min_interior`: cells, not text, axes or blends; greys kept, a
    grey scale is a scale) and that cover `min_share` of the foreground are ordered
    along their principal curve in CIELAB by nearest-neighbour chaining, starting from
    the colour farthest from the others' mean.
    Returns Nx3 sRGB 0..1 (possibly empty), direction arbitrary.

    Limits: only the colours actually present are seen, so a heatmap using a narrow band
    of its scale shows only that band; cyclic scales (hsv) and scales whose ends meet in
    colour chain badly; bold text or thick legend swatches can pass as fills unless `mask`
    excludes them.
    """
    _check_image(rgb_uint8, mask)
    clusters = _colour_clusters(rgb_uint8, mask, max_colours, min_share, cluster_de, blend_tolerance=12.0)
    if clusters is None:
        return np.zeros((0, 3))
    # Fills have an inside; text, axes, tick marks and blends hardly do.
    fills = (
        ~clusters.is_blend
        & (clusters.interior_fraction >= min_interior)
        & (clusters.pixels >= min_share * clusters.pixels.sum())
    )
    if not fills.any():
        return np.zeros((0, 3))
    rgb = clusters.rgb[fills] / 255.0
    lab = srgb_to_lab(rgb)
    start = int(np.linalg.norm(lab - lab.mean(axis=0), axis=1).argmax())
    order = [start]
    remaining = np.ones(len(lab), dtype=bool)
    remaining[start] = False
    while remaining.any():
        candidates = np.flatnonzero(remaining)
        nearest = candidates[np.linalg.norm(lab[candidates] - lab[order[-1]], axis=1).argmin()]
        order.append(int(nearest))
        remaining[nearest] = False
    return rgb[order]
