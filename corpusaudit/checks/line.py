"""Line and area charts: number of series, lines across categories, uneven axes, hidden
samples, stacked areas."""

from __future__ import annotations

import numpy as np

from corpusaudit.checks.registry import CheckContext, rule
from corpusaudit.measure.axes import could_end_ordered_label, is_ordered_vocabulary, ordinal_key
from corpusaudit.measure.shapes import is_vector
from corpusaudit.measure.text import parse_number
from corpusaudit.model import Draft, MeasurementUnavailable, Option, Outcome


@rule(
    id="line-series-count",
    applies_to=("line", "area"),
    severity="warning",
    requires=("line_series",),
    options=(Option("max_series", 5, "most series that passes", minimum=1),),
    rationale="""Beyond a handful of lines, colours cannot be told apart and lines tangle
        ('spaghetti chart').""",
    fix="""Highlight the series that matter and grey the rest, or use small multiples.""",
    problem="""A line chart with eleven coloured series tangled together.""",
    better="""Two or three highlighted series with the others in grey, or small multiples.""",
    limitations="""Series are separated by colour, and in vector figures also by dash style and width; in pixels
        series drawn in one colour are counted as one, and overlapping translucent areas may be undercounted.""",
)
def line_series_count(ctx: CheckContext) -> Outcome:
    count = len(ctx.measure("line_series"))
    if ctx.figure.chart_type == "area":
        try:
            count = max(count, ctx.measure("areas").count)
        except MeasurementUnavailable:
            pass
    limit = ctx.options["max_series"]
    if count <= limit:
        return Outcome()
    return Outcome(findings=(Draft(message=f"{count} series; more than {limit} cannot be told apart",
                                   value=str(count), threshold=str(limit), region=ctx.measure("plot_area")),))


@rule(
    id="line-on-categories",
    applies_to=("line",),
    severity="warning",
    requires=("x_axis",),
    options=(Option("min_labels", 3, "category labels needed before judging", minimum=2),),
    rationale="""A line implies values between its points and a sequence; joining unordered
        categories (countries, products) invents both.""",
    fix="""Use bars or dots for categories; keep lines for ordered x values such as time.""",
    problem="""Lines joining values for unordered categories such as harbour names, implying a trend between
        them.""",
    better="""Bars or dots for the categories.""",
    limitations="""Relies on the x tick labels being words rather than numbers or dates; ordinal categories (low,
        medium, high) may be legitimate. On rasters each label is read turned level; a label cut off by the image
        edge counts only when what is left of it ends no number, month or weekday name, and labels that text
        recognition returns as fragments, duplicates, or partly as numbers or months leave it unmeasured.""",
)
def line_on_categories(ctx: CheckContext) -> Outcome:
    axis = ctx.measure("x_axis")
    labels = axis.labels
    if axis.kind != "categorical" or len(labels) < ctx.options["min_labels"]:
        return Outcome()
    if is_vector(ctx.figure):
        if is_ordered_vocabulary(labels):
            return Outcome()
        words = labels
    else:
        whole = [t.text for t in axis.ticks if not t.clipped]
        if not _labels_read(whole):
            return Outcome(unmeasured=True, reason="x tick labels not read reliably")
        if whole and is_ordered_vocabulary(whole):
            return Outcome()
        if any(ordinal_key(label) is not None for label in whole):
            # Some labels are numbers or months and others not: a misread of an ordered scale.
            return Outcome(unmeasured=True, reason="x tick labels read only in part")
        # A label cut off by the image's edge has lost its start; what is left still shows it is
        # no number or month when no number or month name ends that way.
        words = whole + [t.text for t in axis.ticks if t.clipped and _no_ordered_ending(t.text)]
        if len(words) < ctx.options["min_labels"]:
            return Outcome(unmeasured=True, reason="x tick labels cut off by the image edge")
    boxes = np.array([t.bbox for t in axis.ticks])
    region = tuple(boxes.min(axis=0)[:2]) + tuple(boxes.max(axis=0)[2:])
    return Outcome(findings=(Draft(message=f"line drawn across {len(labels)} unordered categories ({', '.join(words[:4])}...)",
                                   value=str(len(labels)), threshold="ordered x values", region=region),))


def _no_ordered_ending(fragment: str) -> bool:
    """Whether the end of a cut-off label rules out a number or a month or weekday name:
    letters only (an abbreviation's full stop aside), with its first character (at the cut,
    perhaps misread) left out."""
    rest = fragment.strip().rstrip(".")[1:]
    return len(rest) >= 2 and rest.isalpha() and not could_end_ordered_label(rest)


def _labels_read(labels: list[str]) -> bool:
    """Whether recognised x labels can be trusted: each a number or a word of letters, with
    no label read twice."""
    if len(set(labels)) < len(labels):
        return False
    return all(parse_number(label) is not None or _word_like(label) for label in labels)


def _word_like(text: str) -> bool:
    letters = sum(ch.isalpha() for ch in text)
    return letters >= 2 and letters + sum(ch.isdigit() or ch in " -'." for ch in text) == len(text)


@rule(
    id="line-uneven-axis",
    applies_to=("line",),
    severity="warning",
    requires=("x_axis",),
    options=(Option("max_step_ratio", 1.25, "largest/smallest labelled step that still counts as even", minimum=1.0),),
    rationale="""When numeric x labels with uneven steps (2000, 2005, 2010, 2012) sit at equal
        distances, slopes between them are distorted.""",
    fix="""Use a numeric (or date) x axis so distances follow the values.""",
    problem="""Samples from 1990, 2000, 2015 and 2020 placed at equal spacing, so the change per year is
        distorted.""",
    better="""A numeric year axis on which 1990-2000 is twice as long as 2015-2020.""",
    limitations="""Needs numeric x tick labels; text recognition errors on rasters can hide the problem, and
        fragmentary raster labels or labels cut off by the image edge leave it unmeasured.""",
)
def line_uneven_axis(ctx: CheckContext) -> Outcome:
    axis = ctx.measure("x_axis")
    ticks = [t for t in axis.ticks if t.value is not None]
    if not is_vector(ctx.figure) and not _labels_read(axis.labels):
        return Outcome(unmeasured=True, reason="x tick labels not read reliably")
    if len(ticks) < 3 or len(ticks) < len(axis.ticks):
        return Outcome()
    if any(t.clipped for t in ticks):  # a number cut off by the image's edge has lost its first digits
        return Outcome(unmeasured=True, reason="x tick labels cut off by the image edge")
    pixels = np.diff([t.pixel for t in ticks])
    values = np.diff([t.value for t in ticks])
    if not (np.all(values > 0) or np.all(values < 0)) or np.any(pixels <= 0):
        return Outcome()
    even_spacing = pixels.max() / pixels.min() <= 1.05
    step_ratio = np.abs(values).max() / np.abs(values).min()
    limit = ctx.options["max_step_ratio"]
    if not even_spacing or step_ratio <= limit:
        return Outcome()
    steps = ", ".join(f"{abs(v):g}" for v in values)
    return Outcome(findings=(Draft(message=f"x labels step by {steps} but are drawn evenly spaced",
                                   value=f"{step_ratio:.2f}", threshold=f"{limit:g}",
                                   region=(ticks[0].bbox[0], ticks[0].bbox[1], ticks[-1].bbox[2], ticks[-1].bbox[3])),))


@rule(
    id="line-marker-gaps",
    applies_to=("line",),
    severity="info",
    requires=("line_series",),
    options=(Option("max_step_ratio", 2.0, "largest/smallest x step between samples that passes without markers", minimum=1.0),
             Option("max_samples", 100, "series with more samples are continuous curves and are not judged", minimum=4)),
    rationale="""A line without markers suggests evenly or densely sampled data; when samples are
        unevenly spaced, the reader cannot see where the data are and where the line interpolates.""",
    fix="""Draw a marker at each sample.""",
    problem="""A line through yearly samples with two years missing, drawn as one unbroken line without
        markers.""",
    better="""A marker at each sample (or a visible break in the line) so readers see where the data are.""",
    limitations="""Needs the sample positions: vector vertices, or markers visible in pixels; for a raster
        line without markers, the places where it bends. Bends where another line crosses, too shallow or too
        close together to place, leave the stretch around them unjudged; a dashed raster line, or one whose
        bends could be an even grid with some samples on straight stretches (any number on flat stretches; on
        sloping ones at most one for every two bends and two in a row), is left unmeasured; smoothed vector
        curves hide their samples.""",
)
def line_marker_gaps(ctx: CheckContext) -> Outcome:
    series = ctx.measure("line_series")
    if not series:
        return Outcome()
    limit = ctx.options["max_step_ratio"]
    unjudged = False  # a line whose samples do not all show; a finding on another line still stands
    # Where some lines show markers, a raster line without found markers most likely has them too
    # (missed where lines cross): its bends are not judged.
    marked = any(line.has_markers for line in series)
    for line in series:
        if line.has_markers:
            continue
        if not line.points or (line.bends and marked):
            unjudged = True
            continue
        xs, first = np.unique(np.round([x for x, _ in line.points], 1), return_index=True)
        if len(xs) > ctx.options["max_samples"]:
            continue
        steps = np.diff(xs)
        # steps holding a bend that could not be placed: a sample may lie inside them
        free = np.zeros(len(steps), bool)
        for k in line.unplaced:
            free[np.searchsorted(xs, (line.points[k][0] + line.points[k + 1][0]) / 2) - 1] = True
        if (~free).sum() < 3:
            unjudged = unjudged or line.bends  # bends are the samples that show: more may hide on straight stretches
            continue
        certain = steps[~free]
        ratio = certain.max() / max(certain.min(), 1e-6)
        if ratio <= limit:
            unjudged = unjudged or bool(free.any())
            continue
        if line.bends and _even_with_hidden_samples(steps, np.diff([line.points[k][1] for k in first]), free):
            unjudged = True
            continue
        return Outcome(findings=(Draft(message=f"samples {ratio:.1f}x unevenly spaced along x, drawn without markers",
                                       value=f"{ratio:.1f}", threshold=f"{limit:g}", region=line.bbox),))
    if unjudged:
        return Outcome(unmeasured=True, reason="sample positions of a line without markers are not all visible in pixels")
    return Outcome()


BEND_POSITION_ERROR = 2.0  # pixels: where a raster line's bend is found along x (about a stroke width; common practice, no source)
END_SLACK = 0.1  # share of the sample step: a line's ends are found less exactly (caps, unseen end markers; common practice, no source)
# Samples that show no bend lie exactly on the straight line through their neighbours. On a
# flat stretch (a value repeated) that is common; on a sloping one it needs exactly linear
# data, so at most one such sample for every two that show, and at most two in a row, are
# thought plausible (rules of thumb of ours, no source).
HIDDEN_PER_SHOWN = 0.5
HIDDEN_IN_A_ROW = 2


def _even_with_hidden_samples(steps: np.ndarray, rises: np.ndarray, free: np.ndarray) -> bool:
    """Whether bends with these x steps (and y rises, pixels) could be evenly spaced samples of
    which some lie on a straight stretch (and so show no bend): every step a whole multiple of
    one sample step (the least-squares step for the multiples the smallest step gives), within
    the error of two bend positions, and no more hidden samples on sloping stretches than
    HIDDEN_PER_SHOWN and HIDDEN_IN_A_ROW allow. Free steps (over a bend that could not be
    placed) may hold any number of samples."""
    multiples = np.maximum(np.round(steps / steps.min()), 1)
    unit = float(multiples @ steps / (multiples @ multiples))
    if not np.all(np.abs(steps - multiples * unit) <= 2 * BEND_POSITION_ERROR + END_SLACK * unit):
        return False
    hidden = (multiples - 1) * ((np.abs(rises) > 2 * BEND_POSITION_ERROR) & ~free)
    return bool(hidden.max() <= HIDDEN_IN_A_ROW and hidden.sum() <= HIDDEN_PER_SHOWN * (len(steps) + 1))


@rule(
    id="area-stacked",
    applies_to=("area",),
    severity="info",
    requires=("areas",),
    rationale="""In a stacked area chart only the lowest band sits on a flat baseline; the others
        ride on the bands below and their changes cannot be read.""",
    fix="""Use lines or small multiples when the series should be compared.""",
    problem="""Four stacked areas of catch by species: only the bottom layer can be read against the axis.""",
    better="""Four lines on a shared axis, or small multiples.""",
    limitations="""Detects stacking from the layered fills; a single area or a stacked area showing shares of a
        total may be a fair choice.""",
)
def area_stacked(ctx: CheckContext) -> Outcome:
    layers = ctx.measure("areas")
    if not layers.stacked:
        return Outcome()
    return Outcome(findings=(Draft(message=f"{layers.count} stacked areas: upper bands have a moving baseline",
                                   value=str(layers.count), threshold="not stacked", region=layers.region),))
