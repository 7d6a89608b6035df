"""Orchestration: discover, then per document extract -> classify -> measure -> check,
store each document's result as it finishes, and write the reports from the store."""

from __future__ import annotations

import csv
import logging
import os
import time
from concurrent.futures import ProcessPoolExecutor, as_completed
from concurrent.futures.process import BrokenProcessPool
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
from PIL import Image

from corpusaudit import __version__
from corpusaudit.checks.runner import check_figure
from corpusaudit.classify import Classifier, load_classifier
from corpusaudit.config import Config
from corpusaudit.discover import clear_scratch, discover
from corpusaudit.extract import ExtractError, extract_document
from corpusaudit.measure import Measurements
from corpusaudit.model import SEVERITY_RANK, Document, Figure, Finding
from corpusaudit.report.html import write_report
from corpusaudit.report.tables import write_tables
from corpusaudit.rows import document_row, figure_row, finding_row
from corpusaudit.store import cached_document, load_rows, open_store, rename_document, save_document

log = logging.getLogger(__name__)
THUMBNAIL_PX = 360
DETAIL_PX = 1400


@dataclass
class DocumentResult:
    doc: Document
    figures: list[dict]
    findings: list[dict]
    decorations: int = 0


@dataclass
class AuditSummary:
    out_dir: Path
    statuses: dict[str, int] = field(default_factory=dict)
    figures: int = 0
    findings_by_severity: dict[str, int] = field(default_factory=dict)
    reused: int = 0
    elapsed_s: float = 0.0

    def worst_severity_rank(self) -> int:
        return max((SEVERITY_RANK[s] for s, n in self.findings_by_severity.items() if n), default=0)


def _save_image(pixels: np.ndarray, path: Path, max_side: int) -> None:
    image = Image.fromarray(pixels)
    image.thumbnail((max_side, max_side), Image.Resampling.LANCZOS)
    image.save(path, optimize=True)


def _classify(figure: Figure, classifier: Classifier | None, config: Config) -> None:
    if classifier is None or figure.pixels is None:
        return  # no model shipped: the label stays empty rather than guessed
    prediction = classifier.predict(figure.pixels)
    figure.chart_type, figure.confidence = prediction.label, prediction.confidence
    figure.low_confidence = prediction.confidence < config.classify.low_confidence
    figure.classified_by = "model"


_WORKER_CLASSIFIER: dict[str, Classifier | None] = {}


def _classifier() -> Classifier | None:
    if "model" not in _WORKER_CLASSIFIER:
        _WORKER_CLASSIFIER["model"] = load_classifier()
    return _WORKER_CLASSIFIER["model"]


def process_document(doc: Document, config: Config, assets: Path, strict: bool = False) -> DocumentResult:
    """Everything for one document; a failure costs this document only, never the batch."""
    try:
        return _process(doc, config, assets, strict)
    except ExtractError as exc:
        doc.status, doc.error = "error", str(exc)
    except Exception as exc:
        if strict:
            raise
        log.exception("internal error on %s", doc.path)
        doc.status, doc.error = "error", f"internal error: {type(exc).__name__}: {exc}"
    doc.figures = doc.findings = 0
    return DocumentResult(doc, [], [])


def _process(doc: Document, config: Config, assets: Path, strict: bool) -> DocumentResult:
    """Pure apart from writing its figure images to assets/."""
    extracted = extract_document(doc, config.extract)
    doc.pages = extracted.pages
    if extracted.errors:
        doc.error = "; ".join(extracted.errors)
    classifier = _classifier()
    figure_rows, finding_rows = [], []
    for figure in extracted.figures:
        _classify(figure, classifier, config)
        results, figure.unmeasured = check_figure(figure, config, Measurements(figure), strict=strict)
        if figure.pixels is not None:
            _save_image(figure.pixels, assets / f"{figure.figure_id}.png", THUMBNAIL_PX)
            _save_image(figure.pixels, assets / f"{figure.figure_id}.full.png", DETAIL_PX)
            figure.thumbnail = f"assets/{figure.figure_id}.png"
        for number, result in enumerate(results):
            finding_rows.append(finding_row(Finding(
                finding_id=f"{figure.figure_id}-{result.rule}-{number}", figure_id=figure.figure_id,
                document_id=doc.document_id, path=doc.path, page=figure.page, rule=result.rule,
                severity=result.severity, message=result.draft.message, value=result.draft.value,
                threshold=result.draft.threshold, region=result.draft.region)))
        figure_rows.append(figure_row(figure))
    doc.figures, doc.findings = len(figure_rows), len(finding_rows)
    return DocumentResult(doc, figure_rows, finding_rows, extracted.decorations)


def read_manifest(path: Path | None) -> tuple[list[str], dict[str, dict[str, str]]]:
    """Group columns of a manifest CSV keyed by normalised path (a `path` column is required)."""
    if path is None:
        return [], {}
    with path.open(newline="", encoding="utf-8-sig") as handle:
        reader = csv.DictReader(handle)
        if not reader.fieldnames or "path" not in reader.fieldnames:
            raise ValueError(f"manifest {path} needs a 'path' column")
        columns = [c for c in reader.fieldnames if c != "path"]
        rows = {os.path.normpath(row["path"]): {c: row.get(c) or "" for c in columns} for row in reader}
    return columns, rows


def _manifest_for(doc: Document, rows: dict[str, dict[str, str]]) -> dict[str, str]:
    key = os.path.normpath(doc.path)
    if key in rows:
        return rows[key]
    matches = [value for name, value in rows.items() if os.path.basename(name) == os.path.basename(key)]
    return matches[0] if len(matches) == 1 else {}


def audit(inputs: list[str], out_dir: Path, config: Config, jobs: int = 1, manifest: Path | None = None,
          use_cache: bool = True, strict: bool = False) -> AuditSummary:
    started = time.monotonic()
    out_dir.mkdir(parents=True, exist_ok=True)
    assets = out_dir / "assets"
    assets.mkdir(exist_ok=True)
    scratch = out_dir / ".scratch"
    manifest_columns, manifest_rows = read_manifest(manifest)
    summary = AuditSummary(out_dir=out_dir)
    conn = open_store(out_dir / "audit.sqlite")
    cache_key = f"{__version__}:{config.digest()}"
    try:
        documents = discover(inputs, scratch, exclude=out_dir)
        pending: list[Document] = []
        for doc in documents:
            doc.manifest = _manifest_for(doc, manifest_rows)
            if doc.status != "ok":
                save_document(conn, document_row(doc), [], [], cache_key, doc.manifest)
            elif use_cache and cached_document(conn, doc.document_id, doc.sha256, cache_key):
                rename_document(conn, doc.document_id, doc.path, doc.manifest)
                summary.reused += 1
            else:
                pending.append(doc)
        for result in _run_all(pending, config, assets, jobs, strict):
            save_document(conn, document_row(result.doc), result.figures, result.findings, cache_key,
                          result.doc.manifest, result.decorations)
        doc_rows, figure_rows, finding_rows = load_rows(conn, [d.document_id for d in documents])
    finally:
        conn.close()
        clear_scratch(scratch)
    write_tables(out_dir, doc_rows, figure_rows, finding_rows, manifest_columns)
    write_report(out_dir, doc_rows, figure_rows, finding_rows, manifest_columns)
    for row in doc_rows:
        summary.statuses[row["status"]] = summary.statuses.get(row["status"], 0) + 1
    summary.figures = len(figure_rows)
    for row in finding_rows:
        summary.findings_by_severity[row["severity"]] = summary.findings_by_severity.get(row["severity"], 0) + 1
    summary.elapsed_s = time.monotonic() - started
    return summary


def _run_all(docs: list[Document], config: Config, assets: Path, jobs: int, strict: bool):
    if jobs <= 1 or len(docs) <= 1:
        for doc in docs:
            yield process_document(doc, config, assets, strict)
        return
    with ProcessPoolExecutor(max_workers=jobs) as pool:
        futures = {pool.submit(process_document, doc, config, assets, strict): doc for doc in docs}
        for future in as_completed(futures):
            doc = futures[future]
            try:
                yield future.result()
            except BrokenProcessPool:
                doc.status, doc.error = "error", "worker process crashed while reading this document"
                yield DocumentResult(doc, [], [])
