"""Benchmark: Monte Carlo inversion with 1e5 draws (target: well under 1 s).

Prints the measured time beside a reference: a plain numpy evaluation of
sqrt(g lambda / 2 pi) on the same number of draws, so the ratio shows the
overhead of the full method (gravity, pixel scale, finite-depth solver).
Run: python3 tasks.py bench   (or python benchmarks/bench_inversion.py)
"""

from __future__ import annotations

import numpy as np

try:
    from timing import best_time
except ImportError:  # run as a package module
    from benchmarks.timing import best_time

from wakemeter.physics.inversion import Conditions, Uncertain, speed_from_transverse_wavelength


def reference() -> None:
    rng = np.random.default_rng(0)
    lam = rng.normal(64.0, 1.0, 100_000)
    np.percentile(np.sqrt(9.81 * lam / (2 * np.pi)), [2.5, 50, 97.5])


def deep() -> None:
    speed_from_transverse_wavelength(Uncertain(64.0, 1.0), Conditions(pixel_scale_rel_std=0.01), draws=100_000)


def finite() -> None:
    speed_from_transverse_wavelength(Uncertain(100.0, 1.0), Conditions(depth_m=Uncertain(12.0, 0.5)), draws=100_000)


def test_bench_inversion_deep(benchmark):
    benchmark(deep)


def test_bench_inversion_finite_depth(benchmark):
    benchmark(finite)


if __name__ == "__main__":
    ref = best_time(reference)
    for name, fn in (("deep water", deep), ("finite depth", finite)):
        t = best_time(fn)
        print(
            f"{name:>13}: {t * 1e3:7.1f} ms for 1e5 draws | reference numpy {ref * 1e3:6.1f} ms | ratio {t / ref:5.1f}"
        )
