"""Reproduction quality: resolution and lossy compression of rasters, and figure captions."""

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
        at the size the image is placed on the page (effective ppi; the lower of the two axes
        when the image is stretched). Below 150 ppi it warns, below 300 ppi it notes. Vector
        figures and image files (no print size) are not judged.""",
    fix="""Export the chart as vector graphics (PDF, SVG, EPS) or as a raster of at least
        300 ppi at its printed size.""",
    problem="""A chart pasted as a 300-pixel-wide screenshot and printed 15 cm wide (about 50 ppi): text and
        lines are blurred.""",
    better="""The chart exported as vector graphics, or as a raster of at least 300 ppi at its printed size.""",
    limitations="""Uses the image's pixels and its placed size on the page; a vector chart has no resolution limit
        and is not judged.""",
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


@rule(
    id="raster-compression",
    applies_to=ANY_CHART,
    sources=("raster", "image"),
    severity="info",
    requires=("compression",),
    options=(
        Option("ringing_limit", 1.0, "ripple beside edges (grey levels) from which ringing counts as visible",
               "common practice, set on generated charts: PNG stays below ~1 grey level, JPEG at quality 85 or less above 1.3",
               minimum=0.0),
        Option("line_art_threshold", 0.6, "line-art score (0..1) from which the image is a chart or diagram "
               "rather than a photograph", "common practice, tuned on charts versus photographs",
               minimum=0.0, maximum=1.0),
    ),
    rationale="""JPEG and other lossy codings are made for photographs. On line art (charts,
        diagrams, text) they leave ripples ('mosquito noise') beside every edge and 8x8 block
        seams in flat areas, which blur thin lines and small text, while a lossless coding (PNG,
        Flate) would be both sharper and often smaller. Photographs (continuous tone) are never
        flagged. Decided on ringing beside edges, measured on the raster's own pixels where
        available (else on the rendered pixels of a raster stored as JPEG).""",
    fix="""Export the chart as vector graphics, or as PNG (lossless) rather than JPEG; do not
        re-save a chart that has been through JPEG.""",
    problem="""A bar chart saved as a JPEG: halos ring every label and edge.""",
    better="""The same chart saved as PNG or drawn as vector graphics.""",
    limitations="""Photographs and microscopy are not flagged; JPEG is right for them.""",
)
def raster_compression(ctx: CheckContext) -> Outcome:
    evidence = ctx.measure("compression")
    report = evidence.report
    if report is None:  # a lossless coding is declared and no pixels of its own were read
        return Outcome()
    options = ctx.options
    # Ringing decides: block-edge scores also rise on clean line art whose edges fall on the
    # 8-pixel grid, so they only add to the message.
    if report.line_art_score < options["line_art_threshold"] or report.ringing < options["ringing_limit"]:
        return Outcome()
    declared = f", stored as {evidence.declared}" if evidence.declared else ""
    return Outcome(findings=(Draft(
        message=f"lossy compression artefacts on line art (line-art score {report.line_art_score:.2f}{declared}): "
                f"ringing of {report.ringing:.2f} grey levels beside edges, block-edge score {report.blockiness:.2f}",
        value=f"{report.ringing:.2f}", threshold=f"{options['ringing_limit']:g}"),))


@rule(
    id="caption-missing",
    applies_to=ANY_CHART,
    sources=("raster", "vector", "scan"),
    severity="info",
    rationale="""A figure in a document should carry a caption ('Figure 3. ...') that says what it
        shows and lets the text refer to it; without one, readers and screen-reader users lose its
        context and it cannot be cited. A caption is looked for beside the figure on its page at
        extraction; image files are not judged.""",
    fix="""Add a numbered caption below (or above) the figure that states what is shown, the
        units and the data source.""",
    problem="""A chart placed between paragraphs with no 'Figure N.' text near it.""",
    better="""A numbered caption that says what is shown, the source of the data and the units.""",
    limitations="""Finds captions by a configurable pattern near the figure; captions set far away (a list of
        figures at the end) are missed.""",
)
def caption_missing(ctx: CheckContext) -> Outcome:
    if ctx.figure.caption.strip():
        return Outcome()
    return Outcome(findings=(Draft(message="no caption found beside the figure", value="", threshold="a caption"),))
