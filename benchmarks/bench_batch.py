"""Benchmark: batch throughput on a dask.distributed LocalCluster with 1 and 2 workers, side by side.

The same demo vessel analysed N times with different Monte Carlo seeds (distinct tasks, distinct keys), so
the figures are the per-task cost of an analysis plus the batch's overhead.  Prints vessels per second,
the speed-up of 2 workers over 1 and the scaling efficiency (speed-up / 2), and the warm single-process time
of one analysis as the reference.

    .venv/bin/python benchmarks/bench_batch.py [--tasks 16]
"""

from __future__ import annotations

import argparse
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
from wakemeter.batch.run import _client, evidence, run  # noqa: E402
from wakemeter.batch.tasks import BatchTask  # noqa: E402
from wakemeter.detect.analysis import analyze  # noqa: E402
from wakemeter.detect.request import AnalysisRequest  # noqa: E402
from wakemeter.scene.raster import open_scene  # noqa: E402

SCENE = ROOT / "sample_scenes" / "harbour_approach_optical.tif"


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--tasks", type=int, default=16)
    args = ap.parse_args()
    with open_scene(SCENE) as sc:
        digest = sc.sha256()
        analyze(sc, AnalysisRequest(vessel_lonlat=(-35.0, 36.0)))  # warm up
        t = time.perf_counter()
        analyze(sc, AnalysisRequest(vessel_lonlat=(-35.0, 36.0), seed=99))
        warm = time.perf_counter() - t
    tasks = [
        BatchTask(str(SCENE), digest, f"run {i}", AnalysisRequest(vessel_lonlat=(-35.0, 36.0), seed=i).to_json())
        for i in range(args.tasks)
    ]
    rates = {}
    evidence_s = {}
    for workers in (1, 2):
        client, cluster = _client(None, workers)
        try:
            with tempfile.TemporaryDirectory() as out:
                # one warm-up task per worker (imports, Radon matrices), not counted
                run(tasks[:workers], Path(out) / "warm", client=client)
                s = run(tasks, Path(out) / "run", client=client)
                # --evidence: each analysed vessel's evidence set (the analysis again, for the plots, and the
                # PDF, JSON, PNG and checksums)
                t = time.perf_counter()
                made = evidence(tasks, Path(out) / "run", client=client)
                evidence_s[workers] = (time.perf_counter() - t) / max(made.written, 1)
        finally:
            client.close()
            cluster.close()
        rates[workers] = s.done / s.seconds
        print(
            f"{workers} worker(s): {s.done} vessels in {s.seconds:.1f} s = {rates[workers]:.2f} vessels/s "
            f"({s.seconds / s.done:.2f} s per vessel)"
        )
    speedup = rates[2] / rates[1]
    print(f"{'what':40s} {'value':>8s} {'reference':>10s} {'ratio':>7s}")
    print(f"{'per-vessel time, 1 worker':40s} {1 / rates[1]:7.2f}s {warm:9.2f}s {1 / rates[1] / warm:6.2f}x")
    print(f"{'throughput, 2 workers vs 1':40s} {rates[2]:7.2f}/s {rates[1]:8.2f}/s {speedup:6.2f}x")
    print(f"scaling efficiency with 2 workers: {speedup / 2:.0%} (reference: warm single analysis {warm:.2f} s)")
    for workers, sec in evidence_s.items():
        print(
            f"evidence sets (--evidence), {workers} worker(s): {sec:.2f} s per vessel "
            f"({sec / warm:.1f}x a warm analysis)"
        )


if __name__ == "__main__":
    main()
