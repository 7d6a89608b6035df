"""A crash-proof pool of worker processes: one document at a time per worker.

Each task has a wall-clock limit and each worker a resident-memory ceiling. A worker that
overruns either is killed and replaced; one that dies (a segfault in a native library,
the kernel's out-of-memory killer) costs its current document only. Results come back
in completion order as (task, result) pairs or (task, Failure).
"""

from __future__ import annotations

import contextlib
import ctypes
import faulthandler
import gc
import multiprocessing as mp
import os
import resource
import signal
import sys
import time
from dataclasses import dataclass
from multiprocessing.connection import Connection, wait
from typing import Any, Callable, Iterable, Iterator

POLL_S = 0.2
_PAGE_BYTES = os.sysconf("SC_PAGE_SIZE") if hasattr(os, "sysconf") else 4096


@dataclass(frozen=True)
class Failure:
    status: str  # "error" or "timeout"
    reason: str


def resident_bytes(pid: int) -> int:
    """Resident set size of a process (Linux /proc), 0 when unknown."""
    try:
        with open(f"/proc/{pid}/statm", "rb") as handle:
            return int(handle.read().split()[1]) * _PAGE_BYTES
    except (OSError, IndexError, ValueError):
        return 0


def private_bytes(pid: int) -> int:
    """Memory a worker holds of its own (private pages, Linux smaps_rollup); its resident size
    where that is unknown. A forked worker's resident size also counts the pages it still
    shares with the audit process, which the ceiling must not charge to the document."""
    try:
        with open(f"/proc/{pid}/smaps_rollup", "rb") as handle:
            fields = dict(line.split(b":", 1) for line in handle.read().splitlines() if b":" in line)
        return sum(int(fields[key].split()[0]) for key in (b"Private_Clean", b"Private_Dirty")) * 1024
    except (OSError, KeyError, IndexError, ValueError):
        return resident_bytes(pid)


@contextlib.contextmanager
def single_threaded_libraries():
    """One thread each for BLAS, OpenMP and OpenCV while the pool runs: parallelism comes from
    the document workers (--jobs), and per-figure arrays are too small to share out (threads
    spinning on the other workers' cores made colour maths six times slower on two cores).
    Set in the parent before forking: changing a thread pool inside a forked child can
    deadlock on a lock the parent's threads held at the fork."""
    import cv2
    from threadpoolctl import threadpool_limits

    threads = cv2.getNumThreads()
    cv2.setNumThreads(1)
    try:
        with threadpool_limits(limits=1):
            yield
    finally:
        cv2.setNumThreads(threads)


PR_SET_PDEATHSIG = 1  # linux/prctl.h


def _die_with(parent: int) -> None:
    """Ask the kernel to kill this worker when the audit process dies (kill -9 included).

    Otherwise an orphaned worker waits for ever to send its result: its siblings, forked
    after it, hold copies of the parent's end of its pipe, so the pipe never breaks."""
    if sys.platform.startswith("linux"):
        ctypes.CDLL(None, use_errno=True).prctl(PR_SET_PDEATHSIG, signal.SIGKILL)
    if os.getppid() != parent:  # the parent died before the request took effect
        os._exit(1)


def _serve(function: Callable[[Any], Any], connection: Connection, parent: int) -> None:
    _die_with(parent)
    # A native crash is reported by the parent as this document's error; a traceback dump
    # inherited from the parent (pytest enables one) would only clutter the log.
    faulthandler.disable()
    # A page's drawings are tens of thousands of small containers that live until the page
    # is done; the default collector thresholds rescan them over and over (about 40% of the
    # time on a scatter plot of 5,000 markers). What the parent imported is frozen out of it.
    gc.freeze()
    gc.set_threshold(50_000, 20, 20)
    while True:
        try:
            task = connection.recv()
        except EOFError:
            return
        if task is None:
            return
        try:
            reply = ("ok", function(task))
        except MemoryError:
            reply = ("error", "out of memory while reading this document")
        except Exception as exc:  # reported to the parent, which records it and goes on
            reply = ("error", f"internal error: {type(exc).__name__}: {exc}")
        peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024  # Linux reports KiB
        connection.send((*reply, peak))


class _Worker:
    def __init__(self, context, function):
        self.connection, child = context.Pipe()
        self.process = context.Process(target=_serve, args=(function, child, os.getpid()), daemon=True)
        self.process.start()
        child.close()
        self.task: Any = None
        self.deadline = 0.0
        self.peak_rss = 0
        self.served = 0

    def assign(self, task: Any, time_limit: float) -> None:
        self.task, self.deadline = task, time.monotonic() + time_limit
        self.connection.send(task)

    def kill(self) -> None:
        self.process.kill()
        self.process.join(5)
        self.connection.close()

    def stop(self) -> None:
        try:
            self.connection.send(None)
        except (BrokenPipeError, OSError):
            pass
        self.process.join(5)
        if self.process.is_alive():
            self.kill()


def run_pool(function: Callable[[Any], Any], tasks: Iterable[Any], jobs: int, time_limit: float,
             memory_limit: int, on_peak: Callable[[int], None] | None = None,
             recycle_after: int = 25) -> Iterator[tuple[Any, Any]]:
    """Run function(task) in `jobs` processes; yield (task, result | Failure) as each finishes.

    A worker is replaced after recycle_after tasks, so that what native libraries keep
    between documents cannot make memory grow over a long batch."""
    # fork is cheap (the parent has imported everything) and the parent holds no open
    # documents or threads of its own while workers run; spawn where fork does not exist.
    context = mp.get_context("fork" if "fork" in mp.get_all_start_methods() else "spawn")
    queue = list(tasks)[::-1]
    with single_threaded_libraries():
        yield from _run(context, function, queue, jobs, time_limit, memory_limit, on_peak, recycle_after)


def _run(context, function, queue, jobs, time_limit, memory_limit, on_peak, recycle_after):
    workers = [_Worker(context, function) for _ in range(min(jobs, len(queue)))]
    try:
        while queue or any(w.task is not None for w in workers):
            for worker in workers:
                if worker.task is None and queue:
                    worker.assign(queue.pop(), time_limit)
            busy = [w for w in workers if w.task is not None]
            ready = wait([w.connection for w in busy] + [w.process.sentinel for w in busy], timeout=POLL_S)
            now = time.monotonic()
            for index, worker in enumerate(workers):
                if worker.task is None:
                    continue
                task = worker.task
                outcome: Any = None
                replace = False
                if worker.connection in ready:
                    try:
                        kind, payload, peak = worker.connection.recv()
                        worker.peak_rss = max(worker.peak_rss, peak)
                        outcome = payload if kind == "ok" else Failure("error", payload)
                    except (EOFError, OSError):
                        outcome, replace = _death(worker), True
                elif worker.process.sentinel in ready or not worker.process.is_alive():
                    outcome, replace = _death(worker), True
                elif now > worker.deadline:
                    outcome, replace = Failure("timeout", f"time limit of {time_limit:g} s exceeded"), True
                    worker.kill()
                else:
                    resident = resident_bytes(worker.process.pid)
                    worker.peak_rss = max(worker.peak_rss, resident)
                    # Private pages are a subset of resident ones; smaps_rollup walks the worker's
                    # page tables (about 15 ms, stalling its memory maps), so read it only when needed.
                    if memory_limit and resident > memory_limit and private_bytes(worker.process.pid) > memory_limit:
                        outcome = Failure("error", f"memory ceiling of {memory_limit // 2**20} MiB exceeded")
                        replace = True
                        worker.kill()
                if outcome is None:
                    continue
                worker.served += 1
                if not replace and worker.served >= recycle_after:
                    worker.stop()
                    replace = True
                if replace:
                    if on_peak:
                        on_peak(worker.peak_rss)
                    workers[index] = _Worker(context, function)
                else:
                    worker.task = None
                yield task, outcome
    finally:
        for worker in workers:
            if on_peak and worker.served:  # a replacement started near the end may never have served
                on_peak(worker.peak_rss)
            worker.stop()


def _death(worker: _Worker) -> Failure:
    worker.process.join(1)
    code = worker.process.exitcode
    cause = f"killed by signal {-code}" if code is not None and code < 0 else f"exit code {code}"
    worker.connection.close()
    return Failure("error", f"worker process crashed ({cause}) while reading this document")
