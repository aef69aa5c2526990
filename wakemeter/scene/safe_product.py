"""A Sentinel-2 Level-1C or Level-2A product in its SAFE folder, read as one scene of its 10 m bands.

The SAFE layout (ESA, Sentinel-2 Products Specification Document): the product's metadata file
``MTD_MSIL1C.xml`` or ``MTD_MSIL2A.xml`` at the top, the bands of each tile under
``GRANULE/<tile>/IMG_DATA/`` (Level-2A: in ``R10m/`` as ``..._B02_10m.jp2``; Level-1C: ``..._B02.jp2``).
The 10 m bands B02, B03, B04 and B08 of the first tile become a virtual raster (:func:`.band_set.write_vrt`);
the product's start time and spacecraft come from its metadata and are marked as read from it.
"""

from __future__ import annotations

import re
import xml.etree.ElementTree as ET
from pathlib import Path

from ..errors import SceneReadError
from .band_set import BandFile, write_vrt
from .product_xml import MAX_METADATA_BYTES, parse_product_xml

METADATA_FILES = ("MTD_MSIL2A.xml", "MTD_MSIL1C.xml")
TEN_METRE_BANDS = ("B02", "B03", "B04", "B08")
_BAND_IN_NAME = re.compile(r"_(B\d{2}|B8A)(?:_10m)?\.jp2$", re.IGNORECASE)


def metadata_file(folder: Path) -> Path | None:
    """The product metadata file when ``folder`` is a Sentinel-2 SAFE product, else None."""
    for name in METADATA_FILES:
        if (folder / name).is_file():
            return folder / name
    return None


def _text(root: ET.Element, tag: str) -> str | None:
    """The first element named ``tag`` anywhere in the document (namespaces ignored)."""
    for el in root.iter():
        if el.tag.rsplit("}", 1)[-1] == tag and el.text and el.text.strip():
            return el.text.strip()
    return None


def _ten_metre(jp2s: list[str]) -> dict[str, str]:
    """Band name -> path among one granule's JPEG 2000 files (the R10m folder's when there is one)."""
    r10 = [j for j in jp2s if "/R10m/" in j.replace("\\", "/")]
    found: dict[str, str] = {}
    for j in sorted(r10 or jp2s):
        m = _BAND_IN_NAME.search(j)
        if m and m[1].upper() in TEN_METRE_BANDS:
            found.setdefault(m[1].upper(), j)
    return found


def _metadata(root: ET.Element, mtd_name: str, granules: list[str]) -> dict[str, str]:
    meta: dict[str, str] = {}
    start = _text(root, "PRODUCT_START_TIME") or _text(root, "DATATAKE_SENSING_START")
    if start:
        meta.update(ACQUISITION_TIME=start, ACQUISITION_TIME_SOURCE=f"the product's metadata ({mtd_name})")
    craft = _text(root, "SPACECRAFT_NAME")
    if craft:
        meta["SPACECRAFT_NAME"] = craft
    if len(granules) > 1:
        meta["TILES_NOTE"] = f"the first of {len(granules)} tiles ({granules[0]})"
    return meta


def safe_vrt(folder: Path, mtd: Path) -> Path:
    """The virtual raster of the product's 10 m bands (first tile), with its time and spacecraft."""
    if mtd.stat().st_size > MAX_METADATA_BYTES:
        raise SceneReadError(f"{mtd.name}: larger than a product's metadata can be")
    root = parse_product_xml(mtd.read_bytes(), mtd.name)
    granules = sorted(p for p in (folder / "GRANULE").glob("*") if p.is_dir())
    if not granules:
        raise SceneReadError(f"{folder.name}: a Sentinel-2 product without a GRANULE folder (incomplete download?)")
    img = granules[0] / "IMG_DATA"
    found = _ten_metre([p.as_posix() for p in img.rglob("*.jp2")])
    missing = [b for b in TEN_METRE_BANDS if b not in found]
    if missing:
        place = img / "R10m" if (img / "R10m").is_dir() else img
        raise SceneReadError(f"{folder.name}: the 10 m band(s) {', '.join(missing)} are not in {place}")
    meta = _metadata(root, mtd.name, [g.name for g in granules])
    stem = folder.name.removesuffix(".SAFE")
    return write_vrt(stem, [BandFile(b, Path(found[b])) for b in TEN_METRE_BANDS], meta)


def safe_zip_vrt(archive: Path) -> Path:
    """A Sentinel-2 product as the zip it is downloaded in (``<name>.SAFE/`` inside): the same 10 m bands and
    metadata, the bands read inside the archive through GDAL's /vsizip/ (nothing is unpacked)."""
    import zipfile

    try:
        zf = zipfile.ZipFile(archive)
    except (zipfile.BadZipFile, OSError) as err:
        raise SceneReadError(f"{archive.name}: not a zip archive that can be read ({err})") from err
    with zf:
        names = zf.namelist()
        mtd = next(
            (
                n
                for n in names
                if n.count("/") == 1 and n.split("/")[0].endswith(".SAFE") and n.split("/")[1] in METADATA_FILES
            ),
            None,
        )
        if mtd is None:
            raise SceneReadError(
                f"{archive.name}: no Sentinel-2 product in this zip (no <name>.SAFE/MTD_MSIL2A.xml or MTD_MSIL1C.xml)"
            )
        if zf.getinfo(mtd).file_size > MAX_METADATA_BYTES:
            raise SceneReadError(f"{mtd}: larger than a product's metadata can be")
        root = parse_product_xml(zf.read(mtd), mtd.split("/")[1])
    top = mtd.split("/")[0]
    prefix = f"{top}/GRANULE/"
    granules = sorted({n[len(prefix) :].split("/")[0] for n in names if n.startswith(prefix) and n.count("/") > 2})
    if not granules:
        raise SceneReadError(f"{archive.name}: a Sentinel-2 product without a GRANULE folder (incomplete download?)")
    first = f"{prefix}{granules[0]}/IMG_DATA/"
    found = _ten_metre([n for n in names if n.startswith(first) and n.lower().endswith(".jp2")])
    missing = [b for b in TEN_METRE_BANDS if b not in found]
    if missing:
        raise SceneReadError(f"{archive.name}: the 10 m band(s) {', '.join(missing)} are not in {first}")
    where = archive.resolve()
    bands = [BandFile(b, where, f"/vsizip/{where}/{found[b]}") for b in TEN_METRE_BANDS]
    return write_vrt(top.removesuffix(".SAFE"), bands, _metadata(root, mtd.split("/")[1], granules))
