"""Benchmark: a synthetic 4000 x 3000 drone photo's time and peak memory, beside one 2048² GeoTIFF scene's.

Goal (issue 29): a 4000 x 3000 frame within 400 MB (the 2048² optical scene at 0.05 m needed 5.7 GB before the
renderer went to single precision; the photo renders its wave field coarse and splines it up in bands of rows).
Each run is a fresh process (``wakemeter synth`` as a user types it; resource.getrusage of the child).

    .venv/bin/python benchmarks/bench_photo_render.py
"""

from __future__ import annotations

import subprocess
import sys
import tempfile
from pathlib import Path

WAKEMETER = [sys.executable, "-m", "wakemeter"]
VESSEL = ["--speed-knots", "8", "--hull-length", "8", "--beam", "2.5", "--heading", "90"]
RUNS = {
    "imports only": ["-c", "import wakemeter.cli, wakemeter.synth.photo"],
    "2048² optical GeoTIFF at 0.05 m": ["synth", *VESSEL, "--pixel", "0.05", "--size", "2048", "--out", "{out}.tif"],
    "4000x3000 drone JPEG at 0.05 m": ["synth", *VESSEL, "--pixel", "0.05", "--photo", "4000x3000", "--out", "{out}"],
    "4000x3000 drone JPEG at 0.01 m": ["synth", *VESSEL, "--pixel", "0.01", "--photo", "4000x3000", "--out", "{out}"],
}
PROBE = (
    "import resource, subprocess, sys, time\n"
    "t = time.perf_counter()\n"
    "r = subprocess.run(sys.argv[1:], capture_output=True, text=True)\n"
    "print(time.perf_counter() - t, resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss / 1024, r.returncode)\n"
)


def measure(argv: list[str]) -> tuple[float, float]:
    done = subprocess.run([sys.executable, "-c", PROBE, *argv], capture_output=True, text=True, check=True)
    secs, peak, rc = done.stdout.split()
    if rc != "0":
        raise SystemExit(f"{' '.join(argv)} failed ({rc})")
    return float(secs), float(peak)


def main() -> None:
    with tempfile.TemporaryDirectory() as tmp:
        rows = []
        for what, args in RUNS.items():
            head = [sys.executable] if args[0] == "-c" else WAKEMETER
            argv = [*head, *(a.replace("{out}", str(Path(tmp) / "photo.jpg")) for a in args)]
            rows.append((what, *measure(argv)))
    base = rows[0][2]
    print(f"{'what':36s} {'time':>7s} {'peak MB':>8s} {'over imports':>13s}")
    for what, secs, peak in rows:
        print(f"{what:36s} {secs:6.1f}s {peak:8.0f} {peak - base:12.0f}")
    worst = max(peak for what, _s, peak in rows if "JPEG" in what)
    print(f"drone photo peak: {worst:.0f} MB (goal <= 400 MB for the whole process)")


if __name__ == "__main__":
    main()
