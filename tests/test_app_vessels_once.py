"""Every vessel once in the window: Find vessels on the channel demo (synthetic truth in its truth file), a
second search adds nothing, and Analyse all merges a row that repeats a vessel, undoably (program behaviour)."""

import json
from pathlib import Path

import pytest

pytest.importorskip("PySide6")

from wakemeter.app.document import AddItem, RemoveItem, Vessel  # noqa: E402
from wakemeter.app.window import MainWindow  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]
SCENE = ROOT / "sample_scenes" / "channel_two_vessels.tif"
TRUTH = json.loads(SCENE.with_suffix(".truth.json").read_text())["vessels"]


@pytest.fixture
def win(qtbot, tmp_path, monkeypatch):
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "config"))
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))
    w = MainWindow()
    qtbot.addWidget(w)
    assert w.open_path(str(SCENE))
    yield w
    w.close()


def _near(v: Vessel, t: dict) -> float:
    return ((v.position[0] - t["pixel_col"]) ** 2 + (v.position[1] - t["pixel_row"]) ** 2) ** 0.5


def test_each_vessel_is_found_once_and_a_repeat_is_merged_after_analysis(win, qtbot, tmp_path):
    win.find_vessels(whole=True)
    qtbot.waitUntil(lambda: win.job is None, timeout=60_000)
    found = list(win.doc.vessels.values())
    assert len(found) == 2 and all(v.found_score is not None and v.found_score > 0 for v in found)
    assert sorted(v.name for v in found) == ["found 1", "found 2"]  # no length that could pass for the hull's
    for t in TRUTH:  # each within half its hull's length (2 m pixels)
        assert min(_near(v, t) for v in found) <= 0.25 * t["hull_length_m"], t["name"]
    win.find_vessels(whole=True)  # a second search marks nothing twice
    qtbot.waitUntil(lambda: win.job is None, timeout=60_000)
    assert len(win.doc.vessels) == 2
    # a row that repeats the coaster (as a second search of an overlapping area could have given before)
    coaster = next(t for t in TRUTH if t["name"] == "Brackenfield")
    repeat = Vessel(win.doc.new_id(), "found 9", (coaster["pixel_col"] + 4, coaster["pixel_row"]), 9.0)
    win.doc.undo.push(AddItem(win.doc, repeat, "mark vessel"))
    win.analyse_all()
    qtbot.waitUntil(lambda: win.job is None and not win.controller.queue and len(win.doc.vessels) == 2, timeout=120_000)
    # one row is left on the coaster (the one whose wake was found with the higher significance), counting the
    # other among its merged
    on_coaster = [v for v in win.doc.vessels.values() if _near(v, coaster) <= 0.25 * coaster["hull_length_m"]]
    assert len(on_coaster) == 1 and on_coaster[0].merged >= 1
    kept = on_coaster[0]
    gone = ({v.id for v in found} | {repeat.id}) - set(win.doc.vessels)
    assert len(gone) == 1
    t = win.vessel_table
    t.refresh()
    heads = [t.horizontalHeaderItem(j).text() for j in range(t.columnCount())]
    assert t.rowCount() == 2 and {"Finder score", "Merged", "Position report"} <= set(heads)
    # every header is readable in full (a narrow column once showed "ower bound (kn")
    fm = t.horizontalHeader().fontMetrics()
    assert all(t.columnWidth(j) >= fm.horizontalAdvance(h) for j, h in enumerate(heads))
    # undone, both rows come back, each with its analysis
    win.doc.undo.undo()
    (gone_id,) = gone
    assert gone_id in win.doc.vessels and win.doc.findings.get(gone_id) is not None
    win.doc.undo.redo()
    # the session keeps the finder's score and the merged count
    assert win.controller.save_session(str(tmp_path / "s.json"))
    saved = {v["name"]: v for v in json.loads((tmp_path / "s.json").read_text())["vessels"]}
    assert saved[kept.name]["merged"] == kept.merged and saved[kept.name]["found_score"] == kept.found_score


def test_deleting_an_analysed_vessel_is_undone_with_its_analysis(win, qtbot):
    vid = win.doc.new_id()
    coaster = next(t for t in TRUTH if t["name"] == "Brackenfield")
    win.doc.undo.push(
        AddItem(win.doc, Vessel(vid, "Brackenfield", (coaster["pixel_col"], coaster["pixel_row"])), "mark")
    )
    win.controller.analyse_selected()
    qtbot.waitUntil(lambda: win.job is None and vid in win.doc.findings, timeout=60_000)
    before = win.doc.findings[vid]
    win.doc.undo.push(RemoveItem(win.doc, vid))
    assert vid not in win.doc.vessels and vid not in win.doc.findings
    win.doc.undo.undo()
    assert win.doc.findings.get(vid) is before  # the analysis came back with the vessel


def test_a_land_layer_keeps_find_vessels_off_the_shore(qtbot, tmp_path, monkeypatch):
    # the harbour demo with a shore of white roofs added (tests/test_land_layer.py): with the layer chosen in
    # Vessels, only the launch is marked; a line layer is refused with the reason and changes nothing
    import shapely

    from tests.test_land_layer import SHORE_COL, _land_geojson, _shore_scene
    from wakemeter.evidence.gis import Feature, write_features

    tif = _shore_scene(tmp_path)
    land = _land_geojson(tif, tmp_path / "land.gpkg")
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "config"))
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))
    w = MainWindow()
    qtbot.addWidget(w)
    assert w.open_path(str(tif))
    errors = []
    monkeypatch.setattr(w, "error", lambda title, text: errors.append(text))
    line = write_features(
        tmp_path / "coast.geojson", [Feature("coast", shapely.LineString([(-35.1, 35.9), (-35.0, 36.1)]), {})]
    )
    assert not w.set_land_layer(str(line)) and "which side is land" in errors[-1] and w.land_layer is None
    monkeypatch.setattr(w, "_ask_open", lambda *a: str(land))
    w.choose_land_layer()
    assert w.land_layer is not None
    w.find_vessels(whole=True)
    qtbot.waitUntil(lambda: w.job is None, timeout=60_000)
    assert len(w.doc.vessels) == 1 and all(v.position[0] > SHORE_COL + 30 for v in w.doc.vessels.values())
    assert w.open_path(str(ROOT / "sample_scenes" / "calm_no_wake.tif"), ask_first=False)
    assert w.land_layer is None  # read for the scene it was chosen on
    w.close()
