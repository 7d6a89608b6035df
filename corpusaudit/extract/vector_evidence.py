"""Vector evidence of a page region: its text spans and drawn paths, in figure pixels.

This is what a PDF states exactly (text, font sizes, angles, colours, geometry); checks
read it before they fall back to pixels.
"""

from __future__ import annotations

import contextlib
import gc
import itertools
import math
from dataclasses import dataclass

import numpy as np
import pymupdf

from corpusaudit.model import PathItem, TextSpan, VectorEvidence

CURVE_SAMPLES = 8  # points per cubic Bezier segment: enough to recover arcs of pie wedges
MARKER_SAMPLES = 2  # points per curve of a drawing smaller than SMALL_DRAWING_PX
SMALL_DRAWING_PX = 16.0  # figure pixels: a scatter marker or a glyph, not a wedge or a line


def _bernstein(samples: int) -> np.ndarray:
    """Weights of the samples t = 1/n .. 1 (rows) for the four control points (columns)."""
    t = np.arange(1, samples + 1)[:, None] / samples
    return np.hstack([(1 - t) ** 3, 3 * (1 - t) ** 2 * t, 3 * (1 - t) * t**2, t**3])


_BEZIER_WEIGHTS = {n: _bernstein(n) for n in (CURVE_SAMPLES, MARKER_SAMPLES)}


def _rgb_from_int(value: int) -> tuple[float, float, float]:
    return (((value >> 16) & 255) / 255.0, ((value >> 8) & 255) / 255.0, (value & 255) / 255.0)


def _colour(value) -> tuple[float, float, float] | None:
    if value is None:
        return None
    if len(value) == 1:  # grey
        return (float(value[0]),) * 3
    if len(value) == 4:  # CMYK, naive conversion
        c, m, y, k = value
        return ((1 - c) * (1 - k), (1 - m) * (1 - k), (1 - y) * (1 - k))
    if len(value) == 3:  # the common case, without a generator
        return (float(value[0]), float(value[1]), float(value[2]))
    return tuple(float(v) for v in value[:3])


@dataclass
class _Items:
    """Every item of a list of drawings, flat: a page's thousands of paths are read by numpy
    per kind of item, not item by item."""

    items: list[tuple]
    ops: np.ndarray  # _OPS code of each item
    owner: np.ndarray  # index of each item's drawing
    counts: np.ndarray  # items per drawing

    @classmethod
    def of(cls, drawings: list[dict]) -> "_Items":
        items = [item for drawing in drawings for item in drawing["items"]]
        counts = np.array([len(drawing["items"]) for drawing in drawings], dtype=np.intp)
        ops = np.fromiter(map(_OPS.get, [item[0] for item in items], itertools.repeat(_OTHER)), np.intp, len(items))
        return cls(items, ops, np.repeat(np.arange(len(drawings)), counts), counts)

    def per_drawing(self, flags: np.ndarray) -> np.ndarray:
        """How many items of each drawing have the flag."""
        return np.bincount(self.owner, weights=flags, minlength=len(self.counts)).astype(np.intp)

    def coordinates(self, op: int) -> np.ndarray:
        """The coordinates of the items of one kind, flat in their order: a line's two points, a
        curve's four, a rect's x0, y0, x1, y1, a quad's corners ul, ur, ll, lr."""
        chosen = itertools.compress(self.items, self.ops == op)
        if op == _CURVE:  # unpacked in place: a scatter plot has hundreds of thousands of these
            values = [v for _, (a, b), (c, d), (e, f), (g, h) in chosen for v in (a, b, c, d, e, f, g, h)]
        elif op == _LINE:
            values = [v for _, (a, b), (c, d) in chosen for v in (a, b, c, d)]
        elif op == _RECT:
            values = [v for item in chosen for v in item[1]]
        else:
            values = [v for item in chosen for point in item[1] for v in point]
        return np.array(values, dtype=np.float64)


_LINE, _CURVE, _RECT, _QUAD, _OTHER = range(5)
_OPS = {"l": _LINE, "c": _CURVE, "re": _RECT, "qu": _QUAD}
_VERTICES = np.array([2, 1, 4, 4, 0])  # per item kind; a curve adds its samples to its start point


def rect_columns(drawings: list[dict]) -> np.ndarray:
    """The drawings' rects as an n x 4 array (tuples from get_cdrawings, or Rects)."""
    return np.array([tuple(drawing["rect"]) for drawing in drawings], dtype=np.float64).reshape(-1, 4)


def _longer_sides(rects: np.ndarray) -> np.ndarray:
    """max(Rect.width, Rect.height) of each rect; Rect's sides are max(0, x1 - x0)."""
    width, height = rects[:, 2] - rects[:, 0], rects[:, 3] - rects[:, 1]
    width, height = np.where(width > 0, width, 0.0), np.where(height > 0, height, 0.0)
    return np.where(height > width, height, width)


def _all_path_points(drawings: list[dict], matrix: pymupdf.Matrix, items: _Items) -> list[list[tuple[float, float]]]:
    """Each drawing's vertices through matrix, curves sampled, repeated points dropped.

    Every vertex of every drawing goes through numpy together, in one array laid out as the
    drawings list them (a curve's start point, then the slots of its samples): a scatter plot
    is thousands of tiny drawings of four curves each, too many for per-curve arithmetic in
    Python. An affine map commutes with Bezier evaluation, so control points are transformed
    first. Curves of drawings smaller than SMALL_DRAWING_PX (markers, glyph outlines) get
    MARKER_SAMPLES points: their shape is a few pixels, and their points are most of a
    scatter plot's. A rectangle's corners are kept even where they repeat.
    """
    scale = math.sqrt(abs(matrix.a * matrix.d - matrix.b * matrix.c))
    small = _longer_sides(rect_columns(drawings)) * scale < SMALL_DRAWING_PX
    samples = np.where(small, MARKER_SAMPLES, CURVE_SAMPLES)[items.owner]
    ops = items.ops
    vertices = _VERTICES[ops] + np.where(ops == _CURVE, samples, 0)
    first = np.concatenate([[0], np.cumsum(vertices)])  # each item's first vertex
    total = int(first[-1])
    if total == 0:
        return [[] for _ in drawings]
    starts = np.concatenate([[0], np.cumsum(items.per_drawing(vertices))])  # each drawing's first vertex
    raw = np.zeros((total, 2))
    lines = items.coordinates(_LINE).reshape(-1, 2, 2)
    raw[first[:-1][ops == _LINE][:, None] + np.arange(2)] = lines
    controls = items.coordinates(_CURVE).reshape(-1, 4, 2)
    curve_first = first[:-1][ops == _CURVE]
    raw[curve_first] = controls[:, 0]
    boxes = items.coordinates(_RECT).reshape(-1, 4)
    x0, y0, x1, y1 = boxes.T
    x0, x1 = np.where(x1 < x0, x1, x0), np.where(x1 < x0, x0, x1)  # Rect.normalize
    y0, y1 = np.where(y1 < y0, y1, y0), np.where(y1 < y0, y0, y1)
    corners = first[:-1][ops == _RECT][:, None] + np.arange(4)
    raw[corners] = np.stack([x0, y0, x1, y0, x1, y1, x0, y1], axis=1).reshape(-1, 4, 2)
    quads = items.coordinates(_QUAD).reshape(-1, 4, 2)  # ul, ur, ll, lr
    raw[first[:-1][ops == _QUAD][:, None] + np.arange(4)] = quads[:, [0, 1, 3, 2]]
    affine = np.array([[matrix.a, matrix.b], [matrix.c, matrix.d]])
    shift = np.array([matrix.e, matrix.f])
    points = raw @ affine + shift
    curve_samples = samples[ops == _CURVE]
    for count in (CURVE_SAMPLES, MARKER_SAMPLES):
        chosen = curve_samples == count
        if chosen.any():
            control = controls[chosen] @ affine + shift
            sampled = np.einsum("tk,nkd->ntd", _BEZIER_WEIGHTS[count], control)
            points[(curve_first[chosen] + 1)[:, None] + np.arange(count)] = sampled
    keep = np.ones(len(points), dtype=bool)
    keep[1:] = (points[1:] != points[:-1]).any(axis=1)
    keep[corners.ravel()] = True
    keep[starts[:-1]] = True  # a drawing's first vertex has nothing before it
    bounds = np.searchsorted(np.flatnonzero(keep), starts).tolist()
    kept = points[keep]
    kept = list(zip(kept[:, 0].tolist(), kept[:, 1].tolist()))
    return [kept[bounds[i]:bounds[i + 1]] for i in range(len(drawings))]


def read_drawings(page: pymupdf.Page, extended: bool = False) -> list[dict]:
    """The page's paths as Page.get_cdrawings gives them: rects, points and quads stay tuples
    (a scatter plot's thousands of markers are hundreds of thousands of points, and making each
    a Rect or Point object costs more than reading the page). Keys that get_drawings would add
    as None may be missing. Code here reads them by index and with get, so the output of
    get_drawings works as well; a "re" item's rect may not be normalized, a "qu" item is the
    tuple of its corners ul, ur, ll, lr."""
    return page.get_cdrawings(extended=extended)


def is_rectangular_quad(quad) -> bool:
    """Quad.is_rectangular of a "qu" item's quad (a Quad, or get_cdrawings' tuple of corners)."""
    return bool(pymupdf.Quad(quad).is_rectangular)


def _is_rect(items) -> bool:
    if len(items) == 1 and items[0][0] == "re":
        return True
    if len(items) == 1 and items[0][0] == "qu":
        return is_rectangular_quad(items[0][1])
    if all(item[0] == "l" for item in items) and 3 <= len(items) <= 4:
        corners = {(round(p[0], 2), round(p[1], 2)) for item in items for p in item[1:3]}
        xs = {x for x, _ in corners}
        ys = {y for _, y in corners}
        return len(corners) == 4 and len(xs) == 2 and len(ys) == 2
    return False


def figure_matrix(page: pymupdf.Page, clip: pymupdf.Rect, scale: float) -> pymupdf.Matrix:
    """Unrotated page points -> figure pixels of the region as displayed (page /Rotate applied)."""
    shown = clip * page.rotation_matrix
    return page.rotation_matrix * pymupdf.Matrix(1, 0, 0, 1, -shown.x0, -shown.y0) * pymupdf.Matrix(scale, scale)


def _box(rect, matrix: pymupdf.Matrix) -> tuple[float, float, float, float]:
    """The rectangle through matrix (a page rotation, shift and scale), as (x0, y0, x1, y1)."""
    x0, y0, x1, y1 = rect
    a, b, c, d, e, f = matrix
    xs = (x0 * a + y0 * c + e, x1 * a + y1 * c + e)
    ys = (x0 * b + y0 * d + f, x1 * b + y1 * d + f)
    return (min(xs), min(ys), max(xs), max(ys))


def _boxes(rects: np.ndarray, matrix: pymupdf.Matrix) -> list[tuple[float, float, float, float]]:
    """_box of every row of rects, by the same arithmetic (min and max keep the first of equals)."""
    a, b, c, d, e, f = matrix
    x0, y0, x1, y1 = rects.T
    first_x, second_x = x0 * a + y0 * c + e, x1 * a + y1 * c + e
    first_y, second_y = x0 * b + y0 * d + f, x1 * b + y1 * d + f
    return list(zip(np.where(second_x < first_x, second_x, first_x).tolist(),
                    np.where(second_y < first_y, second_y, first_y).tolist(),
                    np.where(second_x > first_x, second_x, first_x).tolist(),
                    np.where(second_y > first_y, second_y, first_y).tolist()))


@contextlib.contextmanager
def _collector_paused():
    """Pause the cycle collector while a page's paths are built: hundreds of thousands of
    vertex tuples (no cycles among them) would otherwise trigger full collections over and
    over, which cost as much as building them."""
    was_enabled = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if was_enabled:
            gc.enable()


def path_items(drawings: list[dict], matrix: pymupdf.Matrix, scale: float) -> list[PathItem]:
    """PyMuPDF drawings (page points) as PathItems in figure pixels (matrix from figure_matrix)."""
    with _collector_paused():
        return _path_items(drawings, matrix, scale)


def _path_items(drawings: list[dict], matrix: pymupdf.Matrix, scale: float) -> list[PathItem]:
    inked = [d for d in drawings if d.get("type") in ("f", "s", "fs")]  # clip paths and groups carry no ink
    items = _Items.of(inked)
    ops = items.ops
    # a rectangle operator draws a closed subpath (square markers are often one)
    rectangle_operators = items.per_drawing((ops == _RECT) | (ops == _QUAD)) > 0
    paths: list[PathItem] = []
    for drawing, points, bbox, closed_subpath in zip(
            inked, _all_path_points(inked, matrix, items), _boxes(rect_columns(inked), matrix),
            rectangle_operators.tolist()):
        kind = drawing["type"]
        paths.append(PathItem(
            kind=kind,
            bbox=bbox,
            fill=_colour(drawing.get("fill")) if "f" in kind else None,
            stroke=_colour(drawing.get("color")) if "s" in kind else None,
            width=float(drawing.get("width") or 0.0) * scale,
            points=points,
            closed=bool(drawing.get("closePath")) or (len(points) > 2 and points[0] == points[-1]) or closed_subpath,
            is_rect=_is_rect(drawing["items"]),
            dashes=str(drawing.get("dashes") or ""),
            # 0.0 is a real opacity (invisible ink); only a missing value means opaque
            fill_opacity=1.0 if drawing.get("fill_opacity") is None else float(drawing["fill_opacity"]),
            stroke_opacity=1.0 if drawing.get("stroke_opacity") is None else float(drawing["stroke_opacity"]),
        ))
    return paths


TEXT_FLAGS = pymupdf.TEXT_PRESERVE_WHITESPACE | pymupdf.TEXT_PRESERVE_LIGATURES | pymupdf.TEXT_MEDIABOX_CLIP


def unrotated_display(page: pymupdf.Page, display: pymupdf.DisplayList | None) -> pymupdf.DisplayList | None:
    """display when it holds the page in unrotated coordinates (those of its text and
    drawings), else None. Reading text or images from a display list replays it instead of
    interpreting the page's content again, several times faster; on a rotated page the
    display list is rotated."""
    return display if display is not None and page.rotation == 0 else None


def read_text(page: pymupdf.Page, display: pymupdf.DisplayList | None = None) -> dict:
    """The page's text as PyMuPDF's "dict", read once (no image blocks: they carry image bytes),
    from the page's display list where unrotated_display allows (the same dict)."""
    display = unrotated_display(page, display)
    if display is None:
        return page.get_text("dict", flags=TEXT_FLAGS)
    return pymupdf.TextPage(display.get_textpage(flags=TEXT_FLAGS)).extractDICT(cb=page.cropbox)


def read_text_runs(page: pymupdf.Page, display: pymupdf.DisplayList | None = None) -> dict:
    """The page's text as drawn: each text-showing run its own line, not joined to its
    neighbours (read_text joins runs that touch into one span)."""
    display = unrotated_display(page, display)
    flags = TEXT_FLAGS | pymupdf.TEXT_PRESERVE_SPANS
    if display is None:
        return page.get_text("dict", flags=flags)
    return pymupdf.TextPage(display.get_textpage(flags=flags)).extractDICT(cb=page.cropbox)


def _page_spans(data: dict, clip: pymupdf.Rect):
    """(line, span) of every non-blank span whose centre lies in clip."""
    for block in data["blocks"]:
        if block.get("type", 0) != 0:
            continue
        bx0, by0, bx1, by1 = block["bbox"]
        if bx0 > clip.x1 or bx1 < clip.x0 or by0 > clip.y1 or by1 < clip.y0:
            continue
        for line in block.get("lines", ()):
            for span in line["spans"]:
                x0, y0, x1, y1 = span["bbox"]
                if span["text"].strip() and clip.x0 <= (x0 + x1) / 2 <= clip.x1 and clip.y0 <= (y0 + y1) / 2 <= clip.y1:
                    yield line, span


def _runs_by_row(runs: dict, clip: pymupdf.Rect) -> dict[tuple[float, float], list[tuple[str, tuple]]]:
    """Text runs inside clip grouped by their row (top and bottom, to 0.1 pt)."""
    rows: dict[tuple[float, float], list[tuple[str, tuple]]] = {}
    for _, span in _page_spans(runs, clip):
        x0, y0, x1, y1 = span["bbox"]
        rows.setdefault((round(y0, 1), round(y1, 1)), []).append((span["text"].strip(), (x0, y0, x1, y1)))
    return rows


def _joined_runs(bbox: tuple, rows: dict, matrix: pymupdf.Matrix) -> tuple[tuple[str, tuple], ...]:
    """The runs of one row that lie within a span's box, in figure pixels; () for a single run."""
    x0, y0, x1, y1 = bbox
    inside = [(text, box) for text, box in rows.get((round(y0, 1), round(y1, 1)), ())
              if box[0] >= x0 - 0.5 and box[2] <= x1 + 0.5]
    if len(inside) < 2:
        return ()
    return tuple((text, _box(box, matrix)) for text, box in sorted(inside, key=lambda run: run[1][0]))


def text_spans(page: pymupdf.Page, clip: pymupdf.Rect, scale: float, text: dict | None = None,
               runs: dict | None = None) -> list[TextSpan]:
    """Text spans inside clip with their size (pt), angle (degrees) and colour, in figure pixels.

    text, runs: the page's read_text() and read_text_runs() when already read; spans are kept
    when their centre is in clip. A span joined from several drawn runs keeps them (TextSpan.runs).
    """
    matrix = figure_matrix(page, clip, scale)
    data = read_text(page) if text is None else text
    rows = _runs_by_row(read_text_runs(page) if runs is None else runs, clip)
    spans: list[TextSpan] = []
    for line, span in _page_spans(data, clip):
        cos, sin = line["dir"]
        # direction as displayed: the rotation part of the page matrix, y grows downwards
        shown_cos = cos * matrix.a + sin * matrix.c
        shown_sin = cos * matrix.b + sin * matrix.d
        bbox = span["bbox"]
        spans.append(TextSpan(
            text=span["text"].strip(), bbox=_box(bbox, matrix), size_pt=round(float(span["size"]), 2),
            angle=round(math.degrees(math.atan2(-shown_sin, shown_cos)), 2) + 0.0,  # +0.0 drops -0.0
            colour=_rgb_from_int(int(span["color"])), font=span.get("font", ""),
            runs=_joined_runs(bbox, rows, matrix),
        ))
    return spans


def vector_evidence(page: pymupdf.Page, clip: pymupdf.Rect, scale: float, drawings: list[dict] | None = None,
                    text: dict | None = None, runs: dict | None = None) -> VectorEvidence:
    """Evidence for the region clip (unrotated page points, as PyMuPDF reports drawings and text).

    Figure pixels are those of the region rendered as displayed (page rotation applied) at
    scale pixels per point. drawings, text and runs may be passed when already read.
    """
    if drawings is None:
        drawings = read_drawings(page)
    # Compare coordinates: axis lines have zero-height rects, which Rect.intersects rejects.
    x0, y0, x1, y1 = clip
    inside = [d for d in drawings for rect in (d["rect"],)
              if rect[0] <= x1 and rect[2] >= x0 and rect[1] <= y1 and rect[3] >= y0]
    matrix = figure_matrix(page, clip, scale)
    return VectorEvidence(texts=text_spans(page, clip, scale, text, runs),
                          paths=path_items(inside, matrix, scale), scale=scale)


def figure_from_chart_pdf(pdf: bytes, figure_id: str, chart_type: str = "", dpi: int = 150):
    """A vector Figure from a one-page chart PDF placed on a letter page, read back as extraction would.

    For fixtures and benchmarks whose truth is the chart itself (no page layout to find).
    Paths are read as extraction reads them: cut to their clip (visible_drawings)."""
    from corpusaudit.extract.pdf import visible_drawings
    from corpusaudit.model import Figure

    source = pymupdf.open("pdf", pdf)
    page = pymupdf.open().new_page(width=612, height=792)
    rect = pymupdf.Rect(36, 60, 36 + source[0].rect.width, 60 + source[0].rect.height)
    page.show_pdf_page(rect, source, 0)
    evidence = vector_evidence(page, rect, dpi / 72.0, drawings=visible_drawings(page))
    pix = page.get_pixmap(dpi=dpi, clip=rect, alpha=False)
    pixels = np.frombuffer(pix.samples, np.uint8).reshape(pix.height, pix.width, pix.n)[:, :, :3].copy()
    return Figure(figure_id=figure_id, document_id="fixture", path=f"{figure_id}.pdf", page=1, index=0,
                  bbox=(rect.x0, rect.y0, rect.x1, rect.y1), source="vector", width_px=pixels.shape[1],
                  height_px=pixels.shape[0], pixels=pixels, vector=evidence, chart_type=chart_type)
