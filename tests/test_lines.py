"""Straight wake lines through the vessel: the ray fan, the radar narrow V and the Kelvin-arm ridges."""

import json
from dataclasses import replace

import numpy as np
import pytest

from wakemeter.detect.analysis import AnalysisRequest, analyze  # noqa: E402
from wakemeter.detect.findings import SegmentKind
from wakemeter.detect.lines import ray_fan  # noqa: E402
from wakemeter.scene.raster import open_scene  # noqa: E402
from wakemeter.synth import render, write  # noqa: E402
from wakemeter.synth.cases import make_case  # noqa: E402


def test_ray_fan_is_exact_on_a_plane():
    # Analytic check: bilinear sampling is exact for a plane, so the mean along a ray from (r0, c0) at image angle
    # phi over radii r_min..r_max-1 is a*(c0 + rbar cos phi) + b*(r0 - rbar sin phi), rbar the mean radius.
    rows, cols = np.mgrid[:200, :200].astype(float)
    a, b = 0.3, -0.7
    img = a * cols + b * rows
    valid = np.ones(img.shape, bool)
    angles = np.array([-30.0, 0.0, 17.5, 45.0])
    got = ray_fan(img, valid, (100.0, 100.0), 10.0, angles, r_min_px=5.0, r_max_px=60.0)
    rbar = np.arange(5.0, 60.0).mean()
    phi = np.radians(10.0 + angles)
    want = a * (100.0 + rbar * np.cos(phi)) + b * (100.0 - rbar * np.sin(phi))
    assert np.allclose(got, want, atol=1e-9)


def test_ray_fan_finds_a_drawn_line_and_ignores_masked_rays():
    img = np.zeros((201, 201))
    r = np.arange(0, 95)
    a = np.radians(200.0 + 12.0)
    img[np.round(100 - r * np.sin(a)).astype(int), np.round(100 + r * np.cos(a)).astype(int)] = 1.0
    valid = np.ones(img.shape, bool)
    angles = np.arange(-20.0, 20.01, 0.5)
    fan = ray_fan(img, valid, (100.0, 100.0), 200.0, angles, r_min_px=5.0, r_max_px=90.0)
    assert angles[np.nanargmax(fan)] == pytest.approx(12.0, abs=0.5)
    valid[:, :100] = False  # every ray of this fan runs into the masked half
    assert np.all(np.isnan(ray_fan(img, valid, (100.0, 100.0), 200.0, angles, r_min_px=5.0, r_max_px=90.0)))


@pytest.mark.parametrize("seed", [21, 24])
def test_radar_narrow_v_is_found_at_its_angle(tmp_path, seed):
    # Synthetic truth: the renderer draws two thin bright lines at +/- 3.0 deg from the track (radar only).
    case = make_case(seed, radar=True)
    spec = replace(case.spec, imaging=replace(case.spec.imaging, narrow_v_half_angle_deg=3.0))
    tif, sidecar = write(render(spec), tmp_path / "nv.tif")
    truth = json.loads(sidecar.read_text())["vessels"][0]
    with open_scene(tif) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=(truth["pixel_col"], truth["pixel_row"])))
    assert a.wake_found
    nv = [ln for ln in a.lines if ln.kind == "narrow-V arm"]
    assert len(nv) == 2 and {np.sign(ln.angle_from_track_deg) for ln in nv} == {-1.0, 1.0}
    assert a.narrow_v_half_angle_deg == pytest.approx(3.0, abs=0.5)
    assert all(ln.significance >= 6.0 for ln in nv)
    assert {SegmentKind.NARROW_V_LEFT, SegmentKind.NARROW_V_RIGHT} <= {s.kind for s in a.drawing.segments}
    j = a.to_json()
    assert j["narrow_v_half_angle_deg"] == pytest.approx(3.0, abs=0.5)
    assert {ln["kind"] for ln in j["lines"]} >= {"narrow-V arm"}
