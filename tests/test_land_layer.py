"""A land layer for the vessel finder on scenes without a water index: the harbour demo (synthetic truth) with a
built-up shore added (bright roofs and dark streets, as single-band optical shows land), the layer given in
WGS 84 as analysts have them and reprojected by pyproj; bad layers refused with the reason."""

import json
from pathlib import Path

import numpy as np
import pytest
import rasterio
import shapely

from wakemeter.cli import main
from wakemeter.detect.vessel_finder import find_vessels
from wakemeter.errors import SceneReadError
from wakemeter.evidence.gis import Feature, write_features
from wakemeter.scene import geodesy
from wakemeter.scene.land_layer import LandLayer
from wakemeter.scene.raster import open_scene

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "sample_scenes" / "harbour_approach_optical.tif"
TRUTH = json.loads(DEMO.with_suffix(".truth.json").read_text())["vessels"][0]
SHORE_COL = 160  #: columns left of this are land (the launch is at column 786)


def _shore_scene(folder: Path) -> Path:
    """The demo with a shore on its left: dark fields with white farm roofs 12 x 20 m scattered over them (as
    bright as a hull, as large as a small ship), and short breakwaters into the water."""
    rng = np.random.default_rng(7)
    with rasterio.open(DEMO) as src:
        prof, img = src.profile, src.read(1).astype(float)
    img[:, :SHORE_COL] = rng.normal(75.0, 6.0, (img.shape[0], SHORE_COL))
    for r in range(30, img.shape[0] - 30, 70):
        c = int(rng.integers(10, SHORE_COL - 20))
        img[r : r + 6, c : c + 10] = 240.0
    for r in range(40, img.shape[0] - 40, 200):  # breakwaters: bright strips 4 px wide, 30 px into the water
        img[r : r + 4, SHORE_COL : SHORE_COL + 30] = 240.0
    out = folder / "shore.tif"
    with rasterio.open(out, "w", **prof) as dst:
        dst.write(np.clip(img, 0, 255).astype(np.uint8), 1)
    return out


def _land_geojson(scene: Path, out: Path, *, cols: int = SHORE_COL + 30) -> Path:
    """The land (town and piers) as one polygon in WGS 84, its corners from the scene's georeference."""
    with open_scene(scene) as sc:
        corners = [(0, 0), (cols, 0), (cols, sc.height), (0, sc.height)]
        ll = [tuple(float(v) for v in geodesy.pixel_to_lonlat(sc.georef, c, r)) for c, r in corners]
    return write_features(out, [Feature("land", shapely.Polygon(ll), {"kind": "land"})], force=True)


@pytest.fixture(scope="module")
def shore(tmp_path_factory):
    d = tmp_path_factory.mktemp("shore")
    tif = _shore_scene(d)
    return tif, _land_geojson(tif, d / "land.geojson")


def test_the_land_layer_keeps_the_search_off_the_shore(shore):
    tif, land = shore
    with open_scene(tif) as sc:
        bare = find_vessels(sc)
        layer = LandLayer.read(land, sc.georef)
        kept = find_vessels(sc, land=layer)
    on_land = [c for c in bare if c.px[0] < SHORE_COL + 30]
    assert on_land, "the town and piers should fool the finder without a layer (else this test shows nothing)"
    assert not [c for c in kept if c.px[0] < SHORE_COL + 30]
    d = min(np.hypot(c.px[0] - TRUTH["pixel_col"], c.px[1] - TRUTH["pixel_row"]) for c in kept)
    assert d <= 0.5 * TRUTH["hull_length_m"] / 2.0  # the launch is still found (2 m pixels)


def test_the_layer_lands_on_the_right_pixels(shore):
    # a WGS 84 polygon through the corners of a pixel block, reprojected to the scene's UTM zone (pyproj) and
    # burnt in (rasterio): the block's pixels, to within a pixel along its edges
    tif, land = shore
    with open_scene(tif) as sc:
        layer = LandLayer.read(land, sc.georef)
        mask = layer.mask(sc.georef, (0, 0, sc.width, sc.height), (sc.height, sc.width))
        half = layer.mask(sc.georef, (0, 0, sc.width, sc.height), (sc.height // 2, sc.width // 2))
    cols = SHORE_COL + 30
    assert abs(int(mask.sum()) - cols * mask.shape[0]) <= 2 * mask.shape[0]
    assert mask[:, : cols - 1].all() and not mask[:, cols + 1 :].any()
    assert abs(int(half.sum()) - (cols // 2) * half.shape[0]) <= 2 * half.shape[0]  # a coarser grid: same place


def test_bad_layers_are_refused_with_the_reason(shore, tmp_path):
    tif, land = shore
    with open_scene(tif) as sc:
        line = write_features(
            tmp_path / "coast.geojson",
            [Feature("coast", shapely.LineString([(-35.1, 35.9), (-35.0, 36.1)]), {})],
            force=True,
        )
        with pytest.raises(SceneReadError, match="line cannot say which side is land"):
            LandLayer.read(line, sc.georef)
        (tmp_path / "junk.gpkg").write_bytes(b"not a geopackage")
        with pytest.raises(SceneReadError, match="not a vector file"):
            LandLayer.read(tmp_path / "junk.gpkg", sc.georef)
        with pytest.raises(SceneReadError, match="no such file"):
            LandLayer.read(tmp_path / "missing.gpkg", sc.georef)
    with pytest.raises(SceneReadError, match="georeferenced scene"):
        LandLayer.read(land, None)


def test_batch_find_with_a_land_layer_as_a_user_types_it(shore, tmp_path, capsys):
    tif, land = shore
    out = tmp_path / "out"
    assert main(["batch", str(tif), "--find", "--land", str(land), "--out", str(out), "--workers", "1"]) == 0
    capsys.readouterr()
    rows = (out / "results.csv").read_text().splitlines()[1:]
    cols = [float(r.split(",")[5]) for r in rows]  # scene, vessel, status, lon, lat, col
    assert cols and min(cols) > SHORE_COL + 30
    assert main(["batch", str(tif), "--land", str(land), "--out", str(tmp_path / "o2"), "--vessels", "x.csv"]) == 2
    assert "--land is for the vessel finder: give --find too" in capsys.readouterr().err
