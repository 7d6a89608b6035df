"""documents.csv, figures.csv, findings.csv exactly as in the output contract."""

from __future__ import annotations

import csv
import io
from pathlib import Path

from corpusaudit.report import write_atomic
from corpusaudit.rows import DOCUMENT_COLUMNS, FIGURE_COLUMNS, FINDING_COLUMNS


def _csv_text(columns: list[str], rows: list[dict]) -> str:
    buffer = io.StringIO()
    writer = csv.DictWriter(buffer, fieldnames=columns, extrasaction="ignore", lineterminator="\n")
    writer.writeheader()
    for row in rows:
        writer.writerow({key: "" if row.get(key) is None else row.get(key) for key in columns})
    return buffer.getvalue()


def write_tables(out_dir: Path, documents: list[dict], figures: list[dict], findings: list[dict],
                 manifest_columns: list[str]) -> None:
    document_rows = [{**doc, **{c: doc["manifest"].get(c, "") for c in manifest_columns}} for doc in documents]
    write_atomic(out_dir / "documents.csv", _csv_text(list(DOCUMENT_COLUMNS) + manifest_columns, document_rows))
    write_atomic(out_dir / "figures.csv", _csv_text(list(FIGURE_COLUMNS), figures))
    write_atomic(out_dir / "findings.csv", _csv_text(list(FINDING_COLUMNS), findings))
