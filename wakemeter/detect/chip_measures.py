"""Measurements on a prepared chip once the wake and its track are known: the crest profile along the
track, the wedge of wave energy and its arms, and the lines to draw."""

from __future__ import annotations

import numpy as np

from . import arms as arms_mod
from .findings import Drawing, Segment, SegmentKind
from .prepare import Chip
from .robust import median_spread
from .trackframe import track_frame
from .tuning import REACH_FRACTION

#: drawn lines reach this fraction of the chip side from the vessel (inside the chip for any direction)
DRAW_LENGTH_FRACTION = 0.45


def track_profile(chip: Chip, back: float, lam_pred: float, m: float, *, gap_px: int, box_px: int) -> np.ndarray:
    """Mean of a narrow band along the track behind the vessel (for the transverse crest spacing)."""
    tf = track_frame(chip.data, chip.vessel_rc, back, u_range=(gap_px, gap_px + 2 * box_px), v_half=box_px / 2)
    c = tf.shape[0] // 2
    half_w = int(max(1, min(lam_pred / m / 6, 6))) if np.isfinite(lam_pred) else 2
    valid_u = np.nonzero(np.abs(tf[c]) > 0)[0]
    return tf[c - half_w : c + half_w + 1, : valid_u.max() + 1 if valid_u.size else 1].mean(axis=0)


def track_rows(
    chip: Chip,
    back: float,
    lam_pred: float,
    m: float,
    *,
    centre_rc: tuple[float, float],
    u_range: tuple[int, int],
    half_width_waves: float,
    half_max_px: float,
) -> tuple[np.ndarray, int]:
    """Parallel profiles along the track behind the vessel at ``centre_rc``, one per pixel row across it, out
    to ``half_width_waves`` transverse wavelengths either side (the crests curve back further out), over the
    longest stretch of ``u_range`` where all of them lie on valid water (the hull's mask and the chip's edge
    end it); also the distance behind the vessel (pixels) of their first column."""
    half = int(np.clip(half_width_waves * lam_pred / m if np.isfinite(lam_pred) else 2, 2, half_max_px))
    tf = track_frame(chip.data, centre_rc, back, u_range=u_range, v_half=half + 1)
    inside = track_frame(chip.valid.astype(np.float32), centre_rc, back, u_range=u_range, v_half=half + 1, order=0) > 0
    rows = slice(1, 2 * half + 2)
    ok = np.concatenate([[False], inside[rows].all(axis=0), [False]])
    edges = np.flatnonzero(np.diff(ok.astype(np.int8)))
    starts, ends = edges[0::2], edges[1::2]
    if not starts.size:
        return tf[rows, :0], u_range[0]
    k = int(np.argmax(ends - starts))
    return tf[rows, starts[k] : ends[k]], u_range[0] + int(starts[k])


def wedge_arms(
    chip: Chip, back: float, lam_pred: float, m: float, *, gap_px: int, k_hi_factor: float
) -> tuple[arms_mod.Arms | None, np.ndarray, np.ndarray, int]:
    """Half-angle from the outer edge of the wave energy in a wide track frame; also returns the energy
    map, its valid mask and the vessel's column in it."""
    reach = int(REACH_FRACTION * chip.data.shape[0])
    wide = track_frame(chip.data, chip.vessel_rc, back, u_range=(-reach, reach), v_half=reach)
    wvalid = (
        track_frame(chip.valid.astype(np.float32), chip.vessel_rc, back, u_range=(-reach, reach), v_half=reach, order=0)
        > 0
    )
    k_t = 2 * np.pi / lam_pred if np.isfinite(lam_pred) else 2 * np.pi / (20 * m)
    energy = arms_mod.wave_energy(
        wide,
        m,
        k_lo=0.5 * k_t,
        k_hi=min(k_hi_factor * k_t, 2 * np.pi / (2.6 * m)),
        smooth_px=max(1.5, 0.3 * lam_pred / m if np.isfinite(lam_pred) else 3),
    )
    ahead_e = energy[:, : reach - gap_px][wvalid[:, : reach - gap_px]]
    bg, noise = median_spread(ahead_e, floor=0.0) if ahead_e.size else (0.0, 1e-9)
    energy = np.where(wvalid, energy, 0.0)
    found = arms_mod.half_angle_from_edges(energy[:, reach:], u_offset=0, background=bg, noise=max(noise, 1e-12))
    return found, energy, wvalid, reach


def chip_outline(chip: Chip) -> Segment:
    """The analysed area as a closed polyline in scene pixels."""
    n = chip.data.shape[0]
    return Segment(
        SegmentKind.AREA, tuple(chip.to_scene(r - 0.5, c - 0.5) for r, c in ((0, 0), (0, n), (n, n), (n, 0), (0, 0)))
    )


def wake_drawing(chip: Chip, back: float, half: float | None, arms, narrow: list | None = None) -> Drawing:
    """The analysed area, the track, the arms and the radar narrow V as typed segments."""
    n = chip.data.shape[0]
    length = DRAW_LENGTH_FRACTION * n
    r0, c0 = chip.vessel_rc

    def ray(kind: SegmentKind, angle_deg: float) -> Segment:
        a = np.radians(angle_deg)
        return Segment(kind, (chip.to_scene(r0, c0), chip.to_scene(r0 - length * np.sin(a), c0 + length * np.cos(a))))

    segs = [chip_outline(chip), ray(SegmentKind.TRACK, back)]
    if half is not None and arms is not None:
        segs.append(ray(SegmentKind.ARM_LEFT, back + (arms.left_deg if np.isfinite(arms.left_deg) else half)))
        segs.append(ray(SegmentKind.ARM_RIGHT, back - (arms.right_deg if np.isfinite(arms.right_deg) else half)))
    for ln in narrow or []:
        kind = SegmentKind.NARROW_V_LEFT if ln.angle_from_track_deg > 0 else SegmentKind.NARROW_V_RIGHT
        segs.append(ray(kind, back + ln.angle_from_track_deg))
    return Drawing(tuple(segs))
