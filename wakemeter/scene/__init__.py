"""Rasters, georeferencing and geodesy (rasterio, pyproj). No Qt.

GDAL's block cache is capped at 256 MB unless the user set ``GDAL_CACHEMAX``
(its default, 5 % of RAM, would let a pyramid build hold >1 GB).
"""

import os

os.environ.setdefault("GDAL_CACHEMAX", "256")
