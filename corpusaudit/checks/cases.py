"""Charts with known truth for the chart checks: the fixture generator of the tests and the
benchmark (benchmarks/checks.py).

Each case is a matplotlib chart drawn from a seeded random spec, with the expected outcome
of every chart rule it decides (truth[rule_id] -> bool) and the exact geometry it was
drawn with (truth_values). It renders as a vector figure (matplotlib PDF placed on a
page with PyMuPDF's show_pdf_page, read back with vector_evidence) or as a raster figure
(PNG, optionally degraded by JPEG and downscaling). Names and numbers are invented.
"""

from __future__ import annotations

import io
from dataclasses import dataclass, field
from typing import Any, Callable

import numpy as np

from corpusaudit.config import build_config

STYLES = ("default", "default", "ggplot", "seaborn-v0_8-whitegrid", "bmh", "classic", "seaborn-v0_8-ticks",
          "tableau-colorblind10", "seaborn-v0_8-paper")
_SYLLABLES = ("ka", "lo", "mi", "ren", "sa", "tor", "vel", "qu", "ni", "bo", "zan", "fe", "ul", "dra", "pim")
MONTHS = ("Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec")
RENDER_DPI = 150


@dataclass
class Case:
    name: str
    chart_type: str
    draw: Callable[[Any], None]  # draws on a matplotlib Figure
    truth: dict[str, bool]
    truth_values: dict[str, Any] = field(default_factory=dict)
    style: str = "default"
    size: tuple[float, float] = (5.0, 3.5)
    font_size: float = 10.0
    projection: str | None = None
    # Truth that depends on where things land once the figure is laid out (style, size and
    # font are chosen after the family): read from the laid-out matplotlib Figure.
    drawn_truth: Callable[[Any], dict[str, bool]] | None = None


def invented_names(rng: np.random.Generator, n: int) -> list[str]:
    names: dict[str, None] = {}  # insertion-ordered: a set's order changes with the hash seed
    while len(names) < n:
        names["".join(rng.choice(_SYLLABLES, size=rng.integers(2, 4))).capitalize()] = None
    return list(names)


def unordered_names(rng: np.random.Generator, n: int) -> list[str]:
    """Names that are not in alphabetical order either way."""
    while True:
        names = invented_names(rng, n)
        folded = [s.lower() for s in names]
        if folded != sorted(folded) and folded != sorted(folded, reverse=True):
            return names


def _unsorted(rng: np.random.Generator, values: list[float]) -> list[float]:
    """A shuffle that is neither ascending nor descending, with a clear inversion (a rise and a
    fall of more than 5% of the largest value). Values too close together for one are first
    spread evenly from half the largest to the largest, keeping their ranks."""
    ranked = sorted(values)
    clear = 0.05 * ranked[-1]
    if len(values) < 3 or not (ranked[1] < ranked[-1] - clear or ranked[-2] > ranked[0] + clear):
        ranks = np.argsort(np.argsort(values))
        values = [round(ranked[-1] * (0.5 + 0.5 * float(r) / max(1, len(values) - 1)), 1) for r in ranks]
    while True:
        order = list(rng.permutation(values))
        steps = np.diff(order)
        if (steps > 0.05 * max(values)).any() and (steps < -0.05 * max(values)).any():
            return order


def _cyclic_sorted(values: list[float], tie: float = 1e-9) -> bool:
    """Sorted going round from some slice, either way; differences up to tie count as ties."""
    for start in range(len(values)):
        rotated = values[start:] + values[:start]
        steps = np.diff(rotated)
        if (steps >= -tie).all() or (steps <= tie).all():
            return True
    return False


# ------------------------------------------------------------------ families


def pie_case(rng: np.random.Generator, index: int) -> Case:
    n = int(rng.integers(3, 10))
    similar = bool(rng.random() < 0.4)
    # Shares with relative gaps of at least 20 %, or one pair nearly equal (gap <= 3 %).
    ratios = rng.uniform(0.55, 0.78, n - 1)
    values = np.cumprod(np.concatenate([[1.0], ratios]))
    if similar:
        k = int(rng.integers(0, n - 1))
        values[k + 1] = values[k] * rng.uniform(0.975, 0.995)
    shares = list(values / values.sum())
    shuffled = bool(rng.random() < 0.5) and n >= 4  # any 3 slices read round a circle are in order
    if shuffled:
        while _cyclic_sorted(shares):
            shares = list(rng.permutation(shares))
        # out of order only by a near tie is in order for pie-order (its documented tie tolerance)
        shuffled = not _cyclic_sorted(shares, build_config({}).rules["pie-order"].options["tolerance"])
    labels = invented_names(rng, n)
    label_mode = rng.choice(["none", "true", "false"], p=[0.3, 0.4, 0.3])
    offset = float(rng.choice([-1, 1]) * rng.uniform(6, 15)) if label_mode == "false" else 0.0
    printed = [100 * s for s in shares]
    if label_mode == "false":
        printed[0] += offset if printed[0] + offset > 0 else -offset  # a wrong share, never a negative one
    donut = bool(rng.random() < 0.25)
    edge = bool(rng.random() < 0.5)
    # A quarter of the full pies are exploded: one slice pulled out, or every slice a little.
    # Drawn from a child generator, so the cases that follow are the same with or without it.
    apart = rng.spawn(1)[0]
    explode = None
    if not donut and apart.random() < 0.25:
        explode = [0.0] * n
        if apart.random() < 0.5:
            explode[int(apart.integers(0, n))] = float(apart.uniform(0.08, 0.2))
        else:
            explode = [float(apart.uniform(0.03, 0.08))] * n

    show_labels = bool(rng.random() < 0.5)

    def draw(fig):
        ax = fig.add_subplot()
        wedgeprops = {"linewidth": 1.2, "edgecolor": "white"} if edge else {}
        if donut:
            wedgeprops["width"] = 0.45
        texts = None
        if label_mode != "none":
            texts = [f"{p:.1f}%" for p in printed]
        wedges, *_ = ax.pie(shares, labels=labels if show_labels else None, startangle=90, counterclock=False,
                            wedgeprops=wedgeprops, explode=explode)
        if texts:
            for wedge, text in zip(wedges, texts):
                angle = np.radians((wedge.theta1 + wedge.theta2) / 2)
                radius = 0.78 if donut else 0.62
                x, y = wedge.center  # an exploded wedge's apex
                ax.text(x + radius * np.cos(angle), y + radius * np.sin(angle), text, ha="center", va="center", fontsize=8)

    truth = {"pie-slice-count": n > 5, "pie-similar-slices": similar, "pie-order": shuffled, "chart-3d": False}
    if label_mode != "none":
        truth["pie-total"] = label_mode == "false"
    return Case(f"pie-{index}", "pie", draw, truth, {"slices": n, "shares": shares, "exploded": explode is not None})


def pie3d_case(rng: np.random.Generator, index: int) -> Case:
    shares = list(rng.dirichlet(np.ones(int(rng.integers(3, 6))) * 3))
    tilt = float(rng.uniform(0.35, 0.6))

    def draw(fig):  # a pie seen at an angle: the circle squeezed to an ellipse
        ax = fig.add_subplot()
        ax.pie(shares, startangle=90)
        ax.set_aspect(tilt)

    return Case(f"pie3d-{index}", "pie", draw, {"chart-3d": True}, {"tilt": tilt})


def bar_case(rng: np.random.Generator, index: int) -> Case:
    n = int(rng.integers(3, 9))
    order_kind = rng.choice(["sorted", "natural", "unordered"])
    values = list(np.round(rng.uniform(20, 100, n), 1))
    if order_kind == "sorted":
        values = sorted(values, reverse=bool(rng.random() < 0.5))
        labels = unordered_names(rng, n)
    elif order_kind == "natural":
        values = _unsorted(rng, values)
        start = int(rng.integers(0, 12 - n + 1)) if n <= 12 else 0
        labels = list(MONTHS[start:start + n]) if rng.random() < 0.5 else [str(2000 + 2 * i) for i in range(n)]
    else:
        values = _unsorted(rng, values)
        labels = unordered_names(rng, n)
    truncated = bool(rng.random() < 0.4)
    low = float(np.floor(min(values) * rng.uniform(0.5, 0.9) / 10) * 10) if truncated else 0.0
    truncated = truncated and low > 0
    rotation = float(rng.choice([0, 0, 30, 45, 60, 90]))
    horizontal = bool(rng.random() < 0.25) and rotation == 0
    colour = f"C{int(rng.integers(0, 10))}"

    def draw(fig):
        ax = fig.add_subplot()
        if horizontal:
            ax.barh(range(n), values, color=colour, tick_label=labels)
            ax.invert_yaxis()
            if truncated:
                ax.set_xlim(low, max(values) * 1.05)
        else:
            ax.bar(range(n), values, color=colour, tick_label=labels)
            if truncated:
                ax.set_ylim(low, max(values) * 1.05)
            if rotation:
                for label in ax.get_xticklabels():
                    label.set_rotation(rotation)
                    label.set_ha("right" if rotation < 90 else "center")

    truth = {"bar-baseline": truncated, "bar-order": order_kind == "unordered", "bar-stack-depth": False,
             "chart-3d": False}
    if not horizontal:
        truth["tick-label-rotation"] = rotation >= 30
    return Case(f"bar-{index}", "bar", draw, truth,
                {"axis_min": low, "rotation": rotation if not horizontal else None, "horizontal": horizontal})


def stacked_bar_case(rng: np.random.Generator, index: int) -> Case:
    n = int(rng.integers(3, 7))
    segments = int(rng.integers(2, 8))
    data = rng.uniform(5, 20, (segments, n))

    names = invented_names(rng, n)
    legend = bool(rng.random() < 0.5)

    def draw(fig):
        ax = fig.add_subplot()
        bottom = np.zeros(n)
        for k in range(segments):
            ax.bar(range(n), data[k], bottom=bottom, color=f"C{k}", edgecolor="white" if k % 2 else None,
                   tick_label=names if k == 0 else None, label=f"Part {k + 1}")
            bottom += data[k]
        if legend:
            ax.legend(loc="upper left", bbox_to_anchor=(1.0, 1.0), fontsize=7)

    return Case(f"stacked-{index}", "bar", draw, {"bar-stack-depth": segments > 4, "bar-baseline": False},
                {"segments": segments})


def bar3d_case(rng: np.random.Generator, index: int) -> Case:
    n = int(rng.integers(3, 7))
    values = rng.uniform(1, 10, n)
    colour = f"C{int(rng.integers(0, 10))}"

    def draw(fig):
        ax = fig.add_subplot(projection="3d")
        ax.bar3d(np.arange(n), np.zeros(n), np.zeros(n), 0.6, 0.6, values, color=colour, shade=True)

    return Case(f"bar3d-{index}", "bar", draw, {"chart-3d": True}, {})


def line_case(rng: np.random.Generator, index: int) -> Case:
    series = int(rng.integers(1, 9))
    kind = rng.choice(["numeric", "categorical", "uneven", "months"])
    n = int(rng.integers(5, 9))
    gaps = bool(rng.random() < 0.4) and kind == "numeric"
    markers = bool(rng.random() < 0.4)
    if kind == "numeric":
        if gaps:
            x = np.sort(rng.choice(np.arange(0, 60), n, replace=False)).astype(float)
            while np.diff(x).max() / np.diff(x).min() <= 3:
                x = np.sort(rng.choice(np.arange(0, 60), n, replace=False)).astype(float)
        else:
            x = np.arange(n, dtype=float) * 5
    rotation = float(rng.choice([0, 0, 0, 45, 90]))
    uneven_labels = None
    if kind == "uneven":
        steps = rng.permutation([1, 1, 2, 5, 5, 10, 2, 3][: n - 1])
        uneven_labels = [str(1990 + int(s)) for s in np.concatenate([[0], np.cumsum(steps)])]
    names = unordered_names(rng, n)
    styles = ["-", "--", ":", "-."]
    legend = series > 1 and rng.random() < 0.4
    curves = [np.cumsum(rng.normal(0, 1, n)) + 3 * k for k in range(series)]

    def draw(fig):
        ax = fig.add_subplot()
        for k, y in enumerate(curves):
            style = styles[k // 10 % 4]
            marker = "o" if markers else None
            if kind == "numeric":
                ax.plot(x, y, style, color=f"C{k % 10}", marker=marker)
            elif kind == "categorical":
                ax.plot(names, y, style, color=f"C{k % 10}", marker=marker)
            elif kind == "months":
                ax.plot(list(MONTHS[:n]), y, style, color=f"C{k % 10}", marker=marker)
            else:
                ax.plot(uneven_labels, y, style, color=f"C{k % 10}", marker=marker)
        if rotation:
            for label in ax.get_xticklabels():
                label.set_rotation(rotation)
        if legend:
            ax.legend([f"Series {k + 1}" for k in range(series)], fontsize=6, loc="upper left", bbox_to_anchor=(1.0, 1.0))

    truth = {"line-series-count": series > 5, "line-on-categories": kind == "categorical",
             "line-uneven-axis": kind == "uneven", "tick-label-rotation": rotation >= 30,
             "line-direct-labels": legend}
    if kind == "numeric":
        truth["line-marker-gaps"] = gaps and not markers
    return Case(f"line-{index}", "line", draw, truth, {"series": series, "rotation": rotation})


def sampled_line_case(rng: np.random.Generator, index: int) -> Case:
    """Yearly samples on a numeric x axis, all present or with some missing, drawn with or
    without markers: the cases line-marker-gaps decides."""
    series = int(rng.integers(1, 4))
    n = int(rng.integers(7, 13))
    start = int(rng.integers(1990, 2011))
    uneven = bool(rng.random() < 0.6)
    markers = bool(rng.random() < 0.3)
    years = np.arange(start, start + n, dtype=float)
    if uneven and rng.random() < 0.5:
        # a survey run in a few irregular years
        years = np.sort(rng.choice(np.arange(start, start + 4 * n), n, replace=False)).astype(float)
        while np.diff(years).max() / np.diff(years).min() < 3:
            years = np.sort(rng.choice(np.arange(start, start + 4 * n), n, replace=False)).astype(float)
    elif uneven:
        # a yearly series with a run of two to four years missing
        missing = int(rng.integers(2, 5))
        first = int(rng.integers(1, n - 1))
        years = np.concatenate([np.arange(start, start + first), np.arange(start + first + missing, start + n + missing)])
        years = years.astype(float)
    curves = [np.cumsum(rng.normal(0, 1, len(years))) + 3 * k for k in range(series)]

    def draw(fig):
        ax = fig.add_subplot()
        for k, y in enumerate(curves):
            ax.plot(years, y, color=f"C{k}", marker="o" if markers else None)

    truth = {"line-marker-gaps": uneven and not markers, "line-series-count": False, "line-on-categories": False,
             "line-uneven-axis": False, "tick-label-rotation": False, "line-direct-labels": False}
    return Case(f"line-{index}", "line", draw, truth, {"series": series, "rotation": 0.0})


def area_case(rng: np.random.Generator, index: int) -> Case:
    layers = int(rng.integers(1, 8))
    stacked = bool(rng.random() < 0.5) and layers >= 2
    x = np.arange(20)
    ys = [np.abs(np.cumsum(rng.normal(0, 1, 20))) + 2 + k for k in range(layers)]

    def draw(fig):
        ax = fig.add_subplot()
        if stacked:
            ax.stackplot(x, *ys, colors=[f"C{k}" for k in range(layers)])
        else:
            for k, y in enumerate(ys):
                ax.fill_between(x, 0, y, color=f"C{k}", alpha=0.4 if layers > 1 else 1.0, linewidth=0)

    return Case(f"area-{index}", "area", draw, {"area-stacked": stacked, "line-series-count": layers > 5},
                {"series": layers})


def scatter_case(rng: np.random.Generator, index: int) -> Case:
    dense = bool(rng.random() < 0.5)
    edge = bool(rng.random() < 0.4)
    if dense:
        n = int(rng.integers(400, 900))
        pts = rng.normal(0, 1, (n, 2))
        size = float(rng.uniform(40, 90))
    else:
        side = int(rng.integers(4, 7))
        grid = np.stack(np.meshgrid(np.arange(side), np.arange(side)), -1).reshape(-1, 2).astype(float)
        pts = grid + rng.uniform(-0.15, 0.15, grid.shape)
        size = float(rng.uniform(10, 25))
    colour = f"C{int(rng.integers(0, 10))}"

    def draw(fig):
        ax = fig.add_subplot()
        ax.scatter(pts[:, 0], pts[:, 1], s=size, color=colour)
        if edge:
            ax.set_xlim(pts[:, 0].min(), pts[:, 0].max())
        else:
            margin = 0.08 * np.ptp(pts[:, 0])
            ax.set_xlim(pts[:, 0].min() - margin, pts[:, 0].max() + margin)
            ax.set_ylim(pts[:, 1].min() - 0.08 * np.ptp(pts[:, 1]), pts[:, 1].max() + 0.08 * np.ptp(pts[:, 1]))

    def drawn_truth(fig) -> dict[str, bool]:
        # A round marker of size s is sqrt(s) points across (matplotlib's scatter).
        return {"scatter-overplotting": hidden_share(fig.axes[0], pts, np.sqrt(size) / 2 * fig.dpi / 72.0)
                > _OVERPLOTTING_LIMIT}

    return Case(f"scatter-{index}", "scatter", draw, {"scatter-edge-points": edge}, {}, drawn_truth=drawn_truth)


_OVERPLOTTING_LIMIT = 0.2  # scatter-overplotting's default max_hidden_share


def hidden_share(ax, points: np.ndarray, radius_px: float, supersample: int = 4) -> float:
    """1 - (area of the union of the markers) / (sum of their areas), inside the axes, from the
    markers' data positions and size: the quantity scatter-overplotting judges, computed from
    what was drawn rather than from the figure."""
    import cv2

    box = ax.get_window_extent()
    centres = (ax.transData.transform(points) - (box.x0, box.y0)) * supersample
    radius = max(1, int(round(radius_px * supersample)))
    disc = np.zeros((2 * radius + 1, 2 * radius + 1), np.uint8)
    cv2.circle(disc, (radius, radius), radius, 1, thickness=-1)
    size = (int(np.ceil(box.width * supersample)), int(np.ceil(box.height * supersample)))
    return overlap_share(np.round(centres).astype(int), size, disc)


def overlap_share(centres: np.ndarray, size: tuple[int, int], mark: np.ndarray) -> float:
    """1 - union / sum of the areas of one mark (a 0/1 uint8 array of odd sides) stamped at each
    integer centre on a width x height canvas, both clipped to it (markers are clipped to the plot)."""
    width, height = size
    reach_y, reach_x = mark.shape[0] // 2, mark.shape[1] // 2
    union = np.zeros((height, width), np.uint8)
    own = 0
    for cx, cy in centres:
        top, left = int(cy) - reach_y, int(cx) - reach_x
        rows = slice(max(0, top), max(0, min(height, top + mark.shape[0])))
        columns = slice(max(0, left), max(0, min(width, left + mark.shape[1])))
        part = mark[rows.start - top:rows.stop - top, columns.start - left:columns.stop - left]
        union[rows, columns] |= part
        own += int(part.sum())
    return 1.0 - int(union.sum()) / own if own else 0.0


def box_case(rng: np.random.Generator, index: int) -> Case:
    n = int(rng.integers(3, 7))
    order_kind = rng.choice(["sorted", "natural", "unordered"])
    medians = list(rng.uniform(10, 50, n))
    if order_kind == "sorted":
        medians = sorted(medians)
        labels = unordered_names(rng, n)
    else:
        medians = _unsorted(rng, medians)
        labels = [f"Q{i + 1}" for i in range(n)] if order_kind == "natural" else unordered_names(rng, n)
    data = [rng.normal(m, 4, 60) for m in medians]
    drawn = [float(np.median(d)) for d in data]  # the medians the boxes show, not the generating centres
    if order_kind == "sorted":
        data = [data[k] for k in np.argsort(drawn)]
    rotation = float(rng.choice([0, 0, 45]))

    fliers = bool(rng.random() < 0.5)

    def draw(fig):
        ax = fig.add_subplot()
        ax.boxplot(data, showfliers=fliers)
        ax.set_xticks(range(1, n + 1), labels, rotation=rotation)

    monotone = bool((np.diff(drawn) >= 0).all() or (np.diff(drawn) <= 0).all())
    return Case(f"box-{index}", "box", draw,
                {"box-order": order_kind == "unordered" and not monotone, "tick-label-rotation": rotation >= 30}, {})


FAMILIES: tuple[tuple[Callable[[np.random.Generator, int], Case], float], ...] = (
    (pie_case, 0.2), (pie3d_case, 0.03), (bar_case, 0.2), (stacked_bar_case, 0.08), (bar3d_case, 0.03),
    (line_case, 0.18), (sampled_line_case, 0.08), (area_case, 0.08), (scatter_case, 0.1), (box_case, 0.1),
)


def generate(count: int, seed: int = 20240517) -> list[Case]:
    """count cases, deterministic for a seed; families in fixed proportions."""
    rng = np.random.default_rng(seed)
    weights = np.array([w for _, w in FAMILIES])
    cases = []
    for index in range(count):
        family = FAMILIES[int(rng.choice(len(FAMILIES), p=weights / weights.sum()))][0]
        case = family(rng, index)
        case.style = str(rng.choice(STYLES))
        case.size = (float(rng.uniform(4.0, 7.0)), float(rng.uniform(3.0, 4.8)))
        case.font_size = float(rng.uniform(8, 12))
        if case.drawn_truth is not None:
            case.truth.update(_laid_out(case, case.drawn_truth))
        cases.append(case)
    return cases


# ------------------------------------------------------------------ rendering


def _draw(case: Case, backend_format: str, dpi: int) -> bytes:
    return _with_figure(case, lambda fig: _saved(fig, backend_format, dpi))


def _saved(fig, backend_format: str, dpi: int) -> bytes:
    buffer = io.BytesIO()
    fig.savefig(buffer, format=backend_format, dpi=dpi)
    return buffer.getvalue()


def _laid_out(case: Case, read: Callable[[Any], Any]) -> Any:
    """read(fig) on the case's figure once its layout is done, at RENDER_DPI."""
    def after_layout(fig):
        fig.set_dpi(RENDER_DPI)
        fig.draw_without_rendering()
        return read(fig)
    return _with_figure(case, after_layout)


def _with_figure(case: Case, use: Callable[[Any], Any]) -> Any:
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.style
    from matplotlib.figure import Figure as MplFigure

    with matplotlib.style.context(case.style), matplotlib.rc_context({"font.size": case.font_size, "pdf.fonttype": 42}):
        fig = MplFigure(figsize=case.size, layout="constrained")
        case.draw(fig)
        return use(fig)


def vector_figure(case: Case, dpi: int = RENDER_DPI):
    """The case as a vector figure: PDF placed on a page, read back as PyMuPDF would extract it."""
    from corpusaudit.extract.vector_evidence import figure_from_chart_pdf

    return figure_from_chart_pdf(_draw(case, "pdf", 72), case.name + "-v", case.chart_type, dpi)


def raster_figure(case: Case, rng: np.random.Generator | None = None, dpi: int = RENDER_DPI):
    """The case as a raster figure (PNG), degraded by JPEG and downscaling when rng says so."""
    from PIL import Image

    rng = rng or np.random.default_rng(0)
    pixels = np.asarray(Image.open(io.BytesIO(_draw(case, "png", dpi))).convert("RGB"))
    return degraded_raster_figure(pixels, case.name, case.chart_type, rng, dpi)


def degraded_raster_figure(pixels: np.ndarray, name: str, chart_type: str, rng: np.random.Generator, dpi: int):
    """A raster Figure of rendered RGB pixels, a quarter of them downscaled (0.75-0.9) and
    three in ten saved as JPEG (quality 80-95) first, as deposited rasters often are."""
    import cv2

    from corpusaudit.model import Figure

    if rng.random() < 0.25:
        factor = float(rng.uniform(0.75, 0.9))
        pixels = cv2.resize(pixels, None, fx=factor, fy=factor, interpolation=cv2.INTER_AREA)
    if rng.random() < 0.3:
        ok, encoded = cv2.imencode(".jpg", pixels[:, :, ::-1], [cv2.IMWRITE_JPEG_QUALITY, int(rng.integers(80, 95))])
        pixels = cv2.imdecode(encoded, cv2.IMREAD_COLOR)[:, :, ::-1]
    pixels = np.ascontiguousarray(pixels)
    return Figure(figure_id=name + "-r", document_id="bench", path=name + ".png", page=1, index=0,
                  bbox=(0, 0, pixels.shape[1], pixels.shape[0]), source="raster", width_px=pixels.shape[1],
                  height_px=pixels.shape[0], effective_ppi=float(dpi), pixels=pixels, chart_type=chart_type)
