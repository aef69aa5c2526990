"""Speed-only changes to the line search give the very same results: the background scored for many points at
once equals one point at a time (same arithmetic on a leading axis), and the validity lookup and the land mask's
opening and dilations equal the scipy calls they replace.  Source of the check values: none outside the
project is needed or used; the reference is the one-point-at-a-time path itself, whose results the real sweep
(benchmarks/real_sweep.py, 156 real cases) shows unchanged.  On a real Sentinel-2 crop (tests/data/sentinel2,
MIT licence), with and without a dark-line length limit, and with points whose rays leave the chip."""

from pathlib import Path

import numpy as np
import pytest

from wakemeter.detect.line_chip import prepare_line_chip
from wakemeter.detect.tuning import DEFAULT_TUNING
from wakemeter.detect.wakeline import _line_scores
from wakemeter.scene.raster import open_scene

CROP = Path(__file__).resolve().parent / "data" / "sentinel2" / "marseille_01_S2L2A_2023-08-22_wake_whole.tif"


@pytest.mark.parametrize("min_dark", [0.0, 40.0])
def test_many_points_at_once_equal_one_at_a_time(min_dark):
    t = DEFAULT_TUNING
    with open_scene(CROP) as sc:
        chip = prepare_line_chip(sc, (200.0, 193.0), tuning=t)
    img = np.where(chip.valid, chip.img, 0.0)
    rng = np.random.default_rng(0)
    wr, wc = np.nonzero(chip.valid)
    pick = rng.choice(wr.size, 37, replace=False)
    points = np.stack([wr[pick], wc[pick]], axis=1).astype(float)
    # points near the chip's edge too: rays leaving the chip
    points = np.vstack([points, [[2.0, 3.0], [chip.img.shape[0] - 2.0, 5.0]]])
    r0, r_max = t.hull_clearance_px, 0.42 * chip.img.shape[0]
    one = np.stack([_line_scores(img, chip.valid, tuple(p), r0, r_max, t=t, min_dark_px=min_dark)[0] for p in points])
    many = _line_scores(img, chip.valid, points, r0, r_max, t=t, min_dark_px=min_dark)[0]
    assert np.array_equal(one, many)


@pytest.mark.parametrize("n", [320, 17])
def test_validity_lookup_equals_scipy_nearest_sampling(n):
    # Reference library: scipy.ndimage.map_coordinates with order=0 and mode="constant" (the lookup replaces it
    # for speed).  Random points, whole and half-pixel ties, and points on and just past the edges.
    from scipy import ndimage

    from wakemeter.detect.ray_grid import nearest_valid as _nearest

    rng = np.random.default_rng(n)
    mask = rng.random((n, n)) > 0.3
    rows, cols = rng.uniform(-3, n + 3, 400_000), rng.uniform(-3, n + 3, 400_000)
    ties = rng.integers(-2, n + 2, (2, 20_000)) + 0.5 * rng.integers(0, 2, (2, 20_000))
    rows[:20_000], cols[:20_000] = ties
    rows[20_000:22_000], rows[22_000:24_000] = n - 1, n - 1 + 1e-12
    cols[24_000:26_000], cols[26_000:28_000] = -1e-12, -0.5
    want = ndimage.map_coordinates(mask.astype(np.float32), [rows, cols], order=0, mode="constant", cval=0.0) > 0.5
    assert np.array_equal(_nearest(mask, rows, cols), want)


def test_land_opening_equals_scipy_binary_opening():
    # Reference library: scipy.ndimage.binary_opening with the same diamond (OpenCV replaces it for speed), on
    # random blobs touching the edges, at the radii the land mask uses (1 to 20 pixels).
    from scipy import ndimage

    from wakemeter.detect.binary_morph import binary_opened

    rng = np.random.default_rng(4)
    for radius in (1, 2, 3, 5, 8, 13, 20):
        mask = ndimage.uniform_filter(rng.random((200, 240)), 9) > 0.5
        mask[:5], mask[:, -3:] = True, True
        disk = ndimage.iterate_structure(ndimage.generate_binary_structure(2, 1), radius)
        assert np.array_equal(binary_opened(mask, radius), ndimage.binary_opening(mask, structure=disk))


def test_dilation_and_repeated_opening_equal_scipy():
    # Reference library: scipy.ndimage.binary_dilation with its default cross, repeated, and binary_opening with
    # iterations (OpenCV replaces them for speed), on random blobs and specks touching the edges.
    from scipy import ndimage

    from wakemeter.detect.binary_morph import binary_dilated, binary_opened

    rng = np.random.default_rng(7)
    for k in (1, 2, 3, 5):
        mask = (ndimage.uniform_filter(rng.random((150, 170)), 7) > 0.55) | (rng.random((150, 170)) > 0.995)
        mask[:, :2] = True
        assert np.array_equal(binary_dilated(mask, k), ndimage.binary_dilation(mask, iterations=k))
        assert np.array_equal(binary_opened(mask, k), ndimage.binary_opening(mask, iterations=k))
    with pytest.raises(ValueError, match="at least one step"):
        binary_dilated(mask, 0)  # scipy would dilate until nothing changes: not what a gap of 0 px means


@pytest.mark.parametrize("dtype", [np.float32, np.float64])
def test_ray_fan_equals_scipy_sampling(dtype):
    # Reference library: scipy.ndimage.map_coordinates (order 1, constant mode) for the values and the nearest
    # pixel lookup that equals its order-0 sampling (above) for the validity, as wakeline._rays samples one
    # origin at a time.  Origins inside and on every edge of a chip with holes; rays leaving it.
    from wakemeter.detect.ray_grid import RayFan
    from wakemeter.detect.wakeline import _rays

    rng = np.random.default_rng(11)
    h, w = 90, 120
    img = (ndimage_smooth(rng.normal(size=(h, w))) * 300.0).astype(dtype)
    valid = rng.random((h, w)) > 0.1
    angles, r = np.arange(0.0, 360.0, 1.0), np.arange(3.0, 60.0, 1.0)
    fan = RayFan(np.where(valid, img, 0).astype(dtype), valid, angles, r)
    points = np.array([[0, 0], [h - 1, w - 1], [0, w - 1], [h - 1, 0], [45, 60], [1, 77], [88, 3]], float)
    points = np.vstack([points, np.stack([rng.integers(0, h, 40), rng.integers(0, w, 40)], 1)])
    vals, ok = fan.sample(points)
    want_vals, want_ok = _rays(np.where(valid, img, 0).astype(dtype), valid, points, angles, r)
    assert np.array_equal(ok, want_ok)
    assert ok.any() and (~ok).any()
    # to rounding: single precision's last places, or in double the origin's rounding of the fractional offset
    tol = max(4 * float(np.finfo(dtype).eps), 1e-12) * float(np.abs(img).max())
    assert np.max(np.abs(np.where(ok, vals - want_vals, 0))) <= tol
    assert vals.dtype == dtype


def ndimage_smooth(a):
    from scipy import ndimage

    return ndimage.gaussian_filter(a, 2.0)


def test_ray_fan_refuses_origins_off_whole_pixels_or_outside():
    from wakemeter.detect.ray_grid import RayFan

    fan = RayFan(
        np.zeros((20, 20), np.float32), np.ones((20, 20), bool), np.arange(0.0, 360.0, 10.0), np.arange(1.0, 8.0)
    )
    with pytest.raises(ValueError, match="whole pixels"):
        fan.sample(np.array([[3.5, 4.0]]))
    with pytest.raises(ValueError, match="within the image"):
        fan.sample(np.array([[3.0, 20.0]]))


def test_scene_lines_with_the_fan_equal_one_point_at_a_time():
    # the background's best scores from the fan (many whole-pixel origins at once) equal those sampled point by
    # point with scipy, to the rounding of the samples, on the real Sentinel-2 crop
    from wakemeter.detect.ray_grid import RayFan

    t = DEFAULT_TUNING
    with open_scene(CROP) as sc:
        chip = prepare_line_chip(sc, (200.0, 193.0), tuning=t)
    img = np.where(chip.valid, chip.img, 0.0)
    wr, wc = np.nonzero(chip.valid)
    pick = np.random.default_rng(3).choice(wr.size, 32, replace=False)
    points = np.stack([wr[pick], wc[pick]], axis=1).astype(float)
    r0, r_max = t.hull_clearance_px, 0.42 * chip.img.shape[0]
    fan = RayFan(img, chip.valid, np.arange(0.0, 360.0, 1.0), np.arange(r0, r_max, 1.0))
    plain = _line_scores(img, chip.valid, points, r0, r_max, t=t, min_dark_px=40.0)
    fast = _line_scores(img, chip.valid, points, r0, r_max, t=t, min_dark_px=40.0, fan=fan)
    # (the background uses the best scores only: which of two directions scoring alike to the rounding is the
    # best does not matter to it)
    assert np.isfinite(plain[0]).any()
    assert np.allclose(fast[0], plain[0], rtol=1e-5, atol=1e-5, equal_nan=True)
