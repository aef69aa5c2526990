"""Foam's colour: darker in the near infrared than in the visible, where a hull, a pier or rock is not.

Foam reflects less in the near infrared than in the visible: the light scattered by the bubbles passes through
water between them, and water absorbs the near infrared (Moore et al. 1998, foam made by a ship's bow: lower
reflectance at the longer wavelengths; Kokhanovsky 2004; Dierssen 2019, whitecaps from the visible to the
shortwave infrared).  Painted steel, concrete and rock are about as bright in the near infrared as in the
visible, or brighter.  So, in a file with near-infrared and visible bands, the share

    (excess over the water in the near infrared) / (mean excess over the water in the visible bands)

of a bright object's pixels tells foam (on the shared real Sentinel-2 data: foam tails and wake lines
0.45-0.87) from a hull, a pier or a rocky islet (1.06-2.8).  ``streak_nir_share_max`` (0.9) is the bound.

Foam is also nearly white in the visible: its reflectance is about 40 % across the visible (Dierssen 2019), and
for ship-made foam "the spectral reflectance values tend to equalize" there, thin residual foam reflecting
less at the longer wavelengths (Moore et al. 1998), so its excess over the water in green and red is at most
about that in blue.  A bright line seen through the water (a shallow sandy bottom, a bloom or a
plume) is not: the water absorbs its red, and a bottom a few metres down is brightest in green.  On the shared
real data foam lines' green/blue excess was 0.79-1.08 and red/blue 0.52-0.96; lines over shallow turquoise
water beside islets 1.30-1.53 green/blue or 0.09 red/blue (``foam_green_blue_max``, ``foam_red_blue_min``).

References
----------
1. Moore, K. D., Voss, K. J. & Gordon, H. R. (1998). Spectral reflectance of whitecaps: instrumentation,
   calibration, and performance in coastal waters. *J. Atmos. Oceanic Technol.* 15(2), 496-509.
2. Kokhanovsky, A. A. (2004). Spectral reflectance of whitecaps. *J. Geophys. Res.* 109, C05021.
3. Dierssen, H. M. (2019). Hyperspectral measurements, parameterizations, and atmospheric correction of
   whitecaps and foam from visible to shortwave infrared for ocean color remote sensing. *Front. Earth Sci.*
   7, 14.
"""

from __future__ import annotations

import numpy as np

from .line_chip import LineChip
from .tuning import Tuning


def _excess(chip: LineChip, ys: np.ndarray, xs: np.ndarray, rc: tuple[float, float], t: Tuning):
    """A function of a band index: the summed excess of the pixels ``ys``, ``xs`` over the water around ``rc``."""
    sp = chip.spectral
    assert sp is not None
    n = chip.img.shape[0]
    rr, cc = np.mgrid[:n, :n]
    d = np.hypot(rr - rc[0], cc - rc[1])
    ring = chip.valid & (d > t.streak_ring_inner_px) & (d < t.streak_ring_outer_px)

    def excess(b: int) -> float:
        band = sp.pixels[b]
        return float(np.sum(band[ys, xs] - np.median(band[ring])))

    return excess


def nir_share(chip: LineChip, ys: np.ndarray, xs: np.ndarray, rc: tuple[float, float], t: Tuning) -> float | None:
    """The excess over the water around ``rc`` of the pixels ``ys``, ``xs`` in the near infrared, over their mean
    excess in the visible bands; None without both kinds of band or without a visible excess."""
    sp = chip.spectral
    if sp is None:
        return None
    excess = _excess(chip, ys, xs, rc, t)
    vis = float(np.mean([excess(b) for b in sp.visible]))
    return excess(sp.nir) / vis if vis > 0 else None


def visible_tilt(
    chip: LineChip, ys: np.ndarray, xs: np.ndarray, rc: tuple[float, float], t: Tuning
) -> tuple[float, float] | None:
    """(green over blue, red over blue): the pixels' excess over the water around ``rc`` in the green and red
    bands, each over their excess in the blue; None without the three bands named or without a blue excess."""
    sp = chip.spectral
    if sp is None or any(b is None for b in sp.colours):
        return None
    blue, green, red = sp.colours
    assert blue is not None and green is not None and red is not None
    excess = _excess(chip, ys, xs, rc, t)
    b = excess(blue)
    return (excess(green) / b, excess(red) / b) if b > 0 else None


def ray_pixels(
    chip: LineChip, start_rc: tuple[float, float], angle_deg: float, r0: float, length_px: float
) -> tuple[np.ndarray, np.ndarray] | None:
    """The open-water pixels (rows, cols; nearest pixels) along the ray from ``start_rc`` at image angle
    ``angle_deg``, from ``r0`` to ``r0 + length_px`` pixels out; None when none is open water."""
    a = np.radians(angle_deg)
    rs = np.arange(r0, r0 + length_px)
    rr = np.round(start_rc[0] - rs * np.sin(a)).astype(int)
    cc = np.round(start_rc[1] + rs * np.cos(a)).astype(int)
    n = chip.img.shape[0]
    inside = (rr >= 0) & (rr < n) & (cc >= 0) & (cc < n)
    rr, cc = rr[inside], cc[inside]
    keep = chip.valid[rr, cc]
    return (rr[keep], cc[keep]) if keep.any() else None


def line_nir_share(
    chip: LineChip, start_rc: tuple[float, float], angle_deg: float, r0: float, length_px: float, t: Tuning
) -> float | None:
    """:func:`nir_share` of the open-water pixels along the ray from ``start_rc`` at image angle ``angle_deg``,
    from ``r0`` to ``r0 + length_px`` pixels out (nearest pixels), against the water around ``start_rc``."""
    px = ray_pixels(chip, start_rc, angle_deg, r0, length_px)
    return None if px is None else nir_share(chip, px[0], px[1], start_rc, t)
