"""Figure extraction benchmark: precision and recall of figure boxes (IoU >= 0.5) by source,
the mean IoU of the matched boxes, caption accuracy and milliseconds per page, on a generated
truth corpus.

    python -m benchmarks.extraction [--documents 44] [--rebuild]

The corpus is built once under benchmarks/_work/extraction/ (git-ignored) from a fixed seed.
"""

from __future__ import annotations

import argparse
import time
from collections import defaultdict
from pathlib import Path

from benchmarks.extraction_truth import build_corpus, iou, load_truth
from corpusaudit.extract import ExtractConfig, extract_document
from corpusaudit.model import Document

WORK = Path(__file__).resolve().parent / "_work" / "extraction"
IOU_MIN = 0.5
SOURCES = ("raster", "vector", "scan")


def match(truth_boxes, found_boxes):
    """Greedy one-to-one matching by IoU, best pairs first: list of (truth index, found index)."""
    pairs = sorted(((iou(t, f), i, j) for i, t in enumerate(truth_boxes) for j, f in enumerate(found_boxes)),
                   reverse=True)
    used_t, used_f, matched = set(), set(), []
    for score, i, j in pairs:
        if score < IOU_MIN:
            break
        if i not in used_t and j not in used_f:
            used_t.add(i)
            used_f.add(j)
            matched.append((i, j))
    return matched


def run(documents: int, rebuild: bool, verbose: bool) -> dict:
    if rebuild or not (WORK / "truth.json").is_file() or len(load_truth(WORK)) != documents:
        started = time.perf_counter()
        build_corpus(WORK, documents)
        print(f"built {documents} documents in {time.perf_counter() - started:.1f} s")
    truth = load_truth(WORK)
    config = ExtractConfig()
    tp = defaultdict(int)
    fn = defaultdict(int)
    fp = defaultdict(int)
    overlap = defaultdict(float)  # summed IoU of matched pairs
    captions_right = captions_total = spurious_captions = uncaptioned = 0
    pages = 0
    decorations = 0
    errors = []
    elapsed = 0.0
    for doc_truth in truth:
        path = WORK / doc_truth.name
        doc = Document(document_id=doc_truth.name, path=str(path), sha256="", bytes=path.stat().st_size,
                       kind="pdf", local_path=str(path))
        started = time.perf_counter()
        result = extract_document(doc, config)
        elapsed += time.perf_counter() - started
        pages += result.pages
        decorations += result.decorations
        errors += [f"{doc_truth.name} {e}" for e in result.errors]
        for number, page_truth in enumerate(doc_truth.pages, start=1):
            found = [f for f in result.figures if f.page == number]
            pairs = match([t.box for t in page_truth], [f.bbox for f in found])
            matched_t = {i for i, _ in pairs}
            matched_f = {j for _, j in pairs}
            for i, j in pairs:
                t, f = page_truth[i], found[j]
                if verbose and iou(t.box, f.bbox) < 0.8:
                    print(f"  loose box {t.source}/{t.kind}: {doc_truth.name} p{number} IoU {iou(t.box, f.bbox):.2f}")
                key = t.source if t.source == f.source else f"{t.source}->{f.source}"
                tp[t.source] += 1
                overlap[t.source] += iou(t.box, f.bbox)
                if key != t.source and verbose:
                    print(f"  source {key}: {doc_truth.name} p{number} {t.kind}")
                if t.caption_number:
                    captions_total += 1
                    right = f.figure_number == t.caption_number
                    captions_right += right
                    if not right and verbose:
                        print(f"  caption: {doc_truth.name} p{number} {t.kind} want {t.caption_number!r} "
                              f"got {f.figure_number!r} ({f.caption[:40]!r})")
                else:
                    uncaptioned += 1
                    spurious_captions += bool(f.figure_number)
                    if f.figure_number and verbose:
                        print(f"  spurious caption: {doc_truth.name} p{number} {t.kind} got {f.figure_number!r}")
            for i, t in enumerate(page_truth):
                if i not in matched_t:
                    fn[t.source] += 1
                    if verbose:
                        best = max((iou(t.box, f.bbox) for f in found), default=0)
                        print(f"  missed {t.source}/{t.kind}: {doc_truth.name} p{number} {tuple(round(v) for v in t.box)} best IoU {best:.2f}")
            for j, f in enumerate(found):
                if j not in matched_f:
                    fp[f.source] += 1
                    if verbose:
                        print(f"  extra {f.source}: {doc_truth.name} p{number} {tuple(round(v) for v in f.bbox)}")
    print(f"documents {len(truth)}, pages {pages}, decorations skipped {decorations}, page errors {len(errors)}")
    for error in errors[:10]:
        print("  error:", error)
    print(f"{'source':8} {'truth':>6} {'found':>6} {'TP':>5} {'precision':>10} {'recall':>8} {'mean IoU':>9}")
    summary = {}
    for source in SOURCES:
        truth_count = tp[source] + fn[source]
        found_count = tp[source] + fp[source]
        precision = tp[source] / found_count if found_count else float("nan")
        recall = tp[source] / truth_count if truth_count else float("nan")
        summary[source] = (precision, recall)
        mean_iou = overlap[source] / tp[source] if tp[source] else float("nan")
        print(f"{source:8} {truth_count:6d} {found_count:6d} {tp[source]:5d} {precision:10.3f} {recall:8.3f} "
              f"{mean_iou:9.3f}")
    print(f"captions: {captions_right}/{captions_total} correct ({captions_right / max(captions_total, 1):.3f}); "
          f"spurious on uncaptioned figures: {spurious_captions}/{uncaptioned}")
    print(f"time: {1000 * elapsed / max(pages, 1):.1f} ms per page ({elapsed:.2f} s for {pages} pages)")
    return summary


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--documents", type=int, default=44)
    parser.add_argument("--rebuild", action="store_true")
    parser.add_argument("--verbose", action="store_true", help="list every miss, extra and wrong caption")
    args = parser.parse_args()
    run(args.documents, args.rebuild, args.verbose)


if __name__ == "__main__":
    main()
