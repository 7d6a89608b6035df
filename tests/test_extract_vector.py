"""Vector evidence and path grouping."""

from __future__ import annotations

import io

import numpy as np
import pymupdf
import pytest
from matplotlib.figure import Figure as MplFigure

from corpusaudit.extract.regions import group_ink
from corpusaudit.extract.vector_evidence import vector_evidence
from tests.extract_fixtures import extract, iou, ruled_table


def _labelled_chart() -> tuple[bytes, dict[str, tuple[float, float]]]:
    """A matplotlib chart whose tick labels are at 45 deg (x, 8 pt) and 0 deg (y, 10 pt), y title at 90 deg."""
    fig = MplFigure(figsize=(4, 3))
    ax = fig.add_subplot(111)
    ax.bar(["alpha", "beta", "gamma"], [2, 3, 1])
    ax.set_yticks([0, 1, 2, 3], labels=["zero", "one", "two", "three"])
    ax.tick_params(axis="x", labelsize=8, labelrotation=45)
    ax.tick_params(axis="y", labelsize=10)
    ax.set_ylabel("tonnes", fontsize=9)
    buffer = io.BytesIO()
    fig.savefig(buffer, format="pdf", bbox_inches="tight")
    # Reference: matplotlib's own Text objects state each label's rotation and size.
    fig.canvas.draw_idle()
    expected = {t.get_text(): (t.get_rotation(), t.get_fontsize()) for t in ax.get_xticklabels() + ax.get_yticklabels()}
    expected["tonnes"] = (ax.yaxis.label.get_rotation(), ax.yaxis.label.get_fontsize())
    return buffer.getvalue(), expected


def test_evidence_of_a_matplotlib_chart_has_tick_texts_angles_and_sizes():
    data, expected = _labelled_chart()
    assert {v[0] for v in expected.values()} == {0.0, 45.0, 90.0}
    with pymupdf.open("pdf", data) as doc:
        page = doc[0]
        evidence = vector_evidence(page, page.rect, 2.0)
    found = {t.text: (t.angle, t.size_pt) for t in evidence.texts}
    for text, (angle, size) in expected.items():
        assert found[text] == pytest.approx((angle, size), abs=0.5), text
    assert evidence.scale == 2.0
    bars = [p for p in evidence.paths if p.is_rect and p.fill is not None and p.fill != (1.0, 1.0, 1.0)]
    assert len(bars) >= 3


def test_evidence_on_a_rotated_page_is_in_displayed_orientation():
    doc = pymupdf.open()
    page = doc.new_page(width=400, height=600)
    page.insert_text((50, 100), "upright", fontsize=12)
    page.draw_rect(pymupdf.Rect(50, 150, 150, 200), fill=(1, 0, 0))
    page.set_rotation(90)
    evidence = vector_evidence(page, pymupdf.Rect(0, 0, 400, 600), 1.0)
    (text,) = evidence.texts
    assert text.angle == pytest.approx(-90)  # horizontal in the content, turned clockwise on display
    (rect,) = [p for p in evidence.paths if p.fill == (1.0, 0.0, 0.0)]
    # (x, y) -> (H - y, x) with H = 600 (PDF 32000-1:2008, 7.7.3.3 /Rotate)
    assert rect.bbox == pytest.approx((400, 50, 450, 150))


def _grid_page(groups: int, paths_per_group: int) -> pymupdf.Document:
    """Groups of small filled squares 2 pt apart inside a group, groups 60 pt apart."""
    doc = pymupdf.open()
    page = doc.new_page(width=612, height=792)
    shape = page.new_shape()
    side = int(paths_per_group ** 0.5)
    for g in range(groups):
        gx, gy = 40 + (g % 3) * 190, 40 + (g // 3) * 190
        for k in range(paths_per_group):
            x, y = gx + (k % side) * 5, gy + (k // side) * 5
            shape.draw_rect(pymupdf.Rect(x, y, x + 3, y + 3))
            shape.finish(fill=(0.2, 0.3, 0.8), color=None)
    shape.commit()
    return doc


def test_grouping_regression_dense_groups_stay_separate():
    # Regression: 4 groups of 900 paths each are exactly 4 regions with all their paths.
    with _grid_page(4, 900) as doc:
        page = doc[0]
        drawings = page.get_drawings()
        regions = group_ink(pymupdf.Rect(page.rect), drawings, [])
    assert len(drawings) == 3600
    assert sorted(len(r.paths) for r in regions) == [900, 900, 900, 900]
    assert sorted((round(r.box.x0), round(r.box.y0)) for r in regions) == [(40, 40), (40, 230), (230, 40), (420, 40)]


def test_path_cap_records_a_page_error(tmp_path):
    with _grid_page(2, 400) as doc:
        doc.save(tmp_path / "dense.pdf")
    result = extract(tmp_path / "dense.pdf", max_paths_per_page=500)
    assert result.figures == []
    assert result.errors == ["page 1: about 800 drawing paths exceed max_paths_per_page (500); vector figures not searched"]
    assert len(extract(tmp_path / "dense.pdf").figures) == 2


def _chart_pdf(draw, transparent: bool = False, pad_inches: float = 0.05, size=(4, 3)) -> bytes:
    fig = MplFigure(figsize=size)
    draw(fig.add_subplot(111))
    buffer = io.BytesIO()
    fig.savefig(buffer, format="pdf", bbox_inches="tight", pad_inches=pad_inches, transparent=transparent)
    return buffer.getvalue()


def _place(page: pymupdf.Page, data: bytes, x0: float, y0: float, width: float) -> pymupdf.Rect:
    with pymupdf.open("pdf", data) as src:
        rect = pymupdf.Rect(x0, y0, x0 + width, y0 + width * src[0].rect.height / src[0].rect.width)
        page.show_pdf_page(rect, src, 0)
    return rect


def _save(doc: pymupdf.Document, path):
    doc.save(path)
    doc.close()
    return path


def test_bars_clipped_at_a_raised_axis_do_not_join_the_chart_below(tmp_path):
    def raised_axis(ax):  # bars are drawn from 0 and clipped at the axes, which start at 40
        ax.bar(["north", "south", "east"], [45, 52, 58])
        ax.set_ylim(40, 60)

    doc = pymupdf.open()
    page = doc.new_page()
    upper = _place(page, _chart_pdf(raised_axis), 100, 60, 300)
    lower = _place(page, _chart_pdf(lambda ax: ax.pie([3, 2, 1], labels=["cod", "dab", "ling"])), 100,
                   upper.y1 + 36, 300)
    figures = extract(_save(doc, tmp_path / "clip.pdf")).figures
    assert len(figures) == 2
    assert iou(figures[0].bbox, tuple(upper)) > 0.95 and iou(figures[1].bbox, tuple(lower)) > 0.95
    # the clipped-away part of the bars is no evidence of the chart below
    assert not any(p.fill and p.is_rect and p.fill[2] > 0.6 and p.fill[0] < 0.3 for p in figures[1].vector.paths)


def test_axes_frame_and_ticks_count_in_a_transparent_charts_box(tmp_path):
    # Straight axis lines have zero-width boxes; the figure box must still reach them.
    rng = np.random.default_rng(4)
    data = _chart_pdf(lambda ax: ax.boxplot([rng.normal(i, 1, 30) for i in range(4)]), transparent=True,
                      pad_inches=0)
    doc = pymupdf.open()
    page = doc.new_page()
    rect = _place(page, data, 100, 100, 300)  # pad 0: the page is matplotlib's own tight box of the artists
    (figure,) = extract(_save(doc, tmp_path / "box.pdf")).figures
    assert iou(figure.bbox, tuple(rect)) > 0.95


def test_a_title_set_well_above_a_transparent_pie_belongs_to_it(tmp_path):
    def pie(ax):
        ax.pie([4, 3, 2, 1], labels=["cod", "dab", "ling", "hake"])
        ax.set_title("Landings by species", pad=14)

    doc = pymupdf.open()
    page = doc.new_page()
    _place(page, _chart_pdf(pie, transparent=True, pad_inches=0), 150, 100, 260)
    ink = _ink_box(page)
    (figure,) = extract(_save(doc, tmp_path / "pie.pdf")).figures
    assert "Landings by species" in {t.text for t in figure.vector.texts}
    x0, y0, x1, y1 = figure.bbox
    assert x0 <= ink[0] + 1 and y0 <= ink[1] + 1 and x1 >= ink[2] - 1 and y1 >= ink[3] - 1  # all that is painted
    assert iou(figure.bbox, ink) > 0.9


def _ink_box(page: pymupdf.Page) -> tuple[float, float, float, float]:
    """Box of the page's painted pixels at 72 dpi (one pixel a point), the reference for a figure's extent."""
    pix = page.get_pixmap(dpi=72, alpha=False)
    grey = np.frombuffer(pix.samples, np.uint8).reshape(pix.height, pix.width, pix.n).min(axis=2)
    ys, xs = np.nonzero(grey < 200)
    return float(xs.min()), float(ys.min()), float(xs.max() + 1), float(ys.max() + 1)


def test_a_paragraph_just_above_a_chart_is_not_taken_as_its_title(tmp_path):
    data = _chart_pdf(lambda ax: ax.plot([1, 3, 2, 4]), transparent=True, pad_inches=0)
    doc = pymupdf.open()
    page = doc.new_page()
    rect = _place(page, data, 150, 120, 260)
    for i, line in enumerate(("The regional survey counted every station", "twice in the invented season.")):
        page.insert_text((180, rect.y0 - 22 + 11 * i), line, fontsize=9)  # centred over the chart, 6 pt above
    (figure,) = extract(_save(doc, tmp_path / "para.pdf")).figures
    assert iou(figure.bbox, tuple(rect)) > 0.95
    assert "twice in the invented season." not in {t.text for t in figure.vector.texts}


def test_a_table_its_author_captioned_as_a_figure_is_a_figure(tmp_path):
    doc = pymupdf.open()
    page = doc.new_page()
    table = ruled_table(page, 72, 100)
    page.insert_text((72, table.y1 + 14), "Figure 4. Survey effort by station.", fontsize=9)
    ruled_table(page, 72, 400)
    page.insert_text((72, 390), "Table 2. Survey effort by month.", fontsize=9)  # a table's own caption
    (figure,) = extract(_save(doc, tmp_path / "tables.pdf")).figures
    assert (figure.source, figure.figure_number) == ("vector", "4")
    assert iou(figure.bbox, tuple(table)) > 0.95
    assert figure.image_info["layout"] == "table"  # so it is labelled not_chart whatever the model says


def test_a_figure_drawn_as_a_table_is_not_a_chart():
    from corpusaudit.classify import Prediction
    from corpusaudit.config import build_config
    from corpusaudit.measure import Measurements
    from corpusaudit.model import Figure
    from corpusaudit.run import _classify

    figure = Figure(figure_id="t", document_id="d", path="d.pdf", page=1, index=0, bbox=(0, 0, 100, 50),
                    source="vector", width_px=200, height_px=100, image_info={"paths": 12, "layout": "table"})
    _classify(figure, Prediction("box", 0.96, (("box", 0.96),)), build_config({}), Measurements(figure))
    assert (figure.chart_type, figure.classified_by, figure.low_confidence) == ("not_chart", "vector", False)


def test_panels_of_one_embedded_graphic_under_one_caption_are_one_figure(tmp_path):
    # Two subplots far apart on a transparent canvas: nothing joins their ink, but they come from
    # one embedded graphic (one form, clipped to its box) and share one caption.
    fig = MplFigure(figsize=(6, 2.6))
    bars, lines = fig.subplots(1, 2)
    fig.subplots_adjust(wspace=0.6)
    bars.bar(["north", "south", "east"], [3, 5, 2])
    lines.plot([1, 3, 2, 4])
    buffer = io.BytesIO()
    fig.savefig(buffer, format="pdf", bbox_inches="tight", pad_inches=0.05, transparent=True)
    doc = pymupdf.open()
    page = doc.new_page()
    rect = _place(page, buffer.getvalue(), 72, 100, 468)
    page.insert_text((72, rect.y1 + 14), "Figure 6. Catch and effort, invented data.", fontsize=9)
    uncaptioned = doc.new_page()
    _place(uncaptioned, buffer.getvalue(), 72, 100, 468)
    result = extract(_save(doc, tmp_path / "panels.pdf"))
    (figure,) = [f for f in result.figures if f.page == 1]
    assert figure.figure_number == "6" and iou(figure.bbox, tuple(rect)) > 0.95
    assert len([f for f in result.figures if f.page == 2]) == 2  # no caption ties them: two charts


def test_small_drawings_keep_fewer_curve_samples():
    # A marker-sized circle is sampled coarsely (its shape spans a few pixels), a wedge-sized one
    # finely enough to fit its arc; both keep their true extent. PyMuPDF draws circles as 4 Beziers.
    doc = pymupdf.open()
    page = doc.new_page(width=300, height=300)
    page.draw_circle((50, 50), 3, color=None, fill=(0.2, 0.4, 0.7))
    page.draw_circle((180, 180), 60, color=None, fill=(0.8, 0.4, 0.1))
    evidence = vector_evidence(page, page.rect, 150 / 72)
    small, large = sorted(evidence.paths, key=lambda p: p.bbox[2] - p.bbox[0])
    assert len(small.points) <= 9 < 30 <= len(large.points)
    assert small.bbox[2] - small.bbox[0] == pytest.approx(6 * 150 / 72, abs=0.5)
