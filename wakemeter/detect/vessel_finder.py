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

import math
from collections.abc import Callable
from concurrent.futures import ThreadPoolExecutor
from dataclasses import dataclass

import cv2
import numpy as np
from scipy import ndimage, stats

from ..errors import CancelledError, ParameterError
from ..scene import display, geodesy
from ..scene.raster import Scene, one_pass_cache
from ..scene.sensor import BandRole, band_roles
from .blob_shape import blob_shape
from .line_chip import green_nir_bands
from .pixels import index_to_scene
from .tuning import DEFAULT_TUNING, Tuning

#: windows are read this many pixels square, plus the margin on every side
TILE = 1024
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
        self.n = np.maximum(self._ring(self._blocks(valid.astype(np.float32))), 1.0)

    def _blocks(self, a: np.ndarray) -> np.ndarray:
        """Sums over f x f blocks (OpenCV's area resampling is the block mean when the size divides)."""
        f = self.f
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
        x = np.where(self.valid, img - np.float32(offset), np.float32(0.0))
        s1, s2 = self._ring(self._blocks(x)), self._ring(self._blocks(x * x))
        mean = s1 / self.n
        sd = np.sqrt(np.maximum(s2 / self.n - mean * mean, 1e-12))
        return self._up(mean) + np.float32(offset), self._up(sd)

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
) -> list[VesselCandidate]:
    """Every vessel-like target in ``area`` (col, row, width, height; default the whole scene); the finder's
    thresholds are the ``finder_*`` fields of ``tuning``."""
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
    guard = max(3, int(round(t.finder_guard_m / m_px)) | 1)
    back = max(guard + 4, int(round(t.finder_background_m / m_px)) | 1)
    margin = back // 2 + 1
    pfa_px = min(pfa_per_km2 * (m_px * m_px) / 1e6, 0.01)
    gn = green_nir_bands(scene.info.band_descriptions)
    bands = _detection_bands(scene)
    if radar is None:
        sample, ok = scene.read(window=(c0, r0, min(c1 - c0, 512), min(r1 - r0, 512)), bands=(1,))
        radar = scene.info.count == 1 and display.looks_like_radar(scene.info.dtype, 1, sample[0][ok[0]][:100_000])
    tiles = [(tc, tr) for tr in range(r0, r1, tile) for tc in range(c0, c1, tile)]
    read_bands = tuple(sorted(set(bands) | (set(gn) if gn and not radar else set())))

    def window(tc: int, tr: int) -> tuple[tuple[int, int, int, int], tuple[int, int, int, int]]:
        """The tile's core (col, row, width, height) and the window read for it: the core and its margin."""
        core = (tc, tr, min(tile, c1 - tc), min(tile, r1 - tr))
        w0, h0 = max(tc - margin, 0), max(tr - margin, 0)
        w1, h1 = min(core[0] + core[2] + margin, scene.width), min(core[1] + core[3] + margin, scene.height)
        return core, (w0, h0, w1 - w0, h1 - h0)

    found: list[VesselCandidate] = []
    # the next window is read in a second thread while this one is searched (GDAL reads outside the GIL; each
    # thread has its own handle on the file)
    with one_pass_cache(), ThreadPoolExecutor(max_workers=1, thread_name_prefix="finder-read") as reader:
        pending = reader.submit(scene.read, window=window(*tiles[0])[1], bands=read_bands)
        for k, (tc, tr) in enumerate(tiles):
            if cancelled is not None and cancelled():
                raise CancelledError("finding vessels was cancelled")
            core, full = window(tc, tr)
            win = full[:2]
            data, valid = pending.result()
            if k + 1 < len(tiles):
                pending = reader.submit(scene.read, window=window(*tiles[k + 1])[1], bands=read_bands)
            idx = {b: i for i, b in enumerate(read_bands)}
            ok = np.all(valid, axis=0)
            nir = _nir_band(scene)
            if radar:
                det, score, pfa_at = _cfar_radar(data[idx[bands[0]]], ok, guard, back, pfa_px)
                water = ok
                locate = score
                link = ok & (score > t.finder_link_share)  # score: intensity over its threshold
            else:
                water = ok.copy()
                if gn is not None:
                    g, n = data[idx[gn[0]]], data[idx[gn[1]]]
                    ndwi = (g - n) / np.maximum(g + n, 1e-6)
                    water &= (ndwi > 0.0) | _islands(ok & (ndwi <= 0.0), m_px, t)
                zs = _anomaly_optical([data[idx[b]] for b in bands], water, guard, back)
                det, score, pfa_at, thr = _threshold(zs, water, pfa_px, t)
                link = water & (score > t.finder_link_share * thr)
                # the hull is told from its foam in the near infrared, where foam is far darker than a hull
                locate = zs[bands.index(nir)] if nir in bands else score
            found += _blobs(scene, det, score, locate, pfa_at, water, ok, win, core, m_px, frame, link, radar, t)
            if progress is not None:
                progress((k + 1) / len(tiles))
    return sorted(found, key=lambda c: -c.score)


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
    """Connected regions of a whole window (0: background, 1..n), as ``ndimage.label`` numbers them; OpenCV's
    labelling is several times faster on windows this size."""
    n, lab = cv2.connectedComponents(mask.astype(np.uint8), connectivity=connectivity, ltype=cv2.CV_32S)
    return lab, int(n) - 1


def _islands(dry: np.ndarray, m_px: float, t: Tuning) -> np.ndarray:
    """Dry patches no larger than a ship that do not touch the window's edge: hulls (a white deck can be as
    'dry' by NDWI as a quay) or rocks, to be judged as targets on the water rather than masked as land."""
    lab, n = _label(dry, connectivity=4)
    if n == 0:
        return np.zeros_like(dry)
    sizes = np.bincount(lab.ravel())
    edge = np.unique(np.concatenate([lab[0], lab[-1], lab[:, 0], lab[:, -1]]))
    small = sizes * m_px * m_px <= t.finder_max_area_m2
    small[0] = False
    small[edge] = False
    return small[lab]


def _nir_band(scene: Scene) -> int | None:
    return band_roles(scene.info.band_descriptions).get(BandRole.NIR)


def _anomaly_optical(bands, water, guard, back) -> list[np.ndarray]:
    """Each band standardised on the ring of water around each pixel."""
    ring = _Ring(water, guard, back)
    out = []
    for b in bands:
        mean, sd = ring.stats(b)
        out.append((b - mean) / sd)
    return out


def _threshold(zs, water, pfa_px, t: Tuning):
    """The per-pixel rate at the normal tail, or at the water's own tail when it is heavier (sediment,
    glint and specks make real sea heavier tailed than a normal): an exponential fitted to the excesses
    over the 99th percentile of the window's water (peaks over threshold; Coles 2001, An Introduction to
    Statistical Modeling of Extreme Values, the generalised Pareto with shape 0)."""
    z_max = np.maximum.reduce(zs) if len(zs) > 1 else zs[0]
    thr = float(stats.norm.isf(pfa_px))
    tail: tuple[float, float] | None = None
    # censored: what stands out at the normal threshold (hulls, their foam) and its surroundings are left out
    # of the sea's own tail, or a scene holding a large wake would hide its own vessel
    strong = cv2.dilate((z_max > t.finder_censor_factor * thr).astype(np.uint8), np.ones((7, 7), np.uint8))
    sea = z_max[water & (strong == 0)]
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


def _trail_head(m: np.ndarray, loc: np.ndarray, t: Tuning) -> np.ndarray:
    """The pixels of a detection (mask ``m``) where its hull can be: all of them, or the leading end of a trail."""
    rr, cc = np.nonzero(m)
    if rr.size < t.finder_trail_min_px:
        return m
    length, width, axis = blob_shape(rr, cc, 1.0)
    if length < t.finder_trail_min_px or length < t.finder_trail_min_elongation * width:
        return m
    a = math.radians(axis)
    u = (cc - cc.mean()) * math.cos(a) - (rr - rr.mean()) * math.sin(a)  # along the axis (image up positive)
    v = loc[rr, cc]
    lo, hi = u.min(), u.max()
    third = (hi - lo) / 3.0
    end_lo, end_hi = float(np.mean(v[u <= lo + third])), float(np.mean(v[u >= hi - third]))
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
    # each detection's object (detections joined above finder_link_share of the threshold) and the object's peak
    groups, n_groups = _label(link | det)
    group_peak = np.full(n_groups + 1, -np.inf)
    np.maximum.at(group_peak, groups[det], score[det])
    # land next to a blob: the blob is a quay edge or a moored hull against it (dry pixels within 2 px)
    land = ok & ~water
    out = []
    objects = ndimage.find_objects(lab)
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
        col, row = index_to_scene(win, 1, cy, cx)
        if not (core[0] <= col < core[0] + core[2] and core[1] <= row < core[1] + core[3]):
            continue  # found again by the tile whose core holds it
        length_m, width_m, axis = blob_shape(rr, cc, m_px)
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
        out.append(
            VesselCandidate(
                (col, row),
                lonlat,
                length_m,
                width_m,
                bearing,
                float(score[rr[k], cc[k]]),
                pfa_at(int(rr[k]), int(cc[k])),
                npx_core,
            )
        )
    return out
