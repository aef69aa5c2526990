"""A found vessel's position refined at full resolution: the centre of its hull's outline.

The vessel finder searches fine pixels on a coarser grid and places a candidate at the peak of the hull's
signal.  That peak lies wherever a hull is brightest (a white bridge, the sunlit side, the bow's foam), up
to half a hull's length from its centre.  Here the candidate's neighbourhood is read at full resolution and
the hull is taken as the connected pixels around that peak whose excess over the water is at least a share
of the peak's excess (an outline at a fixed fraction of the peak contrast, as a half-maximum width is taken;
common practice, no source); its centre is the centroid of that outline, as an analyst's hull outline has
one.  The lowest share whose outline looks like a hull is taken: closed, convex enough, not fading into a
foam trail, and resolved across.  At fine pixels thin bright lines (wave crests, foam streaks) are first
removed by the same grey-level opening the finder uses (Serra 1982).

Measured against the COCO hull outlines of the real Sentinel-2 ports and against synthetic fleets of known
truth at 0.5-10 m (benchmarks/vessel_finder_sweep.py).
"""

from __future__ import annotations

import dataclasses
import math

import cv2
import numpy as np
from scipy import ndimage
from skimage.measure import regionprops

from ..scene import geodesy
from ..scene.raster import Scene
from .blob_shape import blob_shape, end_means
from .pixels import index_to_scene, scene_to_index
from .tuning import DEFAULT_TUNING, Tuning


def opened(band: np.ndarray, k: int) -> np.ndarray:
    """A grey-level opening by a k x k square: what is at least k pixels wide stays, thinner bright lines go
    (Serra 1982, Image Analysis and Mathematical Morphology, the opening as a size filter).  The dilation's
    anchor mirrors the erosion's: with an even k, OpenCV's opening (one anchor for both) would shift everything
    by a pixel.  k < 2 leaves the band as it is."""
    if k < 2:
        return band
    box = np.ones((k, k), np.uint8)
    eroded = cv2.erode(band.astype(np.float32, copy=False), box, anchor=(k // 2, k // 2))
    return cv2.dilate(eroded, box, anchor=(k - 1 - k // 2, k - 1 - k // 2))


def centre_of_hull(
    img: np.ndarray,
    ok: np.ndarray,
    at: tuple[float, float],
    reach_px: float,
    near_px: float,
    t: Tuning = DEFAULT_TUNING,
) -> tuple[float, float] | None:
    """(col, row) within ``img`` of the hull near ``at`` (col, row): the centroid of the connected pixels
    within ``reach_px`` of ``at`` whose excess over the water (the median of the valid pixels beyond
    ``reach_px``) is at least a share of the peak excess found within ``near_px`` of ``at``.

    The shares (finder_refine_shares) are tried in turn until those pixels form a hull's outline: closed within
    ``reach_px`` (a wake's crests, a foam trail or a quay run on), solid (finder_refine_solidity, or the lower
    finder_refine_solidity_small for outlines too small to show their shape in pixels: a hull joined to a crest or
    an arm is not convex) and not fading from one end to the other (finder_trail_fade: a hull with the
    foam trail it leads).  None where nothing there stands above the water, no share gives an outline, or the
    outline is narrower than finder_refine_min_width_px (a hull blurred into the sensor's point spread, or a foam
    streak: the finder's peak is then the better centre)."""
    rows, cols = np.indices(img.shape)
    dist = np.hypot(cols - at[0], rows - at[1])
    ring = ok & (dist > reach_px)
    near = ok & (dist <= near_px)
    if ring.sum() < 20 or not near.any():
        return None
    excess = img.astype(np.float64) - float(np.median(img[ring]))
    peak = float(np.max(excess[near]))
    if not peak > 0:
        return None
    # the peak nearest ``at`` where several pixels share it (a saturated hull and crests)
    pk = np.unravel_index(int(np.argmin(np.where(near & (excess >= peak), dist, np.inf))), img.shape)
    inside = ok & (dist <= reach_px)
    for share in t.finder_refine_shares:
        lab, _ = ndimage.label(inside & (excess >= share * peak), structure=np.ones((3, 3)))
        hull = lab == lab[pk]
        if np.any(dist[hull] > reach_px - 1.5) or _fades(hull, excess, t):
            continue
        props = regionprops(hull.astype(np.uint8))[0]
        small = props.area < t.finder_refine_solidity_min_px
        if props.solidity >= (t.finder_refine_solidity_small if small else t.finder_refine_solidity):
            if props.axis_minor_length < t.finder_refine_min_width_px:
                return None  # not resolved across: its peak is the better centre
            row, col = props.centroid
            return float(col), float(row)
    return None


def _fades(hull: np.ndarray, excess: np.ndarray, t: Tuning) -> bool:
    """Whether an elongated outline (finder_trail_min_elongation) is brighter at one end than at the other by
    finder_trail_fade (mean excess of the end thirds along its long axis): a hull leading its foam trail."""
    rr, cc = np.nonzero(hull)
    if rr.size < t.finder_trail_min_px:
        return False
    length, width, axis = blob_shape(rr, cc, 1.0)
    if length < t.finder_trail_min_elongation * width:
        return False
    _, lo, hi = end_means(rr, cc, excess[rr, cc], axis)
    return max(lo, hi) >= t.finder_trail_fade * max(min(lo, hi), 1e-12)


def refined(
    scene: Scene,
    cand,
    band: int,
    radar: bool,
    radar_db: bool,
    m_px: float,
    t: Tuning = DEFAULT_TUNING,
    held: tuple[tuple[int, int], np.ndarray, np.ndarray] | None = None,
):
    """``cand`` (a VesselCandidate) moved to the centre of its hull's outline in ``band`` at full resolution
    (``m_px`` metres per pixel); unchanged where no outline is found.  ``held``: (origin col, row), that band
    and its valid mask for a window already read at full resolution, used where it covers the neighbourhood
    (else the neighbourhood is read).  ``radar``: a radar band (speckle is averaged over 3 x 3 pixels first);
    ``radar_db``: it holds decibels (the outline is taken in intensity)."""
    # no farther than the longest hull the finder keeps (a wake's whole object can be kilometres long)
    reach_m = min(t.finder_refine_reach * cand.reach_m + t.finder_merge_m, t.finder_max_length_m)
    reach = max(reach_m, t.finder_refine_min_m) / m_px
    big = int(math.ceil(2 * reach)) + 1
    col, row = int(cand.px[0]), int(cand.px[1])
    c0, r0 = max(col - big, 0), max(row - big, 0)
    c1, r1 = min(col + big + 1, scene.width), min(row + big + 1, scene.height)
    if held is not None and _covers(held, (c0, r0, c1, r1)):
        (hc, hr), arr, ok = held
        img, valid = arr[r0 - hr : r1 - hr, c0 - hc : c1 - hc], ok[r0 - hr : r1 - hr, c0 - hc : c1 - hc]
    else:
        data, valids = scene.read(window=(c0, r0, c1 - c0, r1 - r0), bands=(band,))
        img, valid = data[0], valids[0]
    img = img.astype(np.float64)
    if radar_db:
        img = np.power(10.0, np.clip(img, -100.0, 100.0) / 10.0)
    img = opened(np.where(valid, img, 0.0), int(round(t.finder_solid_m / m_px)))
    if radar:
        # speckle: the mean of 3 x 3 pixels (a boxcar multilook, the simplest speckle filter; Lee 1980, Digital
        # image enhancement and noise filtering by use of local statistics, IEEE PAMI 2(2)) before the outline
        img = cv2.blur(img.astype(np.float32), (3, 3)).astype(np.float64)
    near = max(3.0, 0.5 * cand.length_m / m_px)
    ir, ic = scene_to_index((c0, r0), 1, *cand.px)
    c = centre_of_hull(img, valid, (ic, ir), reach, near, t)
    if c is None:
        return cand
    col_f, row_f = index_to_scene((c0, r0), 1, c[1], c[0])
    lonlat = cand.lonlat
    if lonlat is not None:
        lon, lat = geodesy.pixel_to_lonlat(scene.georef, col_f, row_f)
        lonlat = (float(lon), float(lat))
    return dataclasses.replace(cand, px=(col_f, row_f), lonlat=lonlat)


def _covers(held: tuple[tuple[int, int], np.ndarray, np.ndarray], box: tuple[int, int, int, int]) -> bool:
    (hc, hr), arr, _ = held
    return hc <= box[0] and hr <= box[1] and box[2] <= hc + arr.shape[1] and box[3] <= hr + arr.shape[0]
