"""Caption candidates and their assignment to figures."""

from __future__ import annotations

import re

import pymupdf

from corpusaudit.extract import DEFAULT_CAPTION_PATTERN
from corpusaudit.extract.captions import Caption, TextLine, assign_captions, caption_candidates
from tests.extract_fixtures import extract, image_bytes

PATTERN = re.compile(DEFAULT_CAPTION_PATTERN, re.IGNORECASE)


def _lines(*rows: tuple[int, float, str]) -> list[TextLine]:
    out, seen = [], set()
    for block, y, text in rows:
        out.append(TextLine((72, y, 300, y + 10), text, block, block not in seen, 9))
        seen.add(block)
    return out


def test_caption_styles_and_numbers():
    lines = _lines((0, 100, "Figure 3. Catch."), (1, 200, "Fig. 4: Yield."), (2, 300, "Chart 2.1 - Rate"),
                   (3, 400, "Graph 5 Totals"), (4, 500, "FIGURE 12b. Panels"))
    assert [c.number for c in caption_candidates(lines, PATTERN)] == ["3", "4", "2.1", "5", "12b"]


def test_a_sentence_mentioning_a_figure_mid_paragraph_is_not_a_caption():
    lines = _lines((0, 100, "The survey grew in every basin, and"), (0, 112, "Figure 3 shows the totals per year."))
    assert caption_candidates(lines, PATTERN) == []


def test_caption_runs_to_the_end_of_its_block_and_stacked_captions_split():
    lines = _lines((0, 100, "Figure 1. First part"), (0, 111, "continues here."), (0, 122, "Figure 2. Second."))
    captions = caption_candidates(lines, PATTERN)
    assert [(c.number, c.text) for c in captions] == [("1", "Figure 1. First part continues here."),
                                                      ("2", "Figure 2. Second.")]


def test_caption_below_is_preferred_and_each_is_used_once():
    upper, lower = (72, 50, 300, 150), (72, 180, 300, 280)
    between = caption_candidates(_lines((0, 160, "Figure 1. Between.")), PATTERN)
    # the caption sits under the upper figure and over the lower one: it belongs to the upper
    assert [c.number if c else None for c in assign_captions([upper, lower], between, 36)] == ["1", None]


def test_caption_pattern_is_configurable(tmp_path):
    doc = pymupdf.open()
    page = doc.new_page()
    page.insert_image(pymupdf.Rect(72, 72, 272, 222), stream=image_bytes(200, 150), keep_proportion=False)
    page.insert_text((72, 236), "Abbildung 4: Fangmenge.", fontsize=9)
    doc.save(tmp_path / "de.pdf")
    assert extract(tmp_path / "de.pdf").figures[0].figure_number == ""
    custom = r"^\s*(Abbildung)\s*(\d+)\s*[.:]?"
    (figure,) = extract(tmp_path / "de.pdf", caption_pattern=custom).figures
    assert (figure.figure_number, figure.caption) == ("4", "Abbildung 4: Fangmenge.")


def test_caption_above_one_figure_beats_being_level_with_another():
    # Two columns: the caption sits above the right figure and level with the top of the left one.
    left, right = (72, 40, 276, 230), (310, 160, 480, 300)
    (caption,) = caption_candidates(_lines((0, 138, "Figure 3. Right column.")), PATTERN)
    caption = Caption(caption.text, caption.number, (296, 138, 513, 151))
    assert [c.number if c else None for c in assign_captions([left, right], [caption], 36)] == [None, "3"]


def test_caption_is_judged_in_its_own_reading_frame():
    # A page laid out upright and then given /Rotate 90: on display the text runs downwards and the
    # caption that was under the figure is left of it. In the caption's frame it is still below.
    figure = (300, 100, 450, 300)
    downwards = (0.0, 1.0)
    below = Caption("Figure 1. Turned.", "1", (270, 100, 282, 300), downwards)
    above = Caption("Figure 2. Turned.", "2", (468, 100, 480, 300), downwards)
    assert assign_captions([figure], [above, below], 36) == [below]


def test_far_caption_needs_a_clear_strip_to_its_figure():
    figure = (72, 100, 300, 250)
    (caption,) = caption_candidates(_lines((0, 300, "Figure 5. Far below.")), PATTERN)  # 50 pt under the ink
    assert assign_captions([figure], [caption], 36, text_boxes=[]) == [caption]
    body = (72, 270, 290, 280)  # a line of body text between them
    assert assign_captions([figure], [caption], 36, text_boxes=[body]) == [None]
    assert assign_captions([figure], [caption], 36) == [None]  # page text unknown: near captions only
