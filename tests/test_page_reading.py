"""Reading a page's text and image placements from its display list gives what PyMuPDF's own
page methods give (the reference here is PyMuPDF itself: Page.get_image_info(xrefs=True) and
Page.get_text("dict")), on the plain path and on each path that falls back to them."""

from __future__ import annotations

import zlib

import pymupdf
import pytest

from corpusaudit.extract import ExtractConfig
from corpusaudit.extract.pdf import extract_pdf
from corpusaudit.extract.raster import image_infos
from corpusaudit.extract.vector_evidence import TEXT_FLAGS, read_text
from corpusaudit.model import Document
from tests.conftest import pdf_with_rasters, png_bytes


def _without_digests(infos: list[dict]) -> list[dict]:
    return [{key: value for key, value in info.items() if key != "digest"} for info in infos]


def _reference(path, number: int = 0) -> list[dict]:
    with pymupdf.open(path) as doc:  # a fresh document: PyMuPDF caches image info on the page
        return _without_digests(doc[number].get_image_info(xrefs=True))


def _ours(path, number: int = 0) -> list[dict]:
    with pymupdf.open(path) as doc:
        page = doc[number]
        return _without_digests(image_infos(doc, page, page.get_displaylist()))


def _save(doc: pymupdf.Document, path) -> str:
    doc.save(path)
    doc.close()
    return str(path)


def test_images_of_distinct_sizes_one_placed_twice(tmp_path):
    doc = pymupdf.open()
    page = doc.new_page()
    xref = page.insert_image(pymupdf.Rect(50, 50, 250, 200), stream=png_bytes(120, 90, seed=1))
    page.insert_image(pymupdf.Rect(300, 50, 400, 125), xref=xref)
    page.insert_image(pymupdf.Rect(50, 300, 200, 450), stream=png_bytes(64, 64, seed=2))
    path = _save(doc, tmp_path / "distinct.pdf")
    ours = _ours(path)
    assert len(ours) == 3 and len({info["xref"] for info in ours}) == 2
    assert ours == _reference(path)


def test_two_images_of_one_size_are_told_apart_by_their_pixels(tmp_path):
    doc = pymupdf.open()
    page = doc.new_page()
    page.insert_image(pymupdf.Rect(50, 50, 250, 200), stream=png_bytes(80, 60, seed=3))
    page.insert_image(pymupdf.Rect(300, 50, 500, 200), stream=png_bytes(80, 60, seed=4))
    path = _save(doc, tmp_path / "same-size.pdf")
    ours = _ours(path)
    assert len({info["xref"] for info in ours}) == 2
    assert ours == _reference(path)


def test_an_inline_image_beside_an_image_of_its_size_keeps_xref_0(tmp_path):
    doc = pymupdf.open()
    page = doc.new_page()
    page.insert_image(pymupdf.Rect(50, 50, 250, 200), stream=png_bytes(4, 4, seed=5))
    inline = b"q 100 0 0 100 300 400 cm BI /W 4 /H 4 /CS /G /BPC 8 /F /Fl ID " + \
        zlib.compress(bytes(range(0, 256, 16))) + b" EI Q"
    contents = page.get_contents()[0]
    doc.update_stream(contents, doc.xref_stream(contents) + b"\n" + inline)
    path = _save(doc, tmp_path / "inline.pdf")
    ours = _ours(path)
    assert sorted(info["xref"] for info in ours)[0] == 0 and len(ours) == 2
    assert ours == _reference(path)


@pytest.mark.parametrize("rotation", [0, 90])
def test_text_from_the_display_list_is_the_page_text(tmp_path, rotation):
    doc = pymupdf.open()
    page = doc.new_page()
    page.insert_text((72, 100), "Figure 2. Nets hauled per week, Lantern Bay 2024", fontsize=11)
    page.insert_text((300, 400), "Tonnes", fontsize=8, rotate=90)
    page.set_rotation(rotation)
    path = _save(doc, tmp_path / "text.pdf")
    with pymupdf.open(path) as doc:
        page = doc[0]
        assert read_text(page, page.get_displaylist()) == page.get_text("dict", flags=TEXT_FLAGS)


def test_a_truncated_file_is_an_error_not_a_blank_page(tmp_path):
    good = pdf_with_rasters(tmp_path / "good.pdf", [100])
    truncated = tmp_path / "truncated.pdf"
    truncated.write_bytes(good.read_bytes()[:500])
    doc = Document(document_id="t", path=str(truncated), sha256="", bytes=truncated.stat().st_size, kind="pdf",
                   local_path=str(truncated))
    with pytest.raises(Exception, match="damaged or truncated"):
        extract_pdf(doc, ExtractConfig())
