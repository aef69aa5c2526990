"""Benchmark: start-up of the command line in a fresh process, beside the warm time of the same work.

Targets: ``wakemeter --version`` well under 0.2 s; a one-vessel ``analyze`` in a fresh process close to the
warm (in-process) time of one analysis.  Prints each fresh-process time with its ratio to the reference:
the warm analysis for ``analyze`` (first with an empty cache folder, then with the cached Radon matrices),
a bare ``python -c pass`` for ``--version`` and ``--help``.
Run: python3 tasks.py bench   (or python benchmarks/bench_startup.py)
"""

from __future__ import annotations

import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
SCENE = ROOT / "sample_scenes" / "harbour_approach_optical.tif"
WAKEMETER = [sys.executable, "-m", "wakemeter"]


def fresh(args: list[str], env: dict) -> float:
    t = time.perf_counter()
    subprocess.run(args, env=env, check=True, capture_output=True)
    return time.perf_counter() - t


def warm_analysis() -> float:
    from wakemeter.detect.analysis import AnalysisRequest, analyze
    from wakemeter.scene.raster import open_scene

    with open_scene(SCENE) as sc:
        analyze(sc, AnalysisRequest(vessel_lonlat=(-35.0, 36.0)))
        best = float("inf")
        for _ in range(3):
            t = time.perf_counter()
            analyze(sc, AnalysisRequest(vessel_lonlat=(-35.0, 36.0)))
            best = min(best, time.perf_counter() - t)
    return best


def test_bench_version(benchmark):
    benchmark.pedantic(fresh, args=([*WAKEMETER, "--version"], dict(os.environ)), rounds=3, iterations=1)


def main() -> None:
    with tempfile.TemporaryDirectory() as cache:
        env = {**os.environ, "XDG_CACHE_HOME": cache}
        bare = min(fresh([sys.executable, "-c", "pass"], env) for _ in range(3))
        version = min(fresh([*WAKEMETER, "--version"], env) for _ in range(3))
        helptext = min(fresh([*WAKEMETER, "--help"], env) for _ in range(3))
        analyze = [*WAKEMETER, "analyze", str(SCENE), "--vessel", "-35,36"]
        cold = fresh(analyze, env)
        cached = min(fresh(analyze, env) for _ in range(2))
    warm = warm_analysis()
    print(f"{'what':<44} {'time':>8} {'reference':>10} {'ratio':>7}")
    for what, t, ref in (
        ("wakemeter --version (vs bare python)", version, bare),
        ("wakemeter --help (vs bare python)", helptext, bare),
        ("analyze, fresh process, empty cache", cold, warm),
        ("analyze, fresh process, cached matrices", cached, warm),
    ):
        print(f"{what:<44} {t:7.2f}s {ref:9.2f}s {t / ref:6.1f}x")
    print(f"(reference for analyze: the same analysis in a warm process, {warm:.2f} s)")


if __name__ == "__main__":
    main()
