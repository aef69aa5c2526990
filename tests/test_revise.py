"""Hand corrections of findings and the fitted crest lines (synthetic truth of the demo scenes;
crest geometry from Lamb 1932 sec. 256)."""

from dataclasses import replace
from pathlib import Path

import pytest

from wakemeter.detect.analysis import AnalysisRequest, analyze
from wakemeter.detect.findings import CautionCode
from wakemeter.detect.revise import kelvin_crest_lines, revise
from wakemeter.physics import kelvin
from wakemeter.scene.raster import open_scene

ROOT = Path(__file__).resolve().parents[1]


@pytest.fixture(scope="module")
def demo():
    sc = open_scene(ROOT / "sample_scenes" / "harbour_approach_optical.tif")
    return sc, analyze(sc, AnalysisRequest(vessel_lonlat=(-35.0, 36.0)))


def test_hand_crest_joins_the_combination(demo):
    sc, a = demo
    lam = kelvin.transverse_wavelength(7.202, g=a.gravity_mps2)
    r = revise(a, hand_crest=(lam, 0.3, 0.0))
    assert len(r.methods) == len(a.methods) + 1
    assert r.methods[-1].method == "crest ruler (by hand)"
    assert r.methods[-1].speed_mps == pytest.approx(7.202, rel=0.01)
    assert r.speed.speed_mps == pytest.approx(7.202, rel=0.03)
    bad = revise(a, hand_crest=(1.5 * lam, 0.3, 0.0))  # a wrong reading must show as disagreement
    assert not bad.speed.consistent and "DISAGREE" in bad.speed.verdict
    # with one automatic method beside it, two cannot say which is wrong; with more, the hand reading stands out
    expected = "crest ruler (by hand)" if len(a.methods) >= 2 else None
    assert bad.speed.outlier == expected
    assert revise(r).methods == a.methods  # re-revising without hand input drops the hand estimate


def test_hand_arm_changes_regime(demo):
    # Havelock (1908): a half-angle wider than Kelvin's 19.47 deg is finite depth below Fr_h 1 (transverse waves
    # present) and supercritical above it (none: arcsin(1 / Fr_h)); which branch depends on the transverse crests
    sc, a = demo
    r = revise(a, hand_half_angle=(19.6, 0.5))
    assert r.regime.regime == "deep"
    lam = kelvin.transverse_wavelength(7.202, g=a.gravity_mps2)
    seen = replace(a, transverse_wavelength_m=lam, transverse_wavelength_std_m=0.01 * lam)
    unseen = replace(a, transverse_wavelength_m=None, transverse_wavelength_std_m=None)
    wide = revise(seen, hand_half_angle=(34.6, 0.5))
    assert wide.regime.regime in ("finite depth", "near-critical")
    assert wide.has_caution(CautionCode.HAND_ARM)
    assert revise(unseen, hand_half_angle=(34.6, 0.5)).regime.regime == "supercritical"


def test_crest_lines_follow_the_kelvin_shape(demo):
    # The transverse crest n crosses the track n * lambda_t behind the vessel (Lamb 1932).
    sc, a = demo
    lines = kelvin_crest_lines(sc, a, n_crests=3)
    assert len(lines) == 3
    mid = lines[0][len(lines[0]) // 2]
    f = sc.local_frame(*a.vessel_px)
    d = f.length_of(mid[0] - a.vessel_px[0], mid[1] - a.vessel_px[1])
    assert d == pytest.approx(2 * kelvin.transverse_wavelength(a.speed.speed_mps, g=a.gravity_mps2), rel=1e-6)
    b = f.bearing_of(mid[0] - a.vessel_px[0], mid[1] - a.vessel_px[1])
    assert abs(((b - a.heading_deg) % 360) - 180) < 0.01


def test_revision_keeps_the_intervals_cover_of_shallower_water(demo):
    # Without hand input the finding is the analysis itself; with a hand crest the recombined interval must
    # still cover the speeds of shallower water the analysis could not rule out (its interval_cover).
    sc, a = demo
    assert revise(a) is a
    lam = kelvin.transverse_wavelength(7.202, g=a.gravity_mps2)
    r = revise(a, hand_crest=(lam, 0.3, 0.0))
    cover = a.interval_cover
    assert cover is not None  # the demo's deep-water fit leaves Fr_h 0.75 open (see its regime explanation)
    assert r.speed.ci95_low_mps <= cover.low_mps + 1e-9 and r.speed.ci95_high_mps >= cover.high_mps - 1e-9


def test_two_arms_drawn_by_hand_are_combined_not_the_last_one_taken():
    # two arm readings 20.9 +- 0.5 and 18.1 +- 0.5 deg: weighted mean 19.5 deg; the readings scatter 4 times
    # more than their uncertainties say (chi2 = 15.68 with 1 degree of freedom), so the uncertainty 0.35 deg
    # is widened by the Birge ratio 3.96 to 1.4 deg (Birge 1932, Phys. Rev. 40, 207; hand-worked here)
    from wakemeter.physics.inversion import weighted_mean
    from wakemeter.project import Measurement, Project, Vessel

    mean, std = weighted_mean([20.9, 18.1], [0.5, 0.5])
    assert mean == pytest.approx(19.5) and std == pytest.approx(1.4, rel=1e-6)
    assert weighted_mean([19.0, 19.2], [0.5, 0.5])[1] == pytest.approx(0.5 / 2**0.5)  # agreeing: not widened
    p = Project()
    p.vessels[1] = Vessel(1, "Tern", (10.0, 10.0))
    for mid, ang in ((2, 20.9), (3, 18.1)):
        p.measurements[mid] = Measurement(
            mid, "arm", ((10.0, 10.0), (50.0, 30.0)), 1, values={"half_angle_deg": ang, "half_angle_std_deg": 0.5}
        )
    arm = p.hand_corrections(1).half_angle
    assert arm is not None and arm[0] == pytest.approx(19.5) and arm[1] == pytest.approx(1.4, rel=1e-6)
