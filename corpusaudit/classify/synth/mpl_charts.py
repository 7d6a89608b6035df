"""Charts drawn with matplotlib (object API, Agg canvas: no global pyplot state)."""

from __future__ import annotations

import matplotlib

matplotlib.use("Agg")

import logging
import warnings

import matplotlib.style
import numpy as np
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.collections import PatchCollection
from matplotlib.figure import Figure
from matplotlib.patches import Polygon, Wedge
from scipy.spatial import Voronoi

from . import common as c

# cmss10 lacks a few glyphs (the minus and times signs of log-axis labels); a stand-in box is fine
# in training data, so the warning matplotlib logs for each one is noise.
logging.getLogger("matplotlib.mathtext").setLevel(logging.ERROR)

STYLES = ("default", "default", "default", "ggplot", "seaborn-v0_8-whitegrid", "seaborn-v0_8-darkgrid",
          "bmh", "classic", "fivethirtyeight", "grayscale", "seaborn-v0_8-ticks", "Solarize_Light2",
          "dark_background", "seaborn-v0_8-paper", "tableau-colorblind10", "fast")


def _numbers(rng, n, kind=None, scale=1.0):
    kind = kind or rng.choice(["uniform", "walk", "trend", "exp"])
    if kind == "uniform":
        v = rng.uniform(0.5, 10, n)
    elif kind == "walk":
        v = 20 + np.cumsum(rng.normal(0, 2, n))
    elif kind == "trend":
        v = np.linspace(rng.uniform(1, 5), rng.uniform(5, 20), n) + rng.normal(0, 1, n)
    else:
        v = rng.exponential(5, n) + 0.5
    return np.abs(v) * scale


def _categories(rng, n):
    kind = rng.random()
    if kind < 0.6:
        return [c.label(rng) for _ in range(n)]
    if kind < 0.8:
        return [f"Q{i % 4 + 1}" if rng.random() < 0.5 else f"G{i + 1}" for i in range(n)]
    start = int(rng.integers(1990, 2020))
    return [str(start + i) for i in range(n)]


def _decorate(ax, rng, title=True, legend=False):
    if title and rng.random() < 0.6:
        ax.set_title(c.sentence(rng, 2, 6), fontsize=float(rng.uniform(8, 16)))
    if rng.random() < 0.6:
        ax.set_xlabel(c.sentence(rng, 1, 3))
    if rng.random() < 0.6:
        ax.set_ylabel(c.sentence(rng, 1, 3))
    if rng.random() < 0.45:  # full grids are common (spreadsheet and web styles) and cross every mark
        ax.grid(True, axis=str(rng.choice(["both", "both", "x", "y"])), alpha=float(rng.uniform(0.3, 0.9)),
                linestyle=str(rng.choice(["-", "--", ":"])))
    if rng.random() < 0.25:
        for side in ("top", "right"):
            ax.spines[side].set_visible(False)
    if rng.random() < 0.2:  # faint or missing axis lines, as web renderers draw them
        for spine in ax.spines.values():
            spine.set_color(str(rng.choice(["0.8", "0.9", "none"])))
    if legend and rng.random() < 0.75:
        loc = str(rng.choice(["best", "upper right", "upper left", "lower right", "center left"]))
        if rng.random() < 0.25:
            ax.legend(loc="center left", bbox_to_anchor=(1.0, 0.5), fontsize=8, frameon=bool(rng.random() < 0.5))
        else:
            ax.legend(loc=loc, fontsize=float(rng.uniform(6, 10)), frameon=bool(rng.random() < 0.7))
    if rng.random() < 0.12:
        ax.annotate(c.word(rng), xy=(rng.uniform(0.2, 0.8), rng.uniform(0.2, 0.8)), xycoords="axes fraction",
                    xytext=(rng.uniform(0.1, 0.9), rng.uniform(0.1, 0.9)), textcoords="axes fraction",
                    arrowprops={"arrowstyle": "->"}, fontsize=8)


def bar(ax, rng):
    n = int(rng.integers(2, 13))
    groups = int(rng.choice([1, 1, 1, 2, 3, 4]))
    stacked = groups > 1 and rng.random() < 0.5
    horizontal = rng.random() < 0.35
    cats = _categories(rng, n)
    colours = c.palette(rng, max(groups, n if groups == 1 and rng.random() < 0.25 else 1))
    width = float(rng.uniform(0.35, 0.85))
    x = np.arange(n)
    base = np.zeros(n)
    scale = 10.0 ** int(rng.integers(-1, 4))
    edge = str(rng.choice(["none", "black", "white"])) if rng.random() < 0.4 else "none"
    for g in range(groups):
        v = _numbers(rng, n, "uniform", scale)
        colour = colours if len(colours) == n and groups == 1 else colours[g % len(colours)]
        if stacked:
            pos, w, off = x, width, base.copy()
        else:
            w = width / groups
            pos, off = x - width / 2 + w * (g + 0.5), 0
        draw = ax.barh if horizontal else ax.bar
        kw = {"left" if horizontal else "bottom": off}
        if horizontal:
            bars = draw(pos, v, height=w, color=colour, edgecolor=edge, label=c.label(rng), **kw)
        else:
            bars = draw(pos, v, width=w, color=colour, edgecolor=edge, label=c.label(rng), **kw)
        if rng.random() < 0.15 and not stacked:
            ax.bar_label(bars, fmt="%.0f", fontsize=7)
        base = base + v
    (ax.set_yticks if horizontal else ax.set_xticks)(x)
    rot = float(rng.choice([0, 0, 0, 30, 45, 90]))
    (ax.set_yticklabels if horizontal else ax.set_xticklabels)(cats, rotation=0 if horizontal else rot)
    _decorate(ax, rng, legend=groups > 1)


def histogram(ax, rng):
    n = int(rng.integers(150, 5000))
    kind = rng.choice(["normal", "lognormal", "bimodal", "exp", "uniform", "gamma"])
    if kind == "normal":
        data = rng.normal(rng.uniform(-50, 50), rng.uniform(1, 20), n)
    elif kind == "lognormal":
        data = rng.lognormal(rng.uniform(0, 2), rng.uniform(0.2, 0.8), n)
    elif kind == "bimodal":
        data = np.concatenate([rng.normal(0, 1, n // 2), rng.normal(rng.uniform(2, 5), 1, n // 2)])
    elif kind == "exp":
        data = rng.exponential(rng.uniform(1, 10), n)
    elif kind == "gamma":
        data = rng.gamma(rng.uniform(1.5, 6), 2, n)
    else:
        data = rng.uniform(0, 100, n) + rng.normal(0, 5, n)
    bins = int(rng.integers(8, 60))
    colour = c.palette(rng, 3)
    edge = str(rng.choice(["none", "none", "black", "white", "0.3"]))
    orientation = "horizontal" if rng.random() < 0.1 else "vertical"
    series = 2 if rng.random() < 0.2 else 1
    for s in range(series):
        d = data if s == 0 else data * rng.uniform(0.6, 1.2) + rng.uniform(-2, 2)
        histtype = "stepfilled" if rng.random() < 0.2 else "bar"
        ax.hist(d, bins=bins, color=colour[s], edgecolor=edge, linewidth=float(rng.uniform(0.3, 1.2)),
                alpha=0.6 if series > 1 else float(rng.uniform(0.75, 1.0)), histtype=histtype,
                orientation=orientation, density=bool(rng.random() < 0.3), label=c.label(rng))
    if rng.random() < 0.15 and orientation == "vertical":
        ax.axvline(float(np.median(data)), color="k", linestyle="--", linewidth=1)
    _decorate(ax, rng, legend=series > 1)


def line(ax, rng):
    series = int(rng.choice([1, 1, 2, 3, 4, 5, 7]))
    n = int(rng.choice([6, 10, 20, 40, 60, 100, 300]))
    x = np.arange(n) if rng.random() < 0.7 else np.sort(rng.uniform(0, 100, n))
    colours = c.palette(rng, series)
    marker = str(rng.choice(["", "", "o", "s", "^", ".", "D"])) if n <= 60 else ""
    hollow = bool(marker) and rng.random() < 0.35
    scale = 10.0 ** int(rng.integers(-1, 4))
    for s in range(series):
        y = _numbers(rng, n, str(rng.choice(["walk", "trend"])), scale) if rng.random() < 0.7 else \
            np.sin(x / rng.uniform(3, 20) + rng.uniform(0, 6)) * rng.uniform(1, 5) + rng.uniform(0, 10)
        face = {"markerfacecolor": str(rng.choice(["none", "white"]))} if hollow else {}
        ax.plot(x, y, color=colours[s], marker=marker, markersize=float(rng.uniform(2, 8)),
                linewidth=float(rng.uniform(0.6, 3)), linestyle=str(rng.choice(["-", "-", "-", "--", ":"])),
                label=c.label(rng), **face)
        if rng.random() < 0.1:
            ax.fill_between(x, y * 0.9, y * 1.1, color=colours[s], alpha=0.15)
    if rng.random() < 0.1:
        ax.set_yscale("log")
    _decorate(ax, rng, legend=series > 1)


def area(ax, rng):
    series = int(rng.choice([1, 1, 2, 3, 4, 6]))
    n = int(rng.integers(8, 120))
    x = np.arange(n)
    colours = c.palette(rng, series)
    scale = 10.0 ** int(rng.integers(-1, 4))
    ys = [_numbers(rng, n, str(rng.choice(["walk", "trend"])), scale) for _ in range(series)]
    alpha = float(rng.uniform(0.5, 1.0))
    if series > 1 and rng.random() < 0.65:
        edge = {"edgecolor": "white", "linewidth": 0.8} if rng.random() < 0.3 else {}
        ax.stackplot(x, *ys, colors=colours, alpha=alpha, labels=[c.label(rng) for _ in ys], **edge)
    else:
        for s, y in enumerate(ys):
            ax.fill_between(x, 0, y, color=colours[s], alpha=alpha if series == 1 else 0.45, label=c.label(rng))
            if rng.random() < 0.6:
                ax.plot(x, y, color=colours[s] * 0.7, linewidth=1.2)
    ax.set_ylim(bottom=0)
    _decorate(ax, rng, legend=series > 1)


def scatter(ax, rng):
    n = int(rng.choice([6, 10, 15, 25, 40, 60, 100, 300, 1000, 3000]))
    groups = int(rng.choice([1, 1, 2, 3, 4]))
    bubble = rng.random() < 0.2
    by_value = rng.random() < 0.2
    log_x, log_y = rng.random() < 0.15, rng.random() < 0.15
    hollow = rng.random() < 0.45
    size = float(rng.choice([2, 4, 6, 10, 20, 40, 80]))
    everything = []
    for g in range(groups):
        m = max(4, n // groups)
        x, y = c.scatter_points(rng, m)
        if log_x:  # values spread over decades, drawn on a log axis
            x = 10 ** (x / rng.uniform(1.5, 4))
        if log_y:
            y = 10 ** (y / (np.ptp(y) + 1e-9) * rng.uniform(2, 5))
        everything.append((x, y))
        sizes = rng.uniform(20, 900, m) if bubble else size
        kw = {"c": x + y, "cmap": c.continuous_map(rng)} if by_value else {"color": c.palette(rng, 1)[0]}
        marker = str(rng.choice(["o", "o", "o", "s", "^", "x", "+", "D", "v", "."]))
        if marker not in "x+." and hollow and not by_value:
            kw = {"facecolors": "none", "edgecolors": kw["color"], "linewidths": float(rng.uniform(0.5, 1.6))}
        elif marker not in "x+.":
            kw["edgecolors"] = str(rng.choice(["none", "face", "k", "white"]))
        pts = ax.scatter(x, y, s=sizes, alpha=float(rng.uniform(0.35, 1.0)), marker=marker,
                         label=c.label(rng), **kw)
    if log_x:
        ax.set_xscale("log")
    if log_y:
        ax.set_yscale("log")
    if by_value and rng.random() < 0.6:
        ax.figure.colorbar(pts, ax=ax)
    if rng.random() < 0.3:  # a fitted trend, sometimes with a band; the points stay the message
        x, y = everything[0]
        fx, fy = (np.log10(x) if log_x else x), (np.log10(y) if log_y else y)
        coef = np.polyfit(fx, fy, int(rng.choice([1, 1, 2])))
        grid = np.linspace(fx.min(), fx.max(), 50)
        fit = np.polyval(coef, grid)
        gx, gy = (10 ** grid if log_x else grid), (10 ** fit if log_y else fit)
        ax.plot(gx, gy, color=str(rng.choice(["k", "0.4", "tab:red", "tab:blue"])),
                linewidth=float(rng.uniform(0.8, 2)), linestyle=str(rng.choice(["-", "-", "--"])))
        if rng.random() < 0.4 and not log_y:
            band = np.std(fy - np.polyval(coef, fx)) * 1.5
            ax.fill_between(gx, gy - band, gy + band, color="0.5", alpha=0.2, linewidth=0)
    elif rng.random() < 0.1:  # a reference diagonal
        lims = ax.get_xlim()
        ax.plot(lims, lims, color="0.5", linewidth=1, linestyle="--")
    _decorate(ax, rng, legend=groups > 1)


def box(ax, rng):
    groups = int(rng.choice([2, 2, 3, 3, 4, 5, 6, 8, 10]))  # two or three groups are common: few marks
    data = [rng.normal(rng.uniform(0, 10), rng.uniform(0.5, 3), int(rng.integers(20, 200))) for _ in range(groups)]
    if rng.random() < 0.5:
        data = [np.concatenate([d, rng.normal(d.mean(), 5 * d.std(), 4)]) for d in data]
    vertical = rng.random() < 0.75
    filled = rng.random() < 0.5
    parts = ax.boxplot(data, orientation="vertical" if vertical else "horizontal", patch_artist=filled,
                       showfliers=bool(rng.random() < 0.7), notch=bool(rng.random() < 0.15),
                       widths=float(rng.uniform(0.1, 0.8)), tick_labels=_categories(rng, groups))
    if filled:
        colours = c.palette(rng, groups)
        single = rng.random() < 0.4
        for i, patch in enumerate(parts["boxes"]):
            patch.set_facecolor(colours[0] if single else colours[i])
    if rng.random() < 0.1:
        for i, d in enumerate(data):
            jitter = rng.normal(i + 1, 0.05, len(d))
            (ax.scatter(jitter, d, s=3, color="0.3", alpha=0.4) if vertical
             else ax.scatter(d, jitter, s=3, color="0.3", alpha=0.4))
    _decorate(ax, rng)


def pie(ax, rng):
    n = int(rng.integers(2, 10))
    values = rng.dirichlet(np.ones(n) * rng.uniform(0.7, 4))
    colours = c.palette(rng, n)
    donut = rng.random() < 0.3
    three_d = rng.random() < 0.15
    explode = rng.uniform(0, 0.15, n) * (rng.random() < 0.6) if rng.random() < 0.25 else None
    kw = {"colors": colours, "startangle": float(rng.uniform(0, 360)), "explode": explode,
          "counterclock": bool(rng.random() < 0.5), "shadow": bool(rng.random() < 0.1)}
    if rng.random() < 0.5:
        kw["labels"] = [c.label(rng) for _ in range(n)]
    if rng.random() < 0.4:
        kw["autopct"] = "%1.0f%%"
    edge = {"edgecolor": str(rng.choice(["white", "black", "none"])), "linewidth": float(rng.uniform(0.5, 2))}
    if donut:
        edge["width"] = float(rng.uniform(0.25, 0.6))
    if three_d:
        depth = rng.uniform(0.08, 0.2)
        for k in range(6, 0, -1):
            start = kw["startangle"]
            for v, col in zip(values, colours):
                ax.add_patch(Wedge((0, -depth * k / 6), 1, start, start + v * 360, color=np.asarray(col) * 0.7))
                start += v * 360
        ax.pie(values, wedgeprops=edge, **{k: v for k, v in kw.items() if k != "counterclock"}, counterclock=True)
        ax.set_aspect(float(rng.uniform(0.4, 0.65)))
        ax.set_ylim(-1.4, 1.2)
    else:
        ax.pie(values, wedgeprops=edge, **kw)
    if rng.random() < 0.3:
        ax.legend(fontsize=7, loc="center left", bbox_to_anchor=(1.0, 0.5), labels=[c.label(rng) for _ in range(n)])
    if rng.random() < 0.5:
        ax.set_title(c.sentence(rng, 2, 5), fontsize=float(rng.uniform(8, 14)))


def heatmap(ax, rng):
    rows, cols = int(rng.integers(3, 40)), int(rng.integers(3, 40))
    kind = rng.random()
    if kind < 0.3:  # correlation-like
        a = rng.normal(size=(max(rows, 3), 8))
        m = np.corrcoef(a)
        cols = rows
    elif kind < 0.6:
        m = np.add.outer(np.sin(np.arange(rows) / rng.uniform(2, 8)), np.cos(np.arange(cols) / rng.uniform(2, 8)))
        m = m + rng.normal(0, 0.3, m.shape)
    else:
        m = rng.gamma(2, 1, (rows, cols))
    cmap = c.continuous_map(rng)
    if rng.random() < 0.5:
        im = ax.imshow(m, cmap=cmap, aspect="auto", interpolation="nearest")
    else:
        im = ax.pcolormesh(m, cmap=cmap, edgecolors=str(rng.choice(["none", "white", "k"])),
                           linewidth=float(rng.uniform(0.2, 1.5)))
        ax.invert_yaxis()
    if rows <= 12 and cols <= 12 and rng.random() < 0.4:
        for (i, j), v in np.ndenumerate(m):
            ax.text(j + (0.5 if not hasattr(im, "get_array") or im.__class__.__name__ != "AxesImage" else 0),
                    i + (0.5 if im.__class__.__name__ != "AxesImage" else 0), f"{v:.1f}",
                    ha="center", va="center", fontsize=6)
    if rng.random() < 0.5 and rows <= 20:
        ticks = np.arange(rows) + (0.5 if im.__class__.__name__ != "AxesImage" else 0)
        ax.set_yticks(ticks)
        ax.set_yticklabels([c.label(rng) for _ in range(rows)], fontsize=7)
    if rng.random() < 0.75:
        ax.figure.colorbar(im, ax=ax)
    if rng.random() < 0.5:
        ax.set_title(c.sentence(rng, 2, 5))


def region_polygons(rng, n_regions):
    """Invented regions: Voronoi cells of jittered points, kept inside a random blob outline."""
    pts = rng.uniform(0, 1, (n_regions, 2))
    pts = np.vstack([pts, [[-2, -2], [-2, 3], [3, -2], [3, 3]]])
    vor = Voronoi(pts)
    angle = np.linspace(0, 2 * np.pi, 60, endpoint=False)
    radius = 0.5 + sum(rng.uniform(0, 0.08) * np.sin(k * angle + rng.uniform(0, 6)) for k in range(2, 7))
    centre = np.array([0.5, 0.5])
    outline = centre + np.c_[np.cos(angle), np.sin(angle)] * radius[:, None] * rng.uniform(0.8, 1.1, 2)
    polys = []
    for i in range(n_regions):
        region = vor.regions[vor.point_region[i]]
        if -1 in region or not region:
            continue
        poly = vor.vertices[region]
        polys.append(poly)
    return polys, outline


def choropleth(ax, rng):
    polys, outline = region_polygons(rng, int(rng.integers(8, 120)))
    cmap = matplotlib.colormaps[c.continuous_map(rng)]
    values = rng.random(len(polys))
    if rng.random() < 0.25:  # classed legend with a few bins
        values = np.floor(values * int(rng.integers(3, 7))) / 6
    patches = [Polygon(p, closed=True) for p in polys]
    coll = PatchCollection(patches, cmap=cmap, edgecolor=str(rng.choice(["white", "k", "0.4", "0.8"])),
                           linewidth=float(rng.uniform(0.3, 1.5)))
    coll.set_array(values)
    ax.add_collection(coll)
    if rng.random() < 0.3:  # regions cut by the frame instead of a coastline
        outline = np.array([[0, 0], [1, 0], [1, 1], [0, 1]], float)
    clip = Polygon(outline, closed=True, transform=ax.transData, facecolor="none")
    coll.set_clip_path(clip)
    if rng.random() < 0.5:
        ax.add_patch(Polygon(outline, closed=True, fill=False, edgecolor="k", linewidth=1))
    if rng.random() < 0.2:
        ax.set_facecolor(str(rng.choice(["#dbe9f6", "#eef4fb", "#cfe3f0"])))
    ax.set_xlim(outline[:, 0].min() - 0.05, outline[:, 0].max() + 0.05)
    ax.set_ylim(outline[:, 1].min() - 0.05, outline[:, 1].max() + 0.05)
    ax.set_aspect("equal")
    if rng.random() < 0.8:
        ax.set_axis_off()
    if rng.random() < 0.7:
        ax.figure.colorbar(coll, ax=ax, orientation=str(rng.choice(["vertical", "horizontal"])), shrink=0.7)
    if rng.random() < 0.5:
        ax.set_title(c.sentence(rng, 2, 5))


DRAWERS = {"bar": bar, "histogram": histogram, "line": line, "area": area, "scatter": scatter, "box": box,
           "pie": pie, "heatmap": heatmap, "map": choropleth}


def render(label: str, rng: np.random.Generator) -> np.ndarray:
    """One matplotlib figure of the given chart label, as HxWx3 uint8."""
    width, height = c.figure_size(rng)
    dpi = int(rng.choice([60, 72, 90, 100, 120, 150]))
    style = str(rng.choice(STYLES))
    rc = {"font.family": str(rng.choice(c.MPL_FONT_FAMILIES)), "font.size": float(rng.uniform(6, 14)),
          "axes.unicode_minus": False}
    with matplotlib.style.context(style), matplotlib.rc_context(rc), warnings.catch_warnings():
        warnings.simplefilter("ignore", UserWarning)  # cramped random layouts make tight_layout complain
        fig = Figure(figsize=(width / dpi, height / dpi), dpi=dpi)
        FigureCanvasAgg(fig)
        if rng.random() < 0.15:
            panels = (1, 2) if width > height else (2, 1)
            if rng.random() < 0.3:
                panels = (2, 2)
            axes = fig.subplots(*panels).ravel()
        else:
            axes = [fig.add_subplot(1, 1, 1)]
        for ax in axes:
            DRAWERS[label](ax, rng)
        try:
            fig.tight_layout()
        except (ValueError, RuntimeError):
            pass  # cramped layouts keep matplotlib's default placement
        fig.canvas.draw()
        rgb = np.asarray(fig.canvas.buffer_rgba())[..., :3].copy()
    return rgb
