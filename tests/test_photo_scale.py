"""Photographs that say their own scale: pixel size from EXIF and drone XMP (scene.photo_scale).

Check values: the pinhole camera, one pixel covering H x pitch / f on a plane at distance H straight ahead
(Hartley & Zisserman 2003, Multiple View Geometry, sec. 6.1; from memory); the 35 mm equivalent focal length
defined over the 43.27 mm diagonal of the 36 x 24 mm frame (CIPA DC-008 / Exif 2.32, FocalLengthIn35mmFilm;
from memory).  The wake scene is the demo's (sample_scenes/harbour_approach_optical.truth.json: 14.0 kn at
2.00 m pixels).
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest
import rasterio
from PIL import Image

from wakemeter.cli import main
from wakemeter.scene.raster import open_scene
from wakemeter.synth.photo import drone_exif, drone_xmp

ROOT = Path(__file__).resolve().parents[1]
SCENE = ROOT / "sample_scenes" / "harbour_approach_optical.tif"
TRUTH = json.loads((ROOT / "sample_scenes" / "harbour_approach_optical.truth.json").read_text())["vessels"][0]


def _photo(
    path: Path,
    img: Image.Image,
    *,
    height: float,
    pitch: float = -90.0,
    yaw: float | None = 120.0,
    focal: float | None = 8.8,
    pitch_mm: float | None = 0.00241,
    f35: float | None = None,
) -> Path:
    img.save(path, quality=100, exif=drone_exif(focal, pitch_mm, f35), xmp=drone_xmp(height, pitch, yaw))
    return path


def test_a_nadir_drone_photo_is_calibrated_from_its_lens_and_height(tmp_path):
    p = _photo(tmp_path / "dji.jpg", Image.new("L", (400, 300), 90), height=50.0)
    with open_scene(p) as sc:
        f = sc.local_frame()
    assert f.m_per_col == pytest.approx(50.0 * 0.00241 / 8.8, rel=1e-6)  # pinhole: H pitch / f
    assert f.bearing_up_deg == pytest.approx(120.0) and f.north_known
    # the height, focal length and the scale's change across the frame for the gimbal's 0.5° (2 tan t tan a)
    across = 2 * math.tan(math.radians(0.5)) * 0.5 * 500 * 0.00241 / 8.8
    assert f.scale_rel_std == pytest.approx(math.hypot(math.hypot(0.5, 1.0) / 50.0, 0.02, 0.01, across))
    assert "RelativeAltitude" in f.source and "straight down" in f.source
    assert f.bearing_std_deg == 3.0  # the drone's compass (common practice, no source)


def test_a_slightly_tilted_camera_carries_the_scale_change_across_its_frame(tmp_path):
    # a pinhole camera tilted by t sees the water at field angle a with a ground pixel H p cos^2 a / (f cos^2(a+t))
    # long (plane geometry of a central projection; Hartley & Zisserman 2004, Multiple View Geometry, 8.1, from
    # memory): at the corner of a 4000 x 3000 frame behind an 8.8 mm lens with 2.41 um pixels and a 4° tilt the
    # pixel is 10 % longer than at the centre; the stated uncertainty covers that
    p = _photo(tmp_path / "tilt.jpg", Image.new("L", (4000, 3000), 90), height=60.0, pitch=-86.0)
    with open_scene(p) as sc:
        f = sc.local_frame()
    a, t = math.atan(0.5 * 5000 * 0.00241 / 8.8), math.radians(4.0)
    corner = (math.cos(a) ** 2 / math.cos(a + t) ** 2) * math.cos(t) ** 2 - 1
    assert 0.09 < corner < 0.11
    assert corner <= f.scale_rel_std < 1.6 * corner


def test_the_35mm_equivalent_gives_the_scale_over_the_diagonal(tmp_path):
    p = _photo(tmp_path / "f35.jpg", Image.new("L", (4000, 3000), 90), height=50.0, focal=4.5, pitch_mm=None, f35=24)
    with open_scene(p) as sc:
        assert sc.local_frame().m_per_col == pytest.approx(50.0 * math.hypot(36, 24) / (24 * 5000.0), rel=1e-6)


def test_a_tilted_camera_is_not_calibrated_and_says_why(tmp_path, capsys):
    p = _photo(tmp_path / "oblique.jpg", Image.new("L", (400, 300), 90), height=50.0, pitch=-60.0)
    with open_scene(p) as sc:
        assert sc.calibration is None and "tilted 30.0°" in sc.photo_note
    assert main(["analyze", str(p), "--vessel-px", "200,150"]) == 2
    err = capsys.readouterr().err
    assert "--pixel-size" in err and "tilted 30.0°" in err


def test_a_photo_of_a_wake_gives_the_speed_and_says_where_its_scale_comes_from(tmp_path, capsys):
    # the demo scene as a photo whose metadata says 2.00 m per pixel (H = 2.00 x 8.8 / 0.00241 m: an aircraft)
    with rasterio.open(SCENE) as ds:
        img = Image.fromarray(ds.read(1))
    p = _photo(tmp_path / "survey.jpg", img, height=2.0 * 8.8 / 0.00241, yaw=0.0)
    px = f"{TRUTH['pixel_col']:.0f},{TRUTH['pixel_row']:.0f}"
    assert main(["analyze", str(p), "--vessel-px", px, "--json"]) == 0
    r = json.loads(capsys.readouterr().out)
    lo, hi = r["speed_ci95_knots"]
    assert lo <= 14.0 <= hi
    assert any("the photo's own metadata" in c["text"] for c in r["cautions"])
    assert main(["analyze", str(p), "--vessel-px", px, "--pixel-size", "2.0", "--json"]) == 0  # an override
    assert not any("photo's own" in c["text"] for c in json.loads(capsys.readouterr().out)["cautions"])


@pytest.mark.parametrize("offset", ["+02:00", None])
def test_a_photo_says_when_it_was_taken_with_its_zone_or_only_its_date(tmp_path, offset):
    # EXIF DateTimeOriginal is the camera's local clock; OffsetTimeOriginal (Exif 2.31, CIPA DC-008) its offset
    # from UTC: with it the position reports are compared at 10:32:05 UTC, without it only the date is known
    import datetime as dt

    from wakemeter.errors import ParameterError
    from wakemeter.positions.match import scene_time

    exif = drone_exif(8.8, 0.00241)
    sub = exif.get_ifd(0x8769)
    sub[0x9003] = "2026:06:14 12:32:05"
    if offset:
        sub[0x9011] = offset
    p = tmp_path / "taken.jpg"
    Image.new("L", (300, 200), 90).save(p, exif=exif, xmp=drone_xmp(50.0, -90.0, 10.0))
    with open_scene(p) as sc:
        when, source = sc.info.acquisition_time, sc.info.tags["ACQUISITION_TIME_SOURCE"]
    if offset:
        assert scene_time(when, None) == dt.datetime(2026, 6, 14, 10, 32, 5, tzinfo=dt.UTC)
        assert "OffsetTimeOriginal" in source
    else:
        assert when == "2026-06-14" and "a date only" in source
        with pytest.raises(ParameterError, match="only its date"):
            scene_time(when, None)
