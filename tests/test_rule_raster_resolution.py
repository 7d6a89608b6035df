"""raster-resolution: effective ppi at print size (common practice for print: 150 / 300 ppi)."""

from __future__ import annotations

import pytest

from corpusaudit.checks.runner import check_figure
from corpusaudit.config import ConfigError, build_config
from corpusaudit.extract import ExtractConfig, extract_document
from corpusaudit.extract.pdf import effective_ppi
from corpusaudit.measure import Measurements
from corpusaudit.model import Document, Figure
from tests.conftest import pdf_with_rasters


def _figure(ppi: float | None, source: str = "raster") -> Figure:
    return Figure(figure_id="f", document_id="d", path="p.pdf", page=1, index=0, bbox=(0, 0, 10, 10),
                  source=source, effective_ppi=ppi)


def _run(figure: Figure, data: dict | None = None):
    config = build_config(data or {})
    results, unmeasured = check_figure(figure, config, Measurements(figure), strict=True)
    mine = "raster-resolution"
    return ([(r.rule, r.severity, r.draft.value, r.draft.threshold) for r in results if r.rule == mine],
            [rule for rule in unmeasured if rule == mine])


@pytest.mark.parametrize("ppi, expected", [
    (72, [("raster-resolution", "warning", "72", "150")]),
    (149.4, [("raster-resolution", "warning", "149", "150")]),
    (150, [("raster-resolution", "info", "150", "300")]),
    (299, [("raster-resolution", "info", "299", "300")]),
    (300, []),
    (600, []),
])
def test_thresholds(ppi, expected):
    assert _run(_figure(ppi))[0] == expected


def test_vector_figures_are_not_judged():
    assert _run(_figure(None, source="vector")) == ([], [])


def test_raster_without_ppi_is_unmeasured():
    assert _run(_figure(None)) == ([], ["raster-resolution"])


def test_config_overrides_thresholds_and_severity():
    data = {"rules": {"raster-resolution": {"warn_below_ppi": 250, "severity": "error"}}}
    assert _run(_figure(200), data)[0] == [("raster-resolution", "error", "200", "250")]
    assert _run(_figure(200), {"rules": {"raster-resolution": {"enabled": False}}})[0] == []


def test_config_typos_are_errors():
    with pytest.raises(ConfigError, match="warn_below_pp"):
        build_config({"rules": {"raster-resolution": {"warn_below_pp": 100}}})
    with pytest.raises(ConfigError, match="raster-resolutoin"):
        build_config({"rules": {"raster-resolutoin": {}}})
    with pytest.raises(ConfigError, match="dpii"):
        build_config({"extract": {"dpii": 100}})


def test_effective_ppi_from_the_placement_matrix():
    # A 600 px wide image drawn 2 inches (144 pt) wide is 300 ppi; rotation does not change it.
    assert effective_ppi(600, 300, (144, 0, 0, 72, 0, 0)) == pytest.approx(300)
    assert effective_ppi(600, 300, (0, 144, -72, 0, 0, 0)) == pytest.approx(300)
    assert effective_ppi(600, 300, (144, 0, 0, 144, 0, 0)) == pytest.approx(150)  # stretched: lower axis


def test_extracted_pdf_rasters_measure_their_ppi(tmp_path):
    path = pdf_with_rasters(tmp_path / "r.pdf", [100, 300])
    doc = Document(document_id="d", path=str(path), sha256="", bytes=0, kind="pdf", local_path=str(path))
    figures = extract_document(doc, ExtractConfig()).figures
    assert [round(f.effective_ppi) for f in figures] == [100, 300]
    verdicts = [_run(f)[0] for f in figures]
    assert verdicts == [[("raster-resolution", "warning", "100", "150")], []]
