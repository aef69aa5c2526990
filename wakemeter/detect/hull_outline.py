"""The length of a hull's own outline, only where it is told apart from its foam.

A moving boat's white foam and wake are often as bright as its hull: the blob around a click is then the hull
with its foam, and its length is not the hull's (on real 1.5 m images this gave "hulls" of 101 m and 154 m
for boats of about 12 m and 60 m).  The outline is the hull's core (above half the blob's peak) measured along
the track; it is accepted only when

* the pixels are small enough to resolve a hull at all;
* nothing above a quarter of the peak continues behind the core (foam or wake attached to the stern would);
* the core is no more elongated than a hull can be.
"""

from __future__ import annotations

import numpy as np

from .line_chip import Hull
from .tuning import Tuning


def hull_outline_length_m(hull: Hull, back_deg: float, m_per_px: float, tuning: Tuning) -> tuple[float | None, str]:
    """(length in m, "") of the hull's outline along the track ``back_deg`` (image angle, vessel -> wake), or
    (None, why) when the outline is not separated from its foam or not resolved."""
    if m_per_px > tuning.resolved_hull_pixel_m:
        return None, (
            f"at {m_per_px:.1f} m per pixel a hull's outline cannot be told from its foam (needs "
            f"{tuning.resolved_hull_pixel_m:g} m or finer)"
        )
    angles = np.array([back_deg, back_deg + 180.0])
    aft_core, fore_core = hull.extent_px(angles)
    aft_blob = float(hull.extent_px(np.array([back_deg]), whole=True)[0])
    length_px = float(aft_core + fore_core + 1.0)
    trailing = aft_blob - float(aft_core)
    if trailing > max(tuning.hull_foam_margin_px, tuning.hull_foam_margin_rel * length_px):
        return None, (
            f"bright foam or wake continues {trailing * m_per_px:.0f} m behind the hull's outline, so its length "
            "cannot be measured on the image"
        )
    rr, cc = np.nonzero(hull.core)
    a = np.radians(back_deg)
    across = (cc - hull.rc[1]) * np.sin(a) + (rr - hull.rc[0]) * np.cos(a)
    width_px = float(np.ptp(across)) + 1.0 if across.size else 1.0
    if length_px > tuning.hull_outline_elongation_max * width_px:
        return None, (
            f"the bright outline is {length_px / width_px:.0f} times longer than wide: a hull with its foam or a "
            "line, not a hull alone"
        )
    return length_px * m_per_px, ""
