"""Throughput of the audit against the bare cost of PyMuPDF, at 10, 100 and 1,000 documents.

For each corpus size (sample-corpus style documents from corpusaudit.democorpus, each corpus
the first documents of the next larger one) it prints
wall time, documents and pages per second, time per document, the peak resident memory
of the biggest worker, the speed-up of --jobs 2 over --jobs 1, and the ratio of the
audit's wall time to a floor: PyMuPDF alone, in one process, opening every document,
reading every page's images, drawings and text, and rendering exactly the figure regions
that the audit reports at the audit's dpi. The ratio is printed for one job (like for
like: one process each) and for the default, one job per core (what a user gets; the
floor stays one process, so this ratio flatters the audit by up to the core count).

    python benchmarks/throughput.py [--sizes 10,100,1000] [--speedup-size 100]
"""

from __future__ import annotations

import argparse
import csv
import os
import shutil
import statistics
import sys
import time
from collections import defaultdict
from pathlib import Path

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))

# corpusaudit first: importing it keeps PyMuPDF's unused layout analyser from loading, as in the CLI
from corpusaudit.config import load_config  # noqa: E402
from corpusaudit.democorpus.build import build_corpus  # noqa: E402
from corpusaudit.run import RunOptions, audit  # noqa: E402

import pymupdf  # noqa: E402

WORK = REPO / "benchmarks" / "_work" / "throughput"
# One seed for every size: the generator draws documents in sequence, so each corpus is the
# first documents of the larger ones and sizes differ in count, not in the mix of documents.
CORPUS_SEED = 0


def corpus_of(size: int) -> Path:
    folder = WORK / f"corpus-{size}"
    marker = folder / ".complete"
    if not marker.exists() or marker.read_text() != f"seed {CORPUS_SEED}":
        if folder.exists():
            shutil.rmtree(folder)
        # built in a child: drawing the charts enlarges this process, which every audit's
        # workers are forked from (their resident size would count it)
        in_child(build_corpus, folder, size, seed=CORPUS_SEED)
        marker.write_text(f"seed {CORPUS_SEED}")
    return folder


def in_child(function, *args, **kwargs):
    """function(*args, **kwargs) in a forked process of its own; its result."""
    import multiprocessing
    from concurrent.futures import ProcessPoolExecutor

    with ProcessPoolExecutor(max_workers=1, mp_context=multiprocessing.get_context("fork")) as pool:
        return pool.submit(function, *args, **kwargs).result()


def run_audit(folder: Path, jobs: int, tag: str) -> tuple[float, object, Path]:
    out = WORK / f"out-{folder.name}-{tag}"
    config = load_config(None)
    started = time.perf_counter()
    summary = audit([str(folder)], out, config, RunOptions(jobs=jobs, use_cache=False, quiet=True))
    return time.perf_counter() - started, summary, out


def floor_seconds(folder: Path, out: Path, dpi: int) -> tuple[float, int]:
    """PyMuPDF alone: open, read images, drawings and text of every page, render the audit's figure regions."""
    regions: dict[str, dict[int, list[tuple[float, ...]]]] = defaultdict(lambda: defaultdict(list))
    with (out / "figures.csv").open(newline="") as handle:
        for row in csv.DictReader(handle):
            if row["source"] in ("raster", "vector", "scan"):
                regions[row["path"]][int(row["page"])].append(
                    tuple(float(row[k]) for k in ("x0", "y0", "x1", "y1")))
    pages = 0
    started = time.perf_counter()
    for path in sorted(folder.rglob("*.pdf")):
        try:
            doc = pymupdf.open(path)
        except Exception:
            continue
        wanted = regions.get(str(path), {})
        for page in doc:
            pages += 1
            page.get_image_info(xrefs=True)
            page.get_cdrawings()
            page.get_text("dict")
            for box in wanted.get(page.number + 1, ()):
                page.get_pixmap(dpi=dpi, clip=pymupdf.Rect(box))
        doc.close()
    return time.perf_counter() - started, pages


def stage_split(folder: Path) -> dict[str, float]:
    """CPU seconds per pipeline stage over the corpus, run in this process (no pool)."""
    import corpusaudit.run as run_module
    from corpusaudit.discover import discover
    from corpusaudit.workers import single_threaded_libraries

    spent: dict[str, float] = defaultdict(float)

    def timed(stage: str, function):
        def wrapper(*args, **kwargs):
            started = time.process_time()
            try:
                return function(*args, **kwargs)
            finally:
                spent[stage] += time.process_time() - started
        return wrapper

    originals = {name: getattr(run_module, name) for name in ("extract_document", "_predictions", "check_figure", "_png")}
    stages = {"extract_document": "extract (PyMuPDF reading, regions, renders)", "_predictions": "classify",
              "check_figure": "measure and check", "_png": "encode PNGs"}
    config = load_config(None)
    # the corpus' manifest and truth files are skipped rows of the audit, not documents
    documents = [doc for doc in discover([str(folder)], WORK / "scratch", exclude=WORK / "none")
                 if doc.status == "ok"]
    run_module._classifier()
    try:
        for name, stage in stages.items():
            setattr(run_module, name, timed(stage, originals[name]))
        with single_threaded_libraries():
            started = time.process_time()
            for doc in documents:
                run_module.process_document(doc, config)
            spent["total"] = time.process_time() - started
    finally:
        for name, function in originals.items():
            setattr(run_module, name, function)
    return {stage: seconds / len(documents) for stage, seconds in spent.items()}


def floor_in_child(folder: Path, out: Path, dpi: int) -> tuple[float, int]:
    """floor_seconds in a process of its own: what PyMuPDF caches while it renders (its store
    holds up to 256 MiB) must not enlarge the process the next audit forks its workers from."""
    return in_child(floor_seconds, folder, out, dpi)


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--sizes", default="10,100,1000")
    parser.add_argument("--speedup-size", type=int, default=100)
    args = parser.parse_args()
    sizes = [int(s) for s in args.sizes.split(",")]
    dpi = load_config(None).extract.dpi
    cores = os.cpu_count() or 1
    print(f"{'docs':>6} {'wall s':>8} {'docs/s':>7} {'pages/s':>8} {'ms/doc':>8} {'peak MiB':>9} {'median':>7} "
          f"{'floor s':>8} {'ratio':>6} {f'wall j{cores}':>8} {f'ratio j{cores}':>8}")
    print("  (one job unless marked; peak: the biggest worker's peak resident size; median: the median of the"
          " workers' peaks, each worker serving up to 25 documents)")
    walls: dict[tuple[int, int], float] = {}
    for size in sizes:
        folder = corpus_of(size)
        wall, summary, out = run_audit(folder, 1, "j1")
        walls[size, 1] = wall
        floor, pages = floor_in_child(folder, out, dpi)
        walls[size, cores] = run_audit(folder, cores, f"j{cores}")[0] if cores > 1 else wall
        print(f"{size:>6} {wall:>8.2f} {size / wall:>7.2f} {pages / wall:>8.1f} {1000 * wall / size:>8.1f} "
              f"{summary.peak_worker_rss / 2**20:>9.0f} {statistics.median(summary.worker_peaks) / 2**20:>7.0f} "
              f"{floor:>8.2f} {wall / floor:>6.2f} {walls[size, cores]:>8.2f} {walls[size, cores] / floor:>8.2f}",
              flush=True)
    folder = corpus_of(args.speedup_size)
    one = walls.get((args.speedup_size, 1)) or run_audit(folder, 1, "j1")[0]
    two = walls[args.speedup_size, 2] if (args.speedup_size, 2) in walls else run_audit(folder, 2, "j2")[0]
    print(f"speed-up of --jobs 2 over --jobs 1 at {args.speedup_size} documents: {one / two:.2f} "
          f"({one:.1f} s -> {two:.1f} s)")
    split = stage_split(corpus_of(min(sizes)))
    print(f"CPU time per document by stage ({min(sizes)} documents, one process):")
    for stage, seconds in sorted(split.items(), key=lambda kv: -kv[1]):
        print(f"  {1000 * seconds:8.1f} ms  {stage}")


if __name__ == "__main__":
    main()
