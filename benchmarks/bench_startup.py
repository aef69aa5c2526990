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


IN_PROCESS = """
import json, sys, time
t0 = time.perf_counter()
from wakemeter.detect.analysis import AnalysisRequest, analyze
from wakemeter.scene.raster import open_scene
t1 = time.perf_counter()
with open_scene(sys.argv[1]) as sc:
    r = AnalysisRequest(vessel_lonlat=(-35.0, 36.0))
    t2 = time.perf_counter()
    analyze(sc, r)
    t3 = time.perf_counter()
    warm = []
    for _ in range(3):
        t = time.perf_counter()
        analyze(sc, r)
        warm.append(time.perf_counter() - t)
print(json.dumps({"imports": t1 - t0, "first": t3 - t2, "warm": min(warm)}))
"""


def in_process(env: dict, *, one_core: bool = False) -> dict:
    """A fresh process: its imports, its first analysis and its best warm analysis, timed inside it (with
    ``one_core`` pinned to the first CPU, as a batch worker with one core has it)."""
    import json

    out = subprocess.run(
        [sys.executable, "-c", IN_PROCESS, str(SCENE)],
        env=env,
        check=True,
        capture_output=True,
        preexec_fn=(lambda: os.sched_setaffinity(0, {0})) if one_core else None,
    )
    return json.loads(out.stdout.decode().strip().splitlines()[-1])


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
        inside = in_process(env)
        one_core = in_process({**env, "OMP_NUM_THREADS": "1", "OPENBLAS_NUM_THREADS": "1"}, one_core=True)
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
    print(
        f"inside a fresh process: imports {inside['imports']:.2f} s, first analysis {inside['first']:.2f} s, "
        f"warm {inside['warm']:.2f} s: first / warm {inside['first'] / inside['warm']:.2f}x (goal <= 2x)"
    )
    print(
        f"pinned to one core: first analysis {one_core['first']:.2f} s, warm {one_core['warm']:.2f} s "
        "(goal: warm <= 0.3 s on one core)"
    )


if __name__ == "__main__":
    main()
