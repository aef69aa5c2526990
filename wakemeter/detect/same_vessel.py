"""Two analysed rows that are one vessel: the check the batch table and the window's vessel table make on the
results of scene-wide work, after the finder's own (``vessel_finder.one_per_vessel``).

Two results are one vessel when their vessels lie within ``same_place_m`` of each other (the analysis snaps a
point to the hull or the wake's apex it finds, so two points on one vessel end at one place), or when both
measured a wake and the two wakes agree: headings within three combined standard deviations plus
``same_heading_slack_deg``, speed intervals that overlap, and vessels within ``same_wake_m`` (one wake analysed
from two points of it, or a radar hull and the true position behind it; Raney 1971 gives the displacement, 113 m
per m/s of radial speed at R/V = 113 s).  The three are fields of :class:`~wakemeter.detect.tuning.Tuning`.
Rows the user named (listed or placed by hand) are never folded: only rows of the finder, into a named row or a
stronger row of the finder."""

from __future__ import annotations

import math
from collections.abc import Sequence

from .result import WakeAnalysis
from .tuning import DEFAULT_TUNING, Tuning


def _distance_m(a: WakeAnalysis, b: WakeAnalysis) -> float:
    return math.hypot(a.vessel_px[0] - b.vessel_px[0], a.vessel_px[1] - b.vessel_px[1]) * min(a.pixel_m, b.pixel_m)


def _wakes_agree(a: WakeAnalysis, b: WakeAnalysis, t: Tuning) -> bool:
    if a.speed is None or b.speed is None or a.heading_deg is None or b.heading_deg is None:
        return False
    dh = abs((a.heading_deg - b.heading_deg + 180.0) % 360.0 - 180.0)
    sd = math.hypot(a.heading_std_deg or 0.0, b.heading_std_deg or 0.0)
    overlap = a.speed.ci95_low_mps <= b.speed.ci95_high_mps and b.speed.ci95_low_mps <= a.speed.ci95_high_mps
    return dh <= 3.0 * sd + t.same_heading_slack_deg and overlap


def same_as(rows: Sequence[tuple[str, WakeAnalysis | None, bool]], t: Tuning = DEFAULT_TUNING) -> dict[int, int]:
    """{index: index of the row it repeats} for rows (name, result, found by the finder) of one scene.

    A row of the finder repeats a kept row that is the same vessel (see the module's note).  Rows the user
    named are all kept, and first; among the finder's, the one whose wake was found with the higher significance
    is kept (the first in the list on a tie)."""

    def strength(i: int) -> float:
        a = rows[i][1]
        return a.significance if a is not None and a.wake_found else -1.0

    order = sorted(range(len(rows)), key=lambda i: (rows[i][2], -strength(i), i))  # named rows first: kept
    kept: list[int] = []
    out: dict[int, int] = {}
    for i in order:
        _name, a, found = rows[i]
        home = None
        if found and a is not None:
            for k in kept:
                b = rows[k][1]
                if b is None:
                    continue
                d = _distance_m(a, b)
                if d <= t.same_place_m or (
                    a.wake_found and b.wake_found and d <= t.same_wake_m and _wakes_agree(a, b, t)
                ):
                    home = k
                    break
        if home is None:
            kept.append(i)
        else:
            out[i] = home
    return out
