"""Samples along the same fan of rays from many whole-pixel origins at once.

The line search scores the fan of rays (every direction, every distance) from hundreds of water points to learn
the scene's own lines.  From a whole-pixel origin every ray sample lies at the same offset from its origin,
with the same fractional part: the four bilinear neighbours and their weights, and the nearest pixel for the
validity, are computed once for the fan, and each origin is a shift of one flat index into an image padded by
the fan's reach.  The values equal scipy's ``map_coordinates(order=1, mode="constant", cval=0)`` to rounding
(a few units of the image type's last place: the fractional parts are those of the offsets, not of each origin
plus offset, and a single-precision image is weighted in single precision) and the validity equals
:func:`nearest_valid` (scipy's nearest sampling) exactly (tests/test_wakeline_batch.py); it is only faster.
"""

from __future__ import annotations

import numpy as np


class RayFan:
    """The rays at ``angles_deg`` (image angles, counter-clockwise from the column axis) and distances ``r``
    (pixels) on ``img`` with validity ``valid``, for origins on whole pixels."""

    def __init__(self, img: np.ndarray, valid: np.ndarray, angles_deg: np.ndarray, r: np.ndarray):
        h, w = img.shape
        a = np.radians(np.asarray(angles_deg, float))[:, None]
        r = np.asarray(r, float)[None, :]
        dr, dc = -(r * np.sin(a)), r * np.cos(a)  # as wakeline._rays: rows = origin - r sin, cols = origin + r cos
        reach = int(np.ceil(max(np.abs(dr).max(initial=0.0), np.abs(dc).max(initial=0.0)))) + 2
        self.pad, self.h, self.w = reach, h, w
        self.width = w + 2 * reach
        size = (h + 2 * reach) * self.width
        padded = np.zeros((h + 2 * reach, self.width), img.dtype)
        padded[reach : reach + h, reach : reach + w] = img
        self.img = padded.ravel()
        self.dtype = img.dtype
        # bilinear: the upper-left neighbour's offset and the weights of the four
        r0, c0 = np.floor(dr), np.floor(dc)
        fr, fc = dr - r0, dc - c0
        self.off = (r0 * self.width + c0).astype(np.intp)
        # the weights in the image's type when it is single precision: the products then stay single (a third
        # faster; the values differ from a double sum by a unit or two of the image's last place)
        wt = np.float32 if img.dtype == np.float32 else np.float64
        self.weights = tuple(x.astype(wt) for x in ((1 - fr) * (1 - fc), (1 - fr) * fc, fr * (1 - fc), fr * fc))
        # validity: the nearest pixel (ties round up), and a sample within half a pixel of an edge row or column
        # is outside when it lies beyond that row's or column's centre; the origin that puts the sample there is
        # known, so the test is the one the per-origin sum makes, rounding included
        nr, nc = np.floor(dr + 0.5), np.floor(dc + 0.5)
        side_r = _side(dr, nr, h)
        side_c = _side(dc, nc, w)
        # offsets within rounding of a half pixel (rays at 30 or 60 degrees from an axis reach them): which pixel
        # is nearest depends on the origin's own rounding, so these few are looked up origin by origin
        tie = (np.abs(dr + 0.5 - np.round(dr + 0.5)) < 1e-9) | (np.abs(dc + 0.5 - np.round(dc + 0.5)) < 1e-9)
        self.ties = np.nonzero(tie)
        self.tie_d = (dr[tie], dc[tie])
        self.mask = valid
        self.near = ((side_r * 3 + side_c) * size + nr * self.width + nc).astype(np.intp)
        base = np.zeros((h + 2 * reach, self.width), bool)
        base[reach : reach + h, reach : reach + w] = valid
        masks = []
        for sr in range(3):
            for sc in range(3):
                m = base.copy()
                if sr == 0:
                    m[reach, :] = False  # before the first row's centre: outside
                if sr == 2:
                    m[reach + h - 1, :] = False  # past the last row's centre
                if sc == 0:
                    m[:, reach] = False
                if sc == 2:
                    m[:, reach + w - 1] = False
                masks.append(m.ravel())
        self.valid = np.concatenate(masks)

    def sample(self, origins_rc: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """(values, validity) of shape (points, angles, distances) for ``origins_rc`` (points, 2) on whole pixels
        within the image."""
        o = np.asarray(origins_rc)
        rows, cols = o[:, 0].astype(np.intp), o[:, 1].astype(np.intp)
        if not (np.array_equal(rows, o[:, 0]) and np.array_equal(cols, o[:, 1])):
            raise ValueError("the fan's origins must lie on whole pixels")
        if rows.size and (rows.min() < 0 or cols.min() < 0 or rows.max() >= self.h or cols.max() >= self.w):
            raise ValueError("the fan's origins must lie within the image")
        at = ((rows + self.pad) * self.width + cols + self.pad)[:, None, None]
        i = at + self.off
        img, w, wd = self.img, self.weights, self.width
        vals = w[0] * img[i] + w[1] * img[i + 1] + w[2] * img[i + wd] + w[3] * img[i + wd + 1]
        ok = self.valid[at + self.near]
        if self.ties[0].size:
            ok[:, self.ties[0], self.ties[1]] = nearest_valid(
                self.mask, rows[:, None] + self.tie_d[0][None], cols[:, None] + self.tie_d[1][None]
            )
        return vals.astype(self.dtype, copy=False), ok


def _side(d: np.ndarray, n: np.ndarray, size: int) -> np.ndarray:
    """For offsets ``d`` whose nearest whole offset is ``n``: 0 where the sample whose nearest pixel is the first
    (index 0) lies before its centre, 2 where the one whose nearest pixel is the last (``size - 1``) lies past
    its centre, else 1; computed as origin + offset in double precision, as the sampling of one origin does."""
    before = (-n + d) < 0.0
    past = ((size - 1) - n + d) > (size - 1)
    return np.where(before, 0, np.where(past, 2, 1)).astype(np.intp)


def nearest_valid(mask: np.ndarray, rows: np.ndarray, cols: np.ndarray) -> np.ndarray:
    """``mask`` at the nearest pixel, False outside the pixel centres' extent: the same as scipy's
    ``map_coordinates(mask, ..., order=0, mode="constant", cval=0)`` (ties round up; tests/test_wakeline_batch.py
    holds them equal), by a lookup three times faster."""
    h, w = mask.shape
    inside = (rows >= 0) & (rows <= h - 1) & (cols >= 0) & (cols <= w - 1)
    ri = np.where(inside, np.floor(rows + 0.5), 0).astype(np.intp)
    ci = np.where(inside, np.floor(cols + 0.5), 0).astype(np.intp)
    return inside & mask[ri, ci]
