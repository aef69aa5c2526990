"""Benchmark: reading a big scene zoomed out, with and without the cached pyramid.

As a script (``.venv/bin/python benchmarks/bench_scene.py [SIDE]``) it writes a SIDE x SIDE
uint16 tiled GeoTIFF without overviews (default 12000), then prints side by side:
a plain rasterio read of the same request (reference), wakemeter's read before and
after the pyramid is built, and the ratios.  Under pytest-benchmark (``python3 tasks.py
bench``) a smaller scene is used.
"""

from __future__ import annotations

import os
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

try:
    from timing import best_time
except ImportError:  # run as a package module
    from benchmarks.timing import best_time
import pytest
import rasterio
from affine import Affine

from wakemeter.scene.pyramid import ensure_pyramid
from wakemeter.scene.raster import open_scene


def make_scene(folder: Path, side: int) -> Path:
    path = folder / f"big_{side}.tif"
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
    }
    rng = np.random.default_rng(0)
    with rasterio.open(path, "w", **prof) as dst:
        for r in range(0, side, 512):
            h = min(512, side - r)
            dst.write(rng.integers(0, 4000, (1, h, side), dtype=np.uint16), window=((r, r + h), (0, side)))
    return path


@pytest.fixture(scope="module")
def big(tmp_path_factory):
    os.environ["XDG_CACHE_HOME"] = str(tmp_path_factory.mktemp("cache"))
    return make_scene(tmp_path_factory.mktemp("scene"), 4608)


def test_bench_zoomed_out_read_with_pyramid(benchmark, big):
    sc = open_scene(big)
    ensure_pyramid(sc)
    benchmark(lambda: sc.read(out_shape=(1024, 1024)))


def test_bench_window_read(benchmark, big):
    sc = open_scene(big)
    benchmark(lambda: sc.read(window=(2000, 2000, 512, 512)))


if __name__ == "__main__":
    side = int(sys.argv[1]) if len(sys.argv) > 1 else 12000
    with tempfile.TemporaryDirectory() as tmp:
        os.environ["XDG_CACHE_HOME"] = str(Path(tmp) / "cache")
        t0 = time.perf_counter()
        path = make_scene(Path(tmp), side)
        print(f"wrote {side} x {side} uint16 scene in {time.perf_counter() - t0:.1f} s")
        with rasterio.open(path) as ds:
            ref = best_time(lambda: ds.read(1, out_shape=(1024, 1024)), repeat=1)
        sc = open_scene(path)
        before = best_time(lambda: sc.read(out_shape=(1024, 1024)), repeat=1)
        t0 = time.perf_counter()
        ensure_pyramid(sc)
        build = time.perf_counter() - t0
        after = best_time(lambda: sc.read(out_shape=(1024, 1024)), repeat=3)
        with rasterio.open(path) as ds:
            wref = best_time(lambda: ds.read(1, window=((5000, 5512), (5000, 5512))), repeat=3)
        win = best_time(lambda: sc.read(window=(5000, 5000, 512, 512)), repeat=3)
        print(
            f"zoomed-out 1024x1024 read: rasterio reference {ref:.2f} s | wakemeter without pyramid {before:.2f} s "
            f"| with pyramid {after * 1e3:.1f} ms | speed-up {ref / after:.0f}x (pyramid built once in {build:.1f} s)"
        )
        print(
            f"512x512 window read:       rasterio reference {wref * 1e3:.2f} ms | wakemeter {win * 1e3:.2f} ms "
            f"| ratio {win / wref:.2f}"
        )
