"""Shared pieces of the training-data generator: palettes, invented words, fonts, augmentation.

Everything takes an explicit numpy Generator so that one numeric argument fixes every pixel.
"""

from __future__ import annotations

import io
from functools import lru_cache
from pathlib import Path

import cv2
import matplotlib
import numpy as np
from PIL import Image, ImageFont

FONT_DIR = Path(matplotlib.get_data_path()) / "fonts" / "ttf"
FONT_FILES = (
    "DejaVuSans.ttf", "DejaVuSans-Bold.ttf", "DejaVuSerif.ttf", "DejaVuSansMono.ttf",
    "STIXGeneral.ttf", "STIXGeneralItalic.ttf", "cmr10.ttf", "cmss10.ttf", "DejaVuSerif-Italic.ttf",
)
MPL_FONT_FAMILIES = ("DejaVu Sans", "DejaVu Serif", "DejaVu Sans Mono", "STIXGeneral", "cmss10")

CATEGORICAL_MAPS = ("tab10", "Set1", "Set2", "Set3", "Dark2", "Paired", "Pastel1", "Accent", "tab20")
SEQUENTIAL_MAPS = ("viridis", "Blues", "Greens", "Reds", "magma", "cividis", "YlOrRd", "PuBu", "plasma",
                   "Oranges", "YlGnBu", "inferno", "BuPu")
DIVERGING_MAPS = ("RdBu", "coolwarm", "PiYG", "BrBG", "RdYlBu", "seismic")
RAINBOW_MAPS = ("jet", "rainbow", "turbo", "hsv", "gist_rainbow", "nipy_spectral")
GREY_MAPS = ("gray", "Greys", "binary", "bone")

SYLLABLES = ("ka", "lo", "mi", "ra", "ven", "tor", "sa", "bel", "un", "dra", "po", "ner", "qui", "fen",
             "zo", "tal", "mar", "ish", "ex", "ol", "dan", "ru", "vi", "gel", "hap", "sor")


def word(rng: np.random.Generator, lo: int = 1, hi: int = 3) -> str:
    """An invented word (no real names in generated data)."""
    return "".join(rng.choice(SYLLABLES, size=int(rng.integers(lo, hi + 1))))


def label(rng: np.random.Generator) -> str:
    w = word(rng)
    return w.capitalize() if rng.random() < 0.7 else w.upper()[:4]


def sentence(rng: np.random.Generator, n_lo: int = 3, n_hi: int = 9) -> str:
    words = [word(rng) for _ in range(int(rng.integers(n_lo, n_hi + 1)))]
    return " ".join(words).capitalize()


def colormap(name: str):
    return matplotlib.colormaps[name]


def palette(rng: np.random.Generator, n: int, kind: str | None = None) -> np.ndarray:
    """n RGB colours in 0..1 from a categorical, sequential, rainbow, grey or random palette."""
    kind = kind or str(rng.choice(["categorical", "categorical", "sequential", "rainbow", "grey", "random"]))
    if kind == "categorical":
        cmap = colormap(str(rng.choice(CATEGORICAL_MAPS)))
        count = cmap.N if cmap.N < 256 else 10
        start = int(rng.integers(0, count))
        return np.array([cmap(((start + i) % count) / max(count - 1, 1))[:3] for i in range(n)])
    if kind == "random":
        hues = (rng.random() + np.arange(n) / max(n, 1) + rng.normal(0, 0.02, n)) % 1.0
        sat = rng.uniform(0.35, 0.9)
        val = rng.uniform(0.55, 0.95)
        return np.array([cv2.cvtColor(np.uint8([[[h * 179, sat * 255, val * 255]]]), cv2.COLOR_HSV2RGB)[0, 0] / 255
                         for h in hues])
    names = {"sequential": SEQUENTIAL_MAPS, "rainbow": RAINBOW_MAPS, "grey": GREY_MAPS}[kind]
    cmap = colormap(str(rng.choice(names)))
    lo, hi = sorted(rng.uniform(0.1, 0.95, 2)) if kind != "rainbow" else (0.0, 0.95)
    if hi - lo < 0.3:
        lo, hi = 0.15, 0.85
    return np.array([cmap(v)[:3] for v in np.linspace(lo, hi, n)])


def continuous_map(rng: np.random.Generator) -> str:
    group = rng.choice(["seq", "seq", "div", "rainbow", "grey"])
    names = {"seq": SEQUENTIAL_MAPS, "div": DIVERGING_MAPS, "rainbow": RAINBOW_MAPS, "grey": GREY_MAPS}[str(group)]
    name = str(rng.choice(names))
    return name + "_r" if rng.random() < 0.25 else name


def background(rng: np.random.Generator) -> tuple[float, float, float]:
    r = rng.random()
    if r < 0.65:
        return (1.0, 1.0, 1.0)
    if r < 0.85:
        g = rng.uniform(0.88, 0.99)
        return tuple(np.clip(g + rng.normal(0, 0.02, 3), 0, 1))
    if r < 0.93:
        return tuple(rng.uniform(0.9, 1.0, 3))
    g = rng.uniform(0.05, 0.2)
    return (g, g, g + rng.uniform(0, 0.05))


def to_uint8(colour) -> tuple[int, int, int]:
    return tuple(int(round(float(c) * 255)) for c in colour[:3])


@lru_cache(maxsize=256)
def font(index: int, size: int) -> ImageFont.FreeTypeFont:
    return ImageFont.truetype(str(FONT_DIR / FONT_FILES[index % len(FONT_FILES)]), size)


def random_font(rng: np.random.Generator, lo: int = 9, hi: int = 22) -> ImageFont.FreeTypeFont:
    return font(int(rng.integers(0, len(FONT_FILES))), int(rng.integers(lo, hi + 1)))


def figure_size(rng: np.random.Generator) -> tuple[int, int]:
    """Pixel size of a figure: 180..900 px wide, aspect 0.45..1.6 (height/width)."""
    width = int(rng.integers(180, 900))
    aspect = float(np.exp(rng.uniform(np.log(0.45), np.log(1.5))))
    return width, max(120, int(width * aspect))


def scatter_points(rng, m):
    """One group of points: a linear or curved relation, a shapeless cloud or a few clusters."""
    kind = rng.choice(["linear", "linear", "curve", "cloud", "clusters"])
    if kind == "clusters":
        centres = rng.uniform(-5, 5, (int(rng.integers(2, 5)), 2))
        pick = rng.integers(0, len(centres), m)
        spread = rng.uniform(0.3, 1.5)
        return centres[pick, 0] + rng.normal(0, spread, m), centres[pick, 1] + rng.normal(0, spread, m)
    x = rng.normal(rng.uniform(-5, 5), rng.uniform(0.5, 3), m) if rng.random() < 0.7 else rng.uniform(-5, 5, m)
    if kind == "cloud":
        return x, rng.normal(0, rng.uniform(1, 5), m)
    if kind == "linear":
        signal = x * rng.uniform(-2, 2)
    else:
        signal = rng.uniform(-0.6, 0.6) * x ** 2 + rng.uniform(-2, 2) * x
    # noise in proportion to the signal: a scatter shows a relation, not a curve traced by points
    return x, signal + rng.normal(0, rng.uniform(0.15, 0.8) * signal.std() + 0.2, m)


def augment(rgb: np.ndarray, rng: np.random.Generator, strength: float = 1.0) -> np.ndarray:
    """Degradations seen in real corpora: rotation, scan noise, blur, grey, downscaling, JPEG, margins."""
    img = rgb
    h, w = img.shape[:2]
    p = lambda q: rng.random() < q * strength  # noqa: E731 - tiny local helper
    if p(0.25):  # extra margins or a tight crop, as extraction boxes vary
        if rng.random() < 0.6:
            pad = [int(rng.integers(0, max(2, int(s * 0.12)))) for s in (h, h, w, w)]
            img = cv2.copyMakeBorder(img, pad[0], pad[1], pad[2], pad[3], cv2.BORDER_REPLICATE)
        else:
            t, b = int(rng.integers(0, h // 20 + 1)), int(rng.integers(0, h // 20 + 1))
            l, r = int(rng.integers(0, w // 20 + 1)), int(rng.integers(0, w // 20 + 1))
            img = img[t:h - b, l:w - r]
    if p(0.15):
        angle = rng.uniform(-3, 3)
        hh, ww = img.shape[:2]
        m = cv2.getRotationMatrix2D((ww / 2, hh / 2), angle, 1.0)
        img = cv2.warpAffine(img, m, (ww, hh), flags=cv2.INTER_LINEAR, borderMode=cv2.BORDER_REPLICATE)
    if p(0.2):
        scale = rng.uniform(0.35, 0.85)
        hh, ww = img.shape[:2]
        small = cv2.resize(img, (max(32, int(ww * scale)), max(32, int(hh * scale))), interpolation=cv2.INTER_AREA)
        img = small if rng.random() < 0.5 else cv2.resize(small, (ww, hh), interpolation=cv2.INTER_LINEAR)
    if p(0.15):
        k = int(rng.choice([3, 5]))
        img = cv2.GaussianBlur(img, (k, k), 0)
    if p(0.12):
        grey = cv2.cvtColor(img, cv2.COLOR_RGB2GRAY)
        img = np.repeat(grey[..., None], 3, axis=2)
    if p(0.12):  # scan-like: paper tint, noise, uneven illumination
        hh, ww = img.shape[:2]
        f = img.astype(np.float32)
        tint = np.array([rng.uniform(0.93, 1.0), rng.uniform(0.92, 1.0), rng.uniform(0.85, 1.0)], np.float32)
        shade = np.linspace(rng.uniform(0.9, 1.0), rng.uniform(0.9, 1.0), ww, dtype=np.float32)[None, :, None]
        f = f * tint * shade + rng.normal(0, rng.uniform(2, 9), f.shape).astype(np.float32)
        img = np.clip(f, 0, 255).astype(np.uint8)
    if p(0.3):
        buf = io.BytesIO()
        Image.fromarray(img).save(buf, format="JPEG", quality=int(rng.integers(25, 95)))
        img = np.asarray(Image.open(io.BytesIO(buf.getvalue())).convert("RGB"))
    return np.ascontiguousarray(img)
