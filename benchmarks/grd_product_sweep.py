"""Sentinel-1 GRD products (script): does the radar azimuth-offset method, run on the product's own geometry,
give intervals that hold the true speed?

Run: ``.venv/bin/python benchmarks/grd_product_sweep.py [N] [first_seed]``.  Writes N synthetic GRD products
(``wakemeter.synth.grd_product``: 10 m pixels, 4-look speckle, ascending and descending passes, random heading,
speed 8-25 kn and hull 50-150 m, the hull imaged where a moving target is, Raney 1971), opens each as a user
does (the SAFE folder), clicks the imaged hull and prints per case whether the offset method ran, its speed
and interval, and the combined result.  The same figures typed by hand must give the same result: each case
is analysed a second time with ``radar_geometry`` set to what the product states at the hull's pixel.
"""

from __future__ import annotations

import tempfile
from dataclasses import replace
from pathlib import Path

import numpy as np

from wakemeter.detect.analysis import AnalysisRequest, analyze
from wakemeter.detect.request import RadarGeometry
from wakemeter.scene.raster import open_scene
from wakemeter.synth.grd_product import radar_wake_product

from sweep_record import parse, record  # noqa: E402

KN = 1852.0 / 3600.0


def _case(seed: int, tmp: Path, tuning) -> dict:
    rng = np.random.default_rng(9000 + seed)
    speed_kn = float(rng.uniform(8.0, 25.0))
    heading = float(rng.uniform(0.0, 360.0))
    length = float(rng.uniform(50.0, 150.0))
    out = tmp / f"case_{seed}"
    out.mkdir()
    p = radar_wake_product(
        out, speed_knots=speed_kn, heading_deg=heading, hull=(length, length / 6.0), seed=seed, descending=seed % 2 == 1
    )
    truth = speed_kn * KN
    row: dict = {"seed": seed, "speed_kn": round(speed_kn, 2), "heading": round(heading, 1), "hull_m": round(length)}
    with open_scene(p.safe) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=p.hull_px), tuning)
        g = sc.radar_product.at(*p.hull_px) if sc.radar_product is not None else None
        typed = None
        if g is not None:
            rg = replace(RadarGeometry.from_product(g), source="as given by the user")
            typed = analyze(sc, AnalysisRequest(vessel_px=p.hull_px, radar_geometry=rg), tuning)
    radar = [m for m in a.methods if m.method == "radar azimuth offset"]
    row["found"] = a.wake_found
    row["projection"] = round(float(abs(np.cos(np.radians(heading - (270.0 if seed % 2 else 90.0))))), 2)
    if radar:
        m = radar[0]
        row |= {
            "offset_kn": round(m.speed_mps / KN, 2),
            "offset_lo_kn": round(m.ci95_low_mps / KN, 2),
            "offset_hi_kn": round(m.ci95_high_mps / KN, 2),
            "offset_covers": bool(m.ci95_low_mps <= truth <= m.ci95_high_mps),
        }
    if a.wake_found and a.speed is not None and a.speed.speed_mps is not None:
        row |= {
            "speed_kn_found": round(a.speed.speed_mps / KN, 2),
            "covers": bool(a.speed.ci95_low_mps <= truth <= a.speed.ci95_high_mps),
        }
    if typed is not None:
        t_radar = [m for m in typed.methods if m.method == "radar azimuth offset"]
        row["same_as_typed"] = bool(
            (not radar and not t_radar) or (radar and t_radar and abs(radar[0].speed_mps - t_radar[0].speed_mps) < 1e-9)
        )
    return row


def main(n: int, first: int, tuning) -> list[dict]:
    rows = []
    with tempfile.TemporaryDirectory() as tmp:
        for seed in range(first, first + n):
            row = _case(seed, Path(tmp), tuning)
            rows.append(row)
            print(row, flush=True)
    return rows


def summarise(rows: list[dict]) -> dict:
    ran = [r for r in rows if "offset_kn" in r]
    half = [(r["offset_hi_kn"] - r["offset_lo_kn"]) / 2 for r in ran]
    found = [r for r in rows if "covers" in r]
    return {
        "cases": len(rows),
        "wake found": sum(r["found"] for r in rows),
        "offset method ran": len(ran),
        "offset interval holds truth": sum(r["offset_covers"] for r in ran),
        "offset median 95% half-width kn": float(np.median(half)) if half else None,
        "result interval holds truth": sum(r["covers"] for r in found),
        "results with a speed": len(found),
        "product geometry = typed geometry": sum(r.get("same_as_typed", False) for r in rows),
    }


if __name__ == "__main__":
    args, tuning = parse(
        __doc__.splitlines()[0], [("n", int, 16, "number of products"), ("first", int, 0, "first seed")]
    )
    rows = main(args.n, args.first, tuning)
    record(
        "grd_product_sweep",
        {"n": args.n, "first": args.first},
        tuning,
        summarise(rows),
        rows,
        write=not args.no_record,
    )
