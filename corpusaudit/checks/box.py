"""Box plots: group order."""

from __future__ import annotations

import re

from corpusaudit.checks._order import labels_at, monotone
from corpusaudit.checks.registry import CheckContext, rule
from corpusaudit.measure.axes import natural_order
from corpusaudit.measure.shapes import is_vector

_DIGIT_LOOKALIKES = str.maketrans({"l": "1", "I": "1", "|": "1", "O": "0", "o": "0"})


def _ocr_digits(label: str) -> str:
    """A recognised label with the glyphs text recognition confuses with digits read as
    digits in its trailing number ('Ql' -> 'Q1'), when the rest of that tail is digits."""
    match = re.fullmatch(r"(.*?[A-Za-z]\s*)([0-9lI|Oo]+)", label.strip())
    if not match or not any(ch.isdigit() for ch in match.group(2)) and match.group(2) not in ("l", "I", "|"):
        return label
    return match.group(1) + match.group(2).translate(_DIGIT_LOOKALIKES)
from corpusaudit.model import Draft, Option, Outcome


@rule(
    id="box-order",
    applies_to=("box",),
    severity="info",
    requires=("boxes", "axes"),
    options=(Option("tolerance", 1.0, "median difference (pixels) that counts as a tie", minimum=0.0),),
    rationale="""Groups of unordered categories are easiest to compare sorted by their median;
        groups with a natural order keep it.""",
    fix="""Sort the boxes by median, unless the groups have an order of their own.""",
    problem="""Box plots for nine invented monitoring stations in arbitrary order.""",
    better="""The boxes sorted by median, or kept in an order the groups have of their own.""",
    limitations="""Cannot know when groups have a natural order; the finding asks the author to consider sorting.
        Vertical and horizontal boxes (the group labels under the x axis or beside the y axis); on rasters the
        group labels come from text recognition and go unmeasured when not read.""",
)
def box_order(ctx: CheckContext) -> Outcome:
    boxes = ctx.measure("boxes")
    if len(boxes) < 3 or monotone([b.median for b in boxes], ctx.options["tolerance"]):
        return Outcome()
    axes = ctx.measure("axes")
    labels = labels_at([b.position for b in boxes], _category_ticks(ctx, boxes[0].orientation))
    if labels is None:
        return Outcome(unmeasured=True, reason="group labels not read")
    if natural_order(labels) or (not is_vector(ctx.figure) and natural_order([_ocr_digits(label) for label in labels])):
        return Outcome()
    return Outcome(findings=(Draft(message=f"{len(boxes)} boxes neither sorted by median nor in a natural order of their labels",
                                   value=", ".join(labels[:8]), threshold="sorted or natural order", region=axes.plot),))


def _category_ticks(ctx: CheckContext, orientation: str):
    """The group labels: under vertical boxes the x axis's, beside horizontal ones the y axis's. On rasters
    the y labels are read one by one from their ink, as the x labels are (a strip read at once joins
    or splits the words of multi-word labels)."""
    if orientation == "vertical":
        return ctx.measure("axes").x.ticks
    return ctx.measure("axes").y.ticks if is_vector(ctx.figure) else ctx.measure("y_label_texts")
