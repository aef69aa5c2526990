"""Monte Carlo inversion: GUM comparison, coverage, combination, depth regime, bad input."""

import numpy as np
import pytest
from scipy import stats

from wakemeter.errors import ParameterError
from wakemeter.physics import havelock, kelvin
from wakemeter.physics.inversion import (
    Conditions,
    Uncertain,
    assess_depth_regime,
    combine_estimates,
    speed_and_depth_from_transverse_wavelength_and_half_angle,
    speed_from_crest_wavelength,
    speed_from_radar_offset,
    speed_from_spectral_fit,
    speed_from_transverse_wavelength,
)

G = 9.81
FIXED_G = Conditions(g_mps2=Uncertain(G, 0.0))


def test_linear_case_matches_gum():
    # Source: JCGM 100:2008 (GUM) eq. (10): for the linear model v_r = -(V/R) dx with V, R
    # exact, u(v_r) = (V/R) u(dx).  JCGM 101:2008: Monte Carlo must reproduce it.
    est = speed_from_radar_offset(
        Uncertain(-400.0, 20.0),
        Uncertain(800_000.0, 0.0),
        Uncertain(7_500.0, 0.0),
        incidence_deg=90 - 1e-9,
        heading_deg=Uncertain(90.0, 0.0),
        look_bearing_deg=90.0,
        draws=200_000,
        seed=1,
    )
    vr = 7500 / 800_000 * 400
    u = 7500 / 800_000 * 20
    assert est.speed_mps == pytest.approx(vr, rel=2e-3)
    assert est.std_mps == pytest.approx(u, rel=1e-2)
    assert est.ci95_low_mps == pytest.approx(vr - 1.96 * u, rel=5e-3)
    assert est.ci95_high_mps == pytest.approx(vr + 1.96 * u, rel=5e-3)


def test_transverse_wavelength_first_order_gum():
    # Source: GUM eq. (10) first order for U = sqrt(g lambda / 2 pi): u(U)/U = u(lambda) / (2 lambda).
    lam, s = 64.049, 0.5
    est = speed_from_transverse_wavelength(Uncertain(lam, s), FIXED_G, seed=2)
    assert est.speed_mps == pytest.approx(10.0, rel=1e-3)
    assert est.std_mps == pytest.approx(10.0 * s / (2 * lam), rel=0.02)
    assert "deep water assumed (depth not given)" in est.assumptions


def test_pixel_and_gravity_uncertainty_enter():
    # Self-consistency: more input uncertainty gives a wider interval (pixel scale and gravity).
    base = speed_from_transverse_wavelength(Uncertain(64.0, 0.1), FIXED_G, seed=3)
    px = speed_from_transverse_wavelength(
        Uncertain(64.0, 0.1), Conditions(g_mps2=Uncertain(G, 0.0), pixel_scale_rel_std=0.02), seed=3
    )
    gr = speed_from_transverse_wavelength(Uncertain(64.0, 0.1), Conditions(g_mps2=Uncertain(G, 0.05)), seed=3)
    assert px.std_mps > 5 * base.std_mps
    assert px.std_mps == pytest.approx(10.0 * 0.01, rel=0.1)  # U ~ sqrt(scale): half the relative error
    assert gr.std_mps > 2 * base.std_mps


def test_coverage_of_95_percent_intervals():
    # Source: JCGM 101:2008 sec. 7.7 (coverage interval).  With noisy simulated measurements
    # the interval must contain the truth ~95 % of the time; 3-sigma binomial tolerance for 600 trials.
    rng = np.random.default_rng(11)
    truth_u = 7.0
    lam_true = kelvin.transverse_wavelength(truth_u, g=G)
    s = 0.08 * lam_true
    trials = 600
    hits = 0
    for i in range(trials):
        meas = lam_true + rng.normal(0, s)
        est = speed_from_transverse_wavelength(Uncertain(meas, s), FIXED_G, draws=2000, seed=i)
        hits += est.ci95_low_mps <= truth_u <= est.ci95_high_mps
    tol = 3 * np.sqrt(0.95 * 0.05 / trials)
    assert abs(hits / trials - 0.95) < tol


def test_finite_depth_speed_and_crest_angle():
    # Source: computed independently (not a published value): U = 10 m/s, h = 11.295 m; solving
    # U^2 = (g/k) tanh(k h) (Lamb 1932 sec. 256 steady-wave condition, theta = 0) gives lambda_t = 123.32 m.
    est = speed_from_transverse_wavelength(
        Uncertain(123.32, 0.3), Conditions(g_mps2=Uncertain(G, 0), depth_m=Uncertain(11.295, 0.0))
    )
    assert est.speed_mps == pytest.approx(10.0, abs=0.01)
    # crest at 35.26 deg in deep water: lambda = (2/3) lambda_t
    c = speed_from_crest_wavelength(
        Uncertain(64.049 * 2 / 3, 0.2), Uncertain(kelvin.CUSP_PROPAGATION_DEG, 0.5), FIXED_G
    )
    assert c.speed_mps == pytest.approx(10.0, abs=0.01)
    assert any("propagation angle" in a for a in c.assumptions)


def test_joint_speed_and_depth():
    # Self-consistency with the computed values above: U = 10, Fr_h = 0.95 -> lambda_t = 123.32 m, half-angle
    # 46.10 deg (Havelock 1908 stationarity condition, computed independently, not a published value).
    est, depth = speed_and_depth_from_transverse_wavelength_and_half_angle(
        Uncertain(123.32, 0.5), Uncertain(46.10, 0.3), FIXED_G, seed=4
    )
    assert est.speed_mps == pytest.approx(10.0, abs=0.05)
    assert depth.depth_m == pytest.approx(11.295, abs=0.1)
    assert depth.ci95_low_m < 11.295 < depth.ci95_high_m
    assert depth.froude_depth == pytest.approx(0.95, abs=0.003)


def test_combination_consistent_and_not():
    # Source: inverse-variance weighting and chi-square test (GUM / Birge 1932, from memory).
    a = speed_from_spectral_fit(Uncertain(10.0, 0.3), FIXED_G)
    b = speed_from_transverse_wavelength(Uncertain(64.05, 1.0), FIXED_G)
    ok = combine_estimates([a, b])
    assert ok.consistent and ok.outlier is None
    w = np.array([1 / a.std_mps**2, 1 / b.std_mps**2])
    assert ok.speed_mps == pytest.approx(np.sum(w * [a.speed_mps, b.speed_mps]) / w.sum())
    bad = speed_from_spectral_fit(Uncertain(14.0, 0.3), FIXED_G)
    res = combine_estimates([a, b, bad])
    assert not res.consistent and res.outlier == "spectral fit" and "DISAGREE" in res.verdict
    # of two that disagree the less precise always has the larger residual in its own units: neither is named
    two = combine_estimates([b, bad])
    assert not two.consistent and two.outlier is None and "cannot tell which" in two.verdict
    assert res.p_value == pytest.approx(stats.chi2.sf(res.chi2, 2))
    plain = np.sqrt(1 / (1 / a.std_mps**2 + 1 / b.std_mps**2 + 1 / bad.std_mps**2))
    assert res.std_mps > plain  # inflated, not hidden


def test_depth_regime_paths():
    sp = speed_from_transverse_wavelength(Uncertain(64.05, 0.5), FIXED_G)
    deep = assess_depth_regime(speed=sp, depth_m=Uncertain(200.0, 5.0), g=G)
    assert deep.regime == "deep" and deep.froude_depth < 0.3
    shallow = assess_depth_regime(speed=sp, depth_m=Uncertain((10 / 0.95) ** 2 / G, 0.1), g=G)
    assert shallow.regime == "near-critical"
    assert assess_depth_regime(half_angle_deg=Uncertain(19.6, 0.5)).regime == "deep"
    wide = assess_depth_regime(half_angle_deg=Uncertain(havelock.half_angle(0.8), 0.3), transverse_seen=True, speed=sp)
    assert wide.regime == "finite depth" and wide.froude_depth == pytest.approx(0.8, abs=0.005)
    assert wide.depth_m == pytest.approx(100 / (G * 0.64), rel=0.02)
    assert assess_depth_regime(half_angle_deg=Uncertain(30.0, 0.5), transverse_seen=False).regime == "supercritical"
    narrow = assess_depth_regime(half_angle_deg=Uncertain(12.0, 0.5))
    assert narrow.regime == "unknown" and "hull" in narrow.explanation
    assert assess_depth_regime().regime == "unknown"


@pytest.mark.parametrize(
    "call, match",
    [
        (lambda: speed_from_transverse_wavelength(Uncertain(-3.0, 1.0)), "wavelength"),
        (lambda: Uncertain(float("nan"), 1.0), "finite"),
        (lambda: Uncertain(3.0, -1.0), "uncertainty"),
        (lambda: Conditions(depth_m=Uncertain(0.0, 0.0)), "depth_m"),
        (lambda: speed_from_crest_wavelength(Uncertain(30.0, 1.0), Uncertain(95.0, 1.0)), "angle"),
        (
            lambda: speed_and_depth_from_transverse_wavelength_and_half_angle(Uncertain(60, 1), Uncertain(15, 1)),
            "half_angle",
        ),
        (lambda: speed_from_transverse_wavelength(Uncertain(60.0, 1.0), draws=5), "draws"),
    ],
)
def test_bad_input_names_parameter(call, match):
    with pytest.raises(ParameterError, match=match):
        call()


def test_long_transverse_waves_in_shallow_water_stay_subcritical():
    # Source: Dean & Dalrymple ch. 3: in depth h every wave travels slower than sqrt(g h), so
    # transverse waves (c = U) bound the speed from below sqrt(g h) and the regime is near-critical.
    h = 3.0
    est = speed_from_transverse_wavelength(
        Uncertain(200.0, 1.0), Conditions(g_mps2=Uncertain(G, 0), depth_m=Uncertain(h, 0.0))
    )
    assert est.ci95_high_mps < np.sqrt(G * h)
    assert assess_depth_regime(speed=est, depth_m=Uncertain(h, 0.01), g=G).regime == "near-critical"


def test_radar_offset_refuses_a_geometry_that_heading_uncertainty_makes_degenerate():
    # v_r = U cos(heading - look) sin(incidence) (Raney 1971): at heading 359.4 deg, look 100 deg, incidence
    # 33 deg the projection factor is cos(259.4 deg) sin(33 deg) = -0.1002, just above the 0.1 floor, but with a
    # 1 deg heading uncertainty it reaches cos(261.4 deg) sin(33 deg) = -0.0814 at +2 standard uncertainties: refused
    common = dict(incidence_deg=33.0, look_bearing_deg=100.0, draws=1000, seed=1)
    args = (Uncertain(-100.0, 5.0), Uncertain(850_000.0, 0.0), Uncertain(7_500.0, 0.0))
    with pytest.raises(ParameterError, match="within two standard uncertainties of its heading"):
        speed_from_radar_offset(*args, heading_deg=Uncertain(359.4, 1.0), **common)
    # the same heading known exactly passes, and a well-placed track passes with the same uncertainty
    speed_from_radar_offset(*args, heading_deg=Uncertain(359.4, 0.0), **common)
    speed_from_radar_offset(*args, heading_deg=Uncertain(40.0, 1.0), **common)
