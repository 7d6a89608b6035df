"""Orchestration: discover, then per document extract -> classify -> measure -> check,
store each document's result as it finishes, and write the reports from the store."""

from __future__ import annotations

import csv
import dataclasses
import functools
import logging
import os
import time
from dataclasses import dataclass, field
from pathlib import Path
from typing import Iterator

import cv2
import numpy as np
import pymupdf

from corpusaudit import __version__
from corpusaudit.checks.runner import check_figure
from corpusaudit.classify import Classifier, ModelIntegrityError, Prediction, load_classifier
from corpusaudit.config import Config
from corpusaudit.discover import clear_scratch, discover
from corpusaudit.extract import ExtractError, extract_document
from corpusaudit.measure import Measurements
from corpusaudit.measure.text import ocr_available
from corpusaudit.model import SEVERITY_RANK, Document, Figure, Finding, MeasurementUnavailable
from corpusaudit.progress import Progress
from corpusaudit.report.annotate import PAGE_THUMBNAIL_PX, annotate_pdf, annotated_path, page_thumbnail_files
from corpusaudit.report.html import write_report
from corpusaudit.report.tables import write_json, write_tables
from corpusaudit.rows import document_row, figure_row, finding_row
from corpusaudit.store import cached_document, load_rows, open_store, rename_document, save_document
from corpusaudit.workers import Failure, run_pool, single_threaded_libraries

log = logging.getLogger(__name__)
THUMBNAIL_PX = 360
DETAIL_PX = 1400


@dataclass(frozen=True)
class RunOptions:
    jobs: int = 1
    time_limit_s: float = 120.0  # per document
    memory_limit_mb: int = 2048  # resident memory per worker
    use_cache: bool = True
    inline: bool = False  # run in this process: no limits, for debugging and --strict
    strict: bool = False  # re-raise rule errors instead of recording them
    executor: str = "local"  # local | dask
    scheduler: str = ""  # dask scheduler address
    annotate: bool = False  # write annotated copies of PDFs with findings to annotated/
    chunk_pages: int = 40  # a PDF of more than twice this many pages is split into ranges across workers
    quiet: bool = False


@dataclass
class DocumentResult:
    doc: Document
    figures: list[dict]
    findings: list[dict]
    files: dict[str, bytes] = field(default_factory=dict)  # path relative to the output folder -> bytes
    decorations: int = 0


@dataclass
class AuditSummary:
    out_dir: Path
    statuses: dict[str, int] = field(default_factory=dict)
    figures: int = 0
    findings_by_severity: dict[str, int] = field(default_factory=dict)
    reused: int = 0
    elapsed_s: float = 0.0
    peak_worker_rss: int = 0
    worker_peaks: list[int] = field(default_factory=list)  # each worker's peak resident size, bytes

    def worst_severity_rank(self) -> int:
        return max((SEVERITY_RANK[s] for s, n in self.findings_by_severity.items() if n), default=0)


# OpenCV's encoder is about twice as fast as Pillow's at the same compression level, and libpng's
# "up" filter alone (OpenCV 4.11 and later) three times faster than trying every filter on each row,
# for a few per cent more bytes. With that filter, zlib level 1 is 10% faster than 3 for 2% more bytes
# on chart figures; no filter at all would be faster still but bloats gradients (heatmaps) 25-fold.
_PNG_PARAMETERS = [cv2.IMWRITE_PNG_COMPRESSION, 1] + (
    [cv2.IMWRITE_PNG_FILTER, cv2.IMWRITE_PNG_FILTER_UP] if hasattr(cv2, "IMWRITE_PNG_FILTER") else [])


def _png(pixels: np.ndarray, max_side: int) -> bytes:
    """PNG of the figure shrunk to max_side (area averaging: no ringing on line art)."""
    height, width = pixels.shape[:2]
    scale = max_side / max(height, width)
    if scale < 1.0:
        pixels = cv2.resize(pixels, (max(1, round(width * scale)), max(1, round(height * scale))),
                            interpolation=cv2.INTER_AREA)
    ok, encoded = cv2.imencode(".png", cv2.cvtColor(pixels, cv2.COLOR_RGB2BGR), _PNG_PARAMETERS)
    if not ok:
        raise ValueError("PNG encoding failed")
    return encoded.tobytes()


def _predictions(figures: list[Figure], classifier: Classifier | None) -> list[Prediction | None]:
    """The model's label for each figure with pixels, predicted for the document at once;
    None without a model (the label stays empty rather than guessed) or pixels."""
    with_pixels = [figure for figure in figures if figure.pixels is not None]
    if classifier is None or not with_pixels:
        return [None] * len(figures)
    predicted = iter(classifier.predict_many([figure.pixels for figure in with_pixels]))
    return [next(predicted) if figure.pixels is not None else None for figure in figures]


def _classify(figure: Figure, prediction: Prediction | None, config: Config, measurements: Measurements) -> None:
    if prediction is None:
        return
    figure.chart_type, figure.confidence = prediction.label, prediction.confidence
    figure.low_confidence = prediction.confidence < config.classify.low_confidence
    figure.classified_by = "model"
    if figure.image_info.get("layout") == "table":
        # Extraction found ruled cells of text (a table captioned as a figure): no chart.
        figure.chart_type, figure.confidence, figure.low_confidence = "not_chart", 1.0, False
        figure.classified_by = "vector"
    elif figure.vector is not None and figure.chart_type != "pie" and _vector_pie(figure, measurements):
        # Filled wedges whose arcs close one circle are a pie whatever the pixels suggest.
        figure.chart_type, figure.confidence, figure.low_confidence = "pie", 1.0, False
        figure.classified_by = "vector"


def _vector_pie(figure: Figure, measurements: Measurements) -> bool:
    try:
        pie = measurements.get("pie")
    except MeasurementUnavailable:
        return False
    # The circle must fill the figure: wedges inside a larger drawing (a panel of it) do not decide.
    return len(pie.slices) >= 2 and (2 * pie.radius) ** 2 >= 0.25 * figure.width_px * figure.height_px


def _warm_up_before_forking() -> None:
    """Load here what every worker forked from this process would otherwise load on its first
    document (a new worker every 25 documents): the extraction modules imported on demand,
    Pillow's image plugins, the text recogniser with its model (about 0.1 s), the model (about
    10 ms), and one prediction for the first-call set-up of the feature code (about 10 ms)."""
    import PIL.Image

    import corpusaudit.extract.images  # noqa: F401
    import corpusaudit.extract.pdf  # noqa: F401

    PIL.Image.init()
    ocr_available()  # loads the recogniser and its English model when installed
    try:
        classifier = _classifier()
    except ModelIntegrityError:
        return  # each worker meets the same error and records it on its documents
    if classifier is not None:
        with single_threaded_libraries():  # as in the workers: no OpenMP threads before the fork
            classifier.predict(np.full((64, 64, 3), 255, np.uint8))


@functools.cache
def _classifier() -> Classifier | None:
    """The shipped model, loaded once per process (the pool loads it before forking its workers)."""
    return load_classifier()


def process_document(doc: Document, config: Config, strict: bool = False,
                     pages: tuple[int, int] | None = None) -> DocumentResult:
    """Everything for one document (or a page range of it); a failure costs this document only."""
    try:
        return _process(doc, config, strict, pages)
    except ExtractError as exc:
        doc.status, doc.error = "error", str(exc)
    except Exception as exc:
        if strict:
            raise
        log.exception("internal error on %s", doc.path)
        doc.status, doc.error = "error", f"internal error: {type(exc).__name__}: {exc}"
    doc.figures = doc.findings = 0
    return DocumentResult(doc, [], [])


def process_task(task: tuple[Document, Config, bool, tuple[int, int] | None]) -> DocumentResult:
    """process_document for a worker process or a cluster: one picklable argument."""
    return process_document(*task)


def _process(doc: Document, config: Config, strict: bool, pages: tuple[int, int] | None) -> DocumentResult:
    """Pure: figure images come back as PNG bytes for the caller to write."""
    extracted = extract_document(doc, config.extract, pages, page_view_px=PAGE_THUMBNAIL_PX)
    doc.pages = extracted.pages
    if extracted.errors:
        doc.error = "; ".join(extracted.errors)
    classifier = _classifier()
    result = DocumentResult(doc, [], [], decorations=extracted.decorations)
    for figure, prediction in zip(extracted.figures, _predictions(extracted.figures, classifier)):
        measurements = Measurements(figure)
        _classify(figure, prediction, config, measurements)
        results, figure.unmeasured = check_figure(figure, config, measurements, strict=strict)
        if figure.pixels is not None:
            result.files[f"assets/{figure.figure_id}.png"] = _png(figure.pixels, THUMBNAIL_PX)
            result.files[f"assets/{figure.figure_id}.full.png"] = _png(figure.pixels, DETAIL_PX)
            figure.thumbnail = f"assets/{figure.figure_id}.png"
        for number, checked in enumerate(results):
            result.findings.append(finding_row(Finding(
                finding_id=f"{figure.figure_id}-{checked.rule}-{number}", figure_id=figure.figure_id,
                document_id=doc.document_id, path=doc.path, page=figure.page, rule=checked.rule,
                severity=checked.severity, message=checked.draft.message, value=checked.draft.value,
                threshold=checked.draft.threshold, region=checked.draft.region)))
        result.figures.append(figure_row(figure))
    if doc.kind == "pdf" and result.figures:
        thumbnails = {number: _png(view, PAGE_THUMBNAIL_PX) for number, view in extracted.page_views.items()}
        result.files.update(page_thumbnail_files(doc.document_id, thumbnails, extracted.page_sizes))
    doc.figures, doc.findings = len(result.figures), len(result.findings)
    return result


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
    """The manifest row whose path is the document's path or its tail (paths relative to the manifest)."""
    key = os.path.normpath(doc.path)
    if key in rows:
        return rows[key]
    tails = [value for name, value in rows.items() if key.endswith(os.sep + name)]
    return tails[0] if len(tails) == 1 else {}


def audit(inputs: list[str], out_dir: Path, config: Config, options: RunOptions = RunOptions(),
          manifest: Path | None = None) -> AuditSummary:
    started = time.monotonic()
    out_dir.mkdir(parents=True, exist_ok=True)
    (out_dir / "assets").mkdir(exist_ok=True)
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
            elif options.use_cache and cached_document(conn, doc.document_id, doc.sha256, cache_key):
                rename_document(conn, doc.document_id, doc.path, doc.manifest)
                summary.reused += 1
            else:
                pending.append(doc)
        progress = Progress(len(pending), quiet=options.quiet)
        for result in _results(pending, config, options, summary):
            for name, data in result.files.items():
                target = out_dir / name
                target.parent.mkdir(parents=True, exist_ok=True)
                target.write_bytes(data)
            save_document(conn, document_row(result.doc), result.figures, result.findings, cache_key,
                          result.doc.manifest, result.decorations)
            if options.annotate and result.doc.kind == "pdf" and result.findings:
                annotate_pdf(result.doc.local_path, annotated_path(out_dir, result.doc.document_id),
                             result.figures, result.findings, config.extract.passwords)
            progress.advance(result.doc.status)
        progress.close()
        doc_rows, figure_rows, finding_rows = load_rows(conn, [d.document_id for d in documents])
    finally:
        conn.close()
        clear_scratch(scratch)
    write_tables(out_dir, doc_rows, figure_rows, finding_rows, manifest_columns)
    write_json(out_dir, doc_rows, figure_rows, finding_rows, manifest_columns)
    write_report(out_dir, doc_rows, figure_rows, finding_rows, manifest_columns)
    for row in doc_rows:
        summary.statuses[row["status"]] = summary.statuses.get(row["status"], 0) + 1
    summary.figures = len(figure_rows)
    for row in finding_rows:
        summary.findings_by_severity[row["severity"]] = summary.findings_by_severity.get(row["severity"], 0) + 1
    summary.elapsed_s = time.monotonic() - started
    return summary


def _failed(doc: Document, failure: Failure) -> DocumentResult:
    doc.status, doc.error, doc.figures, doc.findings = failure.status, failure.reason, 0, 0
    return DocumentResult(doc, [], [])


def page_ranges(doc: Document, chunk_pages: int) -> list[tuple[int, int] | None]:
    """Page ranges for a long PDF, so one 900-page thesis does not hold the batch's tail."""
    if doc.kind != "pdf" or chunk_pages <= 0:
        return [None]
    try:
        with pymupdf.open(doc.local_path) as pdf:
            count = pdf.page_count if not pdf.needs_pass else 0
    except Exception:  # unreadable: the worker reports why
        return [None]
    if count <= 2 * chunk_pages:
        return [None]
    return [(first, min(first + chunk_pages - 1, count)) for first in range(1, count + 1, chunk_pages)]


def merge_parts(parts: list[DocumentResult]) -> DocumentResult:
    """One document's result from the results of its page ranges."""
    if len(parts) == 1:
        return parts[0]
    doc = parts[0].doc
    errors: list[str] = []
    for part in parts:
        for error in filter(None, part.doc.error.split("; ")):
            if error not in errors:
                errors.append(error)
    failed = [part.doc.status for part in parts if part.doc.status != "ok"]
    doc.status = "timeout" if "timeout" in failed else "error" if failed else "ok"
    doc.pages = max(part.doc.pages for part in parts)
    doc.error = "; ".join(errors)
    merged = DocumentResult(doc, [row for part in parts for row in part.figures],
                            [row for part in parts for row in part.findings],
                            decorations=sum(part.decorations for part in parts))
    for part in parts:
        merged.files.update(part.files)
    doc.figures, doc.findings = len(merged.figures), len(merged.findings)
    return merged


def _results(docs: list[Document], config: Config, options: RunOptions,
             summary: AuditSummary) -> Iterator[DocumentResult]:
    if not docs:
        return
    if options.executor == "dask":
        from corpusaudit.distributed import run_on_dask

        yield from run_on_dask(docs, config, options.scheduler, options.strict)
        return
    if options.inline:
        for doc in docs:
            yield process_document(doc, config, options.strict)
        return

    def note_peak(rss: int) -> None:
        summary.peak_worker_rss = max(summary.peak_worker_rss, rss)
        summary.worker_peaks.append(rss)

    _warm_up_before_forking()
    tasks, expected = [], {}
    for doc in docs:
        ranges = page_ranges(doc, options.chunk_pages)
        expected[doc.document_id] = len(ranges)
        tasks.extend((dataclasses.replace(doc), config, options.strict, pages) for pages in ranges)
    parts: dict[str, list[DocumentResult]] = {}
    for task, outcome in run_pool(process_task, tasks, options.jobs, options.time_limit_s,
                                  options.memory_limit_mb * 2**20, on_peak=note_peak):
        result = _failed(task[0], outcome) if isinstance(outcome, Failure) else outcome
        if isinstance(outcome, Failure) and task[3]:
            result.doc.error = f"pages {task[3][0]}-{task[3][1]}: {outcome.reason}"
        done = parts.setdefault(result.doc.document_id, [])
        done.append(result)
        if len(done) == expected[result.doc.document_id]:
            yield merge_parts(parts.pop(result.doc.document_id))
