"""Linear water-wave dispersion, omega^2 = g k tanh(k h), for finite and infinite depth.

All functions are vectorised (numpy broadcasting), work in float64 and take the
gravity ``g`` explicitly.  ``depth_m = np.inf`` means deep water.  They are
written to stay finite for k h -> 0 and k h -> infinity (no overflow warnings).

References
----------
1. Dean, R. G. & Dalrymple, R. A. (1991). *Water Wave Mechanics for Engineers
   and Scientists*, ch. 3.
2. US Army Corps of Engineers (2002). *Coastal Engineering Manual*,
   EM 1110-2-1100, Part II-1.
3. Fenton, J. D. & McKee, W. D. (1990). On calculating the lengths of water
   waves. *Coastal Engineering* 14, 499-513.
4. Hunt, J. N. (1979). Direct solution of wave dispersion equation.
   *J. Waterway, Port, Coastal and Ocean Div., ASCE* 105, 457-459.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike

from ..errors import ParameterError, check_positive

_NEWTON_STEPS = 60
_TOL = 1e-14


def _as_depth(depth_m: ArrayLike) -> np.ndarray:
    h = np.asarray(depth_m, dtype=float)
    check_positive("depth_m", h, allow_inf=True)
    return h


def _scalar_or_array(x: np.ndarray) -> np.ndarray | float:
    return float(x) if np.ndim(x) == 0 else x


def tanh_ratio(x: ArrayLike) -> np.ndarray:
    """tanh(x)/x, equal to 1 at x = 0 (safe for arrays with zeros)."""
    x = np.asarray(x, dtype=float)
    small = np.abs(x) < 1e-6
    xs = np.where(small, 1.0, x)
    return np.where(small, 1.0 - x * x / 3.0, np.tanh(xs) / xs)


def group_factor(kh: ArrayLike) -> np.ndarray:
    """n = c_g / c = 1/2 (1 + 2kh / sinh 2kh); 1 in the shallow limit, 1/2 in deep water.

    Written with exponentials so that large k h neither overflows nor warns.
    """
    x = np.asarray(kh, dtype=float)
    with np.errstate(over="ignore", invalid="ignore"):
        xs = np.where(x < 1e-8, 1.0, x)
        e = np.exp(-2.0 * np.minimum(xs, 350.0))
        ratio = 4.0 * xs * e / (-np.expm1(-4.0 * np.minimum(xs, 350.0)))
        ratio = np.where(np.isinf(x), 0.0, ratio)
    ratio = np.where(x < 1e-8, 1.0, ratio)
    return 0.5 * (1.0 + ratio)


def phase_speed(wavenumber_radpm: ArrayLike, depth_m: ArrayLike = np.inf, *, g: float) -> np.ndarray | float:
    """Phase speed c = sqrt((g/k) tanh(k h)) in m/s.

    Parameters
    ----------
    wavenumber_radpm : array_like
        Wavenumber k in rad/m, > 0.
    depth_m : array_like, optional
        Water depth h in m (> 0, ``np.inf`` for deep water).
    g : float
        Gravity in m/s^2.
    """
    k = np.asarray(wavenumber_radpm, dtype=float)
    check_positive("wavenumber_radpm", k)
    check_positive("g", g)
    h = _as_depth(depth_m)
    kh = k * h
    t = np.where(np.isinf(kh), 1.0, np.tanh(np.where(np.isinf(kh), 0.0, kh)))
    return _scalar_or_array(np.sqrt(g / k * t))


def group_speed(wavenumber_radpm: ArrayLike, depth_m: ArrayLike = np.inf, *, g: float) -> np.ndarray | float:
    """Group speed c_g = n c in m/s (c/2 in deep water, sqrt(g h) in the shallow limit)."""
    k = np.asarray(wavenumber_radpm, dtype=float)
    h = _as_depth(depth_m)
    c = np.asarray(phase_speed(k, h, g=g))
    return _scalar_or_array(group_factor(k * h) * c)


def wavenumber_from_frequency(omega_radps: ArrayLike, depth_m: ArrayLike = np.inf, *, g: float) -> np.ndarray | float:
    """Solve omega^2 = g k tanh(k h) for k (rad/m).

    Starts from the Fenton & McKee (1990) explicit approximation and polishes it
    with Newton's method to machine precision.

    Parameters
    ----------
    omega_radps : array_like
        Angular frequency in rad/s, > 0.
    depth_m : array_like, optional
        Depth in m (> 0, ``np.inf`` for deep water).
    g : float
        Gravity in m/s^2.
    """
    w = np.asarray(omega_radps, dtype=float)
    check_positive("omega_radps", w)
    check_positive("g", g)
    h = _as_depth(depth_m)
    w, h = np.broadcast_arrays(w, h)
    k0 = w * w / g
    deep = np.isinf(h)
    hf = np.where(deep, 1.0, h)
    y = k0 * hf  # = x tanh x, with x = k h
    x = y / np.tanh(y**0.75) ** (2.0 / 3.0)  # Fenton & McKee (1990) starting value
    for _ in range(_NEWTON_STEPS):
        t = np.tanh(x)
        f = x * t - y
        fp = t + x * (1.0 - t * t)
        step = f / fp
        x = x - step
        if np.all(np.abs(step) <= _TOL * np.maximum(x, 1e-300)):
            break
    k = np.where(deep, k0, x / hf)
    return _scalar_or_array(k)


def wavenumber_from_phase_speed(
    phase_speed_mps: ArrayLike, depth_m: ArrayLike = np.inf, *, g: float
) -> np.ndarray | float:
    """Wavenumber k (rad/m) of the wave whose phase speed is ``phase_speed_mps``.

    In finite depth a phase speed at or above the shallow-water limit sqrt(g h)
    has no wave; those elements are returned as NaN (not an error: it is the
    physics of supercritical flow).

    Notes
    -----
    With x = k h and F^2 = c^2/(g h) the condition is tanh(x) = F^2 x.  The
    function x F^2 - tanh x is convex for x > 0, so Newton's method started
    to the right of the root converges monotonically.
    """
    c = np.asarray(phase_speed_mps, dtype=float)
    check_positive("phase_speed_mps", c)
    check_positive("g", g)
    h = _as_depth(depth_m)
    c, h = np.broadcast_arrays(c, h)
    k_deep = g / (c * c)
    deep = np.isinf(h)
    hf = np.where(deep, 1.0, h)
    f2 = c * c / (g * hf)
    ok = (~deep) & (f2 < 1.0)
    f2s = np.where(ok, f2, 0.5)
    # Both starting values lie right of the root: tanh(x)/x <= 1 and
    # tanh(x)/x <= (1 + 2x^2/3)^(-1/2) for x > 0 (checked numerically in the tests).
    x = np.minimum(1.0 / f2s, np.sqrt(1.5 * (1.0 / (f2s * f2s) - 1.0)))
    for _ in range(100):
        t = np.tanh(x)
        q = x * f2s - t
        qp = f2s - (1.0 - t * t)
        step = q / qp
        x = x - step
        # near F = 1 the residual cancels to ~1e-16 x, so ask for 1e-11 relative only
        if np.all(np.abs(step) <= 1e-11 * np.maximum(x, 1e-300)):
            break
    k = np.where(deep, k_deep, np.where(ok, x / hf, np.nan))
    return _scalar_or_array(k)


def steady_wavenumber(
    speed_mps: ArrayLike, propagation_deg: ArrayLike, depth_m: ArrayLike = np.inf, *, g: float
) -> np.ndarray | float:
    """Wavenumber of the wave that stands still behind a vessel: U cos(theta) = c(k, h).

    Parameters
    ----------
    speed_mps : array_like
        Vessel speed through the water U, m/s, > 0.
    propagation_deg : array_like
        Angle theta between the wave's propagation direction and the track, in
        degrees within [0, 90).  0 is a transverse wave.
    depth_m : array_like, optional
        Depth in m.

    Returns
    -------
    k : ndarray or float
        rad/m; NaN where no steady wave exists (finite depth, U cos(theta) >= sqrt(g h)).
    """
    th = np.asarray(propagation_deg, dtype=float)
    if np.any(~np.isfinite(th)) or np.any(th < 0) or np.any(th >= 90):
        raise ParameterError(f"propagation_deg must be within [0, 90), got {propagation_deg!r}")
    u = np.asarray(speed_mps, dtype=float)
    check_positive("speed_mps", u)
    return wavenumber_from_phase_speed(u * np.cos(np.radians(th)), depth_m, g=g)


def _steady_table() -> tuple[np.ndarray, np.ndarray]:
    """S(c) = X(c) c^2 / sqrt(1 - c^2) on a uniform grid of c = U cos(theta) / sqrt(g h) in [0, 1], where
    X = k h solves tanh(X) / X = c^2.  S is smooth: 1 at c = 0 (deep water, X = 1/c^2) and sqrt(3) at
    c = 1 (X ~ sqrt(3 (1 - c^2))), so linear interpolation on 4001 points is accurate to ~1e-7."""
    c = np.linspace(0.0, 1.0, 4001)
    inner = c[1:-1]
    x = np.asarray(wavenumber_from_phase_speed(inner, 1.0, g=1.0))  # h = 1, g = 1: k h = X
    s_in = x * inner**2 / np.sqrt(1.0 - inner**2)
    return c, np.concatenate([[1.0], s_in, [np.sqrt(3.0)]])


_STEADY_C, _STEADY_S = _steady_table()


def steady_wavenumber_fast(
    speed_mps: np.ndarray, propagation_deg: np.ndarray, depth_m: float, *, g: float
) -> np.ndarray:
    """:func:`steady_wavenumber` by table look-up, for inner loops (no input checks; relative error < 1e-6).

    With c = U cos(theta) / sqrt(g h) the steady wave has k h = S(c) sqrt(1 - c^2) / c^2, S tabulated once;
    NaN where c >= 1 (no steady wave: supercritical directions).  ``depth_m`` may be ``np.inf``.
    """
    u = np.asarray(speed_mps, dtype=float)
    cos_t = np.cos(np.radians(np.asarray(propagation_deg, dtype=float)))
    if np.isinf(depth_m):
        return g / (u * u * cos_t * cos_t)
    c = u * cos_t / np.sqrt(g * depth_m)
    ok = (c > 0) & (c < 1)
    cs = np.where(ok, c, 0.5)
    sv = np.interp(cs, _STEADY_C, _STEADY_S)
    return np.where(ok, sv * np.sqrt(1.0 - cs * cs) / (cs * cs * depth_m), np.nan)


def wavelength_from_period(period_s: ArrayLike, depth_m: ArrayLike = np.inf, *, g: float) -> np.ndarray | float:
    """Wavelength (m) of a wave of period T (s) in depth h (m)."""
    t = np.asarray(period_s, dtype=float)
    check_positive("period_s", t)
    return _scalar_or_array(2.0 * np.pi / np.asarray(wavenumber_from_frequency(2.0 * np.pi / t, depth_m, g=g)))


def depth_from_wavelength_and_period(wavelength_m: ArrayLike, period_s: ArrayLike, *, g: float) -> np.ndarray | float:
    """Depth (m) at which a wave of period T has wavelength L (inverse dispersion).

    NaN where L is at or above the deep-water length g T^2 / 2 pi (no finite depth gives it).
    """
    lam = np.asarray(wavelength_m, dtype=float)
    t = np.asarray(period_s, dtype=float)
    check_positive("wavelength_m", lam)
    check_positive("period_s", t)
    k = 2.0 * np.pi / lam
    w = 2.0 * np.pi / t
    r = w * w / (g * k)  # = tanh(k h)
    with np.errstate(invalid="ignore", divide="ignore"):
        h = np.where(r < 1.0, np.arctanh(np.clip(r, 0, 1 - 1e-16)) / k, np.nan)
    return _scalar_or_array(h)


def hunt_wavenumber(omega_radps: ArrayLike, depth_m: ArrayLike, *, g: float) -> np.ndarray | float:
    """Explicit approximation of Hunt (1979), 9th-order Pade form (error < 0.2 %).

    Given for comparison and as a fast first guess; :func:`wavenumber_from_frequency`
    is exact.
    """
    w = np.asarray(omega_radps, dtype=float)
    h = np.asarray(depth_m, dtype=float)
    y = w * w * h / g
    d = (0.6666666666, 0.3555555555, 0.1608465608, 0.0632098765, 0.0217540484, 0.0065407983)
    poly = 1.0 + sum(dn * y ** (n + 1) for n, dn in enumerate(d))
    kh2 = y * y + y / poly
    return _scalar_or_array(np.sqrt(kh2) / h)


def fenton_mckee_wavenumber(omega_radps: ArrayLike, depth_m: ArrayLike, *, g: float) -> np.ndarray | float:
    """Explicit approximation of Fenton & McKee (1990): L = L0 tanh((2 pi h / L0)^(3/4))^(2/3)."""
    w = np.asarray(omega_radps, dtype=float)
    h = np.asarray(depth_m, dtype=float)
    k0 = w * w / g
    return _scalar_or_array(k0 / np.tanh((k0 * h) ** 0.75) ** (2.0 / 3.0))
