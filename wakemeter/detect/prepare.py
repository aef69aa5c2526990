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

from ..errors import ParameterError
from ..scene import display
from ..scene.geodesy import LocalFrame
from ..scene.raster import Scene


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
        """Scene (col, row) of a chip (row, col)."""
        return self.origin_px[0] + col * self.step, self.origin_px[1] + row * self.step


def _mad_sigma(a: np.ndarray) -> float:
    med = np.median(a)
    return float(1.4826 * np.median(np.abs(a - med))) or float(np.std(a)) or 1.0


def prepare_chip(scene: Scene, vessel_px: tuple[float, float], *, size_px: int = 768, step: int = 1,
                 radar: bool | None = None, snap_radius_m: float = 40.0, hull_mask_m: float = 30.0) -> Chip:
    """Read and prepare a ``size_px`` chip around ``vessel_px`` (scene col, row), decimated by ``step``."""
    if size_px < 64 or step < 1:
        raise ParameterError(f"size_px must be >= 64 and step >= 1, got {size_px!r}, {step!r}")
    col, row = vessel_px
    if not (0 <= col < scene.width and 0 <= row < scene.height):
        raise ParameterError(f"the vessel position ({col:.1f}, {row:.1f}) lies outside the scene "
                             f"({scene.width} x {scene.height} pixels)")
    frame = scene.local_frame(col, row)
    half = size_px * step / 2
    c0, r0 = col - half, row - half
    # read the in-scene part, then place it in a full-size array (outside = invalid)
    wc0, wr0 = int(np.floor(max(c0, 0))), int(np.floor(max(r0, 0)))
    wc1, wr1 = int(np.ceil(min(c0 + size_px * step, scene.width))), int(np.ceil(min(r0 + size_px * step, scene.height)))
    oc, orow = int(round((wc0 - c0) / step)), int(round((wr0 - r0) / step))
    ow, oh = max(1, round((wc1 - wc0) / step)), max(1, round((wr1 - wr0) / step))
    ow, oh = min(ow, size_px - oc), min(oh, size_px - orow)
    bands = (1, 2, 3) if scene.info.count >= 3 else (1,)
    data, valid = scene.read(window=(wc0, wr0, wc1 - wc0, wr1 - wr0), out_shape=(oh, ow), bands=bands)
    if len(bands) == 3:
        img = 0.299 * data[0] + 0.587 * data[1] + 0.114 * data[2]
        ok = valid.all(axis=0)
    else:
        img, ok = data[0], valid[0]
    if radar is None:
        radar = display.looks_like_radar(scene.info.dtype, scene.info.count, img[ok][:100_000])
    if radar:
        ok &= img > 0
        img = np.where(ok, display.to_db(np.where(ok, img, 1.0)), 0.0)
    full = np.zeros((size_px, size_px), np.float32)
    fvalid = np.zeros((size_px, size_px), bool)
    full[orow:orow + oh, oc:oc + ow] = img
    fvalid[orow:orow + oh, oc:oc + ow] = ok
    if fvalid.sum() < 0.25 * size_px * size_px:
        raise ParameterError("less than a quarter of the area around the vessel has valid pixels "
                             "(edge of the scene, nodata or land)")
    # saturation (land, cloud): very bright connected areas
    vals = full[fvalid]
    med, sig = float(np.median(vals)), _mad_sigma(vals)
    if not radar and np.issubdtype(np.dtype(scene.info.dtype), np.integer):
        top = np.iinfo(np.dtype(scene.info.dtype)).max
        fvalid &= full < 0.995 * top if vals.max() >= 0.995 * top else fvalid
    m_px = float(np.sqrt(frame.m_per_col * frame.m_per_row_up)) * step
    centre = (row - r0) / step, (col - c0) / step
    # hull: brightest smoothed blob within the snap radius
    sm = ndimage.gaussian_filter(np.where(fvalid, full - med, 0.0), 1.0)
    rr, cc = np.mgrid[:size_px, :size_px]
    near = (rr - centre[0]) ** 2 + (cc - centre[1]) ** 2 <= max(snap_radius_m / m_px, 3.0) ** 2
    hull_rc = None
    cand = np.where(near & fvalid, sm, -np.inf)
    k = int(np.argmax(cand))
    if np.isfinite(cand.flat[k]) and cand.flat[k] > 6 * sig:
        hull_rc = (float(k // size_px), float(k % size_px))
        blob = ndimage.binary_dilation(sm > 4 * sig, iterations=2)
        lab, _ = ndimage.label(blob)
        if lab[int(hull_rc[0]), int(hull_rc[1])] > 0:
            hull = lab == lab[int(hull_rc[0]), int(hull_rc[1])]
            if hull.sum() * m_px ** 2 < (4 * hull_mask_m) ** 2:  # a hull, not a whole bright region
                fvalid &= ~ndimage.binary_dilation(hull, iterations=2)
    # background removal and normalisation
    filled = np.where(fvalid, full, med)
    bg = ndimage.gaussian_filter(filled, sigma=max(size_px / 24, 4.0))
    tex = np.where(fvalid, filled - bg, 0.0)
    tex /= _mad_sigma(tex[fvalid])
    tex = np.clip(tex, -8, 8)  # tame bright point targets and speckle spikes
    return Chip(tex.astype(np.float32), fvalid, centre, (c0, r0), step, m_px, frame, bool(radar), hull_rc)
