"""The desktop program, part 2 (pytest-qt, offscreen): analysis in the background, findings,
hand corrections, sessions.  Check values: the demo scenes' synthetic truth (truth JSON)."""

import json
import re
from pathlib import Path

import numpy as np
import pytest

pytest.importorskip("PySide6")

from wakemeter.app.document import AddItem, Vessel  # noqa: E402
from wakemeter.app.window import MainWindow  # noqa: E402
from wakemeter.detect.findings import CautionCode
from wakemeter.detect.tuning import DEFAULT_TUNING

ROOT = Path(__file__).resolve().parents[1]
SCENE = ROOT / "sample_scenes" / "harbour_approach_optical.tif"
TRUTH = json.loads((ROOT / "sample_scenes" / "harbour_approach_optical.truth.json").read_text())["vessels"][0]


def _window(qtbot, tmp_path, monkeypatch, scene: Path, name: str, position: tuple[float, float]) -> MainWindow:
    """The program on ``scene`` with one vessel marked, its settings and cache in the test's folder."""
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "config"))
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))
    w = MainWindow()
    qtbot.addWidget(w)
    w.resize(1200, 800)
    w.show()
    assert w.open_path(str(scene))
    w.doc.undo.push(AddItem(w.doc, Vessel(w.doc.new_id(), name, position), "mark vessel"))
    return w


@pytest.fixture
def win(qtbot, tmp_path, monkeypatch):
    w = _window(qtbot, tmp_path, monkeypatch, SCENE, "Saltmarsh Wren", (TRUTH["pixel_col"] + 2, TRUTH["pixel_row"] - 2))
    yield w
    w.close()


def _analyse(win, qtbot):
    win.controller.analyse_selected()
    qtbot.waitUntil(lambda: win.job is None, timeout=60_000)


def test_analysis_shows_speed_interval_and_keeps_gui_responsive(win, qtbot):
    from PySide6.QtCore import QTimer

    ticks = []  # the GUI's event loop keeps turning while the job runs (latency figures: bench_gui_latency.py)
    timer = QTimer()
    timer.timeout.connect(lambda: ticks.append(win.job is not None))
    timer.start(10)
    _analyse(win, qtbot)
    timer.stop()
    vid = next(iter(win.doc.vessels))
    result = win.doc.effective_finding(vid).to_json()
    assert result["speed_mps"] == pytest.approx(TRUTH["speed_mps"], rel=0.05)
    html = win.controller.panel.text.toHtml()
    assert "95 % interval" in html and f"{result['speed_knots']:.1f} kn" in html
    assert "licensed" in html  # the caution is shown with the numbers
    assert "Wake lines" in html and "Kelvin arms at" in html  # the lines found, with their significance
    assert sum(ticks) >= 2  # events were handled while the analysis ran off the GUI thread


def test_cancel_mid_way(win, qtbot):
    win.controller.analyse_selected()
    assert win.job is not None
    win.cancel_job()
    qtbot.waitUntil(lambda: win.job is None, timeout=60_000)
    assert not win.doc.findings
    assert "cancelled" in win.message.text()


def test_reject_and_correct_arm_by_hand(win, qtbot):
    _analyse(win, qtbot)
    vid = next(iter(win.doc.vessels))
    before = win.doc.effective_finding(vid)
    win.controller.panel.reject.setChecked(True)
    assert vid in win.doc.rejected and not win.controller.panel.export_button.isEnabled()
    win.doc.undo.undo()
    assert vid not in win.doc.rejected
    # correct the arm: a hand-drawn arm at 34 deg (needs a track first)
    vx, vy = win.doc.vessels[vid].position
    f = win.doc.scene.local_frame(vx, vy)
    dc, dr = f.image_direction(TRUTH["heading_deg"])
    win.canvas.finish_line("track", (vx, vy), (vx - 200 * dc, vy - 200 * dr))
    import numpy as np

    a = np.radians(34.0)
    end = (vx - 200 * (np.cos(a) * dc - np.sin(a) * dr), vy - 200 * (np.cos(a) * dr + np.sin(a) * dc))
    win.canvas.finish_line("arm", (vx, vy), end)
    after = win.doc.effective_finding(vid)
    assert after.half_angle_deg == pytest.approx(34.0, abs=0.5)
    assert after.half_angle_deg != before.half_angle_deg
    assert after.has_caution(CautionCode.HAND_ARM)
    assert "revised" in win.controller.panel.text.toHtml()


def test_session_round_trip_and_damaged_file(win, qtbot, tmp_path):
    _analyse(win, qtbot)
    vid = next(iter(win.doc.vessels))
    numbers = win.doc.effective_finding(vid).to_json()
    path = tmp_path / "case.wakemeter.json"
    assert win.controller.save_session(str(path))
    saved = path.read_text()
    w2 = MainWindow()
    qtbot.addWidget(w2)
    assert w2.controller.open_session(str(path))
    vid2 = next(iter(w2.doc.vessels))
    assert w2.doc.vessels[vid2].name == "Saltmarsh Wren"
    again = w2.doc.effective_finding(vid2).to_json()
    for key in ("speed_mps", "speed_ci95_mps", "heading_deg", "regime", "half_angle_deg"):
        assert again[key] == numbers[key]
    # a truncated session: clear error, the file untouched, the open scene kept
    bad = tmp_path / "bad.json"
    bad.write_text(saved[: len(saved) // 2])
    assert not w2.controller.open_session(str(bad))
    assert "damaged or truncated" in w2.last_error
    assert bad.read_text() == saved[: len(saved) // 2]
    assert w2.doc.scene is not None
    future = json.loads(saved)
    future["schema"] = "wakemeter.session/9"
    fut = tmp_path / "future.json"
    fut.write_text(json.dumps(future))
    assert not w2.controller.open_session(str(fut))
    assert "newer" in w2.last_error
    # a field of the wrong type: one line naming it, the window keeps what it had
    wrong = json.loads(saved)
    wrong["vessels"][0]["id"] = "text"
    wr = tmp_path / "wrong.json"
    wr.write_text(json.dumps(wrong))
    assert not w2.controller.open_session(str(wr))
    assert "vessels[0].id must be a whole number" in w2.last_error and w2.doc.scene is not None
    # moved scene: the session asks where it is
    moved = json.loads(saved)
    moved["scene"]["path"] = "nowhere/scene.tif"
    moved["scene"]["absolute_path"] = "/nowhere/scene.tif"
    mv = tmp_path / "moved.json"
    mv.write_text(json.dumps(moved))
    asked = []
    assert w2.controller.open_session(str(mv), locate=lambda old, why: asked.append(why) or str(SCENE))
    assert asked and "not where" in asked[0]
    w2.close()


def test_export_from_the_program(win, qtbot, tmp_path):
    # the export once left out the vessel's name, the analyst (never asked for), a case reference and the hand
    # measurements; the form asks, and everything reaches the record and the PDF
    from pypdf import PdfReader

    from wakemeter.app.export_dialog import ExportForm
    from wakemeter.project.model import Measurement

    _analyse(win, qtbot)
    vid = next(iter(win.doc.vessels))
    pos = win.doc.vessels[vid].position
    win.doc.undo.push(
        AddItem(win.doc, Measurement(win.doc.new_id(), "ruler", (pos, (pos[0] - 150, pos[1] + 90)), vid), "ruler")
    )
    form = ExportForm(win, n_vessels=1, selected_name="Saltmarsh Wren", settings=win.settings)
    qtbot.addWidget(form)
    form.analyst.setText("R. Fenwick")
    form.case.setText("HB-2026-114")
    form.folder.setText(str(tmp_path))
    form._accept()
    c = form.choice()
    assert form.result() == ExportForm.DialogCode.Accepted and win.settings.value("export/analyst") == "R. Fenwick"
    files = win.controller.export(vid, c.folder, analyst=c.analyst, case_reference=c.case_reference)
    assert files is not None and all(p.exists() for p in files.all_files())
    rec = json.loads(files.data.read_text())
    assert rec["case"]["analyst"] == "R. Fenwick" and rec["case"]["reference"] == "HB-2026-114"
    (v,) = rec["vessels"]
    assert v["name"] == "Saltmarsh Wren"
    assert [m["kind"] for m in v["hand_measurements"]] == ["ruler"] and " m, " in v["hand_measurements"][0]["value"]
    text = " ".join(" ".join(p.extract_text() for p in PdfReader(str(files.report)).pages).split())
    assert "Saltmarsh Wren" in text and "HB-2026-114" in text and "ruler" in text
    assert win.controller.export(vid, str(tmp_path)) is None  # exists: not replaced without asking
    assert "already exists" in win.last_error


def _crashed_copy(autosave: Path) -> Path:
    """The same work as saved by a window of a process that died (process ids this large are not in use)."""
    dead = autosave.parent / "999999999-0badc0de.session.json"
    dead.write_bytes(autosave.read_bytes())
    return dead


def test_autosave_per_window_and_restore_after_a_crash(win, qtbot, tmp_path):
    # every window once wrote one shared autosave: one window's clean exit deleted another's crash
    # recovery (issue 18).  Now each window has its own, and only those of dead windows are offered.
    from wakemeter.project.session import orphaned_autosaves

    _analyse(win, qtbot)
    win.controller.autosave_now()
    mine = win.controller.autosave_file
    assert mine.exists() and orphaned_autosaves() == []  # a running window's autosave is not offered
    crashed = _crashed_copy(mine)
    other = MainWindow()  # a second window, running beside the first
    qtbot.addWidget(other)
    assert other.controller.autosave_file != mine
    w2 = MainWindow()
    qtbot.addWidget(w2)
    asked = []
    assert w2.controller.offer_restore(ask=lambda text: asked.append(text) or True)
    assert len(asked) == 1 and len(w2.doc.vessels) == 1 and not crashed.exists()
    assert w2.controller.autosave_file.exists() and w2.controller.has_unsaved_work()  # restored, not saved yet
    other.close()  # another window's clean exit touches neither the first window's nor the restored work
    assert mine.exists() and w2.controller.autosave_file.exists()
    win.controller.closing(discard=True)
    assert not mine.exists() and w2.controller.autosave_file.exists()
    assert w2.controller.save_session(str(tmp_path / "restored.json"))
    kept = w2.controller.autosave_file
    w2.close()  # saved: a clean exit removes its autosave
    assert not kept.exists()


def test_a_failing_autosave_is_said_in_the_status_line(win, qtbot, monkeypatch):
    from wakemeter.project import session as session_mod

    def full(*_a, **_k):
        raise session_mod.SessionError("cannot save the session: No space left on device")

    monkeypatch.setattr(session_mod, "save", full)
    win.controller.autosave_now()
    assert "automatic save failed" in win.message.text()


def test_report_command_accepts_a_session(win, qtbot, tmp_path):
    from wakemeter.cli import main

    _analyse(win, qtbot)
    path = tmp_path / "s.json"
    assert win.controller.save_session(str(path))
    out = tmp_path / "out"
    out.mkdir()
    assert main(["report", str(path), "--out", str(out)]) == 0
    (folder,) = out.iterdir()
    names = sorted(p.suffix for p in folder.iterdir())
    assert names == ["", ".json", ".pdf", ".png"]
    rec = json.loads(next(folder.glob("*.json")).read_text())["vessels"][0]
    vid = next(iter(win.doc.vessels))
    assert rec["name"] == "Saltmarsh Wren"
    assert rec["result"]["speed_mps"] == pytest.approx(win.doc.effective_finding(vid).speed.speed_mps, rel=1e-9)


def test_export_from_a_reopened_session_keeps_every_input(qtbot, tmp_path, monkeypatch):
    # Synthetic truth (outer_roads_radar.truth.json): 9.003 m/s, radar geometry R = 850 km, V = 7.5 km/s, look
    # bearing 100 deg, incidence 33 deg.  The radar geometry and the depth uncertainty given in the program must
    # survive a save and reopen: the evidence exported from the reopened session answers the same request and
    # gives the same numbers as the program before saving and as `wakemeter report SESSION`.
    from wakemeter.cli import main
    from wakemeter.detect.request import AnalysisRequest, RadarGeometry
    from wakemeter.physics.inversion import Uncertain

    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "config"))
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))
    radar_scene = ROOT / "sample_scenes" / "outer_roads_radar.tif"
    truth = json.loads((ROOT / "sample_scenes" / "outer_roads_radar.truth.json").read_text())["vessels"][0]
    w = MainWindow()
    qtbot.addWidget(w)
    assert w.open_path(str(radar_scene))
    pos = (truth["hull_pixel_col"] + 1, truth["hull_pixel_row"] - 1)
    w.doc.undo.push(AddItem(w.doc, Vessel(w.doc.new_id(), "Grey Heron", pos), "mark vessel"))
    vid = next(iter(w.doc.vessels))
    req = AnalysisRequest(
        vessel_px=pos,
        depth=Uncertain(60.0, 6.0),
        seed=5,
        radar_geometry=RadarGeometry(850_000.0, 7_500.0, 100.0, 33.0, slant_range_std_m=800.0),
    )
    w.doc.requests[vid] = req
    w.controller.panel.set_request(req)  # what the analyst typed in the panel
    _analyse(w, qtbot)
    before = w.doc.effective_finding(vid)
    assert before.request == req
    assert any(m.method == "radar azimuth offset" for m in before.methods)
    session = tmp_path / "radar.json"
    assert w.controller.save_session(str(session))
    w.close()

    w2 = MainWindow()
    qtbot.addWidget(w2)
    assert w2.controller.open_session(str(session))
    vid2 = next(iter(w2.doc.vessels))
    assert w2.doc.findings[vid2].plots is None  # read back: numbers, no arrays
    out = tmp_path / "program"
    out.mkdir()
    files = w2.controller.export(vid2, str(out))
    assert files is not None
    rec = json.loads(files.data.read_text())["vessels"][0]["result"]
    assert AnalysisRequest.from_json(rec["request"]) == req
    assert rec["speed_mps"] == before.speed.speed_mps and rec["speed_ci95_mps"] == [
        before.speed.ci95_low_mps,
        before.speed.ci95_high_mps,
    ]
    assert [m["name"] for m in rec["methods"]] == [m.method for m in before.methods]
    w2.close()
    headless = tmp_path / "headless"
    headless.mkdir()
    assert main(["report", str(session), "--out", str(headless)]) == 0
    rec2 = json.loads(next(headless.glob("*/*.json")).read_text())["vessels"][0]["result"]
    assert rec2["speed_mps"] == rec["speed_mps"] and rec2["request"] == rec["request"]


def test_quit_asks_before_discarding_and_keeps_the_autosave(qtbot, tmp_path, monkeypatch):
    # unsaved vessels: cancel keeps the window; closing without saving keeps the autosave for the next start;
    # discarding removes it; saved work closes without a question

    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "config"))
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))

    def window():
        w = MainWindow()
        qtbot.addWidget(w)
        w.show()
        assert w.open_path(str(SCENE))
        w.doc.undo.push(AddItem(w.doc, Vessel(w.doc.new_id(), "Saltmarsh Wren", (100.0, 100.0)), "mark vessel"))
        return w

    w = window()
    asked = []
    monkeypatch.setattr(w, "ask_unsaved", lambda: asked.append(1) or "cancel")
    assert not w.close() and w.isVisible() and asked  # cancelled: nothing closed
    monkeypatch.setattr(w, "ask_unsaved", lambda: "keep")
    kept = w.controller.autosave_file
    assert w.close()
    assert kept.exists()  # the unsaved work is still recoverable
    w = window()
    monkeypatch.setattr(w, "ask_unsaved", lambda: "discard")
    discarded = w.controller.autosave_file
    assert w.close() and not discarded.exists()
    w = window()
    assert w.controller.save_session(str(tmp_path / "saved.json"))
    monkeypatch.setattr(w, "ask_unsaved", lambda: pytest.fail("saved work must close without a question"))
    assert w.close()


def test_assume_a_vessel_from_the_panel(qtbot, tmp_path, monkeypatch):
    # open water inside the demo vessel's wave field (pixel 200, 200; harbour_approach_optical.truth.json has
    # the only vessel at 789, 373): no speed unless the analyst ticks "assume a vessel here"
    from wakemeter.detect.findings import CautionCode

    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "config"))
    w = MainWindow()
    qtbot.addWidget(w)
    w.show()
    assert w.open_path(str(SCENE))
    w.doc.undo.push(AddItem(w.doc, Vessel(w.doc.new_id(), "Nobody", (200.0, 200.0)), "mark vessel"))
    vid = next(iter(w.doc.vessels))
    _analyse(w, qtbot)
    assert not w.doc.findings[vid].wake_found and "no vessel at this point" in w.controller.panel.text.toHtml()
    w.controller.panel.assume_vessel.setChecked(True)
    _analyse(w, qtbot)
    forced = w.doc.findings[vid]
    assert forced.wake_found and forced.has_caution(CautionCode.FORCED) and forced.request.force
    w.close()


def test_real_sentinel2_crop_in_the_program(qtbot, tmp_path, monkeypatch):
    """A real Sentinel-2 crop (tests/data/sentinel2, MIT licence): the wake is found as a line and the panel
    shows the speed over ground from the hull's shift between bands, the heading and the reason why the waves
    give no speed."""
    crop = ROOT / "tests" / "data" / "sentinel2" / "marseille_00_S2L2A_2023-08-22_wake.tif"
    w = _window(qtbot, tmp_path, monkeypatch, crop, "Crop ship", (120.0, 120.0))
    _analyse(w, qtbot)
    vid = next(iter(w.doc.vessels))
    f = w.doc.effective_finding(vid)
    assert f.wake_found and f.has_caution(CautionCode.OVER_GROUND) and f.has_caution(CautionCode.LINES_ONLY)
    html = w.controller.panel.text.toHtml()
    assert "Speed over ground" in html and "Heading" in html and "no Kelvin crests are seen here" in html
    assert "over ground" in w.message.text() or "m/s" in w.message.text()
    # the Plots tab shows what the line finding rests on: the wake's direction standing out of all directions
    # from the vessel, above the significance it needs, and the brightness along the line (it was empty)
    view = w.controller.panel.view
    angles, sig = view.spec_line.getData()
    assert angles is not None and sig.max() >= 9.0 and abs(angles[int(np.argmax(sig))]) <= 2.0
    assert view.prof_line.getData()[0] is not None and "Brightness along the wake line" in str(
        view.prof_plot.getPlotItem().titleLabel.text
    )
    w.grab().save(str(tmp_path / "real_crop.png"))
    w.close()


def test_real_foam_streak_in_the_program(qtbot, tmp_path, monkeypatch):
    """A vessel and its foam seen as one streak (real Sentinel-2 crop of another port, tests/data/sentinel2): the
    panel says how it was read and the Plots tab shows the directions from its head (it was empty: the streak
    finding carried no fan)."""
    crop = ROOT / "tests" / "data" / "sentinel2" / "cartagena_02_S2L2A_2023-07-30_streak.tif"
    w = _window(qtbot, tmp_path, monkeypatch, crop, "Streak boat", (120.0, 120.0))
    _analyse(w, qtbot)
    f = w.doc.effective_finding(next(iter(w.doc.vessels)))
    assert f.wake_found and f.has_caution(CautionCode.STREAK)
    assert "bright streak" in w.controller.panel.text.toHtml()
    angles, sig = w.controller.panel.view.spec_line.getData()
    assert angles is not None and sig.max() >= DEFAULT_TUNING.streak_line_significance_min
    assert abs(angles[int(np.argmax(sig))]) <= 20.0  # the best direction runs along the streak
    w.close()


def test_speed_limit_and_current_from_the_panel(win, qtbot):
    # demo truth: 14.0 kn through the water (sample_scenes/harbour_approach_optical.truth.json); with a limit of
    # 16 kn the speed is well below it, and a 1 kn current setting against the course lowers the speed over ground
    p = win.controller.panel
    p.form.use_limit.setChecked(True)
    p.form.limit.setValue(16.0)
    p.form.use_current.setChecked(True)
    p.form.current_speed.setValue(1.0)
    p.form.current_toward.setValue((TRUTH["heading_deg"] + 180.0) % 360.0)
    p.form.current_source.setText("Hallow Sound tide table")
    _analyse(win, qtbot)
    vid = next(iter(win.doc.vessels))
    check = win.doc.effective_finding(vid).to_json()["speed_check"]
    assert check["probability_over_limit"] < 0.01
    assert check["over_ground"]["median_knots"] == pytest.approx(check["through_water"]["median_knots"] - 1.0, abs=0.05)
    html = p.text.toHtml()
    assert "is below the 16.0 kn limit" in html and "Hallow Sound tide table" in html
    plain = p.text.toPlainText()
    assert plain.index("Speed limit") < plain.index("Heading (true bearing)")  # the verdict beside the headline
    p.set_request(win.doc.requests.get(vid) or win.doc.effective_finding(vid).request)
    assert p.form.use_current.isChecked() and p.form.limit.value() == pytest.approx(16.0)


def test_position_reports_layer_comparison_and_map_layers(win, qtbot, tmp_path):
    # synthetic reports of the demo vessel (truth: 14.0 kn, heading 62°, at -35, 36 at the scene time) and of
    # a second vessel 3 km away; the program draws both, compares the first, and writes both kinds of file
    import datetime as _dt

    import pyogrio

    from wakemeter.synth.reports import straight_track, to_csv_text

    t = _dt.datetime(2026, 6, 14, 10, 32, 5, tzinfo=_dt.UTC)
    reps = straight_track("235000001", -35.0, 36.0, 62.0, 14.0, t) + straight_track(
        "235000077", -34.97, 36.01, 200.0, 8.0, t
    )
    f = tmp_path / "reports.csv"
    f.write_text(to_csv_text(reps))
    assert win.load_reports(str(f))
    marks = win.canvas.report_marks
    assert len(marks) == 2 and marks[0][2] == "235000001 14.0 kn"
    assert abs(marks[0][0] - TRUTH["pixel_col"]) < 3 and abs(marks[0][1] - TRUTH["pixel_row"]) < 3
    _analyse(win, qtbot)
    said = re.search(r"consistent: wake (\d+\.\d) kn", win.controller.panel.text.toPlainText())
    assert said is not None and float(said.group(1)) == pytest.approx(14.0, abs=0.3)  # truth 14.0 kn, within 2 %
    vid = next(iter(win.doc.vessels))
    files = win.controller.export(vid, str(tmp_path))
    rec = json.loads(files.data.read_text())
    assert rec["vessels"][0]["position_report"]["report_id"] == "235000001"
    assert [u["vessel_id"] for u in rec["unmatched_reports"]] == ["235000077"]
    gpkg = tmp_path / "layers.gpkg"
    assert win.controller.export_gis(str(gpkg))
    assert dict(pyogrio.list_layers(str(gpkg)))["vessels"] == "Point"
    # and the other way: vessel positions imported from a file become marked vessels
    pos = tmp_path / "positions.csv"
    pos.write_text("name,lon,lat\nGrey Heron,-34.999,36.001\nFar Away,10,10\n")
    assert win.controller.import_vessels(str(pos)) == 1
    assert "Grey Heron" in [v.name for v in win.doc.vessels.values()]


def test_find_vessels_then_analyse_all(qtbot, tmp_path, monkeypatch):
    # a Sentinel-2-like fleet of known truth (wakemeter.synth.fleet): every vessel is found and marked, in one
    # undo step; Analyse all then runs them in the background
    from wakemeter.synth import write
    from wakemeter.synth.fleet import fleet_spec
    from wakemeter.synth.multispectral import BANDS, MultispectralLook, render_multispectral

    tif, _ = write(
        render_multispectral(fleet_spec(3, seed=2, size=512, pixel_m=10.0), MultispectralLook()).rendered,
        tmp_path / "fleet.tif",
        band_names=BANDS,
    )
    truth = json.loads(tif.with_suffix(".truth.json").read_text())["vessels"]
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "config"))
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))
    w = MainWindow()
    qtbot.addWidget(w)
    assert w.open_path(str(tif))
    # a rectangle dragged on the image around one vessel: only that one is found
    from PySide6.QtCore import QPointF, Qt
    from PySide6.QtTest import QTest

    w.resize(1000, 800)
    w.canvas.set_zoom(1.0, QPointF(0, 0))
    w.canvas.origin = QPointF(0, 0)
    one = truth[0]
    others = [
        v for v in truth[1:] if max(abs(v["pixel_col"] - one["pixel_col"]), abs(v["pixel_row"] - one["pixel_row"])) < 40
    ]
    assert not others  # the fleet's vessels are far apart
    a = w.canvas.to_screen(QPointF(one["pixel_col"] - 30, one["pixel_row"] - 30)).toPoint()
    b = w.canvas.to_screen(QPointF(one["pixel_col"] + 30, one["pixel_row"] + 30)).toPoint()
    w.pick_find_area()
    QTest.mousePress(w.canvas, Qt.MouseButton.LeftButton, Qt.KeyboardModifier.NoModifier, a)
    QTest.mouseMove(w.canvas, (a + b) / 2)
    QTest.mouseMove(w.canvas, b)
    QTest.mouseRelease(w.canvas, Qt.MouseButton.LeftButton, Qt.KeyboardModifier.NoModifier, b)
    qtbot.waitUntil(lambda: w.job is None and len(w.doc.vessels) > 0, timeout=60_000)
    (found,) = w.doc.vessels.values()
    assert (found.position[0] - one["pixel_col"]) ** 2 + (found.position[1] - one["pixel_row"]) ** 2 < 9.0
    assert not w.canvas.picking_area  # one rectangle per pick: the next drag pans again
    w.doc.undo.undo()
    w.pick_find_area()
    w.set_tool("look")  # Esc (the look tool's key) gives the pick up
    assert not w.canvas.picking_area
    w.find_vessels(whole=True)
    qtbot.waitUntil(lambda: w.job is None, timeout=60_000)
    assert len(w.doc.vessels) == len(truth)
    for v in truth:
        assert (
            min(
                (p.position[0] - v["pixel_col"]) ** 2 + (p.position[1] - v["pixel_row"]) ** 2
                for p in w.doc.vessels.values()
            )
            < 9.0
        )
    w.doc.undo.undo()  # all of them in one step
    assert len(w.doc.vessels) == 0
    w.doc.undo.redo()
    w.controller.analyse_all()
    qtbot.waitUntil(lambda: w.job is None and not w.controller.queue, timeout=120_000)
    assert len(w.doc.findings) == len(truth)
    w.close()


def test_what_was_typed_for_a_vessel_stays_with_it_when_another_is_selected(win, qtbot):
    # a limit, a depth and a current typed for one vessel are there when it is selected again (and saved),
    # without analysing it first; the other vessel's form starts empty (program behaviour, no source)
    p = win.controller.panel
    first = next(iter(win.doc.vessels))
    win.doc.select(first)
    p.form.use_limit.setChecked(True)
    p.form.limit.setValue(10.0)
    p.form.depth_input.setValue(12.0)
    second = win.doc.new_id()
    win.doc.undo.push(AddItem(win.doc, Vessel(second, "Hollin Mere", (100.0, 100.0)), "mark vessel"))
    win.doc.select(second)
    assert p.form.limit.value() == 0.0 and not p.form.use_limit.isChecked()
    win.doc.select(first)
    assert p.form.use_limit.isChecked() and p.form.limit.value() == pytest.approx(10.0)
    assert p.form.depth_input.value() == pytest.approx(12.0)
    req = win.doc.requests[first]
    assert req.speed_limit is not None and req.depth is not None and req.depth.value == pytest.approx(12.0)
    assert second not in win.doc.requests  # nothing typed: nothing stored
    assert win.controller.has_unsaved_work()


def test_opening_another_scene_asks_about_unsaved_work_and_keeps_it(win, qtbot, monkeypatch):
    # Open scene with unsaved work: cancelled, nothing changes; answered "keep" (as offscreen, where nobody
    # can be asked), the work stays in its own autosave and is offered at the next start, and the new scene
    # gets a new autosave (program behaviour, no source)
    from wakemeter.project.session import orphaned_autosaves

    other = ROOT / "sample_scenes" / "calm_no_wake.tif"
    monkeypatch.setattr(win, "ask_unsaved", lambda: "cancel")
    assert not win.open_path(str(other))
    assert win.doc.scene.info.path.name == SCENE.name and len(win.doc.vessels) == 1
    monkeypatch.setattr(win, "ask_unsaved", lambda: "keep")
    before = win.controller.autosave_file
    assert win.open_path(str(other))
    assert win.doc.scene.info.path.name == other.name and not win.doc.vessels
    assert win.controller.autosave_file != before and before.exists()
    assert before in orphaned_autosaves()
    offered = []
    w2 = MainWindow()
    qtbot.addWidget(w2)
    w2.controller.offer_restore(ask=lambda text: offered.append(text) or False)
    assert offered and SCENE.name in offered[0] and "1 vessel(s)" in offered[0]  # says which scene, how much


def test_position_reports_of_one_scene_are_not_kept_for_the_next(win, qtbot, tmp_path, monkeypatch):
    import datetime as _dt

    from wakemeter.synth.reports import straight_track, to_csv_text

    t = _dt.datetime(2026, 6, 14, 10, 32, 5, tzinfo=_dt.UTC)
    f = tmp_path / "reports.csv"
    f.write_text(to_csv_text(straight_track("235000001", -35.0, 36.0, 62.0, 14.0, t)))
    assert win.load_reports(str(f)) and win.canvas.report_marks
    monkeypatch.setattr(win, "ask_unsaved", lambda: "discard")
    assert win.open_path(str(ROOT / "sample_scenes" / "calm_no_wake.tif"))
    assert win.canvas.report_marks == [] and win.controller.reports == []


def test_the_programs_own_launch_offers_recovery_with_a_scene_given(tmp_path, monkeypatch, qtbot):
    # `python3 tasks.py run` passes the demo scene: the offer must still come (it came only without a scene)
    from wakemeter.app import main as app_main
    from wakemeter.app.controller import Controller

    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "config"))
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))
    offered = []
    monkeypatch.setattr(Controller, "offer_restore", lambda self, ask=None: offered.append(True) or False)
    monkeypatch.setattr("PySide6.QtWidgets.QApplication.exec", lambda self: 0)
    assert app_main.run_program([str(SCENE)]) == 0
    assert offered == [True]


def test_the_list_shows_each_vessels_speed_and_verdict_and_export_skips_a_rejected_finding(win, qtbot, monkeypatch):
    # demo truth 14.0 kn (sample_scenes/harbour_approach_optical.truth.json) against a 10 kn limit: the list's
    # vessel row says the speed and "over"; once rejected, the export form neither offers nor preselects it
    # (program behaviour, no source)
    from wakemeter.app import export_dialog

    p = win.controller.panel
    p.form.use_limit.setChecked(True)
    p.form.limit.setValue(10.0)
    _analyse(win, qtbot)
    rows = [win.items.item(i).text() for i in range(win.items.count())]
    vessel_row = next(r for r in rows if r.startswith("Vessel: Saltmarsh Wren"))
    assert re.search(r"1[34]\.\d kn \(", vessel_row) and "over the 10 kn limit" in vessel_row
    vid = next(iter(win.doc.vessels))
    p.reject.setChecked(True)
    assert vid in win.doc.rejected
    assert "finding rejected" in win.items.item(0).text()
    seen = {}

    class Spy(export_dialog.ExportForm):
        def exec(self):
            seen["one_enabled"], seen["one_checked"] = self.one.isEnabled(), self.one.isChecked()
            return self.DialogCode.Rejected

    monkeypatch.setattr(export_dialog, "ExportForm", Spy)
    win.export_dialog()
    assert seen == {} or (not seen["one_enabled"] and not seen["one_checked"])
    assert seen == {} and "nothing to export" in win.message.text()  # the only finding is rejected


def test_export_form_does_not_preselect_a_rejected_finding_when_others_remain(win, qtbot, monkeypatch):
    from wakemeter.app import export_dialog

    _analyse(win, qtbot)
    first = next(iter(win.doc.vessels))
    second = win.doc.new_id()
    win.doc.undo.push(AddItem(win.doc, Vessel(second, "Hollin Mere", (TRUTH["pixel_col"], TRUTH["pixel_row"])), "mark"))
    win.doc.select(second)
    _analyse(win, qtbot)
    win.doc.select(first)
    win.controller.panel.reject.setChecked(True)
    seen = {}

    class Spy(export_dialog.ExportForm):
        def exec(self):
            seen.update(one=(self.one.isEnabled(), self.one.isChecked()), every=self.every.isChecked())
            return self.DialogCode.Rejected

    monkeypatch.setattr(export_dialog, "ExportForm", Spy)
    win.export_dialog()
    assert seen == {"one": (False, False), "every": True}


def test_the_window_and_the_command_agree_on_a_plain_image_with_the_same_click(
    qtbot, tmp_path, monkeypatch, capsys, plain_demo_scene
):
    # the demo scene without its georeference, 2 m pixels: the window (Calibrate with two points 200 m apart)
    # and `analyze --pixel-size 2` give the same speed and interval for the same click; what differs between
    # clicks (whether the transverse crests are seen) each result says (program behaviour, no source)
    from wakemeter.cli import main

    plain = plain_demo_scene
    px = (788.0, 371.0)
    assert (
        main(["analyze", str(plain), "--vessel-px", "788,371", "--pixel-size", "2", "--north-up", "0", "--json"]) == 0
    )
    cli = json.loads(capsys.readouterr().out)
    w = _window(qtbot, tmp_path, monkeypatch, plain, "Saltmarsh Wren", px)
    assert w.calibrate_two_points((0.0, 0.0), (0.0, 100.0), 200.0, north_up_deg=0.0)
    w.doc.select(next(iter(w.doc.vessels)))
    _analyse(w, qtbot)
    a = w.doc.effective_finding(next(iter(w.doc.vessels)))
    got = (a.speed.speed_mps, a.speed.ci95_low_mps, a.speed.ci95_high_mps)
    assert got == pytest.approx((cli["speed_mps"], *cli["speed_ci95_mps"]), rel=1e-4)
    w.close()


def test_the_vessel_table_lists_every_vessel_sorts_and_selects(win, qtbot):
    # after Analyse all, one row per vessel with the batch table's columns (the demo launch: 14.0 kn, truth in
    # sample_scenes/harbour_approach_optical.truth.json); sorting by speed puts the analysed one first; a
    # click on a row selects that vessel (program behaviour, no source)
    from PySide6.QtCore import Qt as _Qt

    p = win.controller.panel
    p.form.use_limit.setChecked(True)
    p.form.limit.setValue(10.0)
    second = win.doc.new_id()
    win.doc.undo.push(AddItem(win.doc, Vessel(second, "Hollin Mere", (100.0, 900.0)), "mark vessel"))
    win.analyse_all()
    qtbot.waitUntil(lambda: win.job is None and not win.controller.queue, timeout=120_000)
    qtbot.wait(50)
    t = win.vessel_table
    assert win.table_dock.isVisible() and t.rowCount() == 2
    t.sortItems(1, _Qt.SortOrder.DescendingOrder)
    top = {t.horizontalHeaderItem(j).text(): t.item(0, j).text() for j in range(t.columnCount())}
    assert top["Vessel"] == "Saltmarsh Wren" and 13.0 < float(top["Speed (kn)"]) < 15.0
    assert top["Limit (kn)"] == "10.0" and float(top["P(over limit)"]) > 0.99
    t.selectRow(1)
    assert win.doc.selected == second


def test_a_limit_set_once_applies_to_every_vessel_without_its_own(win, qtbot, tmp_path):
    # Vessels > Limit and current of this vessel for every vessel: Analyse all judges both vessels against the
    # 10 kn limit; a vessel with its own limit keeps it; the session keeps the scene's limit (program behaviour)
    from wakemeter.project import session as session_mod

    p = win.controller.panel
    first = next(iter(win.doc.vessels))
    win.doc.select(first)
    p.form.use_limit.setChecked(True)
    p.form.limit.setValue(10.0)
    win.limit_for_every_vessel()
    p.form.use_limit.setChecked(False)  # the first vessel's own form: no limit of its own
    second = win.doc.new_id()
    win.doc.undo.push(AddItem(win.doc, Vessel(second, "Hollin Mere", (100.0, 900.0)), "mark vessel"))
    third = win.doc.new_id()
    win.doc.undo.push(AddItem(win.doc, Vessel(third, "Tern", (200.0, 900.0)), "mark vessel"))
    win.doc.select(third)
    p.form.use_limit.setChecked(True)
    p.form.limit.setValue(6.0)
    win.doc.select(second)
    for vid, kn in ((first, 10.0), (second, 10.0), (third, 6.0)):
        assert win.doc.project.request_for(vid).speed_limit.limit_mps == pytest.approx(kn * 0.514444, rel=1e-5)
    win.analyse_all()
    qtbot.waitUntil(lambda: win.job is None and not win.controller.queue, timeout=120_000)
    a = win.doc.effective_finding(first)
    assert a.speed_check() is not None and a.speed_check().judged.probability_over > 0.99  # 14 kn against 10
    assert win.controller.save_session(str(tmp_path / "s.json"))
    data = json.loads((tmp_path / "s.json").read_text())
    assert data["scene_check"]["speed_limit"]["limit_mps"] == pytest.approx(10 * 0.514444, rel=1e-5)
    loaded = session_mod.load(tmp_path / "s.json")
    assert loaded["scene_check"] == data["scene_check"]
    assert win.controller.open_session(str(tmp_path / "s.json"))
    assert win.doc.project.scene_limit is not None and win.doc.project.scene_limit.limit_mps == pytest.approx(
        10 * 0.514444, rel=1e-5
    )
