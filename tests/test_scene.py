"""Scenes: opening, reading at zoom, pyramids, display helpers, the info/quicklook commands,
and clean errors for bad files.  Reference values come from numpy / scikit-image and
rasterio itself; scenes are synthetic."""

import json
import os
from pathlib import Path

import numpy as np
import pytest
import rasterio
from affine import Affine
from rasterio.enums import Resampling
from skimage.transform import downscale_local_mean

from wakemeter.cli import main
from wakemeter.errors import CancelledError, GeoreferenceError, ParameterError, SceneReadError, WakemeterError
from wakemeter.scene import display, pyramid, raster
from wakemeter.scene.raster import open_scene

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "sample_scenes" / "harbour_approach_optical.tif"


UTM_2M = Affine(2, 0, 500_000, 0, -2, 6_000_000)


def _write(path, data, *, crs="EPSG:32631", transform=UTM_2M, **kw):
    data = np.asarray(data)
    if data.ndim == 2:
        data = data[None]
    prof = {
        "driver": "GTiff",
        "width": data.shape[2],
        "height": data.shape[1],
        "count": data.shape[0],
        "dtype": data.dtype.name,
        "crs": crs,
        "transform": transform,
        **kw,
    }
    with rasterio.open(path, "w", **prof) as dst:
        dst.write(data)
    return Path(path)


def test_open_demo_scene_metadata():
    with open_scene(DEMO) as sc:
        i = sc.info
        assert (i.width, i.height, i.count, i.dtype) == (1024, 1024, 1, "uint8")
        assert i.crs == "EPSG:32625" and i.georeferenced
        assert i.acquisition_time == "2026-06-14T10:32:05Z"
        f = sc.local_frame()
        assert f.m_per_col == pytest.approx(2.0, rel=1e-6)
        import hashlib

        assert sc.sha256() == hashlib.sha256(DEMO.read_bytes()).hexdigest()


def test_window_and_zoomed_reads_match_reference(tmp_path):
    # Reference library: scikit-image downscale_local_mean for an average-resampled zoomed-out read.
    rng = np.random.default_rng(0)
    a = rng.integers(0, 4000, (1, 256, 384)).astype(np.uint16)
    p = _write(tmp_path / "a.tif", a)
    with open_scene(p) as sc:
        d, v = sc.read(window=(10, 20, 30, 40))
        assert np.array_equal(d[0], a[0, 20:60, 10:40]) and v.all()
        z, _ = sc.read(out_shape=(64, 96))
        assert np.allclose(z[0], downscale_local_mean(a[0].astype(float), (4, 4)), atol=0.51)
        with pytest.raises(ParameterError, match="outside"):
            sc.read(window=(500, 500, 10, 10))
        with pytest.raises(ParameterError, match="bands"):
            sc.read(bands=(2,))


def test_nodata_and_nan_are_invalid(tmp_path):
    a = np.ones((20, 20), np.float32)
    a[0, 0] = -9999
    a[1, 1] = np.nan
    with open_scene(_write(tmp_path / "n.tif", a, nodata=-9999)) as sc:
        d, v = sc.read()
        assert not v[0, 0, 0] and not v[0, 1, 1] and v.sum() == 398


def test_reads_without_a_mask_keep_nan_invalid_and_match_rasterio(tmp_path):
    # A file with no nodata is read without a GDAL mask (speed only): NaN in a float band is still invalid,
    # and the pixels are the reference library's (rasterio's own read of the same window).
    a = np.ones((2, 20, 20), np.float32)
    a[1, 3, 4] = np.nan
    with open_scene(_write(tmp_path / "f.tif", a)) as sc:
        d, v = sc.read(window=(2, 2, 10, 10))
        assert not v[1, 1, 2] and v.sum() == 2 * 100 - 1
    b = np.random.default_rng(3).integers(0, 60000, (3, 30, 40)).astype(np.uint16)
    p = _write(tmp_path / "u.tif", b)
    with open_scene(p) as sc, rasterio.open(p) as ref:
        d, v = sc.read(window=(5, 6, 20, 10), bands=(3, 1))
        want = ref.read([3, 1], window=rasterio.windows.Window(5, 6, 20, 10)).astype(np.float32)
        assert v.all() and np.array_equal(d, want)


def test_internal_overviews_are_reported_and_used(tmp_path):
    rng = np.random.default_rng(1)
    a = rng.random((512, 512)).astype(np.float32)
    p = _write(tmp_path / "o.tif", a, tiled=True, blockxsize=256, blockysize=256)
    with rasterio.open(p, "r+") as ds:
        ds.build_overviews([2, 4], Resampling.average)
    with open_scene(p) as sc:
        assert sc.info.overview_factors == (2, 4)
        assert not pyramid.needs_pyramid(sc)
        z, _ = sc.read(out_shape=(128, 128))
        assert np.allclose(z[0], downscale_local_mean(a.astype(float), (4, 4)), atol=1e-5)


def test_pyramid_built_in_cache_with_progress_and_cancel(tmp_path, monkeypatch):
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))
    rng = np.random.default_rng(2)
    a = rng.integers(0, 255, (4608, 4352)).astype(np.uint8)
    p = _write(tmp_path / "big.tif", a, tiled=True, blockxsize=256, blockysize=256, compress="deflate")
    with open_scene(p) as sc:
        assert pyramid.needs_pyramid(sc)
        calls = {"n": 0}

        def cancel_soon():
            calls["n"] += 1
            return calls["n"] > 3

        with pytest.raises(CancelledError):
            pyramid.ensure_pyramid(sc, cancelled=cancel_soon)
        assert not list((tmp_path / "cache").rglob("*.part"))
        seen = []
        levels = pyramid.ensure_pyramid(sc, progress=seen.append)
        assert [f for f, _ in levels] == [4, 16] and seen[-1] == pytest.approx(1.0)
        assert all(np.diff(seen) >= 0)
        assert all(str(path).startswith(str(tmp_path / "cache")) for _, path in levels)
        assert sorted(x.name for x in tmp_path.iterdir()) == ["big.tif", "cache"]  # nothing beside the data
        z, _ = sc.read(window=(0, 0, 4096, 4096), out_shape=(256, 256))
        ref = downscale_local_mean(a[:4096, :4096].astype(float), (16, 16))
        assert np.allclose(z[0], ref, atol=0.6)


def test_ungeoreferenced_png_opens_with_flag(tmp_path):
    import cv2

    img = (np.arange(64 * 48) % 251).reshape(48, 64).astype(np.uint8)
    p = tmp_path / "plain.png"
    cv2.imwrite(str(p), img)
    with open_scene(p) as sc:
        assert not sc.info.georeferenced and "calibrate" in sc.info.georeference_note
        with pytest.raises(GeoreferenceError, match="no georeference"):
            sc.local_frame()
        d, _ = sc.read()
        assert np.array_equal(d[0], img)
        from wakemeter.scene import geodesy

        sc.calibrate(geodesy.calibrated_frame(pixel_size_m=geodesy.pixel_size_from_two_points((0, 0), (0, 40), 20.0)))
        f = sc.local_frame(3, 3)
        assert f.m_per_col == 0.5 and not f.north_known
        assert f.length_of(10, 0) == pytest.approx(5.0)


def test_engineering_crs_is_flagged_not_crashing(tmp_path):
    p = _write(
        tmp_path / "local.tif",
        np.zeros((8, 8), np.uint8),
        crs='LOCAL_CS["site grid",LOCAL_DATUM["none",0],UNIT["metre",1],AXIS["X",EAST],AXIS["Y",NORTH]]',
    )
    with open_scene(p) as sc:
        assert not sc.info.georeferenced and "unusable" in sc.info.georeference_note


def test_errors_name_the_file(tmp_path, monkeypatch):
    with pytest.raises(SceneReadError, match="no such file"):
        open_scene(tmp_path / "missing.tif")
    with pytest.raises(SceneReadError, match="folder"):
        open_scene(tmp_path)
    (tmp_path / "empty.tif").write_bytes(b"")
    with pytest.raises(SceneReadError, match="empty"):
        open_scene(tmp_path / "empty.tif")
    (tmp_path / "notes.tif").write_text("this is not an image\n" * 20)
    with pytest.raises(SceneReadError, match="notes.tif"):
        open_scene(tmp_path / "notes.tif")
    ok = _write(tmp_path / "ok.tif", np.zeros((8, 8), np.uint8))
    monkeypatch.setattr(os, "access", lambda *a, **k: False)
    with pytest.raises(SceneReadError, match="permission denied"):
        open_scene(ok)
    monkeypatch.undo()
    monkeypatch.setattr(raster, "MAX_FULL_READ_BYTES", 100)
    with open_scene(ok) as sc, pytest.raises(SceneReadError, match="too large"):
        sc.read_full()
    assert issubclass(SceneReadError, OSError) and issubclass(SceneReadError, WakemeterError)


def test_fuzz_truncated_and_bit_flipped_geotiffs(tmp_path):
    # Robustness: every damaged file either reads or raises SceneReadError - never another exception.
    rng = np.random.default_rng(3)
    a = rng.integers(0, 4000, (2, 96, 128)).astype(np.uint16)
    good = _write(tmp_path / "good.tif", a, tiled=True, blockxsize=32, blockysize=32, compress="deflate").read_bytes()
    cases = [good[:n] for n in sorted(set(np.linspace(8, len(good) - 1, 40).astype(int)))]
    for _ in range(80):
        b = bytearray(good)
        for pos in rng.integers(0, len(b), rng.integers(1, 6)):
            b[pos] ^= 1 << int(rng.integers(0, 8))
        cases.append(bytes(b))
    outcomes = {"read": 0, "error": 0}
    for k, blob in enumerate(cases):
        p = tmp_path / f"case{k}.tif"
        p.write_bytes(blob)
        try:
            with open_scene(p) as sc:
                sc.read(out_shape=(min(sc.height, 64), min(sc.width, 64)))
            outcomes["read"] += 1
        except SceneReadError:
            outcomes["error"] += 1
    assert outcomes["error"] >= 30  # truncations must be caught
    assert sum(outcomes.values()) == len(cases)


def test_display_helpers():
    # Reference: numpy percentiles; 10 log10 for dB.
    a = np.linspace(0, 100, 101, dtype=np.float32).reshape(1, 101)
    s = display.percentile_stretch(a, low=10, high=90)
    assert s[0, 10] == pytest.approx(0.0) and s[0, 90] == pytest.approx(1.0) and s[0, 50] == pytest.approx(0.5)
    g = display.percentile_stretch(a, low=0, high=100, gamma=2.0)
    assert g[0, 25] == pytest.approx(0.5, abs=1e-6)
    assert display.to_db(np.array([1.0, 0.1, 100.0])) == pytest.approx([0.0, -10.0, 20.0])
    rgb = display.composite(np.stack([a, a * 2, a * 3]), rgb=(2, 1, 0))
    assert rgb.shape == (1, 101, 3)
    with pytest.raises(ParameterError, match="gamma"):
        display.percentile_stretch(a, gamma=0)
    assert np.isnan(display.percentile_stretch(np.full((2, 2), np.nan))).all()


def test_info_and_quicklook_commands(tmp_path, capsys):
    assert main(["info", str(DEMO), "--json"]) == 0
    s = json.loads(capsys.readouterr().out)
    assert s["width"] == 1024 and s["crs"] == "EPSG:32625" and s["georeferenced"]
    assert s["pixel_size_m"]["along_rows"] == pytest.approx(2.0, rel=1e-6)
    assert s["bounds_wgs84"]["west"] < -35.0 < s["bounds_wgs84"]["east"] or s["bounds_wgs84"]["west"] < -34.99
    assert s["overviews"] == []
    out = tmp_path / "q.png"
    assert (
        main(
            ["quicklook", str(ROOT / "sample_scenes" / "outer_roads_radar.tif"), "--out", str(out), "--max-size", "200"]
        )
        == 0
    )
    import cv2

    q = cv2.imread(str(out), cv2.IMREAD_UNCHANGED)
    assert q.shape == (200, 200) and q.std() > 10
    assert main(["info", str(tmp_path / "nope.tif")]) == 2
    assert "no such file" in capsys.readouterr().err
    assert main(["quicklook", str(DEMO), "--out", str(tmp_path / "missing" / "q.png")]) == 2


@pytest.mark.parametrize("looks", [1, 3, 6, 10])
def test_multilook_speckle_is_recognised_as_radar(looks):
    # Multi-look intensity speckle is gamma distributed with shape L (Goodman 1976, from memory): its mean is
    # barely above its median at 6-10 looks, so the mean/median rule alone misses it; the local
    # spread-grows-with-mean rule must catch it.  Float reflectance with additive noise must not pass.
    from wakemeter.scene.display import looks_like_radar

    rng = np.random.default_rng(looks)
    texture = 1.0 + 0.3 * np.sin(np.arange(100_000) / 40.0)
    speckle = rng.gamma(looks, 1.0 / looks, 100_000) * 0.05 * texture
    assert looks_like_radar("float32", 1, speckle.astype(np.float32))
    reflectance = 0.35 + 0.05 * np.sin(np.arange(100_000) / 7.0) + rng.normal(0, 0.02, 100_000)
    assert not looks_like_radar("float32", 1, reflectance.astype(np.float32))
    assert not looks_like_radar("float32", 1, (10 * np.log10(speckle)).astype(np.float32))  # dB: negative values
    assert not looks_like_radar("uint16", 1, (speckle * 1000).astype(np.uint16))


def test_radar_in_decibels_is_recognised_and_analysed(tmp_path):
    # The radar demo converted to dB (10 log10, as many products deliver it) must give the same analysis as the
    # linear original: same speed within 1 %.  Optical-looking float data (reflectance) is not taken for dB radar.
    import json

    import rasterio

    from wakemeter.detect.analysis import AnalysisRequest, analyze
    from wakemeter.scene.display import looks_like_radar_db
    from wakemeter.scene.raster import open_scene

    root = Path(__file__).resolve().parents[1] / "sample_scenes"
    src = root / "outer_roads_radar.tif"
    with rasterio.open(src) as ds:
        profile, lin = ds.profile, ds.read(1)
    profile.update(dtype="float32", nodata=None)
    db_path = tmp_path / "radar_db.tif"
    with rasterio.open(db_path, "w", **profile) as dst:
        dst.write((10 * np.log10(np.maximum(lin, 1e-6))).astype(np.float32)[None])
    truth = json.loads((root / "outer_roads_radar.truth.json").read_text())["vessels"][0]
    pos = (truth["hull_pixel_col"], truth["hull_pixel_row"])
    with open_scene(src) as a_sc, open_scene(db_path) as b_sc:
        a, b = analyze(a_sc, AnalysisRequest(vessel_px=pos)), analyze(b_sc, AnalysisRequest(vessel_px=pos))
    assert a.wake_found and b.wake_found
    assert b.speed.speed_mps == pytest.approx(a.speed.speed_mps, rel=0.01)
    from wakemeter.detect.prepare import prepare_chip

    with open_scene(db_path) as b_sc:
        chip = prepare_chip(b_sc, pos, size_px=256)
    assert chip.radar  # radar-only steps (narrow V, displaced hull) stay on for data in dB
    rng = np.random.default_rng(0)
    assert not looks_like_radar_db("float32", 1, (0.35 + rng.normal(0, 0.02, 10_000)).astype(np.float32))


def test_one_pass_cache_sets_gdal_cache_in_megabytes_and_puts_it_back():
    # GDAL_CACHEMAX given to GDALSetCacheMax is in bytes (GDAL documentation, GDALSetCacheMax); a pass over a
    # whole scene runs with a small cache, and the program's own comes back afterwards, also after an error
    from rasterio.env import get_gdal_config

    from wakemeter.scene.raster import one_pass_cache

    before = get_gdal_config("GDAL_CACHEMAX")
    with one_pass_cache(48):
        assert get_gdal_config("GDAL_CACHEMAX") == 48 * 1024 * 1024
    assert get_gdal_config("GDAL_CACHEMAX") == before
    with pytest.raises(RuntimeError), one_pass_cache(16):
        raise RuntimeError("a reading error")
    assert get_gdal_config("GDAL_CACHEMAX") == before
