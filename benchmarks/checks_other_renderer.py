"""Benchmark of the chart checks on charts from a renderer other than matplotlib (Vega-Lite).

Every other chart-rule benchmark draws its charts with matplotlib (corpusaudit.checks.cases),
so it cannot tell whether a rule measures the chart or matplotlib's way of drawing it. This
script builds N Vega-Lite specs from a seed, each with the expected outcome of the rules it
decides (pie-slice-count, pie-order, bar-baseline, bar-order, tick-label-rotation,
line-series-count, scatter-overplotting, box-order), renders each offline with vl-convert
as a vector figure (PDF placed on a page and read back as extraction would) and as a raster
figure (PNG at the same scale, a share downscaled and JPEG-degraded as cases.raster_figure
does), sets figure.chart_type to the truth (the classifier is measured elsewhere), runs every
rule with default settings and prints per-rule precision and recall, vector and raster, in
the format of benchmarks/checks.py, plus measurement agreement (pie slice count, series
count). A rule that could not measure counts as not reporting and is counted as 'unm'.
Names (harbours, species, districts) and numbers are invented.

    python benchmarks/checks_other_renderer.py [--cases 150] [--seed 7301] [--save-failures]

--save-failures writes the PNG of every wrong case, both sources, with a failures.json
listing them, under benchmarks/_work/other_renderer/.
"""

from __future__ import annotations

import argparse
import io
import json
import logging
import sys
import time
from collections import defaultdict
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from benchmarks.checks import _measurement_errors, print_report  # noqa: E402  same scoring and table
from corpusaudit.checks.cases import MONTHS, overlap_share  # noqa: E402
from corpusaudit.checks.runner import check_figure  # noqa: E402
from corpusaudit.config import build_config  # noqa: E402
from corpusaudit.measure import Measurements  # noqa: E402

WORK = ROOT / "benchmarks" / "_work" / "other_renderer"
DPI = 150  # vector figures are rendered at this dpi; the PNG uses the same scale
# Light built-in vl-convert themes; None is Vega-Lite's own look (most charts). "urbaninstitute" and
# "powerbi" are left out: their fonts are not bundled, so vl-convert drops their axis text.
THEMES = (None, None, None, None, "excel", "fivethirtyeight", "ggplot2", "googlecharts", "latimes", "quartz",
          "vox", "carbonwhite")
# Categorical schemes with at least 9 distinct colours, so every series has its own colour.
SCHEMES = ("category10", "tableau10", "set1", "paired", "observable10", "set3")
_SYLLABLES = ("bar", "vel", "ost", "mira", "kel", "dun", "tha", "rav", "sel", "omi", "cor", "ly", "ten", "wick", "ga")
_SPECIES_ENDINGS = ("ensis", "ata", "ifolia", "oides", "ula", "ica")


@dataclass
class Chart:
    name: str
    chart_type: str
    spec: dict
    truth: dict[str, bool]
    truth_values: dict[str, Any] = field(default_factory=dict)  # keys as benchmarks/checks.py reads them
    theme: str | None = None


# ------------------------------------------------------------------ invented names


def _word(rng: np.random.Generator) -> str:
    return "".join(rng.choice(_SYLLABLES, size=int(rng.integers(2, 4)))).capitalize()


def _place(rng: np.random.Generator, kind: str) -> str:
    word = _word(rng)
    if kind == "short":
        return word
    if kind == "harbour":
        return f"Port {word}" if rng.random() < 0.5 else f"{word} Haven"
    if kind == "species":
        return f"{word} {_word(rng).lower()}{rng.choice(_SPECIES_ENDINGS)}"
    return f"{word} Ward"


def _names(rng: np.random.Generator, n: int, kind: str, unordered: bool) -> list[str]:
    """n distinct invented names; with unordered, in alphabetical order neither way."""
    while True:
        names: dict[str, None] = {}  # insertion-ordered
        while len(names) < n:
            names[_place(rng, kind)] = None
        result = list(names)
        folded = [s.lower() for s in result]
        if not unordered or (folded != sorted(folded) and folded != sorted(folded, reverse=True)):
            return result


# ------------------------------------------------------------------ order helpers


def _unsorted(rng: np.random.Generator, values: list[float]) -> list[float]:
    """A shuffle that is neither ascending nor descending, with a clear inversion both ways."""
    while True:
        order = [float(v) for v in rng.permutation(values)]
        steps = np.diff(order)
        if (steps > 0.05 * max(values)).any() and (steps < -0.05 * max(values)).any():
            return order


def _cyclic_sorted(values: list[float]) -> bool:
    for start in range(len(values)):
        steps = np.diff(values[start:] + values[:start])
        if (steps >= -1e-9).all() or (steps <= 1e-9).all():
            return True
    return False


def _spaced(rng: np.random.Generator, n: int, low: float, high: float, gap: float) -> list[float]:
    """n values in [low, high] at least gap apart (so their order is readable in pixels)."""
    while True:
        values = rng.uniform(low, high, n)
        if np.diff(np.sort(values)).min() >= gap:
            return [float(v) for v in values]


# ------------------------------------------------------------------ families


def _axis(angle: int | None = None, title: str | None = None) -> dict:
    axis: dict[str, Any] = {}
    if angle is not None:
        axis["labelAngle"] = angle
    if title is not None:
        axis["title"] = title
    return axis


MAX_BAND_WIDTH = 470  # pixels at scale 1: with axis and legend the chart fits a letter page's width


def _band_step(rng: np.random.Generator, labels: list[str], angle: int | None, low: int, high: int) -> int:
    """Pixels per category: upright labels get their estimated width plus a gap, as a chart that
    fits its labels would (touching labels are an overlap defect, and PDF text extraction joins them)."""
    step = int(rng.integers(low, high))
    if angle == 0:
        widest = 6.5 * max(len(label) for label in labels)  # Vega-Lite's 10 px sans-serif, generously
        step = max(step, int(widest + rng.uniform(10, 24)))
    return step


def pie_chart(rng: np.random.Generator, index: int) -> Chart:
    n = int(rng.integers(3, 10))
    ratios = rng.uniform(0.55, 0.78, n - 1)  # neighbouring shares differ by at least 20 %
    values = np.cumprod(np.concatenate([[1.0], ratios]))
    shares = [float(s) for s in values / values.sum()]
    if rng.random() < 0.5:
        shares.reverse()
    shuffled = bool(rng.random() < 0.5) and n >= 4  # any 3 slices read round a circle are in order
    if shuffled:
        while _cyclic_sorted(shares):
            shares = [float(s) for s in rng.permutation(shares)]
    labels = _names(rng, n, str(rng.choice(["harbour", "district"])), unordered=False)
    data = [{"i": i, "name": name, "share": share} for i, (name, share) in enumerate(zip(labels, shares))]
    side = int(rng.integers(160, 300))
    mark: dict[str, Any] = {"type": "arc"}
    donut = bool(rng.random() < 0.3)
    if donut:
        mark["innerRadius"] = int(side * rng.uniform(0.15, 0.3))
    if rng.random() < 0.4:
        mark["stroke"] = "#ffffff"
        mark["strokeWidth"] = float(rng.uniform(0.5, 2.0))
    colour: dict[str, Any] = {"field": "name", "type": "nominal", "sort": None,
                              "scale": {"scheme": str(rng.choice(SCHEMES))}, "title": "Harbour"}
    if rng.random() < 0.25:
        colour["legend"] = None
    # The order channel keeps the data order round the circle (Vega-Lite would sort by colour otherwise).
    encoding = {"theta": {"field": "share", "type": "quantitative", "stack": True},
                "order": {"field": "i", "type": "quantitative"}, "color": colour}
    spec: dict[str, Any] = {"width": side, "height": side, "data": {"values": data}}
    if rng.random() < 0.35:  # percentages printed outside the slices
        radius = side / 2
        spec["layer"] = [{"mark": {**mark, "outerRadius": radius * 0.8}},
                         {"mark": {"type": "text", "radius": radius * 0.92, "fontSize": 9},
                          "encoding": {"text": {"field": "share", "type": "quantitative", "format": ".0%"}}}]
        spec["encoding"] = encoding
    else:
        spec["mark"] = mark
        spec["encoding"] = encoding
    truth = {"pie-slice-count": n > 5, "pie-order": shuffled}
    return Chart(f"pie-{index}", "pie", spec, truth, {"slices": n, "shares": shares})


def bar_chart(rng: np.random.Generator, index: int) -> Chart:
    n = int(rng.integers(3, 9))
    order_kind = str(rng.choice(["sorted", "natural", "unordered"]))
    baseline = str(rng.choice(["zero", "zero", "zero-false", "domain"]))
    # With zero: false Vega-Lite fits a nice domain round the data; values of 45 and more keep its
    # lower end above zero.
    low_value = 45.0 if baseline == "zero-false" else 20.0
    values = [float(v) for v in np.round(rng.uniform(low_value, 100, n), 1)]
    kind = str(rng.choice(["harbour", "species", "district"]))
    if order_kind == "sorted":
        values = sorted(values, reverse=bool(rng.random() < 0.5))
        labels = _names(rng, n, kind, unordered=True)
    elif order_kind == "natural":
        values = _unsorted(rng, values)
        start = int(rng.integers(0, 12 - n + 1))
        labels = list(MONTHS[start:start + n]) if rng.random() < 0.5 else [str(2004 + 2 * i) for i in range(n)]
    else:
        values = _unsorted(rng, values)
        labels = _names(rng, n, kind, unordered=True)
    horizontal = bool(rng.random() < 0.25)
    angle = None if horizontal else int(rng.choice([0, 0, -45, -90]))
    step = _band_step(rng, labels, angle, 22, 60)
    if angle == 0 and n * step > MAX_BAND_WIDTH and order_kind != "natural":
        kind = "short"  # upright labels that do not fit: shorter names first, as authors do
        labels = _names(rng, n, kind, unordered=True)
        step = _band_step(rng, labels, angle, 22, 60)
    if angle == 0 and n * step > MAX_BAND_WIDTH:  # still too wide: turned
        angle = int(rng.choice([-45, -90]))
        step = _band_step(rng, labels, angle, 22, 44)
    value_scale: dict[str, Any] = {}
    axis_min: float | None = 0.0
    if baseline == "zero-false":
        value_scale["zero"] = False
        axis_min = None  # a nice domain from the data: above zero, exact end not computed here
    elif baseline == "domain":
        axis_min = float(np.floor(min(values) * rng.uniform(0.5, 0.9) / 10) * 10)
        if axis_min <= 0:
            axis_min, baseline = 0.0, "zero"
        else:
            value_scale["domain"] = [axis_min, float(np.ceil(max(values) * 1.05 / 10) * 10)]
    title = {"harbour": "Harbour", "species": "Species", "district": "District", "short": "Site"}[kind]
    category = {"field": "name", "type": "nominal", "sort": None, "axis": _axis(angle, title)}
    value = {"field": "tonnage", "type": "quantitative", "title": "Landed tonnage"}
    if value_scale:
        # Unstacked: a stacked bar's domain always takes in its zero baseline, and unstacked bars start
        # at the bottom of the scale's range when zero is outside the domain.
        value["scale"] = value_scale
        value["stack"] = None
    encoding = {"y": category, "x": value} if horizontal else {"x": category, "y": value}
    mark: dict[str, Any] = {"type": "bar", "color": str(rng.choice(
        ["#4c78a8", "#e45756", "#54a24b", "#72b7b2", "#b279a2", "#9d755d", "#f58518"]))}
    if rng.random() < 0.25:
        mark["cornerRadiusEnd"] = float(rng.choice([2, 4]))
    size_key = "height" if horizontal else "width"
    spec = {size_key: {"step": step}, ("width" if horizontal else "height"): int(rng.integers(160, 280)),
            "data": {"values": [{"name": c, "tonnage": v} for c, v in zip(labels, values)]},
            "mark": mark, "encoding": encoding}
    truth = {"bar-baseline": baseline != "zero", "bar-order": order_kind == "unordered"}
    if not horizontal:
        truth["tick-label-rotation"] = abs(angle) >= 30
    values_out: dict[str, Any] = {"rotation": abs(angle) if angle is not None else None, "horizontal": horizontal}
    if axis_min is not None:
        values_out["axis_min"] = axis_min
    return Chart(f"bar-{index}", "bar", spec, truth, values_out)


def line_chart(rng: np.random.Generator, index: int) -> Chart:
    series = int(rng.integers(2, 10))
    n = int(rng.integers(8, 30))
    names = _names(rng, series, str(rng.choice(["harbour", "species"])), unordered=False)
    data = []
    for k, name in enumerate(names):
        y = np.cumsum(rng.normal(0, 1, n)) + 4 * k + 20
        data += [{"year": 1990 + t, "name": name, "count": float(v)} for t, v in enumerate(y)]
    angle = int(rng.choice([0, 0, 0, -45, -90]))
    mark: dict[str, Any] = {"type": "line", "strokeWidth": float(rng.uniform(1.2, 2.5))}
    if rng.random() < 0.3:
        mark["point"] = True
    colour: dict[str, Any] = {"field": "name", "type": "nominal", "sort": None,
                              "scale": {"scheme": str(rng.choice(SCHEMES))}, "title": "Site"}
    spec = {"width": int(rng.integers(220, 380)), "height": int(rng.integers(150, 260)), "data": {"values": data},
            "mark": mark,
            "encoding": {"x": {"field": "year", "type": "quantitative", "scale": {"zero": False},
                               "axis": _axis(angle, "Survey year") | {"format": "d"}},
                         "y": {"field": "count", "type": "quantitative", "title": "Sightings"},
                         "color": colour}}
    truth = {"line-series-count": series > 5, "tick-label-rotation": abs(angle) >= 30}
    return Chart(f"line-{index}", "line", spec, truth, {"series": series, "rotation": abs(angle)})


def scatter_chart(rng: np.random.Generator, index: int) -> Chart:
    dense = bool(rng.random() < 0.5)
    if dense:
        n = int(rng.integers(400, 900))
        points = rng.normal(0, 1, (n, 2))
        size = float(rng.uniform(40, 110))  # marker area, square pixels at scale 1
    else:
        side = int(rng.integers(4, 7))
        grid = np.stack(np.meshgrid(np.arange(side), np.arange(side)), -1).reshape(-1, 2).astype(float)
        points = grid + rng.uniform(-0.15, 0.15, grid.shape)
        size = float(rng.uniform(15, 45))
    shape = str(rng.choice(["circle", "point", "square"]))
    mark: dict[str, Any] = {"type": shape, "size": size, "color": str(rng.choice(["#4c78a8", "#e45756", "#54a24b", "#333333"]))}
    if shape == "point":
        mark["filled"] = bool(rng.random() < 0.5)
    data = [{"length": float(x), "mass": float(y)} for x, y in points]
    width, height = int(rng.integers(240, 380)), int(rng.integers(180, 300))
    # Explicit domains, not rounded outwards ("nice"): where each marker lands is then known.
    domains = [(float(v.min() - 0.05 * np.ptp(v)), float(v.max() + 0.05 * np.ptp(v))) for v in points.T]
    spec = {"width": width, "height": height, "data": {"values": data},
            "mark": mark,
            "encoding": {"x": {"field": "length", "type": "quantitative", "title": "Shell length",
                               "scale": {"zero": False, "nice": False, "domain": list(domains[0])}},
                         "y": {"field": "mass", "type": "quantitative", "title": "Dry mass",
                               "scale": {"zero": False, "nice": False, "domain": list(domains[1])}}}}
    pixels = np.column_stack([(points[:, k] - lo) / (hi - lo) * extent
                              for k, ((lo, hi), extent) in enumerate(zip(domains, (width, height)))])
    hidden = _hidden_share(pixels, (width, height), size, square=shape == "square")
    return Chart(f"scatter-{index}", "scatter", spec, {"scatter-overplotting": hidden > OVERPLOTTING_LIMIT},
                 {"points": len(points)})


OVERPLOTTING_LIMIT = 0.2  # scatter-overplotting's default max_hidden_share


def _hidden_share(centres: np.ndarray, plot: tuple[int, int], size: float, square: bool, supersample: int = 4) -> float:
    """What scatter-overplotting judges, from where the markers were drawn (cases.overlap_share).
    A mark's size is its area in square pixels (Vega-Lite); a point's outline counts as its disc."""
    import cv2

    half = np.sqrt(size) / 2 if square else np.sqrt(size / np.pi)
    reach = max(1, int(round(half * supersample)))
    mark = np.ones((2 * reach + 1, 2 * reach + 1), np.uint8)
    if not square:
        mark[:] = 0
        cv2.circle(mark, (reach, reach), reach, 1, thickness=-1)
    return overlap_share(np.round(centres * supersample).astype(int), (plot[0] * supersample, plot[1] * supersample), mark)


def box_chart(rng: np.random.Generator, index: int) -> Chart:
    n = int(rng.integers(3, 8))
    order_kind = str(rng.choice(["sorted", "natural", "unordered"]))
    centres = _spaced(rng, n, 10, 50, 4.0)
    samples = [rng.normal(c, 3.5, 60) for c in centres]
    medians = [float(np.median(s)) for s in samples]  # the truth is the drawn median, not the centre
    if order_kind == "sorted":
        order = list(np.argsort(medians)[::(-1 if rng.random() < 0.5 else 1)])
        labels = _names(rng, n, "district", unordered=True)
    else:
        shuffled = _unsorted(rng, medians)
        order = [medians.index(m) for m in shuffled]
        labels = [f"Wave {i + 1}" for i in range(n)] if order_kind == "natural" else _names(rng, n, "district", unordered=True)
    horizontal = bool(rng.random() < 0.2)
    angle = None if horizontal else int(rng.choice([0, 0, -45]))
    step = _band_step(rng, labels, angle, 36, 64)
    if angle == 0 and n * step > MAX_BAND_WIDTH and order_kind != "natural":
        labels = _names(rng, n, "short", unordered=True)
        step = _band_step(rng, labels, angle, 36, 64)
    if angle == 0 and n * step > MAX_BAND_WIDTH:
        angle = -45
        step = _band_step(rng, labels, angle, 36, 64)
    data = [{"group": label, "reading": float(v)} for label, k in zip(labels, order) for v in samples[k]]
    # An explicit order: with sort null the boxplot's aggregation does not keep the data order.
    group = {"field": "group", "type": "nominal", "sort": labels, "axis": _axis(angle, "District")}
    reading = {"field": "reading", "type": "quantitative", "scale": {"zero": False}, "title": "Nitrate (mg/l)"}
    mark: dict[str, Any] = {"type": "boxplot", "extent": 1.5 if rng.random() < 0.7 else "min-max"}
    if rng.random() < 0.4:
        mark["color"] = str(rng.choice(["#4c78a8", "#54a24b", "#b279a2", "#f58518"]))
    spec = {("height" if horizontal else "width"): {"step": step},
            ("width" if horizontal else "height"): int(rng.integers(170, 280)),
            "data": {"values": data}, "mark": mark,
            "encoding": {"y": group, "x": reading} if horizontal else {"x": group, "y": reading}}
    truth = {"box-order": order_kind == "unordered"}
    if not horizontal:
        truth["tick-label-rotation"] = abs(angle) >= 30
    return Chart(f"box-{index}", "box", spec, truth,
                 {"rotation": abs(angle) if angle is not None else None, "medians": [medians[k] for k in order]})


FAMILIES = ((pie_chart, 0.22), (bar_chart, 0.3), (line_chart, 0.2), (scatter_chart, 0.13), (box_chart, 0.15))


def generate(count: int, seed: int) -> list[Chart]:
    """count charts, deterministic for a seed; families in fixed proportions."""
    rng = np.random.default_rng(seed)
    weights = np.array([w for _, w in FAMILIES])
    charts = []
    for index in range(count):
        chart = FAMILIES[int(rng.choice(len(FAMILIES), p=weights / weights.sum()))][0](rng, index)
        chart.spec["$schema"] = "https://vega.github.io/schema/vega-lite/v5.json"
        chart.spec["background"] = "white"
        if rng.random() < 0.4:
            chart.spec["title"] = f"{_word(rng)} survey, {int(rng.integers(1995, 2024))}"
        chart.theme = THEMES[int(rng.integers(len(THEMES)))]
        charts.append(chart)
    return charts


# ------------------------------------------------------------------ rendering


def _theme(chart: Chart) -> dict:
    return {"theme": chart.theme} if chart.theme else {}


def vector_figure(chart: Chart):
    import vl_convert as vlc

    from corpusaudit.extract.vector_evidence import figure_from_chart_pdf

    pdf = vlc.vegalite_to_pdf(chart.spec, **_theme(chart))
    return figure_from_chart_pdf(pdf, chart.name + "-v", chart.chart_type, DPI)


def raster_figure(chart: Chart, rng: np.random.Generator):
    """A PNG at the vector figure's scale, degraded as corpusaudit.checks.cases.raster_figure does."""
    import vl_convert as vlc
    from PIL import Image

    from corpusaudit.checks.cases import degraded_raster_figure

    png = vlc.vegalite_to_png(chart.spec, scale=DPI / 72.0, **_theme(chart))
    with Image.open(io.BytesIO(png)) as image:
        rgba = image.convert("RGBA")
    flat = Image.new("RGBA", rgba.size, (255, 255, 255, 255))
    flat.alpha_composite(rgba)
    return degraded_raster_figure(np.asarray(flat.convert("RGB")), chart.name, chart.chart_type, rng, DPI)


# ------------------------------------------------------------------ scoring


def _save_failure(figure, chart: Chart, source: str, wrong: list[dict], failures: list[dict]) -> None:
    from PIL import Image

    WORK.mkdir(parents=True, exist_ok=True)
    path = WORK / f"{chart.name}-{source}.png"
    Image.fromarray(figure.pixels).save(path)
    failures.append({"chart": chart.name, "source": source, "png": path.name, "theme": chart.theme,
                     "wrong": wrong, "truth_values": chart.truth_values, "spec": chart.spec})


class _RuleCrashes(logging.Handler):
    """Counts the rules the runner caught raising (logged, then counted as unmeasured)."""

    def __init__(self):
        super().__init__(logging.ERROR)
        self.figures: dict[str, list[str]] = defaultdict(list)

    def emit(self, record: logging.LogRecord) -> None:
        if record.msg.startswith("rule %s failed"):
            rule_id, figure_id = record.args
            self.figures[rule_id].append(figure_id)


def run(count: int, seed: int, save_failures: bool = False) -> dict:
    config = build_config({})
    crashes = _RuleCrashes()
    logging.getLogger("corpusaudit.checks.runner").addHandler(crashes)
    measurement_crashes: list[str] = []
    charts = generate(count, seed)
    rng = np.random.default_rng(seed + 1)
    tallies = {src: defaultdict(lambda: {"tp": 0, "fp": 0, "fn": 0, "tn": 0, "unmeasured": 0}) for src in ("vector", "raster")}
    errors = {src: defaultdict(list) for src in ("vector", "raster")}
    failures: list[dict] = []
    started = time.perf_counter()
    for chart in charts:
        for source in ("vector", "raster"):
            figure = vector_figure(chart) if source == "vector" else raster_figure(chart, rng)
            measurements = Measurements(figure)
            results, unmeasured = check_figure(figure, config, measurements)
            found = {r.rule for r in results}
            wrong = []
            for rule_id, expected in chart.truth.items():
                tally = tallies[source][rule_id]
                predicted = rule_id in found
                tally["unmeasured"] += rule_id in unmeasured
                tally[("tp" if expected else "fp") if predicted else ("fn" if expected else "tn")] += 1
                if predicted != expected:
                    wrong.append({"rule": rule_id, "expected": expected, "unmeasured": rule_id in unmeasured,
                                  "value": next((r.draft.value for r in results if r.rule == rule_id), None)})
            try:
                _measurement_errors(chart, measurements, errors[source])
            except Exception:  # a measurement that raises is the product's bug, counted, not fatal here
                measurement_crashes.append(figure.figure_id)
            if save_failures and wrong:
                _save_failure(figure, chart, source, wrong, failures)
    elapsed = time.perf_counter() - started
    if save_failures:
        (WORK / "failures.json").write_text(json.dumps(failures, indent=1, default=str))
    return {"cases": count, "figures": 2 * count, "seconds": round(elapsed, 1),
            "rules": {src: dict(t) for src, t in tallies.items()},
            "errors": {src: {k: float(np.mean(v)) for k, v in e.items()} for src, e in errors.items()},
            "error_counts": {src: {k: len(v) for k, v in e.items()} for src, e in errors.items()},
            "rule_crashes": dict(crashes.figures), "measurement_crashes": measurement_crashes}


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--cases", type=int, default=150)
    parser.add_argument("--seed", type=int, default=7301)
    parser.add_argument("--save-failures", action="store_true", help="PNGs of wrong cases under benchmarks/_work/other_renderer/")
    args = parser.parse_args()
    report = run(args.cases, args.seed, args.save_failures)
    WORK.mkdir(parents=True, exist_ok=True)
    (WORK / "report.json").write_text(json.dumps(report, indent=1))
    print("renderer: Vega-Lite via vl-convert (PDF for vector, PNG for raster)")
    print_report(report)
    for rule_id, figures in sorted(report["rule_crashes"].items()):
        print(f"  rule {rule_id} raised (counted unmeasured) on {len(figures)} figures: {', '.join(figures)}")
    if report["measurement_crashes"]:
        print(f"  measurements for the table raised on {len(report['measurement_crashes'])} figures: "
              f"{', '.join(report['measurement_crashes'])}")


if __name__ == "__main__":
    main()
