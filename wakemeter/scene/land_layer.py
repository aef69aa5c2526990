"""A land layer the analyst gives (coastline or land polygons as GeoPackage, GeoJSON or shapefile, in any CRS
the file states): where the vessel finder must not look.  Scenes without a water index (single-band optical,
radar) cannot tell a quay or a rocky shore from a hull by their pixels alone; analysts keep such layers
(national coastline sets, OpenStreetMap land polygons).

The polygons are read once with pyogrio, reprojected to the scene's CRS with pyproj (shapely.transform), and
burnt into each window the finder reads with rasterio.features.geometry_mask (a pixel is land when its centre
lies inside; ``all_touched`` would widen the land by up to a pixel).  A line layer (a coastline drawn as
lines) is refused with the reason: which side is land cannot be known from a line."""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import shapely
from affine import Affine

from ..errors import SceneReadError
from .geodesy import GeoRef

#: largest land layer read (a national coastline set at full detail is a few hundred MB; cut it to the area)
MAX_LAYER_BYTES = 512 * 1024**2


@dataclass(frozen=True)
class LandLayer:
    """Land polygons in a scene's CRS."""

    geometry: shapely.Geometry  #: the union of the layer's polygons, in the scene's map coordinates
    source: str  #: the file it came from
    polygons: int  #: how many polygon features were read

    @classmethod
    def read(cls, path: str | os.PathLike, georef: GeoRef | None) -> LandLayer:
        """The polygons of ``path`` in the CRS of ``georef`` (a georeferenced scene's); raises
        :class:`SceneReadError` saying what is wrong."""
        p = Path(path)
        if georef is None:
            raise SceneReadError("a land layer needs a georeferenced scene (its polygons are in map coordinates)")
        if not p.exists():
            raise SceneReadError(f"{p}: no such file")
        if p.is_file() and p.stat().st_size > MAX_LAYER_BYTES:
            raise SceneReadError(f"{p.name}: larger than {MAX_LAYER_BYTES // 1024**2} MB; cut the layer to the area")
        import pyogrio.raw
        from pyproj import CRS, Transformer

        try:
            meta, _fids, geoms, _fields = pyogrio.raw.read(str(p))
        except Exception as err:  # noqa: BLE001 - GDAL's errors come in many types
            raise SceneReadError(f"{p.name}: not a vector file wakemeter can read ({err})") from err
        if not meta.get("crs"):
            raise SceneReadError(f"{p.name}: the layer states no coordinate reference system")
        shapes = [shapely.from_wkb(g) for g in geoms if g is not None]
        polys = [g for g in shapes if g.geom_type in ("Polygon", "MultiPolygon") and not g.is_empty]
        if not polys:
            kinds = sorted({g.geom_type for g in shapes}) or ["nothing"]
            why = " (a line cannot say which side is land)" if any("Line" in k for k in kinds) else ""
            raise SceneReadError(f"{p.name}: no land polygons in the layer, only {', '.join(kinds)}{why}")
        to_scene = Transformer.from_crs(
            CRS.from_user_input(meta["crs"]), CRS.from_user_input(georef.crs), always_xy=True
        )
        merged = shapely.union_all([shapely.make_valid(g) for g in polys])
        moved = shapely.transform(merged, lambda xy: np.column_stack(to_scene.transform(xy[:, 0], xy[:, 1])))
        if not np.all(np.isfinite(shapely.get_coordinates(moved))):
            raise SceneReadError(f"{p.name}: the layer's polygons do not map into the scene's coordinates")
        return cls(moved, str(p), len(polys))

    def mask(self, georef: GeoRef, window: tuple[int, int, int, int], shape: tuple[int, int]) -> np.ndarray:
        """Land (True) on a grid of ``shape`` (rows, cols) covering the scene pixels ``window`` (col, row,
        width, height) of the scene whose georeference is ``georef``."""
        from rasterio.features import geometry_mask

        c0, r0, w, h = window
        rows, cols = shape
        t = georef.transform @ Affine.translation(c0, r0) @ Affine.scale(w / cols, h / rows)
        return geometry_mask([self.geometry], out_shape=shape, transform=t, invert=True)
