"""Charts drawn directly with Pillow and OpenCV primitives: a second look, so the model does not
learn matplotlib's rendering. Coordinates are computed here; no plotting library is involved."""

from __future__ import annotations

import cv2
import numpy as np
from PIL import Image, ImageDraw

from . import common as c


class Canvas:
    """A figure with a plot rectangle, data ranges and axis drawing."""

    def __init__(self, rng: np.random.Generator, size: tuple[int, int] | None = None):
        self.rng = rng
        self.supersample = 2 if rng.random() < 0.5 else 1
        w, h = size or c.figure_size(rng)
        self.w, self.h = w * self.supersample, h * self.supersample
        self.bg = c.background(rng)
        self.dark = sum(self.bg) < 1.5
        self.fg = (0.9, 0.9, 0.9) if self.dark else tuple(rng.uniform(0, 0.35, 1).repeat(3))
        self.image = Image.new("RGB", (self.w, self.h), c.to_uint8(self.bg))
        self.draw = ImageDraw.Draw(self.image)
        s = self.supersample
        self.font = c.random_font(rng, max(7, int(min(w, h) / 40)), max(9, int(min(w, h) / 18)))
        self.font = c.font(int(rng.integers(0, len(c.FONT_FILES))), int(self.font.size * s))
        title = rng.random() < 0.55
        legend_right = rng.random() < 0.2
        self.left = int(self.w * rng.uniform(0.08, 0.2))
        self.right = int(self.w * (1 - rng.uniform(0.03, 0.08) - (0.18 if legend_right else 0)))
        self.top = int(self.h * rng.uniform(0.04, 0.1) + (self.font.size * 1.8 if title else 0))
        self.bottom = int(self.h * (1 - rng.uniform(0.1, 0.2)))
        self.legend_right = legend_right
        self.line_w = max(1, int(s * rng.choice([1, 1, 2])))
        if title:
            text = c.sentence(rng, 2, 6)
            x = self.w // 2 - int(self.draw.textlength(text, font=self.font)) // 2 if rng.random() < 0.7 else self.left
            self.draw.text((x, int(self.h * 0.02)), text, fill=c.to_uint8(self.fg), font=self.font)

    # data -> pixels
    def set_range(self, x0, x1, y0, y1):
        self.x0, self.x1, self.y0, self.y1 = float(x0), float(x1), float(y0), float(y1)

    def px(self, x, y):
        x = self.left + (np.asarray(x, float) - self.x0) / (self.x1 - self.x0) * (self.right - self.left)
        y = self.bottom - (np.asarray(y, float) - self.y0) / (self.y1 - self.y0) * (self.bottom - self.top)
        return x, y

    def text(self, xy, s, anchor="mm", colour=None):
        self.draw.text(xy, s, fill=c.to_uint8(colour or self.fg), font=self.font, anchor=anchor)

    def axes(self, x_labels=None, y_labels=None, x_numeric=True, y_numeric=True, grid=None, frame=None):
        rng, d = self.rng, self.draw
        grid = rng.choice(["none", "y", "both", "both", "x"]) if grid is None else grid
        frame = rng.choice(["lb", "lb", "box", "l", "none", "none"]) if frame is None else frame
        grid_col = c.to_uint8(np.clip(np.asarray(self.bg) * rng.uniform(0.55, 0.93) + (0.1 if self.dark else 0), 0, 1))
        if rng.random() < 0.15:  # plot-area fill (ggplot-like)
            fill = c.to_uint8(np.clip(np.asarray(self.bg) * 0.92, 0, 1))
            d.rectangle([self.left, self.top, self.right, self.bottom], fill=fill)
            grid_col = c.to_uint8(self.bg)
        ticks_x = np.linspace(self.x0, self.x1, int(rng.integers(4, 8))) if x_labels is None else None
        ticks_y = np.linspace(self.y0, self.y1, int(rng.integers(4, 8))) if y_labels is None else None
        fmt = lambda v: f"{v:.0f}" if abs(self.y1 - self.y0) > 8 else f"{v:.1f}"  # noqa: E731
        tick = int(4 * self.supersample)
        if ticks_y is not None:
            for v in ticks_y:
                _, y = self.px(self.x0, v)
                if grid in ("y", "both"):
                    d.line([(self.left, y), (self.right, y)], fill=grid_col, width=self.supersample)
                if y_numeric:
                    self.text((self.left - tick * 2, y), fmt(v), anchor="rm")
                    d.line([(self.left - tick, y), (self.left, y)], fill=c.to_uint8(self.fg), width=self.line_w)
        else:
            for pos, s in y_labels:
                _, y = self.px(self.x0, pos)
                self.text((self.left - tick * 2, y), s, anchor="rm")
        if ticks_x is not None:
            for v in ticks_x:
                x, _ = self.px(v, self.y0)
                if grid in ("x", "both"):
                    d.line([(x, self.top), (x, self.bottom)], fill=grid_col, width=self.supersample)
                if x_numeric:
                    self.text((x, self.bottom + tick * 2), f"{v:.0f}" if abs(self.x1 - self.x0) > 8 else f"{v:.1f}",
                              anchor="mt")
                    d.line([(x, self.bottom), (x, self.bottom + tick)], fill=c.to_uint8(self.fg), width=self.line_w)
        else:
            rotate = rng.random() < 0.2
            for pos, s in x_labels:
                x, _ = self.px(pos, self.y0)
                if rotate:
                    self._rotated_label(x, self.bottom + tick, s)
                else:
                    self.text((x, self.bottom + tick * 2), s, anchor="mt")
        # axis lines are often light grey or absent in web-rendered charts
        fg = c.to_uint8(self.fg) if rng.random() < 0.6 else grid_col
        if frame in ("lb", "box", "l"):
            d.line([(self.left, self.top), (self.left, self.bottom)], fill=fg, width=self.line_w)
        if frame in ("lb", "box"):
            d.line([(self.left, self.bottom), (self.right, self.bottom)], fill=fg, width=self.line_w)
        if frame == "box":
            d.line([(self.left, self.top), (self.right, self.top)], fill=fg, width=self.line_w)
            d.line([(self.right, self.top), (self.right, self.bottom)], fill=fg, width=self.line_w)

    def _rotated_label(self, x, y, s):
        size = self.font.getbbox(s)
        tile = Image.new("RGBA", (size[2] + 4, size[3] + 4), (0, 0, 0, 0))
        ImageDraw.Draw(tile).text((2, 2), s, fill=c.to_uint8(self.fg) + (255,), font=self.font)
        tile = tile.rotate(45, expand=True)
        self.image.paste(tile, (int(x - tile.width), int(y)), tile)

    def legend(self, names, colours):
        if self.rng.random() < 0.25:
            return
        box = int(self.font.size * 0.8)
        if self.legend_right:
            x, y = self.right + box, self.top + box
        else:
            x = int(self.rng.uniform(self.left + box, max(self.left + box + 1, self.right - 6 * box * 2)))
            y = self.top + box
        for name, colour in zip(names, colours):
            self.draw.rectangle([x, y, x + box, y + box], fill=c.to_uint8(colour))
            self.text((x + box * 1.5, y + box / 2), name, anchor="lm")
            y += int(box * 1.6)

    def finish(self) -> np.ndarray:
        img = self.image
        if self.supersample > 1:
            img = img.resize((self.w // self.supersample, self.h // self.supersample), Image.LANCZOS)
        return np.asarray(img).copy()


def _categories(rng, n):
    return [c.label(rng)[:int(rng.integers(2, 8))] for _ in range(n)]


def bar(rng):
    cv = Canvas(rng)
    n, groups = int(rng.integers(2, 13)), int(rng.choice([1, 1, 2, 3]))
    stacked = groups > 1 and rng.random() < 0.5
    horizontal = rng.random() < 0.35
    values = rng.uniform(0.5, 10, (groups, n))
    top = values.sum(0).max() if stacked else values.max()
    colours = c.palette(rng, max(groups, 1))
    if groups == 1 and rng.random() < 0.3:
        colours = c.palette(rng, n)
    width = rng.uniform(0.4, 0.85)
    cats = [(i, s) for i, s in enumerate(_categories(rng, n))]
    if horizontal:
        cv.set_range(0, top * rng.uniform(1.0, 1.2), -0.6, n - 0.4)
        cv.axes(y_labels=cats, grid=rng.choice(["none", "x"]))
    else:
        cv.set_range(-0.6, n - 0.4, 0, top * rng.uniform(1.0, 1.2))
        cv.axes(x_labels=cats, grid=rng.choice(["none", "y"]))
    outline = c.to_uint8(cv.fg) if rng.random() < 0.25 else None
    base = np.zeros(n)
    for g in range(groups):
        for i in range(n):
            col = colours[i] if len(colours) == n and groups == 1 else colours[g]
            if stacked:
                lo, hi, a, b = base[i], base[i] + values[g, i], i - width / 2, i + width / 2
            else:
                w = width / groups
                lo, hi, a, b = 0, values[g, i], i - width / 2 + g * w, i - width / 2 + (g + 1) * w
            if horizontal:
                x0, x1, y0, y1 = cv.px(lo, a)[0], cv.px(hi, b)[0], cv.px(lo, b)[1], cv.px(lo, a)[1]
            else:
                x0, x1 = cv.px(a, 0)[0], cv.px(b, 0)[0]
                y1, y0 = cv.px(0, lo)[1], cv.px(0, hi)[1]
            cv.draw.rectangle([float(x0), float(y0), float(x1), float(y1)], fill=c.to_uint8(col), outline=outline)
        base += values[g]
    if groups > 1:
        cv.legend(_categories(rng, groups), colours)
    return cv.finish()


def histogram(rng):
    cv = Canvas(rng)
    data = rng.normal(0, 1, int(rng.integers(200, 3000)))
    if rng.random() < 0.4:
        data = np.exp(data * rng.uniform(0.2, 0.7))
    elif rng.random() < 0.3:
        data = np.concatenate([data, rng.normal(rng.uniform(2, 4), 0.7, data.size // 2)])
    counts, edges = np.histogram(data, bins=int(rng.integers(8, 50)))
    edges = edges * rng.uniform(1, 50) + rng.uniform(-20, 100)
    cv.set_range(edges[0] - (edges[-1] - edges[0]) * 0.03, edges[-1] + (edges[-1] - edges[0]) * 0.03, 0,
                 counts.max() * rng.uniform(1.02, 1.2))
    cv.axes(grid=rng.choice(["none", "y", "both"]))
    colour = c.to_uint8(c.palette(rng, 1)[0])
    outline = rng.choice(["none", "bg", "fg"])
    out = {"none": None, "bg": c.to_uint8(cv.bg), "fg": c.to_uint8(cv.fg)}[str(outline)]
    for k, count in enumerate(counts):
        x0, y0 = cv.px(edges[k], count)
        x1, y1 = cv.px(edges[k + 1], 0)
        cv.draw.rectangle([float(x0), float(y0), float(x1), float(y1)], fill=colour, outline=out)
    return cv.finish()


def _series(rng, n):
    y = np.cumsum(rng.normal(0, 1, n)) if rng.random() < 0.6 else \
        np.sin(np.arange(n) / rng.uniform(2, 15) + rng.uniform(0, 6)) * rng.uniform(1, 4) + rng.normal(0, 0.3, n)
    return y


def _marker(draw, shape, x, y, r, col, width, fill_inside=None):
    box = [x - r, y - r, x + r, y + r]
    if shape == "circle":
        draw.ellipse(box, fill=col)
    elif shape == "square":
        draw.rectangle(box, fill=col)
    elif shape == "ring":
        draw.ellipse(box, outline=col, width=width, fill=fill_inside)
    elif shape == "hollow_square":
        draw.rectangle(box, outline=col, width=width, fill=fill_inside)
    elif shape == "triangle":
        draw.polygon([(x, y - r), (x + r, y + r * 0.8), (x - r, y + r * 0.8)], fill=col)
    else:
        draw.line([(box[0], y), (box[2], y)], fill=col, width=width)
        draw.line([(x, box[1]), (x, box[3])], fill=col, width=width)


def line(rng):
    cv = Canvas(rng)
    series, n = int(rng.choice([1, 1, 2, 3, 5])), int(rng.choice([8, 15, 30, 80, 200]))
    ys = np.array([_series(rng, n) + rng.uniform(-3, 3) for _ in range(series)])
    pad = (ys.max() - ys.min()) * 0.08 + 1e-6
    cv.set_range(0, n - 1, ys.min() - pad, ys.max() + pad)
    cv.axes()
    colours = c.palette(rng, series)
    width = int(cv.supersample * rng.choice([1, 2, 2, 3]))
    markers = n <= 30 and rng.random() < 0.5
    shape = rng.choice(["circle", "circle", "ring", "square", "hollow_square", "triangle"])
    r = cv.supersample * rng.uniform(2, 4.5)
    inside = c.to_uint8(cv.bg) if rng.random() < 0.6 else None
    for s in range(series):
        xs, yv = cv.px(np.arange(n), ys[s])
        pts = list(zip(xs.tolist(), yv.tolist()))
        cv.draw.line(pts, fill=c.to_uint8(colours[s]), width=width, joint="curve")
        if markers:
            for x, y in pts:
                _marker(cv.draw, shape, x, y, r, c.to_uint8(colours[s]), max(width, cv.supersample), inside)
    if series > 1:
        cv.legend(_categories(rng, series), colours)
    return cv.finish()


def area(rng):
    cv = Canvas(rng)
    series, n = int(rng.choice([1, 1, 2, 3, 4])), int(rng.integers(10, 100))
    ys = np.abs(np.array([_series(rng, n) for _ in range(series)])) + 0.5
    stacked = series > 1 and rng.random() < 0.6
    tops = np.cumsum(ys, 0) if stacked else ys
    cv.set_range(0, n - 1, 0, tops.max() * rng.uniform(1.02, 1.15))
    cv.axes()
    colours = c.palette(rng, series)
    layer = Image.new("RGBA", cv.image.size, (0, 0, 0, 0))
    ld = ImageDraw.Draw(layer)
    alpha = int(255 * (rng.uniform(0.75, 1.0) if stacked or series == 1 else rng.uniform(0.35, 0.6)))
    for s in range(series):
        lower = tops[s - 1] if stacked and s > 0 else np.zeros(n)
        xs, yt = cv.px(np.arange(n), tops[s])
        _, yb = cv.px(np.arange(n), lower)
        poly = list(zip(xs.tolist(), yt.tolist())) + list(zip(xs[::-1].tolist(), yb[::-1].tolist()))
        ld.polygon(poly, fill=c.to_uint8(colours[s]) + (alpha,))
        if rng.random() < 0.5:
            ld.line(list(zip(xs.tolist(), yt.tolist())), fill=c.to_uint8(colours[s] * 0.7) + (255,),
                    width=cv.supersample)
        if not stacked and series > 1:
            cv.image.paste(layer, (0, 0), layer)
            layer = Image.new("RGBA", cv.image.size, (0, 0, 0, 0))
            ld = ImageDraw.Draw(layer)
    cv.image.paste(layer, (0, 0), layer)
    if series > 1:
        cv.legend(_categories(rng, series), colours)
    return cv.finish()


def scatter(rng):
    cv = Canvas(rng)
    groups = int(rng.choice([1, 1, 2, 3]))
    n = int(rng.choice([6, 10, 15, 30, 60, 200, 800, 2500]))
    bubble = rng.random() < 0.2
    log_y = rng.random() < 0.15  # values over decades: points crowd at one end of a linear axis
    pts = []
    for g in range(groups):
        m = max(4, n // groups)
        x, y = c.scatter_points(rng, m)
        if log_y and rng.random() < 0.5:
            y = np.exp(y - y.max())
        pts.append((x, y))
    allx = np.concatenate([p[0] for p in pts])
    ally = np.concatenate([p[1] for p in pts])
    padx, pady = np.ptp(allx) * 0.06 + 0.1, np.ptp(ally) * 0.06 + 0.1
    cv.set_range(allx.min() - padx, allx.max() + padx, ally.min() - pady, ally.max() + pady)
    cv.axes()
    colours = c.palette(rng, groups)
    layer = Image.new("RGBA", cv.image.size, (0, 0, 0, 0))
    ld = ImageDraw.Draw(layer)
    alpha = int(255 * rng.uniform(0.4, 1.0))
    shape = rng.choice(["circle", "circle", "square", "ring", "ring", "ring", "hollow_square", "cross", "triangle"])
    base_r = cv.supersample * (rng.uniform(1.2, 5) if not bubble else 1)
    inside = c.to_uint8(cv.bg) + (255,) if rng.random() < 0.3 else None
    for g, (x, y) in enumerate(pts):
        xs, ys = cv.px(x, y)
        radii = rng.uniform(4, 22, xs.size) * cv.supersample if bubble else np.full(xs.size, base_r)
        col = c.to_uint8(colours[g]) + (alpha,)
        for px_, py_, r in zip(xs, ys, radii):
            _marker(ld, shape, px_, py_, r, col, cv.supersample, inside)
    cv.image.paste(layer, (0, 0), layer)
    if rng.random() < 0.3:  # a fitted trend line over the points
        coef = np.polyfit(allx, ally, int(rng.choice([1, 1, 2])))
        gx = np.linspace(allx.min(), allx.max(), 40)
        xs, ys = cv.px(gx, np.polyval(coef, gx))
        colour = c.to_uint8(cv.fg) if rng.random() < 0.5 else c.to_uint8(c.palette(rng, 1)[0])
        cv.draw.line(list(zip(xs.tolist(), ys.tolist())), fill=colour, width=cv.supersample * int(rng.integers(1, 3)))
    if groups > 1:
        cv.legend(_categories(rng, groups), colours)
    return cv.finish()


def box(rng):
    cv = Canvas(rng)
    groups = int(rng.choice([2, 2, 3, 3, 4, 5, 6, 8, 10]))  # two or three groups are common: few marks
    data = [rng.normal(rng.uniform(0, 10), rng.uniform(0.5, 3), 80) for _ in range(groups)]
    outliers = rng.random() < 0.6
    lo = min(d.min() for d in data) - 1
    hi = max(d.max() for d in data) + 1
    vertical = rng.random() < 0.75
    cats = [(i, s) for i, s in enumerate(_categories(rng, groups))]
    if vertical:
        cv.set_range(-0.6, groups - 0.4, lo, hi)
        cv.axes(x_labels=cats, grid=rng.choice(["none", "y"]))
    else:
        cv.set_range(lo, hi, -0.6, groups - 0.4)
        cv.axes(y_labels=cats, grid=rng.choice(["none", "x"]))
    colours = c.palette(rng, groups)
    filled = rng.random() < 0.6
    borderless = rng.random() < 0.4  # flat boxes with a light median line, as some web libraries draw them
    width = rng.uniform(0.06, 0.4)  # half-width per category: from thin strips to wide boxes
    caps = rng.random() < 0.6  # whisker caps: some libraries draw them, some (ggplot2's default) do not
    fg = c.to_uint8(cv.fg)
    lw = cv.line_w
    for i, d in enumerate(data):
        q1, med, q3 = np.percentile(d, [25, 50, 75])
        iqr = q3 - q1
        wl, wh = max(d.min(), q1 - 1.5 * iqr), min(d.max(), q3 + 1.5 * iqr)

        def seg(p0, v0, p1, v1, colour=fg):
            a, b = (cv.px(p0, v0), cv.px(p1, v1)) if vertical else (cv.px(v0, p0), cv.px(v1, p1))
            cv.draw.line([(float(a[0]), float(a[1])), (float(b[0]), float(b[1]))], fill=colour, width=lw)

        a, b = (cv.px(i - width, q3), cv.px(i + width, q1)) if vertical else (cv.px(q1, i + width), cv.px(q3, i - width))
        rect = [float(min(a[0], b[0])), float(min(a[1], b[1])), float(max(a[0], b[0])), float(max(a[1], b[1]))]
        cv.draw.rectangle(rect, fill=c.to_uint8(colours[i]) if filled else None,
                          outline=None if filled and borderless else fg, width=lw)
        seg(i - width, med, i + width, med, c.to_uint8(cv.bg) if filled and borderless else fg)
        seg(i, q3, i, wh)
        seg(i, q1, i, wl)
        if caps:
            seg(i - width / 2, wh, i + width / 2, wh)
            seg(i - width / 2, wl, i + width / 2, wl)
        if outliers:
            extra = np.concatenate([rng.uniform(wh + 0.2, hi, int(rng.integers(0, 4))),
                                    rng.uniform(lo, wl - 0.2, int(rng.integers(0, 4)))])
            r = 2.5 * cv.supersample
            for v in extra:
                x, y = cv.px(i, v) if vertical else cv.px(v, i)
                cv.draw.ellipse([float(x - r), float(y - r), float(x + r), float(y + r)], outline=fg, width=lw)
    return cv.finish()


def pie(rng):
    w, h = c.figure_size(rng)
    cv = Canvas(rng, (w, h))
    n = int(rng.integers(2, 10))
    values = rng.dirichlet(np.ones(n) * rng.uniform(0.7, 4))
    colours = c.palette(rng, n)
    cx = cv.w * rng.uniform(0.35, 0.6)
    cy = (cv.top + cv.h) / 2
    r = min(cv.w * 0.35, (cv.h - cv.top) * 0.42) * rng.uniform(0.7, 1.0)
    squash = rng.uniform(0.45, 0.7) if rng.random() < 0.15 else 1.0
    depth = r * rng.uniform(0.1, 0.25) if squash < 1 else 0
    start = rng.uniform(0, 360)
    explode = rng.random() < 0.2
    edge = c.to_uint8(cv.bg) if rng.random() < 0.5 else (c.to_uint8(cv.fg) if rng.random() < 0.3 else None)
    for layer in ([depth, 0] if depth else [0]):
        a = start
        for v, col in zip(values, colours):
            sweep = v * 360
            off = r * 0.08 * explode * (rng.random() < 0.5) if layer == 0 else 0
            mid = np.deg2rad(a + sweep / 2)
            ox, oy = off * np.cos(mid), off * np.sin(mid) * squash
            box = [cx - r + ox, cy - r * squash + oy + layer, cx + r + ox, cy + r * squash + oy + layer]
            colour = np.asarray(col) * (0.65 if layer else 1.0)
            cv.draw.pieslice(box, a, a + sweep, fill=c.to_uint8(colour), outline=None if layer else edge,
                             width=cv.supersample)
            a += sweep
    if rng.random() < 0.35:  # donut hole
        hole = r * rng.uniform(0.35, 0.65)
        cv.draw.ellipse([cx - hole, cy - hole * squash, cx + hole, cy + hole * squash], fill=c.to_uint8(cv.bg))
    if rng.random() < 0.5:
        a = start
        for v in values:
            mid = np.deg2rad(a + v * 180)
            cv.text((cx + r * 1.15 * np.cos(mid), cy + r * 1.15 * squash * np.sin(mid)), f"{v * 100:.0f}%")
            a += v * 360
    if rng.random() < 0.5:
        cv.legend(_categories(rng, n), colours)
    return cv.finish()


def heatmap(rng):
    cv = Canvas(rng)
    rows, cols = int(rng.integers(3, 30)), int(rng.integers(3, 30))
    m = rng.random((rows, cols))
    if rng.random() < 0.5:
        m = np.add.outer(np.linspace(0, 1, rows), np.linspace(0, rng.uniform(0, 1), cols)) + rng.normal(0, 0.2, m.shape)
    m = (m - m.min()) / (np.ptp(m) + 1e-9)
    cmap = c.colormap(c.continuous_map(rng))
    cv.set_range(0, cols, 0, rows)
    gap = cv.supersample * int(rng.choice([0, 0, 1, 2]))
    colours = (cmap(m)[..., :3] * 255).astype(np.uint8)
    for i in range(rows):
        for j in range(cols):
            x0, y1 = cv.px(j, i)
            x1, y0 = cv.px(j + 1, i + 1)
            cv.draw.rectangle([float(x0), float(y0), float(x1) - gap, float(y1) - gap], fill=tuple(colours[i, j].tolist()))
    labels_r = [(i + 0.5, s) for i, s in enumerate(_categories(rng, rows))] if rows <= 15 else None
    labels_c = [(j + 0.5, s) for j, s in enumerate(_categories(rng, cols))] if cols <= 12 else None
    cv.axes(x_labels=labels_c, y_labels=labels_r, grid="none", frame=rng.choice(["none", "box"]))
    if rng.random() < 0.7:  # colour bar on the right
        x = min(cv.w - 10 * cv.supersample, cv.right + 8 * cv.supersample)
        bar_w = 8 * cv.supersample
        for k in range(int(cv.bottom - cv.top)):
            col = cmap(1 - k / max(cv.bottom - cv.top, 1))[:3]
            cv.draw.line([(x, cv.top + k), (x + bar_w, cv.top + k)], fill=c.to_uint8(col))
    return cv.finish()


def region_labels(rng, h, w, n_regions):
    """A label raster of invented regions: warped Voronoi cells inside a random blob outline."""
    yy, xx = np.mgrid[0:h, 0:w].astype(np.float32)
    warp = rng.uniform(0.0, 0.04) * max(h, w)
    for k in range(3):
        fx, fy, ph = rng.uniform(1, 6, 2) / max(h, w) * 2 * np.pi, rng.uniform(0, 6), rng.uniform(0, 6)
        xx = xx + warp * np.sin(yy * fx[0] + ph) / (k + 1)
        yy = yy + warp * np.sin(xx * fx[1] + fy) / (k + 1)
    pts = rng.uniform(0, 1, (n_regions, 2)) * [w, h]
    d = (xx[..., None] - pts[:, 0]) ** 2 + (yy[..., None] - pts[:, 1]) ** 2
    labels = d.argmin(-1)
    angle = np.arctan2(yy - h / 2, xx - w / 2)
    radius = 0.42 + sum(rng.uniform(0, 0.06) * np.sin(k * angle + rng.uniform(0, 6)) for k in range(2, 8))
    dist = np.hypot((xx - w / 2) / (w / 2), (yy - h / 2) / (h / 2))
    inside = dist < radius * 2
    return labels, inside


def choropleth(rng):
    cv = Canvas(rng)
    w, h = cv.right - cv.left, cv.bottom - cv.top
    scale = 4
    labels, inside = region_labels(rng, h // scale + 1, w // scale + 1, int(rng.integers(8, 150)))
    labels = np.kron(labels, np.ones((scale, scale), int))[:h, :w]
    inside = np.kron(inside, np.ones((scale, scale), bool))[:h, :w]
    cmap = c.colormap(c.continuous_map(rng))
    values = rng.random(labels.max() + 1)
    if rng.random() < 0.3:
        values = np.floor(values * 5) / 4
    colours = (cmap(values)[:, :3] * 255).astype(np.uint8)
    patch = colours[labels]
    border = np.zeros_like(inside)
    border[:-1] |= labels[:-1] != labels[1:]
    border[:, :-1] |= labels[:, :-1] != labels[:, 1:]
    if cv.supersample > 1 or rng.random() < 0.5:
        border = cv2.dilate(border.astype(np.uint8), np.ones((2, 2), np.uint8)).astype(bool)
    edge = np.array(c.to_uint8(rng.choice([(1, 1, 1), (0.2, 0.2, 0.2), (0.5, 0.5, 0.5)])), np.uint8)
    patch[border] = edge
    sea = np.array(c.to_uint8(cv.bg if rng.random() < 0.7 else (0.82, 0.9, 0.97)), np.uint8)
    patch[~inside] = sea
    arr = np.asarray(cv.image).copy()
    arr[cv.top:cv.top + h, cv.left:cv.left + w] = patch
    cv.image = Image.fromarray(arr)
    cv.draw = ImageDraw.Draw(cv.image)
    if rng.random() < 0.7:  # legend: a colour ramp or a few classed boxes
        x, y = cv.left, cv.bottom + 4 * cv.supersample
        length = int(w * 0.5)
        for k in range(length):
            cv.draw.line([(x + k, y), (x + k, y + 8 * cv.supersample)], fill=c.to_uint8(cmap(k / length)[:3]))
        cv.text((x, y + 10 * cv.supersample), "0", anchor="lt")
        cv.text((x + length, y + 10 * cv.supersample), f"{rng.integers(10, 1000)}", anchor="rt")
    return cv.finish()


DRAWERS = {"bar": bar, "histogram": histogram, "line": line, "area": area, "scatter": scatter, "box": box,
           "pie": pie, "heatmap": heatmap, "map": choropleth}


def render(label: str, rng: np.random.Generator) -> np.ndarray:
    return DRAWERS[label](rng)
