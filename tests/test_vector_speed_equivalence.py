"""The vectorised reading of vector drawings gives exactly what a straightforward per-item
reading of PyMuPDF's own Page.get_drawings gives: the same painted paths and clip cuts, the
same PathItems (every field, -0.0 included), the same regions and verdicts, the same marker
measurements and path areas.

The reference functions below read get_drawings' Rect, Point and Quad objects one item at a
time, as extraction did before it read get_cdrawings' tuples into numpy."""

from __future__ import annotations

import io
import math

import cv2
import matplotlib

matplotlib.use("Agg")

import numpy as np
import pymupdf
import pytest
from matplotlib.figure import Figure as MplFigure

from corpusaudit.extract import regions
from corpusaudit.extract.pdf import GRAPHIC_PAGE_SHARE, visible_drawings
from corpusaudit.extract.vector_evidence import (CURVE_SAMPLES, MARKER_SAMPLES, SMALL_DRAWING_PX, _colour,
                                                   figure_matrix, path_items)
from corpusaudit.measure import scatter, shapes
from corpusaudit.model import BBox, Figure, MeasurementUnavailable, PathItem, VectorEvidence

# ------------------------------------------------------------------ per-item reference readings


def reference_visible_drawings(page: pymupdf.Page) -> list[dict]:
    """Painted paths of get_drawings(extended=True), each rect cut to its clip path's box."""
    page_area = abs(page.cropbox.width * page.cropbox.height)
    clips, painted = [], []
    for number, entry in enumerate(page.get_drawings(extended=True)):
        level = entry.get("level", 0)
        while clips and clips[-1][0] >= level:
            clips.pop()
        if entry["type"] == "clip":
            scissor = entry["scissor"]
            graphic = clips[-1][2] if clips else None
            if clips:
                scissor = None if clips[-1][1] is None else _reference_cut(scissor, clips[-1][1])
            if graphic is None and scissor is not None and \
                    scissor.width * scissor.height < GRAPHIC_PAGE_SHARE * page_area:
                graphic = number
            clips.append((level, scissor, graphic))
            continue
        if entry["type"] not in ("f", "s", "fs"):
            continue
        entry["graphic"] = clips[-1][2] if clips else None
        if clips:
            shown = None if clips[-1][1] is None else _reference_cut(entry["rect"], clips[-1][1])
            if shown is None:
                continue
            entry["rect"] = shown
        painted.append(entry)
    return painted


def _reference_cut(rect: pymupdf.Rect, clip: pymupdf.Rect) -> pymupdf.Rect | None:
    x0, y0, x1, y1 = max(rect.x0, clip.x0), max(rect.y0, clip.y0), min(rect.x1, clip.x1), min(rect.y1, clip.y1)
    if x0 > x1 or y0 > y1:
        return None
    rect = pymupdf.Rect()
    rect.x0, rect.y0, rect.x1, rect.y1 = x0, y0, x1, y1
    return rect


def _bernstein(samples: int) -> np.ndarray:
    t = np.arange(1, samples + 1)[:, None] / samples
    return np.hstack([(1 - t) ** 3, 3 * (1 - t) ** 2 * t, 3 * (1 - t) * t**2, t**3])


def reference_points(drawings: list[dict], matrix: pymupdf.Matrix) -> list[list[tuple[float, float]]]:
    """Each drawing's vertices, item by item into one list, then through numpy as extraction does."""
    scale = math.sqrt(abs(matrix.a * matrix.d - matrix.b * matrix.c))
    raw, keep_repeat, starts = [], [], []
    curves = {CURVE_SAMPLES: ([], []), MARKER_SAMPLES: ([], [])}
    for drawing in drawings:
        starts.append(len(raw) // 2)
        rect = drawing["rect"]
        samples = MARKER_SAMPLES if max(rect.width, rect.height) * scale < SMALL_DRAWING_PX else CURVE_SAMPLES
        controls, slots = curves[samples]
        for item in drawing["items"]:
            if item[0] == "l":
                raw += (item[1].x, item[1].y, item[2].x, item[2].y)
            elif item[0] == "c":
                p0, p1, p2, p3 = item[1:5]
                raw += (p0.x, p0.y)
                slots.append(len(raw) // 2)
                controls += (p0.x, p0.y, p1.x, p1.y, p2.x, p2.y, p3.x, p3.y)
                raw += [0.0] * (2 * samples)
            elif item[0] == "re":
                box, first = item[1], len(raw) // 2
                keep_repeat += range(first, first + 4)
                raw += (box.x0, box.y0, box.x1, box.y0, box.x1, box.y1, box.x0, box.y1)
            elif item[0] == "qu":
                for corner in (item[1].ul, item[1].ur, item[1].lr, item[1].ll):
                    raw += (corner.x, corner.y)
    if not raw:
        return [[] for _ in drawings]
    affine = np.array([[matrix.a, matrix.b], [matrix.c, matrix.d]])
    shift = np.array([matrix.e, matrix.f])
    points = np.array(raw, dtype=np.float64).reshape(-1, 2) @ affine + shift
    for samples, (controls, slots) in curves.items():
        if controls:
            control = np.array(controls, dtype=np.float64).reshape(-1, 4, 2) @ affine + shift
            sampled = np.einsum("tk,nkd->ntd", _bernstein(samples), control)
            points[np.array(slots)[:, None] + np.arange(samples)] = sampled
    keep = np.ones(len(points), dtype=bool)
    keep[1:] = (points[1:] != points[:-1]).any(axis=1)
    keep[keep_repeat] = True
    keep[starts] = True
    bounds = np.searchsorted(np.flatnonzero(keep), starts + [len(points)])
    kept = [(float(x), float(y)) for x, y in points[keep]]
    return [kept[bounds[i]:bounds[i + 1]] for i in range(len(drawings))]


def _reference_is_rect(items) -> bool:
    if len(items) == 1 and items[0][0] == "re":
        return True
    if len(items) == 1 and items[0][0] == "qu":
        return bool(items[0][1].is_rectangular)
    if all(item[0] == "l" for item in items) and 3 <= len(items) <= 4:
        corners = {(round(p.x, 2), round(p.y, 2)) for item in items for p in item[1:3]}
        return len(corners) == 4 and len({x for x, _ in corners}) == 2 and len({y for _, y in corners}) == 2
    return False


def reference_path_items(drawings: list[dict], matrix: pymupdf.Matrix, scale: float) -> list[PathItem]:
    inked = [d for d in drawings if d.get("type") in ("f", "s", "fs")]
    paths = []
    for drawing, points in zip(inked, reference_points(inked, matrix)):
        kind, rect = drawing["type"], drawing["rect"]
        a, b, c, d, e, f = matrix
        xs = (rect.x0 * a + rect.y0 * c + e, rect.x1 * a + rect.y1 * c + e)
        ys = (rect.x0 * b + rect.y0 * d + f, rect.x1 * b + rect.y1 * d + f)
        paths.append(PathItem(
            kind=kind, bbox=(min(xs), min(ys), max(xs), max(ys)),
            fill=_colour(drawing.get("fill")) if "f" in kind else None,
            stroke=_colour(drawing.get("color")) if "s" in kind else None,
            width=float(drawing.get("width") or 0.0) * scale, points=points,
            closed=bool(drawing.get("closePath")) or (len(points) > 2 and points[0] == points[-1])
            or any(item[0] in ("re", "qu") for item in drawing["items"]),
            is_rect=_reference_is_rect(drawing["items"]), dashes=str(drawing.get("dashes") or ""),
            fill_opacity=1.0 if drawing.get("fill_opacity") is None else float(drawing["fill_opacity"]),
            stroke_opacity=1.0 if drawing.get("stroke_opacity") is None else float(drawing["stroke_opacity"])))
    return paths


def _reference_paint(mask: np.ndarray, drawing: dict, page_area: float) -> None:
    rect, s = drawing["rect"], regions.MASK_PX_PER_PT
    x0, y0 = int(max(rect.x0 * s, 0)), int(max(rect.y0 * s, 0))
    x1, y1 = int(min(rect.x1 * s, mask.shape[1] - 1)), int(min(rect.y1 * s, mask.shape[0] - 1))
    if x1 < x0 or y1 < y0:
        return
    if rect.width * rect.height > 0.05 * page_area and "f" not in drawing.get("type", ""):
        for item in drawing["items"]:
            points = [item[1], item[2]] if item[0] == "l" else \
                [item[1].tl, item[1].tr, item[1].br, item[1].bl, item[1].tl] if item[0] == "re" else \
                [item[1].ul, item[1].ur, item[1].lr, item[1].ll, item[1].ul] if item[0] == "qu" else \
                [item[1], item[4]]
            polyline = np.array([[p[0] * s - x0, p[1] * s - y0] for p in points], dtype=np.int32)
            cv2.polylines(mask[y0:y1 + 1, x0:x1 + 1], [polyline], False, 1, 1)
        return
    mask[y0:y1 + 1, x0:x1 + 1] = 1


def reference_group_ink(bounds, drawings, pictures, merge_pt=regions.PATH_MERGE_PT, only=None):
    m = regions.MASK_PX_PER_PT
    width, height = int(bounds.width * m) + 2, int(bounds.height * m) + 2
    mask = np.zeros((height, width), dtype=np.uint8)
    page_area = bounds.get_area()
    used = []
    for index in range(len(drawings)) if only is None else only:
        drawing = drawings[index]
        rect = drawing["rect"]
        if rect.width * rect.height >= regions.BACKGROUND_PAGE_SHARE * page_area and "f" in drawing.get("type", ""):
            continue
        _reference_paint(mask, drawing, page_area)
        used.append(index)
    for rect in pictures:
        mask[int(max(rect.y0 * m, 0)):int(rect.y1 * m) + 1, int(max(rect.x0 * m, 0)):int(rect.x1 * m) + 1] = 1
    radius = int(round(merge_pt * m / 2))
    grown = cv2.dilate(mask, cv2.getStructuringElement(cv2.MORPH_RECT, (2 * radius + 1, 2 * radius + 1)))
    _, labels = cv2.connectedComponents(grown, connectivity=8)
    found: dict[int, regions.Region] = {}
    for index in used:
        rect, items = drawings[index]["rect"], drawings[index]["items"]
        first = items[0] if items else None
        if first is not None and first[0] in ("l", "c") and rect.x0 <= first[1][0] <= rect.x1 \
                and rect.y0 <= first[1][1] <= rect.y1:
            x, y = int(first[1][0] * m), int(first[1][1] * m)
        else:
            x, y = int(rect.x0 * m), int(rect.y0 * m)
        label = int(labels[min(max(y, 0), height - 1), min(max(x, 0), width - 1)])
        if label:
            found.setdefault(label, regions.Region()).paths.append(index)
    for index, rect in enumerate(pictures):
        cx, cy = int((rect.x0 + rect.x1) / 2 * m), int((rect.y0 + rect.y1) / 2 * m)
        found.setdefault(int(labels[min(max(cy, 0), height - 1), min(max(cx, 0), width - 1)]),
                         regions.Region()).pictures.append(index)
    for region in found.values():
        rects = [drawings[i]["rect"] for i in region.paths] + [pictures[i] for i in region.pictures]
        box = (min(r.x0 for r in rects), min(r.y0 for r in rects), max(r.x1 for r in rects), max(r.y1 for r in rects))
        region.box = pymupdf.Rect(max(box[0], bounds.x0), max(box[1], bounds.y0),
                                  min(box[2], bounds.x1), min(box[3], bounds.y1))
    return list(found.values())


# ------------------------------------------------------------------ pages with many kinds of paths


def _matplotlib_pdf(draw, size=(4, 3)) -> bytes:
    fig = MplFigure(figsize=size)
    draw(fig.add_subplot(111))
    buffer = io.BytesIO()
    fig.savefig(buffer, format="pdf")
    return buffer.getvalue()


def _scatter(ax):
    rng = np.random.default_rng(3)
    for marker in ("o", "s", "^", "D", "x", "+"):
        ax.scatter(rng.normal(0, 1, 150), rng.normal(0, 1, 150), marker=marker, s=rng.uniform(4, 60, 150))
    ax.set_xlim(-1.5, 1.5)  # markers beyond the axes are clipped


def _charts(ax):
    ax.bar(["a", "b", "c", "d"], [3, -1, 4, 2], hatch="//")
    ax.plot([0, 1, 2, 3], [1, 3, 2, 5], "--", marker="o")
    ax.fill_between([0, 1, 2, 3], [0, 1, 0, 2], alpha=0.3)
    ax.set_ylim(0.5, 4)


def _pie(ax):
    ax.pie([5, 3, 2, 1], labels=["w", "x", "y", "z"], explode=[0.1, 0, 0, 0], shadow=True)


def _shapes_page(doc: pymupdf.Document, rotation: int) -> None:
    """Rects, quads, lines, curves and polygons of pymupdf's own drawing, a frame larger than a
    twentieth of the page, paths off the page and zero-size ones; a dense grid of squares."""
    page = doc.new_page(width=500, height=700)
    shape = page.new_shape()
    shape.draw_rect(pymupdf.Rect(5, 5, 495, 695))
    shape.finish(color=(0, 0, 0), fill=None, width=0.5)  # a large outline: painted as its outline
    shape.draw_rect(pymupdf.Rect(120, 60, 30, 20))  # a rect given with its corners swapped
    shape.finish(color=(0.2, 0.4, 0.6), fill=(1, 0.9, 0.1))
    shape.draw_quad(pymupdf.Quad((40, 100), (90, 90), (50, 150), (100, 140)))
    shape.finish(color=(0, 0, 1), fill=(0, 1, 0.5), fill_opacity=0.5)
    shape.draw_quad(pymupdf.Rect(200, 100, 260, 130).quad)
    shape.finish(fill=(0.5,) * 3, color=None)
    shape.draw_polyline([(300, 100), (340, 100), (340, 140), (300, 140)])
    shape.finish(color=(1, 0, 0), closePath=True)
    shape.draw_polyline([(300, 200), (340, 200), (340, 240)])
    shape.finish(color=(1, 0, 1), dashes="[3 2] 0")
    shape.draw_bezier((50, 300), (80, 200), (120, 400), (160, 300))
    shape.finish(color=(0, 0.5, 0), width=2)
    shape.draw_circle((300, 350), 40)
    shape.finish(color=(0, 0, 0), fill=(0.9, 0.1, 0.1), even_odd=True)
    shape.draw_circle((420, 380), 3)
    shape.finish(fill=(0, 0, 0), color=None)
    shape.draw_line((-50, 500), (80, 500))  # starts off the page
    shape.finish(color=(0, 0, 0))
    shape.draw_line((100, 520), (100, 520))  # a point
    shape.finish(color=(0, 0, 0))
    shape.draw_rect(pymupdf.Rect(0, 0, 500, 700))
    shape.finish(fill=(0.98, 0.98, 1), color=None)  # a page background
    for k in range(4500):  # more than are painted one by one
        x, y = 20 + (k % 90) * 5, 560 + (k // 90) * 2.5
        shape.draw_rect(pymupdf.Rect(x, y, x + 3, y + 1.5))
        shape.finish(fill=(0.1, 0.2, 0.8), color=None)
    shape.commit()
    page.set_rotation(rotation)


@pytest.fixture(scope="module")
def pages() -> pymupdf.Document:
    doc = pymupdf.open()
    for rotation, draw in ((0, _scatter), (90, _charts), (180, _pie), (270, _scatter)):
        page = doc.new_page(width=612, height=792)
        with pymupdf.open("pdf", _matplotlib_pdf(draw)) as src:
            page.show_pdf_page(pymupdf.Rect(50, 60, 450, 360), src, 0)
            page.show_pdf_page(pymupdf.Rect(200, 300, 560, 570), src, 0, rotate=90)  # overlaps the first
        page.set_rotation(rotation)
    for rotation in (0, 90):
        _shapes_page(doc, rotation)
    yield doc
    doc.close()


def _pages(doc):
    return [doc[i] for i in range(doc.page_count)]


def _rect_tuple(rect) -> tuple:
    return (rect.x0, rect.y0, rect.x1, rect.y1) if isinstance(rect, pymupdf.Rect) else tuple(rect)


def test_visible_drawings_match_a_reading_of_get_drawings(pages):
    for page in _pages(pages):
        new, reference = visible_drawings(page), reference_visible_drawings(page)
        assert len(new) == len(reference) > 0
        assert repr([(_rect_tuple(d["rect"]), d["graphic"], d["type"]) for d in new]) == \
            repr([(_rect_tuple(d["rect"]), d["graphic"], d["type"]) for d in reference])


@pytest.mark.parametrize("scale", [150 / 72, 1.0, 0.37])
def test_path_items_match_a_per_item_reading_of_get_drawings(pages, scale):
    for page in _pages(pages):
        new, reference = visible_drawings(page), reference_visible_drawings(page)
        for clip in (page.rect, pymupdf.Rect(60, 80, 300, 330)):
            matrix = figure_matrix(page, clip, scale)
            expected = reference_path_items(reference, matrix, scale)
            found = path_items(new, matrix, scale)
            assert found == expected
            assert repr(found) == repr(expected)  # signed zeros and float types too
            # get_drawings' own objects go through the same code
            assert repr(path_items(reference, matrix, scale)) == repr(expected)


def test_path_items_of_the_page_cover_every_kind_of_item(pages):
    items = {item[0] for page in _pages(pages) for d in visible_drawings(page) for item in d["items"]}
    assert items == {"l", "c", "re", "qu"}
    found = [p for page in _pages(pages)
             for p in path_items(visible_drawings(page), figure_matrix(page, page.rect, 2), 2)]
    assert any(p.is_rect for p in found) and any(p.closed and not p.is_rect for p in found)
    assert any(len(p.points) == 1 for p in found)  # the zero-length line


def test_group_ink_and_verdicts_match_the_per_path_reading(pages):
    for page in _pages(pages):
        bounds = pymupdf.Rect(0, 0, page.cropbox.width, page.cropbox.height)
        new, reference = visible_drawings(page), reference_visible_drawings(page)
        pictures = [pymupdf.Rect(400, 650, 480, 690)]
        for merge_pt, only in ((regions.PATH_MERGE_PT, None), (regions.SCATTER_MERGE_PT, list(range(0, len(new), 3)))):
            found = regions.group_ink(bounds, new, pictures, merge_pt, only)
            expected = reference_group_ink(bounds, reference, pictures, merge_pt, only)
            assert [(r.paths, r.pictures, tuple(r.box)) for r in found] == \
                [(r.paths, r.pictures, tuple(r.box)) for r in expected]
            assert [regions.vector_verdict(r, new, [], 36.0) for r in found] == \
                [regions.vector_verdict(r, reference, [], 36.0) for r in expected]
        # get_drawings' own objects group the same way
        assert [(r.paths, tuple(r.box)) for r in regions.group_ink(bounds, reference, [])] == \
            [(r.paths, tuple(r.box)) for r in reference_group_ink(bounds, reference, [])]


@pytest.mark.parametrize("count", [0, 1, 50, regions.WINDOWS_ONE_BY_ONE + 1])
def test_windows_painted_at_once_are_the_windows_painted_one_by_one(count):
    rng = np.random.default_rng(count)
    height, width = 90, 70
    x0, y0 = rng.integers(0, width, count), rng.integers(0, height, count)
    windows = np.stack([x0, y0, np.minimum(x0 + rng.integers(0, 9, count), width - 1),
                        np.minimum(y0 + rng.integers(0, 9, count), height - 1)], axis=1).reshape(-1, 4)
    expected = np.zeros((height, width), np.uint8)
    for a, b, c, d in windows.tolist():
        expected[b:d + 1, a:c + 1] = 1
    found = np.zeros((height, width), np.uint8)
    regions._fill_windows(found, windows)
    assert np.array_equal(found, expected)


def test_mask_windows_are_those_of_int_min_and_max():
    rng = np.random.default_rng(1)
    width, height = 40, 30
    values = np.concatenate([rng.uniform(-60, 60, (500, 4)), rng.uniform(-1e30, 1e30, (50, 4)),
                             [[-0.0, -0.0, -0.0, -0.0], [1e300, 2.0, -1e300, 5.0], [39.99, 29.99, 40.5, 30.0]]])
    found = regions._painted_windows(values, width, height)
    for rect, window in zip(values.tolist(), found.tolist()):
        x0, y0 = int(max(rect[0], 0)), int(max(rect[1], 0))
        x1, y1 = int(min(rect[2], width - 1)), int(min(rect[3], height - 1))
        assert (x1 < x0 or y1 < y0) == (window[2] < window[0] or window[3] < window[1])
        if x0 <= x1 and y0 <= y1:
            assert window == [x0, y0, x1, y1]


@pytest.mark.parametrize("bad", [math.nan, math.inf])
def test_a_path_box_that_is_not_finite_fails_as_int_does(bad):
    with pytest.raises(ValueError if math.isnan(bad) else OverflowError) as reference:
        int(bad)
    values = np.array([[1.0, 2.0, 3.0, 4.0], [bad, 1.0, 5.0, 5.0]])
    with pytest.raises(type(reference.value), match=str(reference.value)):
        regions._painted_windows(values, 40, 30)


# ------------------------------------------------------------------ measurements


def reference_vector_markers(figure: Figure, plot: BBox, frames: list[BBox]) -> scatter.Markers:
    size = 0.06 * max(plot[2] - plot[0], plot[3] - plot[1])
    boxes = []
    for path in figure.vector.paths:
        x0, y0, x1, y1 = path.bbox
        if not path.closed or path.is_rect and "f" in path.kind and max(x1 - x0, y1 - y0) > size:
            continue
        if max(x1 - x0, y1 - y0) > size or max(x1 - x0, y1 - y0) < 1.0:
            continue
        if shapes.intersect(path.bbox, plot) is None or any(shapes.contains(f, path.bbox, 1.0) for f in frames):
            continue
        boxes.append(path.bbox)
    if len(boxes) < 3:
        raise MeasurementUnavailable("fewer than three markers found")
    array = np.array(boxes)
    centres = np.column_stack([(array[:, 0] + array[:, 2]) / 2, (array[:, 1] + array[:, 3]) / 2])
    radii = np.maximum((array[:, 2] - array[:, 0]), (array[:, 3] - array[:, 1])) / 2
    scale = 2.0
    width = int((plot[2] - plot[0] + 4 * radii.max()) * scale) + 2
    height = int((plot[3] - plot[1] + 4 * radii.max()) * scale) + 2
    origin = np.array([plot[0] - 2 * radii.max(), plot[1] - 2 * radii.max()])
    canvas = np.zeros((height, width), np.uint8)
    own = 0.0
    for (cx, cy), r in zip(centres, radii):
        centre = tuple(int(round(v)) for v in ((np.array([cx, cy]) - origin) * scale))
        radius = max(1, int(round(r * scale)))
        cv2.circle(canvas, centre, radius, 1, thickness=-1)
        own += scatter._disk_pixels(radius)
    edge = [tuple(b) for b in boxes
            if b[0] < plot[0] + 0.5 or b[1] < plot[1] + 0.5 or b[2] > plot[2] - 0.5 or b[3] > plot[3] - 0.5]
    return scatter.Markers(count=len(boxes), radius=float(np.median(radii)),
                           hidden_share=float(max(0.0, 1.0 - canvas.sum() / own)), edge_count=len(edge),
                           edge_boxes=tuple(edge), dense_region=scatter._dense_region(centres, plot))


def _figure(paths: list[PathItem]) -> Figure:
    return Figure(figure_id="f", document_id="d", path="p.pdf", page=1, index=0, bbox=(0, 0, 600, 400),
                  source="vector", width_px=600, height_px=400, vector=VectorEvidence(paths=paths))


def _random_paths(rng: np.random.Generator, count: int) -> list[PathItem]:
    paths = []
    for _ in range(count):
        x, y = rng.uniform(-20, 620), rng.uniform(-20, 420)
        w, h = rng.choice([0.0, 0.5, 2.0, 7.5, 30.0, 90.0]), rng.choice([0.0, 1.0, 2.0, 7.5, 30.0])
        box = (int(x), int(y), int(x + w), int(y + h)) if rng.random() < 0.2 else (x, y, x + w, y + h)
        paths.append(PathItem(kind=str(rng.choice(["f", "s", "fs"])), bbox=box, closed=bool(rng.random() < 0.8),
                              is_rect=bool(rng.random() < 0.3)))
    return paths


@pytest.mark.parametrize("seed", range(12))
def test_vector_markers_match_the_per_path_measurement(seed):
    rng = np.random.default_rng(seed)
    figure = _figure(_random_paths(rng, int(rng.integers(0, 400))))
    plot = (30.5, 20.0, 560.0, 380.25)
    frames = [] if seed % 3 == 0 else [(400.0, 30.0, 550.0, 120.0), (40.0, 300.0, 90.0, 370.0)][: seed % 3]
    try:
        expected = reference_vector_markers(figure, plot, frames)
    except MeasurementUnavailable as reason:
        with pytest.raises(MeasurementUnavailable, match=str(reason)):
            scatter._vector_markers(figure, plot, frames)
        return
    assert repr(scatter._vector_markers(figure, plot, frames)) == repr(expected)


def test_vector_markers_of_an_extracted_scatter_plot_match(pages):
    page = pages[0]
    clip = pymupdf.Rect(50, 60, 450, 360)
    matrix = figure_matrix(page, clip, 150 / 72)
    figure = _figure(path_items(visible_drawings(page), matrix, 150 / 72))
    plot = (60.0, 40.0, 760.0, 560.0)
    found = scatter._vector_markers(figure, plot, [])
    assert found.count > 500
    assert repr(found) == repr(reference_vector_markers(figure, plot, []))


@pytest.mark.parametrize("seed", range(20))
def test_polygon_area_and_length_sum_as_the_generators_did(seed):
    rng = np.random.default_rng(seed)
    points = [tuple(p) for p in rng.uniform(-500, 500, (int(rng.integers(0, 40)), 2)).tolist()]
    if seed % 4 == 0:
        points = [(int(x), int(y)) for x, y in points]
    twice = sum(x0 * y1 - x1 * y0 for (x0, y0), (x1, y1) in zip(points, points[1:] + points[:1]))
    assert repr(shapes.polygon_area(points)) == repr(abs(twice) / 2.0 if len(points) >= 3 else 0.0)
    length = sum((math.hypot(x1 - x0, y1 - y0) for (x0, y0), (x1, y1) in zip(points, points[1:])), 0.0)
    assert repr(shapes.polyline_length(points)) == repr(length)
