"""Summary charts of the dashboard as inline SVG, drawn the way corpusaudit asks charts to be drawn.

Horizontal bars sorted by value, a value axis that starts at zero, each bar labelled
directly with its value (no legend), one colour from the Okabe-Ito palette (designed to
stay distinct under colour-vision deficiency), dark text on white, nothing rotated, no pies.

Links are transparent hit areas drawn over each row rather than wrappers around the
bars, so the picture is the same for renderers that ignore SVG links.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from html import escape
from typing import Callable, Sequence

# Okabe & Ito (2008), "Color Universal Design": blue, used for every bar of a single series.
BAR_COLOUR = "#0072B2"
TEXT_COLOUR = "#1b1f24"  # 16.0:1 on white
AXIS_COLOUR = "#4a5159"  # 8.1:1 on white: tick labels use it too
GRID_COLOUR = "#d8dde3"
FONT = "system-ui, -apple-system, 'Segoe UI', Roboto, 'DejaVu Sans', sans-serif"
FONT_PX = 12
ROW_PX = 24
BAR_PX = 15
CHAR_PX = 7.2  # generous average advance of the font at 12 px, for laying out labels
MAX_LABEL_CHARS = 34


@dataclass(frozen=True)
class Bar:
    label: str
    value: float
    href: str = ""  # where a click on the row leads (a fragment of the dashboard)
    value_text: str = ""  # the direct label; defaults to the formatted value


def nice_ticks(maximum: float, target: int = 5, integer: bool = True) -> list[float]:
    """Ticks 0, s, 2s... covering maximum, with s one of 1, 2, 5 times a power of ten."""
    if maximum <= 0:
        return [0.0, 1.0]
    raw = maximum / target
    power = 10 ** math.floor(math.log10(raw))
    step = next(m * power for m in (1, 2, 5, 10) if m * power >= raw)
    if integer:
        step = max(1.0, math.ceil(step))
    count = math.ceil(maximum / step - 1e-9)
    return [round(i * step, 10) for i in range(count + 1)]


def _number(value: float) -> str:
    if float(value).is_integer():
        return f"{int(value):,}"
    return f"{value:.2f}".rstrip("0").rstrip(".")


def _shorten(label: str) -> str:
    return label if len(label) <= MAX_LABEL_CHARS else label[:MAX_LABEL_CHARS - 1] + "\u2026"


def bar_chart(title: str, bars: Sequence[Bar], value_name: str, *, width: int = 560, integer: bool = True,
              limit: int = 30, formatter: Callable[[float], str] = _number) -> str:
    """A horizontal bar chart: one row per bar, largest first. Returns an <svg> element.

    title names the chart for assistive technology; value_name labels the value axis.
    Only the first `limit` bars (by value) are drawn: the caller says elsewhere what was left out.
    """
    ordered = sorted(bars, key=lambda b: (-b.value, b.label))[:limit]
    label_px = max(60, min(MAX_LABEL_CHARS, max((len(b.label) for b in ordered), default=4)) * CHAR_PX + 10)
    value_px = max((len(b.value_text or formatter(b.value)) for b in ordered), default=4) * CHAR_PX + 14
    left, right, top = label_px, width - value_px, 6
    plot_px = max(80, right - left)
    maximum = max((b.value for b in ordered), default=0)
    ticks = nice_ticks(maximum, integer=integer)
    scale = plot_px / ticks[-1]
    axis_y = top + ROW_PX * len(ordered) + 4
    height = axis_y + 38

    parts = [f'<svg xmlns="http://www.w3.org/2000/svg" class="chart" width="{width}" height="{height}" '
             f'viewBox="0 0 {width} {height}" role="img" aria-label="{escape(title)}" '
             f'font-family="{escape(FONT)}" font-size="{FONT_PX}">',
             f"<title>{escape(title)}</title>",
             f'<rect width="{width}" height="{height}" fill="#ffffff"/>']
    for tick in ticks:
        x = left + tick * scale
        parts.append(f'<line x1="{x:.1f}" y1="{top}" x2="{x:.1f}" y2="{axis_y}" stroke="{GRID_COLOUR}" stroke-width="1"/>')
        parts.append(f'<line x1="{x:.1f}" y1="{axis_y}" x2="{x:.1f}" y2="{axis_y + 4}" stroke="{AXIS_COLOUR}" stroke-width="1"/>')
        parts.append(f'<text x="{x:.1f}" y="{axis_y + 17}" text-anchor="middle" fill="{AXIS_COLOUR}">'
                     f"{escape(formatter(tick))}</text>")
    parts.append(f'<line x1="{left}" y1="{axis_y}" x2="{left + plot_px}" y2="{axis_y}" stroke="{AXIS_COLOUR}" stroke-width="1"/>')
    parts.append(f'<text x="{left + plot_px / 2:.1f}" y="{axis_y + 33}" text-anchor="middle" fill="{AXIS_COLOUR}">'
                 f"{escape(value_name)}</text>")
    for row, bar in enumerate(ordered):
        y = top + row * ROW_PX
        bar_y = y + (ROW_PX - BAR_PX) / 2
        length = bar.value * scale
        middle = y + ROW_PX / 2 + FONT_PX * 0.35
        value_text = bar.value_text or formatter(bar.value)
        parts.append(f'<text x="{left - 8}" y="{middle:.1f}" text-anchor="end" fill="{TEXT_COLOUR}">'
                     f"{escape(_shorten(bar.label))}</text>")
        if length > 0:
            parts.append(f'<rect x="{left}" y="{bar_y:.1f}" width="{length:.1f}" height="{BAR_PX}" fill="{BAR_COLOUR}"/>')
        parts.append(f'<text x="{left + length + 6:.1f}" y="{middle:.1f}" fill="{TEXT_COLOUR}">{escape(value_text)}</text>')
        if bar.href:
            parts.append(f'<a href="{escape(bar.href)}" class="hit" aria-label="{escape(bar.label)}: {escape(value_text)}">'
                         f'<rect x="0" y="{y}" width="{width}" height="{ROW_PX}" fill="transparent"/></a>')
    # The zero line is drawn last so that it stays visible over the bars.
    parts.append(f'<line x1="{left}" y1="{top}" x2="{left}" y2="{axis_y}" stroke="{AXIS_COLOUR}" stroke-width="1.5"/>')
    parts.append("</svg>")
    return "".join(parts)
