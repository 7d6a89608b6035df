"""text-contrast and text-size on vector and raster charts drawn with matplotlib.

References: WCAG 2.1 success criterion 1.4.3 and its definitions of relative luminance and
contrast ratio (#777777 on white: L = 0.1845, (1 + 0.05) / (0.1845 + 0.05) = 4.48:1, as the
WebAIM contrast checker also reports); 'large scale' text is 18 pt, or 14 pt bold. Text
size: 6 pt is common practice for print. Raster text is found by measure/glyphs.py (no OCR).
"""

from __future__ import annotations

import pytest

from benchmarks.colour_cases import ColourCase, raster_figure, vector_figure
from tests.conftest import run_rule as run


def labelled_case(text_colour: str = "#000000", size: float = 10.0, bold: bool = False,
                  tick_size: float | None = None, stray: str | None = None) -> ColourCase:
    """A line chart whose title, axis labels and tick labels share one colour and size."""
    def draw(fig):
        ax = fig.add_subplot()
        ax.plot([0, 1, 2, 3], [2, 3, 1, 4], color="#444444")
        weight = "bold" if bold else "normal"
        ax.set_title("Harvest per plot", fontsize=size, color=text_colour, weight=weight)
        ax.set_xlabel("Season number", fontsize=size, color=text_colour, weight=weight)
        ax.set_ylabel("Yield in tonnes", fontsize=size, color=text_colour, weight=weight)
        # Tick labels cannot be made bold through tick_params: keep them black in the bold case.
        ax.tick_params(labelsize=tick_size or size, labelcolor="#000000" if bold else text_colour)
        if stray:
            ax.text(1.5, 2.5, stray, fontsize=3)

    return ColourCase("labels", "line", draw, {})


# ------------------------------------------------------------------ text-contrast


def test_wcag_grey_777777_warns_as_normal_text():
    findings, unmeasured = run(vector_figure(labelled_case("#777777", size=10)), "text-contrast")
    assert not unmeasured and len(findings) == 1
    assert findings[0].draft.value == "4.48" and findings[0].draft.threshold == "4.5"  # WCAG worked value
    assert "normal text" in findings[0].draft.message
    x0, y0, x1, y1 = findings[0].draft.region
    assert x1 > x0 and y1 > y0


def test_wcag_grey_777777_passes_as_large_text():
    assert run(vector_figure(labelled_case("#777777", size=18)), "text-contrast") == ([], False)


def test_bold_14_pt_is_large_but_regular_14_pt_is_not():
    # #8a8a8a on white is 3.45:1: above the 3:1 large-text limit, below 4.5:1.
    assert run(vector_figure(labelled_case("#8a8a8a", size=14, bold=True)), "text-contrast") == ([], False)
    findings, _ = run(vector_figure(labelled_case("#8a8a8a", size=14)), "text-contrast")
    assert findings and findings[0].draft.value == "3.45"


def test_black_text_passes_and_config_changes_the_outcome():
    assert run(vector_figure(labelled_case("#000000")), "text-contrast") == ([], False)
    grey = vector_figure(labelled_case("#777777"))
    assert run(grey, "text-contrast", {"rules": {"text-contrast": {"min_ratio": 4.0}}})[0] == []
    assert run(grey, "text-contrast", {"rules": {"text-contrast": {"large_pt": 9.0}}})[0] == []


def test_text_on_a_dark_bar_is_judged_against_the_bar():
    def draw(fig):
        ax = fig.add_subplot()
        ax.bar([0, 1], [3, 4], color="#1f3a93")
        ax.text(0, 1.5, "Forty", color="#000000", ha="center", fontsize=10)  # black on dark blue: 2.3:1

    findings, _ = run(vector_figure(ColourCase("dark-bar", "bar", draw, {})), "text-contrast")
    assert findings and "'Forty'" in findings[0].draft.message
    assert float(findings[0].draft.value) < 3.0


def test_raster_contrast_from_glyphs():
    # #999999 on white is 2.85:1 (WCAG formula); #333333 is 12.63:1.
    findings, unmeasured = run(raster_figure(labelled_case("#999999", size=11), ppi=200), "text-contrast")
    assert not unmeasured and findings
    assert float(findings[0].draft.value) == pytest.approx(2.85, abs=0.3)
    assert run(raster_figure(labelled_case("#333333", size=11), ppi=200), "text-contrast") == ([], False)


# ------------------------------------------------------------------ text-size


def test_vector_small_tick_labels_warn():
    findings, unmeasured = run(vector_figure(labelled_case(size=10, tick_size=4)), "text-size")
    assert not unmeasured and len(findings) == 1
    assert findings[0].draft.value == "4.0" and findings[0].draft.threshold == "6"


def test_vector_normal_text_passes_and_config_changes_the_outcome():
    figure = vector_figure(labelled_case(size=10, tick_size=8))
    assert run(figure, "text-size") == ([], False)
    findings, _ = run(figure, "text-size", {"rules": {"text-size": {"min_pt": 9}}})
    assert findings and findings[0].draft.value == "8.0"


def test_a_single_stray_glyph_is_ignored():
    assert run(vector_figure(labelled_case(size=10, tick_size=9, stray="x")), "text-size") == ([], False)
    # ... but a word at that size is text.
    assert run(vector_figure(labelled_case(size=10, tick_size=9, stray="note")), "text-size")[0]


def test_print_size_follows_the_placement_scale():
    """A chart placed at half its drawn size prints its 10 pt labels at 5 pt."""
    import pymupdf

    from benchmarks.colour_cases import render
    from corpusaudit.extract.vector_evidence import vector_evidence

    source = pymupdf.open("pdf", render(labelled_case(size=10), "pdf", 72))
    page = pymupdf.open().new_page(width=612, height=792)
    rect = pymupdf.Rect(36, 36, 36 + source[0].rect.width / 2, 36 + source[0].rect.height / 2)
    page.show_pdf_page(rect, source, 0)
    evidence = vector_evidence(page, rect, 150 / 72)
    assert min(span.size_pt for span in evidence.texts) == pytest.approx(5.0, abs=0.05)


def test_raster_small_text_warns_and_normal_text_passes():
    findings, unmeasured = run(raster_figure(labelled_case(size=4.5), ppi=200), "text-size")
    assert not unmeasured and findings
    assert float(findings[0].draft.value) == pytest.approx(4.5, abs=1.0)
    assert run(raster_figure(labelled_case(size=10), ppi=200), "text-size") == ([], False)


def test_image_files_have_no_print_size():
    assert run(raster_figure(labelled_case(size=4), source="image"), "text-size") == ([], True)
