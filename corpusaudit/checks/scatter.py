"""Scatter plots: overplotting and markers on the plot frame."""

from __future__ import annotations

from corpusaudit.checks.registry import CheckContext, rule
from corpusaudit.model import Draft, Option, Outcome


@rule(
    id="scatter-overplotting",
    applies_to=("scatter",),
    severity="warning",
    requires=("markers",),
    options=(Option("max_hidden_share", 0.2, "share of marker area hidden by other markers that passes",
                    "common practice", minimum=0.0, maximum=1.0),),
    rationale="""Where markers pile up, density and outliers disappear: the plot shows less data
        than it holds.""",
    fix="""Use smaller or translucent markers, jitter, a 2D histogram or a hexbin plot.""",
    problem="""Four thousand opaque markers on top of one another: the dense region is a solid blob.""",
    better="""Smaller translucent markers, or a 2D histogram or hexbin plot.""",
    limitations="""Estimates overlap from marker area and spread; markers of very mixed sizes (bubble charts) are
        judged less reliably.""",
)
def scatter_overplotting(ctx: CheckContext) -> Outcome:
    markers = ctx.measure("markers")
    limit = ctx.options["max_hidden_share"]
    if markers.hidden_share <= limit:
        return Outcome()
    return Outcome(findings=(Draft(message=f"{markers.hidden_share:.0%} of marker area hidden by overlap "
                                           f"(about {markers.count} markers); above {limit:.0%}",
                                   value=f"{markers.hidden_share:.2f}", threshold=f"{limit:g}",
                                   region=markers.dense_region),))


@rule(
    id="scatter-edge-points",
    applies_to=("scatter",),
    severity="info",
    requires=("markers",),
    options=(Option("min_markers", 1, "markers on or cut by the frame that trigger the note", minimum=1),),
    rationale="""Markers on the axes are partly hidden by them, and clipped ones hint at data
        outside the visible range.""",
    fix="""Widen the axis limits slightly so every marker sits inside the plot.""",
    problem="""Markers clipped by the plot frame because the axis limits were set too tight.""",
    better="""Axis limits widened slightly so every marker sits inside the plot.""",
    limitations="""Needs the plot frame; charts without axes or frame are skipped.""",
)
def scatter_edge_points(ctx: CheckContext) -> Outcome:
    markers = ctx.measure("markers")
    if markers.edge_count < ctx.options["min_markers"]:
        return Outcome()
    boxes = markers.edge_boxes
    region = (min(b[0] for b in boxes), min(b[1] for b in boxes), max(b[2] for b in boxes), max(b[3] for b in boxes))
    return Outcome(findings=(Draft(message=f"{markers.edge_count} markers on or cut by the plot frame",
                                   value=str(markers.edge_count), threshold=str(ctx.options["min_markers"]), region=region),))
