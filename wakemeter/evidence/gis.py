"""GIS exchange: vessels, tracks, wake lines and analysed areas with their attributes written as GeoPackage
(one layer each) or GeoJSON (one collection with a ``layer`` attribute, RFC 7946: WGS 84 longitude and
latitude) through pyogrio (GDAL/OGR) and shapely; vessel positions read back from CSV, GeoJSON or
GeoPackage.  No file format is written by hand.
"""

from __future__ import annotations

import csv
import math
import os
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import shapely

from .. import fileio
from ..detect.findings import ARM_KINDS, SegmentKind
from ..detect.result import WakeAnalysis, result_row
from ..errors import ParameterError, SceneReadError, SceneWriteError
from ..names import clean_name
from ..scene import geodesy
from ..scene.raster import Scene

#: the largest vessel list read (a list of positions, not a track archive)
MAX_LIST_BYTES = 64 * 1024**2
DRIVERS = {".gpkg": "GPKG", ".geojson": "GeoJSON", ".json": "GeoJSON"}
WGS84 = "EPSG:4326"


@dataclass(frozen=True)
class Feature:
    layer: str
    geometry: shapely.Geometry
    attributes: dict


def _lonlat(scene: Scene, pts: Sequence[tuple[float, float]]) -> list[tuple[float, float]]:
    lon, lat = geodesy.pixel_to_lonlat(scene.georef, [p[0] for p in pts], [p[1] for p in pts])
    return [(float(a), float(b)) for a, b in zip(np.atleast_1d(lon), np.atleast_1d(lat))]


def vessel_features(scene: Scene, name: str, analysis: WakeAnalysis, comparison: dict | None = None) -> list[Feature]:
    """The features of one analysed vessel: its point, its track, its wake lines and its analysed area."""
    if not scene.info.georeferenced:
        raise ParameterError("GIS files need a georeferenced scene (an image calibrated by hand has no longitude)")
    name = clean_name(name)
    attrs = {
        "name": name,
        "wake_found": analysis.wake_found,
        **result_row(analysis),
        "verdict": None if comparison is None else comparison["verdict"],
        "report_id": None if comparison is None else comparison.get("report_id"),
        "caution": "estimate from imagery, not a certified measurement",
    }
    (lon, lat) = _lonlat(scene, [analysis.vessel_px])[0]
    out = [Feature("vessels", shapely.Point(lon, lat), attrs)]
    base = {"name": name, "speed_kn": attrs["speed_kn"], "heading_deg": attrs["heading_deg"]}
    d = analysis.drawing
    for seg in d.segments:
        if seg.kind == SegmentKind.TRACK:
            out.append(Feature("tracks", shapely.LineString(_lonlat(scene, seg.points)), {**base, "kind": "track"}))
        elif seg.kind in ARM_KINDS or seg.kind == SegmentKind.HULL_SHIFT:
            out.append(
                Feature("wake_lines", shapely.LineString(_lonlat(scene, seg.points)), {**base, "kind": str(seg.kind)})
            )
        elif seg.kind == SegmentKind.AREA and len(seg.points) >= 3:
            ring = _lonlat(scene, seg.points)
            out.append(Feature("areas", shapely.Polygon(ring), {**base, "kind": "analysed area"}))
    return out


def write_features(path: str | os.PathLike, features: Sequence[Feature], *, force: bool = False) -> Path:
    """Write the features as GeoPackage (by layer) or GeoJSON (one collection), atomically."""
    import pyogrio.raw

    target = Path(path)
    driver = DRIVERS.get(target.suffix.lower())
    if driver is None:
        raise ParameterError(f"GIS files end in .gpkg or .geojson, got {target.name}")
    if not target.parent.is_dir():
        raise SceneWriteError(f"cannot write {target}: folder {target.parent} does not exist")
    if target.exists() and not force:
        raise SceneWriteError(f"cannot write {target.name}: it exists (choose another name or allow replacing)")
    if not features:
        raise ParameterError("nothing to write: no vessel was analysed")
    fileio.clean_stale(target.parent)
    tmp = fileio.temp_name(target, ext=target.suffix.lower())
    try:
        groups: dict[str, list[Feature]] = {}
        if driver == "GeoJSON":
            groups["wakemeter"] = [Feature(f.layer, f.geometry, {"layer": f.layer, **f.attributes}) for f in features]
        else:
            for f in features:
                groups.setdefault(f.layer, []).append(f)
        for i, (layer, feats) in enumerate(groups.items()):
            names = list(dict.fromkeys(k for f in feats for k in f.attributes))
            columns = [_column([f.attributes.get(k) for f in feats]) for k in names]
            pyogrio.raw.write(
                str(tmp),
                np.array([shapely.to_wkb(f.geometry) for f in feats], dtype=object),
                columns,
                names,
                layer=layer,
                driver=driver,
                geometry_type="Unknown" if driver == "GeoJSON" else _geometry_type(feats),
                crs=WGS84,
                append=i > 0,
            )
        os.chmod(tmp, fileio.FILE_MODE)
        os.replace(tmp, target)
    except Exception as err:  # noqa: BLE001 - GDAL's errors come in many types; the message says what failed
        raise SceneWriteError(f"cannot write {target.name}: {err}") from err
    finally:
        if tmp.exists():
            fileio.remove_tree(tmp)
    return target


def _geometry_type(feats: Sequence[Feature]) -> str:
    kinds = {f.geometry.geom_type for f in feats}
    return kinds.pop() if len(kinds) == 1 else "Unknown"


def _column(values: list) -> np.ndarray:
    present = [v for v in values if v is not None]
    if present and all(isinstance(v, bool) for v in present) and len(present) == len(values):
        return np.array(values, dtype=bool)
    if present and all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in present):
        return np.array([np.nan if v is None else float(v) for v in values], dtype=float)
    return np.array([None if v is None else str(v) for v in values], dtype=object)


@dataclass(frozen=True)
class VesselPosition:
    name: str
    lon: float
    lat: float

    def __post_init__(self) -> None:
        object.__setattr__(self, "name", clean_name(self.name))


NAME_FIELDS = ("name", "vessel", "id", "mmsi", "label")


def read_vessel_positions(path: str | os.PathLike) -> list[VesselPosition]:
    """Vessel positions from a CSV (columns lon/lat or longitude/latitude, optional name) or a GeoJSON or
    GeoPackage layer of points (in WGS 84 or any CRS the file states)."""
    p = Path(path)
    if not p.is_file():
        raise SceneReadError(f"{p}: no such file")
    if p.suffix.lower() == ".csv":
        return _positions_csv(p)
    import pyogrio.raw
    from pyproj import CRS, Transformer

    try:
        meta, _fids, geoms, fields = pyogrio.raw.read(str(p))
    except Exception as err:  # noqa: BLE001 - GDAL's errors come in many types
        raise SceneReadError(f"{p.name}: not a vector file wakemeter can read ({err})") from err
    names = [str(n).lower() for n in meta["fields"]]
    name_col = next((names.index(n) for n in NAME_FIELDS if n in names), None)
    crs = meta.get("crs") or WGS84
    to_wgs = Transformer.from_crs(CRS.from_user_input(crs), CRS.from_epsg(4326), always_xy=True)
    out = []
    skipped = 0
    for i, wkb in enumerate(geoms):
        if wkb is None:
            continue
        g = shapely.from_wkb(wkb)
        if g.geom_type != "Point":
            continue
        if g.is_empty:  # GDAL reads a point with NaN coordinates as an empty point
            skipped += 1
            continue
        lon, lat = to_wgs.transform(g.x, g.y)
        if not (np.isfinite(lon) and np.isfinite(lat) and -180 <= lon <= 360 and -90 <= lat <= 90):
            skipped += 1  # NaN, infinite or off the Earth: not a position
            continue
        name = (
            str(fields[name_col][i]) if name_col is not None and fields[name_col][i] is not None else f"vessel {i + 1}"
        )
        out.append(VesselPosition(name, float(lon), float(lat)))
    if not out:
        extra = f" ({skipped} point(s) with coordinates that are not a place on the Earth)" if skipped else ""
        raise SceneReadError(f"{p.name}: no point features (vessel positions) in the file{extra}")
    return out


def _positions_csv(p: Path) -> list[VesselPosition]:
    if p.stat().st_size > MAX_LIST_BYTES:
        raise SceneReadError(f"{p.name}: larger than {MAX_LIST_BYTES // 1024**2} MB; a vessel list is shorter")
    try:
        return _read_positions_csv(p)
    except UnicodeDecodeError as err:
        raise SceneReadError(
            f"{p.name}: not UTF-8 text ({err.reason} at byte {err.start}); save the list as UTF-8 CSV"
        ) from err
    except csv.Error as err:
        raise SceneReadError(f"{p.name}: not a readable CSV file ({err})") from err


def _read_positions_csv(p: Path) -> list[VesselPosition]:
    with open(p, newline="", encoding="utf-8-sig") as fh:
        reader = csv.DictReader(fh)
        header = {h.strip().lower(): h for h in (reader.fieldnames or [])}
        lon_c = next((header[k] for k in ("lon", "longitude", "lng", "x") if k in header), None)
        lat_c = next((header[k] for k in ("lat", "latitude", "y") if k in header), None)
        name_c = next((header[k] for k in NAME_FIELDS if k in header), None)
        if lon_c is None or lat_c is None:
            raise ParameterError(f"{p.name}: needs columns lon and lat (WGS 84 degrees)")
        out = []
        for i, row in enumerate(reader):
            try:
                lon, lat = float(row[lon_c]), float(row[lat_c])
            except (TypeError, ValueError):
                continue
            if math.isfinite(lon) and math.isfinite(lat) and -180 <= lon <= 360 and -90 <= lat <= 90:
                out.append(VesselPosition((row.get(name_c) or "").strip() if name_c else f"vessel {i + 1}", lon, lat))
    if not out:
        raise SceneReadError(f"{p.name}: no vessel position (lon, lat) in the file")
    return out
