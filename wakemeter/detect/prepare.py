"""Chip preparation: the neighbourhood of a vessel, made ready for wake detection.

Radar intensity goes to log scale, optical bands to luminance; nodata and
saturated (land, cloud) pixels are masked, the hull's bright blob is masked,
the slowly varying background is removed, and the given position is snapped
to the hull when one is near (users click a few pixels off).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy import ndimage

from ..errors import ParameterError, TooLittleWaterError
from ..scene import display
from ..scene.geodesy import LocalFrame
from ..scene.raster import Scene
from .binary_morph import binary_dilated, binary_opened
from .line_chip import green_nir_bands, land_mask
from .pixels import index_to_scene, scene_to_index
from .robust import median_spread
from .wide_blur import wide_gaussian


@dataclass(frozen=True)
class Chip:
    """A prepared square chip around a vessel (row 0 at the top)."""

    data: np.ndarray  #: float32 (n, n): zero-mean, unit-variance texture; masked pixels 0
    valid: np.ndarray  #: bool (n, n)
    vessel_rc: tuple[float, float]  #: vessel position in chip pixels (row, col)
    origin_px: tuple[float, float]  #: scene (col, row) of the chip's top-left corner
    step: int  #: scene pixels per chip pixel
    m_per_px: float  #: ground metres per chip pixel (geometric mean of the two axes)
    frame: LocalFrame  #: metric frame at the vessel, per *scene* pixel
    radar: bool
    hull_rc: tuple[float, float] | None  #: brightest hull blob found near the vessel (chip pixels)

    def to_scene(self, row: float, col: float) -> tuple[float, float]:
        """Scene (col, row) of a chip (row, col) (see :mod:`.pixels`)."""
        return index_to_scene(self.origin_px, self.step, row, col)

    def from_scene(self, col: float, row: float) -> tuple[float, float]:
        """Chip (row, col) of a scene (col, row): the inverse of :meth:`to_scene`."""
        return scene_to_index(self.origin_px, self.step, col, row)


def _mad_sigma(a: np.ndarray) -> float:
    return median_spread(a, floor=0.0)[1] or float(np.std(a)) or 1.0


def _check_coverage(valid: np.ndarray, centre_rc: tuple[float, float] | None = None, radius: float = 0.0) -> None:
    """At least 30 % of the chip (or of the disc of ``radius`` chip pixels around ``centre_rc``) is valid."""
    if centre_rc is not None and radius > 0:
        rr, cc = np.ogrid[: valid.shape[0], : valid.shape[1]]
        valid = valid[(rr - centre_rc[0]) ** 2 + (cc - centre_rc[1]) ** 2 <= radius**2]
    if valid.sum() < 0.3 * valid.size:
        raise TooLittleWaterError(
            "less than 30 % of the area around the vessel has valid pixels: it is too close "
            "to the edge of the scene, or the area is nodata or land"
        )


def prepare_chip(
    scene: Scene,
    vessel_px: tuple[float, float],
    *,
    size_px: int = 768,
    step: int = 1,
    radar: bool | None = None,
    snap_radius_m: float = 40.0,
    hull_mask_m: float = 30.0,
    reach_px: int = 0,
    snap_max_px: float = np.inf,
    find_hull: bool = True,
) -> Chip:
    """Read and prepare a ``size_px`` chip around ``vessel_px`` (scene col, row), decimated by ``step``.

    ``reach_px``: the analysis uses only this far from the vessel (chip pixels); the chip must be 30 % valid
    within it (0: the whole chip), so a photo's vessel near the frame's edge is analysed on the side it has.
    ``snap_max_px``: the hull is looked for at most this many chip pixels from the click (a photo's 40 m can be
    its whole frame).  ``find_hull``: False for a chip that only extends a look (no hull snapped or masked)."""
    if size_px < 64 or step < 1:
        raise ParameterError(f"size_px must be >= 64 and step >= 1, got {size_px!r}, {step!r}")
    col, row = vessel_px
    if not (0 <= col < scene.width and 0 <= row < scene.height):
        raise ParameterError(
            f"the vessel position ({col:.1f}, {row:.1f}) lies outside the scene ({scene.width} x {scene.height} pixels)"
        )
    frame = scene.local_frame(col, row)
    # integer-aligned chip: starts on a scene pixel boundary, the vessel sits near its centre
    c0 = int(np.floor(col)) - size_px * step // 2
    r0 = int(np.floor(row)) - size_px * step // 2

    def span(start: int, limit: int) -> tuple[int, int, int]:
        """First and last scene pixel read along one axis and the chip offset (in chip pixels)."""
        lead = max(0, -start)
        lead = -(-lead // step) * step  # whole chip pixels
        w0 = start + lead
        w1 = min(start + size_px * step, limit)
        w1 = w0 + max(0, (w1 - w0) // step) * step
        return w0, w1, lead // step

    wc0, wc1, oc = span(c0, scene.width)
    wr0, wr1, orow = span(r0, scene.height)
    ow, oh = (wc1 - wc0) // step, (wr1 - wr0) // step
    if ow < 8 or oh < 8:
        raise ParameterError("the vessel is too close to the edge of the scene to analyse its surroundings")
    bands = (1, 2, 3) if scene.info.count >= 3 else (1,)
    data, valid = scene.read(window=(wc0, wr0, wc1 - wc0, wr1 - wr0), out_shape=(oh, ow), bands=bands)
    if len(bands) == 3:
        img = 0.299 * data[0] + 0.587 * data[1] + 0.114 * data[2]
        ok = valid.all(axis=0)
    else:
        img, ok = data[0], valid[0]
    sample = img[ok][:100_000]
    in_db = display.looks_like_radar_db(scene.info.dtype, scene.info.count, sample)
    if radar is None:
        radar = in_db or display.looks_like_radar(scene.info.dtype, scene.info.count, sample)
    if radar and not in_db:  # linear backscatter to dB; data already in dB is used as it is
        ok &= img > 0
        img = np.where(ok, display.to_db(np.where(ok, img, 1.0)), 0.0)
    full = np.zeros((size_px, size_px), np.float32)
    fvalid = np.zeros((size_px, size_px), bool)
    full[orow : orow + oh, oc : oc + ow] = img
    fvalid[orow : orow + oh, oc : oc + ow] = ok
    near = scene_to_index((c0, r0), step, col, row)
    _check_coverage(fvalid, near, reach_px)
    # saturation (land, cloud): very bright connected areas
    vals = full[fvalid]
    med, sig = float(np.median(vals)), _mad_sigma(vals)
    if not radar and np.issubdtype(np.dtype(scene.info.dtype), np.integer):
        top = np.iinfo(np.dtype(scene.info.dtype)).max
        if vals.max() >= 0.995 * top:
            # saturated land or cloud: sizeable connected areas at the top of the range, not specks
            sat = binary_opened(fvalid & (full >= 0.995 * top), 2)
            fvalid &= ~binary_dilated(sat, 2)
    m_px = float(np.sqrt(frame.m_per_col * frame.m_per_row_up)) * step
    gn = None if radar else green_nir_bands(scene.info.band_descriptions)
    if gn is not None:  # land and quays inside the box, by the water index where the bands are named
        gnd, gnv = scene.read(window=(wc0, wr0, wc1 - wc0, wr1 - wr0), out_shape=(oh, ow), bands=gn)
        ndwi = np.zeros((size_px, size_px), np.float32)
        ndwi[orow : orow + oh, oc : oc + ow] = np.where(
            gnv.all(axis=0), (gnd[0] - gnd[1]) / np.maximum(gnd[0] + gnd[1], 1e-6), 0.0
        )
        fvalid &= ~land_mask(np.where(fvalid, (full - med) / sig, 0.0), fvalid, m_px=m_px, ndwi=ndwi, bright=False)
        _check_coverage(fvalid, near, reach_px)
        vals = full[fvalid]
        med, sig = float(np.median(vals)), _mad_sigma(vals)
    centre = scene_to_index((c0, r0), step, col, row)
    snap_m = min(snap_radius_m, snap_max_px * m_px)
    hull_rc = None
    if find_hull:
        hull_rc, fvalid = _snap_hull(full, fvalid, med, sig, centre, m_px, snap_m, hull_mask_m, 2 * snap_max_px)
    # background removal and normalisation
    filled = np.where(fvalid, full, med)
    bg = wide_gaussian(filled, max(size_px / 24, 4.0))
    tex = np.where(fvalid, filled - bg, 0.0)
    tex /= _mad_sigma(tex[fvalid])
    tex = np.clip(tex, -8, 8)  # tame bright point targets and speckle spikes
    return Chip(tex.astype(np.float32), fvalid, centre, (c0, r0), step, m_px, frame, bool(radar), hull_rc)


def _snap_hull(
    full: np.ndarray,
    fvalid: np.ndarray,
    med: float,
    sig: float,
    centre: tuple[float, float],
    m_px: float,
    snap_radius_m: float,
    hull_mask_m: float,
    mask_max_px: float = np.inf,
) -> tuple[tuple[float, float] | None, np.ndarray]:
    """The hull: the brightest smoothed blob within the snap radius (chip row, col, or None), and the valid
    mask with the hull taken out (a hull, not a whole bright region)."""
    size_px = full.shape[0]
    sm = ndimage.gaussian_filter(np.where(fvalid, full - med, 0.0), 1.0)
    rr, cc = np.mgrid[:size_px, :size_px]
    near = (rr - centre[0]) ** 2 + (cc - centre[1]) ** 2 <= max(snap_radius_m / m_px, 3.0) ** 2
    hull_rc = None
    # bright local maxima near the click; the nearest one is the hull (the brightest may be foam behind it)
    # threshold on the smoothed map's own robust spread (smoothing narrows speckle and noise)
    sm_vals = sm[fvalid]
    sm_sig = _mad_sigma(sm_vals) if sm_vals.size else sig
    peaks = (sm == ndimage.maximum_filter(sm, size=5)) & near & fvalid & (sm > float(np.median(sm_vals)) + 8 * sm_sig)
    if peaks.any():
        pr, pc = np.nonzero(peaks)
        k = int(np.argmin((pr - centre[0]) ** 2 + (pc - centre[1]) ** 2))
        hull_rc = (float(pr[k]), float(pc[k]))
        blob = binary_dilated(sm > float(np.median(sm_vals)) + 5 * sm_sig, 2)
        lab, _ = ndimage.label(blob)
        if lab[pr[k], pc[k]] > 0:
            hull = lab == lab[pr[k], pc[k]]
            if np.isfinite(mask_max_px):  # at centimetre pixels the foam behind is part of the blob: not the wake
                hull &= (rr - hull_rc[0]) ** 2 + (cc - hull_rc[1]) ** 2 <= mask_max_px**2
            if hull.sum() * m_px**2 < (4 * hull_mask_m) ** 2:  # a hull, not a whole bright region
                fvalid &= ~binary_dilated(hull, 2)
    return hull_rc, fvalid
