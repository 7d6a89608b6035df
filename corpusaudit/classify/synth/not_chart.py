"""Figures that are not charts: photos, tables, flow diagrams, text, equations, logos, UI screens,
microscopy-like textures. Drawn with Pillow, OpenCV and matplotlib's mathtext."""

from __future__ import annotations

from functools import lru_cache

import cv2
import numpy as np
import skimage.data
from PIL import Image, ImageDraw

from . import common as c

# scikit-image sample images used for training; the benchmark keeps others aside for its unseen set.
TRAIN_PHOTOS = ("astronaut", "camera", "coffee", "chelsea", "brick", "grass", "gravel", "cell", "coins",
                "moon", "immunohistochemistry", "binary_blobs")


@lru_cache(maxsize=None)
def _photo(name: str) -> np.ndarray:
    img = getattr(skimage.data, name)()
    if img.dtype == bool:
        img = img.astype(np.uint8) * 255
    if img.ndim == 2:
        img = np.repeat(img[..., None], 3, axis=2)
    return np.ascontiguousarray(img[..., :3].astype(np.uint8))


def photo(rng):
    img = _photo(str(rng.choice(TRAIN_PHOTOS)))
    h, w = img.shape[:2]
    ch, cw = int(h * rng.uniform(0.4, 1.0)), int(w * rng.uniform(0.4, 1.0))
    y, x = int(rng.integers(0, h - ch + 1)), int(rng.integers(0, w - cw + 1))
    crop = img[y:y + ch, x:x + cw]
    if rng.random() < 0.5:
        crop = crop[:, ::-1]
    f = crop.astype(np.float32) * rng.uniform(0.7, 1.3) + rng.uniform(-30, 30)
    if rng.random() < 0.3:  # colour cast
        f = f * rng.uniform(0.8, 1.2, 3)
    out = np.clip(f, 0, 255).astype(np.uint8)
    scale = rng.uniform(0.5, 1.6)
    return cv2.resize(out, (max(64, int(cw * scale)), max(64, int(ch * scale))), interpolation=cv2.INTER_AREA)


def procedural_photo(rng):
    """Photo-like images that no chart resembles: smooth colour fields, texture, light sources."""
    w, h = c.figure_size(rng)
    low = cv2.resize(rng.uniform(0, 1, (4, 4, 3)).astype(np.float32), (w, h), interpolation=cv2.INTER_CUBIC)
    detail = cv2.GaussianBlur(rng.normal(0, 1, (h, w)).astype(np.float32), (0, 0), rng.uniform(0.5, 3))
    img = low * rng.uniform(0.3, 1.0) + detail[..., None] * rng.uniform(0.03, 0.15)
    if rng.random() < 0.4:  # a dark scene with bright points (night, sky, fluorescence)
        img = img * 0.25
        for _ in range(int(rng.integers(5, 300))):
            cv2.circle(img, (int(rng.integers(0, w)), int(rng.integers(0, h))), int(rng.integers(1, 4)),
                       tuple(float(v) for v in rng.uniform(0.6, 1.0, 3)), -1)
        img = cv2.GaussianBlur(img, (0, 0), rng.uniform(0.6, 1.5))
    for _ in range(int(rng.integers(0, 6))):  # blurred objects
        mask = np.zeros((h, w), np.float32)
        cv2.ellipse(mask, (int(rng.integers(0, w)), int(rng.integers(0, h))),
                    (int(rng.integers(10, w // 2 + 11)), int(rng.integers(10, h // 2 + 11))),
                    float(rng.uniform(0, 180)), 0, 360, 1.0, -1)
        mask = cv2.GaussianBlur(mask, (0, 0), rng.uniform(2, 12))[..., None]
        img = img * (1 - mask) + mask * rng.uniform(0, 1, 3).astype(np.float32)
    return (np.clip(img, 0, 1) * 255).astype(np.uint8)


def _page(rng, size=None):
    w, h = size or c.figure_size(rng)
    bg = c.background(rng) if rng.random() < 0.5 else (1.0, 1.0, 1.0)
    img = Image.new("RGB", (w, h), c.to_uint8(bg))
    fg = (0.92, 0.92, 0.92) if sum(bg) < 1.5 else tuple(np.full(3, rng.uniform(0, 0.3)))
    return img, ImageDraw.Draw(img), c.to_uint8(fg), c.to_uint8(bg)


def table(rng):
    img, d, fg, bg = _page(rng)
    w, h = img.size
    rows, cols = int(rng.integers(3, 16)), int(rng.integers(2, 8))
    font = c.random_font(rng, 8, 16)
    x0, y0 = int(w * rng.uniform(0.02, 0.08)), int(h * rng.uniform(0.02, 0.1))
    x1, y1 = w - x0, h - y0
    row_h = (y1 - y0) / rows
    col_w = (x1 - x0) / cols
    rules = rng.choice(["grid", "booktabs", "stripes", "none"])
    header_fill = c.to_uint8(c.palette(rng, 1, "grey")[0] * 0.3 + 0.7) if rng.random() < 0.4 else None
    for r in range(rows):
        top = y0 + r * row_h
        if rules == "stripes" and r % 2:
            d.rectangle([x0, top, x1, top + row_h], fill=c.to_uint8(np.array(bg) / 255 * 0.93))
        if r == 0 and header_fill:
            d.rectangle([x0, top, x1, top + row_h], fill=header_fill)
        for k in range(cols):
            text = c.label(rng) if r == 0 or k == 0 else (
                f"{rng.uniform(0, 1000):.{int(rng.integers(0, 3))}f}" if rng.random() < 0.8 else c.word(rng))
            d.text((x0 + k * col_w + 4, top + row_h / 2), text, fill=fg, font=font, anchor="lm")
        if rules == "grid" or (rules == "booktabs" and r in (0, 1)):
            d.line([(x0, top), (x1, top)], fill=fg, width=1 + (rules == "booktabs"))
    if rules == "grid":
        for k in range(cols + 1):
            d.line([(x0 + k * col_w, y0), (x0 + k * col_w, y1)], fill=fg)
    if rules in ("grid", "booktabs"):
        d.line([(x0, y1), (x1, y1)], fill=fg, width=1 + (rules == "booktabs"))
    return np.asarray(img).copy()


def text_block(rng):
    img, d, fg, _ = _page(rng)
    w, h = img.size
    font = c.random_font(rng, 8, 20)
    y = int(rng.integers(2, 20))
    margin = int(w * rng.uniform(0.02, 0.1))
    while y < h - font.size:
        line = ""
        while d.textlength(line, font=font) < (w - 2 * margin) * rng.uniform(0.75, 1.0):
            line += c.word(rng) + " "
        if rng.random() < 0.08:  # paragraph break or heading
            y += font.size
            line = c.sentence(rng, 2, 5)
        d.text((margin, y), line.strip(), fill=fg, font=font)
        y += int(font.size * rng.uniform(1.2, 1.7))
    return np.asarray(img).copy()


def equation(rng):
    """Typeset formulae with matplotlib's mathtext, a few per figure."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    w, h = c.figure_size(rng)
    fig = Figure(figsize=(w / 100, h / 100 * 0.6), dpi=100)
    FigureCanvasAgg(fig)
    v = [c.word(rng, 1, 1)[0] for _ in range(6)]
    forms = [rf"$\int_0^{{\infty}} {v[0]}(t)\,e^{{-{v[1]} t}}\,dt = \frac{{1}}{{{v[1]}^2}}$",
             rf"$\sum_{{k=1}}^{{n}} {v[2]}_k^2 \leq \left(\sum_k |{v[3]}_k|\right)^2$",
             rf"${v[0]} = \sqrt{{{v[1]}^2 + {v[2]}^2}}\quad (\alpha \neq \beta)$",
             rf"$\frac{{\partial {v[4]}}}{{\partial t}} = \nabla^2 {v[4]} + \lambda {v[5]}$",
             rf"$P({v[0]}|{v[1]}) = \frac{{P({v[1]}|{v[0]})P({v[0]})}}{{P({v[1]})}}$"]
    count = int(rng.integers(1, 4))
    for k in range(count):
        fig.text(rng.uniform(0.05, 0.3), 1 - (k + 0.7) / (count + 0.4), str(rng.choice(forms)),
                 fontsize=float(rng.uniform(10, 22)))
    fig.canvas.draw()
    return np.asarray(fig.canvas.buffer_rgba())[..., :3].copy()


def flow_diagram(rng):
    img, d, fg, _ = _page(rng)
    w, h = img.size
    font = c.random_font(rng, 8, 16)
    n = int(rng.integers(3, 9))
    fill = c.palette(rng, n, str(rng.choice(["categorical", "grey", "random"])))
    bw, bh = w * rng.uniform(0.12, 0.25), h * rng.uniform(0.08, 0.16)
    centres = []
    for k in range(n):
        cx = rng.uniform(bw / 2 + 4, w - bw / 2 - 4)
        cy = (k + 0.5) / n * h if rng.random() < 0.5 else rng.uniform(bh / 2 + 4, h - bh / 2 - 4)
        centres.append((cx, cy))
    for (ax, ay), (bx, by) in zip(centres[:-1], centres[1:]):
        d.line([(ax, ay), (bx, by)], fill=fg, width=2)
        ang = np.arctan2(by - ay, bx - ax)
        tip = (bx - np.cos(ang) * bh / 2, by - np.sin(ang) * bh / 2)
        d.polygon([tip, (tip[0] - 9 * np.cos(ang - 0.4), tip[1] - 9 * np.sin(ang - 0.4)),
                   (tip[0] - 9 * np.cos(ang + 0.4), tip[1] - 9 * np.sin(ang + 0.4))], fill=fg)
    shape = rng.choice(["rect", "round", "ellipse"])
    for k, (cx, cy) in enumerate(centres):
        box = [cx - bw / 2, cy - bh / 2, cx + bw / 2, cy + bh / 2]
        col = c.to_uint8(fill[k] * 0.4 + 0.6) if rng.random() < 0.7 else (255, 255, 255)
        if shape == "rect":
            d.rectangle(box, fill=col, outline=fg, width=2)
        elif shape == "round":
            d.rounded_rectangle(box, radius=int(bh / 4), fill=col, outline=fg, width=2)
        else:
            d.ellipse(box, fill=col, outline=fg, width=2)
        d.text((cx, cy), c.label(rng), fill=(20, 20, 20), font=font, anchor="mm")
    return np.asarray(img).copy()


def logo(rng):
    size = int(rng.integers(120, 500))
    img, d, _, _ = _page(rng, (size, int(size * rng.uniform(0.4, 1.0))))
    w, h = img.size
    colours = [c.to_uint8(col) for col in c.palette(rng, 3)]
    for k in range(int(rng.integers(1, 4))):
        cx, cy, r = w * rng.uniform(0.2, 0.4), h * rng.uniform(0.3, 0.7), h * rng.uniform(0.15, 0.35)
        shape = rng.choice(["circle", "triangle", "square", "star"])
        if shape == "circle":
            d.ellipse([cx - r, cy - r, cx + r, cy + r], fill=colours[k])
        elif shape == "square":
            d.rounded_rectangle([cx - r, cy - r, cx + r, cy + r], radius=int(r / 3), fill=colours[k])
        else:
            pts = 3 if shape == "triangle" else 10
            ang = np.linspace(0, 2 * np.pi, pts, endpoint=False) + rng.uniform(0, 6)
            rad = np.full(pts, r) if shape == "triangle" else np.where(np.arange(pts) % 2, r * 0.45, r)
            d.polygon(list(zip(cx + rad * np.cos(ang), cy + rad * np.sin(ang))), fill=colours[k])
    font = c.font(int(rng.integers(0, len(c.FONT_FILES))), int(h * rng.uniform(0.15, 0.3)))
    d.text((w * 0.55, h / 2), c.label(rng), fill=colours[-1], font=font, anchor="lm")
    return np.asarray(img).copy()


def ui_screen(rng):
    img, d, fg, bg = _page(rng)
    w, h = img.size
    font = c.random_font(rng, 8, 14)
    accent = c.to_uint8(c.palette(rng, 1, "categorical")[0])
    bar_h = int(h * rng.uniform(0.06, 0.12))
    d.rectangle([0, 0, w, bar_h], fill=accent if rng.random() < 0.6 else (60, 60, 70))
    for k in range(3):
        d.ellipse([8 + k * 16, bar_h / 2 - 5, 18 + k * 16, bar_h / 2 + 5], fill=(240, 240, 240))
    d.text((70, bar_h / 2), c.sentence(rng, 1, 3), fill=(255, 255, 255), font=font, anchor="lm")
    side = int(w * rng.uniform(0.15, 0.3)) if rng.random() < 0.6 else 0
    if side:
        d.rectangle([0, bar_h, side, h], fill=c.to_uint8(np.array(bg) / 255 * 0.92))
        for k in range(int((h - bar_h) / (font.size * 2.2))):
            d.text((10, bar_h + 10 + k * font.size * 2.2), c.label(rng), fill=fg, font=font)
    y = bar_h + 14
    while y < h - 40:
        kind = rng.choice(["field", "button", "text", "toggle"])
        x = side + 16
        if kind == "field":
            d.text((x, y), c.label(rng) + ":", fill=fg, font=font)
            d.rounded_rectangle([x + 90, y - 3, min(w - 10, x + 90 + w * 0.4), y + font.size + 5], radius=4,
                                outline=(170, 170, 170), fill=(255, 255, 255))
        elif kind == "button":
            d.rounded_rectangle([x, y - 3, x + 110, y + font.size + 8], radius=6, fill=accent)
            d.text((x + 55, y + font.size / 2 + 2), c.label(rng), fill=(255, 255, 255), font=font, anchor="mm")
        elif kind == "toggle":
            d.rounded_rectangle([x, y, x + 34, y + 16], radius=8, fill=accent)
            d.ellipse([x + 19, y + 1, x + 33, y + 15], fill=(255, 255, 255))
            d.text((x + 44, y), c.sentence(rng, 2, 4), fill=fg, font=font)
        else:
            d.text((x, y), c.sentence(rng, 4, 10), fill=fg, font=font)
        y += int(font.size * rng.uniform(2.2, 3.5))
    return np.asarray(img).copy()


def microscopy(rng):
    w, h = c.figure_size(rng)
    field = np.zeros((h, w), np.float32)
    n = int(rng.integers(5, 120))
    for _ in range(n):
        cx, cy = rng.uniform(0, w), rng.uniform(0, h)
        ax_, ay_ = rng.uniform(4, 30, 2)
        cv2.ellipse(field, (int(cx), int(cy)), (int(ax_), int(ay_)), float(rng.uniform(0, 180)), 0, 360,
                    float(rng.uniform(0.4, 1.0)), -1)
    field = cv2.GaussianBlur(field, (0, 0), rng.uniform(1, 4))
    noise = cv2.GaussianBlur(rng.normal(0, 1, (h, w)).astype(np.float32), (0, 0), rng.uniform(1, 8))
    field = np.clip(field + noise * rng.uniform(0.05, 0.3) + rng.normal(0, 0.03, (h, w)), 0, 1)
    mode = rng.choice(["fluor", "bright", "stain"])
    if mode == "fluor":
        tint = rng.choice([[0.1, 1, 0.2], [1, 0.2, 0.1], [0.2, 0.4, 1], [1, 1, 1]])
        rgb = field[..., None] * np.array(tint)
    elif mode == "bright":
        rgb = 1 - field[..., None] * np.array([0.5, 0.6, 0.4]) * rng.uniform(0.5, 1.2)
    else:
        rgb = 1 - field[..., None] * np.array([0.3, 0.7, 0.2]) - noise[..., None] * 0.05
    return (np.clip(rgb, 0, 1) * 255).astype(np.uint8)


DRAWERS = (photo, photo, photo, procedural_photo, procedural_photo, table, text_block, equation, flow_diagram, logo, ui_screen, microscopy)


def render(rng: np.random.Generator) -> np.ndarray:
    return DRAWERS[int(rng.integers(0, len(DRAWERS)))](rng)
