"""Raster, vector and scanned figures from small generated PDFs with known boxes."""

from __future__ import annotations

import numpy as np
import pymupdf
import pytest
from PIL import Image

from tests.extract_fixtures import extract, image_bytes, iou, place_chart, ruled_table


def _save(doc: pymupdf.Document, path):
    doc.save(path)
    doc.close()
    return path


def test_rotated_page_box_and_pixels_are_as_displayed(tmp_path):
    doc = pymupdf.open()
    page = doc.new_page(width=600, height=800)
    page.insert_image(pymupdf.Rect(100, 100, 300, 250), stream=image_bytes(200, 150), keep_proportion=False)
    page.set_rotation(90)
    result = extract(_save(doc, tmp_path / "r.pdf"))
    (figure,) = result.figures
    # /Rotate 90 turns the page clockwise (PDF 32000-1:2008, 7.7.3.3): (x, y) -> (H - y, x), H = 800
    assert figure.bbox == pytest.approx((800 - 250, 100, 800 - 100, 300))
    assert figure.pixels.shape[0] > figure.pixels.shape[1]  # the landscape image shows upright-portrait
    assert figure.image_info["rotation"] == 0.0 and not figure.image_info["flipped"]


def test_cropped_page_boxes_start_at_the_cropbox(tmp_path):
    doc = pymupdf.open()
    page = doc.new_page(width=600, height=800)
    page.insert_image(pymupdf.Rect(100, 100, 300, 250), stream=image_bytes(200, 150), keep_proportion=False)
    page.set_cropbox(pymupdf.Rect(50, 60, 500, 700))
    (figure,) = extract(_save(doc, tmp_path / "c.pdf")).figures
    assert figure.bbox == pytest.approx((50, 40, 250, 190))


def test_abutting_tiles_are_one_figure(tmp_path):
    doc = pymupdf.open()
    page = doc.new_page()
    for row in range(2):
        for col in range(2):
            rect = pymupdf.Rect(100 + col * 100, 100 + row * 80, 200 + col * 100, 180 + row * 80)
            page.insert_image(rect, stream=image_bytes(100, 80, seed=row * 2 + col), keep_proportion=False)
    (figure,) = extract(_save(doc, tmp_path / "t.pdf")).figures
    assert figure.bbox == pytest.approx((100, 100, 300, 260))
    assert figure.image_info["pieces"] == 4
    # 100 px over 100 pt is 72 ppi
    assert figure.effective_ppi == pytest.approx(72.0)


def test_cmyk_jpeg_is_converted_to_rgb(tmp_path):
    data = image_bytes(120, 90, colour=(200, 30, 30), fmt="JPEG", mode="CMYK")
    doc = pymupdf.open()
    doc.new_page().insert_image(pymupdf.Rect(72, 72, 312, 252), stream=data, keep_proportion=False)
    (figure,) = extract(_save(doc, tmp_path / "k.pdf")).figures
    assert figure.pixels.dtype == np.uint8 and figure.pixels.shape[2] == 3
    assert "CMYK" in figure.image_info["colorspace"]
    # Reference: Pillow's own CMYK -> RGB conversion of the same JPEG says "mostly red".
    import io
    reference = np.asarray(Image.open(io.BytesIO(data)).convert("RGB"), float).mean(axis=(0, 1))
    measured = figure.pixels.reshape(-1, 3).mean(axis=0)
    assert reference[0] > reference[1] + 80 and measured[0] > measured[1] + 80
    assert abs(measured[0] - reference[0]) < 60  # colour management differs (ICC vs naive), not the hue


def test_soft_mask_is_composited_on_white(tmp_path):
    rgba = np.zeros((100, 100, 4), np.uint8)
    rgba[..., :3] = (10, 60, 180)
    rgba[..., 3] = 255
    rgba[:50, :, 3] = 0  # top half fully transparent
    import io
    buffer = io.BytesIO()
    Image.fromarray(rgba, "RGBA").save(buffer, "PNG")
    doc = pymupdf.open()
    doc.new_page().insert_image(pymupdf.Rect(72, 72, 272, 272), stream=buffer.getvalue())
    (figure,) = extract(_save(doc, tmp_path / "m.pdf")).figures
    assert figure.image_info["has_mask"]
    h = figure.pixels.shape[0]
    top, bottom = figure.pixels[: h // 3].mean(axis=(0, 1)), figure.pixels[-h // 3:].mean(axis=(0, 1))
    assert top == pytest.approx((255, 255, 255), abs=3)  # alpha 0 over white paper is white
    assert bottom == pytest.approx((10, 60, 180), abs=6)


def test_header_logo_repeated_on_every_page_is_skipped(tmp_path):
    doc = pymupdf.open()
    logo = None
    for number in range(4):
        page = doc.new_page()
        rect = pymupdf.Rect(50, 20, 150, 60)  # 100 x 40 pt: big enough to pass as a figure by size
        logo = page.insert_image(rect, stream=image_bytes(100, 40, colour=(200, 100, 20))) if logo is None \
            else page.insert_image(rect, xref=logo)
        if number == 1:
            page.insert_image(pymupdf.Rect(72, 200, 372, 400), stream=image_bytes(300, 200), keep_proportion=False)
    result = extract(_save(doc, tmp_path / "l.pdf"))
    assert [(f.page, f.bbox) for f in result.figures] == [(2, (72.0, 200.0, 372.0, 400.0))]
    assert result.decorations == 4


def test_tiny_icons_are_decorations(tmp_path):
    doc = pymupdf.open()
    page = doc.new_page()
    page.insert_image(pymupdf.Rect(72, 72, 84, 84), stream=image_bytes(12, 12))
    result = extract(_save(doc, tmp_path / "i.pdf"))
    assert result.figures == [] and result.decorations == 1


def test_table_rules_underlines_and_text_frames_are_not_figures(tmp_path):
    doc = pymupdf.open()
    page = doc.new_page()
    ruled_table(page, 72, 100)
    page.insert_text((72, 300), "An underlined line of body text", fontsize=10)
    page.draw_line((72, 302), (250, 302), width=0.6)
    page.draw_rect(pymupdf.Rect(70, 350, 400, 420), width=0.8)  # a frame around a text block
    page.insert_textbox(pymupdf.Rect(75, 355, 395, 415), "Boxed note text " * 8, fontsize=9)
    page.draw_line((36, 760), (576, 760), width=0.5)  # footer rule
    page.draw_rect(page.rect + (18, 18, -18, -18), width=1)  # page border
    result = extract(_save(doc, tmp_path / "tab.pdf"))
    assert result.figures == []


def test_image_drawn_twice_is_two_figures(tmp_path):
    doc = pymupdf.open()
    page = doc.new_page()
    xref = page.insert_image(pymupdf.Rect(72, 72, 272, 222), stream=image_bytes(200, 150), keep_proportion=False)
    page.insert_image(pymupdf.Rect(72, 300, 272, 450), xref=xref, keep_proportion=False)
    page.insert_text((72, 470), "Figure 2. The same picture again.", fontsize=9)
    figures = extract(_save(doc, tmp_path / "twice.pdf")).figures
    assert [f.bbox for f in figures] == [(72, 72, 272, 222), (72, 300, 272, 450)]
    assert [f.figure_number for f in figures] == ["", "2"]
    assert figures[0].image_info["xref"] == figures[1].image_info["xref"]


def test_vector_chart_found_with_caption_and_number(tmp_path):
    doc = pymupdf.open()
    page = doc.new_page()
    page.insert_text((72, 60), "Results of the regional survey are summarised below.", fontsize=10)
    rect = place_chart(page, 100, 80, 300)
    page.insert_text((100, rect.y1 + 14), "Figure 7. Catch per station, invented data.", fontsize=9)
    (figure,) = extract(_save(doc, tmp_path / "v.pdf")).figures
    assert figure.source == "vector"
    assert iou(figure.bbox, tuple(rect)) > 0.9
    assert (figure.figure_number, figure.caption) == ("7", "Figure 7. Catch per station, invented data.")
    texts = {t.text for t in figure.vector.texts}
    assert {"north", "south", "east", "west", "catch (t)"} <= texts
    x0, y0, x1, y1 = figure.bbox
    assert figure.pixels.shape[:2] == pytest.approx(((y1 - y0) * 150 / 72, (x1 - x0) * 150 / 72), abs=2)


def test_two_columns_each_figure_gets_its_own_caption(tmp_path):
    doc = pymupdf.open()
    page = doc.new_page()
    left = place_chart(page, 50, 80, 240)
    page.insert_text((50, left.y1 + 12), "Fig. 1: Left column chart.", fontsize=9)
    page.insert_image(pymupdf.Rect(320, 80, 560, 240), stream=image_bytes(480, 320), keep_proportion=False)
    page.insert_text((320, 252), "Fig. 2: Right column picture.", fontsize=9)
    for y in range(int(left.y1) + 40, 700, 14):
        page.insert_text((50, y), "column text " * 4, fontsize=9)
        page.insert_text((320, y), "column text " * 4, fontsize=9)
    figures = sorted(extract(_save(doc, tmp_path / "2col.pdf")).figures, key=lambda f: f.bbox[0])
    assert [(f.source, f.figure_number) for f in figures] == [("vector", "1"), ("raster", "2")]
    assert figures[1].caption == "Fig. 2: Right column picture."


def test_scanned_page_yields_the_figure_region(tmp_path):
    source = pymupdf.open()
    page = source.new_page()
    for y in range(72, 200, 14):
        page.insert_text((72, y), "scanned body text of the invented report " * 2, fontsize=10)
    rect = place_chart(page, 120, 230, 320)
    page.insert_text((72, rect.y1 + 30), "Figure 1. A chart that only exists as pixels.", fontsize=10)
    pix = page.get_pixmap(dpi=200)
    rng = np.random.default_rng(3)
    pixels = np.frombuffer(pix.samples, np.uint8).reshape(pix.height, pix.width, 3).astype(float)
    pixels = np.clip(pixels + rng.normal(0, 5, pixels.shape), 0, 255).astype(np.uint8)  # light noise
    import io
    buffer = io.BytesIO()
    Image.fromarray(pixels).save(buffer, "PNG")
    scan = pymupdf.open()
    scan.new_page(width=page.rect.width, height=page.rect.height).insert_image(page.rect, stream=buffer.getvalue())
    (figure,) = extract(_save(scan, tmp_path / "scan.pdf")).figures
    assert figure.source == "scan"
    assert iou(figure.bbox, tuple(rect)) > 0.8
    assert figure.effective_ppi == pytest.approx(200, abs=1)


def test_bad_page_is_recorded_and_other_pages_still_yield(tmp_path):
    doc = pymupdf.open()
    for _ in range(3):
        doc.new_page().insert_image(pymupdf.Rect(72, 72, 272, 222), stream=image_bytes(200, 150, seed=_),
                                    keep_proportion=False)
    bomb = doc[1].get_images()[0][0]
    doc.xref_set_key(bomb, "Width", "200000")  # declares 200000 x 150000 pixels
    doc.xref_set_key(bomb, "Height", "150000")
    result = extract(_save(doc, tmp_path / "bad.pdf"))
    assert [f.page for f in result.figures] == [1, 3]
    assert len(result.errors) == 1 and result.errors[0].startswith("page 2:")


def test_heatmap_with_vector_axes_is_one_raster_figure(tmp_path):
    import io
    from matplotlib.figure import Figure as MplFigure
    fig = MplFigure(figsize=(4, 3))
    ax = fig.add_subplot(111)
    fig.colorbar(ax.imshow(np.random.default_rng(1).random((12, 12))), ax=ax)
    ax.set_xlabel("week")
    buffer = io.BytesIO()
    fig.savefig(buffer, format="pdf", bbox_inches="tight", pad_inches=0.05)
    doc = pymupdf.open()
    page = doc.new_page()
    with pymupdf.open("pdf", buffer.getvalue()) as src:
        rect = pymupdf.Rect(100, 100, 100 + 300, 100 + 300 * src[0].rect.height / src[0].rect.width)
        page.show_pdf_page(rect, src, 0)
    (figure,) = extract(_save(doc, tmp_path / "heat.pdf")).figures
    assert figure.source == "raster" and iou(figure.bbox, tuple(rect)) > 0.9
    assert "week" in {t.text for t in figure.vector.texts}


def _two_pictures(tmp_path, name: str, first: tuple, second: tuple, caption_at: tuple | None, labels=()) -> list:
    doc = pymupdf.open()
    page = doc.new_page()
    page.insert_image(pymupdf.Rect(first), stream=image_bytes(200, 150, seed=1), keep_proportion=False)
    page.insert_image(pymupdf.Rect(second), stream=image_bytes(200, 150, seed=2), keep_proportion=False)
    for text, point in labels:
        page.insert_text(point, text, fontsize=9)
    if caption_at:
        page.insert_text(caption_at, "Figure 3. Two panels, invented data.", fontsize=9)
    return extract(_save(doc, tmp_path / name)).figures


def test_panels_on_one_grid_under_one_caption_are_one_figure(tmp_path):
    figures = _two_pictures(tmp_path, "row.pdf", (72, 100, 252, 235), (260, 100, 440, 235), (72, 250))
    assert [(f.bbox, f.figure_number, f.image_info["pieces"]) for f in figures] == [((72, 100, 440, 235), "3", 2)]


def test_stacked_figures_that_do_not_line_up_stay_two(tmp_path):
    # 10 pt apart, one above the other, different widths and no shared edge: two figures, the caption
    # belongs to the lower one only.
    figures = _two_pictures(tmp_path, "stack.pdf", (100, 100, 300, 230), (72, 240, 340, 380), (72, 395))
    assert [(f.bbox, f.figure_number) for f in figures] == [((100, 100, 300, 230), ""), ((72, 240, 340, 380), "3")]


def test_panels_labelled_a_and_b_may_sit_further_apart(tmp_path):
    first, second = (72, 100, 252, 235), (272, 110, 452, 245)  # 20 pt apart, not lined up
    figures = _two_pictures(tmp_path, "ab.pdf", first, second, (72, 262),
                            labels=(("(a)", (74, 96)), ("(b)", (274, 106))))
    assert [(f.figure_number, f.bbox[0], f.bbox[2]) for f in figures] == [("3", 72, 452)]
    unlabelled = _two_pictures(tmp_path, "no-ab.pdf", first, second, (72, 262))
    assert len(unlabelled) == 2
