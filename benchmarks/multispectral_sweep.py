"""Sentinel-2-like sweep (script): wakes as a push-broom multispectral sensor records them, with known truth.

Run: ``.venv/bin/python benchmarks/multispectral_sweep.py [N] [FIRST] [--tune NAME=VALUE]``.  N random vessels
(3-12 m/s, hulls 40-200 m, 7-10 m pixels, JONSWAP wind sea 3-10 m/s, sun and wind directions random) are
rendered by ``wakemeter.synth.multispectral`` (four bands B02 B03 B04 B08, sensor blur, foam band, the hull
moving between bands by the published B02 -> B04 delay) and analysed at the vessel.  Reported: found, how
(waves or lines), heading error against its stated uncertainty, the speed and whether its 95 % interval holds
the truth (the hull's shift between bands gives speed over ground; here the water is still, so it equals the
speed through the water), and the shift's along-track error in pixels.  Seeds 100-159 set the edge
uncertainty of ``wakemeter.detect.band_shift``; the tests use 200 and up.
"""

from __future__ import annotations

import tempfile
import time
from pathlib import Path

import numpy as np

from wakemeter.detect.analysis import AnalysisRequest, analyze
from wakemeter.scene.raster import open_scene
from wakemeter.synth import Hull, VesselSpec, write
from wakemeter.synth.demo import vessel_scene
from wakemeter.synth.multispectral import BANDS, MultispectralLook, render_multispectral

from sweep_record import parse, record


def run(n: int, first: int, tuning) -> list[dict]:
    rows = []
    with tempfile.TemporaryDirectory() as tmp:
        for seed in range(first, first + n):
            rng = np.random.default_rng(seed)
            u, hd, length = float(rng.uniform(3, 12)), float(rng.uniform(0, 360)), float(rng.uniform(40, 200))
            pixel = float(rng.uniform(7, 10))
            v = VesselSpec("Sweep vessel", -35.0, 36.0, u, hd, Hull(length, length / 6))
            spec = vessel_scene("sweep", v, 384, pixel, seed=seed)
            look = MultispectralLook(
                wind_mps=float(rng.uniform(3, 10)),
                wind_direction_deg=float(rng.uniform(0, 360)),
                sun_azimuth_deg=float(rng.uniform(100, 200)),
            )
            ms = render_multispectral(spec, look)
            path = Path(tmp) / f"case_S2_{seed}.tif"
            write(ms.rendered, path, band_names=BANDS)
            t = ms.rendered.truth["vessels"][0]
            with open_scene(path) as sc:
                t0 = time.perf_counter()
                a = analyze(sc, AnalysisRequest(vessel_px=(t["pixel_col"], t["pixel_row"])), tuning)
                dt = time.perf_counter() - t0
            row: dict = {"seed": seed, "u": round(u, 3), "hull_px": round(length / pixel, 1), "found": a.wake_found}
            if a.wake_found:
                err = (a.heading_deg - hd + 180) % 360 - 180
                row.update(
                    how="lines" if not a.methods or a.methods[0].method.startswith("hull shift") else "waves",
                    hdg_err=round(err, 2),
                    hdg_std=round(a.heading_std_deg, 2),
                )
            if a.speed is not None:
                row.update(
                    est=round(a.speed.speed_mps, 3),
                    lo=round(a.speed.ci95_low_mps, 3),
                    hi=round(a.speed.ci95_high_mps, 3),
                    covered=bool(a.speed.ci95_low_mps <= u <= a.speed.ci95_high_mps),
                    method=a.methods[0].method,
                )
            row["time_s"] = round(dt, 2)
            rows.append(row)
            print(row, flush=True)
    return rows


def summarise(rows: list[dict]) -> dict:
    found = [r for r in rows if r["found"]]
    with_speed = [r for r in rows if "est" in r]
    shift = [r for r in with_speed if r["method"].startswith("hull shift")]
    out = {
        "cases": len(rows),
        "found": len(found),
        "found_by_waves": sum(r["how"] == "waves" for r in found),
        "found_as_lines": sum(r["how"] == "lines" for r in found),
        "heading_within_3_std": sum(abs(r["hdg_err"]) <= 3 * r["hdg_std"] + 0.5 for r in found),
        "heading_error_p95_deg": float(np.percentile([abs(r["hdg_err"]) for r in found], 95)) if found else None,
        "with_speed": len(with_speed),
        "speed_intervals_holding_truth": sum(r["covered"] for r in with_speed),
        "band_shift_speeds": len(shift),
        "band_shift_intervals_holding_truth": sum(r["covered"] for r in shift),
        "band_shift_median_abs_error_mps": float(np.median([abs(r["est"] - r["u"]) for r in shift])) if shift else None,
    }
    return out


if __name__ == "__main__":
    args, tuning = parse(
        __doc__.splitlines()[0], [("n", int, 30, "number of cases"), ("first", int, 100, "first seed")]
    )
    rows = run(args.n, args.first, tuning)
    record(
        "multispectral_sweep",
        {"n": args.n, "first": args.first},
        tuning,
        summarise(rows),
        rows,
        write=not args.no_record,
    )
