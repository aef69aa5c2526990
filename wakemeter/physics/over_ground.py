"""Speed over ground from speed through the water and a water current, and the chance of exceeding a limit.

A wake measures the vessel's speed *through the water*; a limit is often set *over ground*.  With a current
the two differ by vector addition (velocity over ground = velocity through the water + velocity of the
water; Bowditch, *The American Practical Navigator*, the current triangle, from memory).  Everything is
propagated by Monte Carlo (JCGM 101:2008): the speed is drawn from two half normals fitted to its 95 %
interval (the intervals of the analysis can be asymmetric), the heading, current speed and the direction
the current sets toward from normals.

The probability of exceeding a limit is the fraction of draws above it, and the one-sided 95 % lower
bound is the 5th percentile of the draws: for a normal speed N(U, s) these are Phi((U - L)/s) and
U - 1.6449 s (the normal quantile z_0.95 = 1.6449, Abramowitz & Stegun 1964, table 26.1).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import ParameterError

Z95 = 1.959963984540054  #: two-sided 95 % normal quantile


def split_normal_draws(centre: float, low95: float, high95: float, n: int, rng: np.random.Generator) -> np.ndarray:
    """Draws whose median is ``centre`` and whose 2.5 and 97.5 % points are the given bounds: each side is
    half of a normal with its own spread, taken with probability one half (so the quantiles are exact; the
    density is not continuous at the centre when the sides differ)."""
    if not (np.isfinite(centre) and np.isfinite(low95) and np.isfinite(high95)) or not low95 <= centre <= high95:
        raise ParameterError(f"a speed {centre!r} with 95 % interval {low95!r}-{high95!r} cannot be drawn from")
    s_lo, s_hi = (centre - low95) / Z95, (high95 - centre) / Z95
    if s_lo + s_hi == 0:
        return np.full(n, centre)
    z = rng.standard_normal(n)
    upper = rng.random(n) < 0.5
    return np.where(upper, centre + np.abs(z) * s_hi, centre - np.abs(z) * s_lo)


def add_current(
    speed: np.ndarray, heading_deg: np.ndarray, current_speed: np.ndarray, current_toward_deg: np.ndarray, sign: float
) -> np.ndarray:
    """|speed * (sin h, cos h) + sign * current * (sin c, cos c)|: over ground from through the water with
    sign +1, through the water from over ground with sign -1 (bearings true, clockwise from north)."""
    h, c = np.radians(heading_deg), np.radians(current_toward_deg)
    east = speed * np.sin(h) + sign * current_speed * np.sin(c)
    north = speed * np.cos(h) + sign * current_speed * np.cos(c)
    return np.hypot(east, north)


@dataclass(frozen=True)
class Exceedance:
    """What the draws of a speed say about a limit."""

    median_mps: float
    ci95_mps: tuple[float, float]
    lower95_mps: float  #: one-sided 95 % lower bound: the speed is at least this with 95 % confidence
    probability_over: float  #: fraction of the draws above the limit
    draws: int


def exceedance(draws: np.ndarray, limit_mps: float) -> Exceedance:
    d = np.asarray(draws, float)
    d = d[np.isfinite(d)]
    if d.size < 100:
        raise ParameterError("too few valid draws to judge a limit")
    lo, med, hi, low_bound = np.percentile(d, [2.5, 50.0, 97.5, 5.0])
    return Exceedance(float(med), (float(lo), float(hi)), float(low_bound), float(np.mean(d > limit_mps)), int(d.size))
