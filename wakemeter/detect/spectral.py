"""Speed and track from the 2-D spectrum of the water behind a vessel.

The steady waves of a vessel moving at U over depth h lie on the curve
(k . U_hat)^2 U^2 = g |k| tanh(|k| h) in the wavenumber plane.  The power
spectrum of a windowed box behind the vessel is whitened by the spectrum of
an equal box ahead of it (which removes swell, wind sea and sensor texture
that are present on both sides), and U, a small track correction and
optionally h are fitted by maximising the mean log-whitened power along the
curve, then refined below the grid spacing.  The uncertainty comes from
refitting on four sub-boxes (a bootstrap over sub-chips).

References
----------
1. Zilman, G., Zapolski, A. & Marom, M. (2004). The speed and beam of a ship
   from its wake's SAR images. *IEEE Trans. Geosci. Remote Sens.* 42(10),
   2335-2343 (fitting the Kelvin dispersion curve to the image spectrum).
2. Rife, D. C. & Boorstyn, R. R. (1974). Single-tone parameter estimation
   from discrete-time observations. *IEEE Trans. Inf. Theory* 20(5), 591-598
   (Cramer-Rao bound for a frequency: crest spacing uncertainty).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.fft as sfft
from scipy import ndimage, optimize

from ..physics.dispersion import steady_wavenumber, steady_wavenumber_fast
from .robust import group_median_spread
from .tuning import DEFAULT_TUNING, Tuning

_THETA = np.radians(np.arange(-84.0, 84.5, 1.0))


def _hann2(n_v: int, n_u: int) -> np.ndarray:
    return np.outer(np.hanning(n_v), np.hanning(n_u))


def power_spectrum(box: np.ndarray) -> np.ndarray:
    """fftshift-ed power spectrum of a Hann-windowed box (v rows, u columns)."""
    b = box - box.mean()
    return np.abs(sfft.fftshift(sfft.fft2(b * _hann2(*b.shape), workers=-1))) ** 2


@dataclass(frozen=True)
class SpectrumPair:
    """Log-whitened spectrum of the box behind the vessel and its wavenumber axes."""

    white: np.ndarray  #: log(P_behind / smoothed P_ahead), fftshift-ed, (v, u)
    dk_u: float  #: rad/m per bin along u
    dk_v: float
    k_lo: float  #: band used for fitting, rad/m
    k_hi: float
    m_per_px: float
    z_clip: float  #: whitened values are clipped here when curves are scored (Tuning.spectrum_z_clip)
    curve_min_points: int  #: a curve is scored with at least this many points in the band
    hann_samples_per_estimate: float  #: correlated samples per independent estimate (Hann window)


def whitened_spectrum(
    behind: np.ndarray, ahead: np.ndarray, m_per_px: float, tuning: Tuning = DEFAULT_TUNING
) -> SpectrumPair:
    pb = power_spectrum(behind)
    pa = ndimage.gaussian_filter(ndimage.maximum_filter(power_spectrum(ahead), size=3), tuning.spectrum_smooth_bins)
    eps = 1e-6 * float(np.mean(pa)) + 1e-30
    white = np.log((pb + eps) / (pa + eps))
    n_v, n_u = behind.shape
    dk_u = 2 * np.pi / (n_u * m_per_px)
    dk_v = 2 * np.pi / (n_v * m_per_px)
    # standardise ring by ring (robust median and spread of each |k| ring), so that a broad
    # excess at some scales (foam, hull, background removal) does not pass for a wake curve
    ku = (np.arange(n_u) - n_u // 2) * dk_u
    kv = (np.arange(n_v) - n_v // 2) * dk_v
    kk = np.hypot(ku[None, :], kv[:, None])
    ring = np.minimum((kk / max(dk_u, dk_v)).astype(int), max(n_u, n_v))
    med, spread = group_median_spread(
        white, ring, int(ring.max()) + 1, min_count=int(tuning.spectrum_ring_min_bins), floor=1.0
    )
    white = (white - med[ring]) / spread[ring]
    # the turbulent-wake ridge (along the track: k_u ~ 0) is not part of the wave pattern
    white[:, np.abs(ku) <= tuning.spectrum_track_ridge_bins * dk_u] = 0.0
    k_lo = tuning.spectrum_band_min_waves_per_box * max(dk_u, dk_v)
    k_hi = 2 * np.pi / (tuning.spectrum_band_min_pixels_per_wave * m_per_px)
    return SpectrumPair(
        white,
        dk_u,
        dk_v,
        k_lo,
        k_hi,
        m_per_px,
        tuning.spectrum_z_clip,
        int(tuning.spectrum_curve_min_points),
        tuning.spectrum_hann_samples_per_estimate,
    )


def curve_score(
    sp: SpectrumPair, speed: float, delta_deg: float, depth_m: float, g: float, k_floor_factor: float | None = None
) -> float:
    """Mean whitened log-power along the steady-wave curve (NaN if too little of it is in band)."""
    return float(_scores(sp, np.array([speed]), delta_deg, depth_m, g, k_floor_factor=k_floor_factor)[0])


def _scores(
    sp: SpectrumPair,
    speeds: np.ndarray,
    delta_deg: float,
    depth_m: float,
    g: float,
    k_cap_factor: float | None = None,
    k_floor_factor: float | None = None,
) -> np.ndarray:
    """Scores of the curves for several speeds; ``k_cap_factor`` keeps only k <= factor * g / U^2
    (the long waves, where depth acts)."""
    th = _THETA[None, :]
    u = speeds[:, None]
    k = steady_wavenumber_fast(u, np.abs(np.degrees(th)), depth_m, g=g)  # (speeds, theta)
    ok = np.isfinite(k) & (k >= sp.k_lo) & (k <= sp.k_hi)
    if k_cap_factor is not None:
        ok &= k <= k_cap_factor * g / (u * u)
    if k_floor_factor is not None:  # short waves only: k h >= factor / Fr_h^2, depth-independent
        ok &= k >= k_floor_factor * g / (u * u)
    return _sum_along(sp, k, th + np.radians(delta_deg), ok)


def _sum_along(
    sp: SpectrumPair, k: np.ndarray, angle: np.ndarray, ok: np.ndarray, min_points: int | None = None
) -> np.ndarray:
    """z-like score of curves given as wavenumbers ``k`` at image angles ``angle`` (last axis: points)."""
    ku, kv = k * np.cos(angle), k * np.sin(angle)
    n_v, n_u = sp.white.shape
    cu = n_u // 2 + np.where(ok, ku, 0) / sp.dk_u
    cv = n_v // 2 + np.where(ok, kv, 0) / sp.dk_v
    vals = ndimage.map_coordinates(sp.white, [cv.ravel(), cu.ravel()], order=1, mode="nearest").reshape(k.shape)
    vals = np.clip(vals, -sp.z_clip, sp.z_clip)  # winsorise (see Tuning.spectrum_z_clip)
    cnt = ok.sum(axis=-1)
    # mean standardised power along the curve, scaled to a z-like figure
    total = np.sum(np.where(ok, vals, 0), axis=-1)
    need = sp.curve_min_points if min_points is None else min_points
    return np.where(cnt >= need, total / np.sqrt(np.maximum(cnt, 1) * sp.hann_samples_per_estimate), np.nan)


@dataclass(frozen=True)
class CurveFit:
    speed_mps: float
    delta_deg: float  #: correction of the track direction (image angle, deg)
    depth_m: float  #: inf for the deep-water curve
    score: float  #: z-like figure: standardised whitened power summed along the curve / sqrt(3 n)
    significance: float  #: same as score (kept separate for calibrated use by the decision)
    speed_grid: np.ndarray
    profile: np.ndarray  #: best score per grid speed (for plots)


def speed_bounds(sp: SpectrumPair, g: float) -> tuple[float, float]:
    """Speeds whose steady-wave curve reaches the fitting band (transverse waves from 4 px to the box)."""
    lo = np.sqrt(g / sp.k_hi) * 1.02
    hi = np.sqrt(g / sp.k_lo) / np.cos(np.radians(70.0))
    return float(lo), float(min(hi, 60.0))


def fit_curve(
    sp: SpectrumPair,
    *,
    g: float,
    depth_m: float = np.inf,
    delta_max_deg: float = 24.0,
    delta_step_deg: float = 2.0,
    speed_range: tuple[float, float] | None = None,
) -> CurveFit:
    """Grid search over speed and track correction, then Nelder-Mead refinement."""
    lo, hi = speed_range or speed_bounds(sp, g)
    speeds = np.geomspace(lo, hi, 64)
    deltas = np.arange(-delta_max_deg, delta_max_deg + 1e-9, delta_step_deg)
    grid = np.stack([_scores(sp, speeds, d, depth_m, g) for d in deltas])  # (deltas, speeds)
    finite = grid[np.isfinite(grid)]
    if finite.size == 0:
        return CurveFit(np.nan, 0.0, depth_m, np.nan, 0.0, speeds, np.full(speeds.size, np.nan))
    i, j = np.unravel_index(np.nanargmax(grid), grid.shape)
    x0 = np.array([np.log(speeds[j]), deltas[i]])

    def neg(x: np.ndarray) -> float:
        if abs(x[1]) > delta_max_deg + delta_step_deg:
            return 1e9
        s = curve_score(sp, float(np.exp(x[0])), float(x[1]), depth_m, g)
        return -s if np.isfinite(s) else 1e9

    res = optimize.minimize(
        neg,
        x0,
        method="Nelder-Mead",
        options={"xatol": 1e-3, "fatol": 1e-4, "initial_simplex": [x0, x0 + [0.01, 0], x0 + [0, 0.4]]},
    )
    best = res.x if res.fun <= -np.nanmax(grid) else x0
    score = -neg(best)
    with np.errstate(all="ignore"):
        prof = np.max(np.where(np.isfinite(grid), grid, -np.inf), axis=0)
    prof = np.where(np.isfinite(prof), prof, np.nan)
    return CurveFit(float(np.exp(best[0])), float(best[1]), depth_m, score, score, speeds, prof)


def crest_spacing(
    profile: np.ndarray, m_per_px: float, *, band_m: tuple[float, float] | None = None
) -> tuple[float, float, float]:
    """Dominant crest spacing (m) of a 1-D profile, its standard uncertainty (m) and peak SNR.

    Zero-padded FFT of the detrended, Hann-windowed profile; parabolic interpolation of
    the log peak; uncertainty from the Cramer-Rao bound of Rife & Boorstyn (1974),
    var(f) = 6 / ((2 pi)^2 SNR N (N^2 - 1)) cycles^2/sample^2, SNR = A^2 / (2 sigma^2).
    """
    p = np.asarray(profile, dtype=float)
    n = p.size
    if n < 16:
        return np.nan, np.nan, 0.0
    x = np.arange(n)
    p = p - np.polyval(np.polyfit(x, p, 1), x)
    w = np.hanning(n)
    nfft = max(4096, 1 << int(np.ceil(np.log2(16 * n))))
    spec = np.abs(np.fft.rfft(p * w, nfft)) ** 2
    f = np.fft.rfftfreq(nfft)
    lam_px = np.where(f > 0, 1.0 / np.maximum(f, 1e-12), np.inf)
    band = (f > 2.0 / n) & (lam_px >= 2.5)
    if band_m is not None:
        band &= (lam_px * m_per_px >= band_m[0]) & (lam_px * m_per_px <= band_m[1])
    if band.sum() < 3:
        return np.nan, np.nan, 0.0
    idx = np.nonzero(band)[0]
    i = idx[np.argmax(spec[idx])]
    if i <= 0 or i >= spec.size - 1:
        return np.nan, np.nan, 0.0
    a, b, c = np.log(spec[i - 1 : i + 2] + 1e-300)
    d = 0.5 * (a - c) / (a - 2 * b + c) if (a - 2 * b + c) < 0 else 0.0
    d = float(np.clip(d, -0.5, 0.5))
    fpk = (i + d) * (f[1] - f[0])
    # SNR: peak power against the median of the band (noise), with Hann coherent gain
    noise = float(np.median(spec[band]))
    snr = max((spec[i] - noise) / max(noise, 1e-300), 0.0)
    var_f = 6.0 / ((2 * np.pi) ** 2 * max(snr, 1e-9) * n * (n * n - 1.0))
    lam = 1.0 / fpk * m_per_px
    sig = np.sqrt(var_f) / fpk**2 * m_per_px
    return float(lam), float(sig), float(snr)


def student_inflation(n: int) -> float:
    """Ratio t_{0.975, n-1} / z_{0.975}: widens a standard deviation from n samples to a fair 95 % interval."""
    from scipy import special  # t.ppf is special.stdtrit, norm.ppf special.ndtri (scipy.stats costs ~0.6 s to import)

    return float(special.stdtrit(max(n - 1, 1), 0.975) / special.ndtri(0.975))


@dataclass(frozen=True)
class DepthFit:
    """Joint fit of the finite-depth curve: speed, depth and track correction."""

    speed_mps: float
    depth_m: float
    delta_deg: float
    score: float  #: same z-like figure as :attr:`CurveFit.score`

    def depth_froude(self, g: float) -> float:
        return float(self.speed_mps / np.sqrt(g * self.depth_m))


#: depth Froude numbers of the coarse grid: 0.3 is deep water for every steady wave (k h > 11)
_FR_GRID = np.concatenate([[0.3, 0.5], np.linspace(0.6, 0.97, 16)])
FR_MAX = 0.98  #: subcritical fits only


def _steady_q(frs: np.ndarray, g: float, theta: np.ndarray = _THETA) -> np.ndarray:
    """k U^2 / g of the steady waves, (len(frs), len(theta)): depends on Fr_h and theta only."""
    th = np.degrees(np.abs(theta))
    return np.stack([steady_wavenumber_fast(np.ones(1), th, 1.0 / (g * f * f), g=g) for f in frs]) / g


def _grid_best(
    sp: SpectrumPair, speeds: np.ndarray, frs: np.ndarray, deltas: np.ndarray, g: float
) -> tuple[float, float, float] | None:
    """(speed, Fr_h, track correction) of the best curve on a grid, or None when no curve is in band."""
    theta = _THETA[::2]  # 2 deg steps are enough to find the peak; the refinement uses all of _THETA
    q = _steady_q(frs, g, theta)
    k = g * q[None, :, :] / (speeds[:, None, None] ** 2)  # (speeds, frs, theta)
    ok = np.isfinite(k) & (k >= sp.k_lo) & (k <= sp.k_hi)
    grid = np.stack(
        [_sum_along(sp, k, np.broadcast_to(theta + np.radians(d), k.shape), ok, min_points=6) for d in deltas]
    )
    if not np.any(np.isfinite(grid)):
        return None
    i, j, f = np.unravel_index(np.nanargmax(grid), grid.shape)
    return float(speeds[j]), float(frs[f]), float(deltas[i])


def fit_speed_depth(
    sp: SpectrumPair, speed: float, delta_deg: float, *, g: float, delta_max_deg: float = 20.0
) -> DepthFit:
    """Fit speed, depth and the track correction together on the finite-depth steady-wave curve.

    A grid over speed (0.65-1.08 x the deep-water fit's ``speed``: depth makes the long waves
    longer, so the deep fit reads high), depth Froude number (0.3-0.97) and track correction
    (within +/- ``delta_max_deg`` of the first guess, and at least 8 deg either side of the deep fit's
    ``delta_deg``), then a Nelder-Mead refinement of all three.  The track correction must be free:
    the curves for deep and shallow water differ most off the track axis, so the deep fit's track can
    be several degrees off when the water is shallow, and a track held there hides the difference.
    """
    speeds = np.geomspace(0.65 * speed, 1.08 * speed, 25)
    d_lo, d_hi = min(-delta_max_deg, delta_deg - 8.0), max(delta_max_deg, delta_deg + 8.0)
    best = _grid_best(sp, speeds, _FR_GRID, np.arange(d_lo, d_hi + 1e-9, 2.0), g)
    if best is None:
        return DepthFit(np.nan, np.nan, delta_deg, np.nan)
    u, fr, d = best
    return refine_speed_depth(sp, u, u * u / (g * fr * fr), d, g=g, delta_range=(d_lo - 2.0, d_hi + 2.0))


#: supercritical grid: Fr_h 1.05 (half-angle 72 deg) to 2.5 (24 deg)
_FR_SUPER = np.array([1.05, 1.1, 1.17, 1.25, 1.35, 1.5, 1.7, 2.0, 2.5])
FR_SUPER_RANGE = (1.02, 3.0)


def fit_supercritical(sp: SpectrumPair, *, g: float, delta_max_deg: float = 20.0) -> DepthFit:
    """Fit speed, depth and track on the supercritical curve (Fr_h > 1: no transverse waves; only
    waves propagating beyond arccos(1/Fr_h) from the track stand still behind the vessel; Havelock 1908).

    The speed range is the whole band the spectrum allows, since the deep-water fit can lock onto
    anything when the pattern has no transverse part.
    """
    lo, hi = speed_bounds(sp, g)
    speeds = np.geomspace(lo, min(1.5 * hi, 60.0), 48)
    best = _grid_best(sp, speeds, _FR_SUPER, np.arange(-delta_max_deg, delta_max_deg + 1e-9, 2.0), g)
    if best is None:
        return DepthFit(np.nan, np.nan, 0.0, np.nan)
    u, fr, d = best
    return refine_speed_depth(
        sp,
        u,
        u * u / (g * fr * fr),
        d,
        g=g,
        fr_bounds=FR_SUPER_RANGE,
        delta_range=(-delta_max_deg - 2.0, delta_max_deg + 2.0),
    )


def fit_at_froude(
    sp: SpectrumPair, speed: float, delta_deg: float, froude: float, *, g: float, delta_half_deg: float = 8.0
) -> DepthFit:
    """Best speed and track correction with the depth Froude number held at ``froude``.

    The profile of the joint fit: comparing its score with the free fit's tells whether water that
    shallow can be ruled out."""
    speeds = np.geomspace(0.65 * speed, 1.08 * speed, 41)
    best = _grid_best(
        sp, speeds, np.array([froude]), delta_deg + np.arange(-delta_half_deg, delta_half_deg + 1e-9, 1.0), g
    )
    if best is None:
        return DepthFit(np.nan, np.nan, delta_deg, np.nan)

    def neg(x: np.ndarray) -> float:
        u = float(np.exp(x[0]))
        s = curve_score(sp, u, float(x[1]), u * u / (g * froude * froude), g)
        return -s if np.isfinite(s) else 1e9

    x0 = np.array([np.log(best[0]), best[2]])
    res = optimize.minimize(
        neg,
        x0,
        method="Nelder-Mead",
        options={"xatol": 1e-3, "fatol": 1e-4, "initial_simplex": [x0, x0 + [0.01, 0], x0 + [0, 0.5]]},
    )
    x = res.x if res.fun <= neg(x0) else x0
    u = float(np.exp(x[0]))
    return DepthFit(u, u * u / (g * froude * froude), float(x[1]), -neg(x))


def refine_speed_depth(
    sp: SpectrumPair,
    speed: float,
    depth_m: float,
    delta_deg: float,
    *,
    g: float,
    delta_range: tuple[float, float] | None = None,
    fr_bounds: tuple[float, float] = (0.2, FR_MAX),
) -> DepthFit:
    """Nelder-Mead refinement of speed, depth Froude number and track correction on the finite-depth curve.

    ``delta_range`` bounds the track correction (default: the start +/- 4 deg); ``fr_bounds`` the depth
    Froude number (subcritical by default; the critical point Fr_h = 1 is never crossed)."""
    lo_d, hi_d = delta_range or (delta_deg - 4.0, delta_deg + 4.0)
    fr_lo, fr_hi = fr_bounds
    fr0 = float(np.clip(speed / np.sqrt(g * depth_m), fr_lo + 0.01, fr_hi - 0.01))

    def neg(x: np.ndarray) -> float:
        u, fr, d = float(np.exp(x[0])), float(x[1]), float(x[2])
        if not (fr_lo <= fr <= fr_hi and lo_d <= d <= hi_d):
            return 1e9
        s = curve_score(sp, u, d, u * u / (g * fr * fr), g)
        return -s if np.isfinite(s) else 1e9

    x0 = np.array([np.log(speed), fr0, delta_deg])
    res = optimize.minimize(
        neg,
        x0,
        method="Nelder-Mead",
        options={
            "xatol": 1e-3,
            "fatol": 1e-4,
            "initial_simplex": [x0, x0 + [0.01, 0, 0], x0 + [0, 0.02, 0], x0 + [0, 0, 0.5]],
        },
    )
    x = res.x if res.fun <= neg(x0) else x0
    u, fr = float(np.exp(x[0])), float(x[1])
    return DepthFit(u, u * u / (g * fr * fr), float(x[2]), -neg(x))


def curve_points(
    speed: float, depth_m: float, delta_deg: float, *, g: float, k_max: float, step_deg: float = 0.5
) -> tuple[np.ndarray, np.ndarray]:
    """(k_u, k_v) of the steady-wave curve for drawing (rad/m; one half, mirror for the other); NaN beyond k_max."""
    th = np.arange(-84.0, 84.0 + 1e-9, step_deg)
    k = np.asarray(steady_wavenumber(speed, np.abs(th), depth_m, g=g), float)
    k = np.where(k <= k_max, k, np.nan)
    a = np.radians(th + delta_deg)
    return k * np.cos(a), k * np.sin(a)
