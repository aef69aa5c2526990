"""Scenes: open any raster, read windows at any zoom, know where it lies.

:func:`open_scene` gives a :class:`Scene`: size, bands, dtype, nodata, CRS,
affine transform (rotated or sheared ones too; an approximate one from ground
control points when the file has only GCPs), acquisition time when the
metadata has it, overviews, and a SHA-256 of the file on demand.  Reads go
through :meth:`Scene.read`, which uses internal overviews (or wakemeter's
cached pyramid) when zoomed out, and never loads a whole big scene.

Every GDAL/rasterio failure is translated here into :class:`SceneReadError`
naming the file and what is wrong.
"""

from __future__ import annotations

import contextlib
import hashlib
import os
import threading
import warnings
from collections.abc import Iterator
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np
import rasterio
from affine import Affine
from rasterio.enums import MaskFlags, Resampling
from rasterio.errors import NotGeoreferencedWarning, RasterioError
from rasterio.windows import Window

from ..errors import GeoreferenceError, ParameterError, SceneReadError
from . import geodesy, limits

if TYPE_CHECKING:
    from .sar_geometry import GrdGeometry

# Scenes without georeference are reported by SceneInfo.georeferenced; rasterio's warning adds nothing
# (and catching it per call is not thread-safe, so it is filtered once here).
warnings.filterwarnings("ignore", category=NotGeoreferencedWarning)

#: A full read larger than this many bytes is refused (use windows or zoomed-out reads).
MAX_FULL_READ_BYTES = 2 * 1024**3

_TIME_TAGS = (
    "ACQUISITION_START_TIME",
    "ACQUISITION_TIME",
    "FIRST_LINE_TIME",
    "DATE_TIME",
    "DATETIME",
    "TIFFTAG_DATETIME",
    "acquisition_time",
    "datetime",
)


def gdal_reason(err: BaseException) -> str:
    """GDAL's own reason for an error: rasterio often raises "Read failed. See previous exception for
    details." with the reason in the chained exception; the most specific message is returned."""
    seen: list[str] = []
    e: BaseException | None = err
    while e is not None and len(seen) < 8:
        text = " ".join(str(e).split())
        if text and "see previous exception" not in text.lower() and text not in seen:
            seen.append(text)
        e = e.__cause__ or e.__context__
    return seen[-1] if seen else (" ".join(str(err).split()) or type(err).__name__)


def _gdal_error_types() -> tuple[type[BaseException], ...]:
    try:
        from rasterio._err import CPLE_BaseError

        return (RasterioError, CPLE_BaseError)
    except ImportError:  # pragma: no cover - older/newer rasterio layouts
        return (RasterioError,)


GDAL_ERRORS = _gdal_error_types()


@dataclass(frozen=True)
class SceneInfo:
    """What a scene is, read once at open time (no pixels)."""

    path: Path
    width: int
    height: int
    count: int
    dtype: str
    nodata: float | None
    crs: str | None  #: 'EPSG:n' when the CRS has a code, else WKT; None without georeference
    transform: Affine
    georeferenced: bool
    georeference_note: str
    acquisition_time: str | None
    overview_factors: tuple[int, ...]
    band_descriptions: tuple[str | None, ...]
    driver: str
    file_size: int
    tags: dict = field(default_factory=dict, compare=False, repr=False)
    files: tuple[str, ...] = ()  #: every file the scene reads (the scene's own first; a VRT lists its sources)
    opened_as: Path | None = None  #: what was opened when it is not ``path`` itself (a band folder, a STAC item)

    @property
    def origin(self) -> Path:
        """What the analyst opened: the file, or the folder or item read through ``path`` (a virtual raster)."""
        return self.opened_as or self.path


#: how long closing a scene waits for reads in progress in other threads (s)
CLOSE_WAIT_S = 30.0


class Scene:
    """An opened scene: metadata plus thread-safe windowed reading.

    Use as a context manager or call :meth:`close`.  Each thread gets its own
    GDAL handle, so tile readers may call :meth:`read` concurrently.
    """

    def __init__(self, info: SceneInfo):
        self.info = info
        self._local = threading.local()
        self._handles: list = []
        self._lock = threading.Lock()
        self._idle = threading.Condition(self._lock)  #: notified when the last read in progress ends
        self._readers = 0
        self._closed = False
        self._sha256: str | None = None
        self.pyramid: list[tuple[int, Path]] = []  #: (factor, path) of cached reduced levels, if built
        self.calibration: geodesy.LocalFrame | None = None  #: hand calibration of a plain image
        self.photo_note = ""  #: why a photograph's own metadata gave no scale (empty: none tried, or it did)
        #: the radar geometry at any pixel, when the scene is a radar product that carries it (Sentinel-1 GRD)
        self.radar_product: GrdGeometry | None = None

    # ---- life cycle -------------------------------------------------------
    def __enter__(self) -> Scene:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    def close(self) -> None:
        """Close the file; reads in progress in other threads (the window's tiles) finish first, later ones
        are refused (GDAL crashes on a dataset closed under a read)."""
        with self._lock:
            self._closed = True
            self._idle.wait_for(lambda: self._readers == 0, timeout=CLOSE_WAIT_S)
            for h in self._handles:
                try:
                    h.close()
                except Exception:  # noqa: BLE001 - closing must never raise
                    pass
            self._handles.clear()
        self._local = threading.local()

    @contextlib.contextmanager
    def _reading(self) -> Iterator[None]:
        with self._lock:
            if self._closed:
                raise SceneReadError(f"{self.info.path.name}: the scene was closed")
            self._readers += 1
        try:
            yield
        finally:
            with self._lock:
                self._readers -= 1
                self._idle.notify_all()

    def _dataset(self, path: Path | None = None):
        path = path or self.info.path
        cache = getattr(self._local, "ds", None)
        if cache is None:
            cache = self._local.ds = {}
        ds = cache.get(path)
        if ds is None:
            try:
                with warnings.catch_warnings():
                    warnings.simplefilter("ignore", NotGeoreferencedWarning)
                    ds = rasterio.open(path)
            except GDAL_ERRORS as err:
                raise SceneReadError(f"{path}: cannot be opened any more ({gdal_reason(err)})") from err
            cache[path] = ds
            with self._lock:
                self._handles.append(ds)
        return ds

    # ---- convenience ------------------------------------------------------
    @property
    def width(self) -> int:
        return self.info.width

    @property
    def height(self) -> int:
        return self.info.height

    @property
    def georef(self) -> geodesy.GeoRef:
        if not self.info.georeferenced or self.info.crs is None:
            raise GeoreferenceError(
                f"{self.info.path.name} has no georeference; calibrate it by pixel size "
                "or by two points at a known distance"
            )
        return geodesy.GeoRef(self.info.transform, self.info.crs)

    def holds_lonlat(self, lon: float, lat: float) -> bool:
        """The longitude and latitude fall on the scene's pixels (needs a georeference)."""
        col, row = (float(v) for v in geodesy.lonlat_to_pixel(self.georef, lon, lat))
        return bool(0 <= col < self.width and 0 <= row < self.height)

    def calibrate(self, frame: geodesy.LocalFrame | None) -> None:
        """Give an image without georeference a hand calibration (see :func:`geodesy.calibrated_frame`).

        ``None`` removes it.  Georeferenced scenes keep their own georeference.
        """
        if self.info.georeferenced and frame is not None:
            raise GeoreferenceError(f"{self.info.path.name} is georeferenced; a hand calibration is not used")
        self.calibration = frame

    def local_frame(self, col: float | None = None, row: float | None = None) -> geodesy.LocalFrame:
        """Metric frame at a pixel (default: the scene centre); the calibration for plain images."""
        calibration = getattr(self, "calibration", None)
        if not self.info.georeferenced and calibration is not None:
            return calibration
        col = self.width / 2 if col is None else col
        row = self.height / 2 if row is None else row
        return geodesy.local_frame(self.georef, col, row)

    def sha256(self, chunk: int = 4 * 1024 * 1024) -> str:
        """SHA-256 of the file's bytes (computed once, on demand); for a virtual raster (a folder of band files),
        of its text followed by the bytes of every file it reads, in order, so the hash stands for the pixels."""
        if self._sha256 is None:
            h = hashlib.sha256()
            paths = [self.info.path]
            if self.info.driver == "VRT":
                inside = [f for f in self.info.files if f.startswith("/vsizip/")]
                if inside:  # bands read inside an archive: the archive's bytes stand for them
                    paths.append(self.info.opened_as or Path(inside[0]))
                paths += sorted(
                    Path(f) for f in self.info.files if f not in inside and Path(f).resolve() != self.info.path
                )
                from .s1_grd import ANNOTATION_TAG

                ann = self.info.tags.get(ANNOTATION_TAG, "")
                if ann and not ann.startswith("/vsizip/"):  # a radar product's geometry is read from it
                    paths.append(Path(ann))
            for path in paths:
                try:
                    with open(path, "rb") as fh:
                        while block := fh.read(chunk):
                            h.update(block)
                except OSError as err:
                    raise SceneReadError(f"{path}: cannot read the file to hash it ({err.strerror})") from err
            self._sha256 = h.hexdigest()
        return self._sha256

    # ---- reading ----------------------------------------------------------
    def read(
        self,
        *,
        window: tuple[int, int, int, int] | None = None,
        out_shape: tuple[int, int] | None = None,
        bands: tuple[int, ...] | None = None,
        resampling: Resampling = Resampling.average,
    ) -> tuple[np.ndarray, np.ndarray]:
        """Read pixels as float32 and a validity mask.

        Parameters
        ----------
        window : (col, row, width, height), optional
            Pixel window of the full-resolution scene (clipped to the scene); default all.
        out_shape : (rows, cols), optional
            Output size; smaller than the window reads zoomed out (overviews or the
            cached pyramid are used when present).  Default: the window's size.
        bands : tuple of int, optional
            1-based band numbers; default all.

        Returns
        -------
        data : ndarray, float32, shape (bands, rows, cols)
        valid : ndarray, bool, same shape (False at nodata, NaN or masked pixels)
        """
        c0, r0, w, h = window if window is not None else (0, 0, self.width, self.height)
        c1, r1 = min(c0 + w, self.width), min(r0 + h, self.height)
        c0, r0 = max(int(c0), 0), max(int(r0), 0)
        w, h = int(c1) - c0, int(r1) - r0
        if w <= 0 or h <= 0:
            raise ParameterError(f"the window {window!r} lies outside the scene ({self.width} x {self.height})")
        bands = tuple(bands) if bands else tuple(range(1, self.info.count + 1))
        if any(b < 1 or b > self.info.count for b in bands):
            raise ParameterError(f"bands must be within 1..{self.info.count}, got {bands!r}")
        oh, ow = out_shape if out_shape is not None else (h, w)
        if oh < 1 or ow < 1:
            raise ParameterError(f"out_shape must be at least 1 x 1, got {out_shape!r}")
        nbytes = len(bands) * oh * ow * 4
        if nbytes > MAX_FULL_READ_BYTES:
            raise SceneReadError(
                f"{self.info.path.name}: reading {ow} x {oh} pixels x {len(bands)} bands "
                f"({nbytes / 1e9:.1f} GB) is too large to hold; read a window or zoom out"
            )
        path, scale = self.info.path, 1
        factor = min(w / ow, h / oh)
        for f, p in sorted(self.pyramid, reverse=True):
            if factor >= f:
                path, scale = p, f
                break
        win = Window(c0 / scale, r0 / scale, w / scale, h / scale)
        try:
            with self._reading():
                ds = self._dataset(path)
                # no nodata and no mask on any band read: every pixel is valid, and GDAL need not make a mask
                masked = not all(ds.mask_flag_enums[b - 1] == [MaskFlags.all_valid] for b in bands)
                arr = ds.read(
                    list(bands),
                    window=win,
                    out_shape=(len(bands), oh, ow),
                    resampling=resampling,
                    masked=masked,
                    boundless=False,
                )
        except GDAL_ERRORS as err:
            raise SceneReadError(
                f"{self.info.path.name}: the pixels cannot be read - the file may be truncated or corrupt "
                f"({gdal_reason(err)})"
            ) from err
        except MemoryError as err:
            raise SceneReadError(f"{self.info.path.name}: not enough memory to read {ow} x {oh} pixels") from err
        if not masked:
            data = np.asarray(arr, dtype=np.float32)
            # integers are always finite; floats can hold NaN without a nodata value
            valid = np.isfinite(data) if arr.dtype.kind == "f" else np.ones(data.shape, bool)
            return data, valid
        data = np.asarray(arr.filled(np.nan) if arr.dtype.kind == "f" else arr.data, dtype=np.float32)
        valid = ~np.ma.getmaskarray(arr) & np.isfinite(data)
        return data, valid

    def read_full(self, *, bands: tuple[int, ...] | None = None) -> tuple[np.ndarray, np.ndarray]:
        """The whole scene at full resolution (refused, with a clear error, when too large)."""
        return self.read(bands=bands)


#: GDAL block cache for one pass over a whole scene (MB): enough for the blocks of one window and its margin
#: (a 1024² window of 4 bands in 512² blocks is 3 x 3 blocks x 4 bands x 0.5 MB); each block is read once or
#: twice, so a larger cache saves little time and costs its size in memory (benchmarks/bench_vessel_finder.py)
ONE_PASS_CACHE_MB = 48


@contextlib.contextmanager
def one_pass_cache(mb: int = ONE_PASS_CACHE_MB) -> Iterator[None]:
    """GDAL's block cache at ``mb`` for a pass that reads every window once (GDAL's cache is one per process:
    other readers meanwhile share the smaller cache), then back to what it was."""
    # rasterio hands this option to GDALSetCacheMax, which takes bytes (48 would mean 48 bytes: no cache)
    from rasterio.env import get_gdal_config, set_gdal_config

    before = get_gdal_config("GDAL_CACHEMAX")
    set_gdal_config("GDAL_CACHEMAX", int(mb) * 1024 * 1024)  # bytes here (GDALSetCacheMax)
    try:
        yield
    finally:
        set_gdal_config("GDAL_CACHEMAX", before)


def _describe_crs(crs) -> str | None:
    if crs is None:
        return None
    code = crs.to_epsg()
    return f"EPSG:{code}" if code else crs.to_wkt()


def open_scene(path: str | os.PathLike, *, allow_system_files: bool = False) -> Scene:
    """Open a raster file as a :class:`Scene` (GeoTIFF, COG, PNG, JPEG, anything GDAL reads), a folder of
    one file per band (:mod:`.band_set`) or a STAC item whose band assets are local files (:mod:`.stac_item`).

    Raises
    ------
    SceneReadError
        Missing file, a folder, no permission, not a raster, zero size, corrupt header, a declared layout
        that would need too much memory, no pixel data.
    limits.ReferencedFilesError
        The file refers to system or private files (a VRT, say) and ``allow_system_files`` was not given.
    """
    p = Path(path).expanduser()
    given = p
    if not p.exists():
        raise SceneReadError(f"{p}: no such file")
    if p.is_dir():  # a Sentinel-2 product, or one file per band: one virtual raster (no pixel copied)
        from .band_set import band_set_vrt
        from .s1_grd import grd_vrt, is_product
        from .safe_product import metadata_file, safe_vrt

        mtd = metadata_file(p)
        if is_product(p):  # a Sentinel-1 GRD product: sigma0 of its co-polarised measurement
            p = grd_vrt(p)
        else:
            p = safe_vrt(p, mtd) if mtd is not None else band_set_vrt(p)
    elif p.suffix.lower() == ".zip":  # a Sentinel-1 or -2 product as downloaded: read inside the zip
        from .s1_grd import grd_zip_vrt
        from .safe_product import safe_zip_vrt

        p = grd_zip_vrt(p) or safe_zip_vrt(p)
    elif p.suffix.lower() == ".json":  # a STAC item: its local band assets as one virtual raster
        from .stac_item import read_item, stac_vrt

        item = read_item(p)
        if item is not None:
            p = stac_vrt(p, item)
    if not os.access(p, os.R_OK):
        raise SceneReadError(f"{p}: permission denied (the file cannot be read by this user)")
    size = p.stat().st_size
    if size == 0:
        raise SceneReadError(f"{p}: the file is empty (0 bytes)")
    try:
        with warnings.catch_warnings(), rasterio.Env(GDAL_PAM_ENABLED="NO"):
            warnings.simplefilter("ignore", NotGeoreferencedWarning)
            with rasterio.open(p) as ds:
                files = tuple(str(f) for f in (ds.files or [str(p)]))
                archive = given.resolve() if given.suffix.lower() == ".zip" else None
                limits.check_referenced_files(p, files, allow_system_files=allow_system_files, archive=archive)
                info = _read_info(p, ds, size, files)
    except GDAL_ERRORS as err:
        msg = gdal_reason(err)
        if "not recognized as" in msg or "not a supported" in msg.lower():
            raise SceneReadError(f"{p}: not a raster image that can be read (unsupported or unknown format)") from err
        raise SceneReadError(
            f"{p}: cannot be opened as a raster - the file may be truncated or corrupt ({msg})"
        ) from err
    except (MemoryError, OverflowError, ValueError, TypeError) as err:
        raise SceneReadError(f"{p}: the file's header is not valid ({err})") from err
    if p != given:
        info = replace(info, opened_as=given.resolve())
    from .s1_grd import GEOREFERENCE_TAG, geometry_for

    if info.tags.get(GEOREFERENCE_TAG):  # a product's own account of its georeference (fitted to tie points)
        info = replace(info, georeference_note=info.tags[GEOREFERENCE_TAG])
    scene = _with_photo_scale(info)

    scene.radar_product = geometry_for(info.tags)
    return scene


def _with_photo_scale(info: SceneInfo) -> Scene:
    """A photograph without georeference that says its own scale (EXIF and XMP) comes calibrated, its note
    saying from what; one that cannot be (a tilted camera, no height) says why."""
    scene = Scene(info)
    if info.georeferenced or info.driver not in ("JPEG", "GTiff", "PNG"):
        return scene
    from .photo_scale import read_photo_scale

    ps = read_photo_scale(info.path)
    if ps is None:
        return scene
    if ps.pixel_size_m is None:
        scene.photo_note = f"not calibrated from the photo's metadata: {ps.reason}"
        scene.info = replace(info, georeference_note=f"no georeference; {scene.photo_note}")
        return scene
    try:
        frame = geodesy.calibrated_frame(
            pixel_size_m=ps.pixel_size_m,
            north_up_deg=ps.north_up_deg,
            scale_rel_std=ps.rel_std,
            bearing_std_deg=ps.yaw_std_deg,
            source=ps.source,
        )
    except ParameterError as err:
        scene.info = replace(info, georeference_note=f"no georeference; the photo's own scale is not usable ({err})")
        return scene
    scene.calibrate(frame)
    scene.info = replace(info, georeference_note=f"no georeference; calibrated from {ps.source}")
    return scene


def _read_info(p: Path, ds, size: int, files: tuple[str, ...] = ()) -> SceneInfo:
    if ds.width < 1 or ds.height < 1 or ds.count < 1:
        raise SceneReadError(f"{p}: the image has no pixels ({ds.width} x {ds.height}, {ds.count} bands)")
    if any(str(t).startswith("complex") for t in ds.dtypes):
        raise SceneReadError(
            f"{p.name}: its pixels are complex numbers ({ds.dtypes[0]}: a radar single-look complex product); "
            "wakemeter reads amplitude, intensity or dB: convert it first (for example a GDAL VRT with the 'mod' "
            "pixel function, or use the product's ground-range detected edition)"
        )
    limits.check_declared_sizes(p, ds)
    limits.check_not_empty(p, ds)
    crs = ds.crs
    transform = ds.transform
    note = ""
    georef = crs is not None and transform != Affine.identity()
    if not georef:
        gcps, gcp_crs = ds.gcps
        if gcps and gcp_crs is not None and len(gcps) >= 3:
            transform = rasterio.transform.from_gcps(gcps)
            crs = gcp_crs
            georef = True
            note = f"approximate affine fitted to {len(gcps)} ground control points"
    if georef:
        try:
            crs_text = _describe_crs(crs)
            assert crs_text is not None  # georef implies a CRS
            lon, lat = geodesy.pixel_to_lonlat(geodesy.GeoRef(transform, crs_text), ds.width / 2, ds.height / 2)
            if not (np.isfinite(lon) and np.isfinite(lat)):
                raise GeoreferenceError("the scene centre does not map to a place on the Earth")
        except (GeoreferenceError, ParameterError, Exception) as err:  # noqa: BLE001 - any CRS problem
            crs_text, georef = None, False
            note = f"georeference present but unusable ({err}); treated as not georeferenced"
    else:
        crs_text = None
        note = note or "no georeference: calibrate by pixel size or two points at a known distance"
    tags = {}
    for ns in (None, "IMAGE_STRUCTURE"):
        try:
            tags.update(ds.tags(ns=ns) if ns else ds.tags())
        except GDAL_ERRORS:
            pass
    acq = next((tags[k] for k in _TIME_TAGS if k in tags and tags[k].strip()), None)
    if acq is None and "EXIF_DateTimeOriginal" in tags:  # a photo: its camera's clock, with its zone if it says
        from .photo_scale import camera_time

        taken = camera_time(p)
        if taken is not None:
            acq, tags["ACQUISITION_TIME_SOURCE"] = taken
    if acq is None:  # archives name files after the date: a date only, and marked as read from the name
        from .band_set import FROM_NAMES, acquisition_date

        acq = acquisition_date(p.stem)
        if acq is not None:
            tags["ACQUISITION_TIME_SOURCE"] = FROM_NAMES
    try:
        ovr = tuple(ds.overviews(1))
    except GDAL_ERRORS:
        ovr = ()
    return SceneInfo(
        path=p.resolve(),
        width=ds.width,
        height=ds.height,
        count=ds.count,
        dtype=ds.dtypes[0],
        nodata=ds.nodata,
        crs=crs_text,
        transform=transform if georef else Affine.identity(),
        georeferenced=georef,
        georeference_note=note,
        acquisition_time=acq,
        overview_factors=ovr,
        band_descriptions=tuple(ds.descriptions),
        driver=ds.driver,
        file_size=size,
        tags=tags,
        files=files,
    )
