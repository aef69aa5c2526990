"""Scenes with several vessels of known truth (for the vessel finder's tests and sweeps, and `synth --fleet`).

Vessels are placed at random (seeded) inside the scene, at least ``spacing_m`` apart and away from the edge,
with random headings, speeds of 4-16 kn and hulls of 15-80 m (or as asked).  Invented names."""

from __future__ import annotations

import numpy as np

from ..physics.units import KNOT_MPS
from ..scene import geodesy
from .imaging import OpticalModel, RadarModel
from .scene_maker import SceneSpec, VesselSpec
from .wavefield import Hull

NAMES = ("Tern", "Gannet", "Shag", "Petrel", "Skua", "Fulmar", "Dunlin", "Curlew", "Plover", "Knot", "Eider", "Smew")


def fleet_spec(
    n: int,
    *,
    seed: int = 0,
    size: int = 1024,
    pixel_m: float = 10.0,
    lon: float = -35.0,
    lat: float = 36.0,
    spacing_m: float = 1200.0,
    length_m: tuple[float, float] = (15.0, 80.0),
    imaging: OpticalModel | RadarModel | None = None,
) -> SceneSpec:
    """``n`` vessels with hulls ``length_m`` (shortest, longest) long, optical by default, or as ``imaging``
    says."""
    rng = np.random.default_rng([seed, 4242])
    half = size * pixel_m / 2
    edge = min(0.15 * size * pixel_m, 2000.0)
    placed: list[tuple[float, float]] = []
    vessels: list[VesselSpec] = []
    tries = 0
    while len(vessels) < n:
        tries += 1
        if tries > 10_000:
            raise ValueError(f"cannot place {n} vessels {spacing_m:.0f} m apart in a {size} px scene")
        e, nth = rng.uniform(-half + edge, half - edge, 2)
        if any(np.hypot(e - a, nth - b) < spacing_m for a, b in placed):
            continue
        placed.append((e, nth))
        dist, bearing = float(np.hypot(e, nth)), float(np.degrees(np.arctan2(e, nth)))
        vlon, vlat, _ = geodesy.WGS84_GEOD.fwd(lon, lat, bearing, dist)
        length = float(rng.uniform(*length_m))
        vessels.append(
            VesselSpec(
                f"{NAMES[len(vessels) % len(NAMES)]} {len(vessels) + 1}",
                float(vlon),
                float(vlat),
                float(rng.uniform(4.0, 16.0)) * KNOT_MPS,
                float(rng.uniform(0.0, 360.0)),
                Hull(length_m=length, beam_m=max(length / 6.0, 4.0)),
            )
        )
    return SceneSpec(
        size,
        size,
        pixel_m,
        lon,
        lat,
        tuple(vessels),
        imaging=OpticalModel() if imaging is None else imaging,
        seed=seed,
        description=f"{n} vessels",
    )
