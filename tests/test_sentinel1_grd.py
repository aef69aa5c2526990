"""Sentinel-1 GRD products (SAFE folder and zip) read as one radar scene: sigma0 from the calibration table,
georeference from the geolocation grid, the radar geometry at every pixel from the annotation, and the radar
azimuth-offset method running on the product's own geometry.

The products are written by ``wakemeter/synth/grd_product.py`` with the real layout; their geometry is computed
there with pyproj from satellite and ground positions (WGS 84), independently of the reader.  GDAL's own
Sentinel-1 driver (SAFE) is the second reader: it must open the same product, and its amplitude and tie points
are the reference for the sigma0 and the georeference here.
"""

from __future__ import annotations

import json
import shutil
import xml.etree.ElementTree as ET
from pathlib import Path

import numpy as np
import pytest
import rasterio
from pyproj import Geod
from scipy.interpolate import RegularGridInterpolator

from wakemeter.cli import main
from wakemeter.detect.analysis import analyze
from wakemeter.detect.request import AnalysisRequest
from wakemeter.errors import SceneReadError
from wakemeter.scene import geodesy
from wakemeter.scene.raster import open_scene
from wakemeter.scene.sar_geometry import GrdGeometry, fit_georeference
from wakemeter.synth.grd_product import (
    Track,
    _annotation,
    amplitude_table,
    calibration_lines,
    calibration_pixels,
    radar_wake_product,
    write_grd,
    zipped,
)

GEOD = Geod(ellps="WGS84")
H, W = 240, 320


@pytest.fixture
def cache(tmp_path, monkeypatch):
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))


@pytest.fixture
def product(tmp_path, cache) -> tuple[Path, Track, np.ndarray]:
    rng = np.random.default_rng(7)
    sigma0 = rng.gamma(4.0, 0.05 / 4.0, (H, W))  # 4-look speckle about a sea of -13 dB
    track = Track(lon0=4.61, lat0=42.87, flight_deg=348.2)  # an ascending pass off a fictional coast
    return write_grd(tmp_path, {"VV": sigma0, "VH": 0.2 * sigma0}, track), track, sigma0


def _reference_sigma0(safe: Path) -> np.ndarray:
    """DN^2 / A^2 (Miranda & Meadows 2015, ESA-EOPG-CSCOP-TN-0002), with the DN as GDAL's SAFE driver reads the
    VV measurement and A the calibration table's sigmaNought values interpolated bilinearly by scipy."""
    with rasterio.open(f"SENTINEL1_CALIB:UNCALIB:{safe}/manifest.safe:IW_VV:AMPLITUDE") as ds:
        assert ds.driver == "SAFE"
        dn = ds.read(1).astype(float)
    lines, pixels = calibration_lines(H), calibration_pixels(W)
    table = amplitude_table(lines, pixels, W, H)
    r, c = np.meshgrid(np.arange(H), np.arange(W), indexing="ij")
    a = RegularGridInterpolator((lines.astype(float), pixels.astype(float)), table)(np.stack([r, c], -1))
    return dn**2 / a**2


def test_sigma0_is_the_amplitude_squared_over_the_calibration_table(product):
    safe, _, _ = product
    ref = _reference_sigma0(safe)
    with open_scene(safe) as sc:
        assert sc.info.count == 1 and sc.info.dtype == "float32"
        assert sc.info.band_descriptions == ("VV sigma0",)
        data, valid = sc.read_full()
    rel = np.abs(data[0] / ref - 1.0)
    assert valid.all()
    # GDAL enlarges a grid of 1/A^2 sampled every 16 pixels: within 0.2 % (0.01 dB) inside; within 0.1 dB (2.3 %) at the
    # very edge, where the grid holds its outermost value for 8 pixels (this table's gain changes 15 times
    # faster across the image than a real product's, so a real product's edge error is far smaller)
    inner = rel[8:-8, 8:-8]
    assert np.median(rel) < 2e-4 and inner.max() < 2e-3, (np.median(rel), inner.max())
    assert rel.max() < 0.023


def test_the_georeference_holds_the_products_tie_points(product):
    safe, track, _ = product
    with rasterio.open(f"{safe}/manifest.safe") as ds:  # GDAL's SAFE driver: the geolocation grid as GCPs
        gcps = ds.gcps[0]
    assert len(gcps) == 42
    with open_scene(safe) as sc:
        assert sc.info.georeferenced and sc.info.crs == "EPSG:32631"
        assert "affine fitted to the 42 points of the product's geolocation grid" in sc.info.georeference_note
        # GDAL gives the grid's sample indices as they are; their centres are half a pixel further on
        col = np.array([g.col + 0.5 for g in gcps])
        row = np.array([g.row + 0.5 for g in gcps])
        lon, lat = geodesy.pixel_to_lonlat(sc.georef, col, row)
        _, _, miss = GEOD.inv(lon, lat, [g.x for g in gcps], [g.y for g in gcps])
        assert np.max(miss) < 1.0
        f = sc.local_frame(W / 2, H / 2)
        assert f.length_of(1.0, 0.0) == pytest.approx(10.0, rel=1e-3)
        assert f.length_of(0.0, 1.0) == pytest.approx(10.0, rel=1e-3)
        # lines run with the flight: image up is against it
        assert f.bearing_of(0.0, 1.0) == pytest.approx(float(track.edge(H / 2)[2]), abs=0.05)


@pytest.mark.parametrize("flight", [348.2, 191.7])
def test_the_geometry_at_a_pixel_is_the_satellites(tmp_path, cache, flight):
    """Slant range, incidence and the satellite's speed computed from positions (pyproj, ECEF) and the look
    and flight bearings of the track: the reader gives them at any pixel from the annotation alone."""
    track = Track(lon0=4.61, lat0=42.87, flight_deg=flight)
    safe = write_grd(tmp_path, {"VV": np.full((H, W), 0.05)}, track)
    with open_scene(safe) as sc:
        assert sc.radar_product is not None
        for col, row in ((10.5, 5.5), (W / 2, H / 2), (W - 3.5, H - 7.5), (123.25, 201.75)):
            g = sc.radar_product.at(col, row)
            line, pixel = row - 0.5, col - 0.5
            assert g.slant_range_m == pytest.approx(float(track.slant_range(line, pixel)), abs=2.0)
            assert g.incidence_deg == pytest.approx(float(track.incidence(line, pixel)), abs=0.01)
            speed = float(np.linalg.norm(track.velocity(line)))
            assert g.platform_speed_mps == pytest.approx(speed, abs=0.5)
            fwd = float(track.edge(line)[2])
            assert g.flight_bearing_deg == pytest.approx(fwd, abs=0.05)
            assert (g.look_bearing_deg - fwd) % 360.0 == pytest.approx(90.0, abs=0.05)
            assert g.right_looking
            assert g.azimuth_time.startswith("2024-05-17T17:41:03")
            assert "annotation" in g.source


def test_a_whole_products_affine_is_within_a_few_pixels_and_true_in_scale_and_direction():
    """A full IW GRD product (25 500 x 16 800 pixels) is not affine on any map: measured here on the grid of a
    geodesic track, the fitted affine misses the tie points by at most some tens of metres, and keeps the local
    pixel size within 0.2 % and directions within 0.2 degrees (what speeds and headings depend on)."""
    for lat0, flight in ((42.9, 348.0), (60.0, 350.0), (-35.0, 192.0)):
        track = Track(lon0=4.5, lat0=lat0, flight_deg=flight)
        width, height = 25_500, 16_800
        geo = GrdGeometry(ET.fromstring(_annotation(track, width, height, "VV", "S1A")), "x", "x")
        fit = fit_georeference(geo)
        assert fit.max_misfit_m < 100.0 and fit.rms_misfit_m < 50.0, fit
        c, a, b, f_, d, e = fit.transform
        from affine import Affine

        georef = geodesy.GeoRef(Affine(a, b, c, d, e, f_), fit.crs)
        for col in (100.0, width / 2, width - 100.0):
            for row in (100.0, height / 2, height - 100.0):
                frame = geodesy.local_frame(georef, col, row)
                flight_here = geo.at(col, row).flight_bearing_deg
                off = (frame.bearing_of(0.0, 1.0) - flight_here + 180.0) % 360.0 - 180.0
                assert abs(off) < 0.2
                assert frame.length_of(1.0, 0.0) == pytest.approx(10.0, rel=2e-3)
                assert frame.length_of(0.0, 1.0) == pytest.approx(10.0, rel=2e-3)


def _radar_wake_product(tmp_path: Path, descending: bool = False) -> tuple[Path, dict, tuple[float, float]]:
    """The demo radar scene's ferry (17.5 kn, 70 m) at 10 m pixels, imaged with the geometry the product's
    annotation states, as a GRD product."""
    p = radar_wake_product(tmp_path, descending=descending)
    return p.safe, p.truth, p.hull_px


@pytest.mark.parametrize("descending", [False, True])
def test_the_radar_offset_method_runs_on_the_products_own_geometry(tmp_path, cache, descending):
    safe, truth, hull = _radar_wake_product(tmp_path, descending)  # the user clicks the bright hull
    with open_scene(safe) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=hull))
    assert a.wake_found
    rg = a.request.radar_geometry
    assert rg is not None and "annotation (s1a-iw-grd-vv-" in rg.source and "vessel's pixel" in rg.source
    radar = [m for m in a.methods if m.method == "radar azimuth offset"]
    assert radar, a.cautions
    assert radar[0].ci95_low_mps <= truth["speed_mps"] <= radar[0].ci95_high_mps
    assert any("radar geometry read from the product: the product's annotation" in s for s in radar[0].assumptions)
    assert a.speed.ci95_low_mps <= truth["speed_mps"] <= a.speed.ci95_high_mps


def test_the_evidence_names_where_the_radar_geometry_came_from(tmp_path, cache, capsys):
    safe, _, (col, row) = _radar_wake_product(tmp_path)
    hull = f"{col:.1f},{row:.1f}"
    (tmp_path / "ev").mkdir()
    assert main(["report", str(safe), "--vessel-px", hull, "--out", str(tmp_path / "ev")]) == 0
    records = [p for p in (tmp_path / "ev").rglob("*.json")]
    text = "".join(p.read_text() for p in records)
    assert "the product's annotation (s1a-iw-grd-vv-" in text
    assert safe.name in text  # the evidence names the product opened, not the cache's virtual raster


def test_a_cache_cleaned_in_part_is_written_again(product):
    safe, _, _ = product
    with open_scene(safe) as sc:
        first, _ = sc.read_full()
        gain = next(p for p in map(Path, sc.info.files) if p.name.endswith("_gain.tif"))
    gain.unlink()  # the user deleted part of the cache folder
    with open_scene(safe) as sc:
        again, _ = sc.read_full()
    assert np.array_equal(first, again)


def test_the_zip_is_the_same_scene_read_inside_the_archive(product, tmp_path, capsys):
    safe, _, _ = product
    (tmp_path / "downloads").mkdir()
    z = zipped(safe, tmp_path / "downloads")
    with open_scene(safe) as a, open_scene(z) as b:
        da, _ = a.read_full()
        db, _ = b.read_full()
        assert np.array_equal(da, db)
        assert b.info.origin == z.resolve()
        assert all(f.startswith("/vsizip/") for f in b.info.files if "measurement" in f)
        ga, gb = a.radar_product.at(100, 100), b.radar_product.at(100, 100)
        assert ga.slant_range_m == gb.slant_range_m and ga.look_bearing_deg == gb.look_bearing_deg
    assert main(["info", str(z)]) == 0
    out = capsys.readouterr().out
    assert "platform:       SENTINEL-1A, IW mode, ascending pass, polarisation VV (VH also in the product)" in out
    assert "radar geometry: from the product's annotation" in out and "right of the flight bearing 348.2°" in out
    assert "acquired:       2024-05-17T17:41:03" in out and "zero-Doppler time" in out
    assert "thermal noise not removed" in out


def _break(safe: Path, what: str) -> None:
    ann = next((safe / "annotation").glob("*vv*.xml"))
    if what == "slc":
        ann.write_text(ann.read_text().replace("<productType>GRD</productType>", "<productType>SLC</productType>"))
    elif what == "no calibration":
        next((safe / "annotation" / "calibration").glob("*vv*.xml")).unlink()
    elif what == "bad xml":
        ann.write_text(ann.read_text()[:500])
    elif what == "size":
        ann.write_text(
            ann.read_text().replace(f"<numberOfLines>{H}</numberOfLines>", "<numberOfLines>99</numberOfLines>")
        )
    elif what == "no measurement":
        shutil.rmtree(safe / "measurement")
        (safe / "measurement").mkdir()
    elif what == "empty measurement":
        next((safe / "measurement").glob("*vv*.tiff")).write_bytes(b"")
    elif what == "negative gain":
        cal = next((safe / "annotation" / "calibration").glob("*vv*.xml"))
        text = cal.read_text()
        i = text.index(">", text.index("<sigmaNought")) + 1
        cal.write_text(text[:i] + "-1 " + text[i:].split(" ", 1)[1])
    elif what == "no grid":
        root = ann.read_text()
        cut = root[: root.index("<geolocationGrid>")] + "</product>\n"
        ann.write_text(cut)


@pytest.mark.parametrize(
    ("what", "said"),
    [
        ("slc", "reads the ground range detected (GRD) edition"),
        ("no calibration", "is not in the product"),
        ("bad xml", "metadata is not readable XML"),
        ("size", "but its annotation says"),
        ("no measurement", "without a GRD measurement raster"),
        ("no grid", "has no geolocation grid"),
        ("empty measurement", "cannot be read - it may be truncated or corrupt"),
        ("negative gain", "a calibration value that is not a positive number"),
    ],
)
def test_a_damaged_product_is_refused_in_words(product, what, said, capsys):
    safe, _, _ = product
    _break(safe, what)
    with pytest.raises(SceneReadError, match=said.replace("(", r"\(").replace(")", r"\)")):
        open_scene(safe)
    assert main(["info", str(safe)]) == 2
    assert said in capsys.readouterr().err


def test_a_users_own_radar_geometry_is_kept_and_named_as_theirs(tmp_path, cache):
    safe, _, hull = _radar_wake_product(tmp_path)
    from wakemeter.detect.request import RadarGeometry

    mine = RadarGeometry(850_000.0, 7_500.0, 90.0, 34.0)
    with open_scene(safe) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=hull, radar_geometry=mine))
    assert a.request.radar_geometry == mine and a.request.radar_geometry.source == "as given by the user"
    data = json.loads(json.dumps(a.request.to_json()))
    assert data["radar_geometry"]["source"] == "as given by the user"


def test_the_program_opens_the_product_folder(product, qtbot, tmp_path, monkeypatch):
    from PySide6.QtWidgets import QFileDialog

    from wakemeter.app.window import MainWindow

    safe, _, _ = product
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "config"))
    w = MainWindow()
    qtbot.addWidget(w)
    monkeypatch.setattr(QFileDialog, "getExistingDirectory", staticmethod(lambda *a, **k: str(safe)))
    w.open_folder_dialog()
    assert w.doc.scene is not None and w.doc.scene.radar_product is not None
    assert w.doc.scene.info.origin == safe.resolve()
    w.close()


def test_a_slow_vessel_seen_only_as_its_dark_wake_gets_the_offset_speed(tmp_path, cache):
    """At 10 m a 12 kn vessel's Kelvin crests (about 26 m long; deep-water dispersion, lambda = 2 pi U^2 / g) are
    not resolved: the wake is found as its dark turbulent line, the hull imaged beside it (Raney 1971), and the
    offset method, run on the line path with the product's geometry, gives the speed."""
    p = radar_wake_product(tmp_path, speed_knots=12.0, heading_deg=50.0, hull=(110.0, 18.0), seed=0)
    with open_scene(p.safe) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=p.hull_px))
    assert a.wake_found and "as a line" in a.decision and "dark" in a.decision
    assert [m.method for m in a.methods] == ["radar azimuth offset"]
    truth = p.truth["speed_mps"]
    assert a.speed.ci95_low_mps <= truth <= a.speed.ci95_high_mps
    assert a.speed.speed_mps == pytest.approx(truth, rel=0.1)


def test_the_form_says_the_geometry_comes_from_the_product_and_typed_figures_win(tmp_path, qtbot, monkeypatch):
    from wakemeter.app.request_form import PRODUCT_GEOMETRY, TYPED_GEOMETRY
    from wakemeter.app.window import MainWindow

    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "config"))
    safe, _, hull = _radar_wake_product(tmp_path)
    w = MainWindow()
    qtbot.addWidget(w)
    form = w.panel.form
    assert form.use_radar.text() == TYPED_GEOMETRY
    assert w.open_path(str(safe), ask_first=False)
    assert form.use_radar.text() == PRODUCT_GEOMETRY and not form.use_radar.isChecked()
    with open_scene(safe) as sc:
        done = analyze(sc, AnalysisRequest(vessel_px=hull))
    form.set_request(done.request)  # a result read from the product shows no typed figures
    assert not form.use_radar.isChecked()
    req = form.request(hull, done.request)
    assert req.radar_geometry is None  # the product is read again at the vessel's pixel
    form.use_radar.setChecked(True)
    for box, v in zip((form.slant, form.vplat, form.look, form.inc), (850_000.0, 7_500.0, 90.0, 34.0)):
        box.setValue(v)
    typed = form.request(hull, done.request).radar_geometry
    assert typed is not None and typed.slant_range_m == 850_000.0 and typed.source == "as given by the user"
    w.close()


@pytest.mark.parametrize("seed", [0, 1])
def test_a_hull_shifted_onto_its_wakes_side_is_still_the_vessel(tmp_path, cache, seed):
    """Heading 230 deg with the radar looking east: the moving hull is imaged 290 m north of where its wake
    starts (Raney 1971), on the side the wake runs to.  The wake from the true start passes the hull 20 px
    away; before, any line from the start within 45 deg of the hull was taken for the far end of the wake and
    the analysis said "no wake" on both seeds.  A start is refused only when its line runs onto the hull."""
    p = radar_wake_product(tmp_path, speed_knots=12.0, heading_deg=230.0, hull=(110.0, 18.0), seed=seed)
    with open_scene(p.safe) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=p.hull_px))
    assert a.wake_found, a.decision
    assert abs((a.heading_deg - 230.0 + 180.0) % 360.0 - 180.0) <= 2 * a.heading_std_deg
    truth = p.truth["speed_mps"]
    assert a.speed.ci95_low_mps <= truth <= a.speed.ci95_high_mps
