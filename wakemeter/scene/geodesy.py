"""Geodesy, in one place: pixel <-> map <-> WGS 84 lon/lat, ground distances, true bearings.

Pixel coordinates are continuous (column, row) with (0, 0) at the top-left
corner of the top-left pixel (the GDAL/rasterio convention); the centre of
pixel (c, r) is (c + 0.5, r + 0.5).  Bearings are true bearings in degrees,
clockwise from true north, in [0, 360).

A direction measured on the image becomes a true bearing through
:class:`LocalFrame` and nowhere else.  The frame is built from the geodesic
distance and azimuth (WGS 84, :class:`pyproj.Geod`) of one-pixel steps, so it
includes grid convergence, the scale factor, affine rotation and shear,
flipped axes and the shrinking degree of longitude of geographic CRSs.

References
----------
1. Karney, C. F. F. (2013). Algorithms for geodesics. *J. Geodesy* 87, 43-55
   (the method behind ``pyproj.Geod.inv``/``fwd``).
2. Snyder, J. P. (1987). *Map Projections - A Working Manual*, USGS PP 1395
   (grid convergence and scale factor of transverse Mercator).
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np
from affine import Affine
from numpy.typing import ArrayLike
from pyproj import CRS, Geod, Transformer
from pyproj.exceptions import CRSError, ProjError

from ..errors import GeoreferenceError, ParameterError

WGS84_GEOD = Geod(ellps="WGS84")


@lru_cache(maxsize=64)
def _crs(wkt_or_code: str) -> CRS:
    try:
        return CRS.from_user_input(wkt_or_code)
    except CRSError as err:
        raise GeoreferenceError(f"unknown coordinate reference system: {wkt_or_code[:80]!r}") from err


@lru_cache(maxsize=64)
def _to_lonlat(crs_text: str) -> Transformer:
    return Transformer.from_crs(_crs(crs_text), CRS.from_epsg(4326), always_xy=True)


@lru_cache(maxsize=64)
def _from_lonlat(crs_text: str) -> Transformer:
    return Transformer.from_crs(CRS.from_epsg(4326), _crs(crs_text), always_xy=True)


@dataclass(frozen=True)
class GeoRef:
    """Where a raster lies: its affine transform and CRS (as WKT or 'EPSG:n')."""

    transform: Affine
    crs: str

    def __post_init__(self) -> None:
        if not isinstance(self.transform, Affine):
            raise ParameterError(f"transform must be an affine.Affine, got {type(self.transform).__name__}")
        if abs(self.transform.determinant) < 1e-300 or not all(np.isfinite(tuple(self.transform))):
            raise GeoreferenceError(f"the affine transform is degenerate: {tuple(self.transform)[:6]}")
        _crs(self.crs)  # validates

    @property
    def pyproj_crs(self) -> CRS:
        return _crs(self.crs)

    @property
    def epsg(self) -> int | None:
        return self.pyproj_crs.to_epsg()


def pixel_to_map(georef: GeoRef, col: ArrayLike, row: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
    """Map coordinates of continuous pixel positions (vectorised)."""
    c = np.asarray(col, dtype=float)
    r = np.asarray(row, dtype=float)
    t = georef.transform
    return t.a * c + t.b * r + t.c, t.d * c + t.e * r + t.f


def map_to_pixel(georef: GeoRef, x: ArrayLike, y: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
    """Continuous pixel positions of map coordinates (vectorised)."""
    inv = ~georef.transform
    x = np.asarray(x, dtype=float)
    y = np.asarray(y, dtype=float)
    return inv.a * x + inv.b * y + inv.c, inv.d * x + inv.e * y + inv.f


def map_to_lonlat(georef: GeoRef, x: ArrayLike, y: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
    """WGS 84 longitude and latitude (degrees) of map coordinates."""
    try:
        lon, lat = _to_lonlat(georef.crs).transform(np.asarray(x, float), np.asarray(y, float), errcheck=True)
    except ProjError as err:
        raise GeoreferenceError(f"cannot convert map coordinates to lon/lat: {err}") from err
    return np.asarray(lon), np.asarray(lat)


def lonlat_to_map(georef: GeoRef, lon: ArrayLike, lat: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
    """Map coordinates of WGS 84 lon/lat (degrees)."""
    lon = np.asarray(lon, dtype=float)
    lat = np.asarray(lat, dtype=float)
    if np.any(np.abs(lat) > 90) or np.any(~np.isfinite(lon)):
        raise ParameterError(f"latitude must be within [-90, 90] and longitude finite, got {lon!r}, {lat!r}")
    try:
        x, y = _from_lonlat(georef.crs).transform(lon, lat, errcheck=True)
    except ProjError as err:
        raise GeoreferenceError(f"cannot convert lon/lat to map coordinates: {err}") from err
    return np.asarray(x), np.asarray(y)


def pixel_to_lonlat(georef: GeoRef, col: ArrayLike, row: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
    """WGS 84 lon/lat (degrees) of continuous pixel positions."""
    return map_to_lonlat(georef, *pixel_to_map(georef, col, row))


def lonlat_to_pixel(georef: GeoRef, lon: ArrayLike, lat: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
    """Continuous pixel positions of WGS 84 lon/lat."""
    return map_to_pixel(georef, *lonlat_to_map(georef, lon, lat))


def geodesic(lon1: ArrayLike, lat1: ArrayLike, lon2: ArrayLike, lat2: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
    """Geodesic distance (m) and forward true azimuth (deg, [0, 360)) on WGS 84."""
    az, _back, dist = WGS84_GEOD.inv(lon1, lat1, lon2, lat2)
    return np.asarray(dist), np.mod(np.asarray(az), 360.0)


def ground_distance_and_bearing(
    georef: GeoRef, p1: tuple[float, float], p2: tuple[float, float]
) -> tuple[float, float]:
    """Ground distance (m) and true bearing (deg) from pixel ``p1`` to pixel ``p2`` ((col, row) each)."""
    lon, lat = pixel_to_lonlat(georef, [p1[0], p2[0]], [p1[1], p2[1]])
    d, az = geodesic(lon[0], lat[0], lon[1], lat[1])
    return float(d), float(az)


@dataclass(frozen=True)
class LocalFrame:
    """Metres and true bearings of the image axes at one place.

    ``m_per_col`` is the ground length of one pixel step to the right and
    ``bearing_right_deg`` its true bearing; likewise ``m_per_row_up`` and
    ``bearing_up_deg`` for one step towards the top of the image.
    ``georeferenced`` is False for a frame calibrated by hand (then bearings
    are relative to the north the user gave, or to image up when none).
    """

    m_per_col: float
    m_per_row_up: float
    bearing_right_deg: float
    bearing_up_deg: float
    georeferenced: bool = True
    north_known: bool = True
    scale_rel_std: float = 0.0  #: relative standard uncertainty of the pixel size (a calibration's; 0: none)
    bearing_std_deg: float = 0.0  #: standard uncertainty of the image's orientation (a camera's yaw; 0: none)
    source: str = ""  #: where a calibration comes from, for the result's cautions ("" : a hand calibration)

    def __post_init__(self) -> None:
        for name in ("m_per_col", "m_per_row_up"):
            v = getattr(self, name)
            if not np.isfinite(v) or v <= 0:
                raise ParameterError(f"{name} must be a positive length in metres, got {v!r}")

    def _matrix(self) -> np.ndarray:
        """2x2 map from pixel steps (dcol, -drow) to ground (east, north) metres."""
        br, bu = np.radians(self.bearing_right_deg), np.radians(self.bearing_up_deg)
        return np.array(
            [
                [self.m_per_col * np.sin(br), self.m_per_row_up * np.sin(bu)],
                [self.m_per_col * np.cos(br), self.m_per_row_up * np.cos(bu)],
            ]
        )

    def ground_vector(self, dcol: ArrayLike, drow: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
        """(east, north) metres of an image displacement (dcol, drow) in pixels (rows grow downwards)."""
        m = self._matrix()
        dc = np.asarray(dcol, dtype=float)
        du = -np.asarray(drow, dtype=float)
        return m[0, 0] * dc + m[0, 1] * du, m[1, 0] * dc + m[1, 1] * du

    def bearing_of(self, dcol: ArrayLike, drow: ArrayLike) -> np.ndarray | float:
        """True bearing (deg) of an image direction (dcol, drow)."""
        e, n = self.ground_vector(dcol, drow)
        b = np.mod(np.degrees(np.arctan2(e, n)), 360.0)
        return float(b) if np.ndim(b) == 0 else b

    def length_of(self, dcol: ArrayLike, drow: ArrayLike) -> np.ndarray | float:
        """Ground length (m) of an image displacement (dcol, drow)."""
        e, n = self.ground_vector(dcol, drow)
        d = np.hypot(e, n)
        return float(d) if np.ndim(d) == 0 else d

    def pixel_vector(self, east_m: ArrayLike, north_m: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
        """Image displacement (dcol, drow) in pixels of a ground displacement (east, north) in metres."""
        inv = np.linalg.inv(self._matrix())
        e = np.asarray(east_m, dtype=float)
        n = np.asarray(north_m, dtype=float)
        dc = inv[0, 0] * e + inv[0, 1] * n
        du = inv[1, 0] * e + inv[1, 1] * n
        return dc, -du

    def image_direction(self, bearing_deg: float) -> tuple[float, float]:
        """Unit-length (in pixels) image direction (dcol, drow) of a true bearing."""
        b = np.radians(bearing_deg)
        v = np.linalg.solve(self._matrix(), np.array([np.sin(b), np.cos(b)]))
        dc, du = v / np.hypot(*v)
        return float(dc), float(-du)

    @property
    def image_up_bearing_deg(self) -> float:
        return self.bearing_up_deg


def local_frame(georef: GeoRef, col: float, row: float) -> LocalFrame:
    """The metric frame at a pixel from geodesics of half-pixel steps either side (central differences)."""
    c = np.array([col - 0.5, col + 0.5, col, col], dtype=float)
    r = np.array([row, row, row + 0.5, row - 0.5], dtype=float)
    lon, lat = pixel_to_lonlat(georef, c, r)
    if not (np.all(np.isfinite(lon)) and np.all(np.isfinite(lat))):
        raise GeoreferenceError(f"pixel ({col:.1f}, {row:.1f}) does not map to a place on the Earth")
    d, az = geodesic(lon[[0, 2]], lat[[0, 2]], lon[[1, 3]], lat[[1, 3]])
    return LocalFrame(float(d[0]), float(d[1]), float(az[0]), float(az[1]))


#: ground sizes of a pixel an image can have (m): a close-up photograph's millimetre to a coarse scene's 10 km
CALIBRATED_PIXEL_RANGE_M = (1e-3, 1e4)


def calibrated_frame(
    *,
    pixel_size_m: float,
    north_up_deg: float | None = None,
    scale_rel_std: float = 0.0,
    bearing_std_deg: float = 0.0,
    source: str = "",
) -> LocalFrame:
    """Frame for an image without georeference, from a pixel size and optionally a north direction.

    ``north_up_deg`` is the true bearing of image up (0 when the image is north-up).  When
    it is None, bearings are relative to image up and the frame says so (``north_known``).
    """
    lo, hi = CALIBRATED_PIXEL_RANGE_M
    if not np.isfinite(pixel_size_m) or not lo <= pixel_size_m <= hi:
        raise ParameterError(
            f"a pixel's ground size must lie between {lo * 1000:g} mm and {hi / 1000:g} km, got {pixel_size_m!r} m"
        )
    up = 0.0 if north_up_deg is None else float(north_up_deg) % 360.0
    if not (np.isfinite(scale_rel_std) and 0.0 <= scale_rel_std < 0.5):
        raise ParameterError(f"a calibration's relative uncertainty must lie in [0, 0.5), got {scale_rel_std!r}")
    if not (np.isfinite(bearing_std_deg) and 0.0 <= bearing_std_deg <= 90.0):
        raise ParameterError(f"an orientation's uncertainty must lie in [0, 90] degrees, got {bearing_std_deg!r}")
    return LocalFrame(
        pixel_size_m,
        pixel_size_m,
        (up + 90.0) % 360.0,
        up,
        georeferenced=False,
        north_known=north_up_deg is not None,
        scale_rel_std=float(scale_rel_std),
        bearing_std_deg=float(bearing_std_deg),
        source=source,
    )


def pixel_size_from_two_points(p1: tuple[float, float], p2: tuple[float, float], distance_m: float) -> float:
    """Pixel size (m) from two pixels at a known ground distance (square pixels assumed)."""
    d_px = float(np.hypot(p2[0] - p1[0], p2[1] - p1[1]))
    if not np.isfinite(distance_m) or distance_m <= 0:
        raise ParameterError(f"distance_m must be > 0, got {distance_m!r}")
    if d_px < 2.0:
        raise ParameterError(f"the two calibration points are only {d_px:.2f} pixels apart; pick points farther apart")
    return distance_m / d_px


def utm_crs_for(lon: float, lat: float) -> str:
    """'EPSG:326zz' or 'EPSG:327zz': the UTM zone of a position (standard 6-degree zones)."""
    if not (-180 <= lon <= 180) or not (-80 <= lat <= 84):
        raise ParameterError(f"UTM covers latitudes -80..84 and longitudes -180..180, got {lon!r}, {lat!r}")
    zone = int(np.floor((lon + 180.0) / 6.0)) % 60 + 1
    return f"EPSG:{32600 + zone if lat >= 0 else 32700 + zone}"
