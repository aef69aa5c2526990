"""Finding vessels in a whole scene, window by window (never the whole raster in memory).

Radar: a cell-averaging constant-false-alarm-rate detector on the sea clutter (Gandhi & Kassam 1988): each
pixel is compared with the clutter around it (a background ring outside a guard window that holds the
hull), and the clutter is modelled as gamma distributed intensity with the equivalent number of looks
estimated from the ring (mean^2 / variance; Oliver & Quegan 1998, Understanding SAR Images, from memory).
The threshold gives the requested false-alarm rate per km^2 of sea.

Optical: a local-background anomaly over water: every band is standardised on the ring around each pixel
(robust to the hull: the guard window is left out) and the largest standardised excess of the near-infrared
and visible bands is thresholded at the normal tail of the same per-pixel rate.  Water is told by NDWI
(McFeeters 1996) where a green and a near-infrared band are named, else by the ring's own statistics;
land, quays and harbour walls (wide or long dry or bright areas) and lone bright pixels are rejected.

Detections joined by pixels above half the threshold are one object (hysteresis, as in Canny 1986): the
weaker parts of a hull with its foam, wake or plume are not vessels of their own.  A hull under way leads a
trail of foam that fades aft, and fresh foam can outshine a hull that covers its pixels only in part, so in an
elongated detection whose one end is clearly brighter the hull is sought at that end.

Each candidate gets its position (pixel, longitude and latitude), length, width and orientation from the
blob's second moments in metres, a score (its peak in clutter standard units) and the false-alarm
probability per pixel at that score.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Callable
from concurrent.futures import ThreadPoolExecutor
from dataclasses import dataclass

import cv2
import numpy as np
from scipy import ndimage, stats

from ..errors import CancelledError, ParameterError
from ..scene import display, geodesy
from ..scene.land_layer import LandLayer
from ..scene.raster import Scene, one_pass_cache
from ..scene.sensor import BandRole, band_roles
from .blob_shape import blob_shape, end_means
from .hull_centre import opened, refined
from .line_chip import green_nir_bands
from .pixels import index_to_scene
from .tuning import DEFAULT_TUNING, Tuning

#: windows are read this many pixels square, plus the margin on every side
TILE = 1024
#: masks with at most this share of a window's pixels are worked on pixel by pixel (speed only, same result)
_FEW_PIXELS_SHARE = 0.02
#: default false-alarm rate per km^2 of sea (common practice for ship detection: 1e-6 to 1e-8 per pixel at
#: 10-20 m pixels, i.e. roughly 1e-2 to 1e-4 per km^2; no single source)
PFA_PER_KM2 = 1e-3


@dataclass(frozen=True)
class VesselCandidate:
    px: tuple[float, float]  #: (col, row), scene pixels
    lonlat: tuple[float, float] | None
    length_m: float
    width_m: float
    orientation_deg: float  #: true bearing of the long axis, 0-180
    score: float  #: peak excess in clutter standard units (optical) or CFAR ratio in its own units (radar)
    pfa: float  #: false-alarm probability per pixel at that score
    pixels: int  #: pixels of the hull (the brightest part of the detection)
    merged: int = 0  #: other detections folded into this vessel (its wake, foam or plume, or a second look)
    #: length of the detection where the hull is sought (the whole of an evenly bright one, the head of a
    #: fading trail): how far its outline is followed at full resolution (hull_centre.py)
    reach_m: float = dataclasses.field(default=0.0, compare=False)

    def to_json(self) -> dict:
        return {
            "px": list(self.px),
            "lonlat": None if self.lonlat is None else list(self.lonlat),
            "length_m": self.length_m,
            "width_m": self.width_m,
            "orientation_deg": self.orientation_deg,
            "score": self.score,
            "pfa": self.pfa,
            "pixels": self.pixels,
            "merged": self.merged,
        }


class _Ring:
    """Mean and standard deviation of the valid pixels in the ring between the guard and background windows.

    The clutter varies slowly against the ring's size, so the sums are taken on blocks of about a sixth of
    the guard window and the ring on that coarse grid (to within a block of the exact ring), then spread back
    to the pixels: the cost no longer grows with the window sizes.  The count of valid pixels is shared by
    every band of a window."""

    def __init__(self, valid: np.ndarray, guard: int, back: int):
        self.f = f = max(1, guard // 6)
        self.h, self.w = valid.shape
        self.hh, self.ww = -(-self.h // f) * f, -(-self.w // f) * f
        self.g = max(1, int(round(guard / f)))
        self.bk = max(self.g + 2, int(round(back / f)))
        self.valid = valid
        self.invalid = ~valid
        self.some_invalid = bool(self.invalid.any())
        self.n = np.maximum(self._ring(self._blocks(valid.astype(np.float32))), 1.0)

    def _blocks(self, a: np.ndarray) -> np.ndarray:
        """Sums over f x f blocks (OpenCV's area resampling is the block mean when the size divides)."""
        f = self.f
        if (self.hh, self.ww) == (self.h, self.w):
            pad = a.astype(np.float32, copy=False)  # the blocks divide the window: nothing to pad
        else:
            pad = np.zeros((self.hh, self.ww), np.float32)
            pad[: self.h, : self.w] = a
        if f == 1:
            return pad.astype(np.float64)
        small = cv2.resize(pad, (self.ww // f, self.hh // f), interpolation=cv2.INTER_AREA)
        return small.astype(np.float64) * (f * f)

    def _ring(self, a: np.ndarray) -> np.ndarray:
        g, bk = self.g, self.bk
        return ndimage.uniform_filter(a, size=bk, mode="reflect") * (bk * bk) - ndimage.uniform_filter(
            a, size=g, mode="reflect"
        ) * (g * g)

    def stats(self, img: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        # centred on a typical value first: squares of large numbers would lose the small spread in float32
        k = max(1, int(math.sqrt(self.h * self.w / 10_000)))
        sample = img[::k, ::k][self.valid[::k, ::k]]  # about 10 000 pixels on a regular grid
        offset = float(np.median(sample)) if sample.size else 0.0
        x = np.subtract(img, np.float32(offset), dtype=np.float32)
        if self.some_invalid:
            x[self.invalid] = 0.0  # nodata can be NaN: set, not multiplied
        s1, s2 = self._ring(self._blocks(x)), self._ring(self._blocks(x * x))
        mean = s1 / self.n
        sd = np.sqrt(np.maximum(s2 / self.n - mean * mean, 1e-12))
        # the offset added on the coarse grid (the bilinear enlargement commutes with adding a constant)
        return self._up(mean + offset), self._up(sd)

    def _up(self, a: np.ndarray) -> np.ndarray:
        big = cv2.resize(a.astype(np.float32), (self.ww, self.hh), interpolation=cv2.INTER_LINEAR)
        return big[: self.h, : self.w]


def _ring_stats(img: np.ndarray, valid: np.ndarray, guard: int, back: int) -> tuple[np.ndarray, np.ndarray]:
    return _Ring(valid, guard, back).stats(img)


def find_vessels(
    scene: Scene,
    *,
    area: tuple[int, int, int, int] | None = None,
    pfa_per_km2: float = PFA_PER_KM2,
    radar: bool | None = None,
    progress: Callable[[float], None] | None = None,
    cancelled: Callable[[], bool] | None = None,
    tile: int = TILE,
    tuning: Tuning = DEFAULT_TUNING,
    land: LandLayer | None = None,
) -> list[VesselCandidate]:
    """Every vessel-like target in ``area`` (col, row, width, height; default the whole scene); the finder's
    thresholds are the ``finder_*`` fields of ``tuning``.  ``land``: polygons where no vessel is sought (and
    whose pixels are no sea for the statistics), for scenes whose pixels cannot tell land from water."""
    t = tuning
    if not 0 < pfa_per_km2 < 1e3:
        raise ParameterError(f"the false-alarm rate must be > 0 and below 1000 per km², got {pfa_per_km2}")
    c0, r0, w, h = area if area is not None else (0, 0, scene.width, scene.height)
    c1, r1 = min(c0 + w, scene.width), min(r0 + h, scene.height)
    c0, r0 = max(int(c0), 0), max(int(r0), 0)
    if c1 - c0 < 16 or r1 - r0 < 16:
        raise ParameterError("the area to search is smaller than 16 x 16 pixels")
    frame = scene.local_frame((c0 + c1) / 2, (r0 + r1) / 2)
    m_px = float(math.sqrt(frame.length_of(1, 0) * frame.length_of(0, 1)))
    # fine pixels are searched on a coarser grid (block means of step x step pixels): a hull there is a compact
    # bright blob, the structure of its deck and the crests of its wake averaged out
    step = max(1, int(t.finder_pixel_m / m_px))
    m_px *= step
    tile *= step
    guard, back = _window_px(m_px, t)
    margin = (back // 2 + 1) * step
    pfa_px = min(pfa_per_km2 * (m_px * m_px) / 1e6, 0.01)
    gn = green_nir_bands(scene.info.band_descriptions)
    solid = max(1, int(round(t.finder_solid_m / m_px)))
    bands = _detection_bands(scene)
    nir = _nir_band(scene)
    in_db = False
    if radar is None:
        sample, ok = scene.read(window=(c0, r0, min(c1 - c0, 512), min(r1 - r0, 512)), bands=(1,))
        values = sample[0][ok[0]][:100_000]
        radar = scene.info.count == 1 and display.looks_like_radar(scene.info.dtype, 1, values)
        in_db = radar and display.looks_like_radar_db(scene.info.dtype, 1, values)
    tiles = [(tc, tr) for tr in range(r0, r1, tile) for tc in range(c0, c1, tile)]
    read_bands = tuple(sorted(set(bands) | (set(gn) if gn and not radar else set())))

    def window(tc: int, tr: int) -> tuple[tuple[int, int, int, int], tuple[int, int, int, int]]:
        """The tile's core (col, row, width, height) and the window read for it: the core and its margin."""
        core = (tc, tr, min(tile, c1 - tc), min(tile, r1 - tr))
        w0, h0 = max(tc - margin, 0), max(tr - margin, 0)
        w1, h1 = min(core[0] + core[2] + margin, scene.width), min(core[1] + core[3] + margin, scene.height)
        return core, (w0, h0, (w1 - w0) // step * step, (h1 - h0) // step * step)

    def read(full: tuple[int, int, int, int]) -> tuple[np.ndarray, np.ndarray]:
        return scene.read(window=full, out_shape=(full[3] // step, full[2] // step), bands=read_bands)

    found: list[VesselCandidate] = []
    # each vessel's position is refined to the centre of its hull's outline at full resolution (hull_centre.py:
    # the search grid is coarser at fine pixels, and a hull's brightest point is not its centre), in the near
    # infrared where there is one (foam is darker there)
    band = bands[0] if radar else (nir if nir in bands else bands[0])
    # the next window is read in a second thread while this one is searched (GDAL reads outside the GIL; each
    # thread has its own handle on the file)
    with one_pass_cache(), ThreadPoolExecutor(max_workers=1, thread_name_prefix="finder-read") as reader:
        pending = reader.submit(read, window(*tiles[0])[1])
        for k, (tc, tr) in enumerate(tiles):
            if cancelled is not None and cancelled():
                raise CancelledError("finding vessels was cancelled")
            core, full = window(tc, tr)
            win = full[:2]
            data, valid = pending.result()
            if k + 1 < len(tiles):
                pending = reader.submit(read, window(*tiles[k + 1])[1])
            idx = {b: i for i, b in enumerate(read_bands)}
            ok = np.all(valid, axis=0)
            sea = ok if land is None else ok & ~land.mask(scene.georef, full, ok.shape)
            if radar:
                det, score, pfa_at = _cfar_radar(data[idx[bands[0]]], sea, guard, back, pfa_px)
                water = sea
                locate = score
                link = sea & (score > t.finder_link_share)  # score: intensity over its threshold
            else:
                pix = {b: data[i] for b, i in idx.items()}
                found_here = _optical(pix, ok, sea, gn, bands, nir, (guard, back, solid), pfa_px, m_px, t)
                det, score, pfa_at, link, locate, water = found_here
            link = _bridged(link | det, m_px, t)
            new = _blobs(scene, det, score, locate, pfa_at, water, ok, (win, step), core, m_px, frame, link, radar, t)
            if step == 1:  # the window in hand is at full resolution
                held = ((int(win[0]), int(win[1])), data[idx[band]], ok)
                new = [refined(scene, c, band, radar, in_db, m_px, t, held) for c in new]
                del held  # or this window's pixels would outlive it into the next one's search
            found += new
            if progress is not None:
                progress((k + 1) / len(tiles))
        found = one_per_vessel(found, m_px / step, t)
        if step > 1:  # searched on a coarser grid: each vessel's neighbourhood is read at full resolution
            found = [refined(scene, c, band, radar, in_db, m_px / step, t) for c in found]
    return found


def _optical(pix, ok, sea, gn, bands, nir, sizes, pfa_px, m_px, t: Tuning):
    """Optical detections in one window: (detections, score, pfa_at, object mask, the signal that locates a
    hull, water).  ``pix``: band number to pixels; ``nir``: the near-infrared band or None; ``sizes``: the guard
    and background windows and the opening's width, px."""
    guard, back, solid = sizes
    water = sea.copy()
    if gn is not None:
        g, n = pix[gn[0]], pix[gn[1]]
        # NDWI = (g - n) / (g + n) is positive where g > n (the denominator is positive): the sign is compared
        # without the division
        water &= (g > n) | _islands(ok & (g <= n), m_px, t)
    zs = _anomaly_optical([opened(pix[b], solid) for b in bands], water, guard, back)
    det, score, pfa_at, thr = _threshold(zs, water, pfa_px, m_px, t)
    link = water & (score > t.finder_link_share * thr)
    # the hull is told from its foam in the near infrared, where foam is far darker than a hull
    locate = zs[bands.index(nir)] if nir in bands else score
    return det, score, pfa_at, link, locate, water


def _window_px(m_px: float, t: Tuning) -> tuple[int, int]:
    """The guard and background windows in pixels (odd): their sizes in metres, but at fine pixels no larger
    than finder_guard_max_px (the ring keeps its proportion), or the ring would reach beyond a small scene."""
    guard_m = min(t.finder_guard_m, t.finder_guard_max_px * m_px)
    back_m = guard_m * t.finder_background_m / t.finder_guard_m
    guard = max(3, int(round(guard_m / m_px)) | 1)
    return guard, max(guard + 4, int(round(back_m / m_px)) | 1)


def _bridged(link: np.ndarray, m_px: float, t: Tuning) -> np.ndarray:
    """The object mask with gaps narrower than finder_merge_m closed: the separate crests of one wake, or
    the parts of one hull, are one object."""
    r = int(t.finder_merge_m / (2 * m_px))
    if r < 1:
        return link
    disc = cv2.getStructuringElement(cv2.MORPH_ELLIPSE, (2 * r + 1, 2 * r + 1))
    return cv2.dilate(_u8(link), disc).view(bool)  # 0 and 1 stay 0 and 1


def one_per_vessel(found: list[VesselCandidate], m_px: float, t: Tuning = DEFAULT_TUNING) -> list[VesselCandidate]:
    """One candidate per vessel, strongest first: a candidate is folded into a stronger one (its count of
    ``merged`` goes up) when it lies within that one's hull length plus finder_merge_m (two hulls that close are
    one vessel unless both are resolved, finder_resolved_px long each), or within finder_suppress_m of it and
    below finder_own_share of its score (a faint part of the same vessel: the end of its wake, its true
    position behind a hull a radar shows displaced, its plume)."""
    kept: list[VesselCandidate] = []
    merged: list[int] = []
    for c in sorted(found, key=lambda c: -c.score):
        home = None
        for i, k in enumerate(kept):
            d = math.hypot(c.px[0] - k.px[0], c.px[1] - k.px[1]) * m_px
            resolved = min(c.length_m, k.length_m) >= t.finder_resolved_px * m_px
            if (d <= k.length_m + t.finder_merge_m and not resolved) or (
                d <= t.finder_suppress_m and c.score < t.finder_own_share * k.score
            ):
                home = i
                break
        if home is None:
            kept.append(c)
            merged.append(c.merged)
        else:
            merged[home] += 1 + c.merged
    return [dataclasses.replace(k, merged=n) for k, n in zip(kept, merged)]


def _detection_bands(scene: Scene) -> tuple[int, ...]:
    """Near-infrared and visible bands where named (hulls are bright in both); else every band up to four."""
    roles = band_roles(scene.info.band_descriptions)
    want = sorted(b for r, b in roles.items() if r in (BandRole.NIR, BandRole.RED, BandRole.BLUE))
    return tuple(want) if want else tuple(range(1, min(scene.info.count, 4) + 1))


def _cfar_radar(img, ok, guard, back, pfa_px):
    mean, sd = _ring_stats(img, ok, guard, back)
    looks = np.clip(mean * mean / (sd * sd), 0.5, 50.0)
    # gamma clutter with L looks and the ring's mean: threshold at the isf of the per-pixel rate
    thr = stats.gamma.isf(pfa_px, a=looks, scale=np.maximum(mean, 1e-12) / looks)
    ratio = img / np.maximum(thr, 1e-12)
    det = ok & (img > thr)

    def pfa_at(r: int, c: int) -> float:
        return float(stats.gamma.sf(img[r, c], a=looks[r, c], scale=max(float(mean[r, c]), 1e-12) / looks[r, c]))

    return det, ratio, pfa_at


def _label(mask: np.ndarray, connectivity: int = 8) -> tuple[np.ndarray, int]:
    """Connected regions of a whole window (0: background, 1..n): the regions ``ndimage.label`` finds, numbered
    in OpenCV's order (not always scipy's: the order only breaks ties); OpenCV's labelling is several times
    faster on windows this size."""
    n, lab = cv2.connectedComponents(_u8(mask), connectivity=connectivity, ltype=cv2.CV_32S)
    return lab, int(n) - 1


def _islands(dry: np.ndarray, m_px: float, t: Tuning) -> np.ndarray:
    """Dry patches no larger than a ship that do not touch the window's edge: hulls (a white deck can be as
    'dry' by NDWI as a quay) or rocks, to be judged as targets on the water rather than masked as land."""
    lab, n = _label(dry, connectivity=4)
    if n == 0:
        return np.zeros_like(dry)
    at = _few_pixels(dry)
    sizes = np.bincount(lab.ravel() if at is None else lab[at], minlength=n + 1)
    edge = np.unique(np.concatenate([lab[0], lab[-1], lab[:, 0], lab[:, -1]]))
    small = sizes * m_px * m_px <= t.finder_max_area_m2
    small[0] = False
    small[edge] = False
    return _kept(lab, small, at)


def _u8(mask: np.ndarray) -> np.ndarray:
    """A boolean mask as the 0/1 bytes OpenCV takes, without a copy where it can be."""
    if mask.dtype == bool and mask.flags.c_contiguous:
        return mask.view(np.uint8)
    return mask.astype(np.uint8)


def _few_pixels(mask: np.ndarray) -> tuple[np.ndarray, np.ndarray] | None:
    """(rows, cols) of a mask's pixels where they are few (at most _FEW_PIXELS_SHARE of the window: open sea,
    whose only dry or bright pixels are hulls), else None: work on them alone is then cheaper than a pass over
    the window (speed only; the results are the same)."""
    m8 = _u8(mask)
    if cv2.countNonZero(m8) > _FEW_PIXELS_SHARE * mask.size:
        return None
    pts = cv2.findNonZero(m8)
    if pts is None:
        return np.zeros(0, np.intp), np.zeros(0, np.intp)
    pts = pts.reshape(-1, 2)
    return pts[:, 1], pts[:, 0]


def _boxes(lab: np.ndarray, n: int, at: tuple[np.ndarray, np.ndarray] | None) -> list:
    """Each labelled region's bounding slices, as ``ndimage.find_objects`` gives them (``at``: every labelled
    pixel, or None): from the few pixels themselves where there are few (speed only; the same slices)."""
    if at is None:
        return ndimage.find_objects(lab)
    rr, cc = at
    which = lab[rr, cc]
    order = np.argsort(which, kind="stable")
    rr, cc = rr[order], cc[order]
    starts = np.flatnonzero(np.r_[True, which[order][1:] != which[order][:-1]])
    r0, r1 = np.minimum.reduceat(rr, starts), np.maximum.reduceat(rr, starts) + 1
    c0, c1 = np.minimum.reduceat(cc, starts), np.maximum.reduceat(cc, starts) + 1
    assert starts.size == n  # every region has its pixels among them
    return [(slice(int(a), int(b)), slice(int(c), int(d))) for a, b, c, d in zip(r0, r1, c0, c1)]


def _kept(lab: np.ndarray, keep: np.ndarray, at: tuple[np.ndarray, np.ndarray] | None) -> np.ndarray:
    """The mask of the labelled regions ``keep`` marks (``at``: every labelled pixel, or None)."""
    if at is None:
        return keep[lab]
    out = np.zeros(lab.shape, bool)
    sel = keep[lab[at]]
    out[at[0][sel], at[1][sel]] = True
    return out


def _nir_band(scene: Scene) -> int | None:
    return band_roles(scene.info.band_descriptions).get(BandRole.NIR)


def _anomaly_optical(bands, water, guard, back) -> list[np.ndarray]:
    """Each band standardised on the ring of water around each pixel."""
    ring = _Ring(water, guard, back)
    out = []
    for b in bands:
        mean, sd = ring.stats(b)
        z = np.subtract(b, mean, dtype=np.float32)
        z /= sd
        out.append(z)
    return out


def _threshold(zs, water, pfa_px, m_px: float, t: Tuning):
    """The per-pixel rate at the normal tail, or at the water's own tail when it is heavier (sediment,
    glint and specks make real sea heavier tailed than a normal): an exponential fitted to the excesses
    over the 99th percentile of the window's water (peaks over threshold; Coles 2001, An Introduction to
    Statistical Modeling of Extreme Values, the generalised Pareto with shape 0)."""
    z_max = zs[0]
    for z in zs[1:]:  # pairwise: np.maximum.reduce would first stack the bands into one array
        z_max = np.maximum(z_max, z)
    thr = float(stats.norm.isf(pfa_px))
    tail: tuple[float, float] | None = None
    # censored: what stands out at the normal threshold (hulls, their foam) and its surroundings are left out
    # of the sea's own tail, or a scene holding a large wake would hide its own vessel
    strong = cv2.dilate(_u8(z_max > t.finder_censor_factor * thr), np.ones((7, 7), np.uint8)).view(bool)
    strong |= _wake_objects(z_max, water, thr, m_px, t)
    sea = z_max[water & ~strong]
    if sea.size > 200_000:  # the tail from a regular sample of the sea (its order does not matter)
        sea = sea[:: sea.size // 200_000]
    if sea.size > 2000:
        u = float(np.percentile(sea, 100 * (1 - t.finder_tail_share)))
        excess = sea[sea > u] - u
        # the scale from the median excess (ln 2 times the scale for an exponential): a few huge excesses
        # (hulls, the edges of land) would swell a mean
        beta = float(np.median(excess)) / math.log(2.0) if excess.size else 0.0
        if beta > 0:
            thr_tail = u + beta * math.log(t.finder_tail_share / pfa_px)
            if thr_tail > thr:
                thr, tail = thr_tail, (u, beta)
    det = water & (z_max > thr)

    def pfa_at(r: int, c: int) -> float:
        z = float(z_max[r, c])
        if tail is None:
            return float(stats.norm.sf(z))
        return t.finder_tail_share * math.exp(-min((z - tail[0]) / tail[1], 700.0)) if z > tail[0] else 1.0

    return det, z_max, pfa_at, thr


def _wake_objects(z: np.ndarray, water: np.ndarray, thr: float, m_px: float, t: Tuning) -> np.ndarray:
    """Whole objects around what stands out at the normal threshold: a vessel with its wake, whose crests
    (resolved at fine pixels, as bright as a hull and as many as thousands of pixels) would otherwise be taken
    for the sea's own tail and raise the threshold above the hull (at 0.5 m pixels the wakes of three boats can
    cover a third of the scene).  On the real sea tiles (benchmarks/vessel_finder_sweep.py) this changed no
    candidate: sediment and glint there do not reach the normal threshold in connected patches."""
    objects = _bridged(water & (z > t.finder_censor_grow * thr), m_px, t)
    lab, n = _label(objects)
    if n == 0:
        return np.zeros_like(water)
    at = _few_pixels(objects)
    holds = np.zeros(n + 1, bool)
    if at is None:
        holds[np.unique(lab[z > thr])] = True
    else:
        holds[lab[at][z[at] > thr]] = True
    holds[0] = False
    return _kept(lab, holds, at)


def _trail_head(m: np.ndarray, loc: np.ndarray, t: Tuning) -> np.ndarray:
    """The pixels of a detection (mask ``m``) where its hull can be: all of them, or the leading end of a trail."""
    rr, cc = np.nonzero(m)
    if rr.size < t.finder_trail_min_px:
        return m
    length, width, axis = blob_shape(rr, cc, 1.0)
    if length < t.finder_trail_min_px or length < t.finder_trail_min_elongation * width:
        return m
    u, end_lo, end_hi = end_means(rr, cc, loc[rr, cc], axis)
    lo, hi = u.min(), u.max()
    if max(end_lo, end_hi) < t.finder_trail_fade * max(min(end_lo, end_hi), 1e-9):
        return m  # evenly bright: a long hull, not a fading trail
    keep = (u >= hi - t.finder_trail_head_px) if end_hi > end_lo else (u <= lo + t.finder_trail_head_px)
    head = np.zeros_like(m)
    head[rr[keep], cc[keep]] = True
    return head


def _blobs(
    scene, det, score, locate, pfa_at, water, ok, win, core, m_px, frame, link, radar: bool, t: Tuning
) -> list[VesselCandidate]:
    lab, n = _label(det)
    if n == 0:
        return []
    # a detection's weight in its object: the peak of its score averaged over 3 x 3 pixels (a hull is bright
    # and solid; a crest's fragment as bright but small, a wake's wide patch large but faint)
    boxed = cv2.blur(score.astype(np.float32, copy=False), (3, 3))
    # each detection's object (detections joined above finder_link_share of the threshold) and the object's peak
    groups, n_groups = _label(link | det)
    group_peak = np.full(n_groups + 1, -np.inf)
    np.maximum.at(group_peak, groups[det], score[det])
    # land next to a blob: the blob is a quay edge or a moored hull against it (dry pixels within 2 px)
    land = ok & ~water
    out: list[tuple[int, float, VesselCandidate]] = []  # (object, summed score of the detection, candidate)
    objects = _boxes(lab, n, _few_pixels(det))
    for i, sl in enumerate(objects, start=1):
        if sl is None:
            continue
        m = lab[sl] == i
        npx = int(m.sum())
        if npx < t.finder_min_pixels:
            continue
        r0_, c0_ = max(sl[0].start - 2, 0), max(sl[1].start - 2, 0)
        near = ndimage.binary_dilation(land[r0_ : sl[0].stop + 2, c0_ : sl[1].stop + 2], iterations=2)
        near = near[
            sl[0].start - r0_ : sl[0].start - r0_ + m.shape[0], sl[1].start - c0_ : sl[1].start - c0_ + m.shape[1]
        ]
        if np.mean(near[m]) > t.finder_dry_share_max:
            continue
        # a weak part of a stronger object (its foam, wake or plume) is not a vessel of its own
        blob_peak = float(np.max(score[sl][m]))
        pr0, pc0 = np.unravel_index(int(np.argmax(np.where(m, score[sl], -np.inf))), m.shape)
        strongest = float(group_peak[groups[sl][pr0, pc0]])
        if blob_peak < strongest and blob_peak < t.finder_own_share * strongest:
            continue
        # the hull: the part of the blob above half its peak that holds the peak (foam behind a moving hull is
        # bright too, but less so, above all in the near infrared)
        head = m if radar else _trail_head(m, locate[sl], t)  # foam trails: optical (radar sees no bright foam)
        sub = np.where(head, locate[sl], -np.inf)
        peak = float(sub.max())
        core_lab, _ = ndimage.label(sub >= t.finder_hull_share * peak, structure=np.ones((3, 3)))
        pr, pc = np.unravel_index(int(np.argmax(sub)), sub.shape)
        hull = core_lab == core_lab[pr, pc]
        rr, cc = np.nonzero(hull)
        rr = rr + sl[0].start
        cc = cc + sl[1].start
        npx_core = len(rr)
        # its centre: the peak of the hull's signal, to a fraction of a pixel by the weighted centre of the 3 x 3
        # pixels around it (foam behind the hull is fainter, but would pull a centre of the whole blob aft)
        r_pk, c_pk = int(rr[np.argmax(locate[rr, cc])]), int(cc[np.argmax(locate[rr, cc])])
        r_lo, c_lo = max(r_pk - 1, 0), max(c_pk - 1, 0)
        nb = locate[r_lo : r_pk + 2, c_lo : c_pk + 2]
        wts = np.clip(nb - t.finder_centre_share * nb.max(), 0.0, None)
        gr, gc = np.mgrid[r_lo : r_lo + nb.shape[0], c_lo : c_lo + nb.shape[1]]
        cy, cx = float(np.average(gr, weights=wts + 1e-12)), float(np.average(gc, weights=wts + 1e-12))
        col, row = index_to_scene(win[0], win[1], cy, cx)
        if not (core[0] <= col < core[0] + core[2] and core[1] <= row < core[1] + core[3]):
            continue  # found again by the tile whose core holds it
        length_m, width_m, axis = blob_shape(rr, cc, m_px)
        head_r, head_c = np.nonzero(head)
        reach_m = blob_shape(head_r, head_c, m_px)[0]
        if length_m > t.finder_max_length_m or npx_core * m_px * m_px > t.finder_max_area_m2:
            continue
        dc, dr = math.cos(math.radians(axis)), -math.sin(math.radians(axis))
        try:
            bearing = float(frame.bearing_of(dc, dr)) % 180.0
        except Exception:  # noqa: BLE001 - no north: the angle from image up
            bearing = math.degrees(math.atan2(dc, -dr)) % 180.0
        lonlat = None
        if scene.info.georeferenced:
            lon, lat = geodesy.pixel_to_lonlat(scene.georef, col, row)
            lonlat = (float(lon), float(lat))
        k = int(np.argmax(score[rr, cc]))
        item = (
            int(groups[sl][pr0, pc0]),
            float(np.max(boxed[sl][m])),
            VesselCandidate(
                (col, row),
                lonlat,
                length_m,
                width_m,
                bearing,
                float(score[rr[k], cc[k]]),
                pfa_at(int(rr[k]), int(cc[k])),
                npx_core,
                reach_m=reach_m,
            ),
        )
        out.append(item)
    return _one_per_object(out, m_px / win[1], t)


def _one_per_object(
    items: list[tuple[int, float, VesselCandidate]], m_scene: float, t: Tuning
) -> list[VesselCandidate]:
    """The vessels among the detections of each object (detections joined by weaker pixels), ``m_scene`` metres
    per scene pixel.

    A wake is resolved into crests (and a foam trail) whose parts can be as bright as a hull: an object is one
    vessel, and another only outside every kept vessel's hull and wake (:func:`_part_of`) and, when below
    finder_own_share of the first's score, beyond finder_suppress_m of every kept vessel.  The
    vessel is at the leading end of an elongated object whose detections fade from one end to the other (a
    wake's arm or trail fades aft; :func:`_leading_end`), else at its detection of the largest summed score (a
    hull is bright and solid; a crest's fragment as bright but small, a foam trail as large but fainter)."""
    out: list[VesselCandidate] = []
    by_object: dict[int, list[tuple[float, VesselCandidate]]] = {}
    for g, mass, c in items:
        by_object.setdefault(g, []).append((mass, c))
    for members in by_object.values():
        members.sort(key=lambda m: (-m[0], -m[1].score))
        cands = [c for _, c in members]
        lead = _leading_end(cands, [m for m, _ in members], t)
        top = cands[0] if lead is None else lead
        kept, folded = [top], 0
        for c in sorted(cands, key=lambda c: -c.score):
            if c is top:
                continue
            near = min(math.hypot(c.px[0] - k.px[0], c.px[1] - k.px[1]) for k in kept) * m_scene
            weak = c.score < t.finder_own_share * top.score
            if (weak and near <= t.finder_suppress_m) or any(_part_of(c, k, cands, m_scene, t) for k in kept):
                folded += 1
            else:
                kept.append(c)
        out += [dataclasses.replace(kept[0], merged=folded)] + kept[1:]
    return out


def _part_of(c: VesselCandidate, k: VesselCandidate, members: list[VesselCandidate], m_scene: float, t: Tuning) -> bool:
    """Whether detection ``c`` of an object is part of vessel ``k``'s: within its hull length and
    finder_merge_m of it, or inside the wedge of finder_wedge_deg about its wake's direction (the mean
    direction from ``k`` to the object's other detections within finder_suppress_m of it, weighted by score)."""
    dx, dy = c.px[0] - k.px[0], c.px[1] - k.px[1]
    d = math.hypot(dx, dy)
    if d * m_scene <= k.length_m + t.finder_merge_m:
        return True
    ax = ay = 0.0
    for o in members:
        ox, oy = o.px[0] - k.px[0], o.px[1] - k.px[1]
        r = math.hypot(ox, oy)
        if o is not k and o is not c and 0 < r * m_scene <= t.finder_suppress_m:
            ax, ay = ax + max(o.score, 0.0) * ox / r, ay + max(o.score, 0.0) * oy / r
    if math.hypot(ax, ay) == 0:
        return False
    cos = (dx * ax + dy * ay) / (d * math.hypot(ax, ay))
    return cos >= math.cos(math.radians(t.finder_wedge_deg))


def _leading_end(cands: list[VesselCandidate], mass: list[float], t: Tuning) -> VesselCandidate | None:
    """The detection at the brighter end of an object of at least three detections laid out along a line (at
    least finder_trail_min_elongation times longer than wide) whose end thirds differ in mean score by
    finder_object_fade; None otherwise.  A wake's arm and its foam fade aft: the hull leads."""
    if len(cands) < 3:
        return None
    xy = np.array([c.px for c in cands], float)
    w = np.maximum(np.asarray(mass, float), 1e-6)
    centre = np.average(xy, axis=0, weights=w)
    cov = np.cov((xy - centre).T, aweights=w)
    evals, evecs = np.linalg.eigh(cov)
    if evals[-1] < t.finder_trail_min_elongation**2 * max(evals[0], 0.25):
        return None
    u = (xy - centre) @ evecs[:, -1]
    score = np.array([c.score for c in cands])
    lo, hi = float(u.min()), float(u.max())
    third = (hi - lo) / 3.0
    end_lo, end_hi = float(np.mean(score[u <= lo + third])), float(np.mean(score[u >= hi - third]))
    if max(end_lo, end_hi) < t.finder_object_fade * min(end_lo, end_hi):
        return None
    return cands[int(np.argmax(u) if end_hi > end_lo else np.argmin(u))]
