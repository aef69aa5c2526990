"""A STAC item (SpatioTemporal Asset Catalog, https://stacspec.org: a GeoJSON Feature with ``stac_version``,
``properties.datetime`` and ``assets``) whose band assets are local files, read as one multi-band scene.

The raster assets that name a band (the ``eo:bands`` extension's ``name``, else the asset's key) and share one
pixel grid become the bands of a virtual raster (:func:`.band_set.write_vrt`); the item's ``datetime`` is the
acquisition time and its ``platform`` the platform, both marked as read from the item.  Assets on the network
are not fetched (wakemeter makes no network requests): the message says to download them.
"""

from __future__ import annotations

import json
from pathlib import Path
from urllib.parse import unquote, urlparse

import rasterio

from ..errors import SceneReadError
from .band_set import BandFile, write_vrt

#: the largest item file read (an item is a small JSON document)
MAX_ITEM_BYTES = 16 * 1024**2
#: media types of raster assets (GeoTIFF and COG; JPEG 2000)
_RASTER_TYPES = ("image/tiff", "image/jp2")
FROM_ITEM = "the STAC item"


def read_item(path: Path) -> dict | None:
    """The item's JSON when ``path`` is a STAC item, else None (any other JSON, or not JSON)."""
    try:
        if path.stat().st_size > MAX_ITEM_BYTES:
            return None
        data = json.loads(path.read_bytes().decode("utf-8"))
    except (OSError, UnicodeDecodeError, ValueError, RecursionError):
        return None
    if isinstance(data, dict) and data.get("type") == "Feature" and "stac_version" in data:
        return data
    return None


def _local(href: str, base: Path) -> Path | None:
    """The local file an asset's href names (relative to the item, absolute, or file://), else None."""
    u = urlparse(href)
    if u.scheme in ("http", "https", "s3", "gs", "ftp", "az"):
        return None
    p = Path(unquote(u.path if u.scheme == "file" else href))
    return p if p.is_absolute() else (base / p)


def stac_vrt(path: Path, item: dict) -> Path:
    """The virtual raster of the item's local band assets on their common grid."""
    base = path.resolve().parent
    assets = item.get("assets")
    if not isinstance(assets, dict) or not assets:
        raise SceneReadError(f"{path.name}: a STAC item without assets")
    raw_props = item.get("properties")
    props: dict = raw_props if isinstance(raw_props, dict) else {}
    bands: list[BandFile] = []
    remote = []
    for key, a in assets.items():
        if not isinstance(a, dict) or not isinstance(a.get("href"), str):
            continue
        kind = str(a.get("type", ""))
        if kind and not kind.startswith(_RASTER_TYPES):
            continue
        eo = a.get("eo:bands")
        if not eo or not isinstance(eo, list) or len(eo) != 1 or not isinstance(eo[0], dict):
            continue  # not one band (a true-colour picture, a mask...)
        name = str(eo[0].get("name") or key).upper()
        local = _local(a["href"], base)
        if local is None:
            remote.append(str(key))
        elif local.is_file():
            bands.append(BandFile(name, local))
        else:
            raise SceneReadError(f"{path.name}: asset {key} names {local}, which is not there")
    if not bands:
        extra = f" (on the network: {', '.join(remote[:6])}; download them beside the item)" if remote else ""
        raise SceneReadError(f"{path.name}: no band asset that is a local file{extra}")
    grids: dict[tuple, list[BandFile]] = {}
    for b in bands:
        with rasterio.open(b.path) as ds:
            grid = (ds.width, ds.height, str(ds.crs), tuple(ds.transform)[:6], ds.count)
        if grid[4] == 1:
            grids.setdefault(grid, []).append(b)
    if not grids:
        raise SceneReadError(f"{path.name}: no single-band asset")
    chosen = max(grids.values(), key=len)
    meta: dict[str, str] = {}
    if props.get("datetime"):
        meta.update(ACQUISITION_TIME=str(props["datetime"]), ACQUISITION_TIME_SOURCE=FROM_ITEM)
    if props.get("platform"):
        meta["PLATFORM"] = str(props["platform"])
    stem = str(item.get("id") or path.stem)
    return write_vrt(stem, sorted(chosen, key=lambda b: b.band), meta)
