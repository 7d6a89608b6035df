"""Vector evidence of a page region: its text spans and drawn paths, in figure pixels.

This is what a PDF states exactly (text, font sizes, angles, colours, geometry); checks
read it before they fall back to pixels.
"""

from __future__ import annotations

import contextlib
import gc
import math

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
    return tuple(float(v) for v in value[:3])


def _all_path_points(drawings: list[dict], matrix: pymupdf.Matrix) -> list[list[tuple[float, float]]]:
    """Each drawing's vertices through matrix, curves sampled, repeated points dropped.

    All drawings of a region go through numpy together: a scatter plot is thousands of tiny
    drawings of four curves each, too many for per-curve arithmetic in Python. An affine map
    commutes with Bezier evaluation, so control points are transformed first. Curves of
    drawings smaller than SMALL_DRAWING_PX (markers, glyph outlines) get MARKER_SAMPLES points:
    their shape is a few pixels, and their points are most of a scatter plot's.
    """
    scale = math.sqrt(abs(matrix.a * matrix.d - matrix.b * matrix.c))
    raw: list[float] = []  # x, y of each vertex in page points (flat: numpy reads floats faster than pairs)
    keep_repeat: list[int] = []  # indices of rectangle corners, kept even when repeated
    curves = {CURVE_SAMPLES: ([], []), MARKER_SAMPLES: ([], [])}  # samples -> (flat control points, slots)
    starts: list[int] = []
    for drawing in drawings:
        starts.append(len(raw) // 2)
        rect = drawing["rect"]
        samples = MARKER_SAMPLES if max(rect.width, rect.height) * scale < SMALL_DRAWING_PX else CURVE_SAMPLES
        controls, slots = curves[samples]
        placeholder = [0.0] * (2 * samples)
        for item in drawing["items"]:
            op = item[0]
            if op == "l":
                raw += (item[1][0], item[1][1], item[2][0], item[2][1])
            elif op == "c":
                p0, p1, p2, p3 = item[1:5]
                raw += (p0[0], p0[1])
                slots.append(len(raw) // 2)
                controls += (p0[0], p0[1], p1[0], p1[1], p2[0], p2[1], p3[0], p3[1])
                raw += placeholder
            elif op == "re":
                box = item[1]
                first = len(raw) // 2
                keep_repeat += range(first, first + 4)
                raw += (box.x0, box.y0, box.x1, box.y0, box.x1, box.y1, box.x0, box.y1)
            elif op == "qu":
                quad = item[1]
                for corner in (quad.ul, quad.ur, quad.lr, quad.ll):
                    raw += (corner.x, corner.y)
    if not raw:
        return [[] for _ in drawings]
    affine = np.array([[matrix.a, matrix.b], [matrix.c, matrix.d]])
    shift = np.array([matrix.e, matrix.f])
    points = np.array(raw, dtype=np.float64).reshape(-1, 2) @ affine + shift
    for samples, (controls, slots) in curves.items():
        if controls:
            control = np.array(controls, dtype=np.float64).reshape(-1, 4, 2) @ affine + shift
            sampled = np.einsum("tk,nkd->ntd", _BEZIER_WEIGHTS[samples], control)
            points[np.array(slots)[:, None] + np.arange(samples)] = sampled
    keep = np.ones(len(points), dtype=bool)
    keep[1:] = (points[1:] != points[:-1]).any(axis=1)
    keep[keep_repeat] = True
    keep[starts] = True  # a drawing's first vertex has nothing before it
    bounds = np.searchsorted(np.flatnonzero(keep), starts + [len(points)])
    kept = list(map(tuple, points[keep].tolist()))
    return [kept[bounds[i]:bounds[i + 1]] for i in range(len(drawings))]


def fast_rect(x0: float, y0: float, x1: float, y1: float) -> pymupdf.Rect:
    """pymupdf.Rect(x0, y0, x1, y1) without its general argument parsing, about eight times
    faster: a scatter plot's page has tens of thousands of paths, each with rects."""
    rect = pymupdf.Rect.__new__(pymupdf.Rect)
    rect.x0, rect.y0, rect.x1, rect.y1 = float(x0), float(y0), float(x1), float(y1)
    return rect


_PATH_KEYS = ("closePath", "fill", "color", "width", "lineCap", "lineJoin", "dashes", "stroke_opacity",
              "fill_opacity", "even_odd")


def read_drawings(page: pymupdf.Page, extended: bool = False) -> list[dict]:
    """The page's paths as Page.get_drawings gives them, except that line and curve points stay
    (x, y) tuples: a scatter plot's thousands of markers are hundreds of thousands of points, and
    making each a Point object costs more than reading the page. Rects, quads, clip scissors and
    path boxes are converted as get_drawings does; code reads points by index, so either works."""
    drawings = page.get_cdrawings(extended=extended)
    for drawing in drawings:
        kind = drawing["type"]
        if kind.startswith("clip"):
            drawing["scissor"] = fast_rect(*drawing["scissor"])
        else:
            drawing["rect"] = fast_rect(*drawing["rect"])
        if kind != "group":
            drawing["items"] = [("re", fast_rect(*item[1]).normalize(), item[2]) if item[0] == "re"
                                else ("qu", pymupdf.Quad(item[1])) if item[0] == "qu" else item
                                for item in drawing["items"]]
        if kind in ("f", "s"):
            for key in _PATH_KEYS:
                drawing.setdefault(key, None)
    return drawings


def _is_rect(items) -> bool:
    if len(items) == 1 and items[0][0] == "re":
        return True
    if len(items) == 1 and items[0][0] == "qu":
        return bool(items[0][1].is_rectangular)
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
    paths: list[PathItem] = []
    for drawing, points in zip(inked, _all_path_points(inked, matrix)):
        kind = drawing["type"]
        paths.append(PathItem(
            kind=kind,
            bbox=_box(drawing["rect"], matrix),
            fill=_colour(drawing.get("fill")) if "f" in kind else None,
            stroke=_colour(drawing.get("color")) if "s" in kind else None,
            width=float(drawing.get("width") or 0.0) * scale,
            points=points,
            # a rectangle operator draws a closed subpath (square markers are often one)
            closed=bool(drawing.get("closePath")) or (len(points) > 2 and points[0] == points[-1])
            or any(item[0] in ("re", "qu") for item in drawing["items"]),
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
    inside = [d for d in drawings if d["rect"].x0 <= clip.x1 and d["rect"].x1 >= clip.x0
              and d["rect"].y0 <= clip.y1 and d["rect"].y1 >= clip.y0]
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
