"""Bar charts (and histograms): zero baseline, rotated labels, order, stack depth, 3D effects."""

from __future__ import annotations

from corpusaudit.checks._order import clean_label, labels_at, labels_read_at, monotone
from corpusaudit.checks.registry import CheckContext, rule
from corpusaudit.measure.axes import natural_order, ordinal_key
from corpusaudit.measure.shapes import is_vector
from corpusaudit.model import Draft, MeasurementUnavailable, Option, Outcome


def _value_axis(ctx: CheckContext):
    """The value axis of a bar chart: across the bars' lengths; from the axes' kinds if no bars."""
    axes = ctx.measure("axes")
    try:
        orientation = ctx.measure("bars").orientation
    except MeasurementUnavailable:
        kinds = (axes.x.kind, axes.y.kind)
        if kinds.count("numeric") != 1:
            raise
        orientation = "vertical" if axes.y.kind == "numeric" else "horizontal"
    return (axes.y if orientation == "vertical" else axes.x), axes


@rule(
    id="bar-baseline",
    applies_to=("bar", "histogram"),
    severity="warning",
    requires=("axes", "bars"),
    options=(Option("tolerance", 0.02, "share of the axis range by which the axis may miss zero", minimum=0.0),),
    rationale="""A bar encodes its value by its length from zero; when the value axis starts
        elsewhere, bar lengths exaggerate differences.""",
    fix="""Start the value axis at zero, or show the values as points or a line if only the
        differences matter.""",
    problem="""A bar chart of annual landings whose value axis runs from 40 to 100: a bar of 60 looks a third
        the height of a bar of 100.""",
    better="""The same bars on an axis from 0 to 100, so bar lengths are proportional to the values.""",
    limitations="""Needs the value axis's tick labels (text recognition on rasters); log axes and charts of
        differences around a reference value are legitimate exceptions a reviewer must judge.""",
)
def bar_baseline(ctx: CheckContext) -> Outcome:
    axis, axes = _value_axis(ctx)
    if axis.kind != "numeric" or axis.fit is None:
        return Outcome(unmeasured=True, reason="value axis has no linear numeric labels")
    low, high = axis.value_range
    slack = ctx.options["tolerance"] * (high - low)
    plot = axes.plot
    if low > slack:
        region = (plot[0], plot[3] - 0.1 * (plot[3] - plot[1]), plot[2], plot[3]) if axis.side == "y" else \
            (plot[0], plot[1], plot[0] + 0.1 * (plot[2] - plot[0]), plot[3])
        return Outcome(findings=(Draft(message=f"value axis starts at {low:.3g}, not at 0: bar lengths exaggerate differences",
                                       value=f"{low:.3g}", threshold="0", region=region),))
    if high < -slack:
        return Outcome(findings=(Draft(message=f"value axis ends at {high:.3g}, not at 0: bar lengths exaggerate differences",
                                       value=f"{high:.3g}", threshold="0", region=plot),))
    return Outcome()


@rule(
    id="tick-label-rotation",
    applies_to=("bar", "line", "box", "histogram"),
    severity="warning",
    requires=("tick_label_angle", "y_tick_label_angle", "bars"),
    options=(Option("min_angle", 30.0, "rotation (degrees) from which labels count as rotated", minimum=0.0, maximum=90.0),),
    rationale="""Rotated labels are read slowly and with head tilted; they usually mean the
        categories do not fit along the axis.""",
    fix="""Swap to horizontal bars so labels run horizontally, shorten or wrap the labels.""",
    problem="""Twelve survey-site names under a bar chart, set at 45 degrees so that readers tilt their heads.""",
    better="""Horizontal bars with the site names written horizontally beside them.""",
    limitations="""Reads label angles from vector text exactly. On rasters the angle is measured from the labels'
        glyphs (the baseline they stand on, searched jointly for the row), to about a degree, and compared after
        rounding to whole degrees; single-glyph labels show no direction and leave the rule unmeasured unless they
        stand upright. On horizontal bar charts the category labels beside the y axis are judged.""",
)
def tick_label_rotation(ctx: CheckContext) -> Outcome:
    measured = ctx.measure(_category_label_angle(ctx))
    limit = ctx.options["min_angle"]
    if round(measured.angle) < limit:  # measured to the degree
        return Outcome()
    return Outcome(findings=(Draft(message=f"tick labels rotated {measured.angle:.0f}°; at {limit:g}° or more they are hard to read",
                                   value=f"{measured.angle:.0f}", threshold=f"{limit:g}", region=measured.region),))


def _category_label_angle(ctx: CheckContext) -> str:
    """The angle measurement of the category labels: beside the y axis for horizontal bars."""
    if ctx.figure.chart_type == "bar":
        try:
            if ctx.measure("bars").orientation == "horizontal":
                return "y_tick_label_angle"
        except MeasurementUnavailable:
            pass
    return "tick_label_angle"


@rule(
    id="bar-order",
    applies_to=("bar",),
    severity="info",
    requires=("bars", "axes"),
    options=(Option("tolerance", 0.01, "length difference (share of the longest bar) that counts as a tie", minimum=0.0),),
    rationale="""Bars of unordered categories are easiest to compare sorted by value; categories
        with a natural order (time, ranks, alphabetical lists) keep that order.""",
    fix="""Sort the bars by value, unless the categories have an order of their own.""",
    problem="""Eight harbours' bars in arbitrary order, so the largest and smallest must be hunted for.""",
    better="""The same bars sorted from largest to smallest.""",
    limitations="""Cannot know when categories have a natural order (months, age bands, ranked scales); treat the
        finding as a question to the author. When a vector chart's labels are found for only some bars, the
        finding rests on at least three of them, none reaching the figure's edge. On rasters each label is
        read by text recognition turned to its measured angle and paired with its bar in order; labels cut off
        by the image edge are left out the same way, and labels partly read as numbers or months leave the
        rule unmeasured.""",
)
def bar_order(ctx: CheckContext) -> Outcome:
    chart = ctx.measure("bars")
    if chart.grouped or len(chart.stacks) < 3:
        return Outcome()
    lengths = [stack.length for stack in chart.stacks]
    if monotone(lengths, ctx.options["tolerance"] * max(lengths)):
        return Outcome()
    axes = ctx.measure("axes")
    axis = axes.x if chart.orientation == "vertical" else axes.y
    positions = [stack.position for stack in chart.stacks]
    if is_vector(ctx.figure):
        labels = labels_at(positions, axis.ticks)
        if labels is None:
            # Some labels not found or cut off by the figure's edge (their text may be incomplete):
            # those found whole, if in no natural order, show the whole set is in none.
            whole = [tick for tick in axis.ticks if not _cut_off(tick.bbox, ctx.figure)]
            labels = labels_read_at(positions, whole)
            if len(labels) < 3 or natural_order(labels):
                return Outcome(unmeasured=True, reason="category labels not read")
    else:
        labels, complete = _raster_category_labels(ctx, chart, positions)
        if labels is None:
            labels, complete = labels_at(positions, axis.ticks), True
        if labels is None or not all(clean_label(label) for label in labels) or len(labels) < 3:
            return Outcome(unmeasured=True, reason="category labels not read")
        if not natural_order(labels) and any(ordinal_key(label) is not None for label in labels):
            # Some labels are numbers or months and others not: a misread of an ordered scale.
            return Outcome(unmeasured=True, reason="category labels read only in part")
        if not complete and natural_order(labels):
            return Outcome(unmeasured=True, reason="category labels cut off by the image edge")
    if natural_order(labels):
        return Outcome()
    return Outcome(findings=(Draft(message=f"{len(chart.stacks)} bars neither sorted by value nor in a natural order of their labels",
                                   value=", ".join(labels[:8]), threshold="sorted or natural order", region=axes.plot),))


def _cut_off(box, figure) -> bool:
    """A label reaching the figure's edge: its text may be clipped there."""
    width, height = (figure.pixels.shape[1], figure.pixels.shape[0]) if figure.pixels is not None else \
        (figure.width_px, figure.height_px)
    return box[0] <= 0.5 or box[1] <= 0.5 or box[2] >= width - 0.5 or box[3] >= height - 0.5


def _raster_category_labels(ctx: CheckContext, chart, positions: list[float]) -> tuple[list[str] | None, bool]:
    """The category labels of a raster bar chart, each read turned to its angle, paired with the bars.

    Pairs in order when there is one label per bar and each bar lies within its label's reach
    along the axis (a rotated label ends at its tick, an upright one is centred on it).
    Labels cut off by the image edge are left out (their text is incomplete): the labels
    returned are then a subsequence, flagged by complete=False, which proves no natural order
    of the whole set when it has none itself. (None, False) when labels are merged or missing.
    """
    side = "x" if chart.orientation == "vertical" else "y"
    ticks = ctx.measure(f"{side}_label_texts")
    if len(ticks) != len(positions):
        return None, False
    spacing = min(b - a for a, b in zip(positions, positions[1:]))
    along = 0 if side == "x" else 1
    for tick, position in zip(ticks, positions):
        if not tick.bbox[along] - 0.5 * spacing <= position <= tick.bbox[along + 2] + 0.5 * spacing:
            return None, False
    labels = [tick.text.strip() for tick in ticks if not tick.clipped]
    if len(set(labels)) != len(labels):
        return None, False
    return labels, len(labels) == len(ticks)


@rule(
    id="bar-stack-depth",
    applies_to=("bar",),
    severity="warning",
    requires=("bars",),
    options=(Option("max_segments", 4, "most segments per stacked bar that passes", minimum=1),),
    rationale="""Only the bottom segment of a stack sits on a common baseline; the others float
        and cannot be compared across bars. The more segments, the less can be read.""",
    fix="""Use grouped bars, small multiples, or fewer categories per stack.""",
    problem="""Stacked bars with six segments each: only the bottom segment shares a baseline and the others
        cannot be compared.""",
    better="""Grouped bars, or small multiples with one panel per segment.""",
    limitations="""Counts distinct segment colours within a stack; a gradient fill or hatched segments may be
        miscounted.""",
)
def bar_stack_depth(ctx: CheckContext) -> Outcome:
    chart = ctx.measure("bars")
    limit = ctx.options["max_segments"]
    deepest = max(chart.stacks, key=lambda s: len(s.segments))
    if len(deepest.segments) <= limit:
        return Outcome()
    return Outcome(findings=(Draft(message=f"stacked bars of {len(deepest.segments)} segments; more than {limit} cannot be compared",
                                   value=str(len(deepest.segments)), threshold=str(limit), region=deepest.bbox),))


@rule(
    id="chart-3d",
    applies_to=("bar", "pie"),
    severity="warning",
    requires=("perspective",),
    options=(Option("min_slanted_faces", 3, "slanted filled faces (3D box sides) that mark a 3D bar chart", minimum=1),
             Option("min_pie_aspect", 0.85, "minor/major axis ratio of a pie below which it is tilted", minimum=0.1, maximum=1.0)),
    rationale="""Perspective distorts lengths and angles: nearer bars and slices look larger than
        their values, and bar tops cannot be read against the axis.""",
    fix="""Draw the chart flat (2D).""",
    problem="""A pie tilted into perspective with a visible side wall, so the near slices look larger than
        their share.""",
    better="""The same chart drawn flat, without depth or shading.""",
    limitations="""Recognises side walls and extrusion faces; a chart with genuine 3D data (a surface plot) is
        outside its scope.""",
)
def chart_3d(ctx: CheckContext) -> Outcome:
    seen = ctx.measure("perspective")
    if ctx.figure.chart_type == "pie":
        if seen.pie_aspect is None:
            return Outcome(unmeasured=True, reason="no pie outline found")
        limit = ctx.options["min_pie_aspect"]
        if seen.pie_aspect < limit:
            return Outcome(findings=(Draft(message=f"pie drawn tilted (axis ratio {seen.pie_aspect:.2f}, below {limit:g}): "
                                                   "perspective distorts slice sizes",
                                           value=f"{seen.pie_aspect:.2f}", threshold=f"{limit:g}", region=seen.region),))
        return Outcome()
    limit = ctx.options["min_slanted_faces"]
    if seen.slanted_faces >= limit:
        return Outcome(findings=(Draft(message=f"{seen.slanted_faces} slanted faces: bars drawn in 3D perspective",
                                       value=str(seen.slanted_faces), threshold=str(limit), region=seen.region),))
    return Outcome()
