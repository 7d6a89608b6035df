"""End to end: the output contract of design.md (files, column names and types, statuses)."""

from __future__ import annotations

import csv
import json
import sqlite3

import pytest

from corpusaudit.cli import main
from corpusaudit.rows import DOCUMENT_COLUMNS, FIGURE_COLUMNS, FINDING_COLUMNS
from tests.conftest import pdf_with_rasters, png_bytes


def _read(path):
    with path.open(newline="", encoding="utf-8") as handle:
        reader = csv.DictReader(handle)
        return reader.fieldnames, list(reader)


@pytest.fixture
def corpus(tmp_path):
    root = tmp_path / "corpus"
    root.mkdir()
    pdf_with_rasters(root / "annual.pdf", [72, 200, 400])
    (root / "loose.png").write_bytes(png_bytes(120, 80))
    (root / "empty.pdf").write_bytes(b"")
    (root / "truncated.pdf").write_bytes((root / "annual.pdf").read_bytes()[:400])
    return root


def test_audit_writes_every_contract_file(corpus, tmp_path):
    out = tmp_path / "out"
    assert main(["audit", str(corpus), "--out", str(out), "--quiet"]) == 0
    for name in ("documents.csv", "figures.csv", "findings.csv", "report.html", "audit.sqlite"):
        assert (out / name).is_file(), name

    columns, documents = _read(out / "documents.csv")
    assert columns == list(DOCUMENT_COLUMNS)
    assert len(documents) == 4  # every input file exactly once
    status = {row["path"].rsplit("/", 1)[-1]: row for row in documents}
    assert status["annual.pdf"]["status"] == "ok" and status["annual.pdf"]["pages"] == "3"
    assert status["empty.pdf"]["status"] == "error"
    assert status["truncated.pdf"]["status"] == "error" and status["truncated.pdf"]["error"]

    columns, figures = _read(out / "figures.csv")
    assert columns == list(FIGURE_COLUMNS)
    raster = [f for f in figures if f["source"] == "raster"]
    assert sorted(float(f["effective_ppi"]) for f in raster) == [72.0, 200.0, 400.0]
    for row in figures:
        assert int(row["page"]) >= 1 and int(row["index"]) >= 0
        x0, y0, x1, y1 = (float(row[k]) for k in ("x0", "y0", "x1", "y1"))
        assert x1 > x0 and y1 > y0
        assert row["source"] in {"raster", "vector", "scan", "image"}
        assert (out / row["thumbnail"]).is_file()
    image = next(f for f in figures if f["source"] == "image")
    assert (image["page"], image["x1"], image["y1"], image["effective_ppi"]) == ("1", "120.0", "80.0", "")

    columns, findings = _read(out / "findings.csv")
    assert columns == list(FINDING_COLUMNS)
    resolution = sorted((f["severity"], f["value"]) for f in findings if f["rule"] == "raster-resolution")
    assert resolution == [("info", "200"), ("warning", "72")]
    for row in findings:
        assert row["severity"] in {"error", "warning", "info"}

    data = json.loads((out / "audit.json").read_text(encoding="utf-8"))
    assert data["schema_version"] == 1
    assert [list(row) for row in data["documents"][:1]] == [list(DOCUMENT_COLUMNS)]
    assert len(data["figures"]) == len(figures) and len(data["findings"]) == len(findings)

    with sqlite3.connect(out / "audit.sqlite") as conn:
        assert conn.execute("SELECT version FROM schema_version").fetchone()[0] >= 1
        assert conn.execute("SELECT count(*) FROM documents").fetchone()[0] == 4


def test_fail_on_sets_exit_code(corpus, tmp_path):
    assert main(["audit", str(corpus), "--out", str(tmp_path / "o1"), "--quiet", "--fail-on", "warning"]) == 1
    assert main(["audit", str(corpus), "--out", str(tmp_path / "o2"), "--quiet", "--fail-on", "error"]) == 0


def test_no_input_is_a_usage_error(tmp_path):
    assert main(["audit", str(tmp_path / "missing"), "--out", str(tmp_path / "o")]) == 2


def test_second_run_reuses_the_store(corpus, tmp_path, capsys):
    out = tmp_path / "out"
    main(["audit", str(corpus), "--out", str(out)])
    first = (out / "findings.csv").read_text()
    main(["audit", str(corpus), "--out", str(out)])
    assert "reused from cache: 2" in capsys.readouterr().err
    assert (out / "findings.csv").read_text() == first


def test_manifest_columns_follow_the_contract(corpus, tmp_path):
    manifest = tmp_path / "manifest.csv"
    manifest.write_text("path,department,year\nannual.pdf,Hydrology,2025\n")
    out = tmp_path / "out"
    main(["audit", str(corpus), "--out", str(out), "--manifest", str(manifest), "--quiet"])
    columns, documents = _read(out / "documents.csv")
    assert columns == list(DOCUMENT_COLUMNS) + ["department", "year"]
    annual = next(d for d in documents if d["path"].endswith("annual.pdf"))
    assert (annual["department"], annual["year"]) == ("Hydrology", "2025")


def test_hostile_file_name_is_escaped_in_html(tmp_path):
    root = tmp_path / "in"
    root.mkdir()
    hostile = '<img src=x onerror=alert(1)>&"q\'.png'
    (root / hostile).write_bytes(png_bytes(60, 40))
    out = tmp_path / "out"
    main(["audit", str(root), "--out", str(out), "--quiet"])
    html = (out / "report.html").read_text(encoding="utf-8")
    assert "<img src=x" not in html
    assert "&lt;img src=x onerror=alert(1)&gt;" in html or "\\u003cimg src=x" in html


def test_vector_wedges_decide_pie_whatever_the_pixels_suggest():
    """A matplotlib pie read as vector evidence is labelled pie by its geometry (classified_by vector)."""
    import io

    import matplotlib
    matplotlib.use("Agg")
    from matplotlib.figure import Figure as PlotFigure

    from corpusaudit.classify import Prediction
    from corpusaudit.config import build_config
    from corpusaudit.extract.vector_evidence import figure_from_chart_pdf
    from corpusaudit.measure import Measurements
    from corpusaudit.run import _classify

    plot = PlotFigure(figsize=(4, 3))
    plot.subplots().pie([40, 30, 20, 10])
    buffer = io.BytesIO()
    plot.savefig(buffer, format="pdf")
    figure = figure_from_chart_pdf(buffer.getvalue(), "pie-1")

    wrong = Prediction("scatter", 0.4, (("scatter", 0.4), ("pie", 0.3), ("map", 0.1)))
    _classify(figure, wrong, build_config({}), Measurements(figure))
    assert (figure.chart_type, figure.classified_by, figure.low_confidence) == ("pie", "vector", False)

    bars = PlotFigure(figsize=(4, 3))
    bars.subplots().bar(["a", "b"], [3, 4])
    buffer = io.BytesIO()
    bars.savefig(buffer, format="pdf")
    figure = figure_from_chart_pdf(buffer.getvalue(), "bar-1")
    _classify(figure, wrong, build_config({}), Measurements(figure))
    assert (figure.chart_type, figure.classified_by) == ("scatter", "model")
