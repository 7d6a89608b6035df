"""Reading the percentages printed on raster pies, against pies whose labels are known exactly.

Reference: matplotlib and PIL draw the given text and wedges exactly, so the labels and the
slices' angles are known; label placement is checked against plane geometry (a point's
distance from a ray through the centre is its distance from the centre times the sine of
the angle between them).
"""

from __future__ import annotations

import numpy as np
import pytest
from PIL import Image, ImageDraw

from corpusaudit.checks.cases import Case, raster_figure
from corpusaudit.measure import Measurements
import corpusaudit.measure.pie as pie_module
from corpusaudit.measure.pie import (Percentage, Pie, Slice, _PERCENTAGE, _labels_divide, _raster_label_lines,
                                     _require_no_missing_piece, _restore_decimal_points, _slice_at, _value)
from corpusaudit.model import MeasurementUnavailable, TextSpan
from corpusaudit.measure.text import ocr_available

needs_ocr = pytest.mark.skipif(not ocr_available(), reason="text recognition not installed")


def _labelled_pie(shares, labels, colours):
    """A pie drawn clockwise from 12 o'clock, each label centred at 0.62 radii along its
    slice's middle angle (where the benchmark and matplotlib's autopct put them)."""
    def draw(fig):
        ax = fig.add_subplot()
        wedges, *_ = ax.pie(shares, colors=colours, startangle=90, counterclock=False)
        for wedge, text in zip(wedges, labels):
            if text:
                angle = np.radians((wedge.theta1 + wedge.theta2) / 2)
                ax.text(0.62 * np.cos(angle), 0.62 * np.sin(angle), text, ha="center", va="center", fontsize=9)
    return draw


def _measure(draw):
    figure = raster_figure(Case("fixture", "pie", draw, {}), np.random.default_rng(1))
    return Measurements(figure)


@needs_ocr
def test_a_thin_black_slice_does_not_erase_the_black_labels_of_the_others():
    # invented data: 55 + 30 + 14 labelled on light slices, a 1 % slice in black left unlabelled;
    # the black labels must not be taken for that slice's colour
    measurements = _measure(_labelled_pie([0.55, 0.30, 0.14, 0.01], ["55.0%", "30.0%", "14.0%", ""],
                                          ["#f0c080", "#a0d0f0", "#c0e0a0", "#000000"]))
    assert len(measurements.get("pie").slices) == 4
    assert sorted(p.value for p in measurements.get("pie_percentages")) == [14.0, 30.0, 55.0]
    total = measurements.get("pie_label_total")
    assert total.estimated == 1 and total.total == pytest.approx(100.0, abs=0.5)


@needs_ocr
def test_a_negative_label_is_read_with_its_sign():
    # invented data: 50 + 30 - 20 = 60; read without the sign the total would be 100
    measurements = _measure(_labelled_pie([0.5, 0.3, 0.2], ["50.0%", "30.0%", "-20.0%"],
                                          ["#f0c080", "#a0d0f0", "#c0e0a0"]))
    assert sorted(p.value for p in measurements.get("pie_percentages")) == [-20.0, 30.0, 50.0]
    assert measurements.get("pie_label_total").total == pytest.approx(60.0)


@pytest.mark.parametrize("text, value", [("12.5%", 12.5), ("-3,5 %", -3.5), ("\u22124%", -4.0), ("10-15%", 15.0)])
def test_a_minus_sign_counts_only_where_it_starts_the_number(text, value):
    # '10-15%' is a range whose percentage is 15, not a label of -15
    assert [_value(m) for m in _PERCENTAGE.finditer(text)] == [value]


def _spans(*texts):
    return [TextSpan(text=t, bbox=(0, 0, 10, 10), size_pt=0.0, angle=0.0, font="ocr") for t in texts]


def test_a_label_shorter_than_the_charts_number_format_is_dropped():
    # among 'x.x%' labels, '8%' is what is left of '1.8%' under an overlapping label: no reading;
    # '119%' gets its decimal point back (11.9)
    kept = [s.text for s in _restore_decimal_points(_spans("3.2%", "8%", "8.0%", "40.3%", "119%"))]
    assert kept == ["3.2%", "8.0%", "40.3%", "11.9%"]


def test_labels_of_a_chart_without_decimals_are_kept():
    kept = [s.text for s in _restore_decimal_points(_spans("50%", "8%", "42%"))]
    assert kept == ["50%", "8%", "42%"]


# Two slices of a pie centred at (100, 100), radius 80, in image coordinates (y down): the
# boundary between them is the ray straight up from the centre (90 degrees).
_HALVES = Pie(centre=(100.0, 100.0), radius=80.0,
              slices=(Slice(start=90.0, span=180.0, colour=(200, 0, 0)),
                      Slice(start=270.0, span=180.0, colour=(0, 0, 200))))


@pytest.mark.parametrize("centre_x, expected", [(70.0, 0), (130.0, 1), (104.0, None), (97.0, None), (108.0, 1)])
def test_a_label_on_a_boundary_is_not_placed(centre_x, expected):
    # a 10 px high label centred 50 px above the centre: its distance from the boundary ray is
    # |x - 100| px; within half its height (5 px) it could label either slice
    box = (centre_x - 15.0, 45.0, centre_x + 15.0, 55.0)
    assert _slice_at(_HALVES, box) == expected


def _pil_pie(spans_deg, colours, size=400, radius=150):
    """A pie drawn by PIL: slices as (start, end) in degrees counter-clockwise from 3 o'clock."""
    image = Image.new("RGB", (size, size), "white")
    draw = ImageDraw.Draw(image)
    c = size / 2
    for (start, end), colour in zip(spans_deg, colours):
        # PIL's angles run clockwise from 3 o'clock
        draw.pieslice((c - radius, c - radius, c + radius, c + radius), -end, -start, fill=colour)
    return np.asarray(image), (c, c), float(radius)


def test_a_slice_the_geometry_missed_leaves_the_labels_unmeasured():
    # three slices drawn; a geometry that knows only two (the middle one missed) must not have
    # the labels summed: the missed slice's colour covers part of the pie
    pixels, centre, radius = _pil_pie([(0, 150), (150, 200), (200, 360)],
                                      [(240, 190, 120), (200, 60, 60), (160, 200, 240)])
    missed = Pie(centre=centre, radius=radius,
                 slices=(Slice(0.0, 175.0, (240, 190, 120)), Slice(175.0, 185.0, (160, 200, 240))))
    with pytest.raises(MeasurementUnavailable):
        _raster_label_lines(pixels, missed)
    whole = Pie(centre=centre, radius=radius, slices=(Slice(0.0, 150.0, (240, 190, 120)),
                                                      Slice(150.0, 50.0, (200, 60, 60)),
                                                      Slice(200.0, 160.0, (160, 200, 240))))
    assert _raster_label_lines(pixels, whole) == []  # no labels drawn, nothing read, nothing raised


@needs_ocr
def test_labels_printed_over_one_another_are_read_where_each_is_expected():
    # invented data: two 4 % slices at 12 o'clock whose labels, 0.62 radii out, overlap by about
    # a character; the second label is false (14.0 for 4 %), so the labels add up to 110. Read
    # in a window at the place of each label, '14.0%' is recovered; the overlapped '4.0%' is
    # not read (a neighbour's glyph runs into it) and its slice counts by its drawn 4 %.
    measurements = _measure(_labelled_pie([0.04, 0.04, 0.46, 0.276, 0.184],
                                          ["4.0%", "14.0%", "46.0%", "27.6%", "18.4%"],
                                          ["#f0c080", "#a0d0f0", "#c0e0a0", "#e0b0d0", "#d0d0a0"]))
    assert sorted(p.value for p in measurements.get("pie_percentages")) == [14.0, 18.4, 27.6, 46.0]
    total = measurements.get("pie_label_total")
    assert total.estimated == 1 and total.total == pytest.approx(110.0, abs=0.5)


def _at(angle_deg, reach, height=10.0):
    """A label box centred reach px from _HALVES's centre at angle_deg (counter-clockwise, y up)."""
    x = 100.0 + reach * np.cos(np.radians(angle_deg))
    y = 100.0 - reach * np.sin(np.radians(angle_deg))
    return Percentage(value=10.0, bbox=(x - 15.0, y - height / 2, x + 15.0, y + height / 2))


@pytest.mark.parametrize("angles, divides", [
    ((135.0, 225.0), True),   # middles of two 90-degree parts of the slice from 90 to 270 degrees
    ((110.0, 200.0), True),   # parts of 40 and 140 degrees: boundary at 130, middles at 110 and 200
    ((120.0, 225.0), False),  # boundary 150 from the first, 180 from the second: no division
    ((135.0, 136.0), False),  # one label read twice, side by side
])
def test_two_labels_on_one_slice_divide_it_only_where_each_sits_on_its_parts_middle(angles, divides):
    # plane geometry: a part from a to b has its middle at (a + b) / 2, so each boundary is
    # twice a label's angle less the boundary before it, and the chain must end at 270 degrees
    labels = [_at(angle, 0.62 * 80.0) for angle in angles]
    assert _labels_divide(_HALVES, 0, labels, 0.62) is divides


def test_labels_off_the_charts_label_distance_do_not_divide_a_slice():
    # the right angles (135, 225) but one label 0.9 radii out: not where the chart puts its labels
    labels = [_at(135.0, 0.62 * 80.0), _at(225.0, 0.9 * 80.0)]
    assert not _labels_divide(_HALVES, 0, labels, 0.62)


@needs_ocr
def test_neighbouring_slices_of_one_colour_are_summed_by_their_labels():
    # invented data: the first two slices share a colour and no separator divides them, so the
    # geometry sees one slice of 50 % holding two labels; the first label is false (40.0 for
    # 30 %), so the labels add up to 110. Counting that slice by its drawn share would give 100.
    measurements = _measure(_labelled_pie([0.30, 0.20, 0.25, 0.15, 0.10],
                                          ["40.0%", "20.0%", "25.0%", "15.0%", "10.0%"],
                                          ["#f0c080", "#f0c080", "#a0d0f0", "#c0e0a0", "#e0b0d0"]))
    assert len(measurements.get("pie").slices) == 4
    total = measurements.get("pie_label_total")
    assert total.estimated == 0 and total.labelled == 5
    assert total.total == pytest.approx(110.0)


def test_an_exploded_pie_with_thin_wedges_keeps_them_all():
    # invented data: every wedge pulled out; the thin wedges' tips are narrower than the
    # opening that separates the pieces and are lost with it, yet each wedge is put back
    shares = [0.40, 0.25, 0.15, 0.10, 0.06, 0.04]
    def draw(fig):
        fig.add_subplot().pie(shares, startangle=90, counterclock=False, explode=[0.06] * 6)
    pie = _measure(draw).get("pie")
    assert len(pie.slices) == 6
    assert sorted(pie.shares) == pytest.approx(sorted(shares), abs=0.01)


def test_a_reassembled_pie_with_a_piece_left_out_is_refused():
    # a pie drawn by PIL with a 20-degree gap of background where a piece was not put back;
    # the slices measured around it would give the missing share to the neighbours
    pixels, centre, radius = _pil_pie([(0, 150), (170, 360)], [(240, 190, 120), (160, 200, 240)])
    background = np.array([255.0, 255.0, 255.0])
    geometry = Pie(centre=centre, radius=radius, slices=(Slice(0.0, 160.0, (240, 190, 120)),
                                                         Slice(160.0, 200.0, (160, 200, 240))))
    with pytest.raises(MeasurementUnavailable):
        _require_no_missing_piece(pixels, background, geometry)
    whole, *_ = _pil_pie([(0, 150), (150, 360)], [(240, 190, 120), (160, 200, 240)])
    _require_no_missing_piece(whole, background, geometry)  # no gap: nothing raised


@needs_ocr
def test_black_labels_on_a_light_grey_slice_keep_their_thin_strokes_beside_a_dark_grey_slice():
    # invented data: the blends of a dark grey slice with the white background are the greys
    # of black glyphs' antialiased edges on a light grey slice; taken for that slice's edges,
    # they would thin '17.1%' to '7.1%'. Only near its own slice is a blend a slice's edge.
    measurements = _measure(_labelled_pie([0.40, 0.243, 0.171, 0.108, 0.078],
                                          ["40.0%", "24.3%", "17.1%", "10.8%", "7.8%"],
                                          ["#016ba5", "#ff8010", "#ababab", "#595959", "#60a0d8"]))
    assert sorted(p.value for p in measurements.get("pie_percentages")) == [7.8, 10.8, 17.1, 24.3, 40.0]


def test_a_line_read_at_some_scales_only_is_read_again_without_the_fragments(monkeypatch):
    # recognition stands in for tesseract here: on the page with the fragments the label
    # reads at two of the three scales (as a junk-filled page made it on a donut's dark
    # slices), on a page of its own at all three; fragments that read nothing are not read again
    label, fragment = (10, 10, 60, 15), (100, 10, 12, 7)
    pages = []

    def recognise(grey, boxes):
        pages.append(list(boxes))
        word = [TextSpan(text="47.2%", bbox=(0, 0, 60, 15), size_pt=0.0, angle=0.0, font="ocr")]
        spoilt = len(boxes) > 1
        return [[word, word, [] if spoilt else word] if box == label else [[], [], []] for box in boxes]

    monkeypatch.setattr(pie_module, "_ocr_boxes", recognise)
    lines = pie_module._read_lines(np.full((40, 200), 255, np.uint8), [label, fragment], (5, 5))
    assert [[span.text for span in line] for line in lines] == [["47.2%"], []]
    assert pages == [[label, fragment], [label]]
    assert lines[0][0].bbox == (15, 15, 75, 30)  # the box's place in the figure
