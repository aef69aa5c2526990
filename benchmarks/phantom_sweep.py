"""Phantom-vessel sweep (script): clicks where there is no vessel, beside real wakes of known truth.

Run: ``.venv/bin/python benchmarks/phantom_sweep.py [N] [FIRST_SEED] [--tune NAME=VALUE]``.  For N random wakes
(``wakemeter.synth.cases.make_case``) the analysis is run at points with no vessel - beside the hull (96 and
192 px off the track), on the wake behind it (160 px) and ahead of the bow (160 px) - and at a near miss
(8 px beside the hull).  A finding at a point without a vessel is a *phantom* (the speed belongs to another
vessel, or to none); a near miss should still find the vessel.  Each point is analysed twice: as the
program does (a vessel must be shown by a hull or a wake line starting at the point) and assuming a vessel
there (the analyst insisted), which is how the analysis behaved before the check.
"""

from __future__ import annotations

import json
import tempfile
from pathlib import Path

import numpy as np

from wakemeter.detect.analysis import AnalysisRequest, analyze
from wakemeter.scene.raster import open_scene
from wakemeter.synth.cases import make_case, write_case

from sweep_record import parse, record

POINTS = {
    "beside_96": (0, 96),
    "beside_192": (0, 192),
    "behind_160": (-160, 0),
    "ahead_160": (160, 0),
    "near_miss_8": (0, 8),
}


def main(n: int, first: int, tuning) -> list[dict]:
    rows = []
    with tempfile.TemporaryDirectory() as tmp:
        for seed in range(first, first + n):
            case = make_case(seed)
            tif, sidecar = write_case(case, Path(tmp))
            t = json.loads(sidecar.read_text())["vessels"][0]
            with open_scene(tif) as sc:
                fwd = np.array(sc.local_frame(t["pixel_col"], t["pixel_row"]).image_direction(case.heading_deg))
                side = np.array([-fwd[1], fwd[0]])
                for name, (along, across) in POINTS.items():
                    px = np.array([t["pixel_col"], t["pixel_row"]]) + along * fwd + across * side
                    if not (0 <= px[0] < sc.width and 0 <= px[1] < sc.height):
                        continue
                    row = {"seed": seed, "point": name, "u": case.speed_mps}
                    for mode, force in (("checked", False), ("assumed", True)):
                        a = analyze(sc, AnalysisRequest(vessel_px=(float(px[0]), float(px[1])), force=force), tuning)
                        off = float(np.hypot(a.vessel_px[0] - t["pixel_col"], a.vessel_px[1] - t["pixel_row"]))
                        row[mode] = {
                            "found": a.wake_found,
                            "evidence": a.diagnostics.vessel_evidence,
                            "speed_mps": a.speed.speed_mps if a.speed else None,
                            "at_vessel": off <= 25.0,
                        }
                    rows.append(row)
                    print(row, flush=True)
    return rows


def summarise(rows: list[dict]) -> dict:
    out: dict = {}
    for mode in ("checked", "assumed"):
        empty = [r for r in rows if not r["point"].startswith("near_miss")]
        near = [r for r in rows if r["point"].startswith("near_miss")]
        out[f"{mode}_empty_points"] = len(empty)
        out[f"{mode}_phantoms"] = sum(r[mode]["found"] and not r[mode]["at_vessel"] for r in empty)
        out[f"{mode}_near_misses"] = len(near)
        out[f"{mode}_near_misses_found"] = sum(r[mode]["found"] and r[mode]["at_vessel"] for r in near)
        out[f"{mode}_near_misses_within_3pct"] = sum(
            r[mode]["found"]
            and r[mode]["at_vessel"]
            and r[mode]["speed_mps"] is not None
            and abs(r[mode]["speed_mps"] / r["u"] - 1) <= 0.03
            for r in near
        )
    return out


if __name__ == "__main__":
    args, tuning = parse(
        __doc__.splitlines()[0], [("n", int, 20, "number of wakes"), ("first", int, 600, "first seed")]
    )
    rows = main(args.n, args.first, tuning)
    record("phantom_sweep", {"n": args.n, "first": args.first}, tuning, summarise(rows), rows, write=not args.no_record)
