"""Geodesy: pixel <-> map <-> lon/lat, ground distances and true bearings, against published values
and reference libraries (pyproj)."""

import numpy as np
import pytest
from affine import Affine
from pyproj import Geod, Proj, Transformer

from wakemeter.errors import GeoreferenceError, ParameterError
from wakemeter.scene import geodesy as gd


def _dms(d, m, s):
    return np.sign(d) * (abs(d) + m / 60 + s / 3600)


def test_vincenty_flinders_peak_to_buninyong():
    # Source: Vincenty 1975, Survey Review 23(176), worked example (Flinders Peak -> Buninyong): 54 972.271 m,
    # forward azimuth 306 deg 52' 05.37".  Pixels of a lon/lat raster with 1-degree pixels.
    georef = gd.GeoRef(Affine(1.0, 0, 0, 0, -1.0, 0), "EPSG:4326")
    lon1, lat1 = _dms(144, 25, 29.52440), -_dms(37, 57, 3.72030)
    lon2, lat2 = _dms(143, 55, 35.38390), -_dms(37, 39, 10.15610)
    d, az = gd.ground_distance_and_bearing(georef, (lon1, -lat1), (lon2, -lat2))
    assert d == pytest.approx(54972.271, abs=0.001)
    assert az == pytest.approx(_dms(306, 52, 5.37), abs=0.01 / 3600)


def test_pixel_map_lonlat_agree_with_pyproj():
    # Reference library: pyproj Transformer on a rotated UTM affine.
    t = Affine.translation(500_000, 4_200_000) @ Affine.rotation(17.0) @ Affine.scale(3.0, -3.0)
    georef = gd.GeoRef(t, "EPSG:32633")
    cols, rows = np.array([0.0, 100.5, 2000.0]), np.array([0.0, 50.25, 3000.0])
    lon, lat = gd.pixel_to_lonlat(georef, cols, rows)
    x, y = t.a * cols + t.b * rows + t.c, t.d * cols + t.e * rows + t.f
    lon_ref, lat_ref = Transformer.from_crs(32633, 4326, always_xy=True).transform(x, y)
    assert np.allclose(lon, lon_ref, atol=1e-12) and np.allclose(lat, lat_ref, atol=1e-12)
    c2, r2 = gd.lonlat_to_pixel(georef, lon, lat)
    assert np.allclose(c2, cols, atol=1e-6) and np.allclose(r2, rows, atol=1e-6)


@pytest.mark.parametrize("lon, lat, epsg", [(17.0, 50.0, 32633), (13.2, -35.0, 32733), (11.99, 62.0, 32632)])
def test_local_frame_convergence_and_scale_match_pyproj(lon, lat, epsg):
    # Reference library: pyproj Proj.get_factors (meridian convergence, scale factor); Snyder 1987.
    x, y = Transformer.from_crs(4326, epsg, always_xy=True).transform(lon, lat)
    georef = gd.GeoRef(Affine(10, 0, x - 50, 0, -10, y + 50), f"EPSG:{epsg}")
    f = gd.local_frame(georef, 5.0, 5.0)
    fac = Proj(f"EPSG:{epsg}").get_factors(lon, lat)
    assert f.bearing_up_deg == pytest.approx(fac.meridian_convergence % 360, abs=2e-4)
    assert f.bearing_right_deg == pytest.approx((fac.meridian_convergence + 90) % 360, abs=2e-4)
    assert f.m_per_col == pytest.approx(10.0 / fac.meridional_scale, rel=1e-6)


@pytest.mark.parametrize("dlon, lat", [(2.0, 50.0), (-2.5, 50.0), (2.0, -35.0), (-1.5, -62.0), (0.5, 5.0)])
def test_convergence_matches_snyder_first_order(dlon, lat):
    # Source: Snyder 1987, USGS Professional Paper 1395, transverse Mercator: gamma ~ dlambda sin(phi)
    # to first order; the neglected terms are O(dlambda^3) (here bounded by dlambda^3 in radians).
    zone = 31
    lon0 = -180 + 6 * zone - 3
    epsg = (32600 if lat >= 0 else 32700) + zone
    x, y = Transformer.from_crs(4326, epsg, always_xy=True).transform(lon0 + dlon, lat)
    f = gd.local_frame(gd.GeoRef(Affine(10, 0, x - 50, 0, -10, y + 50), f"EPSG:{epsg}"), 5.0, 5.0)
    gamma = ((f.bearing_up_deg + 180) % 360) - 180
    approx = np.degrees(np.radians(dlon) * np.sin(np.radians(lat)))
    assert gamma == pytest.approx(approx, abs=np.degrees(np.radians(abs(dlon)) ** 3) + 1e-4)
    assert np.sign(gamma) == np.sign(dlon * lat)


def test_frame_bearing_agrees_with_long_geodesic_on_rotated_and_flipped_grids():
    # Self-consistency with pyproj.Geod: the local frame's bearing of an image direction equals the
    # geodesic azimuth between the two pixels 200 px apart (rotation, shear and flips included).
    geod = Geod(ellps="WGS84")
    for t in (
        Affine.translation(400_000, 6_500_000) @ Affine.rotation(-40) @ Affine.scale(2.0, -2.0),
        Affine.translation(400_000, 6_500_000) @ Affine.shear(10, 0) @ Affine.scale(2.0, -2.5),
        Affine(2.0, 0, 400_000, 0, 2.0, 6_500_000),
    ):  # flipped: rows grow northward
        georef = gd.GeoRef(t, "EPSG:32631")
        f = gd.local_frame(georef, 500, 500)
        for dc, dr in ((1, 0), (0, -1), (3, 4), (-2, 1)):
            n = 200 / np.hypot(dc, dr)
            lon, lat = gd.pixel_to_lonlat(georef, [500, 500 + dc * n], [500, 500 + dr * n])
            az, _, dist = geod.inv(lon[0], lat[0], lon[1], lat[1])
            assert f.bearing_of(dc, dr) == pytest.approx(az % 360, abs=2e-3)
            assert f.length_of(dc * n, dr * n) == pytest.approx(dist, rel=1e-5)
            bdc, bdr = f.image_direction(az % 360)
            assert np.degrees(np.arctan2(bdr, bdc)) == pytest.approx(np.degrees(np.arctan2(dr, dc)), abs=2e-3)
    flipped = gd.local_frame(gd.GeoRef(Affine(2.0, 0, 400_000, 0, 2.0, 6_500_000), "EPSG:32631"), 0, 0)
    assert abs(((flipped.bearing_up_deg - 180) + 180) % 360 - 180) < 3.0


def test_geographic_crs_longitude_shrinks_with_latitude():
    # Reference library: pyproj.Geod; a degree of longitude at 60 deg is about half of one at the equator.
    georef = gd.GeoRef(Affine(0.001, 0, 10.0, 0, -0.001, 60.5), "EPSG:4326")
    f = gd.local_frame(georef, 500, 500)
    d_lon, _ = gd.geodesic(9.9995 + 0.5, 60.0, 10.0005 + 0.5, 60.0)
    assert f.m_per_col == pytest.approx(float(d_lon), rel=1e-4)
    assert f.m_per_col / f.m_per_row_up == pytest.approx(0.5, abs=0.01)
    assert f.bearing_up_deg == pytest.approx(0.0, abs=1e-6)


def test_calibrated_frames():
    # Self-consistency: a north-up calibrated frame gives plain compass bearings; without north
    # bearings are relative to image up and the frame says so.
    f = gd.calibrated_frame(pixel_size_m=0.5, north_up_deg=30.0)
    assert f.bearing_of(0, -1) == pytest.approx(30.0) and f.bearing_of(1, 0) == pytest.approx(120.0)
    assert f.length_of(3, 4) == pytest.approx(2.5)
    rel = gd.calibrated_frame(pixel_size_m=1.0)
    assert not rel.north_known and not rel.georeferenced
    assert gd.pixel_size_from_two_points((0, 0), (30, 40), 100.0) == pytest.approx(2.0)
    with pytest.raises(ParameterError, match="apart"):
        gd.pixel_size_from_two_points((0, 0), (1, 0), 10.0)
    for absurd in (0.0, 1e-300, 1e9, float("nan")):  # a millimetre to 10 km (program's bound, no source)
        with pytest.raises(ParameterError, match="ground size"):
            gd.calibrated_frame(pixel_size_m=absurd)


def test_bad_georeference():
    with pytest.raises(GeoreferenceError, match="degenerate"):
        gd.GeoRef(Affine(0, 0, 0, 0, 0, 0), "EPSG:4326")
    with pytest.raises(GeoreferenceError, match="unknown coordinate reference system"):
        gd.GeoRef(Affine.identity(), "EPSG:99999999")


@pytest.mark.parametrize(
    "lon, lat, code",
    [
        (-35.0, 36.0, "EPSG:32625"),
        (-20.0, -41.0, "EPSG:32727"),
        (179.9, 10.0, "EPSG:32660"),
        (-180.0, 10.0, "EPSG:32601"),
    ],
)
def test_utm_zone(lon, lat, code):
    # Source: the standard 6-degree UTM zones (common practice, from memory: zone = floor((lon+180)/6)+1).
    assert gd.utm_crs_for(lon, lat) == code
