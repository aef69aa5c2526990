"""The demo scenes in ``sample_scenes/``: a fictional scenario of our own.

Scenario: the invented harbour of Port Merrow on the invented Calder Sound.
The harbour authority has a 10-knot limit in the approach channel and is
reviewing wake-damage complaints from the Tallow Shoal moorings.  All vessel
names, places and events are invented; the coordinates are over open ocean.
"""

from __future__ import annotations

from pathlib import Path

from ..physics.units import knots_to_mps
from ..scene.geodesy import WGS84_GEOD
from .imaging import AmbientSea, OpticalModel, RadarModel
from .scene_maker import SceneSpec, VesselSpec, render, write
from .wavefield import Hull

LON, LAT = -35.0, 36.0  # open water in the North Atlantic
LON_S, LAT_S = -20.0, -41.0  # open water in the South Atlantic (radar scene)


def _moved(lon: float, lat: float, bearing_deg: float, distance_m: float) -> tuple[float, float]:
    """The point ``distance_m`` from (lon, lat) along a true bearing (WGS 84 geodesic)."""
    lon2, lat2, _ = WGS84_GEOD.fwd(lon, lat, bearing_deg, distance_m)
    return float(lon2), float(lat2)


def vessel_scene(name: str, vessel: VesselSpec, size: int, pixel_m: float, **kw) -> SceneSpec:
    """A scene whose centre lies 30 % of its width ahead of the vessel, so the wake fills it."""
    clon, clat = _moved(vessel.lon, vessel.lat, vessel.heading_deg + 180.0, 0.3 * size * pixel_m)
    return SceneSpec(size, size, pixel_m, clon, clat, (vessel,), **kw)


def demo_specs() -> dict[str, SceneSpec]:
    """Name -> spec of every demo scene."""
    kn = lambda v: float(knots_to_mps(v))  # noqa: E731
    lon_a, lat_a = _moved(LON - 0.04, LAT - 0.02, 0.0, 700.0)
    lon_b, lat_b = _moved(LON - 0.04, LAT - 0.02, 180.0, 500.0)
    return {
        "harbour_approach_optical": vessel_scene(
            "harbour_approach_optical",
            VesselSpec("Saltmarsh Wren", LON, LAT, kn(14.0), 62.0, Hull(32.0, 7.0)),
            1024,
            2.0,
            imaging=OpticalModel(sun_azimuth_deg=150.0),
            acquisition_time="2026-06-14T10:32:05Z",
            seed=101,
            description="Patrol launch Saltmarsh Wren in the deep outer approach, optical, 2 m pixels.",
        ),
        "outer_roads_radar": vessel_scene(
            "outer_roads_radar",
            VesselSpec("Orla Brandt", LON_S, LAT_S, kn(17.5), 205.0, Hull(70.0, 12.0)),
            640,
            5.0,
            imaging=RadarModel(look_bearing_deg=100.0, incidence_deg=33.0, looks=4),
            sea=AmbientSea(90.0, 20.0, 6.0, 0.6),
            acquisition_time="2026-06-14T19:05:41Z",
            seed=202,
            description="Ferry Orla Brandt in the outer roads, radar (4 looks, speckle, swell).",
        ),
        "tallow_shoal_shallow": vessel_scene(
            "tallow_shoal_shallow",
            VesselSpec("Kittiwake Spray", LON + 0.05, LAT + 0.03, kn(12.4), 318.0, Hull(24.0, 6.0)),
            1024,
            2.0,
            imaging=OpticalModel(sun_azimuth_deg=200.0),
            depth_m=5.0,
            acquisition_time="2026-06-15T11:02:17Z",
            seed=303,
            description="Workboat Kittiwake Spray over Tallow Shoal, 5 m depth, Fr_h = 0.91: wide wake.",
        ),
        "channel_two_vessels": SceneSpec(
            1024,
            1024,
            2.0,
            LON - 0.04,
            LAT - 0.02,
            (
                VesselSpec("Merrow Pilot 2", *_moved(lon_a, lat_a, 95.0, 450.0), kn(9.0), 95.0, Hull(18.0, 5.0)),
                VesselSpec("Brackenfield", *_moved(lon_b, lat_b, 250.0, 450.0), kn(16.0), 250.0, Hull(45.0, 9.0)),
            ),
            OpticalModel(sun_azimuth_deg=120.0),
            acquisition_time="2026-06-16T09:48:30Z",
            seed=404,
            description="Pilot boat and coaster passing in the approach channel, optical.",
        ),
        "calm_no_wake": SceneSpec(
            768,
            768,
            2.0,
            LON + 0.1,
            LAT - 0.05,
            (),
            OpticalModel(sun_azimuth_deg=150.0),
            sea=AmbientSea(45.0, 70.0, 10.0, 1.0),
            acquisition_time="2026-06-16T09:49:02Z",
            seed=505,
            description="Swell only, no vessel and no wake (for false-alarm checks).",
        ),
    }


def write_demo_scenes(folder: str | Path) -> list[Path]:
    """Render and write every demo scene into ``folder``; returns the GeoTIFF paths."""
    out = []
    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    for name, spec in demo_specs().items():
        tif, _ = write(render(spec), folder / f"{name}.tif")
        out.append(tif)
    write_demo_reports(folder)
    return out


#: what the two vessels of the channel scene broadcast (invented identifiers): the pilot boat reports its
#: true speed; the coaster reports 10.0 kn, the harbour's limit, while its wake says 16 kn; a third vessel
#: reports from outside the scene
DEMO_REPORTS = {"Merrow Pilot 2": ("990000101", None), "Brackenfield": ("990000202", 10.0)}


def write_demo_reports(folder: str | Path) -> Path:
    """``channel_two_vessels_reports.csv``: position reports of the channel scene's vessels (see DEMO_REPORTS)."""
    import datetime as _dt
    import json

    from ..fileio import atomic_write_bytes
    from ..physics.units import KNOT_MPS
    from .reports import straight_track, to_csv_text

    folder = Path(folder)
    truth = json.loads((folder / "channel_two_vessels.truth.json").read_text())
    at = _dt.datetime.fromisoformat(truth["acquisition_time"].replace("Z", "+00:00"))
    reports = []
    for v in truth["vessels"]:
        vid, told = DEMO_REPORTS[v["name"]]
        kn = told if told is not None else round(v["speed_mps"] / KNOT_MPS, 1)
        reports += straight_track(vid, v["lon"], v["lat"], v["heading_deg"], kn, at)
    reports += straight_track("990000303", -34.90, 36.05, 180.0, 6.0, at)
    return atomic_write_bytes(folder / "channel_two_vessels_reports.csv", to_csv_text(reports).encode())
