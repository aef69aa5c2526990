"""Position reports (AIS): reading CSV and NMEA, the state at the scene time, one-to-one matching, verdicts.

Check values: synthetic straight tracks of known truth (wakemeter.synth.reports, positions on the WGS 84
ellipsoid by pyproj.Geod, a reference library); NMEA sentences made with pyais' own encoder and read back
within the AIS resolutions (1/10 000 minute of arc, 0.1 kn, 0.1°; ITU-R M.1371, from memory); the
assignment against scipy's Hungarian solver on a case where taking the nearest report first fails."""

import datetime as _dt
import json

import pytest
from pyais import encode_dict
from pyproj import Geod

from wakemeter.cli import main
from wakemeter.errors import ParameterError, SceneReadError
from wakemeter.positions.match import SeenVessel, match, scene_time, states_at
from wakemeter.positions.reports import parse_columns, read_csv, read_reports, reports_from_nmea_lines
from wakemeter.synth.reports import straight_track, to_csv_text

GEOD = Geod(ellps="WGS84")
T = _dt.datetime(2026, 6, 14, 10, 32, 5, tzinfo=_dt.UTC)


def test_state_between_reports_is_where_the_vessel_was():
    reps = straight_track("235000001", -35.0, 36.0, 62.0, 14.0, T, every_s=10.0, offset_s=3.0)
    (s,) = states_at(reps, T)
    _a, _b, miss = GEOD.inv(-35.0, 36.0, s.lon, s.lat)
    assert miss < 0.5 and s.sog_kn == pytest.approx(14.0) and s.cog_deg == pytest.approx(62.0)
    assert "interpolated" in s.how


def test_state_after_the_last_report_is_carried_by_speed_and_course():
    reps = straight_track("235000001", -35.0, 36.0, 62.0, 14.0, T, before_s=200.0, after_s=-60.0, every_s=10.0)
    (s,) = states_at(reps, T)
    _a, _b, miss = GEOD.inv(-35.0, 36.0, s.lon, s.lat)
    assert miss < 0.5 and "carried" in s.how and s.gap_s > 50
    assert states_at(reps, T + _dt.timedelta(hours=1)) == []  # nobody heard for an hour: no state


def _seen(name, lon, lat, kn, half=0.4, heading=62.0):
    return SeenVessel(name, lon, lat, kn, (kn - half, kn + half), heading, 1.0, "through the water")


def test_one_to_one_assignment_where_nearest_first_fails():
    # A is 100 m from r1 and 150 m from r2; B is 120 m from r1 and 400 m from r2.  Taking A's nearest
    # first leaves B with r2 (400 m); the assignment that minimises the sum pairs A-r2 and B-r1 (270 m).
    lon0, lat0 = -35.0, 36.0
    r1 = GEOD.fwd(lon0, lat0, 90.0, 0.0)[:2]

    def at(d, az):
        x, y, _ = GEOD.fwd(lon0, lat0, az, d)
        return float(x), float(y)

    a = at(100.0, 0.0)
    b = at(120.0, 180.0)
    # r2 at 150 m from A and about 400 m from B: north of A, on the same meridian
    r2 = GEOD.fwd(*a, 0.0, 150.0)[:2]
    states = [
        s for vid, (x, y) in (("r1", r1), ("r2", r2)) for s in states_at(straight_track(vid, x, y, 62.0, 14.0, T), T)
    ]
    comps, unmatched = match([_seen("A", *a, 14.0), _seen("B", *b, 14.0)], states, gate_m=500.0)
    assert [c.reported.vessel_id for c in comps] == ["r2", "r1"] and unmatched == []


def test_verdicts_consistent_inconsistent_and_no_report():
    states = [
        states_at(straight_track("235000001", -35.0, 36.0, 62.0, 14.0, T), T)[0],
        states_at(straight_track("235000002", -34.99, 36.0, 62.0, 10.0, T), T)[0],
    ]
    comps, _ = match(
        [
            _seen("Saltmarsh Wren", -35.0, 36.0, 14.1),
            _seen("Grey Heron", -34.99, 36.0, 14.0),
            _seen("Brackenfield", -34.9, 36.05, 9.0),
        ],
        states,
    )
    assert [c.verdict for c in comps] == ["consistent", "inconsistent", "no report"]
    # 14.0 against 10.0 reported, combined standard uncertainty sqrt((0.4/1.96)^2 + 0.3^2) = 0.363 kn
    assert comps[1].speed_difference_kn == pytest.approx(4.0) and comps[1].combined_std_kn == pytest.approx(
        0.3628, abs=1e-3
    )
    assert "4.0 kn more than reported" in comps[1].text and "11.0 times" in comps[1].text
    assert "no position report near this vessel" in comps[2].text


def test_csv_with_the_users_column_names_and_clear_errors(tmp_path):
    reps = straight_track("235000001", -35.0, 36.0, 62.0, 14.0, T)
    text = to_csv_text(reps).replace("MMSI,BaseDateTime,LAT,LON", "ship,when,northing_deg,easting_deg")
    f = tmp_path / "reports.csv"
    f.write_text(text)
    with pytest.raises(ParameterError, match="no column for id, time, lat, lon"):
        read_csv(f)
    got = read_csv(f, parse_columns("id=ship,time=when,lat=northing_deg,lon=easting_deg"))
    assert len(got) == len(reps) and got[0].vessel_id == "235000001" and got[0].sog_kn == pytest.approx(14.0)
    with pytest.raises(ParameterError, match="FIELD=NAME"):
        parse_columns("speed:SOG")
    (tmp_path / "empty.csv").write_text("MMSI,BaseDateTime,LAT,LON\n1,,91,181\n")
    with pytest.raises(SceneReadError, match="no usable position report"):
        read_csv(tmp_path / "empty.csv")


def test_nmea_with_tag_blocks_and_leading_times_reads_back(tmp_path):
    reps = straight_track("235000001", -35.0, 36.0, 62.0, 14.0, T, every_s=30.0)
    lines = []
    for i, r in enumerate(reps):
        (sentence,) = encode_dict(
            {
                "type": 1,
                "mmsi": int(r.vessel_id),
                "lat": r.lat,
                "lon": r.lon,
                "speed": r.sog_kn,
                "course": r.cog_deg,
                "heading": int(round(r.heading_deg)),
            }
        )
        if i % 2:
            lines.append(f"\\c:{int(r.time.timestamp())}*00\\{sentence}")
        else:
            lines.append(f"{r.time.isoformat().replace('+00:00', 'Z')} {sentence}")
    f = tmp_path / "feed.nmea"
    f.write_text("\n".join(lines) + "\n")
    got = read_reports(f)
    assert len(got) == len(reps)
    for g, r in zip(got, reps, strict=True):
        assert abs(g.lat - r.lat) < 2e-6 and abs(g.lon - r.lon) < 2e-6
        assert g.sog_kn == pytest.approx(r.sog_kn, abs=0.051) and g.cog_deg == pytest.approx(r.cog_deg, abs=0.051)
        assert abs((g.time - r.time.replace(microsecond=0)).total_seconds()) <= 1
    with pytest.raises(SceneReadError, match="without a time"):
        reports_from_nmea_lines([lines[0].split(" ", 1)[1]])


def test_scene_time_from_metadata_or_given():
    assert scene_time("2026:06:14 10:32:05", None) == T  # TIFF's own form
    assert scene_time(None, "2026-06-14T10:32:05Z") == T
    with pytest.raises(ParameterError, match="--scene-time"):
        scene_time(None, None)


def test_analyze_compares_with_the_reports(tmp_path, capsys):
    # the demo vessel (truth 14.0 kn, heading 62°, at -35, 36 at 2026-06-14T10:32:05Z) reported at 14.0 kn,
    # and a second reporter 3 km away that is not in the analysis
    reps = straight_track("235000001", -35.0, 36.0, 62.0, 14.0, T) + straight_track(
        "235000077", -34.97, 36.01, 200.0, 8.0, T
    )
    f = tmp_path / "reports.csv"
    f.write_text(to_csv_text(reps))
    assert (
        main(
            [
                "analyze",
                "sample_scenes/harbour_approach_optical.tif",
                "--vessel",
                "-35,36",
                "--reports",
                str(f),
                "--json",
            ]
        )
        == 0
    )
    out = json.loads(capsys.readouterr().out)
    c = out["position_report"]
    assert c["verdict"] == "consistent" and c["report_id"] == "235000001" and c["distance_m"] < 30
    assert (
        main(["analyze", "sample_scenes/harbour_approach_optical.tif", "--vessel", "-35,36", "--reports", str(f)]) == 0
    )
    assert "Position report:" in capsys.readouterr().out
    assert (
        main(
            [
                "report",
                "sample_scenes/harbour_approach_optical.tif",
                "--vessel",
                "-35,36",
                "--reports",
                str(f),
                "--out",
                str(tmp_path),
            ]
        )
        == 0
    )
    (folder,) = [p for p in tmp_path.iterdir() if p.is_dir()]
    rec = json.loads(next(folder.glob("*.json")).read_text())
    assert rec["vessels"][0]["position_report"]["verdict"] == "consistent"
    assert [u["vessel_id"] for u in rec["unmatched_reports"]] == ["235000077"]
