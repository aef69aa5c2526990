"""Measurements on a prepared chip once the wake and its track are known: the crest profile along the
track, the wedge of wave energy and its arms, the radar azimuth offset, and the lines to draw."""

from __future__ import annotations

import numpy as np

from ..physics import inversion as inv
from . import arms as arms_mod
from .prepare import Chip
from .result import RadarGeometry
from .trackframe import track_frame

K_HI_FACTOR = 1.8  # wave-energy band for the arms: 0.5 to 1.8 x the transverse wavenumber


def track_profile(chip: Chip, back: float, lam_pred: float, m: float, *, gap_px: int, box_px: int) -> np.ndarray:
    """Mean of a narrow band along the track behind the vessel (for the transverse crest spacing)."""
    tf = track_frame(chip.data, chip.vessel_rc, back, u_range=(gap_px, gap_px + 2 * box_px), v_half=box_px / 2)
    c = tf.shape[0] // 2
    half_w = int(max(1, min(lam_pred / m / 6, 6))) if np.isfinite(lam_pred) else 2
    valid_u = np.nonzero(np.abs(tf[c]) > 0)[0]
    return tf[c - half_w:c + half_w + 1, :valid_u.max() + 1 if valid_u.size else 1].mean(axis=0)


def wedge_arms(chip: Chip, back: float, lam_pred: float, m: float, *, gap_px: int
               ) -> tuple[arms_mod.Arms | None, np.ndarray, np.ndarray, int]:
    """Half-angle from the outer edge of the wave energy in a wide track frame; also returns the energy
    map, its valid mask and the vessel's column in it."""
    reach = int(0.46 * chip.data.shape[0])
    wide = track_frame(chip.data, chip.vessel_rc, back, u_range=(-reach, reach), v_half=reach)
    wvalid = track_frame(chip.valid.astype(np.float32), chip.vessel_rc, back, u_range=(-reach, reach),
                         v_half=reach, order=0) > 0
    k_t = 2 * np.pi / lam_pred if np.isfinite(lam_pred) else 2 * np.pi / (20 * m)
    energy = arms_mod.wave_energy(wide, m, k_lo=0.5 * k_t, k_hi=min(K_HI_FACTOR * k_t, 2 * np.pi / (2.6 * m)),
                                  smooth_px=max(1.5, 0.3 * lam_pred / m if np.isfinite(lam_pred) else 3))
    ahead_e = energy[:, :reach - gap_px][wvalid[:, :reach - gap_px]]
    bg = float(np.median(ahead_e)) if ahead_e.size else 0.0
    noise = float(1.4826 * np.median(np.abs(ahead_e - bg))) if ahead_e.size else 1e-9
    energy = np.where(wvalid, energy, 0.0)
    found = arms_mod.half_angle_from_edges(energy[:, reach:], u_offset=0, background=bg, noise=max(noise, 1e-12))
    return found, energy, wvalid, reach


def radar_offset_estimate(chip: Chip, back: float, heading: float, frame, geo: RadarGeometry, cond, rng):
    """Speed from the hull's azimuth displacement off its own turbulent wake (Raney 1971).

    The wake line is found anywhere within the largest plausible displacement (20 m/s radial
    speed); the hull is the bright blob nearest the given position.
    """
    if chip.hull_rc is None:
        return None
    max_off_m = geo.slant_range_m / geo.platform_speed_mps * 20.0
    found = arms_mod.wake_line_offset(chip.data, chip.valid, back, max_offset_px=max_off_m / chip.m_per_px)
    if found is None or found[2] < 5.0:
        return None
    s_wake, theta_deg, _sig = found
    n = chip.data.shape[0]
    t = np.radians(theta_deg)
    # Radon detector coordinate of the hull: s = x cos(theta) + y sin(theta), x right, y up, about the centre
    x_h, y_h = chip.hull_rc[1] - n // 2, n // 2 - chip.hull_rc[0]
    lateral_px = x_h * np.cos(t) + y_h * np.sin(t) - s_wake
    fdc, fdr = frame.image_direction(geo.flight_bearing_deg)
    proj = fdc * np.cos(t) - fdr * np.sin(t)  # the flight direction's component along the line normal
    if abs(proj) < 0.1:
        return None
    offset_m = float(lateral_px / proj * chip.m_per_px)
    return inv.speed_from_radar_offset(
        inv.Uncertain(offset_m, 2.0 * chip.m_per_px), inv.Uncertain(geo.slant_range_m, geo.slant_range_std_m),
        inv.Uncertain(geo.platform_speed_mps, geo.platform_speed_std_mps), incidence_deg=geo.incidence_deg,
        heading_deg=inv.Uncertain(heading, 1.0), look_bearing_deg=geo.look_bearing_deg, conditions=cond, seed=rng)


def chip_outline(chip: Chip) -> list[tuple[float, float]]:
    n = chip.data.shape[0]
    return [chip.to_scene(r, c) for r, c in ((0, 0), (0, n), (n, n), (n, 0), (0, 0))]


def wake_geometry(chip: Chip, back: float, half: float | None, arms, narrow: list | None = None) -> dict:
    n = chip.data.shape[0]
    length = 0.45 * n
    r0, c0 = chip.vessel_rc

    def ray(angle_deg: float) -> list[tuple[float, float]]:
        a = np.radians(angle_deg)
        return [chip.to_scene(r0, c0), chip.to_scene(r0 - length * np.sin(a), c0 + length * np.cos(a))]
    out = {"chip": chip_outline(chip), "track": ray(back)}
    if half is not None and arms is not None:
        out["arm_left"] = ray(back + (arms.left_deg if np.isfinite(arms.left_deg) else half))
        out["arm_right"] = ray(back - (arms.right_deg if np.isfinite(arms.right_deg) else half))
    for ln in narrow or []:
        out["narrow_v_left" if ln.angle_from_track_deg > 0 else "narrow_v_right"] = ray(back + ln.angle_from_track_deg)
    return out
