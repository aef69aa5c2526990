"""GIS exchange: GeoPackage and GeoJSON written through pyogrio/GDAL and read back with the same library,
with plain json (GeoJSON is RFC 7946: longitude, latitude in WGS 84) and with GDAL's ogrinfo when it is
installed; vessel positions imported from CSV, GeoJSON and GeoPackage (a projected CRS converted with
pyproj, a reference library).  Check values: the demo scene's synthetic truth."""

import json
import shutil
import subprocess

import numpy as np
import pyogrio
import pyogrio.raw
import pytest
import shapely
from pyproj import Transformer

from wakemeter.cli import main
from wakemeter.errors import ParameterError, SceneWriteError
from wakemeter.evidence.gis import read_vessel_positions, write_features
from wakemeter.scene import geodesy
from wakemeter.scene.raster import open_scene

CHANNEL = "sample_scenes/channel_two_vessels.tif"
TRUTH = json.loads(open("sample_scenes/channel_two_vessels.truth.json").read())["vessels"]


@pytest.fixture(scope="module")
def vessels_csv(tmp_path_factory):
    d = tmp_path_factory.mktemp("gis")
    with open_scene(CHANNEL) as sc:
        rows = ["name,lon,lat"]
        for t in TRUTH:
            lon, lat = geodesy.pixel_to_lonlat(sc.georef, t["pixel_col"], t["pixel_row"])
            rows.append(f"{t['name']},{float(lon):.7f},{float(lat):.7f}")
    f = d / "vessels.csv"
    f.write_text("\n".join(rows) + "\n")
    return f


@pytest.fixture(scope="module")
def gpkg(vessels_csv):
    out = vessels_csv.parent / "channel.gpkg"
    assert main(["export", CHANNEL, "--vessels", str(vessels_csv), "--out", str(out)]) == 0
    return out


def test_geopackage_layers_and_attributes_read_back(gpkg, vessels_csv):
    layers = dict(pyogrio.list_layers(str(gpkg)))
    assert layers == {"vessels": "Point", "tracks": "LineString", "wake_lines": "LineString", "areas": "Polygon"}
    meta, _f, geoms, fields = pyogrio.raw.read(str(gpkg), layer="vessels")
    assert "4326" in meta["crs"]
    names = list(meta["fields"])
    col = {n: fields[names.index(n)] for n in names}
    assert list(col["name"]) == [t["name"] for t in TRUTH]
    for i, t in enumerate(TRUTH):
        truth_kn = t["speed_mps"] / 0.514444
        assert col["speed_ci95_low_kn"][i] <= truth_kn <= col["speed_ci95_high_kn"][i]
        assert col["wake_found"][i]
        p = shapely.from_wkb(geoms[i])
        given = read_vessel_positions(vessels_csv)[i]
        # the analysis places the vessel on its hull: within a few pixels (10 m) of the given position
        assert np.hypot((p.x - given.lon) * 111e3 * np.cos(np.radians(p.y)), (p.y - given.lat) * 111e3) < 30


def test_geojson_is_wgs84_lon_lat(vessels_csv, tmp_path):
    out = tmp_path / "channel.geojson"
    assert main(["export", CHANNEL, "--vessels", str(vessels_csv), "--out", str(out)]) == 0
    j = json.loads(out.read_text())
    assert j["type"] == "FeatureCollection"
    points = [f for f in j["features"] if f["properties"]["layer"] == "vessels"]
    lon, lat = points[0]["geometry"]["coordinates"]
    assert -36 < lon < -34 and 35 < lat < 37  # the demo lies at about 35 W, 36 N: longitude first
    assert {f["properties"]["layer"] for f in j["features"]} == {"vessels", "tracks", "wake_lines", "areas"}
    assert len(pyogrio.raw.read(str(out))[2]) == len(j["features"])
    assert main(["export", CHANNEL, "--vessels", str(vessels_csv), "--out", str(out)]) == 2  # exists
    assert main(["export", CHANNEL, "--vessels", str(vessels_csv), "--out", str(out), "--force"]) == 0
    assert [p.name for p in tmp_path.iterdir()] == ["channel.geojson"]  # no temporary file left


@pytest.mark.skipif(shutil.which("ogrinfo") is None, reason="GDAL's ogrinfo is not installed here")
def test_ogrinfo_reads_the_geopackage(gpkg):
    done = subprocess.run(["ogrinfo", "-so", "-al", str(gpkg)], capture_output=True, text=True)
    assert done.returncode == 0 and "Layer name: vessels" in done.stdout and "Feature Count: 2" in done.stdout


def test_positions_from_geojson_and_a_projected_geopackage(tmp_path):
    pts = [("Merrow Pilot 2", -35.035, 35.986), ("Brackenfield", -35.045, 35.974)]
    gj = tmp_path / "positions.geojson"
    gj.write_text(
        json.dumps(
            {
                "type": "FeatureCollection",
                "features": [
                    {"type": "Feature", "properties": {"name": n}, "geometry": {"type": "Point", "coordinates": [x, y]}}
                    for n, x, y in pts
                ],
            }
        )
    )
    got = read_vessel_positions(gj)
    assert [(g.name, round(g.lon, 6), round(g.lat, 6)) for g in got] == pts
    to_utm = Transformer.from_crs("EPSG:4326", "EPSG:32625", always_xy=True)
    xy = [to_utm.transform(x, y) for _n, x, y in pts]
    gp = tmp_path / "positions.gpkg"
    pyogrio.raw.write(
        str(gp),
        np.array([shapely.to_wkb(shapely.Point(x, y)) for x, y in xy], dtype=object),
        [np.array([n for n, _x, _y in pts], dtype=object)],
        ["name"],
        layer="positions",
        driver="GPKG",
        geometry_type="Point",
        crs="EPSG:32625",
    )
    got = read_vessel_positions(gp)
    for g, (n, x, y) in zip(got, pts, strict=True):
        assert g.name == n and g.lon == pytest.approx(x, abs=1e-7) and g.lat == pytest.approx(y, abs=1e-7)


def test_refusals(tmp_path, vessels_csv, capsys):
    with pytest.raises(ParameterError, match=".gpkg or .geojson"):
        write_features(tmp_path / "x.shp", [])
    with pytest.raises(SceneWriteError, match="does not exist"):
        write_features(tmp_path / "missing" / "x.gpkg", [])
    assert (
        main(
            ["export", CHANNEL, "--vessels", str(vessels_csv), "--vessel", "-35,36", "--out", str(tmp_path / "a.gpkg")]
        )
        == 2
    )
    assert "not both" in capsys.readouterr().err


def test_batch_table_and_gis_layer_share_one_vessel_row():
    # the columns of an analysed vessel are built once (detect.result.result_row) for both the batch table and
    # the GIS layer (self-consistency)
    from wakemeter.batch.run import COLUMNS
    from wakemeter.detect.result import RESULT_ROW_FIELDS, WakeAnalysis, result_row

    assert all(f in COLUMNS for f in RESULT_ROW_FIELDS)
    assert set(result_row(None)) == set(RESULT_ROW_FIELDS) and all(v is None for v in result_row(None).values())
    stored = {
        "wake_found": True,
        "vessel_px": [10.0, 10.0],
        "regime": "deep",
        "gravity_mps2": 9.81,
        "pixel_m": 2.0,
        "speed_mps": 5.144444,
        "speed_ci95_mps": [4.0, 6.0],
        "methods": [{"name": "spectral fit", "speed_mps": 5.144444, "std_mps": 0.5, "speed_ci95_mps": [4.0, 6.0]}],
    }
    row = result_row(WakeAnalysis.from_json(stored))
    assert row["speed_kn"] == pytest.approx(10.0, rel=1e-5)  # 1 kn = 1852/3600 m/s (BIPM SI Brochure, Table 8)
    assert row["method"] == "spectral fit" and row["speed_basis"] == "through the water"
    # a finding without a speed has no basis: the vessel table once said "through the water" on a "no speed" row
    no_speed = {k: v for k, v in stored.items() if k not in ("speed_mps", "speed_ci95_mps", "methods")}
    row = result_row(WakeAnalysis.from_json(no_speed))
    assert row["speed_kn"] is None and row["speed_basis"] is None


def test_the_vessel_row_carries_the_limit_its_probability_and_the_lower_bound():
    # with a 10 kn limit the row holds the limit, the probability of exceeding it and the one-sided 95 % lower
    # bound on the limit's basis (the 5th percentile of the speed draws: JCGM 101:2008, sec. 7.7; from memory);
    # the demo launch's truth is 14.0 kn (sample_scenes/harbour_approach_optical.truth.json)
    from wakemeter.detect.analysis import analyze
    from wakemeter.detect.request import AnalysisRequest, SpeedLimit
    from wakemeter.detect.result import result_row
    from wakemeter.physics.units import KNOT_MPS
    from wakemeter.scene.raster import open_scene

    with open_scene("sample_scenes/harbour_approach_optical.tif") as sc:
        a = analyze(sc, AnalysisRequest(vessel_lonlat=(-35.0, 36.0), speed_limit=SpeedLimit(10 * KNOT_MPS)))
    row = result_row(a)
    assert row["limit_kn"] == pytest.approx(10.0)
    assert row["p_over_limit"] > 0.99
    assert 10.0 < row["lower95_kn"] < row["speed_kn"] <= row["speed_ci95_high_kn"]
