"""Reproduction quality: resolution of embedded rasters."""

from __future__ import annotations

from corpusaudit.checks.registry import ANY_CHART, CheckContext, rule
from corpusaudit.model import Draft, Option, Outcome


@rule(
    id="raster-resolution",
    applies_to=ANY_CHART,
    sources=("raster", "scan"),
    severity="warning",
    options=(
        Option("warn_below_ppi", 150, "effective ppi below which the figure warns",
               "common practice for print (no single source)", minimum=1),
        Option("info_below_ppi", 300, "effective ppi below which the figure gets a note",
               "common practice for print: 300 ppi is the usual request of printers and publishers", minimum=1),
    ),
    rationale="""A raster placed at a low resolution prints blurry or pixelated: text and thin
        lines in a chart become hard to read. Resolution is measured as image pixels per inch
        at the size the image is placed on the page (effective ppi).""",
    fix="""Export the chart as vector graphics (PDF, SVG, EPS) or as a raster of at least
        300 ppi at its printed size.""",
)
def raster_resolution(ctx: CheckContext) -> Outcome:
    ppi = ctx.figure.effective_ppi
    if not ppi:
        return Outcome(unmeasured=True, reason="no effective ppi for this figure")
    warn_below, info_below = ctx.options["warn_below_ppi"], ctx.options["info_below_ppi"]
    if ppi < warn_below:
        return Outcome(findings=(Draft(
            message=f"{ppi:.0f} ppi at print size; below {warn_below} ppi a raster prints visibly blurred",
            value=f"{ppi:.0f}", threshold=str(warn_below)),))
    if ppi < info_below:
        return Outcome(findings=(Draft(
            message=f"{ppi:.0f} ppi at print size; {info_below} ppi is the usual print standard",
            value=f"{ppi:.0f}", threshold=str(info_below), severity="info"),))
    return Outcome()
