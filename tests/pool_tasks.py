"""Task functions for the worker-pool tests (importable by spawned workers)."""

from __future__ import annotations

import os
import signal
import time


def behave(task: str) -> str:
    if task == "crash":
        os.kill(os.getpid(), signal.SIGSEGV)
    if task == "hang":
        time.sleep(60)
    if task == "hog":
        block = bytearray(600 * 2**20)  # touch every page so it is resident
        for i in range(0, len(block), 4096):
            block[i] = 1
        time.sleep(5)
    if task == "raise":
        raise ValueError("bad input")
    return task.upper()
