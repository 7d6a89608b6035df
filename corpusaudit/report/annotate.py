"""Annotated PDF copies and page thumbnails, written with PyMuPDF.

annotate_pdf writes a copy of a PDF with, on every figure that has findings, a rectangle
annotation around it and a note annotation listing the findings and their fixes. The
original file is only read.

page_thumbnail_files names the dashboard's document-view files: small page images
(assets/pages/<document_id>-p<N>.png, rendered during extraction) and every page's size in
points (assets/pages/<document_id>.json) so that figure boxes can be drawn on them.
"""

from __future__ import annotations

import json
import os
from collections import defaultdict
from pathlib import Path
from typing import Iterable

import pymupdf

from corpusaudit.checks.registry import all_rules
from corpusaudit.model import SEVERITY_RANK

PAGE_THUMBNAIL_PX = 420  # longest side of a page thumbnail
# Stroke colours of the rectangles by worst severity: Okabe-Ito vermillion, orange, blue.
SEVERITY_COLOUR = {"error": (0.835, 0.369, 0.0), "warning": (0.902, 0.624, 0.0), "info": (0.0, 0.447, 0.698)}
NOTE_AUTHOR = "corpusaudit"
ADVICE = "Advice, not a verdict: a person reviews each point before anything is decided."


def annotated_path(out_dir: Path, document_id: str) -> Path:
    return out_dir / "annotated" / f"{document_id}.pdf"


def page_thumbnail_path(out_dir: Path, document_id: str, page: int) -> Path:
    return out_dir / "assets" / "pages" / f"{document_id}-p{page}.png"


def page_sizes_path(out_dir: Path, document_id: str) -> Path:
    return out_dir / "assets" / "pages" / f"{document_id}.json"


def _note_text(figure: dict, findings: list[dict], fixes: dict[str, str]) -> str:
    label = f"Figure {figure['figure_number']}" if figure.get("figure_number") else f"Figure {figure['index'] + 1} on this page"
    lines = [f"{label}: {len(findings)} point(s) to review", ""]
    for finding in findings:
        lines.append(f"[{finding['severity']}] {finding['rule']}: {finding['message']}")
        if fixes.get(finding["rule"]):
            lines.append(f"Suggested fix: {fixes[finding['rule']]}")
        lines.append("")
    lines.append(ADVICE)
    return "\n".join(lines)


def open_unlocked(source: str | os.PathLike, passwords: Iterable[str] = ()) -> pymupdf.Document:
    """Open a PDF, trying the given passwords on an encrypted one (ValueError when none fits)."""
    pdf = pymupdf.open(source)
    if pdf.needs_pass and not any(pdf.authenticate(password) for password in passwords):
        pdf.close()
        raise ValueError(f"{source} is encrypted and no password opened it")
    return pdf


def annotate_pdf(source_pdf_path: str | os.PathLike, out_path: str | os.PathLike, figures: list[dict],
                 findings: list[dict], passwords: Iterable[str] = ()) -> int:
    """Write a copy of source_pdf_path to out_path with annotations on figures that have findings.

    figures and findings are rows of one document (FIGURE_COLUMNS / FINDING_COLUMNS); boxes are
    PDF points with a top-left origin, as PyMuPDF gives them. Returns the number of figures
    annotated. Refuses to write over the source.
    """
    source, target = Path(source_pdf_path), Path(out_path)
    if target.exists() and target.resolve() == source.resolve():
        raise ValueError(f"annotated copy would overwrite its source {source}")
    by_figure: dict[str, list[dict]] = defaultdict(list)
    for finding in findings:
        by_figure[finding["figure_id"]].append(finding)
    fixes = {rule.id: rule.fix for rule in all_rules()}
    annotated = 0
    with open_unlocked(source, passwords) as pdf:
        for figure in figures:
            flagged = by_figure.get(figure["figure_id"])
            page_number = int(figure["page"] or 1)
            if not flagged or not 1 <= page_number <= pdf.page_count:
                continue
            page = pdf[page_number - 1]
            # Boxes are in the page's unrotated space, which is what annotations take too.
            unrotated = pymupdf.Rect(0, 0, page.cropbox.width, page.cropbox.height)
            rect = pymupdf.Rect(figure["x0"], figure["y0"], figure["x1"], figure["y1"]) & unrotated
            if rect.is_empty:
                continue
            flagged.sort(key=lambda f: -SEVERITY_RANK[f["severity"]])
            colour = SEVERITY_COLOUR[flagged[0]["severity"]]
            summary = _note_text(figure, flagged, fixes)
            box = page.add_rect_annot(rect)
            box.set_colors(stroke=colour)
            box.set_border(width=1.5)
            box.set_info(title=NOTE_AUTHOR, subject="figure to review", content=summary)
            box.update()
            note = page.add_text_annot(pymupdf.Point(rect.x1 - 2, rect.y0 + 2), summary, icon="Comment")
            note.set_info(title=NOTE_AUTHOR, subject=f"{len(flagged)} finding(s)")
            note.set_colors(stroke=colour)
            note.update()
            annotated += 1
        target.parent.mkdir(parents=True, exist_ok=True)
        temporary = target.with_name(f".{target.name}.tmp")
        pdf.save(temporary, garbage=1, deflate=True)
    os.replace(temporary, target)
    return annotated


def page_thumbnail_files(document_id: str, thumbnails: dict[int, bytes],
                         sizes: dict[int, tuple[float, float]]) -> dict[str, bytes]:
    """The document view's files: {path relative to the output folder: bytes}.

    assets/pages/<document_id>-p<N>.png for each page thumbnail (PNG bytes, pages 1-based) and
    assets/pages/<document_id>.json: every displayed page's width and height in points, the frame
    of the figure boxes. Pure: the caller writes them.
    """
    files = {page_thumbnail_path(Path(), document_id, number).as_posix(): data
             for number, data in sorted(thumbnails.items())}
    payload = {str(number): [width, height] for number, (width, height) in sizes.items()}
    files[page_sizes_path(Path(), document_id).as_posix()] = json.dumps(payload, sort_keys=True).encode()
    return files
