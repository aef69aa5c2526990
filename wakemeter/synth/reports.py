"""Position reports of known truth: a vessel on a straight course at constant speed over ground, reported
every few seconds (for tests and the demo)."""

from __future__ import annotations

import datetime as _dt

from pyproj import Geod

from ..physics.units import KNOT_MPS
from ..positions.reports import PositionReport

GEOD = Geod(ellps="WGS84")


def straight_track(
    vessel_id: str,
    lon: float,
    lat: float,
    course_deg: float,
    sog_kn: float,
    at: _dt.datetime,
    *,
    before_s: float = 120.0,
    after_s: float = 120.0,
    every_s: float = 10.0,
    offset_s: float = 3.0,
) -> list[PositionReport]:
    """Reports of a vessel that is at (lon, lat) at time ``at``, heading ``course_deg`` at ``sog_kn``; the
    report times are ``offset_s`` off the grid of ``every_s`` so that ``at`` falls between two of them."""
    out = []
    t = -before_s + offset_s
    while t <= after_s:
        x, y, _ = GEOD.fwd(lon, lat, course_deg, sog_kn * KNOT_MPS * t)
        out.append(
            PositionReport(
                vessel_id,
                at + _dt.timedelta(seconds=t),
                float(y),
                float(x),
                sog_kn,
                course_deg % 360.0,
                course_deg % 360.0,
            )
        )
        t += every_s
    return out


def to_csv_text(reports: list[PositionReport]) -> str:
    """The reports as a CSV with the columns most AIS exports use."""
    lines = ["MMSI,BaseDateTime,LAT,LON,SOG,COG,Heading"]
    for r in reports:
        lines.append(
            f"{r.vessel_id},{r.time.strftime('%Y-%m-%dT%H:%M:%S')},{r.lat:.6f},{r.lon:.6f},"
            f"{r.sog_kn:.1f},{r.cog_deg:.1f},{r.heading_deg:.0f}"
        )
    return "\n".join(lines) + "\n"
