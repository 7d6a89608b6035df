"""line-direct-labels: legend keys read from vector charts drawn by two different means.

Fixtures are invented charts drawn with matplotlib (its legend layout) and with reportlab
(hand-placed swatches, as office-suite exports do). The rule itself is common practice
(label lines directly rather than through a legend); no published threshold.
"""

from __future__ import annotations

import io

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import pytest  # noqa: E402

from corpusaudit.extract.vector_evidence import figure_from_chart_pdf  # noqa: E402
from corpusaudit.measure import Measurements  # noqa: E402
from tests.conftest import run_rule  # noqa: E402

YEARS = np.arange(2014, 2024)
GAUGES = {"Harrow Point": [61, 64, 58, 70, 66, 72, 69, 75, 71, 78],
          "Mill Reach": [40, 44, 47, 45, 52, 50, 55, 53, 58, 60],
          "Saltmarsh": [22, 25, 24, 30, 28, 33, 31, 36, 35, 39]}


def _matplotlib_chart(kind: str = "line", legend: str = "outside", markers: bool = False) -> bytes:
    fig, ax = plt.subplots(figsize=(5.5, 3.2))
    rows = list(GAUGES.values())
    if kind == "area":
        ax.stackplot(YEARS, rows, labels=list(GAUGES))
    for name, row in GAUGES.items():
        if kind == "line":
            ax.plot(YEARS, row, marker="o" if markers else None, markersize=4, label=name)
        if legend == "direct":
            top = sum(GAUGES[n][-1] for n in list(GAUGES)[: list(GAUGES).index(name) + 1]) if kind == "area" else row[-1]
            ax.text(YEARS[-1] + 0.3, top, name, va="center", fontsize=8)
    if legend == "outside":
        ax.legend(loc="upper left", bbox_to_anchor=(1.01, 1.0), frameon=False, fontsize=8)
    elif legend == "inside":
        ax.legend(loc="upper left", fontsize=8)
    elif legend == "direct":
        ax.set_xlim(YEARS[0], YEARS[-1] + 2.5)
    buffer = io.BytesIO()
    fig.savefig(buffer, format="pdf", bbox_inches="tight")
    plt.close(fig)
    return buffer.getvalue()


def _reportlab_chart(legend: bool) -> bytes:
    from reportlab.lib import colors
    from reportlab.pdfgen import canvas

    buffer = io.BytesIO()
    page = canvas.Canvas(buffer, pagesize=(420, 260))
    page.setStrokeColor(colors.black)
    page.line(40, 40, 40, 230)
    page.line(40, 40, 330, 40)
    palette = [colors.HexColor("#1b6ca8"), colors.HexColor("#d9822b"), colors.HexColor("#3a9b5c")]
    for (name, row), colour, in zip(GAUGES.items(), palette):
        page.setStrokeColor(colour)
        page.setLineWidth(1.5)
        points = [(40 + 30 * i, 40 + 2.2 * v) for i, v in enumerate(row)]
        for (x0, y0), (x1, y1) in zip(points, points[1:]):
            page.line(x0, y0, x1, y1)
    page.setFont("Helvetica", 8)
    for k, (name, colour) in enumerate(zip(GAUGES, palette)):
        if legend:  # a swatch line and its label, stacked at the right
            y = 210 - 14 * k
            page.setStrokeColor(colour)
            page.line(345, y + 3, 362, y + 3)
            page.setFillColor(colors.black)
            page.drawString(366, y, name)
        else:  # the name at the end of its line
            page.setFillColor(colour)
            page.drawString(316, 40 + 2.2 * GAUGES[name][-1] - 3, name)
    page.showPage()
    page.save()
    return buffer.getvalue()


@pytest.mark.parametrize("legend", ["outside", "inside"])
def test_a_matplotlib_legend_is_read_and_flagged(legend):
    figure = figure_from_chart_pdf(_matplotlib_chart(legend=legend), f"lines-{legend}", "line")
    keys = Measurements(figure).get("legend_keys").keys
    assert [k.label for k in keys] == list(GAUGES)
    found, unmeasured = run_rule(figure, "line-direct-labels")
    assert not unmeasured and len(found) == 1
    assert found[0].draft.value == "3" and found[0].draft.threshold == "2"
    region = found[0].draft.region
    assert all(region[0] <= k.swatch[0] and k.label_box[2] <= region[2] + 0.01 for k in keys)


def test_a_stacked_area_with_a_legend_is_flagged():
    figure = figure_from_chart_pdf(_matplotlib_chart(kind="area"), "area-legend", "area")
    found, _ = run_rule(figure, "line-direct-labels")
    assert len(found) == 1 and found[0].draft.value == "3"


@pytest.mark.parametrize("kind", ["line", "area"])
def test_direct_labels_pass_even_with_markers_at_the_line_ends(kind):
    figure = figure_from_chart_pdf(_matplotlib_chart(kind=kind, legend="direct", markers=True), f"direct-{kind}", kind)
    assert Measurements(figure).get("legend_keys").keys == ()
    found, unmeasured = run_rule(figure, "line-direct-labels")
    assert found == [] and not unmeasured


@pytest.mark.parametrize("legend, expected", [(True, 1), (False, 0)])
def test_hand_placed_swatches_from_another_producer(legend, expected):
    figure = figure_from_chart_pdf(_reportlab_chart(legend), f"reportlab-{legend}", "line")
    found, _ = run_rule(figure, "line-direct-labels")
    assert len(found) == expected


def test_a_single_series_needs_no_labels():
    fig, ax = plt.subplots(figsize=(4, 3))
    ax.plot(YEARS, GAUGES["Mill Reach"], label="Mill Reach")
    ax.legend()
    buffer = io.BytesIO()
    fig.savefig(buffer, format="pdf")
    plt.close(fig)
    found, _ = run_rule(figure_from_chart_pdf(buffer.getvalue(), "one-series", "line"), "line-direct-labels")
    assert found == []


def test_threshold_override_changes_the_outcome():
    figure = figure_from_chart_pdf(_matplotlib_chart(), "lines-override", "line")
    found, _ = run_rule(figure, "line-direct-labels", {"rules": {"line-direct-labels": {"min_keys": 4}}})
    assert found == []


def _as_raster(figure, jpeg_quality: int | None = None):
    """The same chart as pixels only (a pasted image): no vector evidence."""
    if jpeg_quality is not None:
        from PIL import Image

        buffer = io.BytesIO()
        Image.fromarray(figure.pixels).save(buffer, "JPEG", quality=jpeg_quality)
        figure.pixels = np.asarray(Image.open(io.BytesIO(buffer.getvalue())).convert("RGB"))
    figure.vector, figure.source = None, "raster"
    return figure


@pytest.mark.parametrize("legend", ["outside", "inside"])
@pytest.mark.parametrize("jpeg_quality", [None, 80])
def test_a_legend_in_pixels_is_flagged(legend, jpeg_quality):
    figure = _as_raster(figure_from_chart_pdf(_matplotlib_chart(legend=legend), "raster-legend", "line"), jpeg_quality)
    keys = Measurements(figure).get("legend_keys").keys
    assert len(keys) == 3
    found, unmeasured = run_rule(figure, "line-direct-labels")
    assert not unmeasured and len(found) == 1 and found[0].draft.value == "3"


@pytest.mark.parametrize("kind", ["line", "area"])
def test_direct_labels_in_pixels_pass(kind):
    chart = _matplotlib_chart(kind=kind, legend="direct", markers=True)
    figure = _as_raster(figure_from_chart_pdf(chart, f"raster-direct-{kind}", kind))
    found, unmeasured = run_rule(figure, "line-direct-labels")
    assert found == [] and not unmeasured
