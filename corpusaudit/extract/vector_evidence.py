"""Vector evidence of a page region: its text spans and drawn paths, in figure pixels.

This is what a PDF states exactly (text, font sizes, angles, colours, geometry); checks
read it before they fall back to pixels.
"""

from __future__ import annotations

import math

import numpy as np
import pymupdf

from corpusaudit.model import PathItem, TextSpan, VectorEvidence

CURVE_SAMPLES = 8  # points per cubic Bezier segment: enough to recover arcs of pie wedges
_BEZIER_T = np.linspace(0.0, 1.0, CURVE_SAMPLES + 1)[1:]


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


def _path_points(items) -> list[tuple[float, float]]:
    points: list[tuple[float, float]] = []

    def add(point) -> None:
        xy = (float(point.x), float(point.y))
        if not points or points[-1] != xy:
            points.append(xy)

    for item in items:
        op = item[0]
        if op == "l":
            add(item[1])
            add(item[2])
        elif op == "c":
            p0, p1, p2, p3 = (np.array([p.x, p.y]) for p in item[1:5])
            add(item[1])
            t = _BEZIER_T[:, None]
            curve = ((1 - t) ** 3) * p0 + 3 * ((1 - t) ** 2) * t * p1 + 3 * (1 - t) * t**2 * p2 + t**3 * p3
            for x, y in curve:
                xy = (float(x), float(y))
                if points[-1] != xy:
                    points.append(xy)
        elif op == "re":
            rect = item[1]
            for xy in ((rect.x0, rect.y0), (rect.x1, rect.y0), (rect.x1, rect.y1), (rect.x0, rect.y1)):
                points.append((float(xy[0]), float(xy[1])))
        elif op == "qu":
            quad = item[1]
            for corner in (quad.ul, quad.ur, quad.lr, quad.ll):
                add(corner)
    return points


def _is_rect(items) -> bool:
    if len(items) == 1 and items[0][0] == "re":
        return True
    if len(items) == 1 and items[0][0] == "qu":
        return bool(items[0][1].is_rectangular)
    if all(item[0] == "l" for item in items) and 3 <= len(items) <= 4:
        corners = {(round(p.x, 2), round(p.y, 2)) for item in items for p in item[1:3]}
        xs = {x for x, _ in corners}
        ys = {y for _, y in corners}
        return len(corners) == 4 and len(xs) == 2 and len(ys) == 2
    return False


def path_items(drawings: list[dict], origin: tuple[float, float], scale: float) -> list[PathItem]:
    """PyMuPDF drawings (page points) as PathItems in figure pixels."""
    ox, oy = origin
    paths: list[PathItem] = []
    for drawing in drawings:
        kind = drawing.get("type")
        if kind not in ("f", "s", "fs"):
            continue  # clip paths and groups carry no ink
        points = [((x - ox) * scale, (y - oy) * scale) for x, y in _path_points(drawing["items"])]
        rect = drawing["rect"]
        paths.append(PathItem(
            kind=kind,
            bbox=((rect.x0 - ox) * scale, (rect.y0 - oy) * scale, (rect.x1 - ox) * scale, (rect.y1 - oy) * scale),
            fill=_colour(drawing.get("fill")) if "f" in kind else None,
            stroke=_colour(drawing.get("color")) if "s" in kind else None,
            width=float(drawing.get("width") or 0.0) * scale,
            points=points,
            closed=bool(drawing.get("closePath")) or (len(points) > 2 and points[0] == points[-1]),
            is_rect=_is_rect(drawing["items"]),
            dashes=str(drawing.get("dashes") or ""),
            fill_opacity=float(drawing.get("fill_opacity") or 1.0),
            stroke_opacity=float(drawing.get("stroke_opacity") or 1.0),
        ))
    return paths


def text_spans(page: pymupdf.Page, clip: pymupdf.Rect, scale: float) -> list[TextSpan]:
    """Text spans inside clip with their size (pt), angle (degrees) and colour, in figure pixels."""
    spans: list[TextSpan] = []
    data = page.get_text("dict", clip=clip, flags=pymupdf.TEXT_PRESERVE_WHITESPACE)
    for block in data["blocks"]:
        for line in block.get("lines", ()):
            cos, sin = line["dir"]
            angle = round(math.degrees(math.atan2(-sin, cos)), 2) + 0.0  # y grows downwards; +0.0 drops -0.0
            for span in line["spans"]:
                text = span["text"].strip()
                if not text:
                    continue
                x0, y0, x1, y1 = span["bbox"]
                spans.append(TextSpan(
                    text=text,
                    bbox=((x0 - clip.x0) * scale, (y0 - clip.y0) * scale, (x1 - clip.x0) * scale, (y1 - clip.y0) * scale),
                    size_pt=round(float(span["size"]), 2), angle=angle,
                    colour=_rgb_from_int(int(span["color"])), font=span.get("font", ""),
                ))
    return spans


def vector_evidence(page: pymupdf.Page, clip: pymupdf.Rect, scale: float,
                    drawings: list[dict] | None = None) -> VectorEvidence:
    """Evidence for the region clip (page points); drawings may be passed when already read."""
    if drawings is None:
        drawings = page.get_drawings()
    # Compare coordinates: axis lines have zero-height rects, which Rect.intersects rejects.
    inside = [d for d in drawings if d["rect"].x0 <= clip.x1 and d["rect"].x1 >= clip.x0
              and d["rect"].y0 <= clip.y1 and d["rect"].y1 >= clip.y0]
    return VectorEvidence(texts=text_spans(page, clip, scale),
                          paths=path_items(inside, (clip.x0, clip.y0), scale), scale=scale)
