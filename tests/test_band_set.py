"""A folder of one file per band opened as one scene (scene.band_set), as archives deliver Sentinel-2 bands.

Check values: the real crop tests/data/sentinel2/marseille_00 (Sentinel-2 L2A, MIT licence, see its README)
split into one file per band, named as the shared port scenes are; the folder must give the crop's own pixels,
band names and roles (B02 blue, B03 green, B04 red, B08 near infrared: ESA Sentinel-2 User Handbook, 2015,
Table 1; from memory) and the same analysis result as the stacked crop (self-consistency).
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest
import rasterio

from wakemeter.cli import main
from wakemeter.detect.analysis import analyze
from wakemeter.detect.request import AnalysisRequest
from wakemeter.errors import SceneReadError
from wakemeter.scene.raster import open_scene

CROP = Path(__file__).parent / "data" / "sentinel2" / "marseille_00_S2L2A_2023-08-22_wake.tif"
ROOT_SCENE = Path(__file__).resolve().parents[1] / "sample_scenes" / "calm_no_wake.tif"
NAMES = ("B02", "B03", "B04", "B08")


@pytest.fixture
def folder(tmp_path, monkeypatch):
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))
    out = tmp_path / "marseille"
    out.mkdir()
    with rasterio.open(CROP) as src:
        prof = src.profile
        prof.update(count=1)
        for b, name in enumerate(NAMES, 1):
            with rasterio.open(out / f"2023-08-22_S2L2A_{name}.tif", "w", **prof) as dst:
                dst.write(src.read(b), 1)
    (out / "marseille_coco.json").write_text("{}")  # other files in the folder are left alone
    return out


def test_the_folder_is_the_crop_band_for_band(folder):
    with open_scene(folder) as sc, rasterio.open(CROP) as ref:
        assert sc.info.count == 4 and sc.info.band_descriptions == NAMES
        data, ok = sc.read()
        assert np.array_equal(data, ref.read().astype(np.float32)) and ok.all()
        assert sc.info.acquisition_time == "2023-08-22"
        assert sc.info.georeferenced and sc.info.crs == "EPSG:3857"


def test_info_names_bands_roles_date_and_timing(folder, capsys):
    assert main(["info", str(folder)]) == 0
    out = capsys.readouterr().out
    assert "1 B02 (blue), 2 B03 (green), 3 B04 (red), 4 B08 (near infrared)" in out
    assert "2023-08-22 (from the file names; a date only)" in out
    assert "Sentinel-2" in out and "1.005 s" in out


def _same_result_as_the_crop(path: Path) -> None:
    """The analysis of the scene at ``path`` at the crop's ship is the stacked crop's own (self-consistency)."""
    req = AnalysisRequest(vessel_px=(120.0, 120.0))
    with open_scene(path) as sc:
        a = analyze(sc, req)
    with open_scene(CROP) as sc:
        b = analyze(sc, req)
    assert a.speed is not None and a.speed_over_ground
    assert a.speed.speed_mps == pytest.approx(b.speed.speed_mps, rel=1e-9)
    assert a.heading_deg == pytest.approx(b.heading_deg, abs=1e-9)


def test_the_folder_gives_the_crops_result(folder):
    _same_result_as_the_crop(folder)


def test_a_date_only_is_not_a_time_to_match_position_reports(folder, tmp_path, capsys):
    reports = tmp_path / "ais.csv"
    reports.write_text("MMSI,BaseDateTime,LAT,LON,SOG,COG\n1,2023-08-22T10:00:00,43.3,5.3,10,90\n")
    assert main(["analyze", str(folder), "--vessel-px", "120,120", "--reports", str(reports)]) == 2
    assert "only its date" in capsys.readouterr().err


def test_a_folder_without_band_files_is_refused_in_words(tmp_path):
    (tmp_path / "notes.txt").write_text("x")
    with pytest.raises(SceneReadError, match="named like a band"):
        open_scene(tmp_path)


def test_the_scene_hash_of_a_band_folder_stands_for_its_pixels(folder):
    # the evidence's SHA-256 of a band-folder scene covers the band files, not only the virtual raster's text:
    # changing one band file changes it (program requirement, no source)
    with open_scene(folder) as sc:
        before = sc.sha256()
    band = folder / "2023-08-22_S2L2A_B08.tif"
    with rasterio.open(band, "r+") as ds:
        data = ds.read(1)
        data[0, 0] = data[0, 0] + 1
        ds.write(data, 1)
    with open_scene(folder) as sc:
        assert sc.sha256() != before


def _item(folder: Path, hrefs: dict[str, str], *, datetime: str = "2023-08-22T10:30:21Z") -> Path:
    """A STAC item as catalogues write them (STAC 1.0: Feature, properties.datetime and platform, assets with
    one eo:bands entry each; asset keys by colour as some catalogues name them)."""
    keys = {"B02": "blue", "B03": "green", "B04": "red", "B08": "nir"}
    item = {
        "type": "Feature",
        "stac_version": "1.0.0",
        "stac_extensions": ["https://stac-extensions.github.io/eo/v1.1.0/schema.json"],
        "id": "S2A_31TFJ_20230822_0_L2A",
        "geometry": None,
        "properties": {"datetime": datetime, "platform": "sentinel-2a", "constellation": "sentinel-2"},
        "assets": {
            keys[b]: {"href": h, "type": "image/tiff; application=geotiff", "eo:bands": [{"name": b}]}
            for b, h in hrefs.items()
        }
        | {"thumbnail": {"href": "thumb.png", "type": "image/png"}},
        "links": [],
    }
    p = folder / "item.json"
    p.write_text(json.dumps(item))
    return p


def test_a_stac_item_with_local_band_assets_is_one_scene_with_its_time_and_platform(folder, capsys):
    item = _item(folder, {b: f"2023-08-22_S2L2A_{b}.tif" for b in NAMES})
    with open_scene(item) as sc, rasterio.open(CROP) as ref:
        assert sc.info.band_descriptions == NAMES
        assert np.array_equal(sc.read()[0], ref.read().astype(np.float32))
        assert sc.info.acquisition_time == "2023-08-22T10:30:21Z"
    assert main(["info", str(item)]) == 0
    out = capsys.readouterr().out
    assert "2023-08-22T10:30:21Z (from the STAC item)" in out
    assert "recognised from band names and the platform in the metadata" in out
    _same_result_as_the_crop(item)


def test_a_stac_item_with_assets_on_the_network_says_to_download_them(folder):
    item = _item(folder, {b: f"https://example.invalid/{b}.tif" for b in NAMES})
    with pytest.raises(SceneReadError, match="on the network"):
        open_scene(item)


def test_a_session_on_a_band_folder_names_the_folder_and_reports(folder, tmp_path, capsys):
    # the session records what the analyst opened (the folder), not the virtual raster in the cache; the
    # report from it checks the scene's hash (over the band files) and writes the set (program behaviour)
    from wakemeter.project import Project, Vessel
    from wakemeter.project import session as session_mod

    with open_scene(folder) as sc:
        p = Project()
        p.scene = sc
        p.put(Vessel(1, "Crop ship", (120.0, 120.0)))
        p.requests[1] = AnalysisRequest(vessel_px=(120.0, 120.0))
        p.findings[1] = analyze(sc, p.requests[1])
        saved = session_mod.save(tmp_path / "s.json", session_mod.to_session(p))
    data = json.loads(saved.read_text())
    assert data["scene"]["absolute_path"] == str(folder.resolve())
    out = tmp_path / "out"
    out.mkdir()
    assert main(["report", str(saved), "--out", str(out)]) == 0
    (set_dir,) = out.iterdir()
    record = json.loads(next(p for p in set_dir.iterdir() if p.suffix == ".json").read_text())
    assert record["provenance"]["scene_file"] == "marseille"


def _safe(tmp_path: Path) -> Path:
    """A Sentinel-2 Level-2A product folder with the SAFE layout (ESA Products Specification Document: the
    metadata file at the top, the 10 m bands of a tile in GRANULE/<tile>/IMG_DATA/R10m/ as lossless JPEG 2000)
    holding the repo's crop; metadata elements as a product writes them (namespaced root; from memory)."""
    safe = tmp_path / "S2A_MSIL2A_20230822T103031_N0509_R108_T31TFH_20230822T163344.SAFE"
    r10 = safe / "GRANULE" / "L2A_T31TFH_A042512_20230822T103658" / "IMG_DATA" / "R10m"
    r10.mkdir(parents=True)
    (safe / "MTD_MSIL2A.xml").write_text(
        '<?xml version="1.0" encoding="UTF-8"?>\n'
        '<n1:Level-2A_User_Product xmlns:n1="https://psd-14.sentinel2.eo.esa.int/PSD/User_Product_Level-2A.xsd">'
        "<n1:General_Info><Product_Info><PRODUCT_START_TIME>2023-08-22T10:30:31.024Z</PRODUCT_START_TIME>"
        "<PRODUCT_TYPE>S2MSI2A</PRODUCT_TYPE><Datatake><SPACECRAFT_NAME>Sentinel-2A</SPACECRAFT_NAME></Datatake>"
        "</Product_Info></n1:General_Info></n1:Level-2A_User_Product>\n"
    )
    with rasterio.open(CROP) as src:
        prof = dict(driver="JP2OpenJPEG", width=src.width, height=src.height, count=1, dtype="uint16")
        prof.update(crs=src.crs, transform=src.transform, QUALITY="100", REVERSIBLE="YES")
        for b, name in enumerate(NAMES, 1):
            with rasterio.open(r10 / f"T31TFH_20230822T103031_{name}_10m.jp2", "w", **prof) as dst:
                dst.write(src.read(b), 1)
    return safe


def test_a_sentinel2_safe_folder_opens_with_its_time_and_spacecraft(tmp_path, monkeypatch, capsys):
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))
    safe = _safe(tmp_path)
    with open_scene(safe) as sc, rasterio.open(CROP) as ref:
        assert sc.info.band_descriptions == NAMES
        assert np.array_equal(sc.read()[0], ref.read().astype(np.float32))  # lossless: the crop's own values
        assert sc.info.acquisition_time == "2023-08-22T10:30:31.024Z"
        assert sc.info.origin == safe.resolve()
    assert main(["info", str(safe)]) == 0
    out = capsys.readouterr().out
    assert "(from the product's metadata (MTD_MSIL2A.xml))" in out
    assert "recognised from band names and the platform in the metadata" in out
    _same_result_as_the_crop(safe)


def test_an_incomplete_safe_folder_says_what_is_missing(tmp_path, monkeypatch):
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))
    safe = _safe(tmp_path)
    next((safe / "GRANULE").rglob("*_B08_10m.jp2")).unlink()
    with pytest.raises(SceneReadError, match="B08"):
        open_scene(safe)


def _zipped(safe: Path, out: Path) -> Path:
    """The product zipped as the Copernicus hub delivers it: <name>.SAFE/ at the top of the archive."""
    import zipfile

    with zipfile.ZipFile(out, "w", zipfile.ZIP_STORED) as zf:
        for f in sorted(safe.rglob("*")):
            if f.is_file():
                zf.write(f, f.relative_to(safe.parent).as_posix())
    return out


def test_a_zipped_safe_product_opens_without_unpacking(tmp_path, monkeypatch, capsys):
    # the same fixture zipped: the bands are read inside the archive (GDAL /vsizip/), the crop's own values,
    # with the product's time; the scene's hash is the archive's; nothing is unpacked next to it
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))
    safe = _safe(tmp_path / "unpacked")
    archive = _zipped(safe, tmp_path / f"{safe.name.removesuffix('.SAFE')}.zip")
    with open_scene(archive) as sc, rasterio.open(CROP) as ref:
        assert sc.info.band_descriptions == NAMES
        assert np.array_equal(sc.read()[0], ref.read().astype(np.float32))
        assert sc.info.acquisition_time == "2023-08-22T10:30:31.024Z"
        assert sc.info.origin == archive.resolve()
        digest = sc.sha256()
    assert sorted(p.name for p in tmp_path.iterdir()) == sorted(["unpacked", "cache", archive.name])
    archive.write_bytes(archive.read_bytes() + b"\0")  # another archive: another hash
    with open_scene(archive) as sc:
        assert sc.sha256() != digest
    assert main(["info", str(archive)]) == 0
    assert "(from the product's metadata (MTD_MSIL2A.xml))" in capsys.readouterr().out
    _same_result_as_the_crop(archive)


def test_a_zip_without_a_product_or_not_a_zip_is_refused_in_words(tmp_path, monkeypatch):
    import zipfile

    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))
    with zipfile.ZipFile(tmp_path / "photos.zip", "w") as zf:
        zf.writestr("holiday/readme.txt", "no product here")
    with pytest.raises(SceneReadError, match="no Sentinel-2 product in this zip"):
        open_scene(tmp_path / "photos.zip")
    (tmp_path / "broken.zip").write_bytes(b"PK\3\4 truncated")
    with pytest.raises(SceneReadError, match="not a zip archive that can be read"):
        open_scene(tmp_path / "broken.zip")
    safe = _safe(tmp_path / "unpacked")
    archive = _zipped(safe, tmp_path / "p.zip")
    with zipfile.ZipFile(archive) as zf, zipfile.ZipFile(tmp_path / "partial.zip", "w") as out:
        for n in zf.namelist():
            if "_B08_" not in n:
                out.writestr(n, zf.read(n))
    with pytest.raises(SceneReadError, match="B08"):
        open_scene(tmp_path / "partial.zip")


def test_band_files_given_one_by_one_are_one_scene_in_every_command(folder, tmp_path, capsys):
    # the same four files as the folder, named on the command line as a user types them after a download
    files = [str(folder / f"2023-08-22_S2L2A_{n}.tif") for n in NAMES]
    assert main(["info", *files]) == 0
    out = capsys.readouterr().out
    assert "1 B02 (blue), 2 B03 (green), 3 B04 (red), 4 B08 (near infrared)" in out
    assert "2023-08-22 (from the file names; a date only)" in out
    # the list in another order is the same scene, and gives the stacked crop's result
    assert main(["analyze", *reversed(files), "--vessel-px", "120,120", "--json"]) == 0
    listed = json.loads(capsys.readouterr().out)
    assert main(["analyze", str(CROP), "--vessel-px", "120,120", "--json"]) == 0
    stacked = json.loads(capsys.readouterr().out)
    assert listed["speed_mps"] == stacked["speed_mps"] and listed["heading_deg"] == stacked["heading_deg"]
    assert main(["quicklook", *files, "--out", str(tmp_path / "look.png")]) == 0
    assert (tmp_path / "look.png").is_file()


def test_band_files_that_do_not_make_one_scene_are_refused_in_words(folder, tmp_path, capsys):
    b02 = str(folder / "2023-08-22_S2L2A_B02.tif")
    odd = tmp_path / "2023-08-22_S2L2A_B05.tif"  # a 20 m band: another pixel grid
    with rasterio.open(CROP) as src:
        prof = src.profile
        prof.update(count=1, width=120, height=120, transform=src.transform @ src.transform.scale(2, 2))
        with rasterio.open(odd, "w", **prof) as dst:
            dst.write(src.read(1)[::2, ::2], 1)
    cases = [
        ([b02, b02], "given twice"),
        ([b02, str(odd)], "not on the pixel grid"),
        ([b02, str(ROOT_SCENE)], "named for its band"),
        ([b02, str(folder / "missing_B04.tif")], "no such file"),
    ]
    for files, said in cases:
        assert main(["info", *files]) == 2
        assert said in capsys.readouterr().err


def test_the_programs_open_takes_band_files_selected_together(folder, qtbot, tmp_path, monkeypatch):
    from PySide6.QtWidgets import QFileDialog

    from wakemeter.app.window import MainWindow

    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "config"))
    w = MainWindow()
    qtbot.addWidget(w)
    files = [str(folder / f"2023-08-22_S2L2A_{n}.tif") for n in NAMES]
    monkeypatch.setattr(QFileDialog, "getOpenFileNames", staticmethod(lambda *a, **k: (files, "")))
    w.open_dialog()
    assert w.doc.scene is not None and w.doc.scene.info.band_descriptions == NAMES
    errors: list[str] = []
    monkeypatch.setattr(w, "error", lambda title, text: errors.append(text))
    monkeypatch.setattr(QFileDialog, "getOpenFileNames", staticmethod(lambda *a, **k: ([files[0], files[0]], "")))
    w.open_dialog()  # refused in words; the open scene stays
    assert errors and "given twice" in errors[0] and w.doc.scene.info.count == 4
    w.close()
