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
    # pressure on the padded grid, centred at the vessel, coordinates wrapped (periodic)
    xs = np.arange(px) - vessel_xy_m[0] / dx_m
    ys = np.arange(py) - vessel_xy_m[1] / dy_m
    xs = (xs + px / 2) % px - px / 2
    ys = (ys + py / 2) % py - py / 2
    X = xs[None, :] * dx_m
    Y = -ys[:, None] * dy_m  # y up
    p = hull_pressure(X, Y, (ux, uy), hull, g=g)
    p_hat = sfft.rfft2(p, workers=-1)
    kx = 2 * np.pi * sfft.rfftfreq(px, dx_m)[None, :]
    ky_rows = 2 * np.pi * sfft.fftfreq(py, dy_m)[:, None]
    ky = -ky_rows  # rows grow downward, y grows upward
    kmag = np.hypot(kx, ky)
    kh = kmag * depth_m if np.isfinite(depth_m) else None
    K = kmag * (np.tanh(kh) if kh is not None else 1.0)
    omega = speed_mps * (kx * ux + ky * uy)
    eps = damping * speed_mps * 2 * np.pi / (max(px * dx_m, py * dy_m))
    denom = g * K - (omega + 1j * eps) ** 2
    eta_hat = -(p_hat / RHO_SEAWATER) * K / denom
    eta_hat[0, 0] = -p_hat[0, 0] / (RHO_SEAWATER * g)
    # anti-alias: taper the top octave of wavenumbers
    kmax = np.pi / max(dx_m, dy_m)
    eta_hat *= np.clip((kmax - kmag) / (0.3 * kmax), 0.0, 1.0)
    out = [sfft.irfft2(eta_hat, s=(py, px), workers=-1)[:ny, :nx]]
    if with_slopes:
        out.append(sfft.irfft2(1j * kx * eta_hat, s=(py, px), workers=-1)[:ny, :nx])
        out.append(sfft.irfft2(1j * ky * eta_hat, s=(py, px), workers=-1)[:ny, :nx])
    return out[0] if not with_slopes else (out[0], out[1], out[2])
