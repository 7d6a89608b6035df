"""python -m corpusaudit.democorpus OUT_DIR [--documents N --seed S]: build the sample corpus."""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

from corpusaudit.democorpus.build import build_corpus, build_sample_corpus


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(prog="python -m corpusaudit.democorpus", description=__doc__)
    parser.add_argument("out_dir", type=Path)
    parser.add_argument("--documents", type=int, default=None,
                        help="write N generated benchmark documents instead of the curated sample corpus")
    parser.add_argument("--seed", type=int, default=0)
    args = parser.parse_args(argv)
    start = time.perf_counter()
    if args.documents is None:
        truth = build_sample_corpus(args.out_dir)
    else:
        truth = build_corpus(args.out_dir, args.documents, seed=args.seed)
    print(f"wrote {truth} in {time.perf_counter() - start:.1f} s")
    return 0


if __name__ == "__main__":
    sys.exit(main())
