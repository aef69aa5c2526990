"""Waves short or long for the pixel size (script): speed accuracy outside the usual 7-45 pixels per wave.

Run: ``.venv/bin/python benchmarks/wave_scale_sweep.py LO HI [SIZE] [N] [--tune NAME=VALUE]``, e.g.
``3 7`` (short waves, 640 px
scenes) or ``45 150 1024`` (long waves; scenes of 1024 px or more let the analysis take its half-resolution
look).  Random synthetic deep-water wakes, alternately radar and optical, with LO <= transverse wavelength /
pixel <= HI; prints per case and the summary (found, within 3 %, interval holding the truth).
"""

from __future__ import annotations

import json
import tempfile
from pathlib import Path

import numpy as np

from wakemeter.detect.analysis import AnalysisRequest, analyze  # noqa: E402
from wakemeter.scene.raster import open_scene  # noqa: E402
from wakemeter.synth import Hull, OpticalModel, RadarModel, VesselSpec, render, write  # noqa: E402
from wakemeter.synth.demo import vessel_scene  # noqa: E402

from sweep_record import parse, record  # noqa: E402
from timing import speed_check, speed_summary  # noqa: E402

G = 9.81


def main(lo: float, hi: float, size: int, n: int, tuning) -> list[dict]:
    rows = []
    for seed in range(n):
        rng = np.random.default_rng(777 + seed)
        while True:
            u = float(rng.uniform(2.0, 15.0))
            p = float(np.exp(rng.uniform(np.log(0.3), np.log(15.0))))
            lam = 2 * np.pi * u * u / G
            if lo <= lam / p <= hi:
                break
        heading = float(rng.uniform(0, 360))
        fr_l = float(rng.uniform(0.25, 0.45))
        length = u * u / (G * fr_l * fr_l)
        radar = seed % 2 == 0
        imaging = (
            RadarModel(
                look_bearing_deg=float(rng.uniform(0, 360)), incidence_deg=35.0, looks=4, hull_displacement=False
            )
            if radar
            else OpticalModel(sun_azimuth_deg=float(rng.uniform(0, 360)), noise_std=0.02)
        )
        vessel = VesselSpec(
            "Case", float(rng.uniform(-100, 100)), float(rng.uniform(-50, 50)), u, heading, Hull(length, length / 5)
        )
        spec = vessel_scene("case", vessel, size, p, imaging=imaging, sea=None, depth_m=np.inf, seed=seed)
        with tempfile.TemporaryDirectory() as tmp:
            tif, sidecar = write(render(spec), Path(tmp) / "case.tif")
            t = json.loads(sidecar.read_text())["vessels"][0]
            with open_scene(tif) as sc:
                a = analyze(sc, AnalysisRequest(vessel_px=(t["pixel_col"], t["pixel_row"])), tuning)
        row = {
            "seed": seed,
            "radar": radar,
            "px_per_wave": round(lam / p, 1),
            "u": round(u, 2),
            "found": a.wake_found,
            "analysis_pixel_m": round(a.pixel_m, 2),
            **speed_check(a, u),
        }
        rows.append(row)
        print(row, flush=True)
    return rows


if __name__ == "__main__":
    args, tuning = parse(
        __doc__.splitlines()[0],
        [
            ("lo", float, 3.0, "fewest pixels per transverse wave"),
            ("hi", float, 7.0, "most pixels per wave"),
            ("size", int, 640, "scene side, pixels"),
            ("n", int, 10, "number of cases"),
        ],
    )
    rows = main(args.lo, args.hi, args.size, args.n, tuning)
    record(
        "wave_scale_sweep",
        {"lo": args.lo, "hi": args.hi, "size": args.size, "n": args.n},
        tuning,
        speed_summary(rows),
        rows,
        write=not args.no_record,
    )
