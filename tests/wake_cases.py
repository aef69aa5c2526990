"""Random synthetic wake scenes of known truth for the accuracy tests and the sweep script.

Synthetic data (wakemeter's own renderer); seeds differ from the demo scenes'.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from wakemeter.synth import AmbientSea, Hull, OpticalModel, RadarModel, SceneSpec, VesselSpec, render, write
from wakemeter.synth.demo import vessel_scene

G = 9.81


@dataclass(frozen=True)
class Case:
    seed: int
    spec: SceneSpec
    speed_mps: float
    heading_deg: float
    depth_m: float | None


def make_case(seed: int, *, radar: bool | None = None, depth_froude: float | None = None,
              size: int = 640) -> Case:
    rng = np.random.default_rng(10_000 + seed)
    while True:
        u = float(rng.uniform(2.0, 15.0))
        p = float(np.exp(rng.uniform(np.log(0.5), np.log(10.0))))
        lam = 2 * np.pi * u * u / G
        if 7.0 <= lam / p <= 45.0:
            break
    heading = float(rng.uniform(0, 360))
    fr_l = float(rng.uniform(0.25, 0.45))
    length = u * u / (G * fr_l * fr_l)
    lat = float(rng.uniform(-55, 55))
    lon = float(rng.uniform(-170, 170))
    radar = bool(rng.random() < 0.5) if radar is None else radar
    if radar:
        imaging = RadarModel(look_bearing_deg=float(rng.uniform(0, 360)), incidence_deg=float(rng.uniform(25, 45)),
                             looks=int(rng.integers(3, 7)), hull_displacement=False)
    else:
        imaging = OpticalModel(sun_azimuth_deg=float(rng.uniform(0, 360)), noise_std=float(rng.uniform(0.01, 0.04)))
    sea = None
    if rng.random() < 0.5:
        sea = AmbientSea(peak_wavelength_m=float(lam * rng.uniform(1.5, 3.0)), direction_deg=float(rng.uniform(0, 360)),
                         spreading_s=6.0, strength=float(rng.uniform(0.2, 0.6)))
    depth = np.inf if depth_froude is None else u * u / (G * depth_froude ** 2)
    vessel = VesselSpec("Case", lon, lat, u, heading, Hull(length, length / 5))
    spec = vessel_scene("case", vessel, size, p, imaging=imaging, sea=sea, depth_m=depth, seed=seed)
    return Case(seed, spec, u, heading, None if np.isinf(depth) else depth)


def write_case(case: Case, folder) -> tuple:
    return write(render(case.spec), folder / f"case_{case.seed}.tif")
