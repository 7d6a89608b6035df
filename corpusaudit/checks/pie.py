"""Pie charts: number of slices, slices too alike to compare, size order, labelled total."""

from __future__ import annotations

from corpusaudit.checks._order import cyclic_monotone
from corpusaudit.checks.registry import CheckContext, rule
from corpusaudit.model import Draft, Option, Outcome


@rule(
    id="pie-slice-count",
    applies_to=("pie",),
    severity="warning",
    requires=("pie",),
    options=(Option("max_slices", 5, "largest number of slices that passes", minimum=2),),
    rationale="""Angles and areas are judged far less accurately than lengths; with many slices the
        small ones cannot be compared or even labelled.""",
    fix="""Keep the largest few slices and group the rest as 'other', or draw a sorted bar chart.""",
    problem="""A pie with nine slices, several too thin to label.""",
    better="""The four largest slices plus 'other', or a sorted bar chart of all nine values.""",
    limitations="""Counts wedges from the vector geometry or, on rasters, from colour runs going round the pie;
        neighbouring slices of one colour count as one unless a separator line divides them, and raster
        slices narrower than about 2 pixels at the rim are not counted. An exploded raster pie is
        measured with its pieces pushed back together; where a piece is not recognised as a wedge
        (thin wedges touching one another) it is left unmeasured.""",
)
def pie_slice_count(ctx: CheckContext) -> Outcome:
    pie = ctx.measure("pie")
    limit = ctx.options["max_slices"]
    count = len(pie.slices)
    if count <= limit:
        return Outcome()
    return Outcome(findings=(Draft(message=f"{count} slices; more than {limit} are hard to compare",
                                   value=str(count), threshold=str(limit), region=pie.bbox),))


@rule(
    id="pie-similar-slices",
    applies_to=("pie",),
    severity="warning",
    requires=("pie",),
    options=(Option("min_relative_difference", 0.1,
                    "smallest difference between two slices, as a share of the larger one, that readers can rank",
                    "common practice (angle judgements are coarse: Cleveland & McGill 1984 rank angle below length)",
                    minimum=0.0, maximum=1.0),),
    rationale="""Readers cannot tell which of two nearly equal slices is larger: the comparison the
        chart invites cannot be made.""",
    fix="""Show the values as a sorted bar chart, or print the values on the slices.""",
    problem="""A pie with slices of 24% and 23%: readers cannot tell which is larger.""",
    better="""A sorted bar chart, or the values printed on the slices.""",
    limitations="""Shares come from the wedge angles; 3D pies distort them and are flagged by chart-3d.""",
)
def pie_similar_slices(ctx: CheckContext) -> Outcome:
    pie = ctx.measure("pie")
    shares = sorted(pie.shares, reverse=True)
    if len(shares) < 2:
        return Outcome()
    gaps = [((a - b) / a, a, b) for a, b in zip(shares, shares[1:]) if a > 0]
    relative, larger, smaller = min(gaps)
    limit = ctx.options["min_relative_difference"]
    if relative >= limit:
        return Outcome()
    return Outcome(findings=(Draft(
        message=f"slices of {larger:.1%} and {smaller:.1%} differ by {relative:.0%} of the larger; "
                f"below {limit:.0%} readers cannot rank them",
        value=f"{relative:.3f}", threshold=f"{limit}", region=pie.bbox),))


@rule(
    id="pie-order",
    applies_to=("pie",),
    severity="info",
    requires=("pie",),
    options=(Option("tolerance", 0.005, "share difference (0..1) that counts as a tie", minimum=0.0),),
    rationale="""Slices placed in size order (largest first, going round) let readers rank them
        without comparing angles across the circle.""",
    fix="""Sort the slices by size, starting at 12 o'clock.""",
    problem="""Slices of 10%, 40%, 15% and 35% in that order around the circle.""",
    better="""The slices sorted by size, largest first, starting at 12 o'clock.""",
    limitations="""An order the categories have of their own (age bands, a Likert scale) is legitimate.""",
)
def pie_order(ctx: CheckContext) -> Outcome:
    pie = ctx.measure("pie")
    shares = pie.shares
    if len(shares) < 3 or cyclic_monotone(shares, ctx.options["tolerance"]):
        return Outcome()
    listed = ", ".join(f"{s:.0%}" for s in shares)
    return Outcome(findings=(Draft(message=f"slices are not in size order going round ({listed})",
                                   value=listed, threshold="sorted", region=pie.bbox),))


@rule(
    id="pie-total",
    applies_to=("pie",),
    severity="warning",
    requires=("pie", "pie_label_total"),
    options=(Option("tolerance_points", 1.5, "allowed distance of the sum from 100, in percentage points",
                    "common practice: rounding each of up to ~10 labels to 0.5 point", minimum=0.0),),
    rationale="""Percentages printed on a pie are parts of one whole: if they do not add up to 100
        the data, the rounding or the chart type is wrong.""",
    fix="""Check the figures; if categories overlap (several answers allowed) use a bar chart.""",
    problem="""Slice labels of 45%, 30% and 35%, which add up to 110%.""",
    better="""Labels that total 100% (or a bar chart when several answers were allowed).""",
    limitations="""Needs percentage labels on or beside the slices; labels that state counts are not summed.
        A slice whose label cannot be read or placed (text recognition misses, a label on the boundary
        between two slices, labels printed over one another that cannot be read apart) counts with its
        drawn share, which widens the tolerance by half a point per such slice. Two labels on one
        measured slice count for neighbouring slices drawn in one colour only where each sits at the
        chart's label distance on the middle of its own part. On rasters, labels printed over one
        another are read apart only where the chart puts its labels at one distance along the slices'
        middles, and a label whose glyphs lie under a neighbour's stays unread; light text on dark
        slices is not read; a pie with a surface in no measured slice's colour (a slice the
        measurement missed, shading) is left unmeasured.""",
)
def pie_total(ctx: CheckContext) -> Outcome:
    pie = ctx.measure("pie")
    summed = ctx.measure("pie_label_total")
    limit = ctx.options["tolerance_points"] + summed.uncertainty
    if abs(summed.total - 100.0) <= limit:
        return Outcome()
    estimated = f" ({summed.estimated} unread slices counted by their drawn share)" if summed.estimated else ""
    return Outcome(findings=(Draft(message=f"labelled percentages add up to {summed.total:.3g}%, not 100% "
                                           f"(tolerance {limit:g} points){estimated}",
                                   value=f"{summed.total:.3g}", threshold=f"100 ± {limit:g}", region=pie.bbox),))
