"""Small PDFs for the extraction tests, built in code with known boxes (invented content only)."""

from __future__ import annotations

import io

import matplotlib

matplotlib.use("Agg")

import numpy as np
import pymupdf
from matplotlib.figure import Figure as MplFigure
from PIL import Image

from corpusaudit.extract import ExtractConfig, extract_document
from corpusaudit.model import Document


def extract(path, **config):
    doc = Document(document_id="d", path=str(path), sha256="", bytes=0, kind="pdf", local_path=str(path))
    return extract_document(doc, ExtractConfig(**config))


def image_bytes(width: int, height: int, colour=(40, 120, 200), fmt: str = "PNG", mode: str = "RGB",
                seed: int = 0) -> bytes:
    rng = np.random.default_rng(seed)
    pixels = np.clip(np.array(colour, float)[None, None, :] + rng.normal(0, 12, (height, width, 3)), 0, 255)
    image = Image.fromarray(pixels.astype(np.uint8), "RGB")
    if mode != "RGB":
        image = image.convert(mode)
    buffer = io.BytesIO()
    image.save(buffer, fmt)
    return buffer.getvalue()


def chart_pdf(width_in: float = 4.0, height_in: float = 3.0) -> bytes:
    """A matplotlib bar chart as a one-page PDF (white figure background, tight box)."""
    fig = MplFigure(figsize=(width_in, height_in))
    ax = fig.add_subplot(111)
    ax.bar(["north", "south", "east", "west"], [3, 5, 2, 4])
    ax.set_ylabel("catch (t)")
    buffer = io.BytesIO()
    fig.savefig(buffer, format="pdf", bbox_inches="tight", pad_inches=0.05)
    return buffer.getvalue()


def place_chart(page: pymupdf.Page, x0: float, y0: float, width: float) -> pymupdf.Rect:
    """Place chart_pdf() with its own aspect at (x0, y0); returns the placed box."""
    with pymupdf.open("pdf", chart_pdf()) as src:
        w, h = src[0].rect.width, src[0].rect.height
        rect = pymupdf.Rect(x0, y0, x0 + width, y0 + width * h / w)
        page.show_pdf_page(rect, src, 0)
    return rect


def iou(a, b) -> float:
    ix = max(0.0, min(a[2], b[2]) - max(a[0], b[0]))
    iy = max(0.0, min(a[3], b[3]) - max(a[1], b[1]))
    union = (a[2] - a[0]) * (a[3] - a[1]) + (b[2] - b[0]) * (b[3] - b[1]) - ix * iy
    return ix * iy / union


def ruled_table(page: pymupdf.Page, x0: float, y0: float, rows: int = 5, cols: int = 4) -> pymupdf.Rect:
    """A ruled table of invented numbers (a table must not be reported as a figure)."""
    shape = page.new_shape()
    for r in range(rows + 1):
        shape.draw_line((x0, y0 + 16 * r), (x0 + 60 * cols, y0 + 16 * r))
    for c in range(cols + 1):
        shape.draw_line((x0 + 60 * c, y0), (x0 + 60 * c, y0 + 16 * rows))
    shape.finish(color=(0, 0, 0), width=0.5)
    shape.commit()
    for r in range(rows):
        for c in range(cols):
            page.insert_text((x0 + 60 * c + 4, y0 + 16 * r + 12), f"{r * 7 + c * 3}.5", fontsize=9)
    return pymupdf.Rect(x0, y0, x0 + 60 * cols, y0 + 16 * rows)
