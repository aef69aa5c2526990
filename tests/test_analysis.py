"""Wake analysis on synthetic scenes of known truth (wakemeter's own renderer, seeds different
from the demo scenes and from the calibration seeds 0-59 used to set the uncertainty scale).

Goals from the issue: speed within 3 %, heading within 2 deg, 95 % intervals covering the truth
about 95 % of the time, the right depth regime, no wake on wake-free scenes.
"""

import json
from pathlib import Path

import pytest
from scipy import stats

from wakemeter.cli import main  # noqa: E402
from wakemeter.detect.analysis import AnalysisRequest, RadarGeometry, analyze  # noqa: E402
from wakemeter.detect.findings import CautionCode, SegmentKind
from wakemeter.errors import ParameterError  # noqa: E402
from wakemeter.physics.inversion import Uncertain
from wakemeter.scene.raster import open_scene  # noqa: E402
from wakemeter.synth.cases import make_case, write_case  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]
SEEDS = range(300, 316)


@pytest.fixture(scope="module")
def sweep(tmp_path_factory):
    folder = tmp_path_factory.mktemp("cases")
    rows = []
    for seed in SEEDS:
        case = make_case(seed)
        tif, sidecar = write_case(case, folder)
        truth = json.loads(sidecar.read_text())["vessels"][0]
        with open_scene(tif) as sc:
            a = analyze(sc, AnalysisRequest(vessel_px=(truth["pixel_col"] + 1.5, truth["pixel_row"] - 1.0)))
        rows.append((case, a))
    return rows


def test_speed_heading_and_intervals_on_random_scenes(sweep):
    # Synthetic truth.  Speeds 2-15 m/s, pixels 0.5-10 m, optical and radar, with and without swell.
    found = [(c, a) for c, a in sweep if a.wake_found]
    assert len(found) >= 12  # weak radar wakes may stay undetected: "no wake" is allowed, a wrong speed is not
    for case, a in found:
        assert a.speed.speed_mps == pytest.approx(case.speed_mps, rel=0.03), case.seed
        dh = (a.heading_deg - case.heading_deg + 180) % 360 - 180
        assert abs(dh) <= 2.0, (case.seed, dh)
        assert a.regime.regime in ("deep", "unknown")  # never a depth effect that is not there
    covered = sum(a.speed.ci95_low_mps <= c.speed_mps <= a.speed.ci95_high_mps for c, a in found)
    # binomial: with p = 0.95 and n ~ 13-16, fewer than n - 3 covered has probability < 1 %
    assert covered >= len(found) - 3


def test_wake_lines_on_random_scenes(sweep):
    # The renderer draws no narrow V in these scenes: none may be reported.  The Kelvin-arm lines are ridges of
    # wave energy, at or inside the Kelvin wedge edge (19.47 deg, Kelvin 1887; radar tilt and optical shading
    # favour some wave directions, so the ridge can lie inside it) and never on the track.
    found = [a for _, a in sweep if a.wake_found]
    assert not [ln for a in found for ln in a.lines if ln.kind == "narrow-V arm"]
    with_arm = [a for a in found if any(ln.kind == "Kelvin arm" for ln in a.lines)]
    # the arm rate measured on seeds 300-359: 51 of 60 (0.85), the same before and after the renderer's
    # half-pixel fix; fewer arms than the binomial 1 % quantile at that rate would be a real loss, a couple of
    # cases either way is chance (16 seeds gave 13 then 12)
    assert len(with_arm) >= stats.binom.ppf(0.01, len(found), 0.85)
    for a in with_arm:
        for ln in a.lines:
            if ln.kind == "Kelvin arm":
                assert 8.0 < abs(ln.angle_from_track_deg) <= 25.0 and ln.significance >= 6.0
    # the renderer darkens the turbulent wake in radar: where it is reported, it runs along the track
    for a in found:
        for ln in a.lines:
            if ln.kind.startswith("turbulent wake"):
                assert abs(ln.angle_from_track_deg) <= 3.0


def test_json_fields(sweep):
    case, a = next((c, a) for c, a in sweep if a.wake_found)
    j = a.to_json()
    for key in (
        "wake_found",
        "speed_mps",
        "speed_knots",
        "speed_ci95_mps",
        "heading_deg",
        "half_angle_deg",
        "transverse_wavelength_m",
        "regime",
        "depth_m",
        "depth_ci95_m",
        "methods",
        "vessel_px",
        "cautions",
    ):
        assert key in j
    assert j["regime"] in ("deep", "finite-depth", "near-critical", "supercritical", "unknown")
    assert 0 <= j["heading_deg"] < 360
    assert j["wake_bearing_deg"] == pytest.approx((j["heading_deg"] + 180) % 360)  # the wake lies behind
    assert "false-alarm rate below" in j["decision"]
    assert j["speed_knots"] == pytest.approx(j["speed_mps"] / 0.5144444, rel=1e-5)
    assert all({"name", "speed_mps", "speed_ci95_mps"} <= set(m) for m in j["methods"])
    assert j["cautions"][0]["code"] == "estimate" and "licensed" in j["cautions"][0]["text"]
    json.dumps(j)  # plain data


def test_shallow_demo_scene_regime_and_depth():
    # Synthetic truth (sample_scenes/tallow_shoal_shallow.truth.json): 6.379 m/s, 318 deg, depth 5 m,
    # Fr_h = 0.91, half-angle 36.6 deg (Havelock 1908).
    with open_scene(ROOT / "sample_scenes" / "tallow_shoal_shallow.tif") as sc:
        a = analyze(sc, AnalysisRequest(vessel_lonlat=(-34.95, 36.03)))
    assert a.wake_found
    assert a.speed.speed_mps == pytest.approx(6.379, rel=0.03)
    assert a.regime.regime in ("finite depth", "near-critical")
    assert a.depth_m == pytest.approx(5.0, rel=0.15)
    assert a.depth_ci95_m[0] <= 5.0 <= a.depth_ci95_m[1]
    assert a.half_angle_deg == pytest.approx(36.6, abs=3.0)


def test_given_depth_is_used():
    # Synthetic truth as above; with the depth given the speed must still be right and the regime
    # follows Fr_h = U / sqrt(g h) = 0.91.
    with open_scene(ROOT / "sample_scenes" / "tallow_shoal_shallow.tif") as sc:
        a = analyze(sc, AnalysisRequest(vessel_lonlat=(-34.95, 36.03), depth=Uncertain(5.0, 0.2)))
    assert a.speed.speed_mps == pytest.approx(6.379, rel=0.03)
    assert a.regime.regime == "near-critical" and a.regime.froude_depth == pytest.approx(0.91, abs=0.04)


def test_radar_offset_method_on_demo():
    # Synthetic truth (outer_roads_radar.truth.json): 9.003 m/s, hull displaced 143.8 m in azimuth off its
    # wake (Raney 1971: dx = -(R/V) v_r, R = 850 km, V = 7.5 km/s).  The user clicks the bright hull.
    truth = json.loads((ROOT / "sample_scenes" / "outer_roads_radar.truth.json").read_text())["vessels"][0]
    with open_scene(ROOT / "sample_scenes" / "outer_roads_radar.tif") as sc:
        a = analyze(
            sc,
            AnalysisRequest(
                vessel_px=(truth["hull_pixel_col"] + 1, truth["hull_pixel_row"] - 1),
                radar_geometry=RadarGeometry(850_000.0, 7_500.0, 100.0, 33.0),
            ),
        )
    assert a.wake_found and a.speed.speed_mps == pytest.approx(9.003, rel=0.03)
    radar = [m for m in a.methods if m.method == "radar azimuth offset"]
    assert radar, a.cautions
    assert radar[0].ci95_low_mps <= 9.003 <= radar[0].ci95_high_mps
    assert radar[0].speed_mps == pytest.approx(9.003, rel=0.1)
    assert a.speed.consistent


def test_no_wake_on_calm_demo_scene():
    with open_scene(ROOT / "sample_scenes" / "calm_no_wake.tif") as sc:
        for pos in ((384, 384), (150, 600)):
            a = analyze(sc, AnalysisRequest(vessel_px=pos))
            assert not a.wake_found and a.speed is None and a.methods == ()
            assert a.to_json()["speed_mps"] is None


def test_analyze_command(capsys):
    scene = str(ROOT / "sample_scenes" / "harbour_approach_optical.tif")
    assert main(["analyze", scene, "--vessel", "-35.0,36.0", "--json"]) == 0
    j = json.loads(capsys.readouterr().out)
    assert j["wake_found"] and j["speed_mps"] == pytest.approx(7.202, rel=0.03)
    assert j["heading_deg"] == pytest.approx(62.0, abs=2.0)
    assert main(["analyze", scene, "--vessel", "-35.0,36.0"]) == 0  # as the README writes it
    out = capsys.readouterr().out
    assert "kn" in out and "95 % interval" in out and "licensed" in out
    assert main(["analyze", scene]) == 2
    assert "--vessel" in capsys.readouterr().err
    assert main(["analyze", scene, "--vessel", "12"]) == 2
    assert "needs 2 numbers" in capsys.readouterr().err
    assert main(["analyze", scene, "--vessel", "-35.0,36.0", "--depth", "-3"]) == 2
    assert "--depth must be > 0 m" in capsys.readouterr().err  # in the words the user typed
    assert main(["analyze", scene, "--vessel", "-35.0,36.0", "--radar-geometry", "0,0,0,0"]) == 2
    assert "slant range must be > 0" in capsys.readouterr().err


def test_bad_positions():
    with open_scene(ROOT / "sample_scenes" / "harbour_approach_optical.tif") as sc:
        with pytest.raises(ParameterError, match="outside the scene"):
            analyze(sc, AnalysisRequest(vessel_px=(5000.0, 10.0)))
        with pytest.raises(ParameterError, match="position once"):
            analyze(sc, AnalysisRequest())
        # a vessel in the scene's corner: the area is shrunk to what the scene holds instead of refused (issue 13);
        # there is no vessel there, so no wake, and the decision says the spectrum had too little water
        corner = analyze(sc, AnalysisRequest(vessel_px=(0.5, 0.5)))
        assert not corner.wake_found and corner.speed is None
        assert "too little open water" in corner.decision


@pytest.mark.parametrize("seed", range(430, 436))
def test_finite_depth_scenes_with_known_depth(tmp_path, seed):
    # Synthetic truth at depth Froude number 0.88 (Havelock half-angle 31 deg, transverse waves ~35 %
    # longer than in deep water).  With the depth given (5 % uncertainty) the finite-depth dispersion
    # curve is fitted: speed within 3 %, interval covering the truth, regime finite depth / near-critical.
    case = make_case(seed, depth_froude=0.88)
    tif, sidecar = write_case(case, tmp_path)
    truth = json.loads(sidecar.read_text())["vessels"][0]
    with open_scene(tif) as sc:
        a = analyze(
            sc,
            AnalysisRequest(
                vessel_px=(truth["pixel_col"], truth["pixel_row"]), depth=Uncertain(case.depth_m, 0.05 * case.depth_m)
            ),
        )
    if not a.wake_found:
        pytest.xfail("weak radar wake not detected (allowed: no speed rather than a wrong one)")
    assert a.speed.speed_mps == pytest.approx(case.speed_mps, rel=0.03)
    assert a.speed.ci95_low_mps <= case.speed_mps <= a.speed.ci95_high_mps
    assert a.regime.regime in ("finite depth", "near-critical")


@pytest.fixture(scope="module")
def shallow_sweep(tmp_path_factory):
    folder = tmp_path_factory.mktemp("shallow")
    rows = []
    for seed in range(440, 448):
        case = make_case(seed, depth_froude=0.88)
        tif, sidecar = write_case(case, folder)
        truth = json.loads(sidecar.read_text())["vessels"][0]
        with open_scene(tif) as sc:
            rows.append((case, analyze(sc, AnalysisRequest(vessel_px=(truth["pixel_col"], truth["pixel_row"])))))
    return rows


def test_finite_depth_found_without_the_depth(shallow_sweep):
    # Synthetic truth at Fr_h 0.88 (Havelock 1908: half-angle 31 deg, transverse waves ~35 % longer than in
    # deep water, so a deep-water fit would read ~15 % high).  No depth given: the program must see the depth
    # effect (regime finite depth / near-critical, speed within 3 %, depth within 25 %) or say it cannot tell
    # (regime unknown, with an interval wide enough to hold the truth).  Seeds differ from the calibration
    # seeds 420-431.
    found = [(c, a) for c, a in shallow_sweep if a.wake_found]
    assert len(found) >= 6
    depth_seen = [(c, a) for c, a in found if a.regime.regime in ("finite depth", "near-critical")]
    assert len(depth_seen) >= len(found) - 2
    for case, a in found:
        assert a.regime.regime != "deep", case.seed  # never deep water when the pattern is shaped by depth
    for case, a in depth_seen:
        assert a.speed.speed_mps == pytest.approx(case.speed_mps, rel=0.03), case.seed
        assert a.depth_m == pytest.approx(case.depth_m, rel=0.25), case.seed
        assert a.has_caution(CautionCode.DEPTH_FITTED)
    covered = sum(a.speed.ci95_low_mps <= c.speed_mps <= a.speed.ci95_high_mps for c, a in found)
    assert covered >= len(found) - 1


def test_deep_regime_rules_out_shallow_water_explicitly(sweep):
    # A "deep" verdict without a given depth must say what was ruled out; "unknown" must say what was not.
    for _case, a in sweep:
        if a.wake_found and a.regime.regime == "deep":
            assert "fits clearly worse" in a.regime.explanation
        elif a.wake_found and a.regime.regime == "unknown":
            assert "cannot tell deep water" in a.regime.explanation


@pytest.mark.parametrize("seed,froude", [(490, 1.3), (491, 1.5), (492, 1.3), (493, 1.5)])
def test_supercritical_vessel_without_the_depth(tmp_path, seed, froude):
    # Synthetic truth above the critical speed (Havelock 1908: no transverse waves; half-angle arcsin(1/Fr_h),
    # 50.3 deg at 1.3, 41.8 deg at 1.5).  The deep-water curve cannot fit such a pattern; the supercritical
    # curve gives speed and depth.  Detection may decline (a weak wake), but a reported speed must hold.
    case = make_case(seed, depth_froude=froude)
    tif, sidecar = write_case(case, tmp_path)
    truth = json.loads(sidecar.read_text())["vessels"][0]
    with open_scene(tif) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=(truth["pixel_col"], truth["pixel_row"])))
    if not a.wake_found:
        pytest.xfail("weak wake not detected (allowed: no speed rather than a wrong one)")
    if a.speed is None:  # seen as a line only (the turbulent wake): a heading, no speed
        assert abs((a.heading_deg - case.heading_deg + 180) % 360 - 180) <= 3 * a.heading_std_deg + 1
        pytest.xfail("waves not measured: the wake was seen as a line only (no speed rather than a wrong one)")
    assert a.regime.regime == "supercritical"
    assert a.speed.speed_mps == pytest.approx(case.speed_mps, rel=0.05)
    assert a.speed.ci95_low_mps <= case.speed_mps <= a.speed.ci95_high_mps
    assert a.depth_ci95_m[0] <= case.depth_m <= a.depth_ci95_m[1]
    assert "supercritical curve" in a.methods[0].method


def test_long_waves_found_at_half_resolution(tmp_path):
    # Synthetic truth: 5.42 m/s (transverse waves 18.8 m, 2*pi*U^2/g) on 0.31 m pixels, i.e. 61 pixels per wave:
    # too few waves fit the full-resolution box to pass the decision, the half-resolution look finds them.
    import numpy as np

    from wakemeter.synth import Hull, OpticalModel, VesselSpec, render, write
    from wakemeter.synth.demo import vessel_scene

    u = 5.42
    length = u * u / (9.81 * 0.35**2)
    vessel = VesselSpec("Long-wave case", 12.5, -20.25, u, 131.0, Hull(length, length / 5))
    spec = vessel_scene(
        "long waves",
        vessel,
        1024,
        0.31,
        imaging=OpticalModel(sun_azimuth_deg=40.0, noise_std=0.02),
        sea=None,
        depth_m=np.inf,
        seed=11,
    )
    tif, sidecar = write(render(spec), tmp_path / "long.tif")
    truth = json.loads(sidecar.read_text())["vessels"][0]
    with open_scene(tif) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=(truth["pixel_col"], truth["pixel_row"])))
    assert a.wake_found
    assert a.pixel_m == pytest.approx(2 * 0.31, rel=0.02)  # the half-resolution look was used
    assert a.speed.speed_mps == pytest.approx(u, rel=0.03)
    assert a.speed.ci95_low_mps <= u <= a.speed.ci95_high_mps


@pytest.mark.parametrize("seed", [5, 8])
def test_radar_hull_displaced_from_its_wake(tmp_path, seed):
    # Synthetic truth with the radar azimuth shift of a moving target (Raney 1971: -(R/V) v_r; here 196 m and
    # 441 m, 147 and 228 pixels).  The user clicks the bright hull; the wake starts elsewhere.  The analysis must
    # find the wake's start near the true position, measure the speed there and say what it did.
    from dataclasses import replace

    from wakemeter.synth import render, write

    case = make_case(seed, radar=True)
    spec = replace(case.spec, imaging=replace(case.spec.imaging, hull_displacement=True))
    tif, sidecar = write(render(spec), tmp_path / "shifted.tif")
    truth = json.loads(sidecar.read_text())["vessels"][0]
    with open_scene(tif) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=(truth["hull_pixel_col"], truth["hull_pixel_row"])))
    assert a.wake_found
    assert a.speed.speed_mps == pytest.approx(case.speed_mps, rel=0.03)
    assert a.speed.ci95_low_mps <= case.speed_mps <= a.speed.ci95_high_mps
    apex_err = ((a.vessel_px[0] - truth["pixel_col"]) ** 2 + (a.vessel_px[1] - truth["pixel_row"]) ** 2) ** 0.5
    hull_dist = (
        (truth["hull_pixel_col"] - truth["pixel_col"]) ** 2 + (truth["hull_pixel_row"] - truth["pixel_row"]) ** 2
    ) ** 0.5
    assert apex_err < 0.5 * hull_dist  # the reported position moved well toward the true one
    assert a.has_caution(CautionCode.DISPLACED_HULL)
    assert a.drawing.first(SegmentKind.HULL_SHIFT).points[0] == pytest.approx(
        (truth["hull_pixel_col"], truth["hull_pixel_row"]), abs=3
    )


def test_radar_geometry_along_the_track_leaves_the_offset_method_out(tmp_path):
    # Synthetic truth (seed 3, radar, hull shifted): with a look bearing of 100 deg the flight direction is
    # 10 deg, almost along this vessel's track (heading 359.5 deg), so the azimuth offset holds no radial speed
    # (Raney 1971: the offset is proportional to the radial component).  The analysis must still give its
    # finding, without that method, and say why (it raised before).
    from dataclasses import replace

    from wakemeter.synth import render, write

    case = make_case(3, radar=True)
    spec = replace(case.spec, imaging=replace(case.spec.imaging, hull_displacement=True))
    tif, sidecar = write(render(spec), tmp_path / "along.tif")
    truth = json.loads(sidecar.read_text())["vessels"][0]
    with open_scene(tif) as sc:
        a = analyze(
            sc,
            AnalysisRequest(
                vessel_px=(truth["hull_pixel_col"], truth["hull_pixel_row"]),
                radar_geometry=RadarGeometry(850_000.0, 7_500.0, 100.0, 33.0),
            ),
        )
    assert a.wake_found
    assert not any(m.method == "radar azimuth offset" for m in a.methods)
    assert a.has_caution(CautionCode.RADAR_OFFSET_MISSING)


def test_no_speed_for_a_point_without_a_vessel():
    # Synthetic truth (harbour_approach_optical.truth.json): one vessel at pixel (789, 373).  At (200, 200), open
    # water inside that vessel's wave field, and at (700, 330), on its wake 190 m behind it, the waves stand
    # out but no vessel is there: no speed may be credited to the click.  The analyst may insist; the result
    # then says so.  At the vessel itself the hull is the evidence.
    with open_scene(ROOT / "sample_scenes" / "harbour_approach_optical.tif") as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=(200.0, 200.0)))
        assert not a.wake_found and a.speed is None and a.diagnostics.vessel_evidence == "none"
        assert a.decision.startswith("no vessel at this point")
        # on the wake behind the vessel the full-resolution look does not pass, and the half-resolution one that
        # does is not kept: its waves are not long for the full-resolution box (the reason to look coarser)
        a = analyze(sc, AnalysisRequest(vessel_px=(700.0, 330.0)))
        assert not a.wake_found and a.speed is None
        assert a.decision.startswith(("no vessel at this point", "no wake found"))
        forced = analyze(sc, AnalysisRequest(vessel_px=(200.0, 200.0), force=True))
        assert forced.wake_found and forced.has_caution(CautionCode.FORCED)
        assert forced.diagnostics.vessel_evidence == "forced"
        real = analyze(sc, AnalysisRequest(vessel_px=(789.0, 373.0)))
        assert (
            real.wake_found and real.diagnostics.vessel_evidence == "hull" and not real.has_caution(CautionCode.FORCED)
        )


def test_a_given_depth_that_the_waves_contradict_is_said():
    # Synthetic truth: the harbour demo is deep water (7.202 m/s), the shoal demo 5.0 m deep
    # (tallow_shoal_shallow.truth.json).  A wrong depth (3 m on the deep demo, 8 m on the 5 m shoal) must be
    # called out with the fit without it; the true depth (or 200 m of deep water) must not.
    shoal = json.loads((ROOT / "sample_scenes" / "tallow_shoal_shallow.truth.json").read_text())["vessels"][0]
    for scene, px, depth, contradicted in (
        ("harbour_approach_optical.tif", (789.0, 373.0), 3.0, True),
        ("harbour_approach_optical.tif", (789.0, 373.0), 200.0, False),
        ("tallow_shoal_shallow.tif", (shoal["pixel_col"], shoal["pixel_row"]), 8.0, True),
        ("tallow_shoal_shallow.tif", (shoal["pixel_col"], shoal["pixel_row"]), 5.0, False),
    ):
        with open_scene(ROOT / "sample_scenes" / scene) as sc:
            a = analyze(sc, AnalysisRequest(vessel_px=px, depth=Uncertain(depth, 0.5)))
        assert a.wake_found
        assert a.has_caution(CautionCode.DEPTH_CONTRADICTED) is contradicted, (scene, depth)
    with pytest.raises(ParameterError, match="deeper than any ocean"):
        AnalysisRequest(vessel_px=(1.0, 1.0), depth=Uncertain(100_000.0, 0.0))
