"""Benchmark: ``analyze`` for one vessel on the demo optical scene (1024 x 1024 neighbourhood).

Goal: median wall time <= 0.5 s on 2 cores, Monte Carlo included.  The script prints the
median of 7 runs after one warm-up (the first call builds cached Radon interpolation
matrices), beside the reference time of reading the same neighbourhood.
"""

from __future__ import annotations

import time
from pathlib import Path

import numpy as np

from wakemeter.detect.analysis import AnalysisRequest, analyze
from wakemeter.scene.raster import open_scene

SCENE = Path(__file__).resolve().parents[1] / "sample_scenes" / "harbour_approach_optical.tif"


def test_bench_analyze(benchmark):
    sc = open_scene(SCENE)
    analyze(sc, AnalysisRequest(vessel_lonlat=(-35.0, 36.0)))
    benchmark(lambda: analyze(sc, AnalysisRequest(vessel_lonlat=(-35.0, 36.0))))


if __name__ == "__main__":
    sc = open_scene(SCENE)
    t = time.perf_counter()
    analyze(sc, AnalysisRequest(vessel_lonlat=(-35.0, 36.0)))
    first = time.perf_counter() - t
    times, reads = [], []
    for _ in range(7):
        t = time.perf_counter()
        sc.read(window=(0, 0, 1024, 1024))
        reads.append(time.perf_counter() - t)
        t = time.perf_counter()
        a = analyze(sc, AnalysisRequest(vessel_lonlat=(-35.0, 36.0)))
        times.append(time.perf_counter() - t)
    med = float(np.median(times))
    print(
        f"analyze, one vessel, 1024^2 scene: median {med * 1e3:.0f} ms (first call {first * 1e3:.0f} ms) | "
        f"reading the neighbourhood {np.median(reads) * 1e3:.1f} ms | ratio {med / np.median(reads):.0f}x | "
        f"speed {a.speed.speed_mps:.3f} m/s"
    )
