"""The sample corpus generator: reproducible bytes, truth that matches what PyMuPDF reads back.

Placement truth is checked against PyMuPDF's own reading of the written PDFs (image
placements, drawings, text spans); palette truth against colour-science's colour-vision
deficiency simulation; contrast truth against WCAG 2.x reference values.
"""

from __future__ import annotations

import csv
import itertools
import json
import warnings
from pathlib import Path

import numpy as np
import pymupdf
import pytest
from matplotlib.colors import to_rgb
from PIL import Image

from corpusaudit.democorpus import scenario
from corpusaudit.democorpus.build import TRUNCATED_NAME, build_corpus, build_sample_corpus
from corpusaudit.democorpus.charts import (
    OKABE_ITO,
    RED_GREEN,
    ChartSpec,
    draw,
    encode_raster,
    expected_rules,
    render_rgba,
    save_pdf,
    wcag_contrast,
)
from corpusaudit.model import CHART_TYPES

COMMITTED = Path(__file__).resolve().parents[1] / "sample_corpus"

pymupdf.TOOLS.mupdf_display_errors(False)


@pytest.fixture(scope="module")
def built(tmp_path_factory) -> Path:
    return build_sample_corpus(tmp_path_factory.mktemp("sample") / "sample_corpus")


@pytest.fixture(scope="module")
def truth(built) -> dict:
    return json.loads(built.read_text(encoding="utf-8"))


def _pdf_figures(truth: dict):
    for doc in truth["documents"]:
        if doc["kind"] == "pdf":
            for fig in doc["figures"]:
                yield doc, fig


def _iou(a, b) -> float:
    ix = max(0.0, min(a[2], b[2]) - max(a[0], b[0]))
    iy = max(0.0, min(a[3], b[3]) - max(a[1], b[1]))
    inter = ix * iy
    union = (a[2] - a[0]) * (a[3] - a[1]) + (b[2] - b[0]) * (b[3] - b[1]) - inter
    return inter / union if union else 0.0


def _inside(inner, outer, tol: float = 0.5) -> bool:
    return (inner[0] >= outer[0] - tol and inner[1] >= outer[1] - tol
            and inner[2] <= outer[2] + tol and inner[3] <= outer[3] + tol)


# ----------------------------------------------------------------------------- reproducibility


def test_partial_rebuild_is_byte_identical(built, truth, tmp_path):
    names = ["finance-accounts-2023.pdf", "director-review-2023.pdf", "figures/harbour-photo.jpg", TRUNCATED_NAME]
    again = build_sample_corpus(tmp_path / "again", documents=names)
    for name in names:
        assert (tmp_path / "again" / name).read_bytes() == (built.parent / name).read_bytes(), name
    partial = {d["path"]: d for d in json.loads(again.read_text(encoding="utf-8"))["documents"]}
    assert partial == {d["path"]: d for d in truth["documents"] if d["path"] in names}


@pytest.mark.parametrize("spec", [scenario.STACK_6, scenario.MAP_RAINBOW, scenario.PIE_GOOD_ALPHA])
def test_fresh_renders_are_byte_identical(spec):
    # the corpus builds share one render cache, so check two fresh drawings here
    first, second = draw(spec), draw(spec)
    assert save_pdf(first) == save_pdf(second)
    assert b"CreationDate" not in save_pdf(first)
    pixels = render_rgba(first, 72), render_rgba(second, 72)
    for fmt in ("png", "jpeg", "png-alpha"):
        assert encode_raster(pixels[0], fmt, 72) == encode_raster(pixels[1], fmt, 72)


def test_written_pdfs_carry_fixed_metadata_and_no_random_id(built, truth):
    for doc in truth["documents"]:
        if doc["kind"] == "pdf" and doc["expect_status"] == "ok":
            with pymupdf.open(built.parent / doc["path"]) as pdf:
                assert pdf.xref_get_key(-1, "ID")[0] == "null", doc["path"]
                assert pdf.metadata["creationDate"] == "D:20240301120000Z"


def test_benchmark_corpus_is_byte_identical_and_seeded(tmp_path):
    first = build_corpus(tmp_path / "a", 3, seed=7)
    second = build_corpus(tmp_path / "b", 3, seed=7)
    other = build_corpus(tmp_path / "c", 3, seed=8)
    files = sorted(p.name for p in first.parent.iterdir())
    assert files == sorted(p.name for p in second.parent.iterdir())
    assert len([f for f in files if f.endswith(".pdf")]) == 3
    for name in files:
        assert (first.parent / name).read_bytes() == (second.parent / name).read_bytes(), name
    assert first.read_bytes() != other.read_bytes()


def test_committed_corpus_matches_a_fresh_build(built):
    assert json.loads((COMMITTED / "truth.json").read_text(encoding="utf-8")) == \
        json.loads(built.read_text(encoding="utf-8")), "regenerate: python -m corpusaudit.democorpus sample_corpus"
    assert (COMMITTED / "manifest.csv").read_text(encoding="utf-8") == \
        (built.parent / "manifest.csv").read_text(encoding="utf-8")


def test_committed_corpus_is_small():
    total = sum(p.stat().st_size for p in COMMITTED.rglob("*") if p.is_file())
    assert 0 < total < 5 * 1024 * 1024


def test_manifest_lists_every_truth_document(built, truth):
    with open(built.parent / "manifest.csv", newline="", encoding="utf-8") as fh:
        rows = list(csv.DictReader(fh))
    assert [r["path"] for r in rows] == [d["path"] for d in truth["documents"]]
    assert all((built.parent / r["path"]).is_file() and r["department"] and r["year"].isdigit() for r in rows)


# ----------------------------------------------------------------------------- coverage


def test_every_chart_type_appears_as_vector_and_as_raster(truth):
    seen = {(f["chart_type"], f["source"]) for _, f in _pdf_figures(truth)}
    for chart_type in CHART_TYPES:
        assert (chart_type, "vector") in seen, chart_type
        assert (chart_type, "raster") in seen, chart_type


def test_corpus_mixes_breaches_good_practice_and_missing_captions(truth):
    figures = [f for d in truth["documents"] for f in d["figures"]]
    assert sum(1 for f in figures if not f["expected_rules"]) >= 5
    assert sum(1 for f in figures if "caption-missing" in f["expected_rules"]) >= 4
    statuses = {d["path"]: d["expect_status"] for d in truth["documents"]}
    assert statuses.pop(TRUNCATED_NAME) == "error" and set(statuses.values()) == {"ok"}


# ----------------------------------------------------------------------------- truth vs PyMuPDF


def test_figure_boxes_lie_inside_their_pages(built, truth):
    for doc in truth["documents"]:
        path = built.parent / doc["path"]
        if doc["kind"] != "pdf":
            with Image.open(path) as image:
                assert doc["figures"][0]["bbox"] == [0, 0, image.width, image.height]
            continue
        if doc["expect_status"] == "error":
            continue
        with pymupdf.open(path) as pdf:
            assert pdf.page_count == doc["pages"]
            for fig in doc["figures"]:
                page_rect = tuple(pdf[fig["page"] - 1].rect)
                assert _inside(fig["bbox"], page_rect, tol=0.0), (doc["path"], fig["bbox"])


def test_raster_truth_matches_image_placements(built, truth):
    checked = 0
    for doc, fig in _pdf_figures(truth):
        if fig["source"] != "raster":
            continue
        with pymupdf.open(built.parent / doc["path"]) as pdf:
            infos = [i for i in pdf[fig["page"] - 1].get_image_info() if _iou(i["bbox"], fig["bbox"]) > 0
                     and _inside(i["bbox"], fig["bbox"])]
        assert len(infos) == fig["properties"]["tiles"], doc["path"]
        union = [min(i["bbox"][0] for i in infos), min(i["bbox"][1] for i in infos),
                 max(i["bbox"][2] for i in infos), max(i["bbox"][3] for i in infos)]
        assert _iou(union, fig["bbox"]) >= 0.9
        # effective ppi = pixels across / inches across, read from PyMuPDF's placement
        ppi = infos[0]["width"] * 72.0 / (infos[0]["bbox"][2] - infos[0]["bbox"][0])
        assert ppi == pytest.approx(fig["properties"]["ppi"], abs=0.01)
        assert infos[0]["has-mask"] == fig["properties"]["alpha"]
        checked += 1
    assert checked >= 20


def test_vector_figures_are_drawings_not_images(built, truth):
    checked = 0
    for doc in truth["documents"]:
        vector = [f for f in doc["figures"] if f["source"] == "vector"]
        if not vector:
            continue
        with pymupdf.open(built.parent / doc["path"]) as pdf:
            pages = {n: (pdf[n - 1].get_drawings(), pdf[n - 1].get_image_info()) for n in {f["page"] for f in vector}}
        for fig in vector:
            drawings, placements = pages[fig["page"]]
            inside = [d for d in drawings if _inside(tuple(d["rect"]), fig["bbox"])]
            assert len(inside) >= 5, (doc["path"], fig["chart_type"])
            assert not [i for i in placements if _iou(i["bbox"], fig["bbox"]) > 0], doc["path"]
            checked += 1
    assert checked >= 25


def test_vector_text_sizes_and_colours_match_truth(built, truth):
    for doc, fig in _pdf_figures(truth):
        if fig["source"] != "vector":
            continue
        with pymupdf.open(built.parent / doc["path"]) as pdf:
            spans = [s for block in pdf[fig["page"] - 1].get_text("dict", clip=fig["bbox"])["blocks"]
                     for line in block.get("lines", ()) for s in line["spans"] if s["text"].strip()]
        assert spans, doc["path"]
        assert min(s["size"] for s in spans) == pytest.approx(fig["properties"]["min_text_pt"], abs=0.05)
        colours = {f"#{s['color']:06X}" for s in spans}
        worst = min(wcag_contrast(c) for c in colours)
        assert worst == pytest.approx(fig["properties"]["text_contrast"], abs=0.01)
        assert ("text-contrast" in fig["expected_rules"]) == (worst < 4.5)


def test_captions_sit_below_their_figures(built, truth):
    for doc, fig in _pdf_figures(truth):
        x0, _, x1, y1 = fig["bbox"]
        with pymupdf.open(built.parent / doc["path"]) as pdf:
            below = pdf[fig["page"] - 1].get_text("text", clip=(x0, y1, x1, y1 + 30))
        text = " ".join(below.split())
        if fig["caption"]:
            assert text.startswith(fig["caption"]), (doc["path"], text)
        else:
            assert not text.startswith("Figure"), (doc["path"], text)


def test_truncated_deposit_has_no_readable_page(built):
    path = built.parent / TRUNCATED_NAME
    try:
        with pymupdf.open(path) as pdf:
            pages = pdf.page_count
    except (pymupdf.FileDataError, RuntimeError):
        pages = 0
    assert pages == 0
    assert path.read_bytes().startswith(b"%PDF-")


# ----------------------------------------------------------------------------- chart truth


def _cvd_min_delta_e(hexes, deficiency: str | None) -> float:
    colour = pytest.importorskip("colour")
    rgb = np.array([to_rgb(h) for h in hexes])
    if deficiency:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            matrix = colour.blindness.matrix_cvd_Machado2009(deficiency, 1.0)
        rgb = np.clip(colour.cctf_encoding(np.clip(colour.cctf_decoding(rgb) @ matrix.T, 0, 1)), 0, 1)
    lab = colour.XYZ_to_Lab(colour.sRGB_to_XYZ(rgb))
    return min(float(colour.delta_E(lab[i], lab[j], method="CIE 2000"))
               for i, j in itertools.combinations(range(len(hexes)), 2))


def test_palettes_behave_as_labelled_under_cvd_simulation():
    # Machado, Oliveira & Fernandes (2009) severity 1.0 via colour-science; CIEDE2000 distances.
    # Common practice: below ~5 two colours read as the same, above ~10 they are told apart.
    for deficiency in ("Protanomaly", "Deuteranomaly"):
        assert _cvd_min_delta_e(OKABE_ITO, deficiency) > 10
    assert _cvd_min_delta_e(RED_GREEN, "Deuteranomaly") < 5
    assert _cvd_min_delta_e(RED_GREEN, None) > 20  # distinct to readers with normal colour vision


def test_wcag_contrast_reference_values():
    # WCAG 2.x contrast ratio: black on white is 21:1 by definition; #767676 on white is
    # 4.54:1 and #777777 4.48:1 (the AA boundary greys quoted by WebAIM's contrast checker).
    assert wcag_contrast("#000000") == pytest.approx(21.0)
    assert wcag_contrast("#767676") == pytest.approx(4.54, abs=0.01)
    assert wcag_contrast("#777777") == pytest.approx(4.48, abs=0.01)
    assert wcag_contrast("#FFFFFF") == pytest.approx(1.0)


@pytest.mark.parametrize("spec, rule, present", [
    # design.md defaults: more than 5 slices, more than 4 segments, more than 5 series, 30 degrees
    (ChartSpec("pie", series=((28, 22, 18, 14, 10, 6, 2),), categories=tuple("abcdefg")), "pie-slice-count", True),
    (ChartSpec("pie", series=((45, 30, 15, 10),), categories=tuple("abcd")), "pie-slice-count", False),
    (ChartSpec("pie", series=((15, 30, 45, 10),), categories=tuple("abcd")), "pie-order", True),
    (ChartSpec("pie", series=((22, 21, 20, 19, 18),), categories=tuple("abcde")), "pie-similar-slices", True),
    (ChartSpec("pie", series=((45, 30, 15, 10),), categories=tuple("abcd"), percent_labels=True,
               percent_offset=5), "pie-total", True),
    (ChartSpec("pie", series=((45, 30, 15, 10),), categories=tuple("abcd"), percent_labels=True), "pie-total", False),
    (scenario.BAR_TRUNCATED, "bar-baseline", True),
    (scenario.BAR_GOOD, "bar-baseline", False),
    (scenario.BAR_UNSORTED, "bar-order", True),
    (scenario.BAR_GOOD, "bar-order", False),
    (scenario.BAR_ROTATED, "tick-label-rotation", True),
    (scenario.STACK_6, "bar-stack-depth", True),
    (scenario.STACK_3_FINANCE, "bar-stack-depth", False),
    (scenario.LINE_8_SERIES, "line-series-count", True),
    (scenario.LINE_GOOD, "line-series-count", False),
    (scenario.LINE_GOOD, "line-direct-labels", False),
    (scenario.LINE_UNEVEN, "line-uneven-axis", True),
    (scenario.LINE_GAPS, "line-marker-gaps", True),
    (scenario.LINE_ON_CATEGORIES, "line-on-categories", True),
    (scenario.SCATTER_DENSE, "scatter-overplotting", True),
    (scenario.SCATTER_GOOD, "scatter-overplotting", False),
    (scenario.SCATTER_CLIPPED, "scatter-edge-points", True),
    (scenario.BOX_UNSORTED, "box-order", True),
    (scenario.BOX_AGES, "box-order", False),
    (scenario.HEATMAP_JET, "colormap-rainbow", True),
    (scenario.HEATMAP_GOOD, "colormap-rainbow", False),
    (scenario.BAR_RED_GREEN, "palette-cvd", True),
    (scenario.LINE_TINY_TICKS, "text-size", True),
    (scenario.BAR_LIGHT_TEXT, "text-contrast", True),
    (scenario.PIE_3D, "chart-3d", True),
    (scenario.BAR_3D, "chart-3d", True),
    (scenario.AREA_INCOME, "area-stacked", True),
])
def test_expected_rules_follow_the_spec(spec, rule, present):
    assert (rule in expected_rules(spec)) == present


def test_text_size_scales_with_the_placement():
    assert "text-size" not in expected_rules(scenario.BAR_GOOD, scale=1.0)  # 8 pt ticks
    assert "text-size" in expected_rules(scenario.BAR_GOOD, scale=0.7)  # 5.6 pt at print size


@pytest.mark.parametrize("spec", [
    ChartSpec("pie", series=((40, 37, 23),), categories=tuple("abc")),  # closest shares 3 pp apart
    ChartSpec("scatter", n_points=1000),
    ChartSpec("bar", series=((1, 2),), categories=("a", "b"), label_angle=30),
    ChartSpec("bar", series=((1, 2),), categories=("a", "b"), text_colour="#777777"),
])
def test_borderline_specs_are_refused(spec):
    with pytest.raises(ValueError):
        expected_rules(spec)


def test_drawing_is_deterministic_and_sized():
    spec = scenario.MAP_RECHARGE
    first, second = render_rgba(draw(spec), 60), render_rgba(draw(spec), 60)
    assert first.shape == (round(spec.size_in[1] * 60), round(spec.size_in[0] * 60), 4)
    assert np.array_equal(first, second)
