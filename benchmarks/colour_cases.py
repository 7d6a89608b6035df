"""Charts with known colour, text and reproduction truth: the fixture generator of the
colour/text/quality tests and of benchmarks/colour_quality.py.

Each case is a matplotlib chart drawn from a seeded random spec. Its truth names the
expected outcome of the rules it decides (colormap-rainbow, palette-cvd, text-contrast,
text-size; raster-compression when rendered as a raster). Truth comes from what is drawn,
with a margin around every threshold (sizes, ratios, colour differences), so a miss is the
measurement's, not a coin toss at the limit. Names and numbers are invented.

Renderings: vector_figure (matplotlib PDF placed on a PyMuPDF page with show_pdf_page, read
back with vector_evidence and rendered at 150 dpi) and raster_figure (PNG or JPEG pixels at a
chosen ppi, with a bbox in points consistent with it).
"""

from __future__ import annotations

import io
from dataclasses import dataclass, field
from typing import Any, Callable

import numpy as np

from corpusaudit.measure import colour as cm

RENDER_DPI = 150
RAINBOW_MAPS = ("jet", "hsv", "rainbow", "turbo", "gist_rainbow", "nipy_spectral")
SAFE_MAPS = ("viridis", "plasma", "inferno", "magma", "cividis", "Greys", "Blues", "Greens", "Oranges", "Purples",
             "YlOrRd", "YlGnBu", "RdBu", "coolwarm", "PuOr", "BrBG", "PiYG", "cubehelix")
STYLES = ("default", "seaborn-v0_8-whitegrid", "bmh", "ggplot", "seaborn-v0_8-ticks", "classic")
CVD_THRESHOLD = 8.0  # palette-cvd's default min_de00
_SYLLABLES = ("ka", "lo", "mi", "ren", "sa", "tor", "vel", "qu", "ni", "bo", "zan", "fe", "ul", "dra", "pim")


@dataclass
class ColourCase:
    name: str
    chart_type: str
    draw: Callable[[Any], None]  # draws on a matplotlib Figure
    truth: dict[str, bool]
    values: dict[str, Any] = field(default_factory=dict)
    style: str = "default"
    size: tuple[float, float] = (5.0, 3.5)
    text_colour: str = "#000000"
    background: str = "#ffffff"
    tick_size: float = 9.0
    label_size: float = 10.0


def invented_names(rng: np.random.Generator, n: int) -> list[str]:
    names: set[str] = set()
    while len(names) < n:
        names.add("".join(rng.choice(_SYLLABLES, size=rng.integers(2, 4))).capitalize())
    return sorted(names, key=lambda _: rng.random())


def hex_of(rgb) -> str:
    return "#" + "".join(f"{int(round(c * 255)):02x}" for c in rgb)


def min_simulated_de(rgb: np.ndarray) -> float:
    """Smallest CIEDE2000 difference of any pair under any full deficiency (Machado 2009)."""
    best = np.inf
    iu = np.triu_indices(len(rgb), k=1)
    for deficiency in cm.DEFICIENCIES:
        lab = cm.srgb_to_lab(cm.simulate_cvd(rgb, deficiency, 1.0))
        best = min(best, float(cm.delta_e_ciede2000(lab[:, None], lab[None])[iu].min()))
    return best


def categorical_palette(rng: np.random.Generator, k: int, confusable: bool) -> list[str]:
    """k chromatic colours, pairwise >= 20 dE00 apart; a pair below 0.5x the threshold under
    some deficiency (confusable) or every pair above 1.5x it under all three."""
    while True:
        rgb = rng.uniform(0.0, 1.0, (k, 3))
        lab = cm.srgb_to_lab(rgb)
        if (np.hypot(lab[:, 1], lab[:, 2]) < 30).any() or not (25 < lab[:, 0]).all() or (lab[:, 0] > 85).any():
            continue
        normal = cm.delta_e_ciede2000(lab[:, None], lab[None])[np.triu_indices(k, 1)]
        if normal.min() < 20:
            continue
        worst = min_simulated_de(rgb)
        if (confusable and worst < 0.5 * CVD_THRESHOLD) or (not confusable and worst > 1.5 * CVD_THRESHOLD):
            return [hex_of(c) for c in rgb]


def text_colour_for(rng: np.random.Generator, background: str, low: bool) -> tuple[str, float]:
    """A grey with a WCAG ratio against the background in 1.8..3.6 (low) or >= 6 (clear)."""
    bg = np.array([int(background[i:i + 2], 16) for i in (1, 3, 5)]) / 255.0
    while True:
        grey = float(rng.uniform(0.0, 1.0))
        ratio = float(cm.contrast_ratio(np.array([grey] * 3), bg))
        if (low and 1.8 <= ratio <= 3.6) or (not low and ratio >= 6.0):
            return hex_of([grey] * 3), ratio


# ------------------------------------------------------------------ families


def draw_rng(index: int) -> np.random.Generator:
    """Randomness used while drawing case index: the same on every rendering of the case
    (its vector and raster figures show one chart), whatever was rendered before."""
    return np.random.default_rng(index)


def scale_case(rng: np.random.Generator, index: int) -> ColourCase:
    """Heatmap, map or colour-coded scatter with a continuous colour map (and usually a bar)."""
    rainbow = bool(rng.random() < 0.45)
    cmap = str(rng.choice(RAINBOW_MAPS if rainbow else SAFE_MAPS))
    kind = str(rng.choice(["heatmap", "heatmap", "scatter", "map"]))
    with_bar = kind == "scatter" or bool(rng.random() < 0.85)
    rows, cols = int(rng.integers(8, 20)), int(rng.integers(8, 24))
    field_ = np.add.outer(np.sin(np.linspace(0, rng.uniform(2, 5), rows)),
                          np.cos(np.linspace(0, rng.uniform(2, 5), cols)))
    field_ += 0.3 * rng.standard_normal((rows, cols))
    mesh = bool(rng.random() < 0.5)
    n_points = int(rng.integers(60, 250))
    xy = rng.uniform(0, 10, (2, n_points))
    horizontal = bool(rng.random() < 0.3)

    def draw(fig):
        noise = draw_rng(index)
        ax = fig.add_subplot()
        if kind == "heatmap":
            artist = ax.pcolormesh(field_, cmap=cmap) if mesh else ax.imshow(field_, cmap=cmap, aspect="auto")
            ax.set_xlabel("Station")
            ax.set_ylabel("Week")
        elif kind == "scatter":
            artist = ax.scatter(xy[0], xy[1], c=xy[0] * xy[1] + noise.normal(0, 3, n_points), cmap=cmap, s=18)
            ax.set_xlabel("Depth (m)")
            ax.set_ylabel("Salinity")
        else:  # a map of invented cells: a jittered grid of polygons
            from matplotlib.collections import PolyCollection
            polys, vals = [], []
            for r in range(8):
                for c in range(10):
                    jitter = noise.uniform(-0.25, 0.25, (4, 2))
                    polys.append(np.array([[c, r], [c + 1, r], [c + 1, r + 1], [c, r + 1]]) + jitter)
                    vals.append(np.sin(r / 2.5) + np.cos(c / 3.0) + noise.normal(0, 0.2))
            artist = PolyCollection(polys, array=np.array(vals), cmap=cmap, edgecolors="white", linewidths=0.4)
            ax.add_collection(artist)
            ax.set_xlim(-0.5, 10.5)
            ax.set_ylim(-0.5, 8.5)
            ax.set_axis_off()
        if with_bar:
            fig.colorbar(artist, ax=ax, orientation="horizontal" if horizontal else "vertical")

    chart_type = "heatmap" if kind == "heatmap" else kind
    truth = {"colormap-rainbow": rainbow, "palette-cvd": False}
    return ColourCase(f"scale-{index}", chart_type, draw, truth, {"cmap": cmap, "colour_bar": with_bar})


def categorical_case(rng: np.random.Generator, index: int) -> ColourCase:
    """Bars, lines, pie or grouped scatter with a categorical palette of 2..5 colours."""
    kind = str(rng.choice(["bar", "line", "pie", "scatter"]))
    k = int(rng.integers(2, 6))
    confusable = bool(rng.random() < 0.5)
    palette = categorical_palette(rng, k, confusable)
    names = invented_names(rng, k)
    n = int(rng.integers(4, 8))
    data = rng.uniform(2, 10, (k, n))
    legend = bool(rng.random() < 0.6)

    def draw(fig):
        noise = draw_rng(index)
        ax = fig.add_subplot()
        if kind == "bar":
            width = 0.8 / k
            for s in range(k):
                ax.bar(np.arange(n) + s * width, data[s], width, color=palette[s], label=names[s])
            ax.set_xticks(np.arange(n) + 0.4 - width / 2, [str(2010 + i) for i in range(n)])
        elif kind == "line":
            for s in range(k):
                ax.plot(np.arange(n), np.cumsum(data[s]), color=palette[s], linewidth=2.2, label=names[s])
        elif kind == "pie":
            ax.pie(data[:, 0], colors=palette, labels=names, wedgeprops={"edgecolor": "white", "linewidth": 1})
        else:
            for s in range(k):
                centre = noise.uniform(2, 8, 2)
                points = centre + noise.normal(0, 1.0, (25, 2))
                ax.scatter(points[:, 0], points[:, 1], color=palette[s], s=40, label=names[s])
        if legend and kind != "pie":
            ax.legend(fontsize="small")

    truth = {"palette-cvd": confusable, "colormap-rainbow": False}
    return ColourCase(f"cat-{index}", kind, draw, truth, {"palette": palette})


FAMILIES = ((scale_case, 0.4), (categorical_case, 0.6))


def generate(count: int, seed: int = 20240611) -> list[ColourCase]:
    """count cases, deterministic for a seed; every case also decides text-contrast and text-size."""
    rng = np.random.default_rng(seed)
    weights = np.array([w for _, w in FAMILIES])
    cases = []
    for index in range(count):
        family = FAMILIES[int(rng.choice(len(FAMILIES), p=weights / weights.sum()))][0]
        case = family(rng, index)
        case.style = str(rng.choice(STYLES))
        case.size = (float(rng.uniform(4.5, 6.5)), float(rng.uniform(3.2, 4.5)))
        case.background = str(rng.choice(["#ffffff", "#ffffff", "#f6f3ec", "#eef2f6", "#1d232b"]))
        low_contrast = bool(rng.random() < 0.3)
        case.text_colour, ratio = text_colour_for(rng, case.background, low_contrast)
        small = bool(rng.random() < 0.3)
        case.tick_size = float(rng.uniform(3.5, 4.8) if small else rng.uniform(7.0, 11.0))
        case.label_size = float(max(case.tick_size, rng.uniform(7.5, 12.0)))
        case.truth["text-contrast"] = low_contrast
        case.truth["text-size"] = small
        case.values.update(text_ratio=ratio, tick_size=case.tick_size)
        cases.append(case)
    return cases


# ------------------------------------------------------------------ rendering


def render(case: ColourCase, backend_format: str, dpi: int) -> bytes:
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.style
    from matplotlib.figure import Figure as MplFigure

    text, bg = case.text_colour, case.background
    rc = {
        "pdf.fonttype": 42, "font.size": case.label_size, "xtick.labelsize": case.tick_size,
        "ytick.labelsize": case.tick_size, "legend.fontsize": case.tick_size, "axes.titlesize": case.label_size,
        "text.color": text, "axes.labelcolor": text, "xtick.labelcolor": text, "ytick.labelcolor": text,
        "axes.titlecolor": text, "figure.facecolor": bg, "savefig.facecolor": bg, "axes.facecolor": bg,
        "legend.facecolor": bg, "legend.framealpha": 1.0, "legend.edgecolor": "#999999",
        "axes.edgecolor": "#888888", "xtick.color": "#888888", "ytick.color": "#888888", "grid.color": "#bbbbbb",
    }
    with matplotlib.style.context(case.style), matplotlib.rc_context(rc):
        fig = MplFigure(figsize=case.size)
        case.draw(fig)
        buffer = io.BytesIO()
        fig.savefig(buffer, format=backend_format, dpi=dpi)
    return buffer.getvalue()


def vector_figure(case: ColourCase, dpi: int = RENDER_DPI, pdf: bytes | None = None):
    """The case as a vector figure: PDF placed on a page, read back as extraction would."""
    from corpusaudit.extract.vector_evidence import figure_from_chart_pdf

    return figure_from_chart_pdf(pdf or render(case, "pdf", 72), case.name + "-v", case.chart_type, dpi)


def jpeg_roundtrip(pixels: np.ndarray, quality: int) -> np.ndarray:
    import cv2

    ok, encoded = cv2.imencode(".jpg", np.ascontiguousarray(pixels[:, :, ::-1]), [cv2.IMWRITE_JPEG_QUALITY, quality])
    return np.ascontiguousarray(cv2.imdecode(encoded, cv2.IMREAD_COLOR)[:, :, ::-1])


def raster_figure(case: ColourCase, ppi: int = RENDER_DPI, jpeg_quality: int | None = None, source: str = "raster"):
    """The case as a raster drawn at ppi (PNG, or JPEG at jpeg_quality). source "raster":
    placed in a PDF at that ppi (bbox in points; native pixels kept); "image": an image file."""
    from PIL import Image

    from corpusaudit.model import Figure

    pixels = np.asarray(Image.open(io.BytesIO(render(case, "png", ppi))).convert("RGB"))
    if jpeg_quality is not None:
        pixels = jpeg_roundtrip(pixels, jpeg_quality)
    height, width = pixels.shape[:2]
    coding = "DCTDecode" if jpeg_quality is not None else "FlateDecode"
    if source == "image":
        return Figure(figure_id=case.name + "-i", document_id="bench", path=case.name + ".img", page=1, index=0,
                      bbox=(0, 0, width, height), source="image", width_px=width, height_px=height, pixels=pixels,
                      image_info={"format": "JPEG" if jpeg_quality is not None else "PNG"}, chart_type=case.chart_type)
    return Figure(figure_id=case.name + "-r", document_id="bench", path=case.name + ".pdf", page=1, index=0,
                  bbox=(0, 0, width * 72.0 / ppi, height * 72.0 / ppi), source="raster", width_px=width,
                  height_px=height, effective_ppi=float(ppi), pixels=pixels, native_pixels=pixels,
                  image_info={"filter": coding}, chart_type=case.chart_type)


def photo_pixels(rng: np.random.Generator, height: int = 420, width: int = 600) -> np.ndarray:
    """A synthetic continuous-tone 'photograph': multi-scale coloured noise, a soft horizon
    and grain. No real image; only its statistics resemble one."""
    import cv2

    image = np.zeros((height, width, 3))
    for scale in (64, 16, 4):
        noise = rng.standard_normal((height // scale + 2, width // scale + 2, 3))
        image += cv2.resize(noise, (width, height), interpolation=cv2.INTER_CUBIC) * (scale / 64.0) ** 0.5
    horizon = np.linspace(-1.0, 1.0, height)[:, None, None] * rng.uniform(0.5, 1.5, 3)
    image = 0.5 + 0.12 * image + 0.2 * horizon
    image += rng.normal(0, 0.015, image.shape)
    return (np.clip(image, 0, 1) * 255).astype(np.uint8)
