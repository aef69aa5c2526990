"""Benchmark (script): a 20 000 x 20 000 uint16 scene with and without internal overviews.

Run: ``.venv/bin/python benchmarks/bench_big_scene.py [SIDE] [FOLDER]``.  Writes two tiled
GeoTIFFs (one with overviews 2..32, one without), then runs each measurement in a fresh
process and prints the median time over repeats and the extra peak memory (max RSS of
the process minus that of a process that only imported wakemeter and opened the scene):

* open + whole-scene view at 1024 px,
* a 2048 x 2048 full-resolution window,
* (no overviews) the one-time pyramid build, then the same two reads.

Targets on 2 cores: views under 100 ms and under 100 MB extra; pyramid build under 300 MB.
A plain rasterio read of the same requests is printed beside each as the reference.
"""

from __future__ import annotations

import json
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

CHILD = r"""
import json, os, resource, statistics, sys, time
os.environ["XDG_CACHE_HOME"] = sys.argv[3]
import numpy as np, rasterio
from wakemeter.scene.raster import open_scene
from wakemeter.scene.pyramid import ensure_pyramid
path, what = sys.argv[1], sys.argv[2]
def rss():  # VmHWM: peak resident set of this process image (ru_maxrss would carry the parent's over exec)
    for line in open("/proc/self/status"):
        if line.startswith("VmHWM:"):
            return int(line.split()[1]) / 1024
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
times = []
if what == "baseline":
    sc = open_scene(path); sc.read(window=(0, 0, 16, 16))
elif what == "pyramid":
    sc = open_scene(path); t = time.perf_counter(); seen = []
    ensure_pyramid(sc, progress=seen.append); times.append(time.perf_counter() - t)
elif what in ("view", "window"):
    for i in range(5):
        t = time.perf_counter()
        sc = open_scene(path)
        ensure_pyramid(sc)  # reuses the cache when built; no-op with overviews
        if what == "view":
            sc.read(out_shape=(1024, 1024))
        else:
            sc.read(window=(4000 + 97 * i, 9000, 2048, 2048))
        times.append(time.perf_counter() - t); sc.close()
elif what in ("ref_view", "ref_window"):
    for i in range(3):
        t = time.perf_counter()
        with rasterio.open(path) as ds:
            if what == "ref_view":
                ds.read(1, out_shape=(1024, 1024))
            else:
                ds.read(1, window=((9000, 11048), (4000 + 97 * i, 6048 + 97 * i)))
        times.append(time.perf_counter() - t)
print(json.dumps({"median_s": statistics.median(times) if times else 0.0, "rss_mb": rss()}))
"""


def make(path: Path, side: int, overviews: bool) -> None:
    import rasterio
    from affine import Affine
    from rasterio.enums import Resampling

    prof = {
        "driver": "GTiff",
        "width": side,
        "height": side,
        "count": 1,
        "dtype": "uint16",
        "tiled": True,
        "blockxsize": 512,
        "blockysize": 512,
        "compress": "deflate",
        "crs": "EPSG:32631",
        "transform": Affine(2, 0, 500_000, 0, -2, 6_000_000),
        "BIGTIFF": "IF_SAFER",
    }
    rng = np.random.default_rng(0)
    x = np.arange(side)
    with rasterio.open(path, "w", **prof) as dst:
        for r in range(0, side, 512):
            h = min(512, side - r)
            y = np.arange(r, r + h)[:, None]
            strip = 1000 + 500 * np.sin(x[None, :] / 300.0) * np.cos(y / 400.0) + rng.normal(0, 30, (h, side))
            dst.write(strip.astype(np.uint16)[None], window=((r, r + h), (0, side)))
        if overviews:
            dst.build_overviews([2, 4, 8, 16, 32], Resampling.average)


def child(path: Path, what: str, cache: Path) -> dict:
    out = subprocess.run(
        [sys.executable, "-c", CHILD, str(path), what, str(cache)], capture_output=True, text=True, check=True
    )
    return json.loads(out.stdout.strip().splitlines()[-1])


def main() -> None:
    side = int(sys.argv[1]) if len(sys.argv) > 1 else 20000
    folder = Path(sys.argv[2]) if len(sys.argv) > 2 else Path(tempfile.mkdtemp(prefix="wm-bench-"))
    folder.mkdir(parents=True, exist_ok=True)
    cache = folder / "cache"
    for name, ovr in (("with_overviews", True), ("without_overviews", False)):
        p = folder / f"{name}_{side}.tif"
        if not p.exists():
            t = time.perf_counter()
            make(p, side, ovr)
            print(f"made {p.name} ({p.stat().st_size / 1e6:.0f} MB) in {time.perf_counter() - t:.0f} s", flush=True)
        base = child(p, "baseline", cache)["rss_mb"]
        rows = []
        if not ovr:
            import shutil

            shutil.rmtree(cache, ignore_errors=True)  # measure a real first build
            r = child(p, "pyramid", cache)
            rows.append(("pyramid build (once)", r, None))
        for what in ("view", "window"):
            rows.append(
                (
                    f"{'whole-scene view 1024 px' if what == 'view' else '2048x2048 window'}",
                    child(p, what, cache),
                    child(p, f"ref_{what}", cache),
                )
            )
        print(f"\n{name}, {side} x {side} uint16 (baseline process {base:.0f} MB)")
        for label, r, ref in rows:
            extra = r["rss_mb"] - base
            line = f"  {label:<26} median {r['median_s'] * 1e3:8.1f} ms   extra peak memory {extra:6.0f} MB"
            if ref is not None:
                line += (
                    f"   | plain rasterio {ref['median_s'] * 1e3:8.1f} ms, ratio {r['median_s'] / ref['median_s']:.2f}"
                )
            print(line, flush=True)


if __name__ == "__main__":
    main()
