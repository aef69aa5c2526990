"""A folder (or a list) of single-band files of one acquisition, read as one multi-band scene (no pixel copied).

Archives often deliver one file per band (``2023-08-22_S2L2A_B02.tif``, ``..._B03.tif``...).  The band files
of a folder that share a name stem and one pixel grid become the bands of a GDAL virtual raster (VRT, an
XML file that only points at them: https://gdal.org/drivers/raster/vrt.html), written once in the user's
cache folder and named after the stem, so the sensor table recognises the sensor from the band names and the
file name as it does for a stacked file.  The acquisition date is taken from the stem when it holds one
(``YYYY-MM-DD`` or ``YYYYMMDD``) and marked as read from the file names.
"""

from __future__ import annotations

import hashlib
import os
import re
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path
from xml.sax.saxutils import escape

import rasterio

from ..errors import SceneReadError
from ..fileio import atomic_write_bytes
from .cachedir import cache_dir

#: a band file: the stem, then the band as its archive names it (B02, B8A, B11...), then a raster extension
_BAND_FILE = re.compile(r"^(?P<stem>.*?)[_\-. ]?(?P<band>B\d{1,2}A?)\.(?:tif|tiff|jp2)$", re.IGNORECASE)
_DATE = re.compile(r"(?<!\d)(?P<y>(?:19|20)\d\d)-?(?P<m>[01]\d)-?(?P<d>[0-3]\d)(?!\d)")
#: where a date read from file names comes from (the scene's metadata names it)
FROM_NAMES = "the file names; a date only"
#: GDAL's names of the sample types a VRT band can have
_VRT_TYPES = {
    "uint8": "Byte",
    "uint16": "UInt16",
    "int16": "Int16",
    "uint32": "UInt32",
    "int32": "Int32",
    "float32": "Float32",
    "float64": "Float64",
}


@dataclass(frozen=True)
class BandFile:
    band: str  #: as the archive names it, upper case (B02)
    path: Path  #: the file, or the archive that holds it (its size and time key the cache)
    source: str | None = None  #: GDAL's path when the band is read from inside ``path`` (/vsizip/...)

    @property
    def gdal_path(self) -> str:
        return self.source if self.source is not None else str(self.path)


def band_files(folder: Path) -> tuple[str, list[BandFile]]:
    """The stem and the band files of the folder's largest group of one stem and one pixel grid, sorted by band
    number; SceneReadError when the folder holds no such files."""
    groups: dict[str, list[BandFile]] = {}
    for p in sorted(folder.iterdir()):
        m = _BAND_FILE.match(p.name)
        if m and p.is_file():
            groups.setdefault(m["stem"], []).append(BandFile(m["band"].upper(), p))
    if not groups:
        raise SceneReadError(
            f"{folder}: a folder, and none of its files is named like a band (…_B02.tif, …_B8A.jp2); open an image "
            "file, or a folder of one file per band"
        )
    stem, files = max(groups.items(), key=lambda kv: (len(kv[1]), kv[0]))
    same = _on_one_grid(files)
    if not same:
        raise SceneReadError(f"{folder}: no single-band file among the band files")
    return stem, same


def _on_one_grid(files: list[BandFile]) -> list[BandFile]:
    """The single-band files on the first one's pixel grid (size, CRS, transform), sorted by band number."""
    grid = None
    same: list[BandFile] = []
    for f in sorted(files, key=lambda f: _band_number(f.band)):
        try:
            with rasterio.open(f.path) as ds:
                this = (ds.width, ds.height, ds.crs, tuple(ds.transform)[:6], ds.count, ds.dtypes[0])
        except rasterio.errors.RasterioIOError as err:
            raise SceneReadError(f"{f.path.name}: a band file that cannot be read ({err})") from err
        grid = grid or this
        if this[:5] == grid[:5] and this[4] == 1:
            same.append(f)
    return same


def band_list_vrt(paths: Sequence[Path]) -> Path:
    """The virtual raster of single-band files given one by one (``wakemeter info a_B02.tif a_B03.tif ...``):
    each must be named for its band as in a folder, once each, all on one pixel grid."""
    files: list[BandFile] = []
    stems: list[str] = []
    for given in paths:
        p = Path(given).expanduser().resolve()
        if not p.is_file():
            raise SceneReadError(f"{given}: no such file")
        m = _BAND_FILE.match(p.name)
        if m is None:
            raise SceneReadError(
                f"{p.name}: several files make one scene only when each is named for its band (…_B02.tif, "
                "…_B8A.jp2); give one image file, or band files of one acquisition"
            )
        files.append(BandFile(m["band"].upper(), p))
        stems.append(m["stem"])
    bands = [f.band for f in files]
    twice = sorted({b for b in bands if bands.count(b) > 1})
    if twice:
        raise SceneReadError(f"band {twice[0]} is given twice; give each band's file once")
    same = _on_one_grid(files)
    if len(same) != len(files):
        odd = sorted({f.path.name for f in files} - {f.path.name for f in same})
        raise SceneReadError(
            f"{odd[0]}: not on the pixel grid of the other band files (size, CRS and transform must agree), or more "
            "than one band; resample the bands to one grid first"
        )
    stem = stems[0] if len(set(stems)) == 1 else (os.path.commonprefix(stems).rstrip("_-. ") or stems[0])
    date = acquisition_date(stem)
    meta = {"ACQUISITION_TIME": date, "ACQUISITION_TIME_SOURCE": FROM_NAMES} if date else {}
    return write_vrt(stem, same, meta)


def _band_number(band: str) -> tuple[int, str]:
    return int(re.sub(r"\D", "", band)), band


def acquisition_date(stem: str) -> str | None:
    """The date a stem names (ISO 8601, a date only), or None."""
    m = _DATE.search(stem)
    return f"{m['y']}-{m['m']}-{m['d']}" if m else None


def band_set_vrt(folder: Path) -> Path:
    """The virtual raster of the folder's band files (written once to the cache; the same files give the same
    VRT, a changed file a new one)."""
    stem, files = band_files(folder.resolve())
    date = acquisition_date(stem)
    meta = {"ACQUISITION_TIME": date, "ACQUISITION_TIME_SOURCE": FROM_NAMES} if date else {}
    return write_vrt(stem, files, meta)


def write_vrt(stem: str, files: list[BandFile], metadata: dict[str, str]) -> Path:
    """A VRT in the cache whose bands are ``files`` (one band each, one pixel grid), named after ``stem`` (the
    sensor table reads the platform from the name), with ``metadata`` as its own items."""
    with rasterio.open(files[0].gdal_path) as ds:
        width, height, crs, transform, dtype, nodata = (
            ds.width,
            ds.height,
            ds.crs,
            ds.transform,
            ds.dtypes[0],
            ds.nodata,
        )
    if dtype not in _VRT_TYPES:
        raise SceneReadError(f"{files[0].gdal_path}: band files of type {dtype} cannot be put together here")
    key = hashlib.sha1(
        (
            "|".join(f"{f.band}={f.gdal_path}:{f.path.stat().st_size}:{f.path.stat().st_mtime_ns}" for f in files)
            + repr(sorted(metadata.items()))
        ).encode()
    ).hexdigest()[:16]
    name = re.sub(r"[^A-Za-z0-9_.\-]+", "_", stem).strip("_") or "bands"
    target = cache_dir() / "band_sets" / key / f"{name}_bands.vrt"
    if target.exists():
        return target
    gt = ", ".join(
        repr(float(v)) for v in (transform.c, transform.a, transform.b, transform.f, transform.d, transform.e)
    )
    items = "".join(f'    <MDI key="{escape(k)}">{escape(v)}</MDI>\n' for k, v in metadata.items())
    meta = f"  <Metadata>\n{items}  </Metadata>\n" if items else ""
    bands = "".join(
        f'  <VRTRasterBand dataType="{_VRT_TYPES[dtype]}" band="{i}">\n'
        f"    <Description>{escape(f.band)}</Description>\n"
        + (f"    <NoDataValue>{nodata!r}</NoDataValue>\n" if nodata is not None else "")
        + "    <SimpleSource>\n"
        f'      <SourceFilename relativeToVRT="0">{escape(f.gdal_path)}</SourceFilename>\n'
        "      <SourceBand>1</SourceBand>\n"
        "    </SimpleSource>\n"
        "  </VRTRasterBand>\n"
        for i, f in enumerate(files, 1)
    )
    srs = f"  <SRS>{escape(crs.to_wkt())}</SRS>\n" if crs is not None else ""
    xml = (
        f'<VRTDataset rasterXSize="{width}" rasterYSize="{height}">\n{srs}'
        f"  <GeoTransform>{gt}</GeoTransform>\n{meta}{bands}</VRTDataset>\n"
    )
    target.parent.mkdir(parents=True, exist_ok=True)
    atomic_write_bytes(target, xml.encode())
    return target
