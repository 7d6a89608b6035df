"""Shared fixture builders: small PDFs and images generated in code with known truth."""

from __future__ import annotations

import io
from pathlib import Path

import numpy as np
import pymupdf
import pytest
from PIL import Image

from corpusaudit.checks.registry import all_rules
from corpusaudit.checks.runner import check_figure
from corpusaudit.config import build_config
from corpusaudit.measure import Measurements


def png_bytes(width: int, height: int, seed: int = 0) -> bytes:
    rng = np.random.default_rng(seed)
    pixels = (rng.random((height, width, 3)) * 255).astype(np.uint8)
    buffer = io.BytesIO()
    Image.fromarray(pixels).save(buffer, "PNG")
    return buffer.getvalue()


def pdf_with_rasters(path: Path, ppis: list[int], caption: bool = True) -> Path:
    """One page per ppi, each with a 4 x 3 inch image placed at exactly that effective ppi."""
    doc = pymupdf.open()
    for number, ppi in enumerate(ppis):
        page = doc.new_page()
        rect = pymupdf.Rect(72, 72, 72 + 4 * 72, 72 + 3 * 72)
        page.insert_image(rect, stream=png_bytes(4 * ppi, 3 * ppi, seed=number))
        if caption:
            page.insert_text((72, rect.y1 + 16), f"Figure {number + 1}. Catch per station at {ppi} ppi.", fontsize=10)
    doc.save(path)
    doc.close()
    return path


@pytest.fixture
def make_pdf(tmp_path):
    def build(name: str, ppis: list[int], caption: bool = True) -> Path:
        return pdf_with_rasters(tmp_path / name, ppis, caption)
    return build


def only(rule: str, data: dict | None = None):
    """The default configuration (overridden by data) with every other rule switched off: fast."""
    data = data or {}
    tables = {other.id: {"enabled": False} for other in all_rules() if other.id != rule}
    return build_config({**data, "rules": {**tables, **data.get("rules", {})}})


def run_rule(figure, rule: str, data: dict | None = None):
    """The rule's results on the figure, and whether it was unmeasured."""
    results, unmeasured = check_figure(figure, only(rule, data), Measurements(figure), strict=True)
    return [r for r in results if r.rule == rule], rule in unmeasured


def write_page_thumbnails(source, out_dir: Path, document_id: str, pages=None) -> list[Path]:
    """What run.py does with a PDF's page views: write the document-view files under out_dir;
    the PNG paths. pages: the pages that hold figures (default all)."""
    import pymupdf

    from corpusaudit.extract.pdf import render_page_view
    from corpusaudit.report.annotate import PAGE_THUMBNAIL_PX, page_thumbnail_files
    from corpusaudit.run import _png

    with pymupdf.open(source) as pdf:
        sizes = {i + 1: (round(p.rect.width, 2), round(p.rect.height, 2)) for i, p in enumerate(pdf)}
        wanted = sorted(pages) if pages is not None else sorted(sizes)
        thumbnails = {n: _png(render_page_view(pdf[n - 1].get_displaylist(), PAGE_THUMBNAIL_PX), PAGE_THUMBNAIL_PX)
                      for n in wanted if n in sizes}
    written = []
    for relative, data in page_thumbnail_files(document_id, thumbnails, sizes).items():
        path = out_dir / relative
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_bytes(data)
        if path.suffix == ".png":
            written.append(path)
    return written
