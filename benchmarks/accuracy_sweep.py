"""Accuracy sweep (script): analyse random synthetic scenes of known truth and record the errors.

Run: ``.venv/bin/python benchmarks/accuracy_sweep.py [N] [FIRST_SEED] [DEPTH_FROUDE] [--tune NAME=VALUE]``.
Prints per case the truth, the estimate, its 95 % interval and the heading error, then the summary
(share of speeds within 3 %, headings, coverage of the 95 % intervals, depth regimes) beside the last
record in ``benchmarks/results/``.  With ``DEPTH_FROUDE`` the scenes are rendered at that depth Froude
number and analysed *without* the depth (the program must find the depth effect itself).
"""

from __future__ import annotations

import json
import tempfile
import time
from pathlib import Path

import numpy as np

from wakemeter.detect.analysis import AnalysisRequest, analyze
from wakemeter.scene.raster import open_scene
from wakemeter.synth.cases import make_case, write_case

from sweep_record import parse, record


def run(n: int, first: int, tuning, **kw) -> list[dict]:
    rows = []
    with tempfile.TemporaryDirectory() as tmp:
        for seed in range(first, first + n):
            case = make_case(seed, **kw)
            tif, sidecar = write_case(case, Path(tmp))
            side = json.loads(sidecar.read_text())
            truth = side["vessels"][0]
            with open_scene(tif) as sc:
                t = time.perf_counter()
                a = analyze(sc, AnalysisRequest(vessel_px=(truth["pixel_col"], truth["pixel_row"])), tuning)
                dt = time.perf_counter() - t
            j = a.to_json()
            d = a.diagnostics
            row = {
                "seed": seed,
                "kind": "radar" if "looks" in side["imaging"] else "optical",
                "pixel_m": case.spec.pixel_m,
                "u": case.speed_mps,
                "found": j["wake_found"],
                "time_s": round(dt, 2),
                "sig": round(a.significance, 1),
                "side": round(d.side_contrast, 1),
            }
            if j["wake_found"] and j["speed_mps"] is None:  # seen as lines only: a heading, no speed
                row.update(lines_only=True, hdg_err=((j["heading_deg"] - case.heading_deg + 180) % 360) - 180)
            elif j["wake_found"]:
                lo, hi = j["speed_ci95_mps"]
                row.update(
                    est=j["speed_mps"],
                    lo=lo,
                    hi=hi,
                    rel_err=j["speed_mps"] / case.speed_mps - 1,
                    covered=lo <= case.speed_mps <= hi,
                    hdg_err=((j["heading_deg"] - case.heading_deg + 180) % 360) - 180,
                    regime=j["regime"],
                    hdg_std=j["heading_std_deg"],
                    methods=[m["name"] for m in j["methods"]],
                    z={
                        m["name"][:10]: round((m["speed_mps"] - case.speed_mps) / m["std_mps"], 2) for m in j["methods"]
                    },
                    gain=round(d.depth_gain, 2) if np.isfinite(d.depth_gain) else None,
                    spec_rel_std=j["methods"][0]["std_mps"] / j["speed_mps"],
                )
            else:
                row.update(fit_speed=d.fit_speed_mps if np.isfinite(d.fit_speed_mps) else None)
            rows.append(row)
            print(row, flush=True)
    return rows


def summarise(rows: list[dict]) -> dict:
    found = [r for r in rows if r["found"] and not r.get("lines_only")]
    out: dict = {
        "cases": len(rows),
        "found": len(found),
        "found_lines_only": sum(bool(r.get("lines_only")) for r in rows),
    }
    if not found:
        return out
    err = np.array([abs(r["rel_err"]) for r in found])
    hd = np.array([abs(r["hdg_err"]) for r in found])
    out.update(
        {
            "speed_within_3pct": int(np.sum(err <= 0.03)),
            "median_abs_speed_error": float(np.median(err)),
            "max_abs_speed_error": float(err.max()),
            "intervals_holding_truth": int(sum(r["covered"] for r in found)),
            "median_interval_width_rel": float(np.median([(r["hi"] - r["lo"]) / r["u"] for r in found])),
            "headings_within_2deg": int(np.sum(hd <= 2)),
            "max_heading_error_deg": float(hd.max()),
            "heading_error_over_std_p95": float(np.quantile(hd / np.array([r["hdg_std"] for r in found]), 0.95)),
            "median_time_s": float(np.median([r["time_s"] for r in rows])),
        }
    )
    for k in sorted({r["regime"] for r in found}):
        out[f"regime_{k}"] = sum(r["regime"] == k for r in found)
    return out


if __name__ == "__main__":
    args, tuning = parse(
        __doc__.splitlines()[0],
        [
            ("n", int, 40, "number of cases"),
            ("first", int, 0, "first seed"),
            ("depth_froude", float, None, "render at this Fr_h"),
        ],
    )
    rows = run(args.n, args.first, tuning, depth_froude=args.depth_froude)
    record(
        "accuracy_sweep",
        {"n": args.n, "first": args.first, "depth_froude": args.depth_froude},
        tuning,
        summarise(rows),
        rows,
        write=not args.no_record,
    )
