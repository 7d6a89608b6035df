"""Multi-word tick labels set across their reading direction: rotated labels under the x axis and
level labels beside the y axis are each found as one label at its tick, words in order.

Reference: matplotlib draws tick labels at the rotation it is given, the words of each label on
one baseline, and places category labels at their ticks (its documented categorical axis), so
the truth is the labels it was given. Names are invented.
"""

from __future__ import annotations

import io

import numpy as np
import pytest

from corpusaudit.measure import Measurements
from corpusaudit.measure.text import ocr_available
from corpusaudit.model import Figure

needs_ocr = pytest.mark.skipif(not ocr_available(), reason="text recognition not installed")
LABELS = ["Port Kalovel", "Mireb Haven", "Port Satorul", "Quniren Haven", "Dragopim Ward"]
DPI = 150


def _figure(draw, chart_type: str = "bar") -> Figure:
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib.figure import Figure as MplFigure
    from PIL import Image

    fig = MplFigure(figsize=(5.5, 4.6), dpi=DPI)
    draw(fig)
    buffer = io.BytesIO()
    fig.savefig(buffer, format="png", dpi=DPI)
    pixels = np.ascontiguousarray(np.asarray(Image.open(buffer).convert("RGB")))
    return Figure(figure_id="words-r", document_id="test", path="words.png", page=1, index=0,
                  bbox=(0, 0, pixels.shape[1], pixels.shape[0]), source="raster", width_px=pixels.shape[1],
                  height_px=pixels.shape[0], effective_ppi=float(DPI), pixels=pixels, chart_type=chart_type)


def _bars(rotation=0.0, horizontal=False):
    def draw(fig):
        ax = fig.add_subplot()
        if horizontal:
            ax.barh(range(len(LABELS)), [30, 80, 50, 60, 40], tick_label=LABELS, color="C0")
            fig.subplots_adjust(left=0.32)
        else:
            ax.bar(range(len(LABELS)), [30, 80, 50, 60, 40], tick_label=LABELS, color="C0")
            for label in ax.get_xticklabels():
                label.set_rotation(rotation)
                label.set_ha("right" if 0 < rotation < 90 else "center")
            fig.subplots_adjust(bottom=0.4)  # room for the rotated labels: none cut off
    return draw


@pytest.mark.parametrize("rotation", [45, 90])
def test_the_words_of_a_rotated_label_are_one_blob(rotation):
    blobs = Measurements(_figure(_bars(rotation))).get("label_blobs")["x"]
    assert len(blobs) == len(LABELS)
    # more glyphs than the longer word has letters: both words are in the blob
    assert all(blob.glyphs > max(len(word) for word in label.split()) for blob, label in zip(blobs, LABELS))


def test_the_words_of_level_labels_beside_the_y_axis_are_one_blob():
    blobs = Measurements(_figure(_bars(horizontal=True))).get("label_blobs")["y"]
    assert len(blobs) == len(LABELS)


@needs_ocr
@pytest.mark.parametrize("rotation", [45, 90])
def test_rotated_two_word_labels_are_read_whole_at_their_ticks(rotation):
    measurements = Measurements(_figure(_bars(rotation)))
    ticks = measurements.get("x_label_texts")
    assert [t.text for t in ticks] == LABELS
    marks = measurements.get("tick_marks")["x"]
    # a rotated label ends at its tick (right-aligned at 45 degrees, centred when upright)
    assert all(t.bbox[0] - 2 <= mark <= t.bbox[2] + 2 for t, mark in zip(ticks, marks))


@needs_ocr
def test_level_two_word_labels_beside_the_y_axis_are_read_whole():
    # barh puts the first bar at the bottom; labels are read top to bottom
    assert [t.text for t in Measurements(_figure(_bars(horizontal=True))).get("y_label_texts")] == LABELS[::-1]
