"""Raster placements: every drawing of every image, its transform, and which ones are decorations.

A placement is one entry of PyMuPDF's get_image_info (an image drawn twice is two entries;
inline images have xref 0). Placements that abut or overlap (tiles, strips, an image and
its separately drawn mask) become one piece group; logos repeated across the document,
tiny icons and full-page backgrounds behind text are decorations.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field

import numpy as np
import pymupdf
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components

from corpusaudit.extract.vector_evidence import unrotated_display

ABUT_TOLERANCE_PT = 1.5  # tiles written with rounded coordinates leave hairline gaps
REPEATED_PAGE_SHARE = 0.6  # an image on this share of pages (3+) is a running logo or header
FULL_PAGE_SHARE = 0.85  # an image covering this share of the page is a scan or a background


@dataclass
class Placement:
    rect: pymupdf.Rect  # unrotated page points, clipped to the page
    xref: int
    width: int  # image pixels
    height: int
    transform: tuple[float, ...]
    colorspace: str
    bpc: int
    has_mask: bool
    key: tuple  # identity across pages: xref, or size and digest for inline images

    @property
    def rotation(self) -> float:
        """Degrees counter-clockwise of the image's x axis on the page (y grows downwards)."""
        a, b = self.transform[:2]
        return round(-math.degrees(math.atan2(b, a)), 1) % 360.0 + 0.0

    @property
    def flipped(self) -> bool:
        a, b, c, d = self.transform[:4]
        return a * d - b * c < 0


@dataclass
class PieceGroup:
    """Placements shown as one picture (a single image, or tiles that abut)."""

    pieces: list[Placement] = field(default_factory=list)

    @property
    def rect(self) -> pymupdf.Rect:
        box = pymupdf.Rect(self.pieces[0].rect)
        for piece in self.pieces[1:]:
            box |= piece.rect
        return box

    def effective_ppi(self) -> float:
        from corpusaudit.extract.pdf import effective_ppi

        return min(effective_ppi(p.width, p.height, p.transform) for p in self.pieces)

    def info(self, xref_filter) -> dict:
        main = max(self.pieces, key=lambda p: p.rect.width * p.rect.height)
        return {
            "xref": main.xref, "colorspace": main.colorspace, "bpc": main.bpc,
            "image_width": main.width, "image_height": main.height, "has_mask": main.has_mask,
            "filter": xref_filter(main.xref), "rotation": main.rotation, "flipped": main.flipped,
            "pieces": len(self.pieces), "inline": main.xref == 0,
        }


_INLINE_IMAGE = re.compile(rb"(?:^|\s)BI\s")


def _has_inline_images(pdf: pymupdf.Document, page: pymupdf.Page) -> bool:
    """Whether the page's content or its forms may hold an inline image (a false alarm costs time only)."""
    if _INLINE_IMAGE.search(page.read_contents()):
        return True
    return any(pdf.xref_get_key(xref, "Subtype")[1] == "/Form" and _INLINE_IMAGE.search(pdf.xref_stream(xref) or b"")
               for xref, *_ in page.get_xobjects())


def image_infos(pdf: pymupdf.Document, page: pymupdf.Page, display: pymupdf.DisplayList | None = None) -> list[dict]:
    """Page.get_image_info(xrefs=True) without its cost where the answer is plain, read from
    the page's display list where unrotated_display allows.

    PyMuPDF finds each placement's xref by hashing the decoded pixels of every placement and of
    every image the page lists, most of the time of reading a page. When the page has no inline
    image and each placement's pixel size belongs to exactly one listed image, that image is the
    placement's; otherwise the hashes decide, as PyMuPDF does.
    """
    display = unrotated_display(page, display)
    if display is None:
        textpage = page.get_textpage(flags=pymupdf.TEXT_PRESERVE_IMAGES)
    else:
        textpage = pymupdf.TextPage(display.get_textpage(flags=pymupdf.TEXT_PRESERVE_IMAGES))
    infos = textpage.extractIMGINFO(hashes=False)
    del textpage
    if not infos:
        return infos
    by_size: dict[tuple[int, int], set[int]] = {}
    for xref, _smask, width, height, *_ in page.get_images(full=True):
        by_size.setdefault((int(width), int(height)), set()).add(int(xref))
    owners = [by_size.get((int(info["width"]), int(info["height"])), set()) for info in infos]
    if any(len(xrefs) != 1 for xrefs in owners) or _has_inline_images(pdf, page):
        return page.get_image_info(xrefs=True)
    for info, xrefs in zip(infos, owners):
        info["xref"] = next(iter(xrefs))
    return infos


def placements(page: pymupdf.Page, infos: list[dict]) -> list[Placement]:
    bounds = pymupdf.Rect(0, 0, page.cropbox.width, page.cropbox.height)
    found = []
    for info in infos:
        rect = pymupdf.Rect(info["bbox"]) & bounds
        if rect.is_empty or rect.width <= 0 or rect.height <= 0:
            continue
        xref = int(info.get("xref") or 0)
        found.append(Placement(rect, xref, int(info["width"]), int(info["height"]), tuple(info["transform"]),
                               str(info.get("cs-name", "")), int(info.get("bpc") or 0),
                               bool(info.get("has-mask", False)), placement_key(info)))
    return found


def placement_key(info: dict) -> tuple:
    """Identity of the image across pages: its xref, or its size and placement for inline images."""
    xref = int(info.get("xref") or 0)
    if xref:
        return ("xref", xref)
    return ("inline", info["width"], info["height"], tuple(round(v) for v in info["bbox"]))


def _union_find(count: int, pairs: np.ndarray) -> list[list[int]]:
    """The groups of count items joined by pairs, each in index order, ordered by first item."""
    pairs = np.asarray(pairs, dtype=np.int64).reshape(-1, 2)
    edges = coo_matrix((np.ones(len(pairs), dtype=np.int8), (pairs[:, 0], pairs[:, 1])), shape=(count, count))
    labels = connected_components(edges, directed=False)[1]
    return [np.flatnonzero(labels == label).tolist() for label in range(labels.max() + 1)] if count else []


def group_pieces(found: list[Placement]) -> list[PieceGroup]:
    """Placements that abut along a shared edge (tiles, strips) or mostly overlap become one group."""
    if not found:
        return []
    box = np.array([(p.rect.x0, p.rect.y0, p.rect.x1, p.rect.y1) for p in found])
    x0, y0, x1, y1 = (box[:, k] for k in range(4))
    width, height = x1 - x0, y1 - y0
    gap_x = np.maximum(x0[:, None] - x1[None, :], x0[None, :] - x1[:, None])
    gap_y = np.maximum(y0[:, None] - y1[None, :], y0[None, :] - y1[:, None])
    near = (gap_x <= ABUT_TOLERANCE_PT) & (gap_y <= ABUT_TOLERANCE_PT)
    overlap_x = -gap_x
    overlap_y = -gap_y
    area = width * height
    overlapping = (overlap_x > 0) & (overlap_y > 0) & \
        (overlap_x * overlap_y >= 0.5 * np.minimum(area[:, None], area[None, :]))
    # Side by side: the shared edge spans nearly all of the shorter side (a tile row, a strip stack).
    beside = (gap_x >= -ABUT_TOLERANCE_PT) & (overlap_y >= 0.9 * np.minimum(height[:, None], height[None, :]))
    stacked = (gap_y >= -ABUT_TOLERANCE_PT) & (overlap_x >= 0.9 * np.minimum(width[:, None], width[None, :]))
    joined = near & (overlapping | beside | stacked)
    pairs = np.argwhere(np.triu(joined, k=1))
    return [PieceGroup([found[i] for i in members]) for members in _union_find(len(found), pairs)]


def repeated_keys(page_keys: list[set[tuple]]) -> set[tuple]:
    """Image identities shown on most pages of a document of 3 pages or more (logos, running heads)."""
    pages = len(page_keys)
    if pages < 3:
        return set()
    counts: dict[tuple, int] = {}
    for keys in page_keys:
        for key in keys:
            counts[key] = counts.get(key, 0) + 1
    return {key for key, count in counts.items() if count >= max(3, math.ceil(REPEATED_PAGE_SHARE * pages))}


def page_share(rect: pymupdf.Rect, page_rect: pymupdf.Rect) -> float:
    return float((rect & page_rect).get_area() / max(page_rect.get_area(), 1e-6))


def visible_characters(page: pymupdf.Page) -> int:
    """Characters actually painted (OCR layers use invisible text, render mode 3)."""
    return int(sum(len(span["chars"]) for span in page.get_texttrace() if span.get("type") != 3
                   and span.get("opacity", 1) > 0))
