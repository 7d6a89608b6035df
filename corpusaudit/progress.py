"""Progress on stderr: a live bar on a terminal, sparse log lines otherwise."""

from __future__ import annotations

import sys
import time
from collections import Counter
from typing import TextIO

LOG_EVERY_S = 30.0


def _duration(seconds: float) -> str:
    seconds = int(max(seconds, 0))
    hours, rest = divmod(seconds, 3600)
    return f"{hours}h{rest // 60:02d}m" if hours else f"{rest // 60}m{rest % 60:02d}s"


class Progress:
    def __init__(self, total: int, quiet: bool = False, stream: TextIO | None = None):
        self.total, self.done = total, 0
        self.stream = stream or sys.stderr
        self.quiet = quiet or total == 0
        self.live = not self.quiet and self.stream.isatty()
        self.started = self.last_log = time.monotonic()
        self.statuses: Counter[str] = Counter()

    def line(self) -> str:
        elapsed = time.monotonic() - self.started
        rate = self.done / elapsed if elapsed > 0 else 0.0
        remaining = (self.total - self.done) / rate if rate > 0 else 0.0
        problems = ", ".join(f"{n} {s}" for s, n in sorted(self.statuses.items()) if s != "ok")
        return (f"{self.done}/{self.total} documents, {rate:.1f}/s, {_duration(remaining)} left"
                + (f" ({problems})" if problems else ""))

    def advance(self, status: str) -> None:
        self.done += 1
        self.statuses[status] += 1
        if self.quiet:
            return
        if self.live:
            width = 24
            filled = int(width * self.done / self.total)
            self.stream.write(f"\r[{'#' * filled}{'.' * (width - filled)}] {self.line()}\033[K")
            self.stream.flush()
        elif time.monotonic() - self.last_log >= LOG_EVERY_S or self.done == self.total:
            self.last_log = time.monotonic()
            self.stream.write(self.line() + "\n")

    def close(self) -> None:
        if self.live:
            self.stream.write("\n")
            self.stream.flush()
