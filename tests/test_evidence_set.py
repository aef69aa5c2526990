"""The evidence as one set, and data safety around it: a kill at any step leaves the old set or the new one
(never a mix) and the next run tidies up; two exports of one name never both succeed; a report may hold
several vessels; a session whose scene changed is refused; the umask is read once.

Kills are real (``os._exit`` in a forked child at a named step, no clean-up runs), injected at each step
rather than timed.  Check values: the demo scenes' synthetic truth files, and hashlib for SHA256SUMS (the
format of GNU coreutils' ``sha256sum``)."""

import hashlib
import json
import multiprocessing as mp
import os
import shutil
from pathlib import Path

import pytest
from pypdf import PdfReader

from wakemeter import fileio
from wakemeter.cli import main
from wakemeter.detect.analysis import AnalysisRequest, analyze
from wakemeter.errors import ParameterError, SceneWriteError
from wakemeter.evidence.export import CaseDetails, VesselEvidence, export_evidence, export_evidence_set
from wakemeter.evidence.from_session import report_from_session
from wakemeter.evidence.record import validate
from wakemeter.project import Project
from wakemeter.project import session as session_mod
from wakemeter.project.model import Measurement, Vessel
from wakemeter.scene.raster import open_scene

ROOT = Path(__file__).resolve().parents[1]
CALM = ROOT / "sample_scenes" / "calm_no_wake.tif"
CHANNEL = ROOT / "sample_scenes" / "channel_two_vessels.tif"
EXPORT_STEPS = ["folder", "image calm.png", "report", "data", "checksums", "published"]
REPLACE_STEPS = EXPORT_STEPS[:-1] + ["old set moved aside", "new set in place", "published"]
FORK = mp.get_context("fork")


def _verify(folder: Path) -> bool:
    """A complete set: SHA256SUMS names every other file and every digest matches."""
    listed = {}
    for line in (folder / "SHA256SUMS").read_text().splitlines():
        digest, name = line.split("  ", 1)
        listed[name] = digest
    names = {p.name for p in folder.iterdir()} - {"SHA256SUMS"}
    return names == set(listed) and all(
        hashlib.sha256((folder / n).read_bytes()).hexdigest() == d for n, d in listed.items()
    )


_CALM_FINDING = []  # analysed once in the parent; forked children inherit it


def _calm_finding():
    if not _CALM_FINDING:
        with open_scene(CALM) as sc:
            _CALM_FINDING.append(analyze(sc, AnalysisRequest(vessel_px=(384, 384))))
    return _CALM_FINDING[0]


def _export_calm(out: Path, force: bool, analyst: str) -> None:
    a = _calm_finding()
    with open_scene(CALM) as sc:
        export_evidence(sc, a, out, basename="calm", analyst=analyst, force=force)


def _child(out: str, force: bool, analyst: str, kill_at: str) -> None:
    def hook(name: str) -> None:
        if name == kill_at:
            os._exit(9)  # as kill -9: no finally, no clean-up

    fileio.step_hook = hook
    _export_calm(Path(out), force, analyst)
    os._exit(0)


def _run_child(out: Path, force: bool, analyst: str, kill_at: str) -> int:
    _calm_finding()
    p = FORK.Process(target=_child, args=(str(out), force, analyst, kill_at))
    p.start()
    p.join(120)
    return p.exitcode


def _visible(out: Path) -> list[str]:
    return sorted(p.name for p in out.iterdir() if not p.name.startswith("."))


def _hidden(out: Path) -> list[str]:
    return sorted(p.name for p in out.iterdir() if p.name.startswith("."))


def _analyst(out: Path) -> str:
    return json.loads((out / "calm" / "calm.json").read_text())["case"]["analyst"]


@pytest.mark.parametrize("kill_at", EXPORT_STEPS)
def test_a_first_export_killed_at_any_step_leaves_nothing_or_the_whole_set(tmp_path, kill_at):
    out = tmp_path / "out"
    out.mkdir()
    assert _run_child(out, False, "new", kill_at) == 9
    visible = _visible(out)
    assert visible in ([], ["calm"]) and (not visible or _verify(out / "calm")), visible
    # the next export tidies the dead writer's temporary folder and (if the set is not there yet) makes it
    if visible:
        with pytest.raises(SceneWriteError, match="already exists"):
            _export_calm(out, False, "new")
    else:
        _export_calm(out, False, "new")
    assert _verify(out / "calm") and _hidden(out) == []


@pytest.mark.parametrize("kill_at", REPLACE_STEPS)
def test_a_replacing_export_killed_at_any_step_leaves_old_or_new_never_a_mix(tmp_path, kill_at):
    out = tmp_path / "out"
    out.mkdir()
    _export_calm(out, False, "old")
    assert _run_child(out, True, "new", kill_at) == 9
    if _visible(out) == ["calm"]:
        assert _verify(out / "calm") and _analyst(out) in ("old", "new")
        seen = _analyst(out)
    else:  # killed between moving the old set aside and renaming the new one in: the old set is hidden
        assert kill_at == "old set moved aside"
        seen = None
    fileio.clean_stale(out)  # what the next run does first
    assert _visible(out) == ["calm"] and _verify(out / "calm") and _hidden(out) == []
    assert _analyst(out) == (seen or "old")
    expected_new = REPLACE_STEPS.index(kill_at) >= REPLACE_STEPS.index("new set in place")
    assert _analyst(out) == ("new" if expected_new else "old")


def test_two_exports_of_one_name_never_both_succeed(tmp_path):
    # both writers finish their files, wait for each other, then publish at once: one wins, one is told
    out = tmp_path / "out"
    out.mkdir()
    barrier = FORK.Barrier(2)
    _calm_finding()

    def writer(name: str) -> None:
        fileio.step_hook = lambda step: barrier.wait(30) if step == "checksums" else None
        try:
            _export_calm(out, False, name)
            said = "ok"
        except SceneWriteError as err:
            said = str(err)
        (tmp_path / f"{name}.said").write_text(said)
        os._exit(0)

    procs = [FORK.Process(target=writer, args=(n,)) for n in ("first", "second")]
    for p in procs:
        p.start()
    for p in procs:
        p.join(120)
    got = {n: (tmp_path / f"{n}.said").read_text() for n in ("first", "second")}
    assert sorted(v == "ok" for v in got.values()) == [False, True], got
    loser = next(k for k, v in got.items() if v != "ok")
    assert "already exists" in got[loser]
    assert _verify(out / "calm") and _analyst(out) != loser and _hidden(out) == []


def test_several_vessels_in_one_report(tmp_path):
    # sample_scenes/channel_two_vessels.truth.json: Merrow Pilot 2 at 4.63 m/s, Brackenfield at 8.23 m/s
    truth = json.loads(CHANNEL.with_suffix(".truth.json").read_text())["vessels"]
    with open_scene(CHANNEL) as sc:
        vessels = [
            VesselEvidence(
                analyze(sc, AnalysisRequest(vessel_px=(t["pixel_col"], t["pixel_row"]))),
                t["name"],
                (
                    {
                        "kind": "ruler",
                        "value": "120.0 ± 2.0 m, 45.0°",
                        "points_px": [[0, 0], [1, 1]],
                        "placement_px": 1.0,
                    },
                ),
            )
            for t in truth
        ]
        files = export_evidence_set(
            sc, vessels, tmp_path, case=CaseDetails("R. Fenwick", "CH-7"), exported_at="2026-06-20T09:00:00+00:00"
        )
    record = json.loads(files.data.read_text())
    validate(record)
    assert files.folder.name == "channel_two_vessels_2_vessels" and _verify(files.folder)
    assert [v["name"] for v in record["vessels"]] == [t["name"] for t in truth]
    assert len(files.images) == 2 and all(p.exists() for p in files.images)
    for v, t in zip(record["vessels"], truth, strict=True):
        lo, hi = v["result"]["speed_ci95_mps"]
        assert lo <= t["speed_mps"] <= hi, (v["name"], lo, hi, t["speed_mps"])
        assert v["hand_measurements"][0]["kind"] == "ruler"
    text = " ".join(" ".join(p.extract_text() for p in PdfReader(str(files.report)).pages).split())
    assert "Vessels in this report 2" in text and "Vessel 2 of 2: Brackenfield" in text and "CH-7" in text
    with pytest.raises(ParameterError, match="at least one vessel"):
        export_evidence_set(sc, [], tmp_path)


def _channel_session(folder: Path, scene: Path) -> Path:
    truth = json.loads(CHANNEL.with_suffix(".truth.json").read_text())["vessels"]
    with open_scene(scene) as sc:
        p = Project()
        p.scene = sc
        for i, t in enumerate(truth):
            pos = (t["pixel_col"], t["pixel_row"])
            p.put(Vessel(10 * i + 1, t["name"], pos))
            p.put(Measurement(10 * i + 2, "track", (pos, (pos[0] - 150.0, pos[1] + 80.0)), 10 * i + 1))
        return session_mod.save(folder / "channel.json", session_mod.to_session(p))


def test_a_session_report_holds_every_vessel_and_refuses_a_changed_scene(tmp_path, capsys):
    scene = tmp_path / "channel.tif"
    shutil.copy(CHANNEL, scene)
    session = _channel_session(tmp_path, scene)
    out = tmp_path / "out"
    out.mkdir()
    assert main(["report", str(session), "--out", str(out), "--case", "CH-7", "--analyst", "R. Fenwick"]) == 0
    (folder,) = out.iterdir()
    rec = json.loads((folder / f"{folder.name}.json").read_text())
    assert [v["name"] for v in rec["vessels"]] == ["Merrow Pilot 2", "Brackenfield"]
    assert all(v["hand_measurements"][0]["kind"] == "track" for v in rec["vessels"])
    # the scene changes under the session (one byte): `report` once exited 0 without a word
    data = bytearray(scene.read_bytes())
    data[-1] ^= 0xFF
    scene.write_bytes(bytes(data))
    with pytest.raises(ParameterError, match="has changed since the session was saved"):
        report_from_session(session, tmp_path)
    capsys.readouterr()
    assert main(["report", str(session), "--out", str(out), "--name", "again"]) == 2
    assert "has changed since the session was saved" in capsys.readouterr().err


@pytest.mark.parametrize("kill_at", ["file written", "file in place"])
def test_a_session_save_killed_leaves_the_old_or_new_file_and_no_leftover(tmp_path, kill_at):
    target = tmp_path / "work.json"
    session_mod.save(target, {"scene": {}, "vessels": []})
    old = target.read_bytes()

    def child() -> None:
        fileio.step_hook = lambda name: os._exit(9) if name == kill_at else None
        session_mod.save(target, {"scene": {}, "vessels": [], "note": "new"})
        os._exit(0)

    p = FORK.Process(target=child)
    p.start()
    p.join(60)
    assert p.exitcode == 9
    now = target.read_bytes()
    assert now == old or b'"note": "new"' in now
    session_mod.save(tmp_path / "other.json", {"scene": {}, "vessels": []})  # the next save in that folder
    assert sorted(p.name for p in tmp_path.iterdir()) == ["other.json", "work.json"]


def test_a_live_writers_temporary_files_are_left_alone(tmp_path):
    mine = fileio.temp_name(tmp_path / "set")
    mine.mkdir()
    assert fileio.clean_stale(tmp_path) == [] and mine.exists()  # this process is alive
    dead = tmp_path / ".set.wmtmp-999999999-0123abcd"  # no such process
    dead.mkdir()
    assert fileio.clean_stale(tmp_path) == [f"removed {dead.name}"] and mine.exists()


def test_umask_is_read_once_and_not_by_setting_it():
    # os.umask(0) to read the mask let another thread create a file with mode 0666 (issue 18)
    mask = os.umask(0o022)
    os.umask(mask)
    assert fileio.UMASK == mask and fileio.FILE_MODE == 0o666 & ~mask


def test_the_report_puts_the_verdict_first_and_says_who_on_every_page(tmp_path, capsys):
    # the limit's verdict sits beside the speed (before the heading) in the PDF and the CLI text; every page's
    # foot names the analyst and "page N of M"; a report without an analyst says so on its first page; the
    # picture's colours have a legend (program behaviour, no source)
    scene = "sample_scenes/harbour_approach_optical.tif"
    for analyst in ("R. Quill", None):
        out = tmp_path / f"out_{analyst is None}"
        out.mkdir()
        argv = ["report", scene, "--vessel", "-35,36", "--speed-limit", "10", "--out", str(out)]
        assert main(argv + (["--analyst", analyst] if analyst else [])) == 0
        (pdf,) = out.glob("*/*.pdf")
        pages = [" ".join(p.extract_text().split()) for p in PdfReader(str(pdf)).pages]
        n = len(pages)
        for i, text in enumerate(pages, 1):
            assert f"page {i} of {n}" in text
            assert (analyst or "no analyst named") in text
        first = pages[0]
        assert first.index("Speed limit") < first.index("Heading (true bearing)")
        assert ("Unattributed" in first) == (analyst is None)
        assert any("Colours:" in t and "wake arms found" in t for t in pages)
    capsys.readouterr()
    assert main(["analyze", scene, "--vessel", "-35,36", "--speed-limit", "10"]) == 0
    text = capsys.readouterr().out
    assert text.index("Speed limit") < text.index("Heading (true bearing)")
