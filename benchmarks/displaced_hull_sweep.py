"""Radar hulls shifted away from their wakes (script): does the analysis find the wake's start?

Run: ``.venv/bin/python benchmarks/displaced_hull_sweep.py [N] [first_seed]``.  Renders the random
radar cases of ``wakemeter.synth.cases`` with the azimuth shift of a moving target switched on (Raney
1971), clicks the shifted hull, and prints per case the shift, whether a wake was found, the speed
error, the interval and how far the reported position is from the true one.
"""

from __future__ import annotations

import json
import tempfile
from dataclasses import replace
from pathlib import Path

import numpy as np

from wakemeter.detect.analysis import AnalysisRequest, analyze  # noqa: E402
from wakemeter.scene.raster import open_scene  # noqa: E402
from wakemeter.synth import render, write  # noqa: E402
from wakemeter.synth.cases import make_case  # noqa: E402

from sweep_record import parse, record  # noqa: E402
from timing import speed_check, speed_summary  # noqa: E402


def main(n: int, first: int, tuning) -> list[dict]:
    rows = []
    with tempfile.TemporaryDirectory() as tmp:
        for seed in range(first, first + n):
            case = make_case(seed, radar=True)
            spec = replace(case.spec, imaging=replace(case.spec.imaging, hull_displacement=True))
            tif, sidecar = write(render(spec), Path(tmp) / f"shifted_{seed}.tif")
            t = json.loads(sidecar.read_text())["vessels"][0]
            hull = (t["hull_pixel_col"], t["hull_pixel_row"])
            if not (0 <= hull[0] < spec.width and 0 <= hull[1] < spec.height):
                print(f"seed {seed}: the shifted hull falls outside the scene; skipped")
                continue
            with open_scene(tif) as sc:
                a = analyze(sc, AnalysisRequest(vessel_px=hull), tuning)
            shift_px = float(np.hypot(hull[0] - t["pixel_col"], hull[1] - t["pixel_row"]))
            row = {
                "seed": seed,
                "shift_m": round(t["radar_azimuth_offset_m"]),
                "shift_px": round(shift_px),
                "found": a.wake_found,
                **speed_check(a, case.speed_mps),
            }
            if a.wake_found:
                row["position_err_px"] = round(
                    float(np.hypot(a.vessel_px[0] - t["pixel_col"], a.vessel_px[1] - t["pixel_row"]))
                )
            rows.append(row)
            print(row, flush=True)
    return rows


if __name__ == "__main__":
    args, tuning = parse(
        __doc__.splitlines()[0], [("n", int, 16, "number of radar cases"), ("first", int, 0, "first seed")]
    )
    rows = main(args.n, args.first, tuning)
    record(
        "displaced_hull_sweep",
        {"n": args.n, "first": args.first},
        tuning,
        speed_summary(rows),
        rows,
        write=not args.no_record,
    )
