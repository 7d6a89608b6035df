"""Figures that are not charts: photos (clean, noisy, star fields), tables, flow diagrams, text and
document pages, equations, logos, UI screens, microscopy-like and material textures. Drawn with
Pillow, OpenCV and matplotlib's mathtext."""

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


def star_field(rng):
    """Astronomy-like frames: point sources whose brightness spans decades on a dark, noisy sky,
    sometimes with fuzzy galaxies, a nebular glow and diffraction spikes on the brightest stars."""
    w, h = c.figure_size(rng)
    img = np.full((h, w, 3), rng.uniform(0, 0.06), np.float32)
    if rng.random() < 0.5:
        glow = cv2.resize(rng.uniform(0, 1, (5, 5, 3)).astype(np.float32), (w, h), interpolation=cv2.INTER_CUBIC)
        img += np.clip(glow, 0, 1) ** 2 * rng.uniform(0.05, 0.4)
    n = int(rng.integers(20, 1500))
    flux = rng.pareto(1.3, n) + 0.05  # many faint sources, a few bright ones
    xs, ys = rng.integers(0, w, n), rng.integers(0, h, n)
    warmth = rng.uniform(0, 1, n)  # blue-white to orange, as stellar colours run
    colour = np.c_[0.75 + 0.25 * warmth, 0.8 + 0.1 * warmth, 1.0 - 0.45 * warmth]
    points = np.zeros((h, w, 3), np.float32)
    np.add.at(points, (ys, xs), flux[:, None] * colour)
    img += cv2.GaussianBlur(points, (0, 0), rng.uniform(0.6, 2.2)) * rng.uniform(2, 12)
    for _ in range(int(rng.integers(0, 12))):  # galaxies: tilted, fuzzy ellipses
        blob = np.zeros((h, w), np.float32)
        size = rng.uniform(2, 22)
        cv2.ellipse(blob, (int(rng.integers(0, w)), int(rng.integers(0, h))),
                    (int(size), max(1, int(size * rng.uniform(0.2, 1)))), float(rng.uniform(0, 180)), 0, 360, 1.0, -1)
        tint = np.array([rng.uniform(0.6, 1), rng.uniform(0.5, 0.9), rng.uniform(0.4, 1)], np.float32)
        img += cv2.GaussianBlur(blob, (0, 0), size / 2 + 1)[..., None] * tint * rng.uniform(0.3, 1.2)
    if rng.random() < 0.4:
        for k in np.argsort(flux)[-int(rng.integers(1, 6)):]:
            length = int(min(6 + flux[k] * rng.uniform(2, 6), 0.15 * max(w, h)))
            x, y = int(xs[k]), int(ys[k])
            cv2.line(img, (x - length, y), (x + length, y), (0.5, 0.5, 0.55), 1)
            cv2.line(img, (x, y - length), (x, y + length), (0.5, 0.5, 0.55), 1)
    img += rng.normal(0, rng.uniform(0.005, 0.04), img.shape).astype(np.float32)
    stretch = rng.uniform(2, 20)  # asinh display stretch, as sky images are shown
    img = np.arcsinh(np.clip(img, 0, None) * stretch) / np.arcsinh(stretch)
    if rng.random() < 0.3:
        img = np.repeat(img.mean(2, keepdims=True), 3, axis=2)
    return (np.clip(img, 0, 1) * 255).astype(np.uint8)


def texture(rng):
    """Material-like surfaces: marble or wood grain, woven cloth, pebbles, sand."""
    w, h = c.figure_size(rng)
    yy, xx = np.mgrid[0:h, 0:w].astype(np.float32)
    noise = cv2.GaussianBlur(rng.normal(0, 1, (h, w)).astype(np.float32), (0, 0), rng.uniform(3, 20))
    noise /= noise.std() + 1e-6
    kind = rng.choice(["marble", "wood", "weave", "pebbles", "sand"])
    if kind == "marble":
        v = np.sin((xx * np.cos(a := rng.uniform(0, np.pi)) + yy * np.sin(a)) * rng.uniform(0.02, 0.1) +
                   noise * rng.uniform(1, 4)) * 0.5 + 0.5
    elif kind == "wood":
        cx, cy = rng.uniform(-w, 2 * w), rng.uniform(-h, 2 * h)
        v = np.sin(np.hypot(xx - cx, (yy - cy) * rng.uniform(0.1, 1)) * rng.uniform(0.1, 0.5) + noise * 2) * 0.5 + 0.5
    elif kind == "weave":
        f = rng.uniform(0.2, 0.8)
        v = (np.sin(xx * f) * np.sin(yy * f) * 0.5 + 0.5) * 0.7 + noise * 0.05 + 0.15
    elif kind == "pebbles":
        seeds = np.full((h, w), 255, np.uint8)
        n = int(rng.integers(20, 400))
        seeds[rng.integers(0, h, n), rng.integers(0, w, n)] = 0
        dist = cv2.distanceTransform(seeds, cv2.DIST_L2, 5)
        v = 1 - np.clip(dist / (dist.max() + 1e-6), 0, 1) ** rng.uniform(0.5, 1.5) + noise * 0.08
    else:
        v = 0.6 + rng.normal(0, 0.15, (h, w)).astype(np.float32) + noise * 0.1
    v = cv2.GaussianBlur(np.clip(v, 0, 1).astype(np.float32), (0, 0), rng.uniform(0.3, 1.2))
    dark, light = np.sort(rng.uniform(0, 1, (2, 3)), axis=0)
    rgb = dark + v[..., None] * (light - dark)
    shade = np.linspace(rng.uniform(0.75, 1.0), rng.uniform(0.75, 1.0), w, dtype=np.float32)[None, :, None]
    return (np.clip(rgb * shade, 0, 1) * 255).astype(np.uint8)


def document(rng):
    """Part of a typeset page as scanned or rasterised: heading, one or two text columns, maybe a
    framed picture and a page number."""
    img, d, fg, bg = _page(rng, (int(rng.integers(300, 900)), int(rng.integers(300, 1100))))
    w, h = img.size
    body = c.random_font(rng, 7, 14)
    head = c.font(1, int(body.size * rng.uniform(1.3, 2.0)))
    margin = int(w * rng.uniform(0.04, 0.1))
    y = margin
    d.text((margin, y), c.sentence(rng, 2, 6), fill=fg, font=head)
    y += int(head.size * 1.8)
    columns = int(rng.choice([1, 1, 2]))
    gutter = int(w * 0.04)
    col_w = (w - 2 * margin - gutter * (columns - 1)) // columns
    picture = rng.random() < 0.35
    for k in range(columns):
        x, yy = margin + k * (col_w + gutter), y
        if picture and k == columns - 1:
            ph = int(h * rng.uniform(0.15, 0.3))
            crop = cv2.resize(photo(rng), (col_w, ph), interpolation=cv2.INTER_AREA)
            img.paste(Image.fromarray(crop), (x, yy))
            yy += ph + body.size
            d.text((x, yy), c.sentence(rng, 3, 7), fill=fg, font=body)
            yy += int(body.size * 2)
        while yy < h - margin - body.size:
            line = ""
            while d.textlength(line, font=body) < col_w * rng.uniform(0.85, 1.0):
                line += c.word(rng) + " "
            d.text((x, yy), line.strip(), fill=fg, font=body)
            yy += int(body.size * rng.uniform(1.25, 1.5))
    d.text((w // 2, h - margin // 2), str(int(rng.integers(1, 300))), fill=fg, font=body, anchor="mm")
    return np.asarray(img).copy()


def noisy_photo(rng):
    """A photo from a poor camera or a dim scene: sensor noise, vignetting, low light, motion blur."""
    img = (photo(rng) if rng.random() < 0.6 else procedural_photo(rng)).astype(np.float32)
    h, w = img.shape[:2]
    if rng.random() < 0.4:  # low light
        img *= rng.uniform(0.2, 0.6)
    if rng.random() < 0.4:
        k = int(rng.integers(3, 12))
        kernel = np.zeros((k, k), np.float32)
        kernel[k // 2] = 1.0 / k
        img = cv2.filter2D(img, -1, kernel)
    yy, xx = np.mgrid[0:h, 0:w].astype(np.float32)
    r = np.hypot((xx - w / 2) / (w / 2), (yy - h / 2) / (h / 2))
    img *= (1 - rng.uniform(0, 0.5) * np.clip(r, 0, 1.5) ** 2)[..., None]
    img += rng.normal(0, rng.uniform(4, 25), img.shape).astype(np.float32)
    if rng.random() < 0.3:  # salt and pepper
        mask = rng.random((h, w)) < rng.uniform(0.002, 0.02)
        img[mask] = rng.choice([0.0, 255.0], (int(mask.sum()), 1))
    return np.clip(img, 0, 255).astype(np.uint8)


DRAWERS = (photo, photo, photo, procedural_photo, procedural_photo, noisy_photo, star_field, texture, document,
           table, text_block, equation, flow_diagram, logo, ui_screen, microscopy)


def render(rng: np.random.Generator) -> np.ndarray:
    return DRAWERS[int(rng.integers(0, len(DRAWERS)))](rng)
