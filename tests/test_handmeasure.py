"""Hand measurements against the demo scenes' synthetic truth and published wave physics."""

import json
from pathlib import Path

import numpy as np
import pytest

from wakemeter.detect import handmeasure as hm
from wakemeter.errors import ParameterError
from wakemeter.physics import kelvin
from wakemeter.scene import geodesy
from wakemeter.scene.raster import open_scene

ROOT = Path(__file__).resolve().parents[1]


def _truth(name):
    return json.loads((ROOT / "sample_scenes" / f"{name}.truth.json").read_text())


def test_track_bearing_on_demo():
    # Synthetic truth: heading 62 deg; a line drawn from 200 px behind the vessel to it.
    t = _truth("harbour_approach_optical")
    v = t["vessels"][0]
    with open_scene(ROOT / "sample_scenes" / "harbour_approach_optical.tif") as sc:
        f = sc.local_frame(v["pixel_col"], v["pixel_row"])
        dc, dr = f.image_direction(v["heading_deg"])
        vessel = (v["pixel_col"], v["pixel_row"])
        wake_end = (vessel[0] - 200 * dc, vessel[1] - 200 * dr)
        h = hm.track_heading(sc, vessel, wake_end)
        assert h.bearing_deg == pytest.approx(62.0, abs=0.1)
        assert h.length_m == pytest.approx(400.0, rel=1e-3)
        a = np.radians(19.47)
        arm_end = (
            vessel[0] - 200 * (np.cos(a) * dc - np.sin(a) * dr),
            vessel[1] - 200 * (np.cos(a) * dr + np.sin(a) * dc),
        )
        ang, sd = hm.angle_to_track(sc, (wake_end, vessel), (vessel, arm_end))
        assert ang == pytest.approx(19.47, abs=0.2) and sd > 0


@pytest.mark.parametrize("index", [0, 1])
def test_crest_ruler_on_transverse_crests(index):
    # Synthetic truth (channel_two_vessels): transverse crests are 2 pi U^2 / g apart (Lamb 1932 sec. 256),
    # g = WGS 84 normal gravity at the scene latitude (NIMA TR8350.2).  Goal: within 3 %.
    t = _truth("channel_two_vessels")
    v = t["vessels"][index]
    lam = kelvin.transverse_wavelength(v["speed_mps"], g=t["gravity_mps2"])
    with open_scene(ROOT / "sample_scenes" / "channel_two_vessels.tif") as sc:
        f = sc.local_frame(v["pixel_col"], v["pixel_row"])
        dc, dr = f.image_direction(v["heading_deg"])
        length = min(300.0, 6 * lam)
        start = (v["pixel_col"] - 10 * dc + 3 * dr, v["pixel_row"] - 10 * dr - 3 * dc)
        end = (start[0] - length * dc, start[1] - length * dr)
        c = hm.crest_ruler(sc, start, end)
    assert c.spacing_m == pytest.approx(lam, rel=0.03)
    assert c.spacing_std_m > 0 and c.snr > 10


def test_ruler_matches_geodesic():
    # Reference library: pyproj.Geod through wakemeter.scene.geodesy.
    with open_scene(ROOT / "sample_scenes" / "outer_roads_radar.tif") as sc:
        r = hm.ruler(sc, (10, 10), (300, 200))
        d, az = geodesy.ground_distance_and_bearing(sc.georef, (10, 10), (300, 200))
        assert r.length_m == pytest.approx(d) and r.bearing_deg == pytest.approx(az)
        assert r.length_std_m == pytest.approx(np.sqrt(2) * 0.5 * 5.0, rel=0.01)
        with pytest.raises(ParameterError, match="longer line"):
            hm.ruler(sc, (10, 10), (10.5, 10))
        with pytest.raises(ParameterError, match="16 pixels"):
            hm.crest_ruler(sc, (10, 10), (20, 10))


@pytest.mark.parametrize("period_px, outcome", [(2.4, "refused"), (4.0, "doubtful"), (10.0, "plain")])
def test_crests_close_to_the_pixel_grid_are_refused_or_carry_the_doubt(tmp_path, period_px, outcome):
    # a pattern repeating every 2.4 px is at the grid's own scale (2 px per wave is the sampling limit,
    # Shannon 1949): refused; at 4 px the spacing is measured with half a pixel more uncertainty; at 10 px as
    # before (8 m pixels)
    import rasterio
    from rasterio.transform import from_origin

    cols = np.arange(200)
    img = 100 + 40 * np.sin(2 * np.pi * cols / period_px)[None, :].repeat(200, axis=0)
    path = tmp_path / f"grid_{period_px}.tif"
    prof = dict(driver="GTiff", width=200, height=200, count=1, dtype="float32", crs="EPSG:32631")
    with rasterio.open(path, "w", transform=from_origin(500_000, 5_800_000, 8.0, 8.0), **prof) as d:
        d.write(img.astype(np.float32)[None])
    with open_scene(path) as sc:
        if outcome == "refused":
            with pytest.raises(ParameterError, match="pixel grid"):
                hm.crest_ruler(sc, (20.0, 100.0), (180.0, 100.0))
            return
        c = hm.crest_ruler(sc, (20.0, 100.0), (180.0, 100.0))
    assert c.spacing_m == pytest.approx(period_px * 8.0, rel=0.02)
    if outcome == "doubtful":
        assert c.spacing_std_m >= 0.5 * 8.0 * 0.999
    else:
        assert c.spacing_std_m < 0.5 * 8.0
