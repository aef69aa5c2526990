"""Drone photographs at centimetre pixels (script): found, speed within 3 %, intervals and headings holding.

Run: ``.venv/bin/python benchmarks/photo_sweep.py [N] [--no-record]``: N synthetic drone photos (4000 x 3000
JPEG with the drone's EXIF and XMP, ``wakemeter.synth.photo``) at each of 0.01, 0.02, 0.05, 0.1 and 0.25 m per
pixel, read through ``open_scene`` as users' photos are (the pixel size from the photo's metadata, never
typed).  Speeds 3-25 kn and hulls 4-30 m (hull Froude number 0.25-0.7, displacement boats the renderer models).

A frame holds only so much wake: the speed comes from the transverse wave, 1.5 m long at 3 kn and 106 m at
25 kn, and a 0.01 m frame spans 40 m.  Each case is drawn at random and marked *measurable* when its transverse
wave spans at least 8 pixels and the frame holds at least 8 of them behind the vessel; the goals (found, within
3 %, intervals and headings holding) are counted on measurable cases, and every case, measurable or not, is
counted for the one thing that must never happen: an interval that misses the truth.
"""

from __future__ import annotations

import json
import math
import tempfile
import time
from pathlib import Path

import numpy as np

from wakemeter.detect.analysis import AnalysisRequest, analyze  # noqa: E402
from wakemeter.physics.units import KNOT_MPS
from wakemeter.scene.raster import open_scene  # noqa: E402
from wakemeter.synth import Hull, VesselSpec
from wakemeter.synth.photo import PhotoSpec, frame_position, frame_reach, render_photo, write_photo

from sweep_record import parse, record  # noqa: E402
from timing import speed_check  # noqa: E402

G = 9.81
PIXELS_M = (0.01, 0.02, 0.05, 0.1, 0.25)
WIDTH, HEIGHT = 4000, 3000
WAVES_BEHIND = 8.0
PX_PER_WAVE = 8.0


def _place(heading_img_deg: float) -> tuple[float, float, float]:
    """The vessel's pixel on the frame (as ``wakemeter synth --photo`` frames it) and the frame's length behind
    it along the track, pixels."""
    col, row = frame_position(WIDTH, HEIGHT, heading_img_deg)
    return col, row, 1.7 * frame_reach(WIDTH, HEIGHT, heading_img_deg)


def _knots(wavelength_m: float) -> float:
    return math.sqrt(wavelength_m * G / (2 * math.pi)) / KNOT_MPS


def _case(rng: np.random.Generator, pixel_m: float, seed: int, anywhere: bool) -> tuple[PhotoSpec, dict]:
    """One photo: three cases in four drawn about the measurable speeds (a little beyond them either side),
    the fourth anywhere in 3-25 kn."""
    heading = float(rng.uniform(0, 360))
    yaw = float(rng.uniform(0, 360))
    col, row, behind_px = _place(heading - yaw)
    lo, hi = 3.0, 25.0
    if not anywhere:
        lo = max(lo, 0.95 * _knots(PX_PER_WAVE * pixel_m))
        hi = max(lo * 1.05, min(hi, 1.05 * _knots(behind_px * pixel_m / WAVES_BEHIND)))
    kn = float(np.exp(rng.uniform(np.log(lo), np.log(hi))))
    u = kn * KNOT_MPS
    fr = float(rng.uniform(0.25, 0.7))
    length = float(np.clip(u * u / (G * fr * fr), 4.0, 30.0))
    vessel = VesselSpec("Case", -35.0, 36.0, u, heading, Hull(length, length / 3.2))
    spec = PhotoSpec(
        WIDTH, HEIGHT, pixel_m, vessel, col, row, yaw_deg=yaw, sun_azimuth_deg=float(rng.uniform(0, 360)), seed=seed
    )
    lam_px = 2 * math.pi * u * u / G / pixel_m
    meta = {
        "pixel_m": pixel_m,
        "knots": round(kn, 2),
        "hull_m": round(length, 1),
        "hull_froude": round(u / math.sqrt(G * length), 2),
        "px_per_wave": round(lam_px, 1),
        "waves_behind": round(behind_px / lam_px, 1),
        "measurable": bool(lam_px >= PX_PER_WAVE and behind_px / lam_px >= WAVES_BEHIND),
    }
    return spec, meta


def _heading_check(a, truth_deg: float) -> dict:
    if a.heading_deg is None:
        return {}
    err = (a.heading_deg - truth_deg + 180) % 360 - 180
    sd = a.heading_std_deg or 0.0
    return {"heading_err_deg": round(err, 2), "heading_held": bool(abs(err) <= 1.96 * sd)}


def main(n: int, tuning) -> list[dict]:
    rows = []
    for k, pixel_m in enumerate(PIXELS_M):
        rng = np.random.default_rng(2900 + k)
        for i in range(n):
            spec, meta = _case(rng, pixel_m, seed=100 * k + i, anywhere=i % 4 == 3)
            t0 = time.perf_counter()
            with tempfile.TemporaryDirectory() as tmp:
                jpg, sidecar = write_photo(*render_photo(spec), Path(tmp) / "photo.jpg")
                truth = json.loads(sidecar.read_text())["vessels"][0]
                with open_scene(jpg) as sc:
                    a = analyze(sc, AnalysisRequest(vessel_px=(spec.vessel_col, spec.vessel_row)), tuning)
            row = {
                **meta,
                "found": a.wake_found,
                "analysis_pixel_m": round(a.pixel_m, 3),
                "methods": list(a.speed.methods) if a.wake_found and a.speed is not None else [],
                **speed_check(a, truth["speed_mps"]),
                **_heading_check(a, truth["heading_deg"]),
                "time_s": round(time.perf_counter() - t0, 1),
            }
            rows.append(row)
            print(row, flush=True)
    return rows


def summary(rows: list[dict]) -> dict:
    """Flat figures per pixel size (so the record prints side by side with the last one), then the rest."""
    out: dict = {}
    for p in PIXELS_M:
        m = [r for r in rows if r["pixel_m"] == p and r["measurable"]]
        sp = [r for r in m if "rel_err" in r]
        given = [r for r in m if "heading_err_deg" in r]
        out.update(
            {
                f"{p:g}m_measurable": len(m),
                f"{p:g}m_found_with_speed": len(sp),
                f"{p:g}m_within_3pct": sum(abs(r["rel_err"]) <= 0.03 for r in sp),
                f"{p:g}m_intervals_holding": sum(r["covered"] for r in sp),
                f"{p:g}m_headings_holding_of_given": f"{sum(bool(r['heading_held']) for r in given)}/{len(given)}",
            }
        )
    out["not_measurable_cases"] = sum(not r["measurable"] for r in rows)
    out["not_measurable_speeds_given"] = sum("rel_err" in r for r in rows if not r["measurable"])
    out["intervals_missing_truth_all_cases"] = sum("rel_err" in r and not r["covered"] for r in rows)
    return out


if __name__ == "__main__":
    args, tuning = parse(__doc__.splitlines()[0], [("n", int, 8, "cases per pixel size")])
    cases = main(args.n, tuning)
    record("photo_sweep", {"n": args.n}, tuning, summary(cases), cases, write=not args.no_record)
