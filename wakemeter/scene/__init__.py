"""Rasters, georeferencing and geodesy (rasterio, pyproj). No Qt."""
