"""Speed over ground from a moving hull's shift between two bands recorded a known time apart.

A push-broom sensor whose bands lie side by side on its focal plane records the same ground point in
each band a fraction of a second apart (Sentinel-2: B04 about 1 s after B02, see
:mod:`wakemeter.scene.sensor`).  Land and water stand still between the two looks; a moving hull does
not.  Its shift divided by the delay is its velocity over ground (Heiselberg 2019).

Where the hull is: its foam and wake are bright too, and they stay where they were made, so a centroid of
the bright blob is pulled backwards by different amounts in different bands (Heiselberg 2019 notes the
same).  Here the along-track position is the hull's *leading edge*: the point where the brightness,
coming from ahead of the vessel along the track, first reaches half of its peak, interpolated between
pixels.  The foam lies behind the bow and does not move that edge.  The across-track position is the
centroid of the brightest cross-section near the edge.

References
----------
1. Heiselberg, H. (2019). Aircraft and ship velocity determination in Sentinel-2 multispectral images.
   *Sensors* 19(13), 2873.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy import ndimage

from ..physics import inversion as inv
from ..scene.raster import Scene
from ..scene.sensor import BandTiming, band_timing
from .tuning import DEFAULT_TUNING, Tuning

MC_DRAWS = 4000


@dataclass(frozen=True)
class BandShift:
    """The hull's shift from the first to the last band, scene pixels (col, row), and the speed it gives."""

    shift_px: tuple[float, float]
    along_px: float  #: along the direction of travel (positive: forwards)
    across_px: float
    edge_std_px: tuple[float, float]  #: leading-edge standard uncertainty in each band
    course_deg: float  #: true bearing of the shift
    estimate: inv.SpeedEstimate
    timing: BandTiming
    #: the bands recorded between the two (band name, the hull's along-track shift from the first band in px,
    #: its standard uncertainty), where their edge is clear
    between: tuple[tuple[str, float, float], ...] = ()


def scene_band_timing(scene: Scene) -> BandTiming | None:
    """The published time between two of the scene's bands, when the sensor table recognises the scene."""
    return band_timing(scene.info.band_descriptions, scene.info.path.name, scene.info.tags)


def _edge(profile: np.ndarray, positions: np.ndarray, reach_px: int) -> tuple[float, float]:
    """Position where ``profile`` (ordered from ahead of the vessel towards its stern) first reaches half of
    its peak above the level ahead, and its standard uncertainty from the noise ahead; NaN if no edge."""
    ahead = profile[: reach_px // 2]
    base = float(np.median(ahead))
    noise = float(np.std(ahead)) or 1e-6
    k = int(np.argmax(profile))
    peak = float(profile[k]) - base
    if peak < 6 * noise or k == 0:
        return np.nan, np.nan
    half = base + 0.5 * peak
    below = np.nonzero(profile[:k] < half)[0]
    if below.size == 0:
        return np.nan, np.nan
    i = int(below[-1])
    y0, y1 = float(profile[i]), float(profile[i + 1])
    t = (half - y0) / (y1 - y0) if y1 != y0 else 0.5
    slope = (y1 - y0) / (positions[i + 1] - positions[i])
    return float(positions[i] + t * (positions[i + 1] - positions[i])), float(noise / max(abs(slope), 1e-9))


def measure_band_shift(
    scene: Scene,
    vessel_px: tuple[float, float],
    back_deg: float,
    timing: BandTiming,
    *,
    rng: np.random.Generator,
    tuning: Tuning = DEFAULT_TUNING,
) -> BandShift | None:
    """The hull's shift between ``timing.first_band`` and ``timing.last_band`` at ``vessel_px`` (scene col,
    row), travelling opposite to the image angle ``back_deg`` of its wake; None when no clear edge is found
    in either band."""
    col, row = vessel_px
    bands = (timing.first_band, timing.last_band) + tuple(timing.between)
    found = _leading_edges(scene, vessel_px, back_deg, bands, tuning)
    if found is None or not all(np.isfinite(found[k][0]) for k in (0, 1)):
        return None
    edges = [found[0][0], found[1][0]]
    stds = [found[0][1], found[1][1]]
    across = [found[0][2], found[1][2]]
    a = np.radians(back_deg + 180.0)  # direction of travel (image angle)
    fr, fc = -np.sin(a), np.cos(a)  # forwards (row, col)
    lr, lc = -fc, fr  # to the left
    along = edges[1] - edges[0]
    acr = across[1] - across[0]
    dcol, drow = along * fc + acr * lc, along * fr + acr * lr
    frame = scene.local_frame(col, row)
    # Monte Carlo (JCGM 101:2008): edge and co-registration errors per band and axis, the delay's uncertainty
    n = MC_DRAWS
    reg = timing.co_registration_std_px
    s_along = np.sqrt(stds[0] ** 2 + stds[1] ** 2 + 2 * reg**2)
    s_across = np.sqrt(2 * tuning.band_shift_across_std_px**2 + 2 * reg**2)
    da = along + rng.normal(0, s_along, n)
    dx = acr + rng.normal(0, s_across, n)
    delay = timing.delay_s * (1 + rng.normal(0, timing.delay_rel_std, n))
    gc, gr = da * fc + dx * lc, da * fr + dx * lr
    e_m, n_m = frame.ground_vector(gc, gr)
    speeds = np.hypot(e_m, n_m) / delay
    lo, med, hi = np.percentile(speeds, [2.5, 50, 97.5])
    est = inv.SpeedEstimate(
        method="hull shift between bands (speed over ground)",
        speed_mps=float(med),
        std_mps=float(np.std(speeds)),
        ci95_low_mps=float(lo),
        ci95_high_mps=float(hi),
        draws=n,
        valid_fraction=1.0,
        assumptions=(
            f"bands {timing.first_band} and {timing.last_band} of a {timing.sensor} scene, {timing.source}",
            "the hull's leading edge moves with the hull; its foam and the land stand still",
            f"band co-registration {reg} px per axis ({timing.sensor}): an assumed value, not read from the product",
            "speed over ground: equals the speed through the water only in still water",
        ),
        over_ground=True,
    )
    names = timing.between_names or tuple(f"number {b}" for b in timing.between)
    between = tuple(
        (name, float(e - edges[0]), float(np.hypot(s, stds[0])))
        for name, (e, s, _) in zip(names, found[2:])
        if np.isfinite(e)
    )
    return BandShift(
        (float(dcol), float(drow)),
        float(along),
        float(acr),
        (stds[0], stds[1]),
        float(frame.bearing_of(dcol, drow)) % 360.0,
        est,
        timing,
        between,
    )


def _leading_edges(
    scene: Scene, vessel_px: tuple[float, float], back_deg: float, bands: tuple[int, ...], tuning: Tuning
) -> list[tuple[float, float, float]] | None:
    """For each band: the forwards coordinate of the hull's leading edge (px from ``vessel_px`` along the
    direction of travel, opposite to the image angle ``back_deg``), its standard uncertainty, and the
    across-track centre of the hull behind it; NaN where a band shows no clear edge or has nodata there.  None
    near the scene's edge or where the first two bands have nodata."""
    col, row = vessel_px
    reach = int(tuning.band_shift_edge_reach_px)
    half = reach + 4
    c0, r0 = int(np.floor(col)) - half, int(np.floor(row)) - half
    if c0 < 0 or r0 < 0 or c0 + 2 * half + 1 > scene.width or r0 + 2 * half + 1 > scene.height:
        return None
    data, ok = scene.read(window=(c0, r0, 2 * half + 1, 2 * half + 1), bands=bands)
    if not ok[:2].all():  # the first two bands must be whole; a band after them with nodata has no edge
        return None
    a = np.radians(back_deg + 180.0)  # direction of travel (image angle)
    fr, fc = -np.sin(a), np.cos(a)  # forwards (row, col)
    lr, lc = -fc, fr  # to the left
    t = np.arange(reach, -reach - 1e-9, -0.25)  # from ahead to behind, in px along the track
    lat = np.arange(-1.0, 1.0 + 1e-9, 0.5)
    vr, vc = row - r0, col - c0
    out = []
    for b in range(len(bands)):
        if not ok[b].all():
            out.append((np.nan, np.nan, np.nan))
            continue
        img = ndimage.gaussian_filter(data[b].astype(float), 0.5)
        rows = vr + t[:, None] * fr + lat[None, :] * lr
        cols = vc + t[:, None] * fc + lat[None, :] * lc
        prof = ndimage.map_coordinates(img, [rows.ravel(), cols.ravel()], order=1, mode="nearest")
        prof = prof.reshape(rows.shape).mean(axis=1)
        e, s = _edge(prof, -t, reach)  # positions measured backwards from the vessel; the edge is where the hull starts
        if not np.isfinite(e):
            out.append((np.nan, np.nan, np.nan))
            continue
        # across: the brightness-weighted lateral centre of the cross-section two pixels behind the edge
        cross = np.arange(-4.0, 4.0 + 1e-9, 0.5)
        at = -e - 2.0
        cr = vr + at * fr + cross * lr
        cc = vc + at * fc + cross * lc
        x = ndimage.map_coordinates(img, [cr, cc], order=1, mode="nearest")
        w = np.clip(x - np.median(img), 0, None)
        centre = float((w * cross).sum() / w.sum()) if w.sum() > 0 else 0.0
        out.append((-e, max(s, tuning.band_shift_edge_std_floor_px), centre))
    return out


def not_motion(shift: BandShift, tuning: Tuning = DEFAULT_TUNING) -> str | None:
    """A reason when a band recorded between the two does not show the hull part of the way from its first to
    its last position (tuning.band_shift_between_share, within band_shift_clear_sigmas standard uncertainties):
    the edges then moved for another reason (a colour edge, glint, foam that is not the hull).  None when they
    agree, or when the shift is too small to judge."""
    reg = shift.timing.co_registration_std_px
    s = shift.along_px
    s_std = float(np.sqrt(shift.edge_std_px[0] ** 2 + shift.edge_std_px[1] ** 2 + 2 * reg**2))
    z = tuning.band_shift_clear_sigmas
    if s <= z * s_std:
        return None
    lo, hi = tuning.band_shift_between_share
    first, last = shift.timing.pair_names
    for band, moved, std in shift.between:
        share = moved / s
        k_std = float(np.hypot(std, np.sqrt(2) * reg))
        share_std = float(np.hypot(k_std, share * s_std)) / s
        if share + z * share_std < lo or share - z * share_std > hi:
            return (
                f"band {band}, recorded between {first} and {last}, shows the hull's edge {moved:.2f} pixels along, "
                f"where a hull that moved {s:.2f} pixels from {first} to {last} would show it "
                f"{lo * s:.1f}-{hi * s:.1f} pixels along: the shift between bands is not the hull's motion (a colour "
                "edge, glint or foam)"
            )
    return None


def moves_against(
    scene: Scene,
    vessel_px: tuple[float, float],
    heading_deg: float,
    timing: BandTiming,
    tuning: Tuning = DEFAULT_TUNING,
) -> str | None:
    """A reason when the hull's shift between bands shows it moving against the true bearing ``heading_deg``:
    read along the opposite direction its leading edge moves forwards clearly, read along ``heading_deg`` it
    does not.  None when the shift cannot be read, or agrees, or is unclear either way.

    The leading edge is the hull's end away from its wake: it moves with the hull between the bands, while the
    other end borders foam that stays where it was made, so the edge read on the wrong end barely moves."""
    frame = scene.local_frame(*vessel_px)
    dc, dr = frame.image_direction(heading_deg)
    travel = float(np.degrees(np.arctan2(-dr, dc)))
    rng = np.random.default_rng(0)
    along, against = (
        measure_band_shift(scene, vessel_px, back, timing, rng=rng, tuning=tuning) for back in (travel + 180.0, travel)
    )

    def clear(s: BandShift | None) -> bool:
        if s is None:
            return False
        reg = timing.co_registration_std_px
        std = float(np.sqrt(s.edge_std_px[0] ** 2 + s.edge_std_px[1] ** 2 + 2 * reg**2))
        return s.along_px > tuning.band_shift_clear_sigmas * std

    if against is None or not clear(against) or clear(along):
        return None
    return (
        f"the hull's shift between bands, {np.hypot(*against.shift_px):.2f} pixels on a course of "
        f"{against.course_deg:.0f}\N{DEGREE SIGN}, shows it moving against the fit's heading of "
        f"{heading_deg:.0f}\N{DEGREE SIGN}"
    )
