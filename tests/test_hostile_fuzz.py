"""Seeded fuzzing of the surfaces added after the rasters: position-report files (CSV and NMEA), vessel lists
(CSV, GeoJSON, GeoPackage), vessel names, scheduler addresses and numeric options.

For every case, run as a user types it (``wakemeter COMMAND ...`` in-process): exit status 0 or 2, exactly one
line on stderr when refused, no traceback, the input file unchanged, nothing half-written in the output folder,
and each case done within a generous time bound (a hang, not a slow machine).  Counts per surface are printed.

Source: none needed (the program's own contract for bad input; DEVELOPERS.md).  The commands used are the
fast paths (a session's stored findings, vessels outside the scene), so each case takes well under a second.
"""

from __future__ import annotations

import hashlib
import json
import random
import time
from collections import Counter
from pathlib import Path

import pytest
from test_hostile_input import SCENE, _run, _session

ROOT = Path(__file__).resolve().parents[1]
#: a case that takes longer than this hangs (the fast paths take well under a second)
HANG_S = 120.0


def _mutate(raw: bytes, rng: random.Random) -> bytes:
    """One of the ways a file gets damaged or crafted."""
    kind = rng.randrange(11)
    if not raw:
        return b"\x00"
    i = rng.randrange(len(raw))
    if kind == 0:  # flip bytes
        b = bytearray(raw)
        for _ in range(rng.randint(1, 20)):
            b[rng.randrange(len(b))] = rng.randrange(256)
        return bytes(b)
    if kind == 1:  # truncate
        return raw[:i]
    if kind == 2:  # another encoding
        return raw.decode("utf-8", "replace").replace("a", "\u00e4").encode("latin-1", "replace")
    if kind == 3:  # a huge field
        return raw[:i] + b"x" * rng.choice((70_000, 2_000_000)) + raw[i:]
    if kind == 4:  # numbers that are not
        words = [b"NaN", b"inf", b"-1e400", b"1e308", b"", b"--", b"0x1F", b"99999999999999999999999"]
        return raw.replace(b"3", rng.choice(words), rng.randint(1, 5))
    if kind == 5:  # binary garbage
        return bytes(rng.randrange(256) for _ in range(rng.randint(1, 4000)))
    if kind == 6:  # a byte-order mark and control characters
        return b"\xef\xbb\xbf" + raw.replace(b",", b",\x1b[2J\r", 3)
    if kind == 7:  # lines repeated many times
        lines = raw.splitlines(keepends=True)
        return b"".join(lines + [rng.choice(lines)] * rng.randint(100, 5000))
    if kind == 8:  # empty
        return b""
    if kind == 9:  # one very long line
        return raw.replace(b"\n", b" ")
    return raw[i:] + raw[:i]  # rotated: the header in the middle


def _check(argv: list[str], inputs: list[Path], out: Path, counts: Counter) -> None:
    before = {p: hashlib.sha256(p.read_bytes()).hexdigest() for p in inputs if p.exists()}
    t0 = time.monotonic()
    try:
        rc, lines = _run(argv)
    except Exception as err:  # noqa: BLE001 - a traceback is what the test counts and fails on
        counts["traceback"] += 1
        raise AssertionError(f"{argv[:2]}: {type(err).__name__}: {err}") from err
    took = time.monotonic() - t0
    counts["tried"] += 1
    counts["clean" if rc == 0 else "refused"] += 1
    if took > HANG_S:
        counts["hang"] += 1
    assert took <= HANG_S, (argv[:2], took)
    assert rc in (0, 2), (argv, lines)
    if rc == 2:
        assert len(lines) == 1, (argv, lines)
    assert all(hashlib.sha256(p.read_bytes()).hexdigest() == h for p, h in before.items())  # inputs unchanged
    leftovers = [p.name for p in out.rglob("*") if p.name.startswith(".") or p.name.endswith(".part")]
    assert leftovers == [], leftovers


@pytest.fixture(scope="module")
def stored(tmp_path_factory):
    """A session with one analysed vessel: ``export SESSION`` uses its stored finding (no analysis)."""
    folder = tmp_path_factory.mktemp("fuzz_session")
    return _session(folder)


def _nmea_lines() -> bytes:
    import functools
    import operator

    out = []
    for k, payload in enumerate(("15M67FC000G?ufbE`FepT@3n00Sa", "13aEOK?P00PD2wVMdLDRhgvL289?")):
        body = f"AIVDM,1,1,,A,{payload},0"
        check = functools.reduce(operator.xor, (ord(c) for c in body), 0)
        out.append(f"\\c:{1781603193 + 10 * k}*00\\!{body}*{check:02X}")
    return ("\n".join(out) + "\n").encode()


def test_position_report_files(stored, tmp_path, capsys):
    rng = random.Random(281)
    bases = [(ROOT / "sample_scenes" / "channel_two_vessels_reports.csv").read_bytes()[:4000], _nmea_lines()]
    counts: Counter = Counter()
    for i in range(40):
        f = tmp_path / f"reports_{i}.{'csv' if i % 2 == 0 else 'nmea'}"
        f.write_bytes(_mutate(bases[i % 2], rng))
        out = tmp_path / f"out_{i}"
        out.mkdir()
        argv = ["export", str(stored), "--reports", str(f), "--out", str(out / "v.gpkg")]
        argv += ["--scene-time", "2026-06-16T09:47:00Z"] if rng.random() < 0.5 else []
        _check(argv, [f, stored], out, counts)
    with capsys.disabled():
        print(f"\nposition-report files: {dict(counts)}")
    assert counts["traceback"] == 0 and counts["refused"] > 0


def test_vessel_lists(tmp_path, capsys):
    import numpy as np
    import pyogrio.raw
    import shapely

    rng = random.Random(282)
    csv_base = b"name,lon,lat\nKestrel Bay,10.0,10.0\nHollin Mere,10.1,10.2\n"
    geojson_base = json.dumps(
        {
            "type": "FeatureCollection",
            "features": [
                {
                    "type": "Feature",
                    "properties": {"name": "Kestrel Bay"},
                    "geometry": {"type": "Point", "coordinates": [10.0, 10.0]},
                }
            ],
        }
    ).encode()
    gpkg = tmp_path / "base.gpkg"

    counts: Counter = Counter()
    for i in range(36):
        kind = ("csv", "geojson", "gpkg")[i % 3]
        f = tmp_path / f"list_{i}.{kind}"
        if kind == "gpkg":
            if not gpkg.exists():
                pyogrio.raw.write(
                    str(gpkg),
                    geometry=shapely.to_wkb([shapely.Point(10.0, 10.0)]),
                    field_data=[np.array(["Kestrel Bay"], dtype=object)],
                    fields=["name"],
                    geometry_type="Point",
                    crs="EPSG:4326",
                    driver="GPKG",
                )
            f.write_bytes(_mutate(gpkg.read_bytes(), rng))
        else:
            f.write_bytes(_mutate(csv_base if kind == "csv" else geojson_base, rng))
        out = tmp_path / f"out_{i}"
        out.mkdir()
        _check(["export", str(SCENE), "--vessels", str(f), "--out", str(out / "v.gpkg")], [f], out, counts)
    with capsys.disabled():
        print(f"\nvessel lists: {dict(counts)}")
    assert counts["traceback"] == 0 and counts["refused"] > 0


HOSTILE_NAMES = [
    "Wren\nof Saltmarsh",
    "\x00\x01\x02",
    "\u202eredaeh\u202c",
    "<b>bold</b> & <script>",
    "\U0001f6a2" * 50,
    "W" * 300_000,
    " \t ",
    "%s%n%x",
    "../../etc/passwd",
    "name\r\nX-Header: 1",
]


def test_vessel_names_reach_the_map_layers_as_one_bounded_line(stored, tmp_path, capsys):
    import pyogrio

    from wakemeter.names import MAX_NAME_CHARS

    data = json.loads(stored.read_text())
    counts: Counter = Counter()
    for i, name in enumerate(HOSTILE_NAMES):
        d = json.loads(json.dumps(data))
        d["vessels"][0]["name"] = name
        f = stored.parent / f"named_{i}.json"
        f.write_text(json.dumps(d))
        out = tmp_path / f"out_{i}"
        out.mkdir()
        _check(["export", str(f), "--out", str(out / "v.gpkg")], [f], out, counts)
        if (out / "v.gpkg").exists():
            names = pyogrio.raw.read(str(out / "v.gpkg"), layer="vessels")[3][0]
            assert all("\n" not in str(n) and len(str(n)) <= MAX_NAME_CHARS for n in names)
    with capsys.disabled():
        print(f"\nvessel names: {dict(counts)}")
    assert counts["traceback"] == 0 and counts["clean"] == len(HOSTILE_NAMES)


HOSTILE_ADDRESSES = [
    "",
    " ",
    "not a url",
    "tcp://",
    "tcp://:",
    "tcp://127.0.0.1",
    "tcp://127.0.0.1:0",
    "tcp://127.0.0.1:99999",
    "tcp://127.0.0.1:-1",
    "file:///etc/passwd",
    "tcp://[::1",
    "127.0.0.1:8786; rm -rf /",
    "\u00e4\u00f6:1",
    "a" * 5000,
    "tcp://127.0.0.1:8786\n",
]


def test_scheduler_addresses_are_checked_before_anything_runs(tmp_path, capsys):
    counts: Counter = Counter()
    for i, addr in enumerate(HOSTILE_ADDRESSES):
        out = tmp_path / f"out_{i}"
        argv = ["batch", str(SCENE), "--find", "--out", str(out), "--scheduler", addr]
        tmp_path.joinpath("marker").write_text("x")
        _check(argv, [], tmp_path, counts)
        assert not out.exists()  # nothing made for a run that never started
    with capsys.disabled():
        print(f"\nscheduler addresses: {dict(counts)}")
    assert counts["traceback"] == 0 and counts["refused"] == len(HOSTILE_ADDRESSES)


NUMBERS = ["nan", "inf", "-inf", "-1", "0", "1e-300", "1e300", "", "x", "1,2", "9" * 400, "0x10", "1_000", "5"]


def test_numeric_options_on_the_newer_surfaces(stored, tmp_path, capsys):
    import cv2
    import numpy as np

    rng = random.Random(283)
    tiny = tmp_path / "tiny.png"
    cv2.imwrite(str(tiny), (np.random.default_rng(0).random((160, 160)) * 255).astype(np.uint8))
    reports = ROOT / "sample_scenes" / "channel_two_vessels_reports.csv"
    counts: Counter = Counter()
    for i in range(48):
        out = tmp_path / f"out_{i}"
        out.mkdir()
        if i % 3 == 2:  # batch: its numbers are checked before any worker starts (the address is refused last)
            argv = ["batch", str(SCENE), "--find", "--out", str(out / "b"), "--scheduler", "no scheduler"]
            argv += ["--workers", rng.choice(NUMBERS), "--pfa", rng.choice(NUMBERS)]
        elif i % 3 == 0:
            argv = ["export", str(stored), "--out", str(out / "v.gpkg"), "--reports", str(reports)]
            argv += [
                "--match-distance",
                rng.choice(NUMBERS),
                "--scene-time",
                rng.choice(NUMBERS + ["2026-06-16T09:47Z"]),
            ]
        else:
            argv = ["analyze", str(tiny), "--vessel-px", f"{rng.choice(NUMBERS)},80"]
            argv += ["--pixel-size", rng.choice(NUMBERS), "--north-up", rng.choice(NUMBERS)]
        _check(argv, [stored, tiny], out, counts)
    with capsys.disabled():
        print(f"\nnumeric options: {dict(counts)}")
    assert counts["traceback"] == 0
