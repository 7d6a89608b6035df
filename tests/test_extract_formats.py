"""Image encodings (JPEG 2000, JBIG2) and page rotations of 180 and 270 degrees."""

from __future__ import annotations

import io
import struct

import numpy as np
import pymupdf
import pytest
from PIL import Image

from tests.extract_fixtures import extract, iou, place_chart

RED, BLUE = (220, 20, 20), (40, 120, 200)


def _save(doc: pymupdf.Document, path):
    doc.save(path)
    doc.close()
    return path


def _marked_pixels(width: int = 200, height: int = 150) -> np.ndarray:
    """Blue picture with a red top-left quadrant, to see where the image's corner went."""
    pixels = np.full((height, width, 3), BLUE, np.uint8)
    pixels[: height // 2, : width // 2] = RED
    return pixels


def _red_corner(pixels: np.ndarray) -> str:
    h, w = pixels.shape[:2]
    corners = {"top-left": pixels[: h // 4, : w // 4], "top-right": pixels[: h // 4, -w // 4:],
               "bottom-left": pixels[-h // 4:, : w // 4], "bottom-right": pixels[-h // 4:, -w // 4:]}
    (red,) = [name for name, patch in corners.items() if np.abs(patch.mean(axis=(0, 1)) - RED).max() < 40]
    return red


def test_jpeg_2000_image_is_decoded_to_rgb(tmp_path):
    buffer = io.BytesIO()
    Image.fromarray(_marked_pixels()).save(buffer, "JPEG2000")
    doc = pymupdf.open()
    doc.new_page().insert_image(pymupdf.Rect(72, 72, 272, 222), stream=buffer.getvalue(), keep_proportion=False)
    (figure,) = extract(_save(doc, tmp_path / "jpx.pdf")).figures
    assert figure.image_info["filter"] == "JPXDecode"  # embedded as JPEG 2000, not re-encoded
    assert figure.bbox == (72, 72, 272, 222)
    assert _red_corner(figure.pixels) == "top-left"
    # Reference: Pillow's own decoding of the same JPEG 2000 bytes.
    reference = np.asarray(Image.open(io.BytesIO(buffer.getvalue())).convert("RGB"))
    assert figure.native_pixels.shape == reference.shape  # the lossy image's own pixels, for the compression check
    assert np.abs(figure.native_pixels.astype(int) - reference).mean() < 3


def _jbig2_stream(black: np.ndarray) -> bytes:
    """An embedded JBIG2 stream (ITU-T T.88): a page information segment (type 48) and one immediate
    lossless generic region (type 39) coded with MMR, i.e. CCITT T.6, which Pillow's libtiff writes.

    Segment header (T.88 7.2): number (4 bytes), flags (type), referred-to count 0, page 1, data length.
    PDF 32000-1:2008 7.4.7: embedded streams carry no file header and no end-of-page segment."""
    height, width = black.shape
    # T.6 codes the runs of 0 bits as white; in a TIFF with MinIsBlack (what Pillow writes for mode 1)
    # bit 1 is the value 255, so black JBIG2 pixels (value 1) are written as 255.
    tiff = io.BytesIO()
    Image.fromarray(np.where(black, 255, 0).astype(np.uint8)).convert("1").save(tiff, "TIFF", compression="group4")
    with Image.open(io.BytesIO(tiff.getvalue())) as image:
        assert image.tag_v2[262] == 1 and len(image.tag_v2[273]) == 1  # MinIsBlack, one strip
        offset, length = image.tag_v2[273][0], image.tag_v2[279][0]
    mmr = tiff.getvalue()[offset:offset + length]

    def segment(number: int, kind: int, data: bytes) -> bytes:
        return struct.pack(">IBBBI", number, kind, 0, 1, len(data)) + data

    page_information = struct.pack(">IIIIBH", width, height, 0, 0, 0, 0)
    region = struct.pack(">IIIIB", width, height, 0, 0, 0) + bytes([1]) + mmr  # generic region flags: MMR
    return segment(0, 48, page_information) + segment(1, 39, region)


def test_jbig2_image_is_decoded(tmp_path):
    width, height = 160, 96
    black = np.zeros((height, width), bool)
    black[10:40, 10:70] = True
    black[60:90, 100:150] = True
    doc = pymupdf.open()
    page = doc.new_page(width=400, height=400)
    placeholder = io.BytesIO()
    Image.new("L", (width, height), 255).save(placeholder, "PNG")
    xref = page.insert_image(pymupdf.Rect(100, 100, 260, 196), stream=placeholder.getvalue())
    doc.update_object(xref, f"<< /Type /XObject /Subtype /Image /Width {width} /Height {height} "
                            f"/ColorSpace /DeviceGray /BitsPerComponent 1 >>")
    doc.update_stream(xref, _jbig2_stream(black), compress=False)
    doc.xref_set_key(xref, "Filter", "/JBIG2Decode")
    (figure,) = extract(_save(doc, tmp_path / "jbig2.pdf")).figures
    assert figure.image_info["filter"] == "JBIG2Decode"
    assert figure.bbox == (100, 100, 260, 196)
    scale = figure.pixels.shape[1] / width
    grey = figure.pixels.mean(axis=2)
    for (y, x), is_black in np.ndenumerate(black[::8, ::8]):
        y, x = int((y * 8 + 0.5) * scale), int((x * 8 + 0.5) * scale)
        assert (grey[y, x] < 64) == is_black, (y, x)


@pytest.mark.parametrize("rotation, corner", [(90, "top-right"), (180, "bottom-right"), (270, "bottom-left")])
def test_rotated_page_raster_box_and_pixels(tmp_path, rotation, corner):
    buffer = io.BytesIO()
    Image.fromarray(_marked_pixels()).save(buffer, "PNG")
    doc = pymupdf.open()
    page = doc.new_page(width=600, height=800)
    page.insert_image(pymupdf.Rect(100, 100, 300, 250), stream=buffer.getvalue(), keep_proportion=False)
    page.set_rotation(rotation)
    (figure,) = extract(_save(doc, tmp_path / f"r{rotation}.pdf")).figures
    # /Rotate turns the page clockwise on display (PDF 32000-1:2008, 7.7.3.3); with W = 600, H = 800:
    # 90: (x, y) -> (H - y, x); 180: (W - x, H - y); 270: (y, W - x)
    expected = {90: (800 - 250, 100, 800 - 100, 300), 180: (600 - 300, 800 - 250, 600 - 100, 800 - 100),
                270: (100, 600 - 300, 250, 600 - 100)}[rotation]
    assert figure.bbox == pytest.approx(expected)
    assert _red_corner(figure.pixels) == corner  # the image's top-left corner, turned clockwise


@pytest.mark.parametrize("rotation, angle", [(180, 180.0), (270, 90.0)])
def test_rotated_page_vector_figure_box_caption_and_text_angles(tmp_path, rotation, angle):
    doc = pymupdf.open()
    page = doc.new_page(width=600, height=800)
    rect = place_chart(page, 100, 120, 300)
    page.insert_text((100, rect.y1 + 14), "Figure 2. Catch by district, invented data.", fontsize=9)
    page.set_rotation(rotation)
    shown = tuple(rect * page.rotation_matrix)
    (figure,) = extract(_save(doc, tmp_path / f"v{rotation}.pdf")).figures
    assert iou(figure.bbox, shown) > 0.95
    assert figure.figure_number == "2"  # below the chart in the page's own reading frame
    ticks = [t for t in figure.vector.texts if t.text in ("north", "south", "east", "west")]
    assert len(ticks) == 4
    # horizontal labels turned clockwise by the page: 180 reads upside down, 270 reads upwards (counter-clockwise)
    assert all(abs((t.angle - angle + 180) % 360 - 180) < 0.5 for t in ticks)
    x0, y0, x1, y1 = figure.bbox
    assert figure.pixels.shape[:2] == pytest.approx(((y1 - y0) * 150 / 72, (x1 - x0) * 150 / 72), abs=2)
