"""Position reports at the scene's time, matched one to one with the vessels seen in the scene, and a
verdict per vessel in plain words: consistent, inconsistent (by how much, against the combined
uncertainty) or no report near this vessel.

* Each reporting vessel's track is interpolated to the scene time between the reports either side (linear
  in position, speed and course), or carried from the nearest report by its speed and course over ground
  (dead reckoning on the WGS 84 ellipsoid, pyproj.Geod) when the time is outside the track.
* Pairs are gated by distance and assigned one to one by the Hungarian method
  (``scipy.optimize.linear_sum_assignment``; Kuhn 1955) on the geodesic distance.
* Speeds are compared over ground when the analysis has it (measured by the hull's shift, or with a given
  current); otherwise the speed through the water stands in for it, and the verdict says so.
"""

from __future__ import annotations

import datetime as _dt
import math
import re
from collections import defaultdict
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from pyproj import Geod
from scipy.optimize import linear_sum_assignment

from ..detect.result import WakeAnalysis
from ..errors import ParameterError
from ..physics.units import KNOT_MPS
from .reports import PositionReport

GEOD = Geod(ellps="WGS84")
#: a report further than this from the scene time is not used (AIS class A reports every 2-10 s under way,
#: class B every 30 s; a gap of minutes means the vessel was not heard)
MAX_REPORT_GAP_S = 600.0
#: pairs further apart than this are not matched (georeferencing, antenna position and hull length, radar
#: shift of moving hulls; common practice, no source)
GATE_M = 500.0
#: standard uncertainty of a reported speed over ground (0.1 kn resolution, GNSS speed noise and the
#: interpolation; common practice, no source)
REPORTED_SOG_STD_KN = 0.3
#: standard uncertainty of a reported course over ground (common practice, no source)
REPORTED_COG_STD_DEG = 3.0
Z95 = 1.959963984540054


@dataclass(frozen=True)
class ReportedState:
    """One reporting vessel at the scene time."""

    vessel_id: str
    lat: float
    lon: float
    sog_kn: float | None
    cog_deg: float | None
    heading_deg: float | None
    gap_s: float  #: time to the nearest report used
    how: str


def _circular_mix(a: float | None, b: float | None, w: float) -> float | None:
    if a is None or b is None:
        return a if w < 0.5 else b
    d = ((b - a + 180.0) % 360.0) - 180.0
    return (a + w * d) % 360.0


def states_at(
    reports: Sequence[PositionReport], when: _dt.datetime, *, max_gap_s: float = MAX_REPORT_GAP_S
) -> list[ReportedState]:
    """Every reporting vessel's state at ``when`` (vessels without a report within ``max_gap_s`` are left out)."""
    by_id: dict[str, list[PositionReport]] = defaultdict(list)
    for r in reports:
        by_id[r.vessel_id].append(r)
    out = []
    for vid, rs in by_id.items():
        rs.sort(key=lambda r: r.time)
        before = [r for r in rs if r.time <= when]
        after = [r for r in rs if r.time > when]
        a = before[-1] if before else None
        b = after[0] if after else None
        ga = (when - a.time).total_seconds() if a else math.inf
        gb = (b.time - when).total_seconds() if b else math.inf
        if min(ga, gb) > max_gap_s:
            continue
        if a is not None and b is not None and ga <= max_gap_s and gb <= max_gap_s:
            span = (b.time - a.time).total_seconds()
            w = ga / span if span > 0 else 0.0
            az, _baz, dist = GEOD.inv(a.lon, a.lat, b.lon, b.lat)
            lon, lat, _ = GEOD.fwd(a.lon, a.lat, az, w * dist)
            sog = None if a.sog_kn is None or b.sog_kn is None else a.sog_kn + w * (b.sog_kn - a.sog_kn)
            out.append(
                ReportedState(
                    vid,
                    float(lat),
                    float(lon),
                    sog if sog is not None else (a.sog_kn if w < 0.5 else b.sog_kn),
                    _circular_mix(a.cog_deg, b.cog_deg, w),
                    _circular_mix(a.heading_deg, b.heading_deg, w),
                    min(ga, gb),
                    f"interpolated between reports {span:.0f} s apart",
                )
            )
            continue
        near, gap = (a, ga) if ga <= gb else (b, gb)
        assert near is not None
        sign = 1.0 if near is a else -1.0
        if near.sog_kn is not None and near.cog_deg is not None:
            lon, lat, _ = GEOD.fwd(near.lon, near.lat, near.cog_deg, sign * near.sog_kn * KNOT_MPS * gap)
            how = f"carried {gap:.0f} s {'on' if sign > 0 else 'back'} from a report by its speed and course"
        else:
            lon, lat, how = near.lon, near.lat, f"the report {gap:.0f} s away, as it stands (no speed or course)"
        out.append(ReportedState(vid, float(lat), float(lon), near.sog_kn, near.cog_deg, near.heading_deg, gap, how))
    return out


@dataclass(frozen=True)
class SeenVessel:
    """A vessel as the analysis saw it."""

    name: str
    lon: float
    lat: float
    speed_kn: float | None
    ci95_kn: tuple[float, float] | None
    heading_deg: float | None
    heading_std_deg: float | None
    basis: str  #: what the speed is: "over ground", or "through the water" (standing in for over ground)


@dataclass(frozen=True)
class Comparison:
    seen: SeenVessel
    reported: ReportedState | None
    distance_m: float | None
    verdict: str  #: consistent, inconsistent, not comparable, no report
    text: str
    speed_difference_kn: float | None = None
    combined_std_kn: float | None = None
    course_difference_deg: float | None = None

    def to_json(self) -> dict:
        r = self.reported
        return {
            "vessel": self.seen.name,
            "verdict": self.verdict,
            "text": self.text,
            "report_id": None if r is None else r.vessel_id,
            "reported_sog_kn": None if r is None else r.sog_kn,
            "reported_cog_deg": None if r is None else r.cog_deg,
            "reported_heading_deg": None if r is None else r.heading_deg,
            "reported_position": None if r is None else [r.lon, r.lat],
            "report_time_gap_s": None if r is None else r.gap_s,
            "report_how": None if r is None else r.how,
            "distance_m": self.distance_m,
            "wake_speed_kn": self.seen.speed_kn,
            "wake_speed_ci95_kn": None if self.seen.ci95_kn is None else list(self.seen.ci95_kn),
            "wake_speed_basis": self.seen.basis,
            "wake_heading_deg": self.seen.heading_deg,
            "speed_difference_kn": self.speed_difference_kn,
            "combined_std_kn": self.combined_std_kn,
            "course_difference_deg": self.course_difference_deg,
        }


def _verdict(s: SeenVessel, r: ReportedState, dist: float) -> Comparison:
    where = f"report {r.vessel_id} ({r.how}) {dist:.0f} m from the vessel"
    if s.speed_kn is None or s.ci95_kn is None:
        return Comparison(s, r, dist, "not comparable", f"{where}; the wake gave no speed to compare")
    if r.sog_kn is None:
        return Comparison(s, r, dist, "not comparable", f"{where}; the report gives no speed")
    diff = s.speed_kn - r.sog_kn
    half = (s.speed_kn - s.ci95_kn[0]) if diff > 0 else (s.ci95_kn[1] - s.speed_kn)
    sd = math.hypot(max(half, 0.0) / Z95, REPORTED_SOG_STD_KN)
    course = None
    if s.heading_deg is not None and r.cog_deg is not None:
        course = ((s.heading_deg - r.cog_deg + 180.0) % 360.0) - 180.0
    basis = "" if s.basis == "over ground" else " (the wake's speed through the water stands in for over ground)"
    course_text = ""
    if course is not None:
        c_sd = math.hypot(s.heading_std_deg or 0.0, REPORTED_COG_STD_DEG)
        agree = "agrees" if abs(course) <= Z95 * c_sd else "differs"
        course_text = f"; course {agree}: heading {s.heading_deg:.0f}° against {r.cog_deg:.0f}° reported"
    numbers = (
        f"wake {s.speed_kn:.1f} kn (95 %: {s.ci95_kn[0]:.1f}-{s.ci95_kn[1]:.1f}), reported {r.sog_kn:.1f} kn over "
        f"ground{basis}"
    )
    if abs(diff) <= Z95 * sd:
        return Comparison(s, r, dist, "consistent", f"consistent: {numbers}; {where}{course_text}", diff, sd, course)
    return Comparison(
        s,
        r,
        dist,
        "inconsistent",
        f"inconsistent: the wake says {abs(diff):.1f} kn {'more' if diff > 0 else 'less'} than reported "
        f"({abs(diff) / sd:.1f} times the combined standard uncertainty of {sd:.1f} kn); {numbers}; "
        f"{where}{course_text}",
        diff,
        sd,
        course,
    )


def match(
    seen: Sequence[SeenVessel], states: Sequence[ReportedState], *, gate_m: float = GATE_M
) -> tuple[list[Comparison], list[ReportedState]]:
    """One comparison per seen vessel (in order), and the reporting vessels matched to none."""
    if not gate_m > 0:
        raise ParameterError(f"the matching distance must be > 0 m, got {gate_m}")
    n, m = len(seen), len(states)
    cost = np.full((n, m), np.inf)
    for i, s in enumerate(seen):
        for j, r in enumerate(states):
            _a, _b, d = GEOD.inv(s.lon, s.lat, r.lon, r.lat)
            cost[i, j] = d
    pairs: dict[int, int] = {}
    if n and m:
        big = 1e12
        rows, cols = linear_sum_assignment(np.where(cost <= gate_m, cost, big))
        pairs = {int(i): int(j) for i, j in zip(rows, cols) if cost[i, j] <= gate_m}
    out = []
    for i, s in enumerate(seen):
        if i in pairs:
            j = pairs[i]
            out.append(_verdict(s, states[j], float(cost[i, j])))
            continue
        near = ""
        if m:
            j = int(np.argmin(cost[i]))
            near = f" (nearest: {states[j].vessel_id}, {cost[i, j]:.0f} m away)"
        out.append(
            Comparison(s, None, None, "no report", f"no position report near this vessel within {gate_m:.0f} m{near}")
        )
    matched = set(pairs.values())
    return out, [r for j, r in enumerate(states) if j not in matched]


def seen_from_result(name: str, a: WakeAnalysis) -> SeenVessel | None:
    """A seen vessel from a result; None without a longitude and latitude.  Its speed is over ground when the
    analysis measured it so, or when a current turned the speed through the water into one."""
    if not a.vessel_lonlat:
        return None
    lon, lat = a.vessel_lonlat
    check = a.speed_check()
    speed = ci = None
    basis = "through the water"
    if (
        check is not None
        and check.over_ground is not None
        and (check.current is not None or check.measured_over_ground)
    ):
        g = check.over_ground
        speed, ci, basis = g.median_mps / KNOT_MPS, (g.ci95_mps[0] / KNOT_MPS, g.ci95_mps[1] / KNOT_MPS), "over ground"
    elif a.speed is not None:
        sp = a.speed
        speed, ci = sp.speed_mps / KNOT_MPS, (sp.ci95_low_mps / KNOT_MPS, sp.ci95_high_mps / KNOT_MPS)
        basis = a.speed_basis or "through the water"
    return SeenVessel(name, lon, lat, speed, ci, a.heading_deg, a.heading_std_deg, basis)


def compare_results(
    named_results: Sequence[tuple[str, WakeAnalysis]],
    reports: Sequence[PositionReport],
    when: _dt.datetime,
    *,
    gate_m: float = GATE_M,
    max_gap_s: float = MAX_REPORT_GAP_S,
) -> tuple[list[Comparison | None], list[ReportedState]]:
    """For results (name, analysis): a comparison each (None for a result without longitude and
    latitude, which cannot be placed), and the reporting vessels matched to none."""
    seen = [(i, seen_from_result(name, r)) for i, (name, r) in enumerate(named_results)]
    placed = [(i, s) for i, s in seen if s is not None]
    comps, unmatched = match([s for _i, s in placed], states_at(reports, when, max_gap_s=max_gap_s), gate_m=gate_m)
    out: list[Comparison | None] = [None] * len(named_results)
    for (i, _s), c in zip(placed, comps, strict=True):
        out[i] = c
    return out, unmatched


def scene_time(acquisition_time: str | None, given: str | None) -> _dt.datetime:
    """The time the position reports are taken at: the one given, else the scene's own."""
    from .reports import parse_time

    if given:
        return parse_time(given)
    if not acquisition_time:
        raise ParameterError(
            "the scene's acquisition time is not in its metadata: give it (ISO 8601 UTC, e.g. --scene-time "
            "2026-06-14T10:32:05Z) to compare with position reports"
        )
    if re.fullmatch(r"\s*\d{4}[-:]\d\d[-:]\d\d\s*", acquisition_time):  # a date only (from a file name, say)
        raise ParameterError(
            f"the scene gives only its date ({acquisition_time.strip()}), not the time of day: give the time "
            "(ISO 8601 UTC, e.g. --scene-time 2026-06-14T10:32:05Z) to compare with position reports"
        )
    return parse_time(acquisition_time)
