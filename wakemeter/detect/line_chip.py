"""The vessel's surroundings made ready for the wake-line search on real imagery.

Real scenes differ from linear-theory ones in what the wake looks like (foam and calm bands far
stronger than the waves) and in what else sits in the box: land, harbour walls, clouds, other
vessels, the scene's edge.  This chip:

* reads every band (up to four) of an optical scene and standardises each one on its own water
  (median and robust spread), then averages them: foam is bright in every band, so the average
  keeps the wake and lowers the noise; radar goes to decibels;
* masks what is not open water: large bright areas (land, cloud, quays: anything that holds a disk
  wider than a hull) and, when green and near-infrared bands are named, land by the normalised
  difference water index (McFeeters 1996); pixels outside the scene and nodata are simply invalid,
  so a box at the edge is analysed with what it has instead of being refused;
* finds the hull: the bright compact blob nearest the click (a ship is brighter than the water in
  every band and in radar), with its length, width and orientation from the blob's second moments.

References
----------
1. McFeeters, S. K. (1996). The use of the Normalized Difference Water Index (NDWI) in the delineation
   of open water features. *Int. J. Remote Sens.* 17(7), 1425-1432.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy import ndimage

from ..errors import ParameterError
from ..scene import display
from ..scene.geodesy import LocalFrame
from ..scene.raster import Scene
from ..scene.sensor import BandRole, band_roles
from .binary_morph import binary_dilated, binary_opened
from .blob_shape import blob_shape
from .pixels import index_to_scene, scene_to_index
from .robust import median_spread
from .tuning import DEFAULT_TUNING, Tuning


@dataclass(frozen=True)
class Hull:
    rc: tuple[float, float]  #: intensity-weighted centre (chip row, col)
    length_m: float
    width_m: float
    axis_deg: float  #: image angle of the long axis (counter-clockwise from the column axis), 0-180
    peak_z: float
    mask: np.ndarray  #: bool, the blob (the hull with the foam attached to it, above a quarter of the peak)
    core: np.ndarray  #: bool, its brightest part (above half the peak): the hull, and foam as bright as it
    core_length_m: float = 0.0  #: the core's length (second moments, as ``length_m``)

    def extent_px(self, angles_deg: np.ndarray, *, whole: bool = False) -> np.ndarray:
        """How far the core (or with ``whole`` the blob) reaches from the centre in each image direction (chip
        pixels): the largest projection of its pixels within a pixel of the ray."""
        rr, cc = np.nonzero(self.mask if whole else self.core)
        dr, dc = rr - self.rc[0], cc - self.rc[1]
        a = np.radians(np.asarray(angles_deg, float))[:, None]
        along = dc[None, :] * np.cos(a) - dr[None, :] * np.sin(a)
        across = dc[None, :] * np.sin(a) + dr[None, :] * np.cos(a)
        reach = np.where(np.abs(across) <= 1.0, along, 0.0)
        return np.clip(reach.max(axis=1, initial=0.0), 0.0, None)


@dataclass(frozen=True, eq=False)
class Spectral:
    """An optical chip's bands as read, and which of them are visible and which near infrared."""

    pixels: np.ndarray  #: float32 (bands, n, n)
    visible: tuple[int, ...]  #: indices into ``pixels``
    nir: int
    #: indices into ``pixels`` of the blue, green and red bands (None where the file does not name one)
    colours: tuple[int | None, int | None, int | None] = (None, None, None)


@dataclass(frozen=True, eq=False)
class LineChip:
    img: np.ndarray  #: float32 (n, n) standardised (water median 0, spread 1), masked pixels 0
    valid: np.ndarray  #: bool (n, n): open water inside the scene
    origin_px: tuple[int, int]  #: scene (col, row) of the chip's top-left pixel
    click_rc: tuple[float, float]
    hull: Hull | None
    m_per_px: float
    frame: LocalFrame
    radar: bool
    bands: tuple[int, ...]
    land_fraction: float  #: share of the in-scene pixels masked as land, cloud or quay
    hull_at_land: bool = False  #: the hull touches land or a quay (moored: lines along the quay are not wakes)
    step: int = 1  #: scene pixels per chip pixel (block means; 1 but for centimetre photos)
    #: optical bands as read (bands, n, n; masked pixels 0) with the indices of the visible ones and of a near
    #: infrared one, when the file names them (a bright object's colour: foam or a hull, :mod:`.foam_streak`)
    spectral: Spectral | None = None

    @property
    def vessel_rc(self) -> tuple[float, float]:
        return self.hull.rc if self.hull is not None else self.click_rc

    def to_scene(self, row: float, col: float) -> tuple[float, float]:
        """Scene (col, row) of a chip (row, col) (see :mod:`.pixels`)."""
        return index_to_scene(self.origin_px, self.step, row, col)


def _spectral(full: np.ndarray, descriptions: tuple[str | None, ...], bands: tuple[int, ...]) -> Spectral | None:
    roles = band_roles(descriptions)
    nir = roles.get(BandRole.NIR)
    visible = [roles.get(r) for r in (BandRole.BLUE, BandRole.GREEN, BandRole.RED)]
    seen = tuple(bands.index(b) for b in visible if b is not None and b in bands)
    if nir is None or nir not in bands or not seen:
        return None
    colours = tuple(bands.index(b) if b is not None and b in bands else None for b in visible)
    return Spectral(full, seen, bands.index(nir), (colours[0], colours[1], colours[2]))


def _green_nir(descriptions: tuple[str | None, ...], bands: tuple[int, ...]) -> tuple[int, int] | None:
    """Indices into ``bands`` of a green and a near-infrared band, from the sensor table's band roles."""
    roles = band_roles(descriptions)
    green, nir = roles.get(BandRole.GREEN), roles.get(BandRole.NIR)
    if green is None or nir is None or green not in bands or nir not in bands:
        return None
    return bands.index(green), bands.index(nir)


def prepare_line_chip(
    scene: Scene,
    vessel_px: tuple[float, float],
    *,
    size_px: int = 320,
    radar: bool | None = None,
    snap_radius_m: float = 60.0,
    tuning: Tuning = DEFAULT_TUNING,
) -> LineChip:
    """Read and prepare a ``size_px`` square around ``vessel_px`` (scene col, row) at full resolution, or for
    pixels finer than ``tuning.line_pixel_min_m`` as block means of that size."""
    col, row = vessel_px
    if not (0 <= col < scene.width and 0 <= row < scene.height):
        raise ParameterError(
            f"the vessel position ({col:.1f}, {row:.1f}) lies outside the scene ({scene.width} x {scene.height} pixels)"
        )
    frame = scene.local_frame(col, row)
    step = max(1, int(tuning.line_pixel_min_m // float(np.sqrt(frame.m_per_col * frame.m_per_row_up))))
    c0, r0 = int(np.floor(col)) - size_px * step // 2, int(np.floor(row)) - size_px * step // 2
    # whole chip pixels inside the scene: each axis starts on a chip pixel and ends on a whole block
    wc0, wr0 = c0 + -(-max(0, -c0) // step) * step, r0 + -(-max(0, -r0) // step) * step
    wc1 = wc0 + (min(c0 + size_px * step, scene.width) - wc0) // step * step
    wr1 = wr0 + (min(r0 + size_px * step, scene.height) - wr0) // step * step
    if (wc1 - wc0) // step < 16 or (wr1 - wr0) // step < 16:
        raise ParameterError("the scene is too small around the vessel to look for a wake (less than 16 pixels)")
    count = scene.info.count
    bands = tuple(range(1, min(count, 4) + 1))
    out_shape = ((wr1 - wr0) // step, (wc1 - wc0) // step)
    data, ok = scene.read(
        window=(wc0, wr0, wc1 - wc0, wr1 - wr0), bands=bands, out_shape=out_shape if step > 1 else None
    )
    first = data[0][ok[0]][:100_000]
    in_db = display.looks_like_radar_db(scene.info.dtype, count, first)
    if radar is None:
        radar = in_db or display.looks_like_radar(scene.info.dtype, count, first)
    if radar:
        bands, data, ok = bands[:1], data[:1], ok[:1]
        if not in_db:
            ok = ok & (data > 0)
            data = np.where(ok, display.to_db(np.where(ok, data, 1.0)), 0.0).astype(np.float32)
    n = size_px
    full = np.zeros((len(bands), n, n), np.float32)
    inside = np.zeros((n, n), bool)
    sl = (slice((wr0 - r0) // step, (wr1 - r0) // step), slice((wc0 - c0) // step, (wc1 - c0) // step))
    full[(slice(None), *sl)] = data
    valid = np.zeros((n, n), bool)
    valid[sl] = ok.all(axis=0)
    inside[sl] = True
    if valid.sum() < 64:
        raise ParameterError("the area around the vessel has no valid pixels (nodata or outside the scene)")
    # saturated pixels (the top of an integer range) stay: in 8-bit stretched images foam and hulls are often
    # saturated; large saturated areas (land, cloud, glare) go with the land mask below
    z = np.zeros_like(full)
    for i in range(len(bands)):
        med, spread = median_spread(full[i][valid])
        z[i] = np.where(valid, (full[i] - med) / spread, 0.0)
    img = z.mean(axis=0)
    # restandardise the average on its own water
    med, spread = median_spread(img[valid])
    img = np.where(valid, (img - med) / spread, 0.0)
    m_px = float(np.sqrt(frame.m_per_col * frame.m_per_row_up)) * step
    land = _land_mask(
        img, valid, full, scene.info.band_descriptions, bands, radar=bool(radar), m_px=m_px, tuning=tuning
    )
    in_scene = max(int(valid.sum()), 1)
    water = valid & ~land
    click = scene_to_index((c0, r0), step, col, row)
    hull = _find_hull(img, water, click, max(snap_radius_m / m_px, 3.0), m_px, radar=bool(radar), tuning=tuning)
    if water.sum() < 64:
        raise ParameterError(
            "the area around the vessel is land, cloud or nodata: there is no open water to look for a wake in"
        )
    med, spread = median_spread(img[water])
    img = np.where(water, (img - med) / spread, 0.0).astype(np.float32)
    return LineChip(
        img,
        water,
        (c0, r0),
        click,
        hull,
        m_px,
        frame,
        bool(radar),
        bands,
        float((land & valid).sum() / in_scene),
        bool(hull is not None and (binary_dilated(hull.mask, int(tuning.moored_gap_px)) & land).any()),
        step,
        None if radar else _spectral(full, scene.info.band_descriptions, bands),
    )


def _land_mask(
    img: np.ndarray,
    valid: np.ndarray,
    bands_data: np.ndarray,
    descriptions: tuple[str | None, ...],
    bands: tuple[int, ...],
    *,
    radar: bool,
    m_px: float,
    tuning: Tuning,
) -> np.ndarray:
    gn = None if radar else _green_nir(descriptions, bands)
    ndwi = None
    if gn is not None:
        g, nir = bands_data[gn[0]], bands_data[gn[1]]
        ndwi = (g - nir) / np.maximum(g + nir, 1e-6)
    return land_mask(img, valid, m_px=m_px, ndwi=ndwi, tuning=tuning)


def green_nir_bands(descriptions: tuple[str | None, ...]) -> tuple[int, int] | None:
    """1-based band numbers of a green and a near-infrared band named in the file (Sentinel-2 or plain)."""
    gn = _green_nir(descriptions, tuple(range(1, len(descriptions) + 1)))
    return None if gn is None else (gn[0] + 1, gn[1] + 1)


def land_mask(
    img_z: np.ndarray,
    valid: np.ndarray,
    *,
    m_px: float,
    ndwi: np.ndarray | None = None,
    bright: bool = True,
    tuning: Tuning = DEFAULT_TUNING,
) -> np.ndarray:
    """Land, cloud and quays in a standardised image (water median 0, spread 1), dilated by 3 pixels for their
    bright edges:

    * with a water index: dry areas (NDWI < 0) a few pixels wide and more (``dry_disk_m``, ``dry_area_m2``):
      quays and breakwaters included.  Hulls and foam stay wet: on the Sentinel-2 crops NDWI is 0.13-0.31 on
      hulls, 0.3-0.55 on foam, 0.58 on open water and -0.2 to 0 on a breakwater;
    * by brightness alone: large bright areas that hold a disk of ``land_bright_disk_m``, wider than any
      foam wake, so a broad bright wake is not taken for land (quays narrower than that stay in), and cover
      at least ``land_area_m2`` (with ``bright``)."""

    def opened(cand: np.ndarray, radius_m: float, cap: int, area_m2: float) -> np.ndarray:
        radius = int(np.clip(round(radius_m / m_px), 1, cap))
        wide = binary_opened(cand, radius)
        lab, n = ndimage.label(wide)
        if n == 0:
            return wide
        sizes = ndimage.sum_labels(np.ones_like(img_z), lab, index=np.arange(1, n + 1))
        return np.isin(lab, 1 + np.nonzero(sizes >= area_m2 / m_px**2)[0])

    land = np.zeros_like(valid)
    if bright:
        t = tuning
        land |= opened(
            valid & (ndimage.uniform_filter(img_z, 3) > t.bright_z), t.land_bright_disk_m, 20, t.land_area_m2
        )
    if ndwi is not None:
        land |= opened(valid & (ndwi < 0.0), tuning.dry_disk_m, 10, tuning.dry_area_m2)
    return binary_dilated(land, 3)


def _find_hull(
    img: np.ndarray,
    water: np.ndarray,
    click_rc: tuple[float, float],
    radius_px: float,
    m_px: float,
    *,
    radar: bool,
    tuning: Tuning,
) -> Hull | None:
    """The bright compact blob nearest the click within ``radius_px``."""
    sm = ndimage.gaussian_filter(np.where(water, img, 0.0), 0.7)
    n = img.shape[0]
    rr, cc = np.mgrid[:n, :n]
    near = (rr - click_rc[0]) ** 2 + (cc - click_rc[1]) ** 2 <= radius_px**2
    if radar:
        med, spread = median_spread(sm[water])
        floor = med + tuning.hull_z_radar_spreads * spread
    else:
        floor = tuning.hull_z
    peaks = (sm == ndimage.maximum_filter(sm, size=3)) & near & water & (sm > floor)
    if not peaks.any():
        return None
    pr, pc = np.nonzero(peaks)
    # the brightest peak near the click: the hull outshines its own foam in most scenes
    d2 = (pr - click_rc[0]) ** 2 + (pc - click_rc[1]) ** 2
    score = sm[pr, pc] - 0.02 * d2  # nearer wins among similar peaks
    k = int(np.argmax(score))
    # the blob: the hull with the foam attached to it (the bow is at one end, the wake leaves the other)
    level = max(floor / 2, 0.25 * float(sm[pr[k], pc[k]]))
    lab, _ = ndimage.label(water & (sm > level))
    if lab[pr[k], pc[k]] == 0:
        return None
    blob = lab == lab[pr[k], pc[k]]
    if blob.sum() * m_px**2 > 600.0**2 / 4:  # larger than any hull: a bright region, not a vessel
        return None
    w = np.where(blob, np.clip(sm, 0, None), 0.0)
    tot = float(w.sum())
    r_c = float((w * rr).sum() / tot)
    c_c = float((w * cc).sum() / tot)
    length, width, axis = blob_shape(rr[blob] - r_c, cc[blob] - c_c, m_px)
    core = blob & (sm > max(floor / 2, 0.5 * float(sm[pr[k], pc[k]])))
    kr, kc = np.nonzero(core)
    core_length = blob_shape(kr - kr.mean(), kc - kc.mean(), m_px)[0] if kr.size else 0.0
    return Hull((r_c, c_c), length, width, axis, float(sm[pr[k], pc[k]]), blob, core, float(core_length))
