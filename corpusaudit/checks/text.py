"""Text: contrast against its background (WCAG 2.x) and size at print size."""

from __future__ import annotations

from collections import Counter

from corpusaudit.checks.registry import ANY_CHART, CheckContext, rule
from corpusaudit.model import Draft, MeasurementUnavailable, Option, Outcome

WCAG = "WCAG 2.1 success criterion 1.4.3 (Contrast, Minimum), level AA"


def is_large_text(size_pt: float | None, bold: bool, large_pt: float, large_bold_pt: float) -> bool:
    """WCAG's 'large scale' text: at least 18 pt, or 14 pt bold. Unknown size counts as large
    (the lenient limit), so text without a print size is never flagged on a guess."""
    if size_pt is None:
        return True
    return size_pt >= large_pt or (bold and size_pt >= large_bold_pt)


@rule(
    id="text-contrast",
    applies_to=ANY_CHART,
    severity="warning",
    requires=("text_contrast",),
    options=(
        Option("min_ratio", 4.5, "smallest contrast ratio for normal text", WCAG, minimum=1.0, maximum=21.0),
        Option("min_ratio_large", 3.0, "smallest contrast ratio for large text", WCAG, minimum=1.0, maximum=21.0),
        Option("large_pt", 18.0, "size from which text is large", WCAG + " ('large scale': 18 pt)", minimum=0.0),
        Option("large_bold_pt", 14.0, "size from which bold text is large", WCAG + " ('large scale': 14 pt bold)",
               minimum=0.0),
    ),
    rationale="""Text that is too close in luminance to what lies behind it (light grey labels,
        dark text on a saturated bar) is hard to read, in print, on projectors and for readers with
        low vision. The WCAG 2.x contrast ratio of each piece of text against its local background
        is compared with 4.5:1 (normal text) or 3:1 (large text: 18 pt, or 14 pt bold); the lowest
        failing ratio is reported with the text's region. Vector text uses its stated colour;
        raster text is found from the shapes of its glyphs and its ink estimated from the cores of
        its strokes.""",
    fix="""Darken the text (or lighten its background) until the ratio is at least 4.5:1; inside
        dark or saturated marks use white text; avoid grey-on-grey tick labels.""",
    problem="""Light grey tick labels (#BBBBBB) on white: contrast ratio 1.9:1.""",
    better="""Dark grey labels (#555555 or darker) on white: contrast ratio 7.5:1.""",
    limitations="""Raster text is found by its strokes; text over photographs or gradients has no single
        background, so the estimate is rough.""",
)
def text_contrast(ctx: CheckContext) -> Outcome:
    measured = ctx.measure("text_contrast")
    options = ctx.options
    failing = []
    for item in measured:
        large = is_large_text(item.size_pt, item.bold, options["large_pt"], options["large_bold_pt"])
        limit = options["min_ratio_large"] if large else options["min_ratio"]
        if item.ratio < limit:
            failing.append((item.ratio, limit, large, item))
    if not failing:
        return Outcome()
    ratio, limit, large, worst = min(failing, key=lambda f: f[0])
    kind = "large" if large else "normal"
    size = f"{worst.size_pt:g} pt " if worst.size_pt is not None else ""
    more = f"; {len(failing)} text item(s) below their limit" if len(failing) > 1 else ""
    name = f"'{worst.text}'" if worst.source == "vector" else worst.text
    return Outcome(findings=(Draft(
        message=f"{name} ({size}{kind} text) has contrast {ratio:.2f}:1 against its background, "
                f"below {limit:g}:1{more}",
        value=f"{ratio:.2f}", threshold=f"{limit:g}", region=worst.bbox),))


def _characters(line) -> int:
    """Letters or digits of a vector span; glyphs of a raster line (its text is not read)."""
    return line.glyphs if line.source == "glyphs" else sum(ch.isalnum() for ch in line.text)


def smallest_text(lines, per_size_minimum: int):
    """The smallest text that is not a single stray glyph: spans of at least 2 letters or
    digits, or single characters whose size is shared by `per_size_minimum` spans (tick labels)."""
    sized = [line for line in lines if line.size_pt is not None]
    singles = Counter(round(line.size_pt, 1) for line in sized if _characters(line) == 1)
    kept = [line for line in sized if _characters(line) >= 2 or singles[round(line.size_pt, 1)] >= per_size_minimum]
    return sorted(kept, key=lambda line: line.size_pt)


@rule(
    id="text-size",
    applies_to=ANY_CHART,
    severity="warning",
    requires=("text_lines",),
    options=(
        Option("min_pt", 6.0, "smallest text size (points at print size) that passes",
               "common practice for print: journals ask for 6-8 pt as the smallest lettering", minimum=0.0),
        Option("raster_agreeing_words", 2,
               "raster text: this many short lines (under raster_word_glyphs glyphs) must be below the limit "
               "before it warns", minimum=1),
        Option("raster_word_glyphs", 3,
               "raster text: a line of this many glyphs is below the limit on its own", minimum=2),
    ),
    rationale="""Text below about 6 pt at the size the figure is printed cannot be read comfortably,
        and thin strokes may vanish in print. Vector text states its size; raster text size is
        estimated from the height of its capitals, digits or short letters (found from the glyph
        shapes, not read) and the figure's print size, so single
        stray glyphs are ignored, and a raster warns on a line of several glyphs or on several
        short lines that agree (two marks side by side can pass for a short word). Image files
        have no print size and are not judged.""",
    fix="""Enlarge the labels (or draw the chart at its final size so the fonts are not scaled
        down), aiming at 7-9 pt for tick labels and more for titles.""",
    problem="""Axis labels set at 4 pt at the printed size of the figure.""",
    better="""Labels of at least 6 pt (8 pt or more is easier) at printed size.""",
    limitations="""Raster text height is measured in pixels and converted with the placed size, assuming
        DejaVu-like proportions (cap height 0.74 em; fonts with smaller capitals read a little small);
        single-glyph labels and text touching other marks are not found.""",
)
def text_size(ctx: CheckContext) -> Outcome:
    if ctx.figure.source == "image":
        raise MeasurementUnavailable("an image file has no print size")
    lines = ctx.measure("text_lines")
    ordered = smallest_text(lines, per_size_minimum=3)
    if not ordered:
        return Outcome()
    limit = ctx.options["min_pt"]
    below = [line for line in ordered if line.size_pt < limit]
    raster = ordered[0].source == "glyphs"
    if not below:
        return Outcome()
    if raster and len(below) < ctx.options["raster_agreeing_words"] \
            and max(line.glyphs for line in below) < ctx.options["raster_word_glyphs"]:
        return Outcome()
    smallest = below[0]
    name, estimated = (smallest.text, "about ") if raster else (f"'{smallest.text}'", "")
    return Outcome(findings=(Draft(
        message=f"{name} is {estimated}{smallest.size_pt:.1f} pt at print size, below {limit:g} pt; "
                f"{len(below)} text item(s) below the limit",
        value=f"{smallest.size_pt:.1f}", threshold=f"{limit:g}", region=smallest.bbox),))
