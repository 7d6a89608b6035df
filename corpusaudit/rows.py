"""Flat rows of the output contract (design.md), shared by the store and the reports."""

from __future__ import annotations

from typing import Any

from corpusaudit.model import Document, Figure, Finding

DOCUMENT_COLUMNS = ("document_id", "path", "sha256", "bytes", "pages", "status", "error",
                    "figures", "findings")
FIGURE_COLUMNS = ("figure_id", "document_id", "path", "page", "index", "x0", "y0", "x1", "y1",
                  "source", "chart_type", "confidence", "width_px", "height_px", "effective_ppi",
                  "caption", "thumbnail", "unmeasured")
FINDING_COLUMNS = ("finding_id", "figure_id", "document_id", "path", "page", "rule", "severity",
                   "message", "value", "threshold", "fx0", "fy0", "fx1", "fy1")
# Kept in the store and the dashboard beside the contract columns.
FIGURE_EXTRA_COLUMNS = ("low_confidence", "classified_by", "figure_number")


def document_row(doc: Document) -> dict[str, Any]:
    return {column: getattr(doc, column) for column in DOCUMENT_COLUMNS}


def figure_row(figure: Figure) -> dict[str, Any]:
    x0, y0, x1, y1 = figure.bbox
    return {
        "figure_id": figure.figure_id, "document_id": figure.document_id, "path": figure.path,
        "page": figure.page, "index": figure.index,
        "x0": round(x0, 2), "y0": round(y0, 2), "x1": round(x1, 2), "y1": round(y1, 2),
        "source": figure.source, "chart_type": figure.chart_type,
        "confidence": None if figure.confidence is None else round(figure.confidence, 3),
        "width_px": figure.width_px, "height_px": figure.height_px,
        "effective_ppi": figure.effective_ppi, "caption": figure.caption,
        "thumbnail": figure.thumbnail, "unmeasured": ";".join(figure.unmeasured),
        "low_confidence": int(figure.low_confidence), "classified_by": figure.classified_by,
        "figure_number": figure.figure_number,
    }


def finding_row(finding: Finding) -> dict[str, Any]:
    fx0, fy0, fx1, fy1 = finding.region if finding.region else (None, None, None, None)
    return {
        "finding_id": finding.finding_id, "figure_id": finding.figure_id,
        "document_id": finding.document_id, "path": finding.path, "page": finding.page,
        "rule": finding.rule, "severity": finding.severity, "message": finding.message,
        "value": finding.value, "threshold": finding.threshold,
        "fx0": fx0, "fy0": fy0, "fx1": fx1, "fy1": fy1,
    }
