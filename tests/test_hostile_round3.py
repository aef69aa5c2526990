"""Hostile input, round 3: the surfaces added after the rasters (position reports, vessel lists, names,
scheduler addresses, numeric options, session scene checks).  Each case: exit status 0 or 2, one line on
stderr when refused, no traceback, nothing half-written.

Sources: the NMEA 0183 checksum is the XOR of the characters between '!' or '$' and '*', written as two hex
digits (NMEA 0183 standard, sec. 5.3; from memory); the rest is the program's own contract for bad input
(DEVELOPERS.md), no external source.
"""

from __future__ import annotations

import functools
import json
import operator
import shutil

import numpy as np
import pytest
import rasterio
from rasterio.transform import from_origin
from test_hostile_input import SCENE, _run, _session

from wakemeter.errors import SceneReadError
from wakemeter.evidence.gis import read_vessel_positions
from wakemeter.names import MAX_NAME_CHARS, clean_name
from wakemeter.positions.reports import read_reports

#: one AIS position report (type 1), payload from the pyais documentation examples
PAYLOAD = "!AIVDM,1,1,,A,15M67FC000G?ufbE`FepT@3n00Sa,0"


def _sentence(payload: str = PAYLOAD, checksum: str | None = None) -> str:
    body = payload[1:]
    good = f"{functools.reduce(operator.xor, (ord(c) for c in body), 0):02X}"
    return f"{payload}*{checksum or good}"


def _refused(argv: list[str]) -> str:
    rc, lines = _run(argv)
    assert rc == 2 and len(lines) == 1, (argv, rc, lines)
    return lines[0]


def test_a_complex_valued_radar_file_is_refused_in_one_line(tmp_path):
    p = tmp_path / "slc.tif"
    prof = dict(driver="GTiff", width=64, height=64, count=1, dtype="complex_int16", crs="EPSG:32633")
    with rasterio.open(p, "w", transform=from_origin(500_000, 6e6, 10, 10), **prof) as d:
        d.write(np.ones((1, 64, 64), np.complex64))
    for cmd in (["info", str(p)], ["analyze", str(p), "--vessel-px", "30,30"]):
        assert "complex" in _refused(cmd)


def test_sentences_with_a_wrong_checksum_are_not_evidence(tmp_path):
    good = f"\\c:1767225600*00\\{_sentence()}"
    bad = f"\\c:1767225660*00\\{_sentence(checksum='00')}"
    only_bad = tmp_path / "only_bad.nmea"
    only_bad.write_text(bad + "\n" + bad + "\n")
    with pytest.raises(SceneReadError, match="2 with a wrong checksum"):
        read_reports(only_bad)
    mixed = tmp_path / "mixed.nmea"
    mixed.write_text(good + "\n" + bad + "\n")
    reports = read_reports(mixed)
    assert len(reports) == 1 and reports.dropped == {"wrong checksum": 1}
    assert "1 sentence(s) with a wrong checksum" in reports.dropped_text()


def test_a_tag_block_time_out_of_range_is_left_out(tmp_path):
    p = tmp_path / "far.nmea"
    p.write_text(f"\\c:100000000000000000000*00\\{_sentence()}\n")
    with pytest.raises(SceneReadError, match="time out of range"):
        read_reports(p)
    assert "time out of range" in _refused(
        ["analyze", str(SCENE), "--vessel", "-35,36", "--reports", str(p), "--scene-time", "2026-01-01T00:00:00Z"]
    )


@pytest.mark.parametrize(
    "raw, expected",
    [
        ("Wren\nof Saltmarsh", "Wren of Saltmarsh"),
        ("tab\there\x1b[31m red", "tab here [31m red"),
        ("right\u202eto left", "right to left"),
        ("  spaced   out  ", "spaced out"),
        (None, ""),
    ],
)
def test_names_are_one_printable_line(raw, expected):
    assert clean_name(raw) == expected


def test_names_are_bounded_even_when_huge():
    name = clean_name("V" * 10_000_000)
    assert len(name) == MAX_NAME_CHARS and name.endswith("\N{HORIZONTAL ELLIPSIS}")


def test_a_session_with_a_multiline_and_a_huge_vessel_name_gives_a_report(tmp_path):
    folder = tmp_path / "in"
    folder.mkdir()
    session = _session(folder)
    data = json.loads(session.read_text())
    for name in ("Wren\nof\rSaltmarsh\x00", "W" * 10_000_000):
        data["vessels"][0]["name"] = name
        session.write_text(json.dumps(data))
        out = tmp_path / f"out_{len(name)}"
        out.mkdir()
        rc, lines = _run(["report", str(session), "--out", str(out), "--analyst", "A.\nNother"])
        assert rc == 0, lines
        (set_dir,) = out.iterdir()
        record = json.loads(next(p for p in set_dir.iterdir() if p.suffix == ".json").read_text())
        kept = record["vessels"][0]["name"]
        assert kept == clean_name(name) and "\n" not in kept and len(kept) <= MAX_NAME_CHARS
        assert record["case"]["analyst"] == "A. Nother"


def test_vessel_lists_that_cannot_be_read_say_so(tmp_path):
    latin = tmp_path / "latin.csv"
    latin.write_bytes("name,lon,lat\nSkárholm,-35.0,36.0\n".encode("latin-1"))
    with pytest.raises(SceneReadError, match="not UTF-8"):
        read_vessel_positions(latin)
    wide = tmp_path / "wide.csv"
    wide.write_text("name,lon,lat\n" + "x" * 2_000_000 + ",-35.0,36.0\n")
    with pytest.raises(SceneReadError, match="not a readable CSV"):
        read_vessel_positions(wide)
    nan = tmp_path / "nan.geojson"
    nan.write_text(
        '{"type": "FeatureCollection", "features": [{"type": "Feature", "properties": {"name": "a"}, '
        '"geometry": {"type": "Point", "coordinates": [NaN, NaN]}}]}'
    )
    with pytest.raises(SceneReadError, match="not a place on the Earth"):
        read_vessel_positions(nan)


def test_absurd_numbers_and_names_on_the_command_line(tmp_path):
    import cv2

    with rasterio.open(SCENE) as s:
        cv2.imwrite(str(tmp_path / "plain.png"), s.read(1))
    assert "--pixel-size" in _refused(
        ["analyze", str(tmp_path / "plain.png"), "--vessel-px", "9,9", "--pixel-size", "1e-300"]
    )
    long_out = tmp_path / ("x" * 300 + ".gpkg")
    assert "too long" in _refused(["export", str(SCENE), "--vessel", "-35,36", "--out", str(long_out)])
    assert not list(tmp_path.glob(".*"))


def test_a_scheduler_that_is_not_there_is_said_in_one_line(tmp_path):
    out = tmp_path / "batch"
    assert "not a scheduler address" in _refused(
        ["batch", str(SCENE), "--find", "--out", str(out), "--scheduler", "not a url"]
    )
    assert "no scheduler answers at tcp://127.0.0.1:1" in _refused(
        ["batch", str(SCENE), "--find", "--out", str(out), "--scheduler", "tcp://127.0.0.1:1"]
    )
    assert not out.exists()  # nothing made for a run that never started


def test_a_session_without_its_scene_check_is_not_reported(tmp_path):
    folder = tmp_path / "in"
    folder.mkdir()
    session = _session(folder)
    data = json.loads(session.read_text())
    for sha in (None, "missing"):
        d = json.loads(json.dumps(data))
        if sha is None:
            d["scene"]["sha256"] = None
        else:
            d["scene"].pop("sha256")
        session.write_text(json.dumps(d))
        out = tmp_path / f"out_{sha}"
        out.mkdir()
        assert "SHA-256" in _refused(["report", str(session), "--out", str(out)])
        assert list(out.iterdir()) == []


def test_a_session_with_no_scene_path_does_not_take_its_own_folder(tmp_path):
    from wakemeter.project import session as session_mod

    folder = tmp_path / "in"
    folder.mkdir()
    session = _session(folder)
    data = json.loads(session.read_text())
    data["scene"]["path"] = None
    data["scene"]["absolute_path"] = str(tmp_path / "gone.tif")
    session.write_text(json.dumps(data))
    loaded = session_mod.load(session)
    assert loaded["scene"]["resolved_path"] == str(tmp_path / "gone.tif")
    assert "not found" in _refused(["report", str(session), "--out", str(tmp_path)])
    shutil.rmtree(folder)


def test_a_listed_vessel_outside_the_scene_is_recorded_and_passed_over_by_export_and_batch(tmp_path):
    # the same rule in both commands: the vessel outside is named on stderr, the others are analysed
    import contextlib
    import io

    from wakemeter.batch.run import plan
    from wakemeter.cli import main
    from wakemeter.detect.request import AnalysisRequest

    listed = tmp_path / "vessels.csv"
    listed.write_text("name,lon,lat\nKestrel Bay,-35.0,36.0\nFar Away,10.0,10.0\n")
    err = io.StringIO()
    out = tmp_path / "layers.gpkg"
    with contextlib.redirect_stderr(err), contextlib.redirect_stdout(io.StringIO()):
        rc = main(["export", str(SCENE), "--vessels", str(listed), "--out", str(out)])
    assert rc == 0 and out.exists()
    assert "not used: vessel Far Away" in err.getvalue()
    tasks, unreadable, outside = plan([str(SCENE)], AnalysisRequest(vessel_px=(0.0, 0.0)), vessels_file=str(listed))
    assert [t.vessel_name for t in tasks] == ["Kestrel Bay"] and unreadable == []
    assert [n for n, _why in outside] == ["vessel Far Away"]


def _dead_pid() -> int:
    """A process id no process has: larger than Linux's largest (2^22). A just-ended process's id would do
    only until the system hands it to a new thread, which can be at once."""
    return 999_999_999


def test_a_refused_report_still_tidies_a_killed_writers_leftovers(tmp_path):
    # a report killed after publishing its new set but before removing the old one leaves the old set hidden
    # beside it; a later run that refuses to replace the set (no --force) removes it all the same
    out = tmp_path / "out"
    out.mkdir()
    argv = ["report", str(SCENE), "--vessel", "-35,36", "--out", str(out), "--name", "case_set"]
    assert _run(argv)[0] == 0
    leftover = out / f".case_set.wmtmp-{_dead_pid()}-0123abcd.replaced"
    shutil.copytree(out / "case_set", leftover)
    assert "already exists" in _refused(argv)
    assert not leftover.exists() and (out / "case_set").is_dir()


def test_reading_a_session_tidies_a_killed_saves_temporary(tmp_path):
    from wakemeter.project import session as session_mod

    folder = tmp_path / "in"
    folder.mkdir()
    session = _session(folder)
    leftover = folder / f".{session.name}.wmtmp-{_dead_pid()}-0123abcd"
    leftover.write_bytes(b"{" * 1000)
    session_mod.load(session)
    assert not leftover.exists()


def test_a_session_with_too_many_measurements_is_refused_quickly(tmp_path):
    from wakemeter.project import session as session_mod

    folder = tmp_path / "in"
    folder.mkdir()
    session = _session(folder)
    data = json.loads(session.read_text())
    m = data["measurements"][0]
    data["measurements"] = [dict(m, id=100 + i) for i in range(session_mod.MAX_MEASUREMENTS + 1)]
    session.write_text(json.dumps(data))
    with pytest.raises(session_mod.SessionError, match="more than a session holds"):
        session_mod.load(session)


def test_a_scene_file_named_over_two_lines_gives_a_report(tmp_path):
    # file names may hold a new line; the picture draws one line, the record keeps the exact name
    scene = tmp_path / "pass\nnight.tif"
    shutil.copy(SCENE, scene)
    out = tmp_path / "out"
    out.mkdir()
    rc, lines = _run(["report", str(scene), "--vessel", "-35,36", "--out", str(out)])
    assert rc == 0, lines
    (set_dir,) = out.iterdir()
    record = json.loads(next(p for p in set_dir.iterdir() if p.suffix == ".json").read_text())
    assert record["provenance"]["scene_file"] == "pass\nnight.tif"
