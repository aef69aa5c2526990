"""The radar geometry of a ground-range product at any pixel, from its annotation: slant range, incidence,
look and flight bearings, platform speed and line time; and the affine that best fits its geolocation grid.

- Slant range c * tau / 2 from the grid's two-way slant range time tau; incidence angle and zero-Doppler
  azimuth time interpolated bilinearly in line and pixel.
- The look bearing is the geodesic bearing of increasing pixel (ground range grows away from the radar), the
  flight bearing that of increasing azimuth time (WGS 84, :data:`~.geodesy.WGS84_GEOD`).
- The platform speed is the norm of the orbit state vectors' Earth-fixed velocity at the pixel's time.
- The georeference: an affine (pixel -> UTM metres of the centre's zone) fitted by least squares to the grid's
  points; its largest misfit is stated with it.
"""

from __future__ import annotations

import xml.etree.ElementTree as ET
from dataclasses import dataclass
from datetime import timedelta

import numpy as np

from ..errors import SceneReadError
from .product_xml import children, iso_utc, number, product_time, text

#: speed of light in vacuum, m/s (exact by the SI definition of the metre)
C_MPS = 299_792_458.0
#: standard uncertainty of the slant range read at a pixel: the grid's slant range time is interpolated
#: linearly between points about 25 km apart, where the true curve bows by up to about 0.1 km (common
#: practice, no source: a margin over that bow)
SLANT_RANGE_STD_M = 500.0
#: relative standard uncertainty of the platform speed as the azimuth-offset formula's V: the ground shift of
#: a target with radial speed v_r is -R v_r V_g / V_r^2, and V_r^2 ~ V_s V_g makes it -R v_r / V_s with V_s
#: the satellite's Earth-fixed speed (Cumming & Wong 2005, Digital Processing of Synthetic Aperture Radar
#: Data, ch. 4, from memory); 1 % covers that approximation (common practice, no source)
PLATFORM_SPEED_REL_STD = 0.01
#: how far apart (pixels) the two points are whose geodesic bearing gives a direction at a pixel
BEARING_STEP_PX = 50.0


@dataclass(frozen=True)
class PixelGeometry:
    """The radar geometry at one pixel, as read from the product's annotation."""

    slant_range_m: float
    platform_speed_mps: float
    look_bearing_deg: float  #: true bearing from the radar toward the pixel (increasing ground range)
    flight_bearing_deg: float  #: true bearing of increasing azimuth time
    incidence_deg: float
    azimuth_time: str  #: ISO 8601 UTC, zero-Doppler time of the pixel's line
    right_looking: bool  #: the look bearing is 90 degrees clockwise of the flight bearing (within 10)
    source: str
    slant_range_std_m: float = SLANT_RANGE_STD_M
    platform_speed_std_mps: float = 0.0


def _grid_axes(lines: np.ndarray, pixels: np.ndarray, where: str) -> tuple[np.ndarray, np.ndarray]:
    """The grid's distinct lines and pixels, when every (line, pixel) pair is there once."""
    ul, up = np.unique(lines), np.unique(pixels)
    if ul.size < 2 or up.size < 2 or ul.size * up.size != lines.size:
        raise SceneReadError(f"{where}: the geolocation grid is not a full grid of lines and pixels")
    return ul, up


def bilinear(ax0: np.ndarray, ax1: np.ndarray, values: np.ndarray, x0: np.ndarray, x1: np.ndarray) -> np.ndarray:
    """Bilinear interpolation on a rectilinear grid, carried on linearly beyond its edges."""
    from scipy.interpolate import RegularGridInterpolator

    f = RegularGridInterpolator((ax0, ax1), values, method="linear", bounds_error=False, fill_value=None)
    return np.asarray(f(np.stack([np.ravel(x0), np.ravel(x1)], axis=-1))).reshape(np.shape(x0))


class GrdGeometry:
    """The radar geometry of a GRD product at any pixel (from its annotation's geolocation grid and orbit)."""

    def __init__(self, root: ET.Element, source: str, where: str):
        self.source = source
        pts = children(root, "geolocationGrid/geolocationGridPointList", "geolocationGridPoint")
        if len(pts) < 4:
            raise SceneReadError(f"{where}: the annotation has no geolocation grid")
        fields = ("line", "pixel", "slantRangeTime", "incidenceAngle", "latitude", "longitude")
        rows = [[number(text(p, f, where), f, where) for f in fields] for p in pts]
        t0 = product_time(text(pts[0], "azimuthTime", where), where)
        self.t0 = t0
        az = [(product_time(text(p, "azimuthTime", where), where) - t0).total_seconds() for p in pts]
        arr = np.array(rows)
        order = np.lexsort((arr[:, 1], arr[:, 0]))
        arr, az_s = arr[order], np.asarray(az)[order]
        self.lines, self.pixels = _grid_axes(arr[:, 0], arr[:, 1], where)
        shape = (self.lines.size, self.pixels.size)
        self._grids = {f: arr[:, k].reshape(shape) for k, f in enumerate(fields) if k >= 2}
        self._grids["azimuthTime"] = az_s.reshape(shape)
        orbit = children(root, "generalAnnotation/orbitList", "orbit")
        if len(orbit) < 2:
            raise SceneReadError(f"{where}: the annotation has fewer than two orbit state vectors")
        self._orbit_t = np.array([(product_time(text(o, "time", where), where) - t0).total_seconds() for o in orbit])
        self._orbit_v = np.array(
            [[number(text(o, f"velocity/{a}", where), "a velocity", where) for a in "xyz"] for o in orbit]
        )
        ok = np.argsort(self._orbit_t)
        self._orbit_t, self._orbit_v = self._orbit_t[ok], self._orbit_v[ok]

    def _at(self, name: str, col: np.ndarray | float, row: np.ndarray | float) -> np.ndarray:
        # the grid's pixel and line are sample indices: the centre of pixel (c, r) is (c + 0.5, r + 0.5)
        return bilinear(self.lines, self.pixels, self._grids[name], np.asarray(row) - 0.5, np.asarray(col) - 0.5)

    def grid(self, name: str) -> np.ndarray:
        """The grid's values of ``name`` (longitude, latitude, slantRangeTime, incidenceAngle, azimuthTime),
        (lines, pixels)."""
        return self._grids[name]

    def lonlat(self, col, row) -> tuple[np.ndarray, np.ndarray]:
        return self._at("longitude", col, row), self._at("latitude", col, row)

    def _bearing(self, col: float, row: float, dcol: float, drow: float) -> float:
        from .geodesy import WGS84_GEOD

        lon, lat = self.lonlat(np.array([col, col + dcol]), np.array([row, row + drow]))
        az, _, _ = WGS84_GEOD.inv(lon[0], lat[0], lon[1], lat[1])
        return float(az) % 360.0

    def at(self, col: float, row: float) -> PixelGeometry:
        """The geometry at pixel (col, row) (continuous pixel coordinates)."""
        tau = float(self._at("slantRangeTime", col, row))
        t = float(self._at("azimuthTime", col, row))
        ahead = float(self._at("azimuthTime", col, row + BEARING_STEP_PX)) - t
        look = self._bearing(col, row, BEARING_STEP_PX, 0.0)
        flight = self._bearing(col, row, 0.0, BEARING_STEP_PX if ahead >= 0 else -BEARING_STEP_PX)
        v = np.array([np.interp(t, self._orbit_t, self._orbit_v[:, k]) for k in range(3)])
        turn = (look - flight) % 360.0
        speed = float(np.linalg.norm(v))
        return PixelGeometry(
            slant_range_m=C_MPS * tau / 2.0,
            platform_speed_mps=speed,
            look_bearing_deg=look,
            flight_bearing_deg=flight,
            incidence_deg=float(self._at("incidenceAngle", col, row)),
            azimuth_time=iso_utc(self.t0 + timedelta(seconds=t)),
            right_looking=abs(turn - 90.0) <= 10.0,
            source=self.source,
            platform_speed_std_mps=PLATFORM_SPEED_REL_STD * speed,
        )


@dataclass(frozen=True)
class AffineFit:
    crs: str
    transform: tuple[float, float, float, float, float, float]  #: GDAL order: c, a, b, f, d, e
    max_misfit_m: float
    rms_misfit_m: float
    n_points: int


def fit_georeference(geo: GrdGeometry) -> AffineFit:
    """An affine (pixel -> UTM metres of the centre's zone) fitted by least squares to the grid's points."""
    from pyproj import Transformer

    from .geodesy import utm_crs_for

    L, P = np.meshgrid(geo.lines, geo.pixels, indexing="ij")
    lon, lat = geo.grid("longitude").ravel(), geo.grid("latitude").ravel()
    crs = utm_crs_for(float(np.median(lon)), float(np.median(lat)))
    x, y = Transformer.from_crs("EPSG:4326", crs, always_xy=True).transform(lon, lat)
    col, row = P.ravel() + 0.5, L.ravel() + 0.5
    A = np.column_stack([col, row, np.ones_like(col)])
    cx, *_ = np.linalg.lstsq(A, x, rcond=None)
    cy, *_ = np.linalg.lstsq(A, y, rcond=None)
    miss = np.hypot(A @ cx - x, A @ cy - y)
    return AffineFit(
        crs,
        (float(cx[2]), float(cx[0]), float(cx[1]), float(cy[2]), float(cy[0]), float(cy[1])),
        float(miss.max()),
        float(np.sqrt(np.mean(miss**2))),
        int(miss.size),
    )
