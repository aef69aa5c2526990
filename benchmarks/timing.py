"""Shared helper of the benchmark scripts."""

from __future__ import annotations

import time
from collections.abc import Callable


def best_time(fn: Callable[[], object], repeat: int = 7) -> float:
    """Shortest wall time (s) of ``repeat`` calls of ``fn``."""
    best = float("inf")
    for _ in range(repeat):
        t = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t)
    return best
