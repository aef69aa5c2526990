"""Robust location and spread, shared by every detector that compares a value with its background."""

from __future__ import annotations

import numpy as np

#: MAD -> standard deviation for normal data, 1 / Phi^-1(3/4) (Rousseeuw & Croux 1993, J. Am. Stat. Assoc. 88)
MAD_TO_SIGMA = 1.4826


def median_spread(values: np.ndarray, *, floor: float = 1e-9) -> tuple[float, float]:
    """Median and robust spread (scaled median absolute deviation) of ``values``; a zero spread becomes
    ``floor`` so that standardised scores stay finite."""
    med = float(np.median(values))
    return med, float(MAD_TO_SIGMA * np.median(np.abs(values - med))) or floor
