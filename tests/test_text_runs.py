"""Tick labels that touch: MuPDF joins neighbouring text runs of one font into one span
("AlphaBetaGamma"); the runs as drawn are read with TEXT_PRESERVE_SPANS (PyMuPDF's text
flags: spans on a line are not joined) and the x axis gives each tick its own label.

The charts are drawn here with PyMuPDF: labels placed end to end with
pymupdf.get_text_length, so where each label starts is known exactly.
"""

from __future__ import annotations

import pymupdf
import pytest

from corpusaudit.extract.vector_evidence import figure_from_chart_pdf, read_text
from corpusaudit.measure import Measurements

FONT_SIZE = 10


START = 60.0  # where the first label starts (points)


def _chart(labels: list[str], ticks: list[float], gap: float = 0.0) -> bytes:
    """A framed line chart with x tick marks at ticks and the labels written one after the
    other from START, gap points apart (0: touching)."""
    doc = pymupdf.open()
    page = doc.new_page(width=400, height=300)
    shape = page.new_shape()
    shape.draw_rect(pymupdf.Rect(50, 20, 380, 250))
    shape.finish(color=(0, 0, 0), width=0.8)
    for x in ticks:
        shape.draw_line((x, 250), (x, 254))
        shape.finish(color=(0, 0, 0), width=0.8, closePath=False)
    shape.draw_polyline([(x, 200 - 40 * (k % 2)) for k, x in enumerate(ticks)])
    shape.finish(color=(0.1, 0.4, 0.7), width=1.5, closePath=False)
    shape.commit()
    x = START
    for label in labels:
        page.insert_text((x, 266), label, fontsize=FONT_SIZE)
        x += pymupdf.get_text_length(label, fontsize=FONT_SIZE) + gap
    return doc.tobytes()


def _page_spans(pdf: bytes) -> list[str]:
    page = pymupdf.open("pdf", pdf)[0]
    return [span["text"] for block in read_text(page)["blocks"] for line in block["lines"] for span in line["spans"]]


def _middles(labels: list[str]) -> list[float]:
    """Where each label's middle lands when they are written end to end from START."""
    widths = [pymupdf.get_text_length(label, fontsize=FONT_SIZE) for label in labels]
    start, middles = START, []
    for width in widths:
        middles.append(start + width / 2)
        start += width
    return middles


LABELS = ["Alpha", "Beta", "Gamma", "Delta"]


def test_touching_labels_are_one_span_but_keep_their_runs():
    pdf = _chart(LABELS, _middles(LABELS))
    assert _page_spans(pdf) == ["AlphaBetaGammaDelta"]  # what MuPDF's joined reading gives
    figure = figure_from_chart_pdf(pdf, "touching", "line")
    (span,) = figure.vector.texts
    assert [text for text, _ in span.runs] == LABELS
    # each run's box starts where the text before it ends (figure pixels: 150 dpi, 150/72 per point)
    starts = [box[0] for _, box in span.runs]
    widths = [pymupdf.get_text_length(label, fontsize=FONT_SIZE) * 150 / 72 for label in LABELS]
    for before, after, width in zip(starts, starts[1:], widths):
        assert after - before == pytest.approx(width, abs=0.05)


def test_each_tick_gets_its_own_label():
    figure = figure_from_chart_pdf(_chart(LABELS, _middles(LABELS)), "touching", "line")
    axis = Measurements(figure).get("axes").x
    assert axis.labels == LABELS
    assert axis.kind == "categorical"


def test_a_label_drawn_as_two_runs_stays_whole():
    # "North" and "gate" drawn as two runs under one tick (some producers draw a label in
    # pieces), then "South" under the next tick
    northgate, south = _middles(["Northgate", "South"])
    pdf = _chart(["North", "gate", "South"], [northgate, south])
    labels = Measurements(figure_from_chart_pdf(pdf, "pieces", "line")).get("axes").x.labels
    assert labels == ["Northgate", "South"]


def test_separate_labels_have_no_runs():
    pdf = _chart(LABELS, [85.0, 165.0, 245.0, 325.0], gap=40.0)
    spans = figure_from_chart_pdf(pdf, "apart", "line").vector.texts
    assert sorted(s.text for s in spans) == sorted(LABELS)
    assert all(s.runs == () for s in spans)
