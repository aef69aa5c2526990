"""Shared helpers of the benchmark scripts: timing, the speed check of the sweeps, Qt teardown."""

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


def speed_check(analysis, true_speed_mps: float) -> dict:
    """Relative speed error and whether the 95 % interval holds the truth (empty when no speed was given: no
    wake, or a wake seen as lines only)."""
    if not analysis.wake_found or analysis.speed is None:
        return {}
    s = analysis.speed
    return {
        "rel_err": round(s.speed_mps / true_speed_mps - 1, 4),
        "covered": bool(s.ci95_low_mps <= true_speed_mps <= s.ci95_high_mps),
    }


def speed_summary(rows: list[dict]) -> dict:
    """Found with a speed, within 3 %, intervals holding the truth (rows carry ``found`` and :func:`speed_check`);
    wakes found as lines only (a heading, no speed) are counted apart."""
    found = [r for r in rows if r["found"] and "rel_err" in r]
    return {
        "cases": len(rows),
        "found": len(found),
        "found_lines_only": sum(bool(r["found"]) and "rel_err" not in r for r in rows),
        "speed_within_3pct": sum(abs(r["rel_err"]) <= 0.03 for r in found),
        "intervals_holding_truth": sum(r["covered"] for r in found),
    }


def close_qt(app, *objects) -> None:
    """Delete Qt objects before the interpreter does: a window or timer left to the garbage collector at
    shutdown, after the application, can crash the process on exit."""
    for obj in objects:
        if hasattr(obj, "close"):
            obj.close()
        obj.deleteLater()
    app.processEvents()
