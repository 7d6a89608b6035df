"""Vector evidence and path grouping."""

from __future__ import annotations

import io

import pymupdf
import pytest
from matplotlib.figure import Figure as MplFigure

from corpusaudit.extract.regions import group_ink
from corpusaudit.extract.vector_evidence import vector_evidence
from tests.extract_fixtures import extract


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
