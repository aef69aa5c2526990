"""The hull's shift between two bands recorded a known time apart (detect.band_shift), on its typed input
(a two-band scene, the bands' timing) and output (BandShift, a SpeedEstimate over ground).

Check values (synthetic two-band scenes of known truth, drawn in this file): velocity is displacement over time
(v = d / t, the definition); the hull's position is its leading edge, which its static foam does not move
(Heiselberg 2019, "Aircraft and ship velocity determination in Sentinel-2 multispectral images", Sensors 19(13)
2873; from memory); UTM grid distances are ground distances times the scale factor 0.9996 on the central
meridian (Snyder 1987, Map Projections - A Working Manual, USGS Professional Paper 1395; from memory).
"""

from __future__ import annotations

import numpy as np
import pytest
import rasterio
from rasterio.transform import from_origin
from scipy import ndimage

from wakemeter.detect.band_shift import measure_band_shift, moves_against
from wakemeter.scene.raster import open_scene
from wakemeter.scene.sensor import BandTiming

PIXEL_M = 10.0
N = 121
TIMING = BandTiming("test sensor", 1, 2, 1.0, 0.0, "test timing", "given", 0.1)


def _band(shift_px: float, *, foam: bool, rng, hull_px: int = 12) -> np.ndarray:
    """Dark water with a bright hull ``hull_px`` long travelling east, its bow at col 60 + shift_px; optional
    foam trailing 20 px behind the stern that stays put between the bands."""
    fine = 8  # drawn at 1/8 px, then averaged: a sub-pixel shift is a real shift of the pixel values
    img = np.zeros((N * fine, N * fine))
    r0, r1 = int(59 * fine), int(62 * fine)
    bow = int(round((60 + shift_px) * fine))
    img[r0:r1, bow - hull_px * fine : bow] = 1.0
    if foam:
        trail = slice((60 - hull_px - 20) * fine, (60 - hull_px) * fine)
        img[r0:r1, trail] = np.maximum(img[r0:r1, trail], 0.6)
    px = img.reshape(N, fine, N, fine).mean(axis=(1, 3))
    px = ndimage.gaussian_filter(px, 0.6)  # the sensor's blur
    return 0.05 + px + rng.normal(0, 0.01, px.shape)


def _scene(tmp_path, shift_px: float, *, foam: bool = False, flat: bool = False, hull_px: int = 12):
    rng = np.random.default_rng(3)
    bands = [_band(0.0, foam=foam, rng=rng, hull_px=hull_px), _band(shift_px, foam=foam, rng=rng, hull_px=hull_px)]
    if flat:
        bands = [0.05 + rng.normal(0, 0.01, (N, N)) for _ in range(2)]
    return _write(tmp_path / f"two_bands_{shift_px}_{foam}_{flat}_{hull_px}.tif", bands)


def _write(path, bands):
    prof = dict(driver="GTiff", width=N, height=N, count=len(bands), dtype="float32", crs="EPSG:32633")
    # easting 500 000 m is the zone's central meridian: the grid scale factor there is 0.9996
    prof["transform"] = from_origin(500_000.0 - N * PIXEL_M / 2, 6_200_000.0, PIXEL_M, PIXEL_M)
    with rasterio.open(path, "w", **prof) as d:
        d.write(np.stack(bands).astype(np.float32))
    return path


def _measure(path, heading_back_deg: float = 180.0):
    with open_scene(path) as sc:
        return measure_band_shift(sc, (60.0, 60.5), heading_back_deg, TIMING, rng=np.random.default_rng(0))


def test_a_hull_that_moves_gives_its_shift_over_the_delay(tmp_path):
    # synthetic truth: a 1.5 px shift in 1.0 s at 10 m grid pixels; v = d / t over the UTM scale factor (Snyder 1987)
    s = _measure(_scene(tmp_path, 1.5))
    assert s is not None
    assert s.along_px == pytest.approx(1.5, abs=0.15)
    assert abs(s.across_px) < 0.2
    truth = 1.5 * PIXEL_M / 0.9996 / TIMING.delay_s  # v = d / t, grid distance over the scale factor
    assert s.estimate.speed_mps == pytest.approx(truth, rel=0.1)
    assert s.estimate.ci95_low_mps <= truth <= s.estimate.ci95_high_mps
    assert s.estimate.over_ground
    assert (s.course_deg - 90.0 + 180.0) % 360.0 - 180.0 == pytest.approx(0.0, abs=4.0)  # travelling east


def test_static_foam_behind_the_hull_does_not_pull_the_edge(tmp_path):
    # a 4 px hull with 20 px of foam behind it, all within the edge search: a brightness centroid of hull and
    # foam would move by about 1.5 * 4 / 16 px; the leading edge moves the full 1.5 px
    path = _scene(tmp_path, 1.5, foam=True, hull_px=4)
    s = _measure(path)
    assert s is not None and s.along_px == pytest.approx(1.5, abs=0.2)
    with rasterio.open(path) as d:
        b = d.read()[:, 58:63, 36:72] - 0.05
    cols = np.arange(36, 72)
    centroid_shift = float(((b[1] * cols).sum() / b[1].sum()) - ((b[0] * cols).sum() / b[0].sum()))
    assert centroid_shift < 0.6  # what a centroid would have measured


def test_a_hull_that_stands_still_gives_no_speed_to_speak_of(tmp_path):
    # synthetic truth: no shift between the bands; the interval must reach down to a standing hull
    s = _measure(_scene(tmp_path, 0.0))
    assert s is not None
    assert abs(s.along_px) < 0.15
    assert s.estimate.ci95_low_mps < 1.0  # the interval reaches down to (almost) standing still


def test_flat_water_has_no_edge_to_measure(tmp_path):
    # synthetic: noise only, no hull (program behaviour: no edge, no figure)
    assert _measure(_scene(tmp_path, 1.5, flat=True)) is None


def test_the_shift_says_when_a_heading_points_the_wrong_way(tmp_path):
    # synthetic truth: the hull moves east (090°); a heading of 270° is against the shift (program behaviour)
    path = _scene(tmp_path, 1.5)
    with open_scene(path) as sc:
        assert moves_against(sc, (60.0, 60.5), 90.0, TIMING) is None  # east: agrees
        reason = moves_against(sc, (60.0, 60.5), 270.0, TIMING)  # west: the hull moved east
    assert reason is not None and "against" in reason


# ---- the bands recorded in between: a moving hull's edge advances with time (kinematics: position grows with
# time at constant velocity), so in a band recorded between the two timed bands it lies part of the way from its
# first position to its last.  Sentinel-2 records B08 and B03 between B02 and B04 (Heiselberg 2019, the band
# timing table; from memory); only that order is used. ----
TIMING4 = BandTiming("test sensor", 1, 2, 1.0, 0.0, "test timing", "given", 0.1, (3, 4), ("B08", "B03"))


def _four_band_scene(tmp_path, last_px: float, b08_px: float, b03_px: float):
    rng = np.random.default_rng(5)
    bands = [_band(x, foam=True, rng=rng, hull_px=6) for x in (0.0, last_px, b08_px, b03_px)]
    return _write(tmp_path / f"four_bands_{last_px}_{b08_px}_{b03_px}.tif", bands)


def _four(path):
    from wakemeter.detect.band_shift import not_motion

    with open_scene(path) as sc:
        s = measure_band_shift(sc, (60.0, 60.5), 180.0, TIMING4, rng=np.random.default_rng(0))
    assert s is not None
    return s, not_motion(s)


def test_bands_in_between_that_show_the_hull_on_its_way_agree(tmp_path):
    # synthetic truth: 2.0 px between the timed bands, B08 at 0.3 and B03 at 0.5 of the way
    s, why = _four(_four_band_scene(tmp_path, 2.0, 0.6, 1.0))
    assert [name for name, _, _ in s.between] == ["B08", "B03"]
    assert s.between[0][1] == pytest.approx(0.6, abs=0.2) and s.between[1][1] == pytest.approx(1.0, abs=0.2)
    assert why is None


@pytest.mark.parametrize(("b08", "b03"), [(-0.3, 2.7), (3.2, 1.0)])
def test_a_band_in_between_that_does_not_show_the_hull_on_its_way_is_not_motion(tmp_path, b08, b03):
    # synthetic: the timed bands' edges 3.7 px apart (a real case: a colour edge at a Sentinel-2 bow, B08 at -0.3
    # px) or B08 beyond the last band's edge: the edges moved for another reason than the hull's motion
    _, why = _four(_four_band_scene(tmp_path, 3.7 if b08 < 0 else 2.0, b08, b03))
    assert why is not None and "band B08" in why and "not the hull's motion" in why


def test_a_shift_too_small_to_judge_is_not_judged_by_the_bands_in_between(tmp_path):
    # synthetic: 0.4 px between the timed bands is within its own uncertainty: no share can be read from it
    _, why = _four(_four_band_scene(tmp_path, 0.4, -0.3, 0.2))
    assert why is None


def test_a_band_in_between_with_nodata_at_the_hull_leaves_the_speed_to_the_timed_bands(tmp_path):
    # synthetic: B03 has NaN nodata over the hull (a saturated or missing line of a real product); the timed
    # bands still give the speed (2.0 px in 1 s), B08 is still checked, B03 is left out (program behaviour)
    rng = np.random.default_rng(5)
    bands = [_band(x, foam=True, rng=rng, hull_px=6) for x in (0.0, 2.0, 0.6, 1.0)]
    bands[3][55:66, 50:70] = np.nan
    path = _write(tmp_path / "nodata_b03.tif", bands)
    from wakemeter.detect.band_shift import not_motion

    with rasterio.open(path, "r+") as d:
        d.nodata = float("nan")
    with open_scene(path) as sc:
        s = measure_band_shift(sc, (60.0, 60.5), 180.0, TIMING4, rng=np.random.default_rng(0))
    assert s is not None and s.along_px == pytest.approx(2.0, abs=0.2)
    assert [name for name, _, _ in s.between] == ["B08"] and not_motion(s) is None
