"""Steady linear wave pattern behind a moving pressure patch, computed in the Fourier domain.

A surface pressure p(x, y) moves at constant velocity U over water of depth h.
In the frame of the water the forced response to a Fourier mode
exp(i(k.x - omega t)) of the moving pressure has omega = k.U and

    eta_hat(k) = - (p_hat(k) / rho) * K(k) / (Omega^2(k) - (k.U + i eps)^2),
    K = |k| tanh(|k| h),  Omega^2 = g K,

where the small positive ``eps`` (Rayleigh damping) is the causal choice: the
pressure switched on in the past, so waves trail behind the patch and none
run ahead (checked in the tests).  At U = 0 this reduces to the hydrostatic
depression eta = -p / (rho g).  The pattern is computed on a padded grid so
that the periodic FFT does not fold the wake back into the picture, and the
damping is tied to the grid so the wake decays before reaching the padding.

References
----------
1. Lamb, H. (1932). *Hydrodynamics*, 6th ed., sections 242-256 (steady
   response to a travelling pressure, Rayleigh's fictitious damping).
2. Havelock, T. H. (1908). *Proc. R. Soc. Lond. A* 81, 398-430 (finite depth).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.fft as sfft

from ..errors import ParameterError, check_positive

RHO_SEAWATER = 1025.0  # kg/m^3


@dataclass(frozen=True)
class Hull:
    """A hull-shaped pressure patch: length and beam (m), pressure head as an equivalent draught (m)."""

    length_m: float = 40.0
    beam_m: float = 8.0
    draught_m: float = 1.0
    edge: float = 0.15  #: softness of the edge as a fraction of the half-length/half-beam

    def __post_init__(self) -> None:
        check_positive("hull length_m", self.length_m)
        check_positive("hull beam_m", self.beam_m)
        check_positive("hull draught_m", self.draught_m)
        if not 0.02 <= self.edge <= 1.0:
            raise ParameterError(f"hull edge softness must be within [0.02, 1], got {self.edge!r}")


def _soft_box(s: np.ndarray, edge: float) -> np.ndarray:
    return 0.5 * (1.0 - np.tanh((np.abs(s) - 1.0) / edge))


def hull_pressure(x: np.ndarray, y: np.ndarray, heading_xy: tuple[float, float], hull: Hull, *, g: float) -> np.ndarray:
    """Pressure (Pa) of the patch at metric positions (x, y) relative to the vessel centre.

    The patch is a rounded box, fuller amidships and tapered toward bow and stern
    so that both transverse and divergent waves appear.
    """
    ux, uy = heading_xy
    along = (x * ux + y * uy) / (hull.length_m / 2)
    across = (-x * uy + y * ux) / (hull.beam_m / 2)
    taper = np.clip(1.0 - along**2, 0.0, None) ** 0.5  # elliptic waterline
    shape = _soft_box(along, hull.edge) * _soft_box(across / np.maximum(taper, 0.05), hull.edge)
    return RHO_SEAWATER * g * hull.draught_m * shape


#: rows or columns transformed at a time (the padded grid is held whole only as its spectrum)
_BLOCK = 256


def _pressure_spectrum(X: np.ndarray, Y: np.ndarray, heading_xy, hull: Hull, g: float) -> np.ndarray:
    """The 2-D real-input transform (rows: all ky; columns: kx >= 0) of the hull's pressure on the padded grid
    whose wrapped metric coordinates are ``X`` (columns) and ``Y`` (rows, up).  The patch is evaluated only
    where it is not zero to within 1e-17 of its peak (tanh edge: 20 edge widths beyond the box)."""
    py, px = Y.size, X.size
    reach = 0.5 * max(hull.length_m, hull.beam_m) * (1.0 + 20.0 * hull.edge) + 2 * max(
        abs(X[1] - X[0]), abs(Y[1] - Y[0])
    )
    cols, rows = np.nonzero(np.abs(X) <= reach)[0], np.nonzero(np.abs(Y) <= reach)[0]
    patch = np.zeros((rows.size, px), np.float32)
    patch[:, cols] = hull_pressure(X[None, cols], Y[rows, None], heading_xy, hull, g=g)
    nkx = px // 2 + 1
    spec = np.zeros((py, nkx), np.complex64)
    spec[rows] = sfft.rfft(patch, axis=1)  # rows without pressure transform to zero
    for c0 in range(0, nkx, _BLOCK):  # then along the columns
        spec[:, c0 : c0 + _BLOCK] = sfft.fft(spec[:, c0 : c0 + _BLOCK], axis=0, workers=-1)
    return spec


def _corner(
    eta_hat: np.ndarray, ny: int, nx: int, px: int, *, kx: np.ndarray | None = None, ky: np.ndarray | None = None
) -> np.ndarray:
    """The top-left ny x nx corner of the inverse transform of ``eta_hat`` (times i kx or i ky for a slope):
    along the columns by blocks keeping only the first ny rows, then along the rows."""
    nkx = eta_hat.shape[1]
    half = np.empty((ny, nkx), np.complex64)
    for c0 in range(0, nkx, _BLOCK):
        part = eta_hat[:, c0 : c0 + _BLOCK]
        if kx is not None:
            part = part * (np.complex64(1j) * kx[None, c0 : c0 + _BLOCK])
        elif ky is not None:
            part = part * (np.complex64(1j) * ky[:, None])
        half[:, c0 : c0 + _BLOCK] = sfft.ifft(part, axis=0, workers=-1)[:ny]
    return sfft.irfft(half, n=px, axis=1)[:, :nx].astype(np.float64)


def kelvin_elevation(
    shape: tuple[int, int],
    *,
    dx_m: float,
    dy_m: float,
    vessel_xy_m: tuple[float, float],
    speed_mps: float,
    heading_xy: tuple[float, float],
    hull: Hull,
    depth_m: float = np.inf,
    g: float,
    pad: int = 4,
    damping: float = 0.5,
    with_slopes: bool = False,
) -> np.ndarray | tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Surface elevation (m) of the steady wake on a metric grid.

    Parameters
    ----------
    shape : (ny, nx)
        Output grid; row 0 is the top (largest y), columns grow with x.
    dx_m, dy_m : float
        Grid spacing (m) along x (columns) and y (rows, upward).
    vessel_xy_m : (x, y)
        Vessel centre in metres from the top-left grid corner (x right, y **down** = row direction).
    speed_mps : float
        Speed through the water, > 0.
    heading_xy : (ux, uy)
        Unit direction of travel in the grid: ux to the right, uy **up**.
    hull : Hull
        The pressure patch.
    depth_m : float
        Water depth; ``np.inf`` for deep water.
    pad : int
        The FFT grid is ``pad`` times the output in each direction (>= 2 avoids wrap-around).
    damping : float
        Rayleigh damping in units of the grid's frequency resolution (larger = shorter wake).
    with_slopes : bool
        Also return d(eta)/dx and d(eta)/dy (y up), computed spectrally.
    """
    ny, nx = shape
    if ny < 8 or nx < 8:
        raise ParameterError(f"shape must be at least 8 x 8 pixels, got {shape!r}")
    check_positive("dx_m", dx_m)
    check_positive("dy_m", dy_m)
    check_positive("speed_mps", speed_mps)
    check_positive("depth_m", depth_m, allow_inf=True)
    if pad < 1 or damping <= 0:
        raise ParameterError(f"pad must be >= 1 and damping > 0, got {pad!r}, {damping!r}")
    ux, uy = heading_xy
    norm = np.hypot(ux, uy)
    if not np.isfinite(norm) or norm == 0:
        raise ParameterError(f"heading_xy must be a non-zero direction, got {heading_xy!r}")
    ux, uy = ux / norm, uy / norm
    py, px = ny * pad, nx * pad
    py, px = sfft.next_fast_len(py), sfft.next_fast_len(px)
    # pressure on the padded grid, centred at the vessel, coordinates wrapped (periodic); pixel i's centre lies
    # i + 0.5 pixels from the grid's corner
    xs = np.arange(px) + 0.5 - vessel_xy_m[0] / dx_m
    ys = np.arange(py) + 0.5 - vessel_xy_m[1] / dy_m
    xs = (xs + px / 2) % px - px / 2
    ys = (ys + py / 2) % py - py / 2
    X = xs * dx_m
    Y = -ys * dy_m  # y up
    # single precision, by blocks: the padded grid of a 1024^2 scene is 4096^2, and only its spectrum (67 MB)
    # is ever held whole
    spec = _pressure_spectrum(X, Y, (ux, uy), hull, g)
    p00 = complex(spec[0, 0])
    kx = (2 * np.pi * sfft.rfftfreq(px, dx_m)).astype(np.float32)
    ky = (-2 * np.pi * sfft.fftfreq(py, dy_m)).astype(np.float32)  # rows grow downward, y grows upward
    eps = damping * speed_mps * 2 * np.pi / (max(px * dx_m, py * dy_m))
    kmax = np.float32(np.pi / max(dx_m, dy_m))
    for r0 in range(0, py, _BLOCK):  # eta = -(p / rho) K / (g K - (omega + i eps)^2), tapered near Nyquist
        kyb = ky[r0 : r0 + _BLOCK, None]
        kmag = np.hypot(kx[None, :], kyb)
        K = kmag * np.tanh(kmag * np.float32(depth_m)) if np.isfinite(depth_m) else kmag
        omega = ((speed_mps * ux) * kx[None, :] + (speed_mps * uy) * kyb).astype(np.complex64)
        denom = g * K - (omega + np.complex64(1j * eps)) ** 2
        taper = np.clip((kmax - kmag) / (np.float32(0.3) * kmax), 0.0, 1.0)
        spec[r0 : r0 + _BLOCK] *= (np.float32(-1.0 / RHO_SEAWATER) * K * taper) / denom
    spec[0, 0] = -p00 / (RHO_SEAWATER * g)  # the mean level (K = 0 there)
    if not with_slopes:
        return _corner(spec, ny, nx, px)
    # slopes: d/dx and d/dy (y up) of eta are i kx eta and i ky eta in the spectrum
    gx = _corner(spec, ny, nx, px, kx=kx)
    gy = _corner(spec, ny, nx, px, ky=ky)
    return _corner(spec, ny, nx, px), gx, gy
