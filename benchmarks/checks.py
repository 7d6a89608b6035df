"""Benchmark of the chart checks on generated charts with known truth.

Draws N cases (corpusaudit.checks.cases, its own seed: separate from the classifier's
training data), each as a vector figure and as a raster figure, runs every rule through
the runner with default settings, and prints per-rule precision and recall for vector and
raster separately, plus measurement errors. A rule that could not measure counts as not
reporting (a miss when the truth is positive) and is counted in the 'unmeasured' column.

    python benchmarks/checks.py [--cases 400] [--seed 20240517]
"""

from __future__ import annotations

import argparse
import json
import sys
import time
from collections import defaultdict
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from corpusaudit.checks import cases as case_module  # noqa: E402
from corpusaudit.checks.runner import check_figure  # noqa: E402
from corpusaudit.config import build_config  # noqa: E402
from corpusaudit.measure import Measurements  # noqa: E402
from corpusaudit.model import MeasurementUnavailable  # noqa: E402

WORK = Path(__file__).resolve().parent / "_work"


def _measured(measurements: Measurements, name: str):
    try:
        return measurements.get(name)
    except MeasurementUnavailable:
        return None


def _measurement_errors(case, measurements: Measurements, errors: dict) -> None:
    values = case.truth_values
    if "slices" in values:
        pie = _measured(measurements, "pie")
        errors["pie slice count exact"].append(pie is not None and len(pie.slices) == values["slices"])
        if pie is not None and len(pie.slices) == values["slices"]:
            # slices come counter-clockwise; the case drew them clockwise from 12 o'clock
            measured = sorted(pie.shares)
            errors["pie slice share MAE (points)"].append(100 * float(np.mean(np.abs(np.array(measured) - np.sort(values["shares"])))))
    if "axis_min" in values and not values.get("horizontal"):
        axes = _measured(measurements, "axes")
        if axes is not None and axes.y.fit is not None:
            low, high = axes.y.value_range
            errors["bar axis minimum relative error"].append(abs(low - values["axis_min"]) / max(high - values["axis_min"], 1e-9))
        else:
            errors["bar axis minimum relative error (unmeasured share)"].append(1.0)
    if values.get("rotation") is not None:
        angle = _measured(measurements, "tick_label_angle")
        if angle is not None:
            errors["label angle error (deg)"].append(abs(angle.angle - values["rotation"]))
    if "series" in values:
        series = _measured(measurements, "line_series")
        count = len(series) if series is not None else None
        if case.chart_type == "area":
            layers = _measured(measurements, "areas")
            count = max(count or 0, layers.count if layers else 0) if (series is not None or layers) else None
        errors["series count exact"].append(count == values["series"])


def run(count: int, seed: int) -> dict:
    config = build_config({})
    cases = case_module.generate(count, seed)
    rng = np.random.default_rng(seed + 1)
    tallies = {src: defaultdict(lambda: {"tp": 0, "fp": 0, "fn": 0, "tn": 0, "unmeasured": 0}) for src in ("vector", "raster")}
    errors = {src: defaultdict(list) for src in ("vector", "raster")}
    started = time.perf_counter()
    for case in cases:
        for source in ("vector", "raster"):
            figure = case_module.vector_figure(case) if source == "vector" else case_module.raster_figure(case, rng)
            measurements = Measurements(figure)
            results, unmeasured = check_figure(figure, config, measurements)
            found = {r.rule for r in results}
            for rule_id, expected in case.truth.items():
                tally = tallies[source][rule_id]
                predicted = rule_id in found
                tally["unmeasured"] += rule_id in unmeasured
                tally[("tp" if expected else "fp") if predicted else ("fn" if expected else "tn")] += 1
            _measurement_errors(case, measurements, errors[source])
    elapsed = time.perf_counter() - started
    return {"cases": count, "figures": 2 * count, "seconds": round(elapsed, 1),
            "rules": {src: dict(t) for src, t in tallies.items()},
            "errors": {src: {k: float(np.mean(v)) for k, v in e.items()} for src, e in errors.items()},
            "error_counts": {src: {k: len(v) for k, v in e.items()} for src, e in errors.items()}}


def _ratio(a: int, b: int) -> str:
    return f"{a / b:.2f}" if b else "  - "


def print_report(report: dict) -> None:
    print(f"{report['cases']} cases, {report['figures']} figures, {report['seconds']} s")
    rules = sorted(set(report["rules"]["vector"]) | set(report["rules"]["raster"]))
    print(f"{'rule':24} | {'vector P':>8} {'R':>5} {'pos':>4} {'n':>4} {'unm':>4} | {'raster P':>8} {'R':>5} {'pos':>4} {'n':>4} {'unm':>4}")
    for rule_id in rules:
        cells = []
        for source in ("vector", "raster"):
            t = report["rules"][source].get(rule_id, {"tp": 0, "fp": 0, "fn": 0, "tn": 0, "unmeasured": 0})
            n = t["tp"] + t["fp"] + t["fn"] + t["tn"]
            cells.append(f"{_ratio(t['tp'], t['tp'] + t['fp']):>8} {_ratio(t['tp'], t['tp'] + t['fn']):>5} "
                         f"{t['tp'] + t['fn']:>4} {n:>4} {t['unmeasured']:>4}")
        print(f"{rule_id:24} | {cells[0]} | {cells[1]}")
    print("measurements:")
    for source in ("vector", "raster"):
        for key, value in sorted(report["errors"][source].items()):
            print(f"  {source:6} {key:52} {value:.3f}  (n={report['error_counts'][source][key]})")


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--cases", type=int, default=400)
    parser.add_argument("--seed", type=int, default=20240517)
    args = parser.parse_args()
    report = run(args.cases, args.seed)
    WORK.mkdir(parents=True, exist_ok=True)
    (WORK / "checks.json").write_text(json.dumps(report, indent=1))
    print_report(report)


if __name__ == "__main__":
    main()
