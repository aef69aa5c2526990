"""Radar that looks like real radar (script): the random radar cases, plain and with what real scenes add.

Run: ``.venv/bin/python benchmarks/radar_realism_sweep.py [N] [first_seed]``.  For each seed the radar case
of ``wakemeter.synth.cases.make_case`` is analysed three times, clicking the vessel:
- **plain**: as the other sweeps render it (gamma speckle only);
- **real-looking**: ``cases.realistic_radar``: K-distributed clutter, a hull 30-50 dB above the sea with a
  sidelobe cross, a wider or narrower turbulent wake, a narrow bright V in half the scenes;
- **no wake**: the same real-looking radar with a hull that does not move (no wake, no V, the cross kept):
  anything found there is a false alarm; once without and once with the radar geometry given (as a product
  states it), which lets a wake start away from the hull count only on the flight axis through it.
Prints per case what was found, the heading error over its stated uncertainty, and whether the speed interval
holds the truth.
"""

from __future__ import annotations

import json
import tempfile
from dataclasses import replace
from pathlib import Path

import numpy as np

from wakemeter.detect.analysis import AnalysisRequest, analyze
from wakemeter.detect.request import RadarGeometry
from wakemeter.scene.raster import open_scene
from wakemeter.synth import render, write
from wakemeter.synth.cases import make_case, realistic_radar

from sweep_record import parse, record  # noqa: E402
from timing import speed_check  # noqa: E402


def _run(spec, tmp: Path, name: str, tuning, truth_speed: float, truth_heading: float, geometry=None) -> dict:
    tif, sidecar = write(render(spec), tmp / f"{name}.tif")
    t = json.loads(sidecar.read_text())["vessels"][0]
    with open_scene(tif) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=(t["pixel_col"], t["pixel_row"]), radar_geometry=geometry), tuning)
    row: dict = {"found": a.wake_found}
    if a.wake_found and a.heading_deg is not None:
        err = (a.heading_deg - truth_heading + 180.0) % 360.0 - 180.0
        row["heading_err_deg"] = round(err, 2)
        row["heading_z"] = round(abs(err) / max(a.heading_std_deg or 0.0, 1e-9), 2)
        row["as_lines"] = bool(a.lines) and a.speed is None or "as a line" in a.decision
    return row | speed_check(a, truth_speed)


def main(n: int, first: int, tuning) -> list[dict]:
    rows = []
    with tempfile.TemporaryDirectory() as tmp:
        for seed in range(first, first + n):
            case = make_case(seed, radar=True)
            rng = np.random.default_rng(20_000 + seed)
            real = realistic_radar(case.spec.imaging, rng)
            calm = realistic_radar(case.spec.imaging, np.random.default_rng(20_000 + seed), wake=False)
            still = (replace(case.spec.vessels[0], speed_mps=0.05),)  # a hull that does not move: no waves
            row = {"seed": seed, "speed_mps": round(case.speed_mps, 2), "pixel_m": round(case.spec.pixel_m, 2)}
            row["clutter_order"] = round(real.clutter_shape, 2)
            row["hull_db"] = round(float(10 * np.log10(real.hull_brightness)), 1)
            row["sidelobe_db"] = round(float(10 * np.log10(real.sidelobe_level)), 1)
            row["narrow_v"] = real.narrow_v_half_angle_deg > 0
            # the radar's own geometry, as a product states it or a user types it
            geo = RadarGeometry(real.slant_range_m, real.platform_speed_mps, real.look_bearing_deg, real.incidence_deg)
            for name, spec, g in (
                ("plain", case.spec, None),
                ("real", replace(case.spec, imaging=real), None),
                ("calm", replace(case.spec, imaging=calm, vessels=still), None),
                ("calm_geo", replace(case.spec, imaging=calm, vessels=still), geo),
            ):
                heading = case.spec.vessels[0].heading_deg
                r = _run(spec, Path(tmp), f"{name}_{seed}", tuning, case.speed_mps, heading, g)
                row |= {f"{name}_{k}": v for k, v in r.items()}
            rows.append(row)
            print(row, flush=True)
    return rows


def summarise(rows: list[dict]) -> dict:
    out: dict = {"cases": len(rows)}
    for name in ("plain", "real"):
        found = [r for r in rows if r[f"{name}_found"]]
        speeds = [r for r in found if f"{name}_covered" in r]
        z = [r[f"{name}_heading_z"] for r in found if f"{name}_heading_z" in r]
        out |= {
            f"{name}: found": len(found),
            f"{name}: with a speed": len(speeds),
            f"{name}: speed interval holds truth": sum(r[f"{name}_covered"] for r in speeds),
            f"{name}: speed within 5 %": sum(abs(r[f"{name}_rel_err"]) <= 0.05 for r in speeds),
            f"{name}: heading within 2 sigma": sum(v <= 2 for v in z),
            f"{name}: heading within 3 sigma": sum(v <= 3 for v in z),
        }
    out["no wake: false alarms"] = sum(r["calm_found"] for r in rows)
    out["no wake, geometry given: false alarms"] = sum(r["calm_geo_found"] for r in rows)
    return out


if __name__ == "__main__":
    args, tuning = parse(
        __doc__.splitlines()[0], [("n", int, 24, "number of radar cases"), ("first", int, 0, "first seed")]
    )
    rows = main(args.n, args.first, tuning)
    record(
        "radar_realism_sweep",
        {"n": args.n, "first": args.first},
        tuning,
        summarise(rows),
        rows,
        write=not args.no_record,
    )
