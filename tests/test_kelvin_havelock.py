"""Kelvin and Havelock wake geometry against published and independently computed values."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from wakemeter.errors import ParameterError
from wakemeter.physics import havelock, hull, kelvin

G = 9.81


def test_kelvin_half_angle_and_cusp():
    # Source: Kelvin 1887; Lamb, Hydrodynamics (1932) sec. 256: arcsin(1/3) = 19.4712 deg;
    # USACE Coastal Engineering Manual II-7: cusp waves at 35 deg 16' = arctan(1/sqrt 2).
    assert kelvin.KELVIN_HALF_ANGLE_DEG == pytest.approx(19.4712, abs=1e-4)
    assert kelvin.CUSP_PROPAGATION_DEG == pytest.approx(35 + 16 / 60, abs=0.01)
    # the deep-water ray angle is largest at the cusp and equals the half-angle there
    th = np.linspace(0.01, 89.9, 20000)
    phi = kelvin.ray_angle(th, g=G)
    assert th[np.argmax(phi)] == pytest.approx(kelvin.CUSP_PROPAGATION_DEG, abs=0.01)
    assert phi.max() == pytest.approx(kelvin.KELVIN_HALF_ANGLE_DEG, abs=1e-4)


def test_cusp_wavelength_two_thirds_of_transverse():
    # Source: Lamb (1932) sec. 256: lambda_c = (2/3) lambda_t (cos^2 35.26 deg); CEM EM 1110-2-1100 II-7 (35 deg 16').
    lt = kelvin.transverse_wavelength(10.0, g=G)
    lc = kelvin.crest_wavelength(10.0, kelvin.CUSP_PROPAGATION_DEG, g=G)
    assert lc / lt == pytest.approx(2 / 3, rel=1e-9)


@pytest.mark.parametrize("u, lam", [(5.0, 16.012), (10.0, 64.049), (15.0, 144.110)])
def test_transverse_wavelengths(u, lam):
    # Source: computed from lambda = 2 pi U^2 / g (Lamb 1932 sec. 256) with g = 9.81.
    assert kelvin.transverse_wavelength(u, g=G) == pytest.approx(lam, abs=1e-3)
    assert kelvin.speed_from_transverse_wavelength(lam, g=G) == pytest.approx(u, abs=1e-4)


def test_finite_depth_transverse_wavelength():
    # Source: computed independently (not a published value): U = 10 m/s, Fr_h = 0.95 (h = 11.295 m);
    # U^2 = (g/k) tanh(k h) (Lamb 1932 sec. 256) gives 123.32 m.
    h = (10.0 / 0.95) ** 2 / G
    assert h == pytest.approx(11.295, abs=1e-3)
    assert kelvin.transverse_wavelength(10.0, h, g=G) == pytest.approx(123.32, abs=0.02)
    assert havelock.depth_from_speed_and_transverse_wavelength(10.0, 123.32, g=G) == pytest.approx(h, rel=1e-3)
    assert np.isnan(kelvin.transverse_wavelength(10.0, 5.0, g=G))  # supercritical: none


@pytest.mark.parametrize(
    "fr, angle",
    [
        (0.5, 19.48),
        (0.7, 20.53),
        (0.8, 24.32),
        (0.9, 34.62),
        (0.95, 46.10),
        (0.99, 67.89),
        (1.2, 56.44),
        (1.5, 41.81),
        (2.0, 30.00),
    ],
)
def test_havelock_half_angle(fr, angle):
    # Source: computed independently from Havelock's (1908, Proc. R. Soc. A 81) stationarity condition with a
    # separate root-finder (not a published table); supercritical values are arcsin(1/Fr_h); the limits
    # 19 deg 28' and 90 deg at Fr_h = 1 are published (CEM EM 1110-2-1100 Part II-7).  Required agreement 0.05 deg.
    assert havelock.half_angle(fr) == pytest.approx(angle, abs=0.05)


def test_havelock_limits():
    # Source: USACE CEM II-7: 19 deg 28' in deep water, widening to 90 deg at Fr_h = 1.
    assert havelock.half_angle(0.3) == pytest.approx(19 + 28 / 60, abs=0.02)
    assert havelock.half_angle(0.9999) > 85.0
    assert havelock.half_angle(1.0) == 90.0
    assert havelock.half_angle(1.0001) > 85.0


def test_havelock_angle_equals_max_ray_angle_at_finite_depth():
    # Self-consistency: the half-angle is the largest ray angle of kelvin.ray_angle at that depth.
    u, fr = 8.0, 0.85
    h = (u / fr) ** 2 / G
    th = np.linspace(0.01, 89.9, 40000)
    assert np.nanmax(kelvin.ray_angle(th, u, h, g=G)) == pytest.approx(havelock.half_angle(fr), abs=0.01)


@settings(max_examples=60, deadline=None)
@given(st.floats(0.62, 0.995))
def test_froude_round_trip_subcritical(fr):
    # Self-consistency: inverse of the Havelock half-angle on the subcritical branch.
    br = havelock.froude_from_half_angle(havelock.half_angle(fr))
    assert br.subcritical == pytest.approx(fr, abs=2e-3)
    assert br.supercritical > 1.0


def test_froude_inverse_both_branches_and_kelvin():
    br = havelock.froude_from_half_angle(30.0)
    assert br.supercritical == pytest.approx(2.0, rel=1e-9)
    assert 0.85 < br.subcritical < 0.9
    assert "two depth Froude numbers" in br.note
    deep = havelock.froude_from_half_angle(19.47)
    assert deep.subcritical is None and "cannot be told" in deep.note
    with pytest.raises(ParameterError, match="half_angle_deg"):
        havelock.froude_from_half_angle(95.0)


def test_depth_from_speed_and_half_angle():
    # Self-consistency: U = 9 m/s, Fr_h = 0.9 -> h = U^2 / (g Fr^2).
    h = havelock.depth_from_speed_and_half_angle(9.0, havelock.half_angle(0.9), g=G)
    assert h == pytest.approx(81 / (G * 0.81), rel=5e-3)


def test_stationary_waves_on_ray():
    # Source: Lamb (1932) sec. 256: two waves on each ray inside the wedge, merging at the cusp.
    p = kelvin.stationary_waves_on_ray(10.0)
    assert p.transverse_propagation_deg < kelvin.CUSP_PROPAGATION_DEG < p.divergent_propagation_deg
    for th in (p.transverse_propagation_deg, p.divergent_propagation_deg):
        assert kelvin.ray_angle(th, g=G) == pytest.approx(10.0, abs=1e-9)
    cusp = kelvin.stationary_waves_on_ray(kelvin.KELVIN_HALF_ANGLE_DEG)
    assert cusp.transverse_propagation_deg == pytest.approx(kelvin.CUSP_PROPAGATION_DEG, abs=1e-3)
    with pytest.raises(ParameterError, match="ray_deg"):
        kelvin.stationary_waves_on_ray(25.0)


@settings(max_examples=200, deadline=None)
@given(st.floats(0.3, 40.0), st.floats(0.0, 80.0), st.one_of(st.just(np.inf), st.floats(2.0, 500.0)))
def test_speed_wavelength_round_trip(u, theta, h):
    # Self-consistency: speed -> crest wavelength -> speed, deep and finite depth.
    lam = kelvin.crest_wavelength(u, theta, h, g=G)
    if np.isnan(lam):  # no steady wave: only possible when U cos(theta) >= sqrt(g h)
        assert u * np.cos(np.radians(theta)) >= np.sqrt(G * h) * (1 - 1e-9)
        return
    assert kelvin.speed_from_crest_wavelength(lam, theta, h, g=G) == pytest.approx(u, rel=1e-8)


def test_hull_froude_apparent_angle():
    # Source: Rabaud & Moisy 2013 (PRL 110, 214503): Kelvin angle below Fr_L ~ 0.5, then
    # decreasing as ~1/Fr_L; large-Fr asymptote 1/(2 sqrt(2 pi) Fr_L) rad (from memory of their model).
    assert hull.FR_HULL_TRANSITION == pytest.approx(0.5, abs=0.02)
    assert hull.apparent_arm_angle(0.3) == pytest.approx(kelvin.KELVIN_HALF_ANGLE_DEG)
    big = 3.0
    assert np.radians(hull.apparent_arm_angle(big)) == pytest.approx(1 / (2 * np.sqrt(2 * np.pi) * big), rel=0.03)
    a = hull.apparent_arm_angle(np.array([0.6, 1.0, 2.0]))
    assert np.all(np.diff(a) < 0) and a[0] < kelvin.KELVIN_HALF_ANGLE_DEG
    assert hull.hull_froude(10.0, 25.0, g=G) == pytest.approx(10 / np.sqrt(G * 25))
    assert hull.narrow_angle_explained(float(hull.apparent_arm_angle(1.2)), 1.2 * np.sqrt(G * 20), 20.0, g=G)


def test_hull_froude_from_arm_angle_inverts_the_fast_hull_model():
    # Source: Rabaud & Moisy 2013 (PRL 110, 214503), large-Fr asymptote 1/(2 sqrt(2 pi) Fr_L) rad (from memory):
    # an arm angle of 2.2858 deg is Fr_L = 5 on the asymptote; the exact model is within 0.1 % there.
    assert hull.hull_froude_from_arm_angle(np.degrees(1 / (2 * np.sqrt(2 * np.pi) * 5.0))) == pytest.approx(
        5.0, rel=2e-3
    )
    fr = np.array([0.6, 1.0, 2.0, 4.0])
    assert np.asarray(hull.hull_froude_from_arm_angle(hull.apparent_arm_angle(fr))) == pytest.approx(fr, rel=1e-9)
    assert np.isnan(hull.hull_froude_from_arm_angle(25.0))  # wider than Kelvin's: no information on Fr_L


def test_speed_from_narrow_arms_and_hull_length():
    # a 20 m hull at Fr_L = 1.5 (U = 1.5 sqrt(g L)), arms read at the model's angle +/- 0.3 deg
    from wakemeter.physics import inversion as inv

    u = 1.5 * np.sqrt(G * 20.0)
    phi = float(hull.apparent_arm_angle(1.5))
    est = inv.speed_from_arm_angle_and_hull_length(
        inv.Uncertain(phi, 0.3), inv.Uncertain(20.0, 1.0), inv.Conditions(g_mps2=inv.Uncertain(G, 0.0)), seed=1
    )
    assert est.ci95_low_mps < u < est.ci95_high_mps
    assert est.speed_mps == pytest.approx(u, rel=0.03)
