"""Hostile and careless input: altered session files, odd command-line values and names with markup or
of great length.  For every case: exit status 0 or 2, one line on stderr when refused, no traceback, the
input file unchanged, no partial output.  Seeded generators (reproducible), bounded in number.

Source: none needed (the checks are the program's own contract for bad input; DEVELOPERS.md).
"""

import contextlib
import hashlib
import io
import json
import random
import shutil
from pathlib import Path

import pytest
from pypdf import PdfReader

from wakemeter.cli import main
from wakemeter.detect.analysis import AnalysisRequest, RadarGeometry, analyze
from wakemeter.names import clean_name
from wakemeter.physics.inversion import Uncertain
from wakemeter.project import Measurement, Project, Vessel
from wakemeter.project import session as session_mod
from wakemeter.scene.raster import open_scene

ROOT = Path(__file__).resolve().parents[1]
SCENE = ROOT / "sample_scenes" / "harbour_approach_optical.tif"
TRUTH = json.loads((ROOT / "sample_scenes" / "harbour_approach_optical.truth.json").read_text())["vessels"][0]
BAD_VALUES = [
    None,
    "text",
    7,
    -1,
    0,
    1e308,
    float("inf"),
    float("nan"),
    [],
    {},
    {"a": 1},
    True,
    "x" * 300,
    [1, 2, 3],
    "Infinity",
]


def _session(folder: Path, scene: Path = SCENE, name: str = "Saltmarsh Wren") -> Path:
    pos = (TRUTH["pixel_col"], TRUTH["pixel_row"])
    with open_scene(scene) as sc:
        p = Project()
        p.scene = sc
        p.put(Vessel(1, name, pos))
        p.put(Measurement(2, "track", (pos, (pos[0] - 200.0, pos[1] + 100.0)), 1))
        p.requests[1] = AnalysisRequest(
            vessel_px=pos, depth=Uncertain(40.0, 2.0), radar_geometry=RadarGeometry(850e3, 7500.0, 100.0, 33.0)
        )
        p.findings[1] = analyze(sc, p.requests[1])
        return session_mod.save(folder / "base.json", session_mod.to_session(p))


def _paths(node, prefix=()):
    out = [prefix]
    if isinstance(node, dict):
        for k, v in node.items():
            out += _paths(v, prefix + (k,))
    elif isinstance(node, list):
        for i, v in enumerate(node[:3]):
            out += _paths(v, prefix + (i,))
    return out


def _mutations(session: dict, n: int, seed: int):
    """Wrong types and values at every level, deleted keys, truncation, flipped bytes, deep nesting."""
    rng = random.Random(seed)
    paths = [p for p in _paths(session) if p]
    text = json.dumps(session)
    for _ in range(n):
        r = rng.random()
        if r < 0.75:
            s = json.loads(text)
            path = rng.choice(paths)
            node = s
            for k in path[:-1]:
                node = node[k]
            if rng.random() < 0.2:
                node.pop(path[-1])
            else:
                node[path[-1]] = rng.choice(BAD_VALUES)
            yield json.dumps(s).encode()
        elif r < 0.85:
            yield text[: rng.randrange(1, len(text))].encode()
        elif r < 0.95:
            b = bytearray(text.encode())
            for _ in range(rng.randint(1, 5)):
                b[rng.randrange(len(b))] = rng.randrange(256)
            yield bytes(b)
        else:
            depth = rng.choice([1000, 100_000])
            yield text.replace('"vessels": [', '"vessels": [' + "[" * depth + "]" * depth + ",", 1).encode()


def _run(argv: list[str]) -> tuple[int, list[str]]:
    err = io.StringIO()
    with contextlib.redirect_stderr(err), contextlib.redirect_stdout(io.StringIO()):
        try:
            rc = main(argv)
        except SystemExit as stop:  # argparse's own exit (help, usage errors)
            rc = int(stop.code or 0)
    return rc, [line for line in err.getvalue().splitlines() if line.strip()]


def _check_outcome(rc: int, lines: list[str], out: Path) -> None:
    assert rc in (0, 2), lines
    if rc == 2:
        assert len(lines) == 1, lines
    sets = sorted(out.iterdir()) if out.exists() else []
    assert not [p.name for p in sets if p.name.startswith(".") or p.name.endswith(".part")], sets  # no leftovers
    for s in sets:  # whole evidence sets only: every file the checksums name, and nothing else
        listed = {line.split("  ", 1)[1] for line in (s / "SHA256SUMS").read_text().splitlines()}
        assert {p.name for p in s.iterdir()} == listed | {"SHA256SUMS"}, s


def test_altered_sessions_never_end_in_a_traceback(tmp_path, capsys):
    base = _session(tmp_path)
    counts = {"tried": 0, "refused": 0, "reported": 0}
    for i, raw in enumerate(_mutations(json.loads(base.read_text()), 90, seed=16)):
        f = tmp_path / f"altered_{i}.json"
        f.write_bytes(raw)
        out = tmp_path / f"out_{i}"
        out.mkdir()
        rc, lines = _run(["report", str(f), "--out", str(out)])
        _check_outcome(rc, lines, out)
        assert hashlib.sha256(f.read_bytes()).digest() == hashlib.sha256(raw).digest()  # input untouched
        counts["tried"] += 1
        counts["refused" if rc == 2 else "reported"] += 1
    with capsys.disabled():
        print(f"\naltered sessions: {counts}")
    assert counts["refused"] > counts["tried"] // 2  # most alterations are caught by the checks


def test_session_errors_name_the_field(tmp_path):
    data = json.loads(_session(tmp_path).read_text())
    for change, expected in (
        (lambda d: d["scene"].__setitem__("path", 7), "scene.path must be text or null, got 7"),
        (lambda d: d.__setitem__("scene", None), "scene must be an object, got null"),
        (lambda d: d["vessels"][0].__setitem__("id", "text"), "vessels[0].id must be a whole number, got 'text'"),
        (lambda d: d["vessels"][0].__setitem__("position_px", {"a": 1}), "vessels[0].position_px must be a list"),
        (lambda d: d["vessels"][0].pop("id"), "vessels[0] lacks 'id'"),
        (
            lambda d: d["requests"]["1"]["radar_geometry"].__setitem__("slant_range_m", 0),
            "requests.1.radar_geometry.slant_range_m must be > 0, got 0",
        ),
    ):
        d = json.loads(json.dumps(data))
        change(d)
        f = tmp_path / "changed.json"
        f.write_text(json.dumps(d))
        with pytest.raises(session_mod.SessionError) as info:
            session_mod.load(f)
        assert expected in str(info.value) and "\n" not in str(info.value)
    deep = tmp_path / "deep.json"
    deep.write_text('{"schema": "wakemeter.session/2", "scene": ' + "[" * 100_000 + "]" * 100_000 + "}")
    with pytest.raises(session_mod.SessionError, match="nested"):
        session_mod.load(deep)


def test_names_with_markup_and_great_length_reach_the_report(tmp_path):
    # a scene named like markup, a vessel named like markup, and a 300-character name: the PDF must be
    # written with the names as text, file names must stay short, and the names stay in the record as one bounded line
    folder = tmp_path / "in"
    folder.mkdir()
    long_stem = "pass " + "w" * 300
    for stem, vessel in (("pass <b>1 & co", "<i>Wren</i> & <sons"), (long_stem, "V" * 300)):
        scene = folder / f"{stem[:200]}.tif"
        shutil.copy(SCENE, scene)
        session = _session(folder, scene, vessel)
        out = tmp_path / f"out_{len(stem)}"
        out.mkdir()
        rc, lines = _run(["report", str(session), "--out", str(out), "--analyst", "A & <B>"])
        assert rc == 0, lines
        (set_dir,) = out.iterdir()
        files = sorted(set_dir.iterdir())
        assert len(files) == 4 and all(len(p.name) < 120 for p in files) and len(set_dir.name) < 120
        record = json.loads(next(p for p in files if p.suffix == ".json").read_text())
        assert record["provenance"]["scene_file"] == scene.name
        assert record["vessels"][0]["name"] == clean_name(vessel)  # one line, bounded (names.MAX_NAME_CHARS)
        text = " ".join(
            page.extract_text() for page in PdfReader(str(next(p for p in files if p.suffix == ".pdf"))).pages
        )
        flat = " ".join(text.split())
        assert "A & <B>" in flat  # the analyst's name as written, not read as markup
        if "<b>" in stem:
            assert "pass <b>1 & co.tif" in flat and "<i>Wren</i> & <sons" in flat


CLI_VALUES = ["nan", "inf", "-1", "0", "", "x", "1,2,3", "1e400", "-35,36", "12", "9" * 400, "ä,ö", "--json"]


def test_odd_command_line_values_never_end_in_a_traceback(tmp_path):
    rng = random.Random(17)
    options = {
        "analyze": ["--vessel", "--vessel-px", "--depth", "--depth-std", "--hull-length", "--radar-geometry", "--seed"],
        "speed": [
            "--transverse-wavelength",
            "--crest-wavelength",
            "--crest-angle",
            "--wavelength-std",
            "--half-angle",
            "--depth",
            "--latitude",
            "--pixel-rel-std",
            "--seed",
        ],
        "quicklook": ["--max-size"],
        "synth": ["--speed", "--heading", "--pixel", "--size", "--depth", "--looks", "--hull-length"],
    }
    counts = {"tried": 0, "refused": 0, "ran": 0}
    for i in range(60):
        cmd = rng.choice(sorted(options))
        argv = [cmd]
        if cmd in ("analyze", "quicklook"):
            argv.append(str(SCENE) if rng.random() < 0.8 else str(tmp_path / "missing.tif"))
        if cmd == "quicklook":
            argv += ["--out", str(tmp_path / f"q{i}.png")]
        if cmd == "synth":
            argv += ["--out", str(tmp_path / f"s{i}.tif"), "--size", "256"]
        for opt in rng.sample(options[cmd], k=rng.randint(1, min(3, len(options[cmd])))):
            argv += [opt, rng.choice(CLI_VALUES)]
        rc, lines = _run(argv)
        assert rc in (0, 2), (argv, lines)
        if rc == 2:
            assert len(lines) == 1, (argv, lines)
        counts["tried"] += 1
        counts["refused" if rc == 2 else "ran"] += 1
    assert not list(tmp_path.glob(".*")) and not list(tmp_path.glob("*.part"))
    print(f"\ncommand lines: {counts}")
