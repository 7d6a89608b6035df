"""Command line: parses arguments and calls the library. Exit codes per design.md."""

from __future__ import annotations

import argparse
import logging
import os
import sys
from pathlib import Path

from corpusaudit import __version__

EXIT_OK = 0
EXIT_FINDINGS = 1
EXIT_USAGE = 2
SEVERITY_FOR_FAIL = {"error": 3, "warning": 2}


def _parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(prog="corpusaudit", description="Audit the figures of a corpus of PDFs and images.")
    parser.add_argument("--version", action="version", version=f"corpusaudit {__version__}")
    commands = parser.add_subparsers(dest="command", required=True)

    audit = commands.add_parser("audit", help="audit PDFs, images, folders and .zip archives")
    audit.add_argument("inputs", nargs="+", metavar="INPUT")
    audit.add_argument("--out", required=True, type=Path, metavar="DIR")
    _add_run_options(audit)

    commands.add_parser("rules", help="list every rule with its thresholds and rationale")

    classify = commands.add_parser("classify", help="chart type and confidence per image, CSV on stdout")
    classify.add_argument("images", nargs="+", metavar="IMAGE")
    classify.add_argument("--model", type=Path, metavar="FILE", help="a model written by `train` (default: shipped)")

    train = commands.add_parser("train", help="rebuild the chart-type classifier from generated data")
    train.add_argument("--out", required=True, type=Path, metavar="FILE")
    train.add_argument("--samples", type=int, default=400, metavar="N", help="generated figures per label")
    train.add_argument("--seed", type=int, default=0, metavar="S")
    train.add_argument("--extra", type=Path, action="append", default=[], metavar="DIR",
                       help="your own labelled figures: DIR/<chart type>/*.png (repeatable)")

    demo = commands.add_parser("demo", help="audit the bundled sample corpus (building it when absent)")
    demo.add_argument("--out", required=True, type=Path, metavar="DIR")
    _add_run_options(demo, manifest=False)
    return parser


def _add_run_options(command: argparse.ArgumentParser, manifest: bool = True) -> None:
    command.add_argument("--jobs", type=int, default=os.cpu_count() or 1, metavar="N",
                         help="worker processes (default: the number of cores)")
    command.add_argument("--timeout", type=float, default=120.0, metavar="S",
                         help="time limit per document in seconds (default 120)")
    command.add_argument("--memory-limit", type=int, default=2048, metavar="MB",
                         help="memory ceiling per worker, its own pages (default 2048)")
    command.add_argument("--password-file", type=Path, metavar="FILE",
                         help="passwords to try on encrypted PDFs, one per line")
    command.add_argument("--executor", choices=("local", "dask"), default="local",
                         help="run documents locally or on a Dask cluster (needs corpusaudit[dask])")
    command.add_argument("--scheduler", default="", metavar="ADDRESS", help="Dask scheduler address")
    command.add_argument("--config", type=Path, metavar="FILE", help="TOML configuration")
    if manifest:
        command.add_argument("--manifest", type=Path, metavar="CSV", help="CSV with a path column and group columns")
    command.add_argument("--dpi", type=int, metavar="N", help="render resolution for figures (default 150)")
    command.add_argument("--fail-on", choices=("error", "warning"), help="exit 1 when a finding reaches this severity")
    command.add_argument("--no-cache", action="store_true", help="reprocess documents already in the store")
    command.add_argument("--annotate", action="store_true",
                         help="write copies of PDFs with findings, annotated, to DIR/annotated/")
    command.add_argument("--quiet", action="store_true", help="print nothing but errors")


def _print_rules() -> None:
    from corpusaudit.checks.registry import all_rules

    for rule in all_rules():
        applies = "any chart" if rule.applies_to == ("*",) else ", ".join(rule.applies_to)
        print(f"{rule.id}  [{rule.severity}]  applies to: {applies}; sources: {', '.join(rule.sources)}"
              + ("" if rule.status == "stable" else f"  ({rule.status})"))
        for option in rule.options:
            print(f"    {option.key} = {option.default}: {option.help} (source: {option.source})")
        print(f"    why: {rule.rationale}")
        print(f"    fix: {rule.fix}")
        print(f"    problem: {rule.problem}")
        print(f"    better: {rule.better}")
        print(f"    limits: {rule.limitations}")
        print()


def _run_audit(args: argparse.Namespace, inputs: list[str], manifest: Path | None) -> int:
    from corpusaudit.config import ConfigError, load_config
    from corpusaudit.distributed import DaskUnavailable
    from corpusaudit.run import RunOptions, audit

    overrides: dict = {"dpi": args.dpi} if args.dpi else {}
    try:
        if args.password_file:
            lines = args.password_file.read_text(encoding="utf-8").splitlines()
            overrides["passwords"] = tuple(line for line in lines if line)
        config = load_config(args.config, overrides)
    except (ConfigError, OSError) as exc:
        print(f"corpusaudit: {exc}", file=sys.stderr)
        return EXIT_USAGE
    if not any(os.path.lexists(path) for path in inputs):
        print(f"corpusaudit: no such input: {', '.join(inputs)}", file=sys.stderr)
        return EXIT_USAGE
    if manifest is not None and not manifest.is_file():
        print(f"corpusaudit: manifest {manifest} not found", file=sys.stderr)
        return EXIT_USAGE
    options = RunOptions(jobs=max(1, args.jobs), time_limit_s=args.timeout, memory_limit_mb=args.memory_limit,
                         use_cache=not args.no_cache, executor=args.executor, scheduler=args.scheduler,
                         quiet=args.quiet, annotate=args.annotate)
    try:
        summary = audit(inputs, args.out, config, options, manifest=manifest)
    except (ValueError, DaskUnavailable) as exc:
        print(f"corpusaudit: {exc}", file=sys.stderr)
        return EXIT_USAGE
    if not args.quiet:
        statuses = ", ".join(f"{n} {s}" for s, n in sorted(summary.statuses.items()))
        severities = ", ".join(f"{n} {s}" for s, n in sorted(summary.findings_by_severity.items())) or "none"
        print(f"documents: {statuses or 'none'}; figures: {summary.figures}; findings: {severities}; "
              f"reused from cache: {summary.reused}; elapsed {summary.elapsed_s:.1f} s", file=sys.stderr)
        print(f"report: {summary.out_dir / 'report.html'}", file=sys.stderr)
    if not summary.statuses:
        print("corpusaudit: no input files found", file=sys.stderr)
        return EXIT_USAGE
    if args.fail_on and summary.worst_severity_rank() >= SEVERITY_FOR_FAIL[args.fail_on]:
        return EXIT_FINDINGS
    return EXIT_OK


def _demo(args: argparse.Namespace) -> int:
    from corpusaudit.democorpus.build import build_sample_corpus
    from corpusaudit.discover import AUDITABLE_KINDS, KIND_EXTENSIONS

    bundled = Path(__file__).resolve().parents[1] / "sample_corpus"
    if not (bundled / "truth.json").is_file():
        bundled = args.out / "sample_corpus"
        build_sample_corpus(bundled)
    try:
        shown = Path(os.path.relpath(bundled))
    except ValueError:  # another drive on Windows
        shown = bundled
    # The documents only: the corpus folder also holds its README, truth file and manifest.
    documents = sorted(str(path) for path in shown.rglob("*")
                       if path.is_file() and KIND_EXTENSIONS.get(path.suffix.lower()) in AUDITABLE_KINDS)
    manifest = shown / "manifest.csv"
    return _run_audit(args, documents, manifest if manifest.is_file() else None)


def _classify(args: argparse.Namespace) -> int:
    import csv

    from corpusaudit.classify import ModelIntegrityError
    from corpusaudit.classify.train import classify_paths

    try:
        rows = classify_paths(args.images, args.model)
    except (ModelIntegrityError, FileNotFoundError) as exc:
        print(f"corpusaudit: {exc}", file=sys.stderr)
        return EXIT_USAGE
    writer = csv.DictWriter(sys.stdout, fieldnames=["path", "chart_type", "confidence", "top3", "error"],
                            extrasaction="ignore", lineterminator="\n")
    writer.writeheader()
    writer.writerows(rows)
    return EXIT_OK


def _train(args: argparse.Namespace) -> int:
    from corpusaudit.classify.train import train

    try:
        report = train(args.out, args.samples, args.seed, args.extra)
    except ValueError as exc:
        print(f"corpusaudit: {exc}", file=sys.stderr)
        return EXIT_USAGE
    print(f"model: {report.path} ({report.bytes} bytes, sha256 {report.sha256}); "
          f"cross-validated macro-F1 {report.cv_macro_f1:.3f} on {report.samples} figures; "
          f"{report.seconds:.0f} s", file=sys.stderr)
    return EXIT_OK


def main(argv: list[str] | None = None) -> int:
    try:
        return _main(argv)
    except BrokenPipeError:  # `corpusaudit rules | head`: the reader left; not an error
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        return EXIT_OK


def _main(argv: list[str] | None) -> int:
    args = _parser().parse_args(argv)
    logging.basicConfig(level=logging.WARNING, format="corpusaudit: %(levelname)s: %(message)s")
    if args.command == "rules":
        _print_rules()
        return EXIT_OK
    if args.command == "demo":
        return _demo(args)
    if args.command == "classify":
        return _classify(args)
    if args.command == "train":
        return _train(args)
    return _run_audit(args, args.inputs, args.manifest)
