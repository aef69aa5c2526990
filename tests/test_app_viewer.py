"""The desktop program, part 1 (pytest-qt, offscreen): viewer and hand measurements on the demo scenes.

Check values: the demo scenes' synthetic truth (truth JSON) and 2 pi U^2 / g (Lamb 1932 sec. 256).
"""

import json
from pathlib import Path

import numpy as np
import pytest

pytest.importorskip("PySide6")
from PySide6.QtCore import QPointF, Qt  # noqa: E402

from wakemeter.app.window import MainWindow, wait_for_tiles  # noqa: E402
from wakemeter.physics import kelvin  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]


@pytest.fixture
def win(qtbot, tmp_path, monkeypatch):
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "config"))
    w = MainWindow()
    qtbot.addWidget(w)
    w.resize(1200, 800)
    w.show()
    return w


def _truth(name):
    return json.loads((ROOT / "sample_scenes" / f"{name}.truth.json").read_text())


def test_open_zoom_pan_and_track_bearing(win, qtbot):
    from PySide6.QtWidgets import QApplication

    assert win.open_path(str(ROOT / "sample_scenes" / "harbour_approach_optical.tif"))
    wait_for_tiles(win, QApplication.instance())
    c = win.canvas
    z0 = c.zoom
    qtbot.keyClick(c, Qt.Key_Plus)
    assert c.zoom == pytest.approx(z0 * 1.25)
    o = QPointF(c.origin)
    qtbot.keyClick(c, Qt.Key_Right)
    assert c.origin.x() > o.x()
    c.fit()
    v = _truth("harbour_approach_optical")["vessels"][0]
    # mark the vessel with a real click
    win.set_tool("vessel")
    qtbot.mouseClick(c, Qt.LeftButton, pos=c.to_screen((v["pixel_col"], v["pixel_row"])).toPoint())
    assert len(win.doc.vessels) == 1
    # draw the track with the mouse: from the vessel back along the wake
    f = win.doc.scene.local_frame(v["pixel_col"], v["pixel_row"])
    dc, dr = f.image_direction(v["heading_deg"])
    vessel = (v["pixel_col"], v["pixel_row"])
    end = (vessel[0] - 300 * dc, vessel[1] - 300 * dr)
    win.set_tool("track")
    a, b = c.to_screen(vessel).toPoint(), c.to_screen(end).toPoint()
    qtbot.mousePress(c, Qt.LeftButton, pos=a)
    qtbot.mouseMove(c, pos=b)
    qtbot.mouseRelease(c, Qt.LeftButton, pos=b)
    tracks = [m for m in win.doc.measurements.values() if m.kind == "track"]
    assert len(tracks) == 1
    # one screen pixel at fit zoom is ~1.4 scene px over a 300 px line: well within 1 deg
    assert tracks[0].values["heading_deg"] == pytest.approx(62.0, abs=1.0)
    assert "heading" in tracks[0].text
    # undo, redo
    win.doc.undo.undo()
    assert not [m for m in win.doc.measurements.values() if m.kind == "track"]
    win.doc.undo.redo()
    assert [m for m in win.doc.measurements.values() if m.kind == "track"]
    win.doc.undo.undo()
    win.doc.undo.undo()
    assert not win.doc.vessels
    win.doc.undo.redo()
    assert len(win.doc.vessels) == 1


def test_crest_ruler_across_transverse_crests(win):
    # Synthetic truth: transverse crests 2 pi U^2 / g apart with the scene's normal gravity; within 3 %.
    assert win.open_path(str(ROOT / "sample_scenes" / "channel_two_vessels.tif"))
    t = _truth("channel_two_vessels")
    v = t["vessels"][1]
    f = win.doc.scene.local_frame(v["pixel_col"], v["pixel_row"])
    dc, dr = f.image_direction(v["heading_deg"])
    p0 = (v["pixel_col"] - 10 * dc + 3 * dr, v["pixel_row"] - 10 * dr - 3 * dc)
    p1 = (p0[0] - 260 * dc, p0[1] - 260 * dr)
    win.canvas.finish_line("crest", p0, p1)
    m = [m for m in win.doc.measurements.values() if m.kind == "crest"][0]
    lam = kelvin.transverse_wavelength(v["speed_mps"], g=t["gravity_mps2"])
    assert m.values["spacing_m"] == pytest.approx(lam, rel=0.03)
    assert "±" in m.text
    win.canvas.finish_line("ruler", (10, 10), (110, 10))
    r = [m for m in win.doc.measurements.values() if m.kind == "ruler"][0]
    assert r.values["length_m"] == pytest.approx(200.0, rel=1e-3)
    win.doc.select(r.id)
    win.delete_selected()
    assert r.id not in win.doc.measurements


def test_calibrate_plain_image_with_two_points(win, tmp_path):
    import cv2

    img = (np.random.default_rng(0).random((200, 300)) * 255).astype(np.uint8)
    p = tmp_path / "plain.png"
    cv2.imwrite(str(p), img)
    assert win.open_path(str(p))
    win.canvas.finish_line("ruler", (10, 10), (110, 10))
    r = [m for m in win.doc.measurements.values() if m.kind == "ruler"][0]
    assert "calibrate" in r.error
    assert win.calibrate_two_points((0, 0), (0, 50), 25.0, north_up_deg=None)
    r = win.doc.measurements[r.id]
    assert r.values["length_m"] == pytest.approx(50.0, rel=1e-3)
    win.doc.undo.undo()  # calibration is undoable
    assert "calibrate" in win.doc.measurements[r.id].error


def test_corrupt_file_gives_message_and_window_keeps_working(win, tmp_path):
    good = ROOT / "sample_scenes" / "calm_no_wake.tif"
    assert win.open_path(str(good))
    bad = tmp_path / "broken.tif"
    bad.write_bytes(good.read_bytes()[:300])
    assert not win.open_path(str(bad))
    assert "broken.tif" in win.last_error
    assert win.doc.scene is not None and win.doc.scene.info.path.name == "calm_no_wake.tif"
    win.canvas.finish_line("ruler", (10, 10), (60, 10))
    assert any(m.kind == "ruler" for m in win.doc.measurements.values())


def test_screenshot_command(tmp_path):
    import subprocess
    import sys

    out = tmp_path / "shot.png"
    r = subprocess.run(
        [
            sys.executable,
            "-m",
            "wakemeter",
            str(ROOT / "sample_scenes" / "outer_roads_radar.tif"),
            "--screenshot",
            str(out),
            "--size",
            "900x600",
        ],
        capture_output=True,
        text=True,
        env={**__import__("os").environ, "QT_QPA_PLATFORM": "offscreen"},
        timeout=120,
    )
    assert r.returncode == 0, r.stderr
    import cv2

    img = cv2.imread(str(out))
    assert img.shape[:2] == (600, 900)
    assert img[100:500, 200:700].std() > 10  # the scene is drawn, not an empty canvas


def test_band_choice_on_a_multiband_scene(win, tmp_path):
    import rasterio
    from affine import Affine

    p = tmp_path / "four.tif"
    data = (np.random.default_rng(1).random((4, 64, 80)) * 1000).astype(np.uint16)
    with rasterio.open(
        p,
        "w",
        driver="GTiff",
        width=80,
        height=64,
        count=4,
        dtype="uint16",
        crs="EPSG:32631",
        transform=Affine(2, 0, 500000, 0, -2, 6000000),
    ) as dst:
        dst.write(data)
    assert win.open_path(str(p))
    assert win.canvas.loader.contrast.bands == (1, 2, 3)
    assert win.choose_bands("4,3,2") and win.canvas.loader.contrast.bands == (4, 3, 2)
    assert win.choose_bands("4") and not win.canvas.loader.contrast.rgb
    assert not win.choose_bands("1,2") and "three" in win.last_error


def test_recent_scenes_survive_two_launches(tmp_path):
    # QSettings gives a one-item list back as a plain string after a restart; the menu must still list the
    # scene, not its letters (found by a tester: "s", "a", "m" from the second launch on).
    import os
    import subprocess
    import sys

    env = {**os.environ, "XDG_CONFIG_HOME": str(tmp_path / "config"), "QT_QPA_PLATFORM": "offscreen"}
    scene = str(ROOT / "sample_scenes" / "calm_no_wake.tif")
    for i in range(2):
        shot = tmp_path / f"shot{i}.png"
        subprocess.run(
            [sys.executable, "-m", "wakemeter", scene, "--screenshot", str(shot)],
            env=env,
            check=True,
            capture_output=True,
            timeout=120,
        )
    code = (
        "from PySide6.QtWidgets import QApplication; app = QApplication([]); "
        "from wakemeter.app.window import MainWindow; w = MainWindow(); "
        "print('|'.join(a.text() for a in w.recent_menu.actions()))"
    )
    out = subprocess.run(
        [sys.executable, "-c", code], env=env, check=True, capture_output=True, text=True, timeout=120
    ).stdout.strip()
    assert out.split("|") == [scene]


def test_help_menu_opens_its_texts(win):
    titles = [a.text().replace("&", "") for a in win.help_menu.actions()]
    assert titles == ["Keys and tools", "How the speed is measured", "About wakemeter"]
    for act in win.help_menu.actions():
        act.trigger()
        assert win.last_help
    assert "wakemeter 0." in win.last_help and "GDAL" in win.last_help  # About: versions


def test_no_key_is_bound_twice(win):
    # every action's keys, menus and tool bar together: a key bound twice makes Qt call it ambiguous and do
    # nothing (Redo had Ctrl+Shift+Z twice: "Ambiguous shortcut overload") (self-consistency)
    from PySide6.QtGui import QAction, QKeySequence

    seen: dict[str, str] = {}
    for act in win.findChildren(QAction):
        for seq in act.shortcuts():
            key = seq.toString(QKeySequence.SequenceFormat.PortableText)
            assert key not in seen, f"{key!r} bound to {seen[key]!r} and {act.text()!r}"
            seen[key] = act.text()
    redo = [a for a in win.findChildren(QAction) if a.text().replace("&", "").startswith("Redo")]
    assert redo and redo[0].shortcuts(), "Redo has a key"


def test_the_actions_table_names_methods_the_window_has(win):
    from wakemeter.app import actions

    for _title, attribute, entries in actions.MENUS:
        assert getattr(win, attribute) is not None
        for e in entries:
            if e.text != actions.SEPARATOR and not e.slot.startswith("<"):
                assert callable(getattr(win, e.slot)), e.slot


def test_canvas_and_evidence_picture_share_one_palette():
    # the same mark has the same colour on screen and in the evidence picture (they had drifted apart: the
    # vessel was (70, 230, 110) on screen and (60, 230, 90) in the picture) (self-consistency)
    from wakemeter import palette
    from wakemeter.app.canvas import ITEM_COLOURS, SEGMENT_STYLES
    from wakemeter.evidence import annotate

    assert annotate.COLOURS is palette.COLOURS
    for name in ("vessel", "track", "arm", "crest"):
        assert ITEM_COLOURS[name].getRgb()[:3] == palette.COLOURS[name]
    for style, _w, _dash in SEGMENT_STYLES.values():
        rgb = ITEM_COLOURS[style].getRgb()[:3]
        assert rgb in palette.COLOURS.values(), style


def test_measurement_list_lists_vessels_and_selects_them(win):
    # the measurement list is a panel of its own: it shows the document's vessels and selecting a row selects
    # the vessel in the document (self-consistency)
    from wakemeter.app.document import AddItem, Vessel

    assert win.open_path(str(ROOT / "sample_scenes" / "harbour_approach_optical.tif"))
    a = Vessel(win.doc.new_id(), "Saltmarsh Wren", (100.0, 100.0))
    win.doc.undo.push(AddItem(win.doc, a, "mark"))
    b = Vessel(win.doc.new_id(), "Tern", (300.0, 300.0))
    win.doc.undo.push(AddItem(win.doc, b, "mark"))
    rows = [win.items.item(i).text() for i in range(win.items.count())]
    assert rows == ["Vessel: Saltmarsh Wren — not analysed", "Vessel: Tern — not analysed"]
    win.items.setCurrentRow(0)
    assert win.doc.selected == a.id


def test_calibrate_on_a_georeferenced_scene_says_so_before_asking(win, monkeypatch):
    # the Calibrate tool on a georeferenced scene says at once that it is not needed: no distance is asked
    # for first (program behaviour, no external source)
    from PySide6.QtWidgets import QInputDialog

    asked = []
    monkeypatch.setattr(QInputDialog, "getDouble", lambda *a, **k: asked.append(a) or (100.0, True))
    assert win.open_path(str(ROOT / "sample_scenes" / "harbour_approach_optical.tif"))
    win._ask_calibration((10.0, 10.0), (60.0, 10.0))
    assert asked == [] and "not needed" in win.last_error


def test_file_dialogs_start_at_the_scene_and_name_the_session_after_it(win, tmp_path):
    # a dialog starts in the folder last used for its kind of file, else the scene's folder, never the
    # program's own; a new session file is named after its scene (program behaviour, no external source)
    import shutil

    for kind in ("scene", "session", "reports", "positions", "gis"):
        win.settings.remove(f"folders/{kind}")
    scene = tmp_path / "cases" / "quay_north.tif"
    scene.parent.mkdir()
    shutil.copy(ROOT / "sample_scenes" / "harbour_approach_optical.tif", scene)
    assert win.open_path(str(scene))
    assert win.start_folder("session") == str(scene.parent)
    assert win.suggested_session_path() == str(scene.parent / "quay_north.wakemeter.json")
    elsewhere = tmp_path / "reports_in"
    elsewhere.mkdir()
    win.used_folder("reports", str(elsewhere / "ais.csv"))
    assert win.start_folder("reports") == str(elsewhere)
    assert win.start_folder("gis") == str(scene.parent)


def test_the_redo_key_redoes(win, qtbot):
    # Ctrl+Z then Ctrl+Shift+Z through the real key handling: the vessel comes back (it was bound twice and
    # did nothing; program behaviour, no source)
    from PySide6.QtCore import Qt as _Qt
    from PySide6.QtWidgets import QApplication

    from wakemeter.app.document import AddItem, Vessel

    assert win.open_path(str(ROOT / "sample_scenes" / "harbour_approach_optical.tif"))
    win.doc.undo.push(AddItem(win.doc, Vessel(win.doc.new_id(), "Tern", (10.0, 10.0)), "mark vessel"))
    win.activateWindow()
    win.canvas.setFocus()
    qtbot.keyClick(win.canvas, _Qt.Key.Key_Z, _Qt.KeyboardModifier.ControlModifier)
    QApplication.processEvents()
    assert not win.doc.vessels
    qtbot.keyClick(win.canvas, _Qt.Key.Key_Z, _Qt.KeyboardModifier.ControlModifier | _Qt.KeyboardModifier.ShiftModifier)
    QApplication.processEvents()
    assert [v.name for v in win.doc.vessels.values()] == ["Tern"]


def test_a_radar_scene_shows_its_speckle_in_grey_and_says_it_is_in_db(win):
    # the demo radar scene at full resolution: speckle in mid-greys (a stretch from the averaged overview alone
    # put most pixels at black or white), the hull brighter than the sea, and the dB item ticked since dB is
    # shown (program behaviour, no source)
    from wakemeter.app.tiles import read_tile

    assert win.open_path(str(ROOT / "sample_scenes" / "outer_roads_radar.tif"))
    c = win.canvas.loader.contrast
    assert c.db and win.db_action.isChecked()
    truth = _truth("outer_roads_radar")["vessels"][0]
    col, row = truth.get("hull_pixel_col", truth["pixel_col"]), truth.get("hull_pixel_row", truth["pixel_row"])
    tile = read_tile(win.doc.scene, 0, int(col // 256), int(row // 256), c)[..., 0]
    clipped = float(np.mean((tile == 0) | (tile == 255)))
    assert clipped < 0.05, clipped  # speckle is shown, not saturated
    win.db_action.trigger()  # the first click turns dB off (it changed nothing before)
    assert not win.canvas.loader.contrast.db


def test_the_analysed_area_is_not_drawn_beyond_the_scene(win):
    # an analysed square around a vessel near the corner reaches past the image: its outline is cut to the scene
    # (program behaviour, no source)
    assert win.open_path(str(ROOT / "sample_scenes" / "harbour_approach_optical.tif"))
    c = win.canvas
    square = [(-200.0, -200.0), (300.0, -200.0), (300.0, 300.0), (-200.0, 300.0)]
    box = c.area_on_screen(square).boundingRect()
    origin = c.to_screen((0.0, 0.0))
    assert box.left() >= origin.x() - 1e-6 and box.top() >= origin.y() - 1e-6
    assert box.right() == pytest.approx(c.to_screen((300.0, 0.0)).x())


def test_labels_never_cover_each_other_and_crowds_of_vessels_become_dots(win):
    # two measurements drawn on the same spot show one label, not two on top of each other; 2 300 marked
    # vessels at the overview zoom are drawn as dots without names (program behaviour, no source)
    from wakemeter.app.document import AddItems, Measurement, Vessel

    assert win.open_path(str(ROOT / "sample_scenes" / "harbour_approach_optical.tif"))
    for _ in range(2):
        win.canvas.finish_line("ruler", (100.0, 100.0), (300.0, 100.0))
    win.canvas.grab()
    boxes = win.canvas.labels_drawn
    assert all(not a.intersects(b) for i, a in enumerate(boxes) for b in boxes[i + 1 :])
    rng = np.random.default_rng(0)
    many = [Vessel(win.doc.new_id(), f"found {i}", tuple(rng.uniform(0, 1000, 2))) for i in range(2300)]
    win.doc.undo.push(AddItems(win.doc, many, "find"))
    win.canvas.fit()
    win.canvas.grab()
    assert win.canvas.vessels_drawn_as_dots and len(win.canvas.labels_drawn) < 50
    win.canvas.set_zoom(8.0, QPointF(100, 100))
    win.canvas.grab()
    assert not win.canvas.vessels_drawn_as_dots
    del Measurement


def test_wheel_zoom_keeps_the_point_under_the_cursor(win):
    # a wheel step in and out: the scene point under the cursor stays there (program behaviour, no source)
    from PySide6.QtCore import QPoint
    from PySide6.QtGui import QWheelEvent

    assert win.open_path(str(ROOT / "sample_scenes" / "outer_roads_radar.tif"))
    c = win.canvas
    # (0, 0), the top-left corner, is a QPointF that tests false: it must not fall back to the centre
    for pos, delta in (
        (QPointF(300, 200), 120),
        (QPointF(640, 90), -240),
        (QPointF(55, 700), 360),
        (QPointF(0, 0), 120),
    ):
        before = c.to_scene(pos)
        ev = QWheelEvent(
            pos,
            c.mapToGlobal(pos),
            QPoint(0, 0),
            QPoint(0, delta),
            Qt.MouseButton.NoButton,
            Qt.KeyboardModifier.NoModifier,
            Qt.ScrollPhase.NoScrollPhase,
            False,
        )
        c.wheelEvent(ev)
        after = c.to_scene(pos)
        assert (after.x(), after.y()) == pytest.approx((before.x(), before.y()), abs=1e-6)


def test_a_folder_of_band_files_opens_in_the_program(win, tmp_path, monkeypatch):
    # File > Open a folder of band files (or a folder dropped on the window): the bands become one scene shown
    # in true colour (the shared port scenes come this way; program behaviour, no source)
    import rasterio

    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))
    crop = ROOT / "tests" / "data" / "sentinel2" / "marseille_00_S2L2A_2023-08-22_wake.tif"
    folder = tmp_path / "marseille"
    folder.mkdir()
    with rasterio.open(crop) as src:
        prof = src.profile
        prof.update(count=1)
        for b, name in enumerate(("B02", "B03", "B04", "B08"), 1):
            with rasterio.open(folder / f"2023-08-22_S2L2A_{name}.tif", "w", **prof) as dst:
                dst.write(src.read(b), 1)
    assert win.open_path(str(folder))
    assert win.doc.scene.info.count == 4 and win.canvas.loader.contrast.rgb
    assert "marseille" in win.windowTitle()


def _land_and_sea(path: Path) -> Path:
    """A 4-band reflectance scene (uint16, B02 B03 B04 B08) whose left half is land (bright, NDWI < 0) and right
    half sea (dark, NDWI > 0), with a brighter streak on the sea: made for this test."""
    import rasterio
    from affine import Affine

    rng = np.random.default_rng(3)
    h, w = 400, 400
    data = np.empty((4, h, w), np.float64)
    land = [2500.0, 3000.0, 3500.0, 4500.0]  # blue, green, red, near infrared
    sea = [900.0, 800.0, 500.0, 300.0]
    for b in range(4):
        data[b, :, : w // 2] = land[b] + rng.normal(0, 600, (h, w // 2))
        data[b, :, w // 2 :] = sea[b] + rng.normal(0, 25, (h, w - w // 2))
    data[:3, 200:203, 250:350] += 150.0  # a faint wake on the sea
    prof = dict(driver="GTiff", width=w, height=h, count=4, dtype="uint16", crs="EPSG:32633")
    with rasterio.open(path, "w", transform=Affine(10, 0, 500000, 0, -10, 4800000), **prof) as dst:
        dst.write(np.clip(data, 0, 65535).astype(np.uint16))
        for i, name in enumerate(("B02", "B03", "B04", "B08"), 1):
            dst.set_band_description(i, name)
    return path


def test_a_port_scene_is_stretched_on_its_sea_and_the_menu_says_so(win, tmp_path):
    # land and sea half and half (synthetic): the stretch is set on the water by the water index (McFeeters
    # 1996), so the sea spans the grey levels and a faint wake shows; land saturates.  The View item is ticked;
    # unticked, the whole scene sets the stretch (program behaviour, no source)
    from wakemeter.app.tiles import read_tile

    assert win.open_path(str(_land_and_sea(tmp_path / "port.tif")))
    c = win.canvas.loader.contrast
    assert c.on_water and win.water_action.isChecked()
    tile = read_tile(win.doc.scene, 0, 1, 0, c)[..., 0].astype(float)  # the sea's first tile (columns 256-400)
    wake, sea = tile[200:203, 0:94].mean(), tile[100:180, 0:140].mean()
    assert wake - sea > 20  # the wake is 150 over a sea of noise 25: it stands out on the sea's stretch
    win.water_action.trigger()
    c2 = win.canvas.loader.contrast
    assert not c2.on_water and not win.water_action.isChecked() and max(c2.hi) > 2 * max(c.hi)
    tile2 = read_tile(win.doc.scene, 0, 1, 0, c2)[..., 0].astype(float)
    assert tile2[200:203, 0:94].mean() - tile2[100:180, 0:140].mean() < wake - sea
    assert win.open_path(str(ROOT / "sample_scenes" / "harbour_approach_optical.tif"))
    assert not win.water_action.isChecked()  # one band: no water index
    win.water_action.trigger()
    assert not win.canvas.loader.contrast.on_water and not win.water_action.isChecked()
