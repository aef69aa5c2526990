"""Accuracy sweep (script): analyse random synthetic scenes of known truth and print the errors.

Run: ``.venv/bin/python benchmarks/accuracy_sweep.py [N] [first_seed] [depth_froude]``.  Prints per
case the truth, the estimate, its 95 % interval and the heading error, then the summary: share of
speeds within 3 %, headings within 2 deg, the coverage of the 95 % intervals and the depth regimes.
With ``depth_froude`` the scenes are rendered at that depth Froude number and analysed *without*
the depth (the program must find the depth effect itself).
"""

from __future__ import annotations

import json
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "tests"))
from wake_cases import make_case, write_case  # noqa: E402

from wakemeter.detect.analysis import analyze  # noqa: E402
from wakemeter.scene.raster import open_scene  # noqa: E402


def run(n: int, first: int, **kw) -> list[dict]:
    rows = []
    with tempfile.TemporaryDirectory() as tmp:
        for seed in range(first, first + n):
            case = make_case(seed, **kw)
            tif, sidecar = write_case(case, Path(tmp))
            truth = json.loads(sidecar.read_text())["vessels"][0]
            with open_scene(tif) as sc:
                t = time.perf_counter()
                a = analyze(sc, vessel_px=(truth["pixel_col"], truth["pixel_row"]))
                dt = time.perf_counter() - t
            j = a.to_json()
            row = {"seed": seed, "kind": truth and ("radar" if "looks" in json.loads(sidecar.read_text())["imaging"] else "optical"),
                   "pixel_m": case.spec.pixel_m, "u": case.speed_mps, "found": j["wake_found"], "time_s": round(dt, 2),
                   "sig": round(a.significance, 1), "side": round(a.plots.get("side_contrast", float("nan")), 1)}
            if j["wake_found"]:
                lo, hi = j["speed_ci95_mps"]
                row.update(est=j["speed_mps"], lo=lo, hi=hi, rel_err=j["speed_mps"] / case.speed_mps - 1,
                           covered=lo <= case.speed_mps <= hi,
                           hdg_err=((j["heading_deg"] - case.heading_deg + 180) % 360) - 180, regime=j["regime"],
                           hdg_std=j["heading_std_deg"],
                           methods=[m["name"] for m in j["methods"]],
                           z={m["name"][:10]: round((m["speed_mps"] - case.speed_mps) / m["std_mps"], 2)
                              for m in j["methods"]},
                           gain=round(a.plots["depth_gain"], 2), spec_rel_std=j["methods"][0]["std_mps"] / j["speed_mps"])
            else:
                row.update(fit_speed=a.plots.get("fit_speed"))
            rows.append(row)
            print(row, flush=True)
    return rows


if __name__ == "__main__":
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 40
    first = int(sys.argv[2]) if len(sys.argv) > 2 else 0
    fr = float(sys.argv[3]) if len(sys.argv) > 3 else None
    rows = run(n, first, depth_froude=fr)
    found = [r for r in rows if r["found"]]
    print(f"\nfound {len(found)}/{len(rows)}")
    if found:
        err = np.array([abs(r["rel_err"]) for r in found])
        hd = np.array([abs(r["hdg_err"]) for r in found])
        cov = np.mean([r["covered"] for r in found])
        print(f"speed within 3 %: {np.mean(err <= 0.03):.0%} (median |error| {np.median(err):.2%}, max {err.max():.2%})")
        print(f"heading within 2 deg: {np.mean(hd <= 2):.0%} (median {np.median(hd):.2f} deg, max {hd.max():.1f}); "
              f"95th percentile of |error| / stated std {np.quantile(hd / np.array([r['hdg_std'] for r in found]), 0.95):.2f}")
        print(f"95 % interval coverage: {cov:.0%}; median time {np.median([r['time_s'] for r in rows]):.2f} s")
        width = np.median([(r["hi"] - r["lo"]) / r["u"] for r in found])
        regimes = {k: sum(r["regime"] == k for r in found) for k in sorted({r["regime"] for r in found})}
        print(f"median interval width {width:.1%} of the speed; regimes {regimes}")
        for name in sorted({k for r in found for k in r["z"]}):
            z = np.array([r["z"][name] for r in found if name in r["z"]])
            print(f"method {name!r}: n={z.size}, rms z {np.sqrt(np.mean(z ** 2)):.2f}, "
                  f"|z| <= 1.96 in {np.mean(np.abs(z) <= 1.96):.0%}")
