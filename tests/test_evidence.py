"""Evidence export: PNG, PDF and JSON from the demo scene (synthetic truth), checked with general-purpose
libraries (pypdf for the PDF text, jsonschema for the record, hashlib for the scene digest)."""

import hashlib
import json
import os
from pathlib import Path

import cv2
import numpy as np
import pytest
from pypdf import PdfReader

from wakemeter.cli import main
from wakemeter.detect.analysis import AnalysisRequest, analyze
from wakemeter.detect.findings import SegmentKind
from wakemeter.errors import SceneWriteError
from wakemeter.evidence.annotate import COLOURS
from wakemeter.evidence.export import export_evidence
from wakemeter.evidence.record import CAUTION_TEXT, validate
from wakemeter.scene.raster import open_scene

ROOT = Path(__file__).resolve().parents[1]
SCENE = ROOT / "sample_scenes" / "harbour_approach_optical.tif"


@pytest.fixture(scope="module")
def exported(tmp_path_factory):
    out = tmp_path_factory.mktemp("evidence")
    with open_scene(SCENE) as sc:
        a = analyze(sc, AnalysisRequest(vessel_lonlat=(-35.0, 36.0)))
        files = export_evidence(
            sc,
            a,
            out,
            analyst="R. Fenwick",
            case_reference="HB-2026-114",
            vessel_name="Saltmarsh Wren",
            parameters={"vessel": "-35.0,36.0"},
            exported_at="2026-06-20T09:00:00+00:00",
        )
    return a, files, out


def test_one_set_with_checksums_and_json_schema(exported):
    a, files, out = exported
    record = json.loads(files.data.read_text())
    validate(record)
    assert list(out.iterdir()) == [files.folder]  # one folder: the set
    assert sorted(p.name for p in files.folder.iterdir()) == sorted(p.name for p in files.all_files())
    assert record["provenance"]["scene_sha256"] == hashlib.sha256(SCENE.read_bytes()).hexdigest()
    assert record["case"] == {
        "reference": "HB-2026-114",
        "analyst": "R. Fenwick",
        "exported_at": "2026-06-20T09:00:00+00:00",
    }
    (vessel,) = record["vessels"]
    assert vessel["name"] == "Saltmarsh Wren" and vessel["image"] == files.image.name
    assert vessel["result"]["speed_mps"] == pytest.approx(a.speed.speed_mps)
    assert record["caution"] == CAUTION_TEXT
    # SHA256SUMS in the format of coreutils' sha256sum (checked here with hashlib)
    for line in files.checksums.read_text().splitlines():
        digest, name = line.split("  ")
        assert hashlib.sha256((files.folder / name).read_bytes()).hexdigest() == digest


def test_pdf_pages_and_text(exported):
    _, files, _ = exported
    reader = PdfReader(str(files.report))
    assert len(reader.pages) >= 2
    text = " ".join(p.extract_text() for p in reader.pages)
    flat = " ".join(text.split())
    for needle in (
        "Wake speed estimate",
        "95 % interval",
        "Heading",
        "Methods",
        "Provenance",
        "SHA-256",
        "R. Fenwick",
        "licensed professionals",
        "not certified",
        "Wake lines through the vessel",
        "Kelvin arms at",
        "HB-2026-114",
        "Saltmarsh Wren",
        "Hand measurements",
    ):
        assert needle in flat, needle
    # the creation date is the export time (it was once fixed at 2000-01-01 by the PDF library's invariant mode)
    created = reader.metadata.creation_date
    assert (created.year, created.month, created.day, created.hour) == (2026, 6, 20, 9)


def test_png_size_and_arm_colour_where_the_arms_are(exported):
    a, files, _ = exported
    img = cv2.imread(str(files.image))[..., ::-1]
    c0 = min(p[0] for p in a.drawing.points_of(SegmentKind.AREA))
    r0 = min(p[1] for p in a.drawing.points_of(SegmentKind.AREA))
    c0, r0 = max(int(np.floor(c0)), 0), max(int(np.floor(r0)), 0)
    assert img.shape[2] == 3 and img.shape[0] > 300 and img.shape[1] > 300
    arm = np.array(COLOURS["arm"])
    (x0, y0), (x1, y1) = a.drawing.first(SegmentKind.ARM_LEFT).points
    hits = 0
    for t in np.linspace(0.2, 0.9, 8):  # along the drawn arm
        x, y = int(x0 + t * (x1 - x0)) - c0, int(y0 + t * (y1 - y0)) - r0
        if 0 <= y < img.shape[0] and 0 <= x < img.shape[1]:
            patch = img[max(y - 2, 0) : y + 3, max(x - 2, 0) : x + 3].reshape(-1, 3).astype(int)
            hits += bool(np.any(np.abs(patch - arm).sum(axis=1) < 60))
    assert hits >= 5
    far = img[-40:, img.shape[1] // 2 :].reshape(-1, 3).astype(int)  # a corner away from the arms
    assert not np.any(np.abs(far - arm).sum(axis=1) < 30)


def test_second_export_is_identical_and_overwrite_needs_force(exported, tmp_path):
    a, files, out = exported
    with open_scene(SCENE) as sc:
        with pytest.raises(SceneWriteError, match="already exists"):
            export_evidence(sc, a, out)
        again = export_evidence(
            sc,
            analyze(sc, AnalysisRequest(vessel_lonlat=(-35.0, 36.0))),
            tmp_path,
            analyst="R. Fenwick",
            parameters={"vessel": "-35.0,36.0"},
            exported_at="2026-06-20T09:00:00+00:00",
        )
    assert again.image.read_bytes() != files.image.read_bytes()  # the vessel name is in the first picture only
    assert (
        json.loads(again.data.read_text())["vessels"][0]["result"]
        == json.loads(files.data.read_text())["vessels"][0]["result"]
    )


def test_read_only_folder_fails_cleanly(tmp_path, monkeypatch):
    ro = tmp_path / "ro"
    ro.mkdir()
    with open_scene(SCENE) as sc:
        a = analyze(sc, AnalysisRequest(vessel_lonlat=(-35.0, 36.0)))
        real_access = os.access
        monkeypatch.setattr(os, "access", lambda p, m: False if Path(p) == ro else real_access(p, m))
        with pytest.raises(SceneWriteError, match="not writable"):
            export_evidence(sc, a, ro)
        monkeypatch.undo()
        # a failure half-way (the PDF writer breaks) leaves nothing behind
        import wakemeter.evidence.export as ex

        monkeypatch.setattr(ex, "write_pdf", lambda *a_, **k: (_ for _ in ()).throw(OSError(28, "No space left")))
        with pytest.raises(SceneWriteError, match="disk is full"):
            export_evidence(sc, a, ro)
    assert list(ro.iterdir()) == []


def test_no_wake_report_says_so(tmp_path):
    with open_scene(ROOT / "sample_scenes" / "calm_no_wake.tif") as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=(384, 384)))
        files = export_evidence(sc, a, tmp_path)
    record = json.loads(files.data.read_text())
    validate(record)
    r = record["vessels"][0]["result"]
    assert r["wake_found"] is False and r["speed_mps"] is None
    text = " ".join(p.extract_text() for p in PdfReader(str(files.report)).pages)
    assert "No wake found" in " ".join(text.split())


def test_report_command(tmp_path, capsys):
    args = ["report", str(SCENE), "--vessel", "-35.0,36.0", "--out", str(tmp_path), "--analyst", "R. Fenwick"]
    assert main(args) == 0
    (folder,) = tmp_path.iterdir()
    assert sorted(p.suffix for p in folder.iterdir()) == ["", ".json", ".pdf", ".png"]
    assert main(args) == 2  # exists: needs --force
    assert "already exists" in capsys.readouterr().err
    assert main(args + ["--force"]) == 0
    assert main(["report", str(SCENE), "--vessel", "-35.0,36.0", "--out", str(tmp_path / "missing")]) == 2


def test_analysis_parameters_are_plain_words_with_rounded_numbers():
    # the provenance row of the PDF once printed the raw request, e.g. vessel_px=[785.5334971685008, ...]
    from wakemeter.evidence.report import describe_parameters

    text = describe_parameters(
        {
            "vessel": "Saltmarsh Wren",
            "request": {
                "schema": "wakemeter.request/1",
                "vessel_px": [785.5334971685008, 412.12345],
                "vessel_lonlat": [-35.00012345678, 36.0000001],
                "depth": None,
                "pixel_rel_std": 0.005,
                "seed": 0,
                "force": False,
            },
        }
    )
    assert "vessel_px (785.53, 412.12)" in text and "vessel_lonlat (-35.000123, 36.000000)" in text
    assert "pixel_rel_std 0.005" in text and "depth" not in text and "schema" not in text
    assert "785.5334971685008" not in text and "Saltmarsh Wren" in text


def test_report_plots_have_axes_units_and_a_colour_scale(exported):
    # the plots were once bare pictures; now each axis says what it is and in which unit
    from wakemeter.evidence.plots import profile_figure, spectrum_figure

    a, _, _ = exported
    spec = spectrum_figure(a)
    main_ax, bar_ax = spec.axes  # the image and its colour scale
    assert main_ax.get_xlabel() == "wavenumber along the track (rad/m)"
    assert main_ax.get_ylabel() == "wavenumber across the track (rad/m)"
    assert "ring spreads" in bar_ax.get_ylabel()
    lo, hi = main_ax.get_xlim()
    assert lo < 0 < hi
    prof = profile_figure(a)
    assert prof.axes[0].get_xlabel() == "distance behind the vessel (m)"
    assert prof.axes[0].get_xlim()[1] == pytest.approx((len(a.plots.profile) - 1) * a.plots.profile_m_per_px)


def test_one_result_schema_for_sessions_and_evidence(exported, tmp_path):
    # the result written by an analysis is described once (detect/result.schema.json); the session and the
    # evidence schemas both refer to it: the same result passes both, and the same damage fails both
    # (self-consistency; jsonschema is the reference validator)
    import copy

    from wakemeter.detect.result import WakeAnalysis, result_schema
    from wakemeter.project import session
    from wakemeter.project.model import Project, Vessel

    a, files, _ = exported
    record = json.loads(files.data.read_text())
    result = record["vessels"][0]["result"]
    assert result == json.loads(json.dumps(a.to_json()))  # the record holds the result as written
    p = Project()
    with open_scene(SCENE) as sc:
        p.scene = sc
        p.put(Vessel(1, "Saltmarsh Wren", a.vessel_px))
        p.findings[1] = a
        data = {"schema": session.SCHEMA, "saved_at": "2026-06-20T09:00:00+00:00", **session.to_session(p)}
    assert session.schema_problem(data) is None
    # the session holds the effective finding (with its crest lines drawn): the same fields, same speed
    assert set(data["findings"]["1"]["result"]) == set(result)
    assert data["findings"]["1"]["result"]["speed_mps"] == result["speed_mps"]
    validate(record)
    assert WakeAnalysis.from_json(result).speed_basis == a.speed_basis
    for damage in ({"speed_basis": "sideways"}, {"methods": [{"name": 3}]}):
        bad_data, bad_record = copy.deepcopy(data), copy.deepcopy(record)
        bad_data["findings"]["1"]["result"].update(damage)
        bad_record["vessels"][0]["result"].update(damage)
        assert session.schema_problem(bad_data) is not None, damage
        with pytest.raises(Exception, match="."):
            validate(bad_record)
    assert result_schema()["$id"] == "urn:wakemeter:result"
