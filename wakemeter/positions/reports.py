"""Reading vessel position reports: CSV with the usual columns (names chosen by the user when they differ)
and raw NMEA 0183 AIS sentences (decoded with pyais).

Every report becomes a :class:`PositionReport` in SI-free trade units as broadcast (knots, degrees true,
UTC).  AIS "not available" values (ITU-R M.1371: speed 102.3, course 360, heading 511, latitude 91,
longitude 181; from memory) become None.
"""

from __future__ import annotations

import csv
import datetime as _dt
import math
import re
from collections.abc import Iterable
from dataclasses import dataclass
from pathlib import Path

from ..errors import ParameterError, SceneReadError

#: a reports file larger than this is refused (a day of a busy coast is a few hundred MB of NMEA)
MAX_REPORTS_BYTES = 2 * 1024**3


@dataclass(frozen=True)
class PositionReport:
    vessel_id: str
    time: _dt.datetime  #: UTC
    lat: float
    lon: float
    sog_kn: float | None = None
    cog_deg: float | None = None
    heading_deg: float | None = None


#: accepted names of each column (case and spaces ignored); the user may name them instead
COLUMN_ALIASES = {
    "id": ("mmsi", "id", "vessel", "vessel_id", "shipid", "ship_id", "name"),
    "time": ("basedatetime", "time", "timestamp", "datetime", "date_time", "utc", "time_utc"),
    "lat": ("lat", "latitude", "y"),
    "lon": ("lon", "long", "longitude", "lng", "x"),
    "sog": ("sog", "speed", "speed_over_ground", "sog_kn", "sog_knots"),
    "cog": ("cog", "course", "course_over_ground"),
    "heading": ("heading", "true_heading", "hdg"),
}
REQUIRED = ("id", "time", "lat", "lon")


class ReportList(list):
    """The position reports read from one file, and the lines left out of them by kind (for example
    sentences whose checksum is wrong: they are not evidence) so a view can say what was dropped."""

    def __init__(self, reports: Iterable[PositionReport] = (), dropped: dict[str, int] | None = None, name: str = ""):
        super().__init__(reports)
        self.dropped = dict(dropped or {})
        self.name = name

    def dropped_text(self) -> str:
        """One line on what was left out ("" when nothing was)."""
        if not self.dropped:
            return ""
        parts = ", ".join(f"{n} sentence(s) with a {k}" for k, n in self.dropped.items())
        return f"{self.name}: left out {parts}"


#: reports from before 1970 or after 2200 are typing or file errors, not times
_UNIX_RANGE_S = (0.0, 7_258_118_400.0)


def _unix_time(seconds: str) -> _dt.datetime | None:
    """Seconds since 1970 as a UTC time; None outside the years 1970-2200."""
    try:
        value = float(seconds)
    except ValueError:
        return None
    if not (_UNIX_RANGE_S[0] <= value <= _UNIX_RANGE_S[1]):
        return None
    return _dt.datetime.fromtimestamp(value, _dt.UTC)


def parse_time(text: str) -> _dt.datetime:
    """An ISO 8601 time (a trailing Z or an offset; none: UTC), or seconds since 1970 (UTC)."""
    t = str(text).strip()
    if re.fullmatch(r"\d{9,11}(\.\d+)?", t):
        value = _unix_time(t)
        if value is None:
            raise ParameterError(f"time {t} s since 1970 lies outside the years 1970-2200")
        return value
    t = t.replace(" ", "T", 1) if re.match(r"\d{4}-\d\d-\d\d \d", t) else t
    if re.match(r"\d{4}:\d\d:\d\d \d", t):  # TIFF's own form YYYY:MM:DD HH:MM:SS
        t = t[:4] + "-" + t[5:7] + "-" + t[8:10] + "T" + t[11:]
    try:
        value = _dt.datetime.fromisoformat(t.replace("Z", "+00:00"))
    except ValueError as err:
        raise ParameterError(
            f"not a time wakemeter can read: {text!r} (use ISO 8601, e.g. 2026-06-14T10:32:05Z)"
        ) from err
    return value.replace(tzinfo=_dt.UTC) if value.tzinfo is None else value.astimezone(_dt.UTC)


def parse_columns(text: str | None) -> dict[str, str]:
    """``id=MMSI,time=BaseDateTime`` -> {"id": "MMSI", "time": "BaseDateTime"}."""
    out: dict[str, str] = {}
    for part in (text or "").split(","):
        if not part.strip():
            continue
        key, sep, name = part.partition("=")
        key = key.strip().lower()
        if not sep or key not in COLUMN_ALIASES or not name.strip():
            raise ParameterError(
                f"column names are given as FIELD=NAME with FIELD one of {', '.join(COLUMN_ALIASES)}; got {part!r}"
            )
        out[key] = name.strip()
    return out


def _check_file(path: Path) -> None:
    if not path.is_file():
        raise SceneReadError(f"{path}: no such file")
    if path.stat().st_size > MAX_REPORTS_BYTES:
        raise SceneReadError(f"{path.name}: larger than {MAX_REPORTS_BYTES // 1024**3} GB; split it by day or area")


def _num(value: object, lo: float, hi: float, missing: tuple[float, ...] = ()) -> float | None:
    try:
        v = float(str(value).strip())
    except ValueError:
        return None
    if not math.isfinite(v) or v in missing or not lo <= v <= hi:
        return None
    return v


def read_csv(path: str | Path, columns: dict[str, str] | None = None) -> ReportList:
    """Reports from a CSV file with a header row; rows without an id, a time or a position are skipped."""
    p = Path(path)
    _check_file(p)
    try:
        with open(p, newline="", encoding="utf-8-sig") as fh:
            reader = csv.DictReader(fh)
            header = list(reader.fieldnames or [])
            names = _resolve(header, columns or {}, p.name)
            out = []
            for row in reader:
                r = _row(row, names)
                if r is not None:
                    out.append(r)
    except UnicodeDecodeError as err:
        raise SceneReadError(f"{p.name}: not a text CSV file ({err.reason})") from err
    except csv.Error as err:
        raise SceneReadError(f"{p.name}: not a readable CSV file ({err})") from err
    if not out:
        raise SceneReadError(f"{p.name}: no usable position report (each needs an id, a time and a position)")
    return ReportList(out, {}, p.name)


def _resolve(header: list[str], given: dict[str, str], name: str) -> dict[str, str | None]:
    norm = {h.strip().lower().replace(" ", "_"): h for h in header}
    out: dict[str, str | None] = {}
    for key, aliases in COLUMN_ALIASES.items():
        if key in given:
            if given[key] not in header:
                raise ParameterError(f"{name}: no column named {given[key]!r} (columns: {', '.join(header)[:200]})")
            out[key] = given[key]
        else:
            out[key] = next((norm[a] for a in aliases if a in norm), None)
    missing = [k for k in REQUIRED if out[k] is None]
    if missing:
        raise ParameterError(
            f"{name}: no column for {', '.join(missing)} (columns: {', '.join(header)[:200]}); name them, "
            "e.g. --report-columns id=MMSI,time=BaseDateTime,lat=LAT,lon=LON"
        )
    return out


def _row(row: dict, names: dict[str, str | None]) -> PositionReport | None:
    def get(key: str) -> object:
        col = names[key]
        return row.get(col) if col else None

    vid = str(get("id") or "").strip()
    lat = _num(get("lat"), -90, 90, (91.0,))
    lon = _num(get("lon"), -180, 180, (181.0,))
    if not vid or lat is None or lon is None or not get("time"):
        return None
    try:
        t = parse_time(str(get("time")))
    except ParameterError:
        return None
    return PositionReport(
        vid,
        t,
        lat,
        lon,
        _num(get("sog"), 0, 102.2),
        _num(get("cog"), 0, 359.99),
        _num(get("heading"), 0, 359.99),
    )


_TAG_BLOCK = re.compile(r"^\\(?P<tags>[^\\]*)\\(?P<sentence>[!$].*)$")
_LEADING_TIME = re.compile(r"^(?P<time>[^!$\\]+?)[\s,;]+(?P<sentence>[!$]AIVD[MO].*)$")


def read_nmea(path: str | Path) -> ReportList:
    """Position reports (AIS types 1, 2, 3, 18 and 19) from NMEA sentences, each with its time either in a
    tag block (``\\c:UNIX_SECONDS*hh\\!AIVDM...``) or before the sentence (``2026-06-14T10:31:50Z !AIVDM...``)."""
    p = Path(path)
    _check_file(p)
    try:
        lines = p.read_text(encoding="ascii", errors="strict").splitlines()
    except UnicodeDecodeError as err:
        raise SceneReadError(f"{p.name}: not an NMEA text file") from err
    return reports_from_nmea_lines(lines, p.name)


def reports_from_nmea_lines(lines: Iterable[str], name: str = "sentences") -> ReportList:
    from pyais import NMEAMessage
    from pyais.exceptions import AISBaseException

    out: list[PositionReport] = []
    untimed = bad = 0
    dropped = {"wrong checksum": 0, "time out of range": 0}
    for raw in lines:
        line = raw.strip()
        if not line:
            continue
        time = None
        m = _TAG_BLOCK.match(line)
        if m:
            stamp = re.search(r"(?:^|,)c:(\d+)", m["tags"])
            time = _unix_time(stamp[1]) if stamp else None
            if stamp and time is None:
                dropped["time out of range"] += 1
                continue
            line = m["sentence"]
        else:
            m = _LEADING_TIME.match(line)
            if m:
                try:
                    time = parse_time(m["time"].strip())
                except ParameterError:
                    time = None
                line = m["sentence"]
        if time is None:
            untimed += 1
            continue
        try:
            msg = NMEAMessage(line.encode("ascii"))
            if not msg.is_valid:  # the sentence's checksum (NMEA 0183) does not match: not evidence
                dropped["wrong checksum"] += 1
                continue
            if msg.frag_cnt != 1:
                continue  # positions fit one sentence; longer messages are static data
            d = msg.decode().asdict()
        except (AISBaseException, ValueError, KeyError, UnicodeError):
            bad += 1
            continue
        if d.get("msg_type") not in (1, 2, 3, 18, 19):
            continue
        lat = _num(d.get("lat"), -90, 90, (91.0,))
        lon = _num(d.get("lon"), -180, 180, (181.0,))
        if lat is None or lon is None:
            continue
        out.append(
            PositionReport(
                str(d["mmsi"]),
                time,
                lat,
                lon,
                _num(d.get("speed"), 0, 102.2),
                _num(d.get("course"), 0, 359.99),
                _num(d.get("heading"), 0, 359.99),
            )
        )
    left_out = {k: v for k, v in dropped.items() if v}
    if not out:
        why = [f"{n} with a {k}" for k, n in left_out.items()]
        why += [f"{untimed} without a time"] if untimed else []
        why += [f"{bad} that do not decode"] if bad else []
        raise SceneReadError(
            f"{name}: no position report that can be used (sentences: {', '.join(why) or 'none of a position'}); "
            "see the README for the forms read"
        )
    return ReportList(out, left_out, name)


def read_reports(path: str | Path, columns: dict[str, str] | None = None) -> ReportList:
    """CSV or NMEA, told apart by content: NMEA lines start with '!', '$' or a tag block."""
    p = Path(path)
    _check_file(p)
    with open(p, "rb") as fh:
        head = fh.read(4096).decode("ascii", errors="replace")
    first = next((ln.strip() for ln in head.splitlines() if ln.strip()), "")
    if first.startswith(("!", "$", "\\")) or "!AIVD" in first:
        return read_nmea(p)
    return read_csv(p, columns)
