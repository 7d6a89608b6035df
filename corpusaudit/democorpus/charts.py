"""Chart specifications drawn with matplotlib, each with the rule ids it should trigger.

A ChartSpec states everything that decides a best-practice check (data order, axis start,
label angle, palette, colour map, text size and colour ...), so the expected findings are
known before a pixel is drawn: expected_rules(spec) derives them from the spec, and the
generator refuses specs whose truth would be borderline (see _refuse_borderline).

Drawing uses matplotlib's object API (no pyplot state), the DejaVu Sans font shipped with
matplotlib and numpy generators seeded from the spec, so the same spec always gives the same
figure.
"""

from __future__ import annotations

import io
from dataclasses import dataclass, field
from functools import lru_cache

import matplotlib as mpl
import numpy as np
from matplotlib import rc_context
from matplotlib.colors import to_hex, to_rgb
from matplotlib.figure import Figure
from matplotlib.patches import FancyArrowPatch, FancyBboxPatch, Polygon
from matplotlib.text import Text
from PIL import Image

from corpusaudit.model import CHART_TYPES

# Okabe & Ito (2008), "Color Universal Design": a categorical palette chosen to stay
# distinguishable under protanopia and deuteranopia.
OKABE_ITO = ("#0072B2", "#E69F00", "#009E73", "#CC79A7", "#56B4E9", "#D55E00", "#F0E442", "#000000")
# A red and a green of similar lightness: distinct to most readers, confusable under
# deuteranopia (checked with Machado et al. 2009 simulation in the tests).
RED_GREEN = ("#D03C32", "#4E9A2E")
PALETTES = {"okabe_ito": OKABE_ITO, "red_green": RED_GREEN}
CVD_UNSAFE_PALETTES = frozenset({"red_green"})

# Colour maps whose hue cycles through the spectrum (non-monotonic lightness).
RAINBOW_COLORMAPS = frozenset({"jet", "rainbow", "gist_rainbow", "hsv", "turbo", "nipy_spectral"})

VARIANTS = {
    "bar": ("vertical", "horizontal", "stacked", "grouped"),
    "pie": ("pie", "donut"),
    "line": ("line",),
    "area": ("overlap", "stacked"),
    "scatter": ("plain", "bubble", "groups", "colour"),
    "box": ("box",),
    "histogram": ("histogram",),
    "heatmap": ("heatmap",),
    "map": ("choropleth",),
    "not_chart": ("flow", "table", "texture"),
}

# Thresholds the truth is stated against: the design's defaults where it gives them.
MAX_PIE_SLICES = 5
MAX_STACK_SEGMENTS = 4
MAX_LINE_SERIES = 5
ROTATION_DEG = 30.0
MIN_TEXT_PT = 6.0
MIN_CONTRAST = 4.5  # WCAG 2.x, success criterion 1.4.3 (AA, normal text)
# Common practice: shares closer than SIMILAR_PP percentage points are hard to compare;
# a spec whose closest shares differ by less than DISTINCT_PP but not less than SIMILAR_PP
# is refused as borderline.
SIMILAR_PP, DISTINCT_PP = 2.0, 4.0
# Scatter: up to SPARSE_POINTS markers stay readable at the sizes drawn here, from
# DENSE_POINTS on most are hidden (common practice); in between is refused.
SPARSE_POINTS, DENSE_POINTS = 300, 2000
# Pie percentages rounded to integers may sum to 99..101; a total further off is an error.
PIE_TOTAL_TOLERANCE = 1

BASE_RC = {
    "font.family": "DejaVu Sans",
    "font.size": 9.0,
    "axes.titlesize": 10.0,
    "axes.labelsize": 9.0,
    "legend.fontsize": 8.0,
    "pdf.fonttype": 3,  # matplotlib's default: Type 3 glyphs with a ToUnicode map, text stays extractable
    "svg.hashsalt": "corpusaudit",
    "path.simplify": False,
    "axes.spines.top": False,
    "axes.spines.right": False,
}
BACKGROUND = "#FFFFFF"


@dataclass(frozen=True)
class ChartSpec:
    """Everything that decides what a chart looks like and which checks it should trip.

    series holds one row of values per series (bar/line/area/pie: one value per category;
    box: group centres; map: one value per region). Point clouds, histogram samples, box
    samples and heatmap grids are generated from seed.
    """

    chart_type: str
    variant: str = ""
    title: str = ""
    categories: tuple[str, ...] = ()
    series: tuple[tuple[float, ...], ...] = ()
    series_names: tuple[str, ...] = ()
    value_label: str = ""
    x_label: str = ""
    x_values: tuple[float, ...] = ()  # line/area: numeric x; empty = the categories are x
    even_spacing: bool = False  # line: numeric x labels drawn at evenly spaced positions
    markers: bool = True
    direct_labels: bool = False  # line/area: names written at the line ends, no legend
    natural_order: bool = False  # categories have an inherent order (years, stages)
    n_points: int = 0  # scatter markers, histogram samples, box samples per group
    palette: str = "okabe_ito"
    colormap: str = "viridis"
    axis_min: float | None = None  # value axis starts here (bar, histogram)
    label_angle: float = 0.0  # category / x tick labels, degrees
    percent_labels: bool = False  # pie: "Name 23%" labels
    percent_offset: int = 0  # pie: added to the first label so the labelled total is off
    three_d: bool = False  # bar/pie: fake perspective (side faces, tilted ellipse)
    tick_pt: float = 8.0  # tick and category label size
    text_colour: str = "#000000"
    clip_points: bool = False  # scatter: axis limits cut through the point cloud
    transparent: bool = False  # no figure background (raster: an alpha channel)
    seed: int = 0
    size_in: tuple[float, float] = (5.0, 3.0)
    notes: tuple[str, ...] = field(default=(), compare=False)  # plain-words flags for people

    def __post_init__(self) -> None:
        if self.chart_type not in CHART_TYPES:
            raise ValueError(f"unknown chart type {self.chart_type!r}")
        variant = self.variant or VARIANTS[self.chart_type][0]
        if variant not in VARIANTS[self.chart_type]:
            raise ValueError(f"{self.chart_type} has no variant {variant!r}")
        object.__setattr__(self, "variant", variant)
        if self.palette not in PALETTES:
            raise ValueError(f"unknown palette {self.palette!r}")


# ----------------------------------------------------------------------------- truth


def wcag_contrast(foreground: str, background: str = BACKGROUND) -> float:
    """Contrast ratio (L1 + 0.05) / (L2 + 0.05) with WCAG 2.x relative luminance."""

    def luminance(colour: str) -> float:
        c = np.array(to_rgb(colour))
        linear = np.where(c <= 0.04045, c / 12.92, ((c + 0.055) / 1.055) ** 2.4)
        return float(linear @ np.array([0.2126, 0.7152, 0.0722]))

    hi, lo = sorted((luminance(foreground), luminance(background)), reverse=True)
    return (hi + 0.05) / (lo + 0.05)


def pie_shares(spec: ChartSpec) -> np.ndarray:
    values = np.asarray(spec.series[0], dtype=float)
    return 100.0 * values / values.sum()


def pie_label_percents(spec: ChartSpec) -> list[int]:
    labels = [int(round(s)) for s in pie_shares(spec)]
    labels[0] += spec.percent_offset
    return labels


def box_samples(spec: ChartSpec) -> list[np.ndarray]:
    rng = np.random.default_rng(spec.seed)
    spread = 0.02 * max(abs(c) for c in spec.series[0])
    return [centre + rng.normal(0.0, 0.12 * abs(centre) + spread, spec.n_points) for centre in spec.series[0]]


def _monotonic(values) -> bool:
    d = np.diff(np.asarray(values, dtype=float))
    return bool(np.all(d >= 0) or np.all(d <= 0))


def _uneven(x) -> bool:
    steps = np.diff(np.asarray(x, dtype=float))
    return bool(steps.size and not np.allclose(steps, steps[0]))


def _categorical_colours(spec: ChartSpec) -> int:
    """How many palette colours the chart uses to tell categories apart."""
    t, v = spec.chart_type, spec.variant
    if t == "pie":
        return len(spec.series[0])
    if t in ("bar", "line", "area") and len(spec.series) > 1:
        return len(spec.series)
    if t == "scatter" and v == "groups":
        return len(spec.series_names)
    return 0


def _has_colour_scale(spec: ChartSpec) -> bool:
    return spec.chart_type in ("heatmap", "map") or (spec.chart_type == "scatter" and spec.variant == "colour")


def _refuse_borderline(spec: ChartSpec) -> None:
    if spec.chart_type == "pie":
        gap = float(np.min(np.diff(np.sort(pie_shares(spec)))))
        if SIMILAR_PP <= gap < DISTINCT_PP:
            raise ValueError(f"pie shares {gap:.1f} pp apart: neither clearly similar nor distinct")
        if 0 < abs(spec.percent_offset) <= PIE_TOTAL_TOLERANCE + 1:
            raise ValueError("percent_offset too small to be told from rounding")
    if spec.chart_type == "scatter" and SPARSE_POINTS < spec.n_points < DENSE_POINTS:
        raise ValueError(f"{spec.n_points} scatter points: neither clearly sparse nor overplotted")
    if 20.0 <= spec.label_angle < 40.0:
        raise ValueError("label angle too close to the rotation threshold")
    contrast = wcag_contrast(spec.text_colour)
    if 3.5 <= contrast < 5.5:
        raise ValueError("text contrast too close to 4.5:1")


@lru_cache(maxsize=128)
def drawn(spec: ChartSpec) -> Figure:
    """draw(spec), kept: truth and every rendering of a spec read the same figure."""
    return draw(spec)


def min_text_pt(spec: ChartSpec) -> float | None:
    """Smallest font size the drawing uses (points at the figure's native size); None: no text."""
    sizes = figure_text_sizes(drawn(spec))
    return min(sizes) if sizes else None


def expected_rules(spec: ChartSpec, scale: float = 1.0) -> list[str]:
    """Rule ids (design.md) the chart itself should trigger when printed at `scale` x its size.

    Placement rules (raster-resolution, raster-compression, caption-missing) are not
    properties of the chart; the corpus builder adds them.
    """
    _refuse_borderline(spec)
    t, v = spec.chart_type, spec.variant
    rules: list[str] = []
    if t == "pie":
        shares = pie_shares(spec)
        if len(shares) > MAX_PIE_SLICES:
            rules.append("pie-slice-count")
        if float(np.min(np.diff(np.sort(shares)))) < SIMILAR_PP:
            rules.append("pie-similar-slices")
        if not _monotonic(shares):
            rules.append("pie-order")
        if spec.percent_labels and abs(sum(pie_label_percents(spec)) - 100) > PIE_TOTAL_TOLERANCE:
            rules.append("pie-total")
    if t in ("bar", "histogram") and spec.axis_min is not None and spec.axis_min > 0:
        rules.append("bar-baseline")
    if t in ("bar", "line", "box", "histogram") and spec.label_angle >= ROTATION_DEG:
        rules.append("tick-label-rotation")
    if t == "bar":
        if v in ("vertical", "horizontal") and not spec.natural_order and not _monotonic(spec.series[0]):
            rules.append("bar-order")
        if v == "stacked" and len(spec.series) > MAX_STACK_SEGMENTS:
            rules.append("bar-stack-depth")
    if t in ("line", "area"):
        if len(spec.series) > MAX_LINE_SERIES:
            rules.append("line-series-count")
    if t == "line":
        if not spec.x_values and not spec.natural_order:
            rules.append("line-on-categories")
        if spec.x_values and spec.even_spacing and _uneven(spec.x_values):
            rules.append("line-uneven-axis")
        if spec.x_values and not spec.even_spacing and _uneven(spec.x_values) and not spec.markers:
            rules.append("line-marker-gaps")
    if t == "area" and v == "stacked":
        rules.append("area-stacked")
    if t == "scatter":
        if spec.n_points >= DENSE_POINTS:
            rules.append("scatter-overplotting")
        if spec.clip_points:
            rules.append("scatter-edge-points")
    if t == "box" and not spec.natural_order and not _monotonic([np.median(s) for s in box_samples(spec)]):
        rules.append("box-order")
    if _has_colour_scale(spec) and spec.colormap in RAINBOW_COLORMAPS:
        rules.append("colormap-rainbow")
    if spec.palette in CVD_UNSAFE_PALETTES and _categorical_colours(spec) >= 2:
        rules.append("palette-cvd")
    smallest = min_text_pt(spec)
    if smallest is not None:
        if wcag_contrast(spec.text_colour) < MIN_CONTRAST:
            rules.append("text-contrast")
        if smallest * scale < MIN_TEXT_PT:
            rules.append("text-size")
    if t in ("bar", "pie") and spec.three_d:
        rules.append("chart-3d")
    if t in ("line", "area") and len(spec.series) > 1 and not spec.direct_labels:
        rules.append("line-direct-labels")
    return rules


def properties(spec: ChartSpec, scale: float = 1.0) -> dict:
    """Measured-value truth for the checks (what a perfect measurement would report)."""
    t, v = spec.chart_type, spec.variant
    props: dict = {"variant": v}
    if t == "pie":
        props["slices"] = len(spec.series[0])
        props["shares"] = [round(float(s), 3) for s in pie_shares(spec)]
        if spec.percent_labels:
            props["labelled_total"] = sum(pie_label_percents(spec))
    if t in ("bar", "histogram"):
        props["axis_min"] = spec.axis_min if spec.axis_min is not None else 0
    if t in ("bar", "line", "box", "histogram"):
        props["label_angle"] = spec.label_angle
    if t == "bar" and v == "stacked":
        props["stack_segments"] = len(spec.series)
    if t in ("line", "area"):
        props["series"] = len(spec.series)
    if t == "scatter":
        props["points"] = spec.n_points
    if _has_colour_scale(spec):
        props["colormap"] = spec.colormap
    if _categorical_colours(spec):
        props["palette"] = spec.palette
        props["colours"] = _categorical_colours(spec)
    if spec.three_d:
        props["three_d"] = True
    smallest = min_text_pt(spec)
    if smallest is not None:
        props["min_text_pt"] = round(smallest * scale, 3)
        props["text_contrast"] = round(wcag_contrast(spec.text_colour), 2)
    return props


# ----------------------------------------------------------------------------- drawing


def _colours(spec: ChartSpec, n: int) -> list[str]:
    palette = PALETTES[spec.palette]
    return [palette[i % len(palette)] for i in range(n)]


def _shade(colour: str, factor: float) -> str:
    return to_hex(np.clip(np.array(to_rgb(colour)) * factor, 0, 1))


def _style_text(fig: Figure, spec: ChartSpec) -> None:
    for text in fig.findobj(Text):
        text.set_color(spec.text_colour)


def _rotate(ax, spec: ChartSpec, axis: str = "x") -> None:
    if spec.label_angle:
        labels = ax.get_xticklabels() if axis == "x" else ax.get_yticklabels()
        for label in labels:
            label.set_rotation(spec.label_angle)
            label.set_horizontalalignment("right")
            label.set_rotation_mode("anchor")


def _draw_bar(ax, spec: ChartSpec) -> None:
    cats, rows = spec.categories, np.asarray(spec.series, dtype=float)
    pos = np.arange(len(cats))
    colours = _colours(spec, len(rows))
    horizontal = spec.variant == "horizontal"
    if spec.variant == "stacked":
        bottom = np.zeros(len(cats))
        for row, name, colour in zip(rows, spec.series_names, colours):
            ax.bar(pos, row, 0.65, bottom=bottom, color=colour, label=name, edgecolor="white", linewidth=0.5)
            bottom += row
        ax.legend(loc="upper left", bbox_to_anchor=(1.01, 1.0), frameon=False)
    elif spec.variant == "grouped":
        width = 0.8 / len(rows)
        for i, (row, name, colour) in enumerate(zip(rows, spec.series_names, colours)):
            ax.bar(pos + (i - (len(rows) - 1) / 2) * width, row, width, color=colour, label=name)
        ax.legend(frameon=False, ncols=len(rows), loc="upper left")
    elif horizontal:
        ax.barh(pos, rows[0], 0.65, color=colours[0])
        ax.invert_yaxis()
    else:
        ax.bar(pos, rows[0], 0.65, color=colours[0])
        if spec.three_d:
            _bar_faces(ax, pos, rows[0], colours[0], spec)
    if horizontal:
        ax.set_yticks(pos, cats)
        ax.set_xlabel(spec.value_label)
        if spec.axis_min is not None:
            ax.set_xlim(left=spec.axis_min)
    else:
        ax.set_xticks(pos, cats)
        ax.set_ylabel(spec.value_label)
        if spec.axis_min is not None:
            ax.set_ylim(bottom=spec.axis_min)
    _rotate(ax, spec)


def _bar_faces(ax, pos, heights, colour: str, spec: ChartSpec) -> None:
    """Side and top faces that make flat bars look like boxes in perspective."""
    dx, dy = 0.14, 0.05 * float(np.max(heights))
    half = 0.65 / 2
    for x, h in zip(pos, heights):
        right, left = x + half, x - half
        ax.add_patch(Polygon([(right, 0), (right + dx, dy), (right + dx, h + dy), (right, h)],
                             closed=True, facecolor=_shade(colour, 0.65), edgecolor="none"))
        ax.add_patch(Polygon([(left, h), (left + dx, h + dy), (right + dx, h + dy), (right, h)],
                             closed=True, facecolor=_shade(colour, 1.35), edgecolor="none"))
    ax.set_xlim(-0.6, len(pos) - 0.4 + dx)
    ax.set_ylim(0, float(np.max(heights)) * 1.12 + dy)


def _pie_labels(spec: ChartSpec) -> list[str]:
    if not spec.percent_labels:
        return list(spec.categories)
    return [f"{c} {p}%" for c, p in zip(spec.categories, pie_label_percents(spec))]


def _draw_pie(ax, spec: ChartSpec) -> None:
    values = np.asarray(spec.series[0], dtype=float)
    colours = _colours(spec, len(values))
    if spec.three_d:
        _draw_pie_3d(ax, values, colours, _pie_labels(spec), spec)
        return
    wedge = {"edgecolor": "white", "linewidth": 1.0}
    if spec.variant == "donut":
        wedge["width"] = 0.38
    ax.pie(values, labels=_pie_labels(spec), colors=colours, startangle=90, counterclock=False,
           wedgeprops=wedge, labeldistance=1.12, textprops={"fontsize": spec.tick_pt})
    ax.set_aspect("equal")


def _draw_pie_3d(ax, values, colours, labels, spec: ChartSpec) -> None:
    """A tilted pie: slices on an ellipse with a darker band for the near rim."""
    squash, depth = 0.55, 0.16
    bounds = 90.0 - 360.0 * np.concatenate([[0.0], np.cumsum(values) / values.sum()])
    rims, tops = [], []
    for (start, end), colour in zip(zip(bounds[:-1], bounds[1:]), colours):
        theta = np.radians(np.linspace(start, end, 64))
        x, y = np.cos(theta), squash * np.sin(theta)
        tops.append(Polygon(np.column_stack([np.r_[0, x], np.r_[0, y]]), closed=True,
                            facecolor=colour, edgecolor="white", linewidth=0.8))
        front = np.sin(theta) < 0
        if front.any():
            fx, fy = x[front], y[front]
            rims.append(Polygon(np.column_stack([np.r_[fx, fx[::-1]], np.r_[fy, fy[::-1] - depth]]),
                                closed=True, facecolor=_shade(colour, 0.7), edgecolor="none"))
        mid = np.radians((start + end) / 2)
        ax.text(1.22 * np.cos(mid), 1.22 * squash * np.sin(mid) - (depth if np.sin(mid) < 0 else 0),
                labels[len(tops) - 1], ha="center", va="center", fontsize=spec.tick_pt)
    for patch in rims + tops:
        ax.add_patch(patch)
    ax.set_xlim(-1.6, 1.6)
    ax.set_ylim(-squash - depth - 0.35, squash + 0.3)
    ax.set_aspect("equal")
    ax.set_axis_off()


def _draw_line(ax, spec: ChartSpec) -> None:
    rows = np.asarray(spec.series, dtype=float)
    if spec.x_values and not spec.even_spacing:
        x = np.asarray(spec.x_values, dtype=float)
    else:
        x = np.arange(rows.shape[1], dtype=float)
    colours = _colours(spec, len(rows))
    names = spec.series_names or ("",) * len(rows)
    for row, name, colour in zip(rows, names, colours):
        ax.plot(x, row, color=colour, linewidth=1.6, marker="o" if spec.markers else None,
                markersize=3.5, label=name)
        if spec.direct_labels:
            ax.text(x[-1] + 0.02 * (x[-1] - x[0]), row[-1], name, va="center", fontsize=8.0)
    if spec.x_values and spec.even_spacing:
        ax.set_xticks(x, [f"{v:g}" for v in spec.x_values])
    elif not spec.x_values:
        ax.set_xticks(x, spec.categories)
    if spec.direct_labels:
        ax.set_xlim(x[0], x[-1] + 0.22 * (x[-1] - x[0]))
    elif len(rows) > 1:
        ax.legend(loc="upper left", bbox_to_anchor=(1.01, 1.0), frameon=False)
    ax.set_ylabel(spec.value_label)
    _rotate(ax, spec)


def _draw_area(ax, spec: ChartSpec) -> None:
    rows = np.asarray(spec.series, dtype=float)
    x = np.asarray(spec.x_values, dtype=float) if spec.x_values else np.arange(rows.shape[1])
    colours = _colours(spec, len(rows))
    if spec.variant == "stacked":
        ax.stackplot(x, rows, colors=colours, labels=spec.series_names, alpha=0.9)
    else:
        for row, name, colour in zip(rows, spec.series_names, colours):
            ax.fill_between(x, row, color=colour, alpha=0.35, label=name)
            ax.plot(x, row, color=colour, linewidth=1.2)
    if spec.direct_labels:
        tops = np.cumsum(rows, axis=0) if spec.variant == "stacked" else rows
        mids = tops - (rows / 2 if spec.variant == "stacked" else 0)
        for mid, name in zip(mids[:, -1], spec.series_names):
            ax.text(x[-1] + 0.02 * (x[-1] - x[0]), mid, name, va="center", fontsize=8.0)
        ax.set_xlim(x[0], x[-1] + 0.25 * (x[-1] - x[0]))
    elif len(rows) > 1:
        ax.legend(loc="upper left", bbox_to_anchor=(1.01, 1.0), frameon=False)
    if not spec.x_values:
        ax.set_xticks(x, spec.categories)
    ax.set_ylabel(spec.value_label)


def _draw_scatter(ax, fig: Figure, spec: ChartSpec) -> None:
    rng = np.random.default_rng(spec.seed)
    n = spec.n_points
    if spec.n_points >= DENSE_POINTS:
        x = rng.normal(14.0, 1.6, n)
        y = 0.8 * x + rng.normal(0.0, 1.2, n)
        ax.scatter(x, y, s=18, color=_colours(spec, 1)[0], linewidths=0)
        ax.set_xlim(x.min() - 0.5, x.max() + 0.5)
        ax.set_ylim(y.min() - 0.5, y.max() + 0.5)
    elif spec.variant == "groups":
        for i, (name, colour) in enumerate(zip(spec.series_names, _colours(spec, len(spec.series_names)))):
            x = rng.uniform(0, 30, n)
            y = 2.0 + 0.4 * x + 3.0 * i + rng.normal(0, 1.5, n)
            ax.scatter(x, y, s=16, color=colour, label=name)
        ax.legend(frameon=False, loc="upper left")
    elif spec.variant == "colour":
        x, y = rng.uniform(0, 40, n), rng.uniform(0, 25, n)
        c = np.hypot(x - 20, y - 12) + rng.normal(0, 1.0, n)
        points = ax.scatter(x, y, s=16, c=c, cmap=spec.colormap)
        _colour_bar(fig, points, ax, label="Depth (m)")
    elif spec.variant == "bubble":
        x, y = rng.uniform(2, 38, n), rng.uniform(2, 23, n)
        sizes = rng.uniform(30, 420, n)
        ax.scatter(x, y, s=sizes, color=_colours(spec, 1)[0], alpha=0.6, edgecolors="white", linewidths=0.8)
        ax.set_xlim(-2, 42)
        ax.set_ylim(-2, 27)
    else:
        x = rng.uniform(0, 30, n)
        y = 5.0 + 0.6 * x + rng.normal(0, 2.0, n)
        ax.scatter(x, y, s=14, color=_colours(spec, 1)[0])
        if spec.clip_points:
            ax.set_xlim(np.percentile(x, 8), np.percentile(x, 92))
            ax.set_ylim(np.percentile(y, 8), np.percentile(y, 92))
        else:
            ax.set_xlim(x.min() - 2, x.max() + 2)
            ax.set_ylim(y.min() - 2, y.max() + 2)
    ax.set_xlabel(spec.x_label)
    ax.set_ylabel(spec.value_label)


def _draw_box(ax, spec: ChartSpec) -> None:
    samples = box_samples(spec)
    ax.boxplot(samples, tick_labels=spec.categories, patch_artist=True,
               boxprops={"facecolor": "#DCE9F5", "edgecolor": "#333333"},
               medianprops={"color": "#000000"}, flierprops={"markersize": 3})
    ax.set_ylabel(spec.value_label)
    _rotate(ax, spec)


def _draw_histogram(ax, spec: ChartSpec) -> None:
    rng = np.random.default_rng(spec.seed)
    samples = rng.gamma(4.0, 2.5, spec.n_points)
    ax.hist(samples, bins=20, color=_colours(spec, 1)[0], edgecolor="white", linewidth=0.6)
    ax.set_xlabel(spec.x_label)
    ax.set_ylabel(spec.value_label or "Count")
    if spec.axis_min is not None:
        ax.set_ylim(bottom=spec.axis_min)
    _rotate(ax, spec)


def _colour_bar(fig: Figure, mappable, ax, **kwargs) -> None:
    bar = fig.colorbar(mappable, ax=ax, **kwargs)
    # matplotlib rasterizes colour bars with many levels; keep vector figures wholly vector.
    bar.solids.set_rasterized(False)


def _draw_heatmap(ax, fig: Figure, spec: ChartSpec) -> None:
    rng = np.random.default_rng(spec.seed)
    rows, cols = len(spec.categories), len(spec.series_names)
    r, c = np.meshgrid(np.arange(rows), np.arange(cols), indexing="ij")
    grid = 18 + 6 * np.sin(r / rows * 2 * np.pi) + 0.5 * c + rng.normal(0, 0.6, (rows, cols))
    # pcolormesh keeps the cells as vector quads in PDF output (imshow would embed an image).
    mesh = ax.pcolormesh(grid, cmap=spec.colormap, edgecolors="face")
    ax.set_xticks(np.arange(cols) + 0.5, spec.series_names)
    ax.set_yticks(np.arange(rows) + 0.5, spec.categories)
    ax.invert_yaxis()
    ax.tick_params(length=0)
    for side in ("left", "bottom"):
        ax.spines[side].set_visible(False)
    _colour_bar(fig, mesh, ax, label=spec.value_label)


def map_regions(spec: ChartSpec) -> list[np.ndarray]:
    """An invented island cut into districts: sectors of an inner and an outer ring."""
    rng = np.random.default_rng(spec.seed)
    n = len(spec.series[0])
    inner_n = max(1, n // 3)
    outer_n = n - inner_n
    angles = np.linspace(0, 2 * np.pi, 361)
    harmonics = rng.normal(0, 1, (2, 5))
    wobble = sum(0.06 * (harmonics[0, k] * np.cos((k + 2) * angles) + harmonics[1, k] * np.sin((k + 2) * angles))
                 for k in range(5))
    coast = 1.0 + wobble
    regions = []

    def ring(radius_in, radius_out, count):
        edges = np.linspace(0, 360, count + 1).astype(int)
        for a, b in zip(edges[:-1], edges[1:]):
            t = angles[a:b + 1]
            outer = radius_out[a:b + 1] if np.ndim(radius_out) else np.full(t.size, radius_out)
            inner = radius_in[a:b + 1] if np.ndim(radius_in) else np.full(t.size, radius_in)
            xs = np.r_[outer * np.cos(t), (inner * np.cos(t))[::-1]]
            ys = np.r_[outer * np.sin(t), (inner * np.sin(t))[::-1]] * 0.8
            regions.append(np.column_stack([xs, ys]))

    ring(0.0, 0.45 * coast, inner_n)
    ring(0.45 * coast, coast, outer_n)
    return regions


def _draw_map(ax, fig: Figure, spec: ChartSpec) -> None:
    values = np.asarray(spec.series[0], dtype=float)
    scale = mpl.cm.ScalarMappable(norm=mpl.colors.Normalize(values.min(), values.max()),
                                  cmap=mpl.colormaps[spec.colormap])
    for polygon, v in zip(map_regions(spec), values):
        ax.add_patch(Polygon(polygon, closed=True, facecolor=scale.to_rgba(v), edgecolor="#555555", linewidth=0.6))
    ax.set_xlim(-1.4, 1.4)
    ax.set_ylim(-1.15, 1.15)
    ax.set_aspect("equal")
    ax.set_axis_off()
    _colour_bar(fig, scale, ax, label=spec.value_label, shrink=0.85)


def _draw_not_chart(ax, spec: ChartSpec) -> None:
    ax.set_axis_off()
    if spec.variant == "flow":
        steps = spec.categories
        xs = np.linspace(0.1, 0.9, len(steps))
        for i, (x, label) in enumerate(zip(xs, steps)):
            y = 0.62 if i % 2 == 0 else 0.32
            ax.add_patch(FancyBboxPatch((x - 0.075, y - 0.09), 0.15, 0.18, boxstyle="round,pad=0.01",
                                        facecolor="#E8EEF6", edgecolor="#1F3B57", linewidth=1.0,
                                        transform=ax.transAxes))
            ax.text(x, y, label.replace(" ", "\n"), ha="center", va="center", fontsize=spec.tick_pt,
                    transform=ax.transAxes)
            if i + 1 < len(steps):
                ny = 0.32 if i % 2 == 0 else 0.62
                ax.add_patch(FancyArrowPatch((x + 0.075, y), (xs[i + 1] - 0.075, ny), arrowstyle="-|>",
                                             mutation_scale=10, color="#1F3B57", transform=ax.transAxes))
    elif spec.variant == "table":
        cells = [[f"{v:g}" for v in row] for row in spec.series]
        table = ax.table(cellText=cells, rowLabels=spec.categories, colLabels=spec.series_names,
                         loc="center", cellLoc="right")
        table.auto_set_font_size(False)
        table.set_fontsize(spec.tick_pt)
        table.scale(1.0, 1.3)
        for (row, col), cell in table.get_celld().items():
            cell.set_edgecolor("#999999")
            if row == 0 or col == -1:
                cell.set_facecolor("#E6E6E6")
    else:
        ax.imshow(harbour_texture(spec), aspect="auto", interpolation="bilinear")


def harbour_texture(spec: ChartSpec, shape: tuple[int, int] = (120, 200)) -> np.ndarray:
    """A photo-like RGB texture: hazy sky, a dark shoreline and noisy water."""
    rng = np.random.default_rng(spec.seed)
    h, w = shape
    rows = np.linspace(0, 1, h)[:, None, None]
    sky = np.array([0.72, 0.80, 0.88]) - 0.25 * rows
    water = np.array([0.16, 0.30, 0.36]) + 0.12 * rows
    horizon = 0.42 + 0.05 * np.sin(np.linspace(0, 3 * np.pi, w))[None, :, None]
    image = np.where(rows < horizon, sky, water)
    shore = (np.abs(rows - horizon) < 0.035) * np.array([-0.35, -0.35, -0.3])
    noise = rng.normal(0, 1, (h // 4, w // 4, 1))
    noise = np.kron(noise, np.ones((4, 4, 1)))  # blocky grain, smoothed by bilinear display
    image = image + shore + 0.05 * noise * (rows > horizon) + rng.normal(0, 0.015, (h, w, 1))
    return np.clip(image, 0, 1)


def draw(spec: ChartSpec) -> Figure:
    """The matplotlib Figure for a spec, laid out (not attached to pyplot; see save_pdf, render_rgba)."""
    with rc_context(BASE_RC | {"xtick.labelsize": spec.tick_pt, "ytick.labelsize": spec.tick_pt}):
        fig = Figure(figsize=spec.size_in, layout="constrained",
                     facecolor="none" if spec.transparent else BACKGROUND)
        ax = fig.add_subplot()
        if spec.transparent:
            ax.set_facecolor("none")
        t = spec.chart_type
        if t == "bar":
            _draw_bar(ax, spec)
        elif t == "pie":
            _draw_pie(ax, spec)
        elif t == "line":
            _draw_line(ax, spec)
        elif t == "area":
            _draw_area(ax, spec)
        elif t == "scatter":
            _draw_scatter(ax, fig, spec)
        elif t == "box":
            _draw_box(ax, spec)
        elif t == "histogram":
            _draw_histogram(ax, spec)
        elif t == "heatmap":
            _draw_heatmap(ax, fig, spec)
        elif t == "map":
            _draw_map(ax, fig, spec)
        else:
            _draw_not_chart(ax, spec)
        if spec.title:
            ax.set_title(spec.title, loc="left")
        for axes in fig.axes:  # the plot and any colour bar
            axes.tick_params(labelsize=spec.tick_pt, labelcolor=spec.text_colour)
        # Lay out once and freeze: tick labels are created lazily and truth reads their sizes,
        # and a frozen layout makes every later save of this figure give the same bytes.
        fig.draw_without_rendering()
        fig.set_layout_engine("none")
        _style_text(fig, spec)
    return fig


def figure_text_sizes(fig: Figure) -> list[float]:
    """Font sizes of every visible, non-empty text in a figure returned by draw()."""
    return [t.get_fontsize() for t in fig.findobj(Text) if t.get_visible() and t.get_text().strip()]


def save_pdf(fig: Figure) -> bytes:
    """One-page vector PDF of the figure, without a creation date so bytes are reproducible."""
    buffer = io.BytesIO()
    with rc_context(BASE_RC):
        fig.savefig(buffer, format="pdf", metadata={"CreationDate": None})
    return buffer.getvalue()


def render_rgba(fig: Figure, dpi: int) -> np.ndarray:
    """HxWx4 uint8 pixels of the figure at `dpi` (exactly size_in x dpi pixels)."""
    buffer = io.BytesIO()
    with rc_context(BASE_RC):
        fig.savefig(buffer, format="rgba", dpi=dpi)
    w, h = (int(round(s * dpi)) for s in fig.get_size_inches())
    return np.frombuffer(buffer.getvalue(), dtype=np.uint8).reshape(h, w, 4)


def encode_raster(pixels: np.ndarray, fmt: str, dpi: int, jpeg_quality: int = 85) -> bytes:
    """PNG (RGB, or RGBA when `fmt` is "png-alpha") or JPEG bytes with no timestamps."""
    buffer = io.BytesIO()
    if fmt == "png-alpha":
        Image.fromarray(pixels, "RGBA").save(buffer, format="PNG", dpi=(dpi, dpi))
    elif fmt == "png":
        Image.fromarray(pixels[..., :3], "RGB").save(buffer, format="PNG", dpi=(dpi, dpi))
    elif fmt == "jpeg":
        Image.fromarray(pixels[..., :3], "RGB").save(buffer, format="JPEG", dpi=(dpi, dpi), quality=jpeg_quality)
    else:
        raise ValueError(f"unknown raster format {fmt!r}")
    return buffer.getvalue()
