"""Extract: every figure of a document, with its place, its pixels and its evidence.

extract_document(doc, config) -> ExtractResult is the stage's one entry point.
A document that cannot be opened at all raises ExtractError with a one-line reason;
a page that fails is recorded in ExtractResult.errors and the other pages go on.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from corpusaudit.model import Document, Figure

DEFAULT_CAPTION_PATTERN = r"^\s*(Figure|Fig\.?|Chart|Graph|Exhibit)\s*([A-Z]?\d+(?:[.\-]\d+)*[a-z]?)\s*[.:\-\u2013\u2014]?"


@dataclass(frozen=True)
class ExtractConfig:
    dpi: int = 150  # figure render resolution
    min_figure_pt: float = 36.0  # smaller placements are decorations (icons, bullets)
    caption_pattern: str = DEFAULT_CAPTION_PATTERN
    caption_gap_pt: float = 36.0  # how far from a figure a caption may start
    max_paths_per_page: int = 100_000  # beyond this a page's drawings are not read (~2.5 s at the cap)
    max_image_pixels: int = 200_000_000  # larger declared images are refused (bombs)
    passwords: tuple[str, ...] = ()


@dataclass
class ExtractResult:
    figures: list[Figure] = field(default_factory=list)
    pages: int = 0
    errors: list[str] = field(default_factory=list)  # "page 3: reason"
    decorations: int = 0  # images skipped as logos, icons, backgrounds
    page_sizes: dict[int, tuple[float, float]] = field(default_factory=dict)  # every PDF page as displayed, points
    page_views: dict[int, np.ndarray] = field(default_factory=dict)  # small RGB renders of pages with figures


class ExtractError(Exception):
    """The document cannot be read at all; the message is its one-line reason."""


def extract_document(doc: Document, config: ExtractConfig, pages: tuple[int, int] | None = None,
                     page_view_px: int = 0) -> ExtractResult:
    """Figures of a document; pages (first, last; 1-based, inclusive) limits a PDF to a range.
    page_view_px > 0: also a render of each PDF page with figures, longest side that many pixels."""
    if doc.kind == "pdf":
        from corpusaudit.extract.pdf import extract_pdf

        return extract_pdf(doc, config, pages, page_view_px)
    from corpusaudit.extract.images import extract_image_file

    return extract_image_file(doc, config)
