"""Colour: rainbow-like colour maps and palettes confusable under colour-vision deficiency."""

from __future__ import annotations

import numpy as np

from corpusaudit.checks.registry import ANY_CHART, CheckContext, rule
from corpusaudit.measure.colour import DEFICIENCIES, confusable_pairs
from corpusaudit.model import Draft, Option, Outcome

SCALE_CHARTS = ("heatmap", "map", "scatter")  # charts that usually carry a continuous scale
PROFILE_POINTS = 7  # L* samples reported along a scale
_DEFICIENCY_NAMES = {"protan": "protanopia", "deutan": "deuteranopia", "tritan": "tritanopia"}


def lightness_profile(lightness: list[float], points: int = PROFILE_POINTS) -> list[float]:
    """L* at `points` evenly spaced positions along a scale (ends included)."""
    values = np.asarray(lightness, dtype=float)
    return [float(v) for v in values[np.linspace(0, len(values) - 1, points).round().astype(int)]]


@rule(
    id="colormap-rainbow",
    applies_to=ANY_CHART,
    severity="warning",
    requires=("colour_scales",),
    options=(
        Option("min_hue_span_deg", 200.0,
               "hue sweep (degrees of CIELCh hue) from which a scale whose lightness is not a monotonic ramp "
               "counts as rainbow-like",
               "common practice: rainbow maps (jet, hsv, turbo) sweep 270-360 deg; perceptual maps either ramp "
               "lightness (viridis sweeps ~225 deg monotonically) or keep to two short hue arms (diverging)",
               minimum=0.0, maximum=360.0),
    ),
    rationale="""A rainbow colour scale (jet, hsv, 'spectral' sweeps) does not get steadily lighter or
        darker: readers see bands and boundaries that are not in the data (bright yellow and cyan
        stripes), cannot tell which end is high, and the order is lost in grey print and for
        colour-blind readers. Applies to heatmaps, maps and scatter plots, and to any figure with a
        colour bar. Measured on colour bars, or on a heatmap's or map's fill colours when no bar is
        found; the value is the lightness (CIE L*) at 7 points along the scale.""",
    fix="""Use a perceptually uniform sequential map (viridis, cividis, a single-hue ramp) for
        magnitudes, or a diverging map (two hues through a light neutral) around a meaningful
        midpoint.""",
    problem="""A heatmap of sea-surface temperature drawn with a jet-like rainbow map: yellow bands look like
        edges that are not in the data.""",
    better="""The same heatmap with viridis or a single-hue sequential ramp whose lightness rises steadily.""",
    limitations="""Needs a continuous colour scale (colour bar, heatmap or map fill); categorical palettes are
        judged by palette-cvd instead.""",
)
def colormap_rainbow(ctx: CheckContext) -> Outcome:
    scales = ctx.measure("colour_scales")
    limit = ctx.options["min_hue_span_deg"]
    findings = []
    for scale in scales:
        profile = scale.profile
        if profile.hue_span_deg < limit or profile.lightness_monotonic:
            continue
        lightness = lightness_profile(profile.lightness)
        listed = ", ".join(f"{v:.0f}" for v in lightness)
        shape = (f"lightness reverses {profile.n_lightness_reversals} time(s)" if profile.n_lightness_reversals
                 else "lightness hardly changes")
        findings.append(Draft(
            message=f"rainbow-like {scale.kind}: hue sweeps {profile.hue_span_deg:.0f} deg while {shape} "
                    f"(L* along the scale: {listed})",
            value=f"L* {listed}", threshold=f"hue sweep >= {limit:g} deg without a monotonic L* ramp",
            region=scale.bbox))
    return Outcome(findings=tuple(findings))


@rule(
    id="palette-cvd",
    applies_to=ANY_CHART,
    severity="warning",
    requires=("palette",),
    options=(
        Option("min_de00", 8.0,
               "smallest CIEDE2000 difference two categorical colours must keep under a simulated deficiency",
               "common practice: a few times the just-noticeable difference of ~1-2 dE00 for large patches "
               "side by side, since small, separated chart marks need larger differences; the "
               "colour-blind-safe Okabe-Ito palette keeps >= 10.9 under every full deficiency",
               minimum=0.0),
        Option("distinct_de00", 15.0,
               "pairs closer than this under normal vision are shades of one category (shading, a sequential "
               "set) and not judged",
               "common practice", minimum=0.0),
        Option("cvd_severity", 1.0, "simulated deficiency severity, 0..1 (1.0 = dichromacy)",
               "Machado, Oliveira & Fernandes (2009), IEEE TVCG 15(6)", minimum=0.0, maximum=1.0),
    ),
    rationale="""About 1 in 12 men and 1 in 200 women have a colour-vision deficiency. When two
        categories are told apart only by hue, those readers may see one colour where the chart
        means two. Each pair of categorical colours is simulated for protanopia, deuteranopia and
        tritanopia (Machado et al. 2009) and compared with CIEDE2000; the message names the pair and
        the deficiency.""",
    fix="""Pick a colour-blind-safe palette (Okabe-Ito, viridis samples, ColorBrewer's safe sets),
        vary lightness as well as hue, or add direct labels, markers or patterns so colour is not
        the only cue.""",
    problem="""A line chart whose two series are red and green: under deuteranopia both look olive.""",
    better="""Series in blue and orange (or distinguished by dash style and direct labels as well as colour).""",
    limitations="""Judges the chart's categorical colours; it cannot tell which colours carry meaning, so a
        decorative pair may be flagged.""",
)
def palette_cvd(ctx: CheckContext) -> Outcome:
    palette = ctx.measure("palette")
    colours = palette.colours
    if len(colours) < 2:
        return Outcome()
    limit = ctx.options["min_de00"]
    pairs = [pair for pair in confusable_pairs([c.rgb for c in colours], limit, severity=ctx.options["cvd_severity"],
                                               deficiencies=DEFICIENCIES)
             if pair.de_normal >= ctx.options["distinct_de00"]]
    if not pairs:
        return Outcome()
    worst = min(pairs, key=lambda p: p.de_simulated)
    first, second = colours[worst.i], colours[worst.j]
    also = sorted({_DEFICIENCY_NAMES[p.deficiency] for p in pairs} - {_DEFICIENCY_NAMES[worst.deficiency]})
    more = f"; {len(pairs)} confusable pair(s) in all" + (f", also under {', '.join(also)}" if also else "") \
        if len(pairs) > 1 else ""
    regions = [r for r in (first.region, second.region) if r is not None]
    region = None
    if regions:
        region = (min(r[0] for r in regions), min(r[1] for r in regions),
                  max(r[2] for r in regions), max(r[3] for r in regions))
    return Outcome(findings=(Draft(
        message=f"{first.hex} and {second.hex} differ by {worst.de_normal:.1f} dE00 but only "
                f"{worst.de_simulated:.1f} under simulated {_DEFICIENCY_NAMES[worst.deficiency]}{more}",
        value=f"{worst.de_simulated:.1f}", threshold=f"{limit:g}", region=region),))
