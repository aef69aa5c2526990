"""The start of a wake beside a displaced radar hull (detect.apex), on its typed input (a radar scene, the
clicked hull) and output (Apex).

Check values: a moving target in a SAR image is displaced along the azimuth from its wake by -(R/V) v_r
(Raney 1971, IEEE Trans. Aerosp. Electron. Syst. 7(3), 499-505), so the wake starts away from the hull; the
wake's calm turbulent water is a dark line in the speckle (common practice, no source).  Speckle of an L-look
intensity image is gamma distributed with mean 1 and variance 1 / L (Oliver & Quegan 1998, Understanding
Synthetic Aperture Radar Images; from memory).  The scenes are synthetic, drawn in this file.
"""

from __future__ import annotations

import numpy as np
import pytest
import rasterio
from rasterio.transform import from_origin

from wakemeter.detect.apex import find_displaced_apex
from wakemeter.scene.raster import open_scene

PIXEL_M = 5.0
N = 700
APEX = (350.0, 250.0)  #: (col, row) where the dark wake starts
HULL = (350.0, 400.0)  #: (col, row) of the bright hull: 150 px = 750 m along the azimuth (rows) from the apex


def _scene(tmp_path, *, wake: bool = True, apex=APEX):
    rng = np.random.default_rng(7)
    looks = 4
    img = 0.05 * rng.gamma(looks, 1.0 / looks, (N, N))  # sea clutter, sigma0 0.05
    rr, cc = np.mgrid[:N, :N].astype(float)
    if wake:  # dark line 8 px wide from the apex towards the west (image angle 180 deg)
        on = (np.abs(rr - apex[1]) <= 4) & (cc <= apex[0])
        img[on] *= 0.25
    hull = (np.abs(rr - HULL[1]) <= 2) & (np.abs(cc - HULL[0]) <= 8)
    img[hull] = 5.0
    path = tmp_path / f"radar_{wake}_{apex[0]:.0f}.tif"
    prof = dict(driver="GTiff", width=N, height=N, count=1, dtype="float32", crs="EPSG:32631")
    prof["transform"] = from_origin(500_000.0, 5_800_000.0, PIXEL_M, PIXEL_M)
    with rasterio.open(path, "w", **prof) as d:
        d.write(img.astype(np.float32)[None])
    return path


def test_the_wake_start_is_found_away_from_the_displaced_hull(tmp_path):
    with open_scene(_scene(tmp_path)) as sc:
        a = find_displaced_apex(sc, HULL)
    assert a is not None
    assert np.hypot(a.apex_px[0] - APEX[0], a.apex_px[1] - APEX[1]) < 15  # px: within 75 m of the true start
    assert (a.back_angle_deg - 180.0 + 180.0) % 360.0 - 180.0 == pytest.approx(0.0, abs=3.0)  # the wake runs west
    assert a.distance_m == pytest.approx(150 * PIXEL_M, rel=0.1)
    assert a.line_significance >= 5.0 and a.step_contrast >= 1.0


def test_no_dark_line_no_apex(tmp_path):
    with open_scene(_scene(tmp_path, wake=False)) as sc:
        assert find_displaced_apex(sc, HULL) is None


def test_a_start_farther_than_allowed_is_not_taken(tmp_path):
    with open_scene(_scene(tmp_path)) as sc:
        assert find_displaced_apex(sc, HULL, max_distance_m=400.0) is None
