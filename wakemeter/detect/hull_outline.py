"""The length of a hull's own outline, only where it is told apart from its foam.

A moving boat's white foam and wake are often as bright as its hull: the blob around a click is then the hull
with its foam, and its length is not the hull's (on real 1.5 m images this gave "hulls" of 101 m and 154 m
for boats of about 12 m and 60 m).  The outline is the hull's core (above half the blob's peak) measured along
the track; it is accepted only when

* the pixels are small enough to resolve a hull at all;
* nothing above a quarter of the peak continues behind the core anywhere across the stern (a foam trail or a
  planing boat's foam V attached to the stern would);
* the core is no more elongated than a hull can be.

And the other way round (:func:`line_is_the_hull`): a bright line from the point that is the rest of a white
hull, not a wake (a bright superstructure is the blob's peak; the hull around it is then less than a quarter
of that peak and is scored as a line).
"""

from __future__ import annotations

import numpy as np
from scipy import ndimage

from .line_chip import Hull, LineChip
from .tuning import Tuning
from .wakeline import LineWake


def hull_outline_length_m(hull: Hull, back_deg: float, m_per_px: float, tuning: Tuning) -> tuple[float | None, str]:
    """(length in m, "") of the hull's outline along the track ``back_deg`` (image angle, vessel -> wake), or
    (None, why) when the outline is not separated from its foam or not resolved."""
    if m_per_px > tuning.resolved_hull_pixel_m:
        return None, (
            f"at {m_per_px:.1f} m per pixel a hull's outline cannot be told from its foam (needs "
            f"{tuning.resolved_hull_pixel_m:g} m or finer)"
        )
    a = np.radians(back_deg)

    def aft_reach(mask: np.ndarray) -> float:
        """How far the mask reaches behind the centre along the track, over its whole width."""
        rr, cc = np.nonzero(mask)
        return float(((cc - hull.rc[1]) * np.cos(a) - (rr - hull.rc[0]) * np.sin(a)).max(initial=0.0))

    aft_core = aft_reach(hull.core)
    fore_core = float(hull.extent_px(np.array([back_deg + 180.0]))[0])
    length_px = float(aft_core + fore_core + 1.0)
    # foam attached anywhere across the stern (a trail on the centre line, or a foam V from its corners)
    trailing = aft_reach(hull.mask) - aft_core
    if trailing > max(tuning.hull_foam_margin_px, tuning.hull_foam_margin_rel * length_px):
        return None, (
            f"bright foam or wake continues {trailing * m_per_px:.0f} m behind the hull's outline, so its length "
            "cannot be measured on the image"
        )
    rr, cc = np.nonzero(hull.core)
    across = (cc - hull.rc[1]) * np.sin(a) + (rr - hull.rc[0]) * np.cos(a)
    width_px = float(np.ptp(across)) + 1.0 if across.size else 1.0
    if length_px > tuning.hull_outline_elongation_max * width_px:
        return None, (
            f"the bright outline is {length_px / width_px:.0f} times longer than wide: a hull with its foam or a "
            "line, not a hull alone"
        )
    return length_px * m_per_px, ""


def line_is_the_hull(chip: LineChip, wake: LineWake, tuning: Tuning) -> str:
    """Why the bright line from the point is the vessel's own hull (or superstructure) rather than a wake, or
    "" when it is not.

    Only at pixels of ``hull_line_max_pixel_m`` and finer, where a hull's plateau spans many pixels.  A hull
    seen from above is a plateau of brightness that ends sharply at its bow or stern with open water
    beyond; foam and wakes fade away gradually or go on.  Along the line from the blob at the point: the
    profile (the brightest of three samples across it) stays above 70 % of its start (the median of its first
    five samples) until it falls below a quarter within the blur of an edge, nothing bright follows over twice
    its length, and the whole object is no longer than a ship.
    """
    if wake.dark or chip.radar or chip.hull is None or chip.m_per_px > tuning.hull_line_max_pixel_m:
        return ""
    angle = wake.back_deg
    start = float(chip.hull.extent_px(np.array([angle]), whole=True)[0])
    r = np.arange(0.0, 0.42 * chip.img.shape[0] - start, 1.0)
    if r.size < 12:
        return ""
    a = np.radians(angle)
    ur, uc = -np.sin(a), np.cos(a)
    lat = np.array([-1.0, 0.0, 1.0])
    rows = chip.vessel_rc[0] + (start + r)[:, None] * ur + lat[None, :] * uc
    cols = chip.vessel_rc[1] + (start + r)[:, None] * uc - lat[None, :] * ur
    prof = ndimage.map_coordinates(chip.img, [rows.ravel(), cols.ravel()], order=1).reshape(rows.shape).max(axis=1)
    p0 = float(np.median(prof[:5]))
    if p0 < tuning.hull_line_min_z:
        return ""
    below = np.nonzero(prof < 0.25 * p0)[0]
    if below.size == 0 or below[0] < 4:
        return ""
    e = int(below[0])
    plateau = (
        float(prof[: e - int(tuning.hull_edge_blur_px)].min()) >= tuning.hull_plateau_share * p0
    )  # the last pixels: the blurred edge
    beyond = prof[e + 1 : e + 1 + max(2 * e, 10)]
    quiet = beyond.size > 0 and float(np.mean(beyond)) < 0.1 * p0
    length_m = (start + e + float(chip.hull.extent_px(np.array([angle + 180.0]))[0])) * chip.m_per_px
    if plateau and quiet and length_m <= tuning.hull_length_max_m:
        return (
            f"the bright line from the point is {length_m:.0f} m of even brightness ending sharply with open water "
            "beyond, as a hull or its superstructure does; a wake fades or goes on: this is the vessel itself"
        )
    return ""
