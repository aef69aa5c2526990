"""Dispersion relation checks against published worked examples.

Sources are named beside each check.
"""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from wakemeter.errors import ParameterError
from wakemeter.physics import dispersion as d

G = 9.81


def test_deep_water_wavelength_cem_example():
    # Source: USACE Coastal Engineering Manual EM 1110-2-1100, Example II-1-1:
    # T = 10 s deep water L0 = g T^2 / 2 pi ~ 156 m (156.13 m with g = 9.81).
    lam = d.wavelength_from_period(10.0, np.inf, g=G)
    assert lam == pytest.approx(156.13, abs=0.01)


def test_finite_depth_wavelength_cem_example():
    # Source: USACE Coastal Engineering Manual, Example II-1-1: T = 10 s, h = 3 m, L ~ 53.2 m.
    assert d.wavelength_from_period(10.0, 3.0, g=G) == pytest.approx(53.16, abs=0.01)


def test_finite_depth_wavelength_sorensen():
    # Source: 86.50 m computed independently from the exact dispersion relation (not a published value);
    # Sorensen, Basic Coastal Engineering, Ex. 3.3-1 gives 87.6 m with the
    # shallow-water approximation L = T sqrt(g h), which must be the longer one.
    lam = d.wavelength_from_period(14.0, 4.0, g=G)
    assert lam == pytest.approx(86.50, abs=0.01)
    assert lam < 14.0 * np.sqrt(G * 4.0)
    assert 14.0 * np.sqrt(G * 4.0) == pytest.approx(87.6, abs=0.1)


def test_depth_from_wavelength_dean_dalrymple():
    # Source: Dean & Dalrymple, Water Wave Mechanics for Engineers and Scientists,
    # problem 3.7: L0 = 312 m (T = 14.14 s), L = 200 m -> h = 24.19 m.
    t = np.sqrt(312.0 * 2 * np.pi / G)
    assert t == pytest.approx(14.14, abs=0.01)
    assert d.depth_from_wavelength_and_period(200.0, t, g=G) == pytest.approx(24.19, abs=0.02)


@pytest.mark.parametrize("approx, tol", [(d.hunt_wavenumber, 0.002), (d.fenton_mckee_wavenumber, 0.017)])
def test_exact_solver_agrees_with_explicit_approximations_within_published_error(approx, tol):
    # Source: Hunt 1979 (J. Waterway ASCE 105) error < 0.2 %;
    # Fenton & McKee 1990 (Coastal Eng. 14) error < 1.7 %.
    h = 10.0
    w = np.sqrt(G / h * np.logspace(-3, 2, 400))  # omega^2 h / g from 1e-3 to 100
    exact = d.wavenumber_from_frequency(w, h, g=G)
    rel = np.abs(approx(w, h, g=G) / exact - 1.0)
    assert rel.max() < tol
    assert rel.max() > tol / 1000  # they are approximations: the comparison is not vacuous


def test_limits_deep_and_shallow():
    # Source: Dean & Dalrymple ch. 3: deep c = sqrt(g/k), cg = c/2; shallow c -> sqrt(g h), cg -> c.
    k = 2 * np.pi / 50.0
    assert d.phase_speed(k, 1e4, g=G) == pytest.approx(np.sqrt(G / k), rel=1e-12)
    assert d.group_speed(k, np.inf, g=G) == pytest.approx(0.5 * np.sqrt(G / k), rel=1e-12)
    assert d.phase_speed(1e-6, 2.0, g=G) == pytest.approx(np.sqrt(G * 2.0), rel=1e-9)
    assert d.group_speed(1e-6, 2.0, g=G) == pytest.approx(np.sqrt(G * 2.0), rel=1e-9)


def test_no_warnings_or_nan_at_extremes():
    # Self-consistency: very large and very small k h must stay finite and silent.
    with np.errstate(all="raise"):
        k = np.array([1e-9, 1e-3, 1.0, 1e3, 1e6])
        c = d.phase_speed(k, 1e4, g=G)
        cg = d.group_speed(k, 1e4, g=G)
        kk = d.wavenumber_from_frequency(np.array([1e-5, 1e-2, 1.0, 1e2]), 1e3, g=G)
    assert np.all(np.isfinite(c)) and np.all(np.isfinite(cg)) and np.all(np.isfinite(kk))


def test_supercritical_phase_speed_has_no_wave():
    # Source: Dean & Dalrymple ch. 3, c <= sqrt(g h) in finite depth.
    assert np.isnan(d.wavenumber_from_phase_speed(np.sqrt(G * 5.0) * 1.01, 5.0, g=G))


def test_starting_value_bound_used_by_solver():
    # Self-consistency: the phase-speed solver starts right of the root using
    # tanh(x)/x <= (1 + 2 x^2 / 3)^(-1/2); check it on a wide grid.
    x = np.logspace(-6, 3, 20001)
    assert np.all(np.tanh(x) / x <= (1 + 2 * x * x / 3) ** -0.5 + 1e-15)


@settings(max_examples=200, deadline=None)
@given(st.floats(0.01, 100.0), st.floats(0.1, 5000.0))
def test_round_trip_omega_k(omega, h):
    # Self-consistency: k from omega satisfies omega^2 = g k tanh(k h).
    k = d.wavenumber_from_frequency(omega, h, g=G)
    assert G * k * np.tanh(k * h) == pytest.approx(omega**2, rel=1e-10)


@settings(max_examples=200, deadline=None)
@given(st.floats(0.05, 0.999), st.floats(0.1, 5000.0))
def test_round_trip_phase_speed(froude, h):
    # Self-consistency: k from c returns c.
    c = froude * np.sqrt(G * h)
    k = d.wavenumber_from_phase_speed(c, h, g=G)
    assert d.phase_speed(k, h, g=G) == pytest.approx(c, rel=1e-9)


@pytest.mark.parametrize("bad", [0.0, -1.0, np.nan])
def test_bad_depth_rejected(bad):
    with pytest.raises(ParameterError, match="depth_m"):
        d.phase_speed(0.1, bad, g=G)


def test_bad_frequency_rejected():
    with pytest.raises(ParameterError, match="omega_radps"):
        d.wavenumber_from_frequency(-1.0, 10.0, g=G)


def test_table_lookup_of_the_steady_wavenumber_matches_the_solver():
    # Against the Newton solver of this module (itself checked against CEM and Dean & Dalrymple above): the
    # table look-up used in the spectral fits must agree to 1e-6 and give NaN exactly where no steady wave exists.
    from wakemeter.physics.dispersion import steady_wavenumber, steady_wavenumber_fast

    rng = np.random.default_rng(3)
    u = rng.uniform(0.5, 25.0, 50_000)
    th = rng.uniform(0.0, 89.0, 50_000)
    for h in (0.3, 2.0, 7.5, 40.0, np.inf):
        exact = np.asarray(steady_wavenumber(u, th, h, g=9.81))
        fast = steady_wavenumber_fast(u, th, h, g=9.81)
        assert np.array_equal(np.isnan(exact), np.isnan(fast))
        ok = np.isfinite(exact)
        assert np.max(np.abs(fast[ok] / exact[ok] - 1)) < 1e-6
