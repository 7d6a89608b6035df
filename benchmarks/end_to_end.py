"""End to end on the sample corpus: the audit's figures, chart types and findings against truth.json.

Audits sample_corpus/ (or reads an existing audit with --audit DIR), matches each truth
figure to the audited figure on the same page with the highest box overlap (IoU >= 0.5),
and prints figure recall and precision, chart-type accuracy, and per rule the precision
and recall of findings on matched figures.

    python benchmarks/end_to_end.py [--audit DIR] [--details]

--details lists each missed or unexpected finding with its figure (source, chart type in
truth and as audited, and the rules it left unmeasured).
"""

from __future__ import annotations

import argparse
import csv
import json
import sys
from collections import Counter, defaultdict
from pathlib import Path

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))

from corpusaudit.config import load_config  # noqa: E402
from corpusaudit.run import RunOptions, audit  # noqa: E402

CORPUS = REPO / "sample_corpus"
WORK = REPO / "benchmarks" / "_work" / "end_to_end"


def iou(a, b) -> float:
    x0, y0, x1, y1 = max(a[0], b[0]), max(a[1], b[1]), min(a[2], b[2]), min(a[3], b[3])
    inter = max(0.0, x1 - x0) * max(0.0, y1 - y0)
    union = (a[2] - a[0]) * (a[3] - a[1]) + (b[2] - b[0]) * (b[3] - b[1]) - inter
    return inter / union if union > 0 else 0.0


def rows(path: Path) -> list[dict]:
    with path.open(newline="", encoding="utf-8") as handle:
        return list(csv.DictReader(handle))


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--audit", type=Path, help="an audit of sample_corpus/ already written")
    parser.add_argument("--details", action="store_true", help="list each missed and unexpected finding")
    args = parser.parse_args()
    out = args.audit
    if out is None:
        out = WORK / "audit"
        documents = sorted(str(p) for p in CORPUS.rglob("*") if p.suffix.lower() in (".pdf", ".png", ".jpg", ".jpeg"))
        audit(documents, out, load_config(None), RunOptions(jobs=2, use_cache=False, quiet=True))
    truth = json.loads((CORPUS / "truth.json").read_text())
    figures = rows(out / "figures.csv")
    findings_by_figure: dict[str, set[str]] = defaultdict(set)
    for finding in rows(out / "findings.csv"):
        findings_by_figure[finding["figure_id"]].add(finding["rule"])
    by_page: dict[tuple[str, int], list[dict]] = defaultdict(list)
    for figure in figures:
        by_page[(Path(figure["path"]).name, int(figure["page"]))].append(figure)

    matched, truth_count, types_right = 0, 0, 0
    used: set[str] = set()
    confusion: Counter[tuple[str, str]] = Counter()
    tp: Counter[str] = Counter()
    fp: Counter[str] = Counter()
    fn: Counter[str] = Counter()
    details: list[str] = []
    for document in truth["documents"]:
        name = Path(document["path"]).name
        for expected in document.get("figures", []):
            truth_count += 1
            candidates = [f for f in by_page.get((name, expected["page"]), []) if f["figure_id"] not in used]
            best = max(candidates, key=lambda f: iou(expected["bbox"], [float(f[k]) for k in ("x0", "y0", "x1", "y1")]),
                       default=None)
            if best is None or iou(expected["bbox"], [float(best[k]) for k in ("x0", "y0", "x1", "y1")]) < 0.5:
                for rule in expected["expected_rules"]:
                    fn[rule] += 1
                continue
            used.add(best["figure_id"])
            matched += 1
            types_right += best["chart_type"] == expected["chart_type"]
            confusion[(expected["chart_type"], best["chart_type"] or "-")] += 1
            found, wanted = findings_by_figure[best["figure_id"]], set(expected["expected_rules"])
            for rule in found | wanted:
                if rule in found and rule in wanted:
                    tp[rule] += 1
                    continue
                (fp if rule in found else fn)[rule] += 1
                unmeasured = [r for r in best["unmeasured"].split(";") if r]
                details.append(f"{'FP' if rule in found else 'FN'} {rule:<21} {best['figure_id']:<24} {best['source']:<6} "
                               f"truth {expected['chart_type']:<9} audit {best['chart_type'] or '-':<9} "
                               f"{'unmeasured here' if rule in unmeasured else ''}")
    print(f"figures: truth {truth_count}, audited {len(figures)}, matched {matched} "
          f"(recall {matched / truth_count:.3f}, precision {matched / max(len(figures), 1):.3f})")
    print(f"chart type correct on matched figures: {types_right}/{matched} ({types_right / max(matched, 1):.3f})")
    wrong = sorted(((t, p, n) for (t, p), n in confusion.items() if t != p), key=lambda x: -x[2])
    if wrong:
        print("chart-type confusions (truth -> audit: count): " + ", ".join(f"{t}->{p}: {n}" for t, p, n in wrong))
    print(f"{'rule':<22} {'tp':>3} {'fp':>3} {'fn':>3} {'precision':>9} {'recall':>7}")
    for rule in sorted(set(tp) | set(fp) | set(fn)):
        precision = tp[rule] / (tp[rule] + fp[rule]) if tp[rule] + fp[rule] else float("nan")
        recall = tp[rule] / (tp[rule] + fn[rule]) if tp[rule] + fn[rule] else float("nan")
        print(f"{rule:<22} {tp[rule]:>3} {fp[rule]:>3} {fn[rule]:>3} {precision:>9.2f} {recall:>7.2f}")
    if args.details:
        print("\n".join(sorted(details)))


if __name__ == "__main__":
    main()
