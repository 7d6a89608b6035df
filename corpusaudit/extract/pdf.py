"""PDF pages: raster placements, vector figure regions and scanned pages, with captions.

Each page's images, text and drawings are read once; a drawing's box is cut to its clip
path, so that only what is painted counts. Work happens in PyMuPDF's unrotated page
coordinates (origin at the CropBox's top-left); figure boxes, captions placement and
pixels are those of the page as displayed (/Rotate applied).
"""

from __future__ import annotations

import math
import re

import numpy as np
import pymupdf

from corpusaudit.extract import ExtractConfig, ExtractError, ExtractResult
from corpusaudit.extract.captions import Caption, TextLine, assign_captions, caption_candidates
from corpusaudit.extract.raster import (FULL_PAGE_SHARE, PieceGroup, group_pieces, image_infos, page_share,
                                        placement_key, placements, repeated_keys, visible_characters)
from corpusaudit.extract.regions import (SCATTER_MERGE_PT, Region, attach_labels, attach_titles, group_ink, label_like,
                                         merge_overlapping, union, vector_verdict)
from corpusaudit.extract.scan import figure_boxes
from corpusaudit.extract.vector_evidence import (read_drawings, read_text, read_text_runs,
                                                   vector_evidence)
from corpusaudit.model import Document, Figure

pymupdf.TOOLS.mupdf_display_errors(False)

SCAN_MAX_VISIBLE_CHARS = 40  # a full-page image under more painted text than this is a background
PANEL_GAP_PT = 12.0  # an uncaptioned panel this close to a captioned figure is one of its panels
LETTERED_PANEL_GAP_PT = 24.0  # panels labelled (a), (b) may sit this far apart
PANEL_ALIGN_PT = 4.0  # panels on one grid share an edge to within the play of their labels
GRAPHIC_PAGE_SHARE = 0.8  # a clip this large is the page's own, not an embedded graphic's
PANEL_LABEL = re.compile(r"^\(?([a-hA-H])\)(?:\s|$)|^([a-hA-H])$")


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


def _rgb(pix: pymupdf.Pixmap) -> np.ndarray:
    """An RGB pixmap's pixels as an HxWx3 array of its own."""
    return np.frombuffer(pix.samples, dtype=np.uint8).reshape(pix.height, pix.width, pix.n)[:, :, :3].copy()


def render_clip(display: pymupdf.DisplayList, shown: pymupdf.Rect, dpi: int) -> np.ndarray:
    """Pixels of a displayed-page rectangle (the clip is in displayed coordinates), drawn from
    the page's display list, as Page.get_pixmap does, but interpreted once for all figures."""
    zoom = dpi / 72.0
    pix = display.get_pixmap(matrix=pymupdf.Matrix(zoom, zoom), clip=shown, alpha=False, colorspace=pymupdf.csRGB)
    return _rgb(pix)


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
            lines.append(TextLine(tuple(line["bbox"]), content, number, first, size, tuple(line["dir"])))
            first = False
    return lines


def _box(rect: pymupdf.Rect) -> tuple[float, float, float, float]:
    return (round(rect.x0, 2), round(rect.y0, 2), round(rect.x1, 2), round(rect.y1, 2))


class _Page:
    """One page's reading: everything is read once and shared by the steps."""

    def __init__(self, pdf: pymupdf.Document, page: pymupdf.Page, number: int, doc: Document,
                 config: ExtractConfig, pattern: re.Pattern, estimated_paths: int,
                 display: pymupdf.DisplayList | None = None):
        self.pdf, self.page, self.number, self.doc, self.config, self.pattern = pdf, page, number, doc, config, pattern
        self.estimated_paths = estimated_paths
        self._display = display
        self.bounds = pymupdf.Rect(0, 0, page.cropbox.width, page.cropbox.height)
        self.rotation = page.rotation_matrix
        self.text = read_text(page, self._text_display)
        self._text_runs: dict | None = None
        self.lines = text_lines(self.text)
        self.captions = caption_candidates(self.lines, pattern)
        self.errors: list[str] = []

    @property
    def display(self) -> pymupdf.DisplayList:
        """The page's drawing commands, interpreted once for its text, images and renders."""
        if self._display is None:
            self._display = self.page.get_displaylist()
        return self._display

    @property
    def _text_display(self) -> pymupdf.DisplayList | None:
        # A page of more paths than are searched is read directly: its display list is large.
        return self.display if self.estimated_paths <= self.config.max_paths_per_page else self._display

    @property
    def text_runs(self) -> dict:
        """The page's text as drawn (read_text_runs), read when a vector figure needs it."""
        if self._text_runs is None:
            self._text_runs = read_text_runs(self.page, self._text_display)
        return self._text_runs

    def shown(self, rect: pymupdf.Rect) -> pymupdf.Rect:
        return pymupdf.Rect(rect) * self.rotation

    def shown_captions(self) -> list[Caption]:
        m = self.rotation
        return [Caption(c.text, c.number, _box(self.shown(pymupdf.Rect(c.bbox))),
                        (c.direction[0] * m.a + c.direction[1] * m.c, c.direction[0] * m.b + c.direction[1] * m.d))
                for c in self.captions]

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


def visible_drawings(page: pymupdf.Page) -> list[dict]:
    """The page's painted paths, each rect cut to its clip path's box, paths clipped away dropped.

    Plotting libraries draw a bar from zero and clip it at the axes, or a line beyond the axis
    limits: the path's own rect then reaches far outside what is painted and would join the
    chart to whatever lies there. Clip entries apply to the entries that follow at a deeper level.

    Each path also gets "graphic": the number of the outermost clip smaller than the page that
    holds it (an embedded graphic's bounding box clips all of its content), or None.
    Paths are read_drawings' dicts: rects are (x0, y0, x1, y1) tuples.
    """
    page_area = abs(page.cropbox.width * page.cropbox.height)
    clips: list[tuple[int, tuple | None, int | None]] = []  # (level, visible area or None, graphic)
    painted = []
    for number, entry in enumerate(read_drawings(page, extended=True)):
        level = entry.get("level", 0)
        while clips and clips[-1][0] >= level:
            clips.pop()
        kind = entry["type"]
        if kind == "clip":
            scissor = entry["scissor"]
            graphic = clips[-1][2] if clips else None
            if clips:
                scissor = None if clips[-1][1] is None else _cut(scissor, clips[-1][1])
            # the area as Rect.width * Rect.height gives it (a side is max(0, x1 - x0))
            if graphic is None and scissor is not None and \
                    max(0, scissor[2] - scissor[0]) * max(0, scissor[3] - scissor[1]) < GRAPHIC_PAGE_SHARE * page_area:
                graphic = number
            clips.append((level, scissor, graphic))
            continue
        if kind not in ("f", "s", "fs"):
            continue  # transparency groups carry no ink of their own
        if clips:
            entry["graphic"] = clips[-1][2]
            shown = None if clips[-1][1] is None else _cut(entry["rect"], clips[-1][1])
            if shown is None:
                continue  # wholly outside its clip: nothing is painted
            entry["rect"] = shown
        else:
            entry["graphic"] = None
        painted.append(entry)
    return painted


def _cut(rect: tuple, clip: tuple) -> tuple | None:
    """rect within clip by coordinates (Rect's & rejects the zero-height rects of straight lines).
    Comparisons in place of max() and min() calls, keeping the first of equal values as they do:
    a page may have a hundred thousand paths."""
    left, top, right, bottom = rect
    clip_left, clip_top, clip_right, clip_bottom = clip
    x0 = clip_left if clip_left > left else left
    y0 = clip_top if clip_top > top else top
    x1 = clip_right if clip_right < right else right
    y1 = clip_bottom if clip_bottom < bottom else bottom
    if x0 > x1 or y0 > y1:
        return None
    return (x0, y0, x1, y1)


def panel_letter(box: pymupdf.Rect, lines: list[TextLine]) -> str:
    """The panel label ("a", "(b)", "c)", "(d) Catch by year") at the box's top or bottom edge, or ""."""
    for line in lines:
        match = PANEL_LABEL.match(line.text)
        if not match:
            continue
        x0, y0, x1, y1 = line.bbox
        cx, cy = (x0 + x1) / 2, (y0 + y1) / 2
        band = max(0.25 * box.height, PANEL_GAP_PT)
        if box.x0 - PANEL_GAP_PT <= cx <= box.x1 + PANEL_GAP_PT and \
                (box.y0 - PANEL_GAP_PT <= cy <= box.y0 + band or box.y1 - band <= cy <= box.y1 + PANEL_GAP_PT):
            return (match.group(1) or match.group(2)).lower()
    return ""


def _panels(a: pymupdf.Rect, b: pymupdf.Rect, lettered: bool) -> bool:
    """Two figure boxes laid out as panels of one figure: close and on one grid (side by side with
    a shared top or bottom edge, or stacked with a shared left or right edge); panels labelled
    with different letters may sit further apart and need not line up."""
    gap_x = max(a.x0 - b.x1, b.x0 - a.x1)
    gap_y = max(a.y0 - b.y1, b.y0 - a.y1)
    overlap_x = min(a.x1, b.x1) - max(a.x0, b.x0)
    overlap_y = min(a.y1, b.y1) - max(a.y0, b.y0)
    limit = LETTERED_PANEL_GAP_PT if lettered else PANEL_GAP_PT
    row = abs(a.y0 - b.y0) <= PANEL_ALIGN_PT or abs(a.y1 - b.y1) <= PANEL_ALIGN_PT
    column = abs(a.x0 - b.x0) <= PANEL_ALIGN_PT or abs(a.x1 - b.x1) <= PANEL_ALIGN_PT
    beside = 0 <= gap_x <= limit and overlap_y >= 0.5 * min(a.height, b.height) and (row or lettered)
    stacked = 0 <= gap_y <= limit and overlap_x >= 0.5 * min(a.width, b.width) and (column or lettered)
    return beside or stacked


def _attach_captions(boxes: list[pymupdf.Rect], identities: list[set], letters: list[str], graphics: list[set],
                     captions: list[Caption], gap: float, text_boxes: list[tuple] | None
                     ) -> tuple[list[list[int]], list[Caption | None]]:
    """Caption per figure (displayed coordinates). An uncaptioned panel next to a captioned
    figure joins it (a multi-panel figure with one caption is one figure), and so does an
    uncaptioned part of the same embedded graphic, however far apart its panels are; not one
    that shows the same image (an image drawn twice is two figures). Returns groups of box
    indices and captions."""
    plain = [_box(b) for b in boxes]
    assigned = assign_captions(plain, captions, gap, text_boxes)
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
                if any(graphics[g] & graphics[m] or
                       _panels(boxes[m], boxes[g], bool(letters[m] and letters[g] and letters[m] != letters[g]))
                       for m in groups[f]):
                    groups[f].append(g)
                    groups[g] = []
                    changed = True
    keep = [i for i in range(len(boxes)) if groups[i]]
    return [groups[i] for i in keep], [assigned[i] for i in keep]


def _captioned_tables(reading: _Page, tables: list[Region], attachable: list[bool], captions: list[Caption],
                      text_boxes: list[tuple]) -> list[tuple[Region, Caption]]:
    """Tables and framed boxes that their authors captioned as figures ("Figure 3." under a drawn
    table) are figures.

    Only captions no figure took are offered, so a table never takes a figure's caption."""
    if not tables or not captions:
        return []
    for table in tables:
        attach_labels(table, reading.lines, attachable)
    boxes = [_box(reading.shown(t.box)) for t in tables]
    assigned = assign_captions(boxes, captions, reading.config.caption_gap_pt, text_boxes)
    return [(table, caption) for table, caption in zip(tables, assigned) if caption is not None]


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
    return _rgb(pixmap)


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
    pixels = render_clip(reading.display, whole, config.dpi)
    boxes = [pymupdf.Rect(b) for b in figure_boxes(pixels, config.dpi, config.min_figure_pt)]
    nothing = [set() for _ in boxes]
    groups, captions = _attach_captions(boxes, nothing, [""] * len(boxes), nothing, reading.shown_captions(),
                                        config.caption_gap_pt, None)  # the page's text is in its pixels
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
    paths = reading.estimated_paths
    drawings = visible_drawings(page) if paths <= config.max_paths_per_page else []
    paths = max(paths, len(drawings))
    if paths > config.max_paths_per_page:
        reading.errors.append(f"page {reading.number}: about {paths} drawing paths exceed max_paths_per_page "
                              f"({config.max_paths_per_page}); vector figures not searched")
        drawings = []
    if not pictures and _too_small_for_a_figure(drawings, config.min_figure_pt):
        return [], decorations  # a page of text, perhaps with rules: no region could be a figure
    regions = group_ink(reading.bounds, drawings, [g.rect for g in pictures])
    caption_blocks = {line.block for line in reading.lines
                      for c in reading.captions if line.bbox[1] >= c.bbox[1] - 0.5 and _within(line.bbox, c.bbox)}
    attachable = label_like(reading.lines, caption_blocks)
    figures_found: list[Region] = []

    def judged(found: list[Region]) -> list[str | None]:
        """vector_verdict of each region of paths alone (None for one with a picture), once."""
        return [None if r.pictures else vector_verdict(r, drawings, reading.lines, config.min_figure_pt) for r in found]

    verdicts = judged(regions)
    small = [i for r, verdict in zip(regions, verdicts) if verdict in ("small", "blank") for i in r.paths]
    if small:  # scattered pieces (frameless scatter plots) may form a figure at a wider distance
        scattered = set(small)
        kept = [(r, verdict) for r, verdict in zip(regions, verdicts) if r.pictures or not set(r.paths) <= scattered]
        wider = group_ink(reading.bounds, drawings, [], SCATTER_MERGE_PT, small)
        regions = [r for r, _ in kept] + wider
        verdicts = [verdict for _, verdict in kept] + judged(wider)
    tables: list[Region] = []
    for region, verdict in zip(regions, verdicts):
        if not region.pictures:
            if verdict in ("table", "frame"):
                tables.append(region)  # a figure after all if its author captioned it as one
            if verdict != "figure":
                continue
            attach_labels(region, reading.lines, attachable)
        elif region.paths:
            attach_labels(region, reading.lines, attachable)
        else:
            attach_labels(region, reading.lines, [False] * len(reading.lines))  # text over the picture
        figures_found.append(region)
    attach_titles(figures_found, reading.lines, attachable)
    figures_found = merge_overlapping(figures_found)
    shown_boxes = [reading.shown(r.box) for r in figures_found]
    identities = [{p.key for i in r.pictures for p in pictures[i].pieces} for r in figures_found]
    letters = [panel_letter(r.box, reading.lines) for r in figures_found]
    text_boxes = [_box(reading.shown(pymupdf.Rect(line.bbox))) for line in reading.lines]
    graphics = [{drawings[i]["graphic"] for i in r.paths} - {None} for r in figures_found]
    groups, captions = _attach_captions(shown_boxes, identities, letters, graphics, reading.shown_captions(),
                                        config.caption_gap_pt, text_boxes)

    merged: list[tuple[Region, Caption | None]] = []
    for members, caption in zip(groups, captions):
        region = figures_found[members[0]]
        for other in members[1:]:
            extra = figures_found[other]
            region.paths += extra.paths
            region.pictures += extra.pictures
            region.labels += extra.labels
            region.box = union((region.box, extra.box))
        merged.append((region, caption))
    captioned_tables = _captioned_tables(reading, tables, attachable,
                                         [c for c in reading.shown_captions() if c not in captions], text_boxes)
    merged += captioned_tables
    drawn_as_table = {id(region) for region, _ in captioned_tables}
    merged.sort(key=lambda rc: (reading.shown(rc[0].box).y0, reading.shown(rc[0].box).x0))

    scale = config.dpi / 72.0
    figures = []
    for region, caption in merged:
        shown = reading.shown(region.box)
        pixels = render_clip(reading.display, shown, config.dpi)
        evidence = vector_evidence(page, region.box, scale, drawings=drawings, text=reading.text,
                                   runs=reading.text_runs) \
            if region.paths or region.labels else None
        if region.pictures:
            group = PieceGroup([p for i in region.pictures for p in pictures[i].pieces])
            info = group.info(reading.filter_name)
            figures.append(_figure(reading, len(figures), shown, "raster", pixels, caption,
                                   effective_ppi=round(group.effective_ppi(), 1), vector=evidence,
                                   image_info=info, native_pixels=lossy_native_pixels(reading.pdf, info)))
        else:
            # a table or framed box captioned as a figure: drawn as one, not a chart
            layout = {"layout": "table"} if id(region) in drawn_as_table else {}
            figures.append(_figure(reading, len(figures), shown, "vector", pixels, caption, vector=evidence,
                                   image_info={"paths": len(region.paths), **layout}))
    return figures, decorations


def _too_small_for_a_figure(drawings: list[dict], min_size: float) -> bool:
    """True when all paths together span less than min_size one way: every region of them
    would be judged small (vector_verdict), so grouping them can be skipped."""
    if not drawings:
        return True
    ink = union(d["rect"] for d in drawings)
    return min(ink.width, ink.height) < min_size


def _within(inner, outer) -> bool:
    return inner[0] >= outer[0] - 0.5 and inner[1] >= outer[1] - 0.5 and inner[2] <= outer[2] + 0.5 \
        and inner[3] <= outer[3] + 0.5


def render_page_view(display: pymupdf.DisplayList, longest_px: int) -> np.ndarray:
    """The whole displayed page, longest side longest_px, from the display list the figures used."""
    zoom = longest_px / max(display.rect.width, display.rect.height)
    pix = display.get_pixmap(matrix=pymupdf.Matrix(zoom, zoom), alpha=False, colorspace=pymupdf.csRGB)
    return _rgb(pix)


def _display_list(page: pymupdf.Page) -> pymupdf.DisplayList:
    """The page's display list. MuPDF only warns when it cannot load a content stream (a
    truncated or damaged file) and goes on with a blank page: that page is an error here."""
    pymupdf.TOOLS.reset_mupdf_warnings()
    display = page.get_displaylist()
    lost = [line for line in pymupdf.TOOLS.mupdf_warnings().splitlines() if line.startswith("cannot load content stream")]
    if lost:
        raise ExtractError(f"{lost[0]}: the file is damaged or truncated")
    return display


KEPT_DISPLAYS = 16  # display lists kept from the first pass for the pages read next: memory stays bounded


def extract_pdf(doc: Document, config: ExtractConfig, pages: tuple[int, int] | None = None,
                page_view_px: int = 0) -> ExtractResult:
    """Figures of every page, or of pages first..last; repeated images are judged over the whole document.
    page_view_px > 0: a small render of every page with figures as well."""
    pdf = open_pdf(doc, config)
    result = ExtractResult(pages=pdf.page_count)
    first, last = pages or (1, pdf.page_count)
    pattern = re.compile(config.caption_pattern, re.IGNORECASE)
    try:
        # First pass: every page's image placements, to know the images repeated across pages.
        infos: list[list[dict] | None] = []
        kept: dict[int, pymupdf.DisplayList] = {}
        paths: dict[int, int] = {}
        for number in range(1, pdf.page_count + 1):
            try:
                page = pdf[number - 1]
                result.page_sizes[number] = (round(page.rect.width, 2), round(page.rect.height, 2))
                paths[number] = estimated_paths(pdf, page)
                # A page of more paths than are searched gets no display list unless it is rendered.
                display = _display_list(page) if paths[number] <= config.max_paths_per_page else None
                infos.append(image_infos(pdf, page, display))
                if display is not None and first <= number <= last and len(kept) < KEPT_DISPLAYS:
                    kept[number] = display
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
                reading = _Page(pdf, pdf[number - 1], number, doc, config, pattern, paths[number],
                                kept.pop(number, None))
                figures, decorations = _page_figures(reading, info, repeated)
            except Exception as exc:  # a malformed page must not stop the document
                result.errors.append(f"page {number}: {_reason(exc)}")
                failed += 1
                continue
            result.errors.extend(reading.errors)
            result.figures.extend(figures)
            result.decorations += decorations
            if figures and page_view_px > 0:
                result.page_views[number] = render_page_view(reading.display, page_view_px)
    finally:
        pdf.close()
    if failed == result.pages:  # not one page could be read: the document is unreadable
        raise ExtractError(f"no readable page ({result.errors[0]})")
    return result
