"""Legends: series named in a separate key where the lines or bands could carry their names."""

from __future__ import annotations

from corpusaudit.checks.registry import CheckContext, rule
from corpusaudit.model import Draft, Option, Outcome


@rule(
    id="line-direct-labels",
    applies_to=("line", "area"),
    severity="info",
    requires=("legend_keys",),
    options=(Option("min_keys", 2, "legend keys (series) from which direct labels are suggested", minimum=2),
             Option("max_keys", 8, "more keys than this would crowd the line ends; no suggestion",
                    minimum=2)),
    rationale="""A legend makes the reader match colours back and forth between the key and the
        lines; names written at the ends of the lines (or inside the bands) are read at once and
        do not depend on telling colours apart.""",
    fix="""Write each series' name beside its last point (or inside its band) in the series colour
        and drop the legend.""",
    problem="""A line chart of rainfall at three gauges with a legend box in the corner: readers look
        from each line to the key and back.""",
    better="""The gauge names written at the right-hand end of each line, in the line's colour.""",
    limitations="""Reads legend keys (a coloured swatch left of a label): exactly from vector
        drawings, from isolated colour marks beside text lines on rasters; grey series and keys
        drawn as text colour alone are not seen. Lines that cross near their ends may be easier to
        tell apart with a legend; the finding is a suggestion.""",
)
def line_direct_labels(ctx: CheckContext) -> Outcome:
    keys = ctx.measure("legend_keys").keys
    if not ctx.options["min_keys"] <= len(keys) <= ctx.options["max_keys"]:
        return Outcome()
    named = [key.label for key in keys if key.label]
    names = f" ({', '.join(named[:4])}{', ...' if len(named) > 4 else ''})" if named else ""
    return Outcome(findings=(Draft(
        message=f"a legend of {len(keys)} keys{names}; the series could be labelled directly",
        value=str(len(keys)), threshold=str(ctx.options["min_keys"]),
        region=ctx.measure("legend_keys").region),))
