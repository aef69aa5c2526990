"""Benchmark: the vessel finder on a whole big scene against reading that scene once, side by side.

Goal: the finder within 2x the time of one windowed read of the scene (issue 27; issue 14 asked 3x), and
under 300 MB more memory.  The scene is made here, window by window (never whole in memory): a 4-band Sentinel-2-like
uint16 sea (noise) with bright 3 x 6-pixel hulls on a grid.  Time and peak memory are measured in fresh
processes (resource.getrusage of the child).

    .venv/bin/python benchmarks/bench_vessel_finder.py [--size 20000] [--keep FILE]
"""

from __future__ import annotations

import argparse
import json
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np
import rasterio
from rasterio.windows import Window

ROOT = Path(__file__).resolve().parents[1]

READ = """
import sys, time
from wakemeter.scene.raster import open_scene
t = time.perf_counter()
with open_scene(sys.argv[1]) as sc:
    for r in range(0, sc.height, 1024):
        for c in range(0, sc.width, 1024):
            sc.read(window=(c, r, 1024, 1024))
print(time.perf_counter() - t)
"""
FIND = """
import sys, time
from wakemeter.scene.raster import open_scene
from wakemeter.detect.vessel_finder import find_vessels
t = time.perf_counter()
with open_scene(sys.argv[1]) as sc:
    n = len(find_vessels(sc))
print(time.perf_counter() - t, n)
"""
BASE = "import wakemeter.detect.vessel_finder, wakemeter.scene.raster\nprint(0)"


def make_scene(path: Path, size: int) -> int:
    rng = np.random.default_rng(7)
    prof = {
        "driver": "GTiff",
        "width": size,
        "height": size,
        "count": 4,
        "dtype": "uint16",
        "tiled": True,
        "blockxsize": 512,
        "blockysize": 512,
        "compress": "deflate",
        "crs": "EPSG:32625",
        "transform": rasterio.Affine(10.0, 0.0, 500000.0, 0.0, -10.0, 4000000.0),
    }
    water = np.array([450, 300, 120, 60])
    hulls = 0
    with rasterio.open(path, "w", **prof) as dst:
        for i, b in enumerate(("B02", "B03", "B04", "B08")):
            dst.set_band_description(i + 1, b)
        for r in range(0, size, 2048):
            for c in range(0, size, 2048):
                h, w = min(2048, size - r), min(2048, size - c)
                block = water[:, None, None] + rng.normal(0, 15, (4, h, w))
                for rr in range(200, h - 200, 700):
                    for cc in range(200, w - 200, 700):
                        block[:, rr : rr + 3, cc : cc + 6] = 3000
                        hulls += 1
                dst.write(np.clip(block, 0, 65535).astype(np.uint16), window=Window(c, r, w, h))
    return hulls


def measure(code: str, path: str) -> tuple[float, float, str]:
    probe = (
        "import resource, subprocess, sys, time\n"
        "r = subprocess.run(sys.argv[1:], capture_output=True, text=True)\n"
        "print(resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss / 1024)\n"
        "print(r.stdout.strip())\n"
    )
    done = subprocess.run(
        [sys.executable, "-c", probe, sys.executable, "-c", code, path], capture_output=True, text=True, check=True
    )
    peak, out = done.stdout.splitlines()[:2]
    return float(peak), float(out.split()[0]), out


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--size", type=int, default=20000)
    ap.add_argument("--keep", help="keep (or reuse) the generated scene at this path")
    args = ap.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(args.keep) if args.keep else Path(tmp) / "big.tif"
        if not path.exists():
            t = time.perf_counter()
            hulls = make_scene(path, args.size)
            print(
                f"made a {args.size}² 4-band scene with {hulls} hulls in {time.perf_counter() - t:.0f} s "
                f"({path.stat().st_size / 1e6:.0f} MB)"
            )
        base_mb, _, _ = measure(BASE, str(path))
        read_mb, read_s, _ = measure(READ, str(path))
        find_mb, find_s, out = measure(FIND, str(path))
        n = int(out.split()[1])
        print(f"{'what':52s} {'time':>8s} {'peak MB':>8s} {'over imports':>13s}")
        print(f"{'imports only':52s} {'':8s} {base_mb:8.0f}")
        what = "read the scene once (1024² windows, 256 MB GDAL cache)"
        print(f"{what:52s} {read_s:7.1f}s {read_mb:8.0f} {read_mb - base_mb:12.0f}")
        print(
            f"{'find vessels (its own 48 MB GDAL cache)':52s} {find_s:7.1f}s {find_mb:8.0f} {find_mb - base_mb:12.0f}"
        )
        print(
            f"finder / read time: {find_s / read_s:.1f}x (goal <= 2x); finder memory over imports: "
            f"{find_mb - base_mb:.0f} MB (goal < 300 MB); candidates: {n}"
        )
        print(json.dumps({"size": args.size, "read_s": read_s, "find_s": find_s, "find_extra_mb": find_mb - base_mb}))


if __name__ == "__main__":
    main()
