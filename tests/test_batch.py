"""Batch robustness: hostile inputs, crashing and hanging workers, resume and cache."""

from __future__ import annotations

import csv
import os
import signal
import sqlite3
import subprocess
import sys
import time
from pathlib import Path

import pytest

from corpusaudit.cli import main
from corpusaudit.config import load_config
from corpusaudit.discover import discover
from corpusaudit.run import RunOptions, audit, page_ranges
from corpusaudit.workers import Failure, run_pool
from tests import hostile
from tests.conftest import pdf_with_rasters, png_bytes
from tests.pool_tasks import behave

REPO = Path(__file__).resolve().parents[1]


def _documents(out: Path) -> dict[str, dict]:
    with (out / "documents.csv").open(newline="", encoding="utf-8") as handle:
        return {row["path"].rsplit("/", 1)[-1].rsplit("!", 1)[-1]: row for row in csv.DictReader(handle)}


def test_pool_survives_crash_hang_memory_and_exceptions():
    tasks = ["a", "crash", "b", "hang", "hog", "raise", "c"]
    results = dict(run_pool(behave, tasks, jobs=2, time_limit=3, memory_limit=300 * 2**20))
    assert results["a"] == "A" and results["b"] == "B" and results["c"] == "C"
    assert isinstance(results["crash"], Failure) and "signal 11" in results["crash"].reason
    assert results["hang"] == Failure("timeout", "time limit of 3 s exceeded")
    assert isinstance(results["hog"], Failure) and "memory ceiling" in results["hog"].reason
    assert isinstance(results["raise"], Failure) and "bad input" in results["raise"].reason


def test_hostile_inputs_each_get_a_reason_and_the_run_exits_0(tmp_path):
    corpus = tmp_path / "corpus"
    corpus.mkdir()
    pdf_with_rasters(corpus / "good.pdf", [100])
    (corpus / "zero.pdf").write_bytes(b"")
    (corpus / "truncated.pdf").write_bytes((corpus / "good.pdf").read_bytes()[:500])
    hostile.broken_xref_pdf(corpus / "broken-xref.pdf")
    hostile.encrypted_pdf(corpus / "locked.pdf", "tidewater")
    hostile.decompression_bomb_png(corpus / "bomb.png")
    hostile.many_pages_pdf(corpus / "pages.pdf", 3000)
    hostile.zip_bomb(corpus / "bomb.zip")
    hostile.escaping_zip(corpus / "escape.zip", pdf_with_rasters(tmp_path / "member.pdf", [150]).read_bytes())
    (corpus / "<b>bold</b>.png".replace("/", "_")).write_bytes(png_bytes(50, 50))
    os.symlink(corpus, corpus / "loop")
    (corpus / os.fsdecode(b"caf\xe9.png")).write_bytes(png_bytes(40, 40, 3))
    out = tmp_path / "out"
    code = main(["audit", str(corpus), "--out", str(out), "--quiet", "--jobs", "2", "--timeout", "60"])
    assert code == 0
    rows = _documents(out)
    assert rows["good.pdf"]["status"] == "ok"
    for name in ("zero.pdf", "truncated.pdf", "locked.pdf", "bomb.png"):
        assert rows[name]["status"] == "error" and rows[name]["error"], name
    assert "password" in rows["locked.pdf"]["error"]
    assert "decompression bomb" in rows["bomb.png"]["error"] or "too large" in rows["bomb.png"]["error"]
    assert rows["broken-xref.pdf"]["status"] in ("ok", "error")  # MuPDF may repair it; either way a row
    assert rows["pages.pdf"]["status"] == "ok" and rows["pages.pdf"]["pages"] == "3000"
    assert rows["report.pdf"]["status"] == "skipped"  # the zip bomb's member
    escaped = [p for p in rows if p in ("outside.pdf", "absolute.pdf")]
    assert all(rows[p]["status"] == "skipped" for p in escaped) and len(escaped) == 2
    assert rows["fine.pdf"]["status"] == "ok"
    assert rows["caf\\xe9.png"]["status"] == "ok"
    assert "loop" not in rows
    assert not (tmp_path / "outside.pdf").exists()
    html = (out / "report.html").read_text(encoding="utf-8")
    assert "<b>bold</b>" not in html


def test_password_file_opens_an_encrypted_pdf(tmp_path):
    corpus = tmp_path / "corpus"
    corpus.mkdir()
    hostile.encrypted_pdf(corpus / "locked.pdf", "tidewater")
    passwords = tmp_path / "passwords.txt"
    passwords.write_text("wrong\ntidewater\n")
    out = tmp_path / "out"
    main(["audit", str(corpus), "--out", str(out), "--quiet", "--password-file", str(passwords)])
    assert _documents(out)["locked.pdf"]["status"] == "ok"
    assert "tidewater" not in (out / "documents.csv").read_text()


def test_page_with_a_million_paths_does_not_stop_the_batch(tmp_path):
    corpus = tmp_path / "corpus"
    corpus.mkdir()
    hostile.many_paths_pdf(corpus / "dense.pdf", 1_000_000)
    pdf_with_rasters(corpus / "good.pdf", [300])
    out = tmp_path / "out"
    assert main(["audit", str(corpus), "--out", str(out), "--quiet", "--jobs", "2", "--timeout", "45"]) == 0
    rows = _documents(out)
    assert rows["good.pdf"]["status"] == "ok"
    dense = rows["dense.pdf"]
    assert dense["status"] == "timeout" or (dense["status"] == "ok" and "page 1" in dense["error"]) \
        or dense["status"] == "ok"


def test_long_pdf_split_into_page_ranges_equals_one_pass(tmp_path):
    import pymupdf

    source = pdf_with_rasters(tmp_path / "three.pdf", [100, 200, 400])
    long = pymupdf.open()
    for number in range(1, 101):
        if number in (1, 50, 100):
            long.insert_pdf(pymupdf.open(source), from_page=(number // 50), to_page=(number // 50))
        else:
            long.new_page()
    corpus = tmp_path / "corpus"
    corpus.mkdir()
    long.save(corpus / "thesis.pdf")
    config = load_config(None)
    assert page_ranges(discover([str(corpus / "thesis.pdf")], tmp_path / "s")[0], 40) == [(1, 40), (41, 80), (81, 100)]
    split = audit([str(corpus)], tmp_path / "split", config, RunOptions(jobs=2, chunk_pages=40, quiet=True))
    whole = audit([str(corpus)], tmp_path / "whole", config, RunOptions(inline=True, quiet=True))
    assert split.figures == whole.figures == 3
    assert _tables(tmp_path / "split") == _tables(tmp_path / "whole")


def _tables(out: Path) -> tuple[str, str, str]:
    return tuple((out / name).read_text(encoding="utf-8") for name in ("documents.csv", "figures.csv", "findings.csv"))


def test_kill_9_then_rerun_equals_an_uninterrupted_run(tmp_path):
    corpus = tmp_path / "corpus"
    corpus.mkdir()
    for number in range(8):
        pdf_with_rasters(corpus / f"report-{number}.pdf", [72 + 40 * number, 310])
    reference = tmp_path / "reference"
    main(["audit", str(corpus), "--out", str(reference), "--quiet", "--jobs", "1"])

    out = tmp_path / "out"
    command = [sys.executable, "-m", "corpusaudit", "audit", str(corpus), "--out", str(out), "--jobs", "1", "--quiet"]
    process = subprocess.Popen(command, cwd=REPO)
    deadline = time.monotonic() + 120
    while time.monotonic() < deadline:
        try:
            with sqlite3.connect(out / "audit.sqlite", timeout=1) as conn:
                done = conn.execute("SELECT count(*) FROM documents WHERE status = 'ok'").fetchone()[0]
        except sqlite3.Error:
            done = 0
        if done >= 2 or process.poll() is not None:
            break
        time.sleep(0.05)
    process.send_signal(signal.SIGKILL)
    process.wait()
    assert _workers_gone(str(out)), "a worker outlived the killed audit"
    main(["audit", str(corpus), "--out", str(out), "--quiet", "--jobs", "1"])
    assert _tables(out) == _tables(reference)


def _workers_gone(out: str, wait_s: float = 10.0) -> bool:
    """No process whose command line names this output folder is left (Linux /proc)."""
    deadline = time.monotonic() + wait_s
    while time.monotonic() < deadline:
        alive = []
        for cmdline in Path("/proc").glob("[0-9]*/cmdline"):
            try:
                alive.append(out in cmdline.read_bytes().decode(errors="replace").split("\0"))
            except OSError:  # the process ended while we looked
                continue
        if not any(alive):
            return True
        time.sleep(0.1)
    return False


def test_changed_configuration_invalidates_the_cache(tmp_path, capsys):
    corpus = tmp_path / "corpus"
    corpus.mkdir()
    pdf_with_rasters(corpus / "r.pdf", [200])
    out = tmp_path / "out"
    main(["audit", str(corpus), "--out", str(out), "--jobs", "1"])
    config = tmp_path / "strict.toml"
    config.write_text("[rules.raster-resolution]\nwarn_below_ppi = 250\n")
    main(["audit", str(corpus), "--out", str(out), "--jobs", "1", "--config", str(config)])
    assert "reused from cache: 0" in capsys.readouterr().err.splitlines()[-2]
    with (out / "findings.csv").open() as handle:
        assert [row["severity"] for row in csv.DictReader(handle)] == ["warning"]


def test_dask_executor_matches_the_local_one(tmp_path):
    distributed = pytest.importorskip("dask.distributed")
    corpus = tmp_path / "corpus"
    corpus.mkdir()
    for number in range(3):
        pdf_with_rasters(corpus / f"r{number}.pdf", [100 + 100 * number])
    local = tmp_path / "local"
    main(["audit", str(corpus), "--out", str(local), "--quiet", "--jobs", "1"])
    with distributed.LocalCluster(n_workers=1, threads_per_worker=1, processes=False,
                                  dashboard_address=None) as cluster:
        out = tmp_path / "dask"
        code = main(["audit", str(corpus), "--out", str(out), "--quiet", "--executor", "dask",
                     "--scheduler", cluster.scheduler_address])
    assert code == 0
    assert _tables(out) == _tables(local)
