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


def _group_medians(values: np.ndarray, groups: np.ndarray, n_groups: int) -> tuple[np.ndarray, np.ndarray]:
    """Median of each group (NaN for an empty one) and the group sizes; one sort for all groups."""
    by_value = np.argsort(values)
    # a stable sort of small integer labels is a radix sort: twice as fast as lexsort here
    labels = groups[by_value].astype(np.int16 if n_groups < 2**15 else np.int64)
    order = by_value[np.argsort(labels, kind="stable")]
    v = values[order]
    counts = np.bincount(groups, minlength=n_groups)
    start = np.concatenate([[0], np.cumsum(counts)[:-1]])
    lo = start + np.maximum(counts - 1, 0) // 2
    hi = start + counts // 2
    filled = counts > 0
    med = np.full(n_groups, np.nan)
    med[filled] = 0.5 * (v[lo[filled]] + v[np.minimum(hi[filled], v.size - 1)])
    return med, counts


def group_median_spread(
    values: np.ndarray, groups: np.ndarray, n_groups: int, *, min_count: int = 1, floor: float = 1e-9
) -> tuple[np.ndarray, np.ndarray]:
    """:func:`median_spread` of every group at once (``groups``: integer labels 0..n_groups-1, same shape as
    ``values``). Groups with fewer than ``min_count`` members get median 0 and spread 1."""
    v = np.asarray(values, dtype=float).ravel()
    g = np.asarray(groups).ravel()
    med, counts = _group_medians(v, g, n_groups)
    mad, _ = _group_medians(np.abs(v - np.nan_to_num(med)[g]), g, n_groups)
    spread = MAD_TO_SIGMA * mad
    spread = np.where(spread > 0, spread, floor)
    small = counts < min_count
    return np.where(small, 0.0, med), np.where(small, 1.0, spread)
