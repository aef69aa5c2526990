"""The batch on a dask.distributed LocalCluster: results identical to single analyses, resume, a failing
vessel or scene recorded while the rest finish, and the results table read back (csv, pyogrio).
Check values: single runs of the same analysis (self-consistency) and the demo scenes' truth files."""

import csv
import json
import re
import shutil
from dataclasses import replace
from pathlib import Path

import pyogrio
import pytest

from wakemeter.batch.run import _client, plan, run, table
from wakemeter.cli import main
from wakemeter.detect.analysis import analyze
from wakemeter.detect.request import AnalysisRequest
from wakemeter.scene.raster import open_scene

ROOT = Path(__file__).resolve().parents[1]
SCENES = ["harbour_approach_optical", "channel_two_vessels", "tallow_shoal_shallow"]


@pytest.fixture(scope="module")
def setup(tmp_path_factory):
    d = tmp_path_factory.mktemp("batch")
    rows = ["name,lon,lat"]
    for name in SCENES:
        shutil.copy(ROOT / "sample_scenes" / f"{name}.tif", d / f"{name}.tif")
        for v in json.loads((ROOT / "sample_scenes" / f"{name}.truth.json").read_text())["vessels"]:
            rows.append(f"{v['name']},{v['lon']},{v['lat']}")
    (d / "vessels.csv").write_text("\n".join(rows) + "\n")
    (d / "broken.tif").write_bytes(b"II*\0 not a raster")
    client, cluster = _client(None, 2)
    yield d, client
    client.close()
    cluster.close()


def test_batch_matches_single_runs_and_resumes(setup):
    d, client = setup
    scenes = [str(d / f"{n}.tif") for n in SCENES] + [str(d / "broken.tif")]
    base = AnalysisRequest(vessel_lonlat=(0.0, 0.0))
    tasks, unreadable, _outside = plan(scenes, base, vessels_file=str(d / "vessels.csv"), client=client)
    assert len(tasks) == 4 and [n for n, _ in unreadable] == ["broken.tif"]
    out = d / "out"
    first = run(tasks, out, client=client)
    assert (first.done, first.skipped, first.failed) == (4, 0, 0)
    again = run(tasks, out, client=client)  # resumable: everything is done already
    assert (again.done, again.skipped) == (0, 4)
    files = table(tasks, out)
    got = {r["vessel"]: r for r in csv.DictReader(open(files.csv))}
    for t in tasks:  # identical to a single analysis of the same vessel
        with open_scene(t.scene_path) as sc:
            single = analyze(sc, AnalysisRequest.from_json(t.request)).to_json()
        rec = json.loads((out / "results" / f"{t.key}.json").read_text())
        assert (
            rec["result"]["speed_mps"] == single["speed_mps"] and rec["result"]["heading_deg"] == single["heading_deg"]
        )
        assert float(got[t.vessel_name]["speed_kn"]) == pytest.approx(single["speed_knots"], rel=1e-5)
    meta, _f, geoms, _fields = pyogrio.raw.read(str(files.gpkg))
    assert len(geoms) == 4 and "4326" in meta["crs"]


def test_a_failing_vessel_is_recorded_and_the_others_finish(setup):
    d, client = setup
    scene = d / "changing.tif"
    shutil.copy(d / "channel_two_vessels.tif", scene)
    base = AnalysisRequest(vessel_lonlat=(0.0, 0.0))
    tasks, _, _ = plan([str(scene), str(d / "harbour_approach_optical.tif")], base, vessels_file=str(d / "vessels.csv"))
    scene.write_bytes(scene.read_bytes() + b"\0")  # the scene changes after planning: its vessels must fail
    s = run(tasks, d / "out2", client=client)
    assert (s.done, s.failed) == (1, 2)
    assert all("changed after the batch was planned" in r for _v, r in s.failures)
    # a vessel's own analysis failure (a request the analysis refuses) is recorded the same way
    bad = replace(tasks[-1], request={**tasks[-1].request, "depth": {"value_m": 1e9, "std_m": 0}})
    s2 = run([bad], d / "out3", client=client)
    assert s2.failed == 1 and "water depth" in s2.failures[0][1]


def test_batch_command(setup, capsys):
    d, _client_ = setup
    out = d / "cli"
    argv = ["batch", str(d / "harbour_approach_optical.tif"), "--vessels", str(d / "vessels.csv"), "--out", str(out)]
    assert main([*argv, "--workers", "1"]) == 0
    said = capsys.readouterr().out
    assert "1 analysed" in said and (out / "results.csv").exists()
    with pytest.raises(SystemExit):  # the vessels come from --vessels or --find: argparse does not know --vessel
        main([*argv, "--vessel", "-35,36"])
    assert "unrecognized arguments: --vessel" in capsys.readouterr().err


def test_batch_table_compares_with_position_reports(setup, capsys):
    # the demo's invented reports (sample_scenes/channel_two_vessels_reports.csv): the pilot boat reports its
    # true 9.0 kn, the coaster reports 10.0 kn while its wake says 16.0 kn
    d, _c = setup
    out = d / "with_reports"
    argv = ["batch", str(d / "channel_two_vessels.tif"), "--vessels", str(d / "vessels.csv"), "--out", str(out)]
    argv += ["--reports", str(ROOT / "sample_scenes" / "channel_two_vessels_reports.csv"), "--workers", "1"]
    assert main(argv) == 0
    got = {r["vessel"]: r for r in csv.DictReader(open(out / "results.csv"))}
    assert got["Merrow Pilot 2"]["report_verdict"] == "consistent" and got["Merrow Pilot 2"]["report_id"] == "990000101"
    assert got["Brackenfield"]["report_verdict"] == "inconsistent"
    more = re.search(r"the wake says ([0-9.]+) kn more than reported", got["Brackenfield"]["report_text"])
    assert more and float(more[1]) == pytest.approx(16.0 - 10.0, abs=0.3)  # truth 16.0 kn against 10.0 reported


def test_batch_writes_each_vessels_evidence_set_on_request(setup, capsys):
    # one evidence set per analysed vessel, carrying the vessel's name, the case details and its comparison
    # with the position reports; each set's files match its SHA256SUMS; a rerun keeps the sets it finds
    import hashlib

    d, _c = setup
    out = d / "with_evidence"
    argv = ["batch", str(d / "channel_two_vessels.tif"), "--vessels", str(d / "vessels.csv"), "--out", str(out)]
    argv += ["--reports", str(ROOT / "sample_scenes" / "channel_two_vessels_reports.csv"), "--workers", "1"]
    argv += ["--evidence", "--analyst", "R. Quill", "--case", "MC-2026-014"]
    assert main(argv) == 0
    said = capsys.readouterr().out
    assert "evidence: 2 set(s) written, 0 already there (kept), 0 failed" in said
    sets = sorted(p for p in (out / "evidence").iterdir())
    assert len(sets) == 2 and not [p for p in sets if p.name.startswith(".")]
    by_vessel = {}
    for folder in sets:
        for line in (folder / "SHA256SUMS").read_text().splitlines():
            digest, name = line.split("  ")
            assert hashlib.sha256((folder / name).read_bytes()).hexdigest() == digest
        assert len(list(folder.glob("*.pdf"))) == 1 and len(list(folder.glob("*.png"))) == 1
        record = json.loads(next(folder.glob("*.json")).read_text())
        assert record["case"]["analyst"] == "R. Quill" and record["case"]["reference"] == "MC-2026-014"
        (vessel,) = record["vessels"]
        by_vessel[vessel["name"]] = vessel
    assert set(by_vessel) == {"Merrow Pilot 2", "Brackenfield"}
    assert by_vessel["Brackenfield"]["position_report"]["verdict"] == "inconsistent"
    assert by_vessel["Merrow Pilot 2"]["position_report"]["verdict"] == "consistent"
    rows = {r["vessel"]: r for r in csv.DictReader(open(out / "results.csv"))}
    for name, v in by_vessel.items():  # the set's numbers are the table's (the same request, the same result)
        assert v["result"]["speed_knots"] == pytest.approx(float(rows[name]["speed_kn"]), rel=1e-5)
    stamps = {p: p.stat().st_mtime_ns for p in sets}
    assert main(argv) == 0
    assert "evidence: 0 set(s) written, 2 already there (kept), 0 failed" in capsys.readouterr().out
    assert {p: p.stat().st_mtime_ns for p in sets} == stamps
    assert (
        main(["batch", str(d / "channel_two_vessels.tif"), "--out", str(out), "--analyst", "R. Quill", "--find"]) == 2
    )
    assert "--analyst is for the evidence sets: give --evidence too" in capsys.readouterr().err


def test_batch_finds_the_vessels_of_a_scene_itself(tmp_path, capsys):
    # a Sentinel-2-like fleet of known truth made as a user would (wakemeter synth --fleet): --find gives every
    # vessel, each analysed, with the finder's own figures beside the analysis in the table
    tif = tmp_path / "fleet.tif"
    argv = ["synth", "--kind", "multispectral", "--fleet", "3", "--seed", "2", "--size", "512", "--pixel", "10"]
    argv += ["--out", str(tif)]
    assert main(argv) == 0
    truth = json.loads(tif.with_suffix(".truth.json").read_text())["vessels"]
    out = tmp_path / "out"
    assert main(["batch", str(tif), "--find", "--out", str(out), "--workers", "1"]) == 0
    assert f"{len(truth)} vessel(s) in 1 scene(s)" in capsys.readouterr().out
    rows = list(csv.DictReader(open(out / "results.csv")))
    assert len(rows) == len(truth) and all(r["status"] == "done" for r in rows)
    for v in truth:
        r = min(rows, key=lambda r: (float(r["col"]) - v["pixel_col"]) ** 2 + (float(r["row"]) - v["pixel_row"]) ** 2)
        assert r["vessel"].startswith("found ") and float(r["found_length_m"]) > 0 and float(r["found_score"]) > 0
        assert float(r["found_false_alarm_per_pixel"]) < 1e-6
        if r["speed_kn"]:  # the truth's speed lies in the interval the table gives
            kn = v["speed_mps"] / 0.514444
            assert float(r["speed_ci95_low_kn"]) <= kn <= float(r["speed_ci95_high_kn"]), (v["name"], kn, r)
    assert sum(bool(r["speed_kn"]) for r in rows) >= 2


def test_a_killed_worker_has_its_task_redone(setup, tmp_path):
    # the first task kills its own worker process (a test hook, wakemeter.batch.tasks.DIE_ONCE_ENV); the
    # scheduler gives the task to another worker and the batch still finishes every vessel
    from distributed import Client, LocalCluster

    from wakemeter.batch.tasks import DIE_ONCE_ENV

    d, _c = setup
    marker = tmp_path / "died"
    cluster = LocalCluster(
        n_workers=2, threads_per_worker=1, processes=True, dashboard_address=":0", env={DIE_ONCE_ENV: str(marker)}
    )
    client = Client(cluster)
    try:
        tasks, _, _ = plan(
            [str(d / "channel_two_vessels.tif")],
            AnalysisRequest(vessel_lonlat=(0.0, 0.0)),
            vessels_file=str(d / "vessels.csv"),
        )
        s = run(tasks, tmp_path / "out", client=client)
    finally:
        client.close()
        cluster.close()
    assert marker.exists()  # a worker did die
    assert (s.done, s.failed) == (2, 0)


def test_a_listed_vessel_the_finder_also_finds_is_one_row(setup, capsys):
    # Synthetic truth (the channel demo): both vessels listed by name and found by the finder.  The finder's
    # rows are the same vessels (same place after the analysis snaps to the hull): one row each, the listed
    # name kept, the found row named in same_vessel_rows, its result still in results/.
    d, _client = setup
    out = d / "listed_and_found"
    argv = ["batch", str(d / "channel_two_vessels.tif"), "--vessels", str(d / "vessels.csv"), "--find"]
    assert main([*argv, "--out", str(out), "--workers", "1"]) == 0
    capsys.readouterr()
    rows = list(csv.DictReader(open(out / "results.csv")))
    assert sorted(r["vessel"] for r in rows) == ["Brackenfield", "Merrow Pilot 2"]
    assert all(r["same_vessel_rows"].startswith("found ") for r in rows), rows
    assert len(list((out / "results").glob("*.json"))) == 4
