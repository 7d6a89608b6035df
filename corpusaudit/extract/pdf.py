"""PDF pages: image placements as raster figures, with effective ppi and captions."""

from __future__ import annotations

import math
import re

import numpy as np
import pymupdf

from corpusaudit.extract import ExtractConfig, ExtractError, ExtractResult
from corpusaudit.extract.captions import TextBlock, find_caption
from corpusaudit.model import Document, Figure

pymupdf.TOOLS.mupdf_display_errors(False)


def open_pdf(doc: Document, config: ExtractConfig) -> pymupdf.Document:
    try:
        pdf = pymupdf.open(doc.local_path, filetype="pdf")
    except (pymupdf.FileDataError, RuntimeError, ValueError) as exc:
        raise ExtractError(f"unreadable PDF: {str(exc).splitlines()[0] if str(exc) else 'damaged file'}") from exc
    if pdf.needs_pass:
        if not any(pdf.authenticate(password) for password in config.passwords):
            pdf.close()
            raise ExtractError("encrypted PDF: a password is required" +
                               (" (none of the supplied passwords opened it)" if config.passwords else ""))
    if pdf.page_count == 0:
        pdf.close()
        raise ExtractError("PDF has no readable pages")
    return pdf


def effective_ppi(width_px: int, height_px: int, transform: tuple[float, ...]) -> float:
    """Image pixels per inch at print size, the lower of the two axes."""
    a, b, c, d = transform[:4]
    along_x = math.hypot(a, b) / 72.0
    along_y = math.hypot(c, d) / 72.0
    if along_x <= 0 or along_y <= 0:
        return 0.0
    return min(width_px / along_x, height_px / along_y)


def render_clip(page: pymupdf.Page, rect: pymupdf.Rect, dpi: int) -> np.ndarray:
    pix = page.get_pixmap(dpi=dpi, clip=rect, alpha=False, colorspace=pymupdf.csRGB)
    return np.frombuffer(pix.samples, dtype=np.uint8).reshape(pix.height, pix.width, pix.n)[:, :, :3].copy()


def _text_blocks(page: pymupdf.Page) -> list[TextBlock]:
    return [TextBlock((b[0], b[1], b[2], b[3]), b[4]) for b in page.get_text("blocks") if b[6] == 0]


def _page_figures(doc: Document, page: pymupdf.Page, number: int, config: ExtractConfig,
                  pattern: re.Pattern) -> tuple[list[Figure], int]:
    figures: list[Figure] = []
    decorations = 0
    blocks = _text_blocks(page)
    for info in page.get_image_info(xrefs=True):
        rect = pymupdf.Rect(info["bbox"]) & page.rect
        if rect.is_empty or min(rect.width, rect.height) < config.min_figure_pt:
            decorations += 1
            continue
        shown = rect * page.rotation_matrix
        box = (round(shown.x0, 2), round(shown.y0, 2), round(shown.x1, 2), round(shown.y1, 2))
        caption = find_caption(box, blocks, pattern, config.caption_gap_pt)
        pixels = render_clip(page, rect, config.dpi)
        index = len(figures)
        figures.append(Figure(
            figure_id=f"{doc.document_id}-p{number}-{index}", document_id=doc.document_id,
            path=doc.path, page=number, index=index, bbox=box, source="raster",
            width_px=pixels.shape[1], height_px=pixels.shape[0],
            effective_ppi=round(effective_ppi(info["width"], info["height"], info["transform"]), 1),
            caption=caption.text if caption else "", figure_number=caption.number if caption else "",
            pixels=pixels,
            image_info={"xref": info.get("xref", 0), "colorspace": info.get("cs-name", ""),
                        "image_width": info["width"], "image_height": info["height"],
                        "has_mask": info.get("has-mask", False)},
        ))
    return figures, decorations


def extract_pdf(doc: Document, config: ExtractConfig) -> ExtractResult:
    pdf = open_pdf(doc, config)
    result = ExtractResult(pages=pdf.page_count)
    pattern = re.compile(config.caption_pattern, re.IGNORECASE)
    try:
        for number in range(1, pdf.page_count + 1):
            try:
                figures, decorations = _page_figures(doc, pdf[number - 1], number, config, pattern)
            except (RuntimeError, ValueError, pymupdf.FileDataError) as exc:
                result.errors.append(f"page {number}: {str(exc).splitlines()[0] if str(exc) else type(exc).__name__}")
                continue
            result.figures.extend(figures)
            result.decorations += decorations
    finally:
        pdf.close()
    return result
