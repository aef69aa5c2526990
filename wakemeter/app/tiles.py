"""Background tile reading for the canvas: a level-of-detail tile cache fed by a thread pool.

A tile is TILE x TILE display pixels covering TILE * 2**level scene pixels.  Tiles are read
off the GUI thread (``Scene.read`` uses the file's overviews or the cached pyramid), reduced
with ``cv2.resize(INTER_AREA)``, stretched with the scene-wide contrast and handed back to
the GUI thread as QImages.
"""

from __future__ import annotations

import queue
from collections import OrderedDict
from dataclasses import dataclass

import cv2
import numpy as np
from PySide6.QtCore import QObject, QRunnable, QThreadPool, Signal
from PySide6.QtGui import QImage
from rasterio.enums import Resampling

from ..errors import ParameterError, WakemeterError
from ..scene import display
from ..scene.raster import Scene
from ..scene.sensor import BandRole, band_roles

TILE = 256


@dataclass(frozen=True)
class Contrast:
    """Scene-wide display stretch."""

    lo: tuple[float, ...]
    hi: tuple[float, ...]
    gamma: float = 1.0
    db: bool = False
    rgb: bool = False
    bands: tuple[int, ...] = (1,)  #: 1-based bands shown: one (grey) or three (red, green, blue)
    on_water: bool = False  #: the stretch was set on the water (by the water index) rather than the whole scene


def estimate_contrast(
    scene: Scene,
    *,
    db: bool | None = None,
    gamma: float = 1.0,
    low: float = 1.0,
    high: float = 99.5,
    bands: tuple[int, ...] | None = None,
    on_water: bool | None = None,
) -> Contrast:
    """Percentile stretch from a small whole-scene read (uses overviews when present).  ``on_water``: set the
    stretch on the water (by the water index), on the whole scene (False), or on the water where the scene
    names a green and a near-infrared band and at least WATER_SHARE_FOR_STRETCH of it is water (None)."""
    reflectance_default = False
    s = min(1.0, 512 / max(scene.width, scene.height))
    oh, ow = max(1, int(scene.height * s)), max(1, int(scene.width * s))
    if bands is None:
        bands = display.true_colour_bands(scene.info.band_descriptions) if scene.info.count >= 3 else (1,)
        if len(bands) == 3 and scene.info.dtype == "uint16":
            # reflectance products: one wide stretch with a gamma (per-band 1-99.5 % stretches of mostly dark
            # water turn its noise into colour)
            low, high, gamma = 0.5, 99.9, 2.0
            reflectance_default = True
    bands = tuple(int(b) for b in bands)
    if len(bands) not in (1, 3) or any(b < 1 or b > scene.info.count for b in bands):
        raise ParameterError(
            f"choose one band (grey) or three (red, green, blue) within 1..{scene.info.count}, got {bands}"
        )
    rgb = len(bands) == 3
    data, valid = scene.read(out_shape=(oh, ow), bands=bands)
    if db is None:
        db = display.looks_like_radar(scene.info.dtype, scene.info.count, data[0][valid[0]][:100_000])
    if db:
        data = display.to_db(np.where(valid, data, 1.0))
        # radar: speckle averages out in the small overview read; at full resolution it spreads several times
        # wider, and a stretch from the overview alone turns it black and white. Stretch from full-resolution
        # samples instead (the hull stays bright above the speckle).
        sample = _full_resolution_sample(scene, bands)
        if sample is not None:
            data, valid = sample
    sea = None if db or on_water is False else _water(scene, (oh, ow), valid)
    if sea is not None:  # the stretch is set on the water (land saturates): the sea and its wakes are what is read
        valid = valid & sea[None]
        high = min(high, WATER_HIGH_PERCENTILE)  # hulls, foam and mixed shore pixels are the water's bright tail
        if reflectance_default:
            gamma = 1.0  # the sea alone spans the levels: no lift of the dark end
    los, his = [], []
    joint = rgb and scene.info.dtype == "uint16"
    if joint:  # the same stretch for the three bands keeps the colours of the reflectances
        v = data[valid]
        lo_j, hi_j = np.percentile(v, [low, high]) if v.size else (0.0, 1.0)
    for b in range(len(bands)):
        v = data[b][valid[b]]
        lo, hi = (lo_j, hi_j) if joint else (np.percentile(v, [low, high]) if v.size else (0.0, 1.0))
        los.append(float(lo))
        his.append(float(hi if hi > lo else lo + 1))
    return Contrast(tuple(los), tuple(his), gamma, bool(db), rgb, bands, sea is not None)


#: the stretch is set on the water when at least this share of the scene's valid pixels is water
WATER_SHARE_FOR_STRETCH = 0.05
#: ... up to this percentile of the water (above it: hulls, foam, mixed shore pixels, shown white)
WATER_HIGH_PERCENTILE = 99.0


def _water(scene: Scene, shape: tuple[int, int], valid: np.ndarray) -> np.ndarray | None:
    """Water by the water index (McFeeters 1996, NDWI > 0) on the overview grid when the scene names a green and
    a near-infrared band and enough of it is water; else None."""
    roles = band_roles(scene.info.band_descriptions)
    g, n = roles.get(BandRole.GREEN), roles.get(BandRole.NIR)
    if g is None or n is None:
        return None
    d, ok = scene.read(out_shape=shape, bands=(g, n))
    wet = ok.all(axis=0) & ((d[0] - d[1]) > 0.0) & valid.all(axis=0)
    # eroded by a pixel: lone wet pixels on land and the mixed pixels of the shore are not the sea's levels
    wet = cv2.erode(wet.astype(np.uint8), np.ones((3, 3), np.uint8)).astype(bool)
    return wet if wet.sum() >= max(WATER_SHARE_FOR_STRETCH * valid.all(axis=0).sum(), 100) else None


def _full_resolution_sample(scene: Scene, bands: tuple[int, ...], n: int = 4, size: int = 128):
    """dB values and validity of up to n x n windows of ``size`` pixels read at full resolution, spread evenly
    over the scene (None when the scene is too small to need it)."""
    if scene.width <= 512 and scene.height <= 512:
        return None
    parts, oks = [], []
    for fy in np.linspace(0.1, 0.9, n):
        for fx in np.linspace(0.1, 0.9, n):
            c0 = int(min(max(fx * scene.width - size / 2, 0), max(scene.width - size, 0)))
            r0 = int(min(max(fy * scene.height - size / 2, 0), max(scene.height - size, 0)))
            try:
                d, ok = scene.read(window=(c0, r0, min(size, scene.width), min(size, scene.height)), bands=bands)
            except WakemeterError:
                continue
            parts.append(display.to_db(np.where(ok, d, 1.0)).reshape(len(bands), -1))
            oks.append(ok.reshape(len(bands), -1))
    if not parts:
        return None
    return np.concatenate(parts, axis=1), np.concatenate(oks, axis=1)


def to_rgb8(data: np.ndarray, valid: np.ndarray, c: Contrast) -> np.ndarray:
    if c.db:
        data = display.to_db(np.where(valid, data, 1.0))
    out = []
    for b in range(data.shape[0]):
        x = np.clip((data[b] - c.lo[b]) / (c.hi[b] - c.lo[b]), 0, 1)
        if c.gamma != 1.0:
            x = x ** (1.0 / c.gamma)
        out.append(np.where(valid[b], x * 255, 0).astype(np.uint8))
    if len(out) == 1:
        out = out * 3
    return np.ascontiguousarray(np.stack(out, axis=-1))


def read_tile(scene: Scene, level: int, tx: int, ty: int, contrast: Contrast) -> np.ndarray | None:
    """RGB uint8 tile (may be smaller than TILE at the scene's edges); None when outside."""
    f = 2**level
    c0, r0 = tx * TILE * f, ty * TILE * f
    if c0 >= scene.width or r0 >= scene.height:
        return None
    w, h = min(TILE * f, scene.width - c0), min(TILE * f, scene.height - r0)
    ow, oh = max(1, int(np.ceil(w / f))), max(1, int(np.ceil(h / f)))
    bands = contrast.bands
    # read at up to twice the display resolution (fast nearest sampling from overviews/pyramid),
    # then reduce with area averaging
    rw, rh = min(w, 2 * ow), min(h, 2 * oh)
    data, valid = scene.read(window=(c0, r0, w, h), out_shape=(rh, rw), bands=bands, resampling=Resampling.nearest)
    rgb = to_rgb8(data, valid, contrast)
    if (rh, rw) != (oh, ow):
        rgb = cv2.resize(rgb, (ow, oh), interpolation=cv2.INTER_AREA)
    return rgb


class _Signals(QObject):
    # Results travel through a queue, not as signal arguments: Python objects in queued
    # cross-thread signals proved fragile (a refcount crash at exit with PySide6 6.12).
    arrived = Signal()


class _TileJob(QRunnable):
    def __init__(self, loader: TileLoader, key, generation: int):
        super().__init__()
        self.loader, self.key, self.generation = loader, key, generation

    def run(self) -> None:
        if self.generation != self.loader.generation:
            return
        scene, contrast = self.loader.scene, self.loader.contrast
        if scene is None or contrast is None:
            return
        try:
            level, tx, ty = self.key
            rgb = read_tile(scene, level, tx, ty, contrast)
        except WakemeterError as err:
            self.loader.results.put(("failed", self.generation, self.key, str(err)))
            self._tell()
            return
        if rgb is None:
            self.loader.results.put(("empty", self.generation, self.key, None))
        else:
            img = QImage(rgb.data, rgb.shape[1], rgb.shape[0], 3 * rgb.shape[1], QImage.Format.Format_RGB888).copy()
            self.loader.results.put(("ready", self.generation, self.key, img))
        self._tell()

    def _tell(self) -> None:
        """Wake the canvas; a tile that finishes after its window was closed has nobody to tell."""
        try:
            self.loader.signals.arrived.emit()
        except RuntimeError:  # "Signal source has been deleted": the window is gone
            pass


class TileLoader(QObject):
    """LRU tile cache + background reads; ``tile_ready`` fires on the GUI thread."""

    tile_ready = Signal()
    read_failed = Signal(str)

    def __init__(self, capacity: int = 600):
        super().__init__()
        self.scene: Scene | None = None
        self.contrast: Contrast | None = None
        self.cache: OrderedDict = OrderedDict()
        self.pending: set = set()
        self.capacity = capacity
        self.generation = 0
        self.pool = QThreadPool()
        self.pool.setMaxThreadCount(2)
        self.results: queue.SimpleQueue = queue.SimpleQueue()
        self.signals = _Signals()
        self.signals.arrived.connect(self._drain)

    def reset(self, scene: Scene | None, contrast: Contrast | None) -> None:
        self.generation += 1
        self.scene, self.contrast = scene, contrast
        self.cache.clear()
        self.pending.clear()

    def get(self, key):
        img = self.cache.get(key)
        if img is not None:
            self.cache.move_to_end(key)
            return img
        if key not in self.pending and self.scene is not None:
            self.pending.add(key)
            self.pool.start(_TileJob(self, key, self.generation))
        return None

    def cached(self, key):
        return self.cache.get(key)

    def _drain(self) -> None:
        got = False
        while True:
            try:
                kind, gen, key, payload = self.results.get_nowait()
            except queue.Empty:
                break
            if gen != self.generation:
                continue
            self.pending.discard(key)
            if kind == "ready":
                self.cache[key] = payload
                got = True
            elif kind == "failed":
                self.read_failed.emit(payload)
        while len(self.cache) > self.capacity:
            self.cache.popitem(last=False)
        if got:
            self.tile_ready.emit()

    def wait(self, msecs: int = 10_000) -> bool:
        return self.pool.waitForDone(msecs)

    def shutdown(self) -> None:
        """Drop queued reads and wait for running ones (before the window closes)."""
        self.generation += 1
        self.pool.clear()
        self.pool.waitForDone(10_000)
