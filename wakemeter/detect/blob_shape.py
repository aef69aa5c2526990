"""The shape of a bright blob from its second moments, shared by the hull found near a click (line_chip) and
the vessels found in a whole scene (vessel_finder): a uniform bar of length L has variance L^2 / 12 along it
(the moments of a uniform distribution), so length and width are sqrt(12 x variance) along the principal axes.
"""

from __future__ import annotations

import math

import numpy as np


def blob_shape(rows: np.ndarray, cols: np.ndarray, m_px: float) -> tuple[float, float, float]:
    """(length m, width m, image angle of the long axis in degrees counter-clockwise from the column axis,
    image up positive, 0-180) of the pixels ``rows``, ``cols``; a blob of one or two pixels is one pixel."""
    rows, cols = np.asarray(rows, float), np.asarray(cols, float)
    cov = np.cov(np.vstack([cols, -rows])) if rows.size > 2 else np.eye(2) * 0.1
    evals, evecs = np.linalg.eigh(np.atleast_2d(cov))
    major = evecs[:, -1]
    length = float(np.sqrt(12 * max(evals[-1], 1 / 12))) * m_px
    width = float(np.sqrt(12 * max(evals[0], 1 / 12))) * m_px
    axis = float(np.degrees(np.arctan2(major[1], major[0])) % 180.0)
    return length, width, axis


def end_means(
    rows: np.ndarray, cols: np.ndarray, values: np.ndarray, axis_deg: float
) -> tuple[np.ndarray, float, float]:
    """Each pixel's position along the axis at ``axis_deg`` (as :func:`blob_shape` gives it; image up positive)
    and the mean of ``values`` over the blob's two end thirds along it: (positions, low end, high end).  A hull
    leading its foam trail is brighter at one end (the vessel finder's trail head, the hull's outline)."""
    a = math.radians(axis_deg)
    u = (cols - cols.mean()) * math.cos(a) - (rows - rows.mean()) * math.sin(a)
    lo, hi = u.min(), u.max()
    third = (hi - lo) / 3.0
    return u, float(np.mean(values[u <= lo + third])), float(np.mean(values[u >= hi - third]))
