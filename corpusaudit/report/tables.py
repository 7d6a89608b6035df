"""documents.csv, figures.csv, findings.csv exactly as in the output contract, and audit.json."""

from __future__ import annotations

import csv
import io
import json
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


JSON_SCHEMA_VERSION = 1


def write_json(out_dir: Path, documents: list[dict], figures: list[dict], findings: list[dict],
               manifest_columns: list[str]) -> None:
    """audit.json: the three tables in one file for scripts, with a schema version."""
    payload = {
        "schema_version": JSON_SCHEMA_VERSION,
        "documents": [{**{c: doc[c] for c in DOCUMENT_COLUMNS},
                       **{c: doc["manifest"].get(c, "") for c in manifest_columns}} for doc in documents],
        "figures": [{**{c: row[c] for c in FIGURE_COLUMNS}, "low_confidence": bool(row["low_confidence"]),
                     "classified_by": row["classified_by"]} for row in figures],
        "findings": [{c: row[c] for c in FINDING_COLUMNS} for row in findings],
    }
    write_atomic(out_dir / "audit.json", json.dumps(payload, ensure_ascii=False, indent=1))
