"""PDF pages: raster placements, vector figure regions and scanned pages, with captions.

Each page's images, text and drawings are read once. Work happens in PyMuPDF's
unrotated page coordinates (origin at the CropBox's top-left); figure boxes, captions
placement and pixels are those of the page as displayed (/Rotate applied).
"""

from __future__ import annotations

import math
import re

import numpy as np
import pymupdf

from corpusaudit.extract import ExtractConfig, ExtractError, ExtractResult
from corpusaudit.extract.captions import Caption, TextLine, assign_captions, caption_candidates
from corpusaudit.extract.raster import (FULL_PAGE_SHARE, PieceGroup, group_pieces, page_share, placement_key, placements,
                                        repeated_keys, visible_characters)
from corpusaudit.extract.regions import SCATTER_MERGE_PT, Region, attach_labels, group_ink, label_like, merge_overlapping, vector_verdict
from corpusaudit.extract.scan import figure_boxes
from corpusaudit.extract.vector_evidence import read_text, vector_evidence
from corpusaudit.model import Document, Figure

pymupdf.TOOLS.mupdf_display_errors(False)

SCAN_MAX_VISIBLE_CHARS = 40  # a full-page image under more painted text than this is a background
PANEL_GAP_PT = 12.0  # an uncaptioned panel this close to a captioned figure is one of its panels


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


def render_clip(page: pymupdf.Page, shown: pymupdf.Rect, dpi: int) -> np.ndarray:
    """Pixels of a displayed-page rectangle (get_pixmap's clip is in displayed coordinates)."""
    pix = page.get_pixmap(dpi=dpi, clip=shown, alpha=False, colorspace=pymupdf.csRGB)
    return np.frombuffer(pix.samples, dtype=np.uint8).reshape(pix.height, pix.width, pix.n)[:, :, :3].copy()


def _reason(exc: Exception) -> str:
    text = str(exc).splitlines()[0] if str(exc) else ""
    return f"{type(exc).__name__}: {text}" if text else type(exc).__name__


def text_lines(text: dict) -> list[TextLine]:
    lines = []
    for number, block in enumerate(text["blocks"]):
        if block.get("type", 0) != 0:
            continue
        first = True
        for line in block.get("lines", ()):
            content = "".join(span["text"] for span in line["spans"]).strip()
            if not content:
                continue
            size = max((float(span["size"]) for span in line["spans"]), default=0.0)
            lines.append(TextLine(tuple(line["bbox"]), content, number, first, size))
            first = False
    return lines


def _box(rect: pymupdf.Rect) -> tuple[float, float, float, float]:
    return (round(rect.x0, 2), round(rect.y0, 2), round(rect.x1, 2), round(rect.y1, 2))


class _Page:
    """One page's reading: everything is read once and shared by the steps."""

    def __init__(self, pdf: pymupdf.Document, page: pymupdf.Page, number: int, doc: Document,
                 config: ExtractConfig, pattern: re.Pattern):
        self.pdf, self.page, self.number, self.doc, self.config, self.pattern = pdf, page, number, doc, config, pattern
        self.bounds = pymupdf.Rect(0, 0, page.cropbox.width, page.cropbox.height)
        self.rotation = page.rotation_matrix
        self.text = read_text(page)
        self.lines = text_lines(self.text)
        self.captions = caption_candidates(self.lines, pattern)
        self.errors: list[str] = []

    def shown(self, rect: pymupdf.Rect) -> pymupdf.Rect:
        return pymupdf.Rect(rect) * self.rotation

    def shown_captions(self) -> list[Caption]:
        return [Caption(c.text, c.number, _box(self.shown(pymupdf.Rect(c.bbox)))) for c in self.captions]

    def filter_name(self, xref: int) -> str:
        if not xref:
            return ""
        kind, value = self.pdf.xref_get_key(xref, "Filter")
        return value.strip("/[] ") if kind != "null" else ""


_PATH_OPERATOR = re.compile(rb"\s(?:re|m|Do)\s")


def estimated_paths(pdf: pymupdf.Document, page: pymupdf.Page) -> int:
    """Rough count of subpaths and form invocations in a page's content and form streams."""
    count = len(_PATH_OPERATOR.findall(page.read_contents()))
    for xref, *_ in page.get_xobjects():
        if pdf.xref_get_key(xref, "Subtype")[1] == "/Form":
            count += len(_PATH_OPERATOR.findall(pdf.xref_stream(xref) or b""))
    return count


def _adjacent(a: pymupdf.Rect, b: pymupdf.Rect) -> bool:
    """Side by side or one above the other, close, and lined up along most of the shorter side."""
    gap_x = max(a.x0 - b.x1, b.x0 - a.x1)
    gap_y = max(a.y0 - b.y1, b.y0 - a.y1)
    overlap_x = min(a.x1, b.x1) - max(a.x0, b.x0)
    overlap_y = min(a.y1, b.y1) - max(a.y0, b.y0)
    beside = 0 <= gap_x <= PANEL_GAP_PT and overlap_y >= 0.5 * min(a.height, b.height)
    stacked = 0 <= gap_y <= PANEL_GAP_PT and overlap_x >= 0.5 * min(a.width, b.width)
    return beside or stacked


def _attach_captions(boxes: list[pymupdf.Rect], identities: list[set], captions: list[Caption], gap: float
                     ) -> tuple[list[list[int]], list[Caption | None]]:
    """Caption per figure (displayed coordinates). An uncaptioned panel next to a captioned
    figure joins it (a multi-panel figure with one caption is one figure) unless it shows the
    same image (an image drawn twice is two figures). Returns groups of box indices and captions."""
    plain = [_box(b) for b in boxes]
    assigned = assign_captions(plain, captions, gap)
    groups = [[i] for i in range(len(boxes))]
    changed = True
    while changed:  # panels may chain: a b c with the caption under c
        changed = False
        for f, caption in enumerate(assigned):
            if caption is None or not groups[f]:
                continue
            for g in range(len(boxes)):
                if g == f or assigned[g] is not None or len(groups[g]) != 1 or groups[g][0] != g:
                    continue
                if identities[g] and any(identities[g] & identities[m] for m in groups[f]):
                    continue
                if any(_adjacent(boxes[m], boxes[g]) for m in groups[f]):
                    groups[f].append(g)
                    groups[g] = []
                    changed = True
    keep = [i for i in range(len(boxes)) if groups[i]]
    return [groups[i] for i in keep], [assigned[i] for i in keep]


LOSSY_FILTERS = ("DCTDecode", "JPXDecode")
MAX_NATIVE_PIXELS = 25_000_000


def lossy_native_pixels(pdf: pymupdf.Document, info: dict) -> np.ndarray | None:
    """A lossy-compressed image's own pixels (its 8x8 JPEG grid intact), for the compression check."""
    if info["pieces"] != 1 or not info["xref"] or not any(f in info["filter"] for f in LOSSY_FILTERS) \
            or info["image_width"] * info["image_height"] > MAX_NATIVE_PIXELS:
        return None
    pixmap = pymupdf.Pixmap(pdf, info["xref"])
    if pixmap.alpha:
        pixmap = pymupdf.Pixmap(pixmap, 0)
    if pixmap.colorspace is None or pixmap.colorspace.n != 3:
        pixmap = pymupdf.Pixmap(pymupdf.csRGB, pixmap)
    return np.frombuffer(pixmap.samples, dtype=np.uint8).reshape(pixmap.height, pixmap.width, pixmap.n)[:, :, :3].copy()


def _figure(reading: _Page, index: int, shown: pymupdf.Rect, source: str, pixels: np.ndarray,
            caption: Caption | None, **fields) -> Figure:
    doc = reading.doc
    return Figure(
        figure_id=f"{doc.document_id}-p{reading.number}-{index}", document_id=doc.document_id, path=doc.path,
        page=reading.number, index=index, bbox=_box(shown), source=source,
        width_px=int(pixels.shape[1]), height_px=int(pixels.shape[0]),
        caption=caption.text if caption else "", figure_number=caption.number if caption else "",
        pixels=pixels, **fields)


def _scan_figures(reading: _Page, scan: PieceGroup) -> list[Figure]:
    """Figure regions inside a page that is one picture."""
    page, config = reading.page, reading.config
    whole = page.rect
    pixels = render_clip(page, whole, config.dpi)
    boxes = [pymupdf.Rect(b) for b in figure_boxes(pixels, config.dpi, config.min_figure_pt)]
    groups, captions = _attach_captions(boxes, [set() for _ in boxes], reading.shown_captions(), config.caption_gap_pt)
    ppi = round(scan.effective_ppi(), 1)
    info = {**scan.info(reading.filter_name), "scan": True}
    scale = config.dpi / 72.0
    figures = []
    for members, caption in sorted(zip(groups, captions), key=lambda gc: (boxes[gc[0][0]].y0, boxes[gc[0][0]].x0)):
        shown = boxes[members[0]]
        for other in members[1:]:
            shown |= boxes[other]
        crop = pixels[int(shown.y0 * scale):int(math.ceil(shown.y1 * scale)),
                      int(shown.x0 * scale):int(math.ceil(shown.x1 * scale))].copy()
        figures.append(_figure(reading, len(figures), shown, "scan", crop, caption,
                               effective_ppi=ppi, image_info=dict(info)))
    return figures


def _page_figures(reading: _Page, infos: list[dict], repeated: set[tuple]) -> tuple[list[Figure], int]:
    page, config = reading.page, reading.config
    decorations = 0
    kept = []
    for placement in placements(page, infos):
        if placement.key in repeated:
            decorations += 1  # logo or running head
        elif placement.width * placement.height > config.max_image_pixels:
            reading.errors.append(f"page {reading.number}: image {placement.width}x{placement.height} "
                                  f"exceeds max_image_pixels; skipped")
        else:
            kept.append(placement)
    pictures: list[PieceGroup] = []
    for group in group_pieces(kept):
        if min(group.rect.width, group.rect.height) < config.min_figure_pt:
            decorations += 1  # icon, bullet, rule drawn as an image
        else:
            pictures.append(group)
    full = [g for g in pictures if page_share(g.rect, reading.bounds) >= FULL_PAGE_SHARE]
    if full:
        if len(pictures) == len(full) and visible_characters(page) <= SCAN_MAX_VISIBLE_CHARS:
            return _scan_figures(reading, full[0]), decorations + len(full) - 1
        decorations += len(full)  # a background behind the page's text
        pictures = [g for g in pictures if g not in full]

    # Reading drawings costs ~25 us a path: count painting operators in the raw streams first.
    paths = estimated_paths(reading.pdf, page)
    drawings = page.get_drawings() if paths <= config.max_paths_per_page else []
    paths = max(paths, len(drawings))
    if paths > config.max_paths_per_page:
        reading.errors.append(f"page {reading.number}: about {paths} drawing paths exceed max_paths_per_page "
                              f"({config.max_paths_per_page}); vector figures not searched")
        drawings = []
    regions = group_ink(reading.bounds, drawings, [g.rect for g in pictures])
    caption_blocks = {line.block for line in reading.lines
                      for c in reading.captions if line.bbox[1] >= c.bbox[1] - 0.5 and _within(line.bbox, c.bbox)}
    attachable = label_like(reading.lines, caption_blocks)
    figures_found: list[Region] = []
    small = [i for r in regions if not r.pictures and vector_verdict(r, drawings, reading.lines, config.min_figure_pt)
             in ("small", "blank") for i in r.paths]
    if small:  # scattered pieces (frameless scatter plots) may form a figure at a wider distance
        regions = [r for r in regions if r.pictures or not set(r.paths) <= set(small)] + \
            group_ink(reading.bounds, drawings, [], SCATTER_MERGE_PT, small)
    for region in regions:
        if not region.pictures:
            if vector_verdict(region, drawings, reading.lines, config.min_figure_pt) != "figure":
                continue
            attach_labels(region, reading.lines, attachable)
        elif region.paths:
            attach_labels(region, reading.lines, attachable)
        else:
            attach_labels(region, reading.lines, [False] * len(reading.lines))  # text over the picture
        figures_found.append(region)
    figures_found = merge_overlapping(figures_found)
    shown_boxes = [reading.shown(r.box) for r in figures_found]
    identities = [{p.key for i in r.pictures for p in pictures[i].pieces} for r in figures_found]
    groups, captions = _attach_captions(shown_boxes, identities, reading.shown_captions(), config.caption_gap_pt)

    merged: list[tuple[Region, Caption | None]] = []
    for members, caption in zip(groups, captions):
        region = figures_found[members[0]]
        for other in members[1:]:
            extra = figures_found[other]
            region.paths += extra.paths
            region.pictures += extra.pictures
            region.labels += extra.labels
            region.box |= extra.box
        merged.append((region, caption))
    merged.sort(key=lambda rc: (reading.shown(rc[0].box).y0, reading.shown(rc[0].box).x0))

    scale = config.dpi / 72.0
    figures = []
    for region, caption in merged:
        shown = reading.shown(region.box)
        pixels = render_clip(page, shown, config.dpi)
        evidence = vector_evidence(page, region.box, scale, drawings=drawings, text=reading.text) \
            if region.paths or region.labels else None
        if region.pictures:
            group = PieceGroup([p for i in region.pictures for p in pictures[i].pieces])
            info = group.info(reading.filter_name)
            figures.append(_figure(reading, len(figures), shown, "raster", pixels, caption,
                                   effective_ppi=round(group.effective_ppi(), 1), vector=evidence,
                                   image_info=info, native_pixels=lossy_native_pixels(reading.pdf, info)))
        else:
            figures.append(_figure(reading, len(figures), shown, "vector", pixels, caption, vector=evidence,
                                   image_info={"paths": len(region.paths)}))
    return figures, decorations


def _within(inner, outer) -> bool:
    return inner[0] >= outer[0] - 0.5 and inner[1] >= outer[1] - 0.5 and inner[2] <= outer[2] + 0.5 \
        and inner[3] <= outer[3] + 0.5


def extract_pdf(doc: Document, config: ExtractConfig, pages: tuple[int, int] | None = None) -> ExtractResult:
    """Figures of every page, or of pages first..last; repeated images are judged over the whole document."""
    pdf = open_pdf(doc, config)
    result = ExtractResult(pages=pdf.page_count)
    first, last = pages or (1, pdf.page_count)
    pattern = re.compile(config.caption_pattern, re.IGNORECASE)
    try:
        # First pass: every page's image placements, to know the images repeated across pages.
        infos: list[list[dict] | None] = []
        for number in range(1, pdf.page_count + 1):
            try:
                infos.append(pdf[number - 1].get_image_info(xrefs=True))
            except Exception as exc:  # a malformed page must not stop the document
                infos.append(None)
                result.errors.append(f"page {number}: {_reason(exc)}")
        keys = [{placement_key(i) for i in info} if info is not None else set() for info in infos]
        repeated = repeated_keys(keys)
        failed = sum(info is None for info in infos)
        for number, info in enumerate(infos, start=1):
            if info is None or not first <= number <= last:
                continue
            try:
                reading = _Page(pdf, pdf[number - 1], number, doc, config, pattern)
                figures, decorations = _page_figures(reading, info, repeated)
            except Exception as exc:  # a malformed page must not stop the document
                result.errors.append(f"page {number}: {_reason(exc)}")
                failed += 1
                continue
            result.errors.extend(reading.errors)
            result.figures.extend(figures)
            result.decorations += decorations
    finally:
        pdf.close()
    if failed == result.pages:  # not one page could be read: the document is unreadable
        raise ExtractError(f"no readable page ({result.errors[0]})")
    return result
