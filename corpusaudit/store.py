"""Store: audit.sqlite, the embedded results database and the incremental cache.

A document's rows are replaced in one transaction when it finishes, so an interrupted
run leaves only whole documents behind. A document whose sha256 and cache key (tool
version + configuration digest) match a stored ok result is not processed again.
"""

from __future__ import annotations

import json
import sqlite3
from pathlib import Path
from typing import Any

from corpusaudit.rows import DOCUMENT_COLUMNS, FIGURE_COLUMNS, FIGURE_EXTRA_COLUMNS, FINDING_COLUMNS

SCHEMA_VERSION = 1
_INTEGER = {"bytes", "pages", "figures", "findings", "page", "index", "width_px", "height_px", "low_confidence"}
_REAL = {"x0", "y0", "x1", "y1", "confidence", "effective_ppi", "fx0", "fy0", "fx1", "fy1"}


class StoreError(RuntimeError):
    pass


def _column_sql(columns: tuple[str, ...]) -> str:
    def kind(name: str) -> str:
        return "INTEGER" if name in _INTEGER else "REAL" if name in _REAL else "TEXT"
    return ", ".join(f'"{name}" {kind(name)}' for name in columns)


def open_store(path: Path) -> sqlite3.Connection:
    conn = sqlite3.connect(path)
    conn.row_factory = sqlite3.Row
    conn.execute("PRAGMA journal_mode=WAL")
    conn.execute("CREATE TABLE IF NOT EXISTS schema_version (version INTEGER NOT NULL)")
    row = conn.execute("SELECT version FROM schema_version").fetchone()
    if row is None:
        conn.execute("INSERT INTO schema_version VALUES (?)", (SCHEMA_VERSION,))
    elif row[0] != SCHEMA_VERSION:
        raise StoreError(f"{path} has schema version {row[0]}, this corpusaudit writes {SCHEMA_VERSION}: "
                         "use a new output folder or --no-cache")
    conn.execute(f"CREATE TABLE IF NOT EXISTS documents ({_column_sql(DOCUMENT_COLUMNS)}, "
                 "cache_key TEXT, manifest TEXT, decorations INTEGER, PRIMARY KEY (document_id))")
    conn.execute(f"CREATE TABLE IF NOT EXISTS figures ({_column_sql(FIGURE_COLUMNS + FIGURE_EXTRA_COLUMNS)}, "
                 "PRIMARY KEY (figure_id))")
    conn.execute(f"CREATE TABLE IF NOT EXISTS findings ({_column_sql(FINDING_COLUMNS)}, PRIMARY KEY (finding_id))")
    conn.execute("CREATE INDEX IF NOT EXISTS figures_by_document ON figures (document_id)")
    conn.execute("CREATE INDEX IF NOT EXISTS findings_by_document ON findings (document_id)")
    conn.execute("CREATE INDEX IF NOT EXISTS documents_by_sha ON documents (sha256)")
    conn.commit()
    return conn


def _insert(conn: sqlite3.Connection, table: str, row: dict[str, Any]) -> None:
    names = list(row)
    conn.execute(f'INSERT OR REPLACE INTO {table} ({", ".join(chr(34) + n + chr(34) for n in names)}) '
                 f'VALUES ({", ".join("?" for _ in names)})', [row[n] for n in names])


def save_document(conn: sqlite3.Connection, doc_row: dict[str, Any], figure_rows: list[dict[str, Any]],
                  finding_rows: list[dict[str, Any]], cache_key: str, manifest: dict[str, str],
                  decorations: int = 0) -> None:
    with conn:
        document_id = doc_row["document_id"]
        conn.execute("DELETE FROM findings WHERE document_id = ?", (document_id,))
        conn.execute("DELETE FROM figures WHERE document_id = ?", (document_id,))
        _insert(conn, "documents", {**doc_row, "cache_key": cache_key,
                                    "manifest": json.dumps(manifest, sort_keys=True), "decorations": decorations})
        for row in figure_rows:
            _insert(conn, "figures", row)
        for row in finding_rows:
            _insert(conn, "findings", row)


def cached_document(conn: sqlite3.Connection, document_id: str, sha256: str, cache_key: str) -> bool:
    row = conn.execute("SELECT status, sha256, cache_key FROM documents WHERE document_id = ?",
                       (document_id,)).fetchone()
    return bool(row) and row["status"] == "ok" and row["sha256"] == sha256 and row["cache_key"] == cache_key


def rename_document(conn: sqlite3.Connection, document_id: str, path: str, manifest: dict[str, str]) -> None:
    """A cached document seen under another path: keep its results, follow the new path."""
    with conn:
        conn.execute("UPDATE documents SET path = ?, manifest = ? WHERE document_id = ?",
                     (path, json.dumps(manifest, sort_keys=True), document_id))
        conn.execute("UPDATE figures SET path = ? WHERE document_id = ?", (path, document_id))
        conn.execute("UPDATE findings SET path = ? WHERE document_id = ?", (path, document_id))


def load_rows(conn: sqlite3.Connection, document_ids: list[str]) -> tuple[list[dict], list[dict], list[dict]]:
    """Documents (in the given order), their figures and findings, as plain dicts."""
    conn.execute("CREATE TEMP TABLE IF NOT EXISTS wanted (document_id TEXT, position INTEGER)")
    conn.execute("DELETE FROM wanted")
    conn.executemany("INSERT INTO wanted VALUES (?, ?)", [(d, i) for i, d in enumerate(document_ids)])
    documents = [dict(r) for r in conn.execute(
        "SELECT d.* FROM documents d JOIN wanted w USING (document_id) ORDER BY w.position")]
    figures = [dict(r) for r in conn.execute(
        'SELECT f.* FROM figures f JOIN wanted w USING (document_id) ORDER BY w.position, f.page, f."index"')]
    findings = [dict(r) for r in conn.execute(
        "SELECT f.* FROM findings f JOIN wanted w USING (document_id) ORDER BY w.position, f.page, f.finding_id")]
    for doc in documents:
        doc["manifest"] = json.loads(doc["manifest"] or "{}")
    return documents, figures, findings
