"""Stage 4 of the analysis: what is measured on the chip once the wake, its track and depth are known.

The transverse crest spacing along the track, the half-angle from the outer edge of the wave energy,
the straight wake lines through the vessel with their significance (Kelvin-arm ridges, the radar
narrow V, the turbulent wake), and the lines to draw.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from ..physics import havelock, kelvin
from . import crests as crests_mod
from . import lines as lines_mod
from .arms import Arms
from .chip_measures import track_profile, track_rows, wake_drawing, wedge_arms
from .depth_model import DepthModel
from .findings import Drawing, LineKind
from .look import Look
from .prepare import Chip
from .tuning import REACH_FRACTION, Tuning


@dataclass(frozen=True, eq=False)
class WakeMeasures:
    back_deg: float  #: image angle of the backward track after the fit's correction
    profile: np.ndarray  #: intensity along the track behind the vessel
    transverse_wavelength_m: float | None  #: None when no regular transverse crests stand out
    transverse_wavelength_std_m: float | None
    transverse_note: str  #: why the crest spacing was not read ("" when read)
    half_angle_deg: float | None
    half_angle_std_deg: float | None
    arms: Arms | None
    lines: tuple[lines_mod.WakeLine, ...]
    drawing: Drawing


def crest_rows(chip: Chip, behind: Chip | None, back: float, lam_pred: float, *, tuning: Tuning) -> np.ndarray:
    """The profiles for the transverse crest spacing: on the look's chip, or on ``behind`` (a chip read
    further back along the track at the same scale) when that gives longer ones.  The look's chip is centred
    on the vessel, so its profiles end half a chip behind it; in a photo whose frame holds more wake than that,
    the crests beyond were left out."""
    t = tuning
    kw = dict(half_width_waves=t.transverse_half_width_waves, half_max_px=t.box_px / 2 - 1)
    rows, u0 = track_rows(
        chip, back, lam_pred, chip.m_per_px, centre_rc=chip.vessel_rc, u_range=(t.gap_px, t.gap_px + 2 * t.box_px), **kw
    )
    if behind is not None:
        centre = behind.from_scene(*chip.to_scene(*chip.vessel_rc))
        far, _ = track_rows(
            behind, back, lam_pred, behind.m_per_px, centre_rc=centre, u_range=(u0, u0 + t.chip_px), **kw
        )
        if far.shape[1] > rows.shape[1]:
            return far
    return rows


def crest_note(crests: crests_mod.CrestSpacing, *, tuning: Tuning) -> str:
    """Why a crest spacing was not taken, in words (the first rule it failed)."""
    t = tuning
    if not np.isfinite(crests.wavelength_m):
        return "no crest peak inside the band of wavelengths the fitted speed allows"
    if crests.snr < t.transverse_snr_min:
        return (
            f"the crests stand {crests.snr:.1f} times above the noise along the track ({t.transverse_snr_min:g} needed)"
        )
    if crests.groups_agreeing < crests.groups - 1:
        return (
            f"sets of profiles either side of the track disagree ({crests.groups_agreeing} of {crests.groups} "
            "within 5 % of the spacing)"
        )
    return f"the profiles hold {crests.crests:.1f} crests ({t.transverse_crests_min:g} needed)"


def measure_wake(
    look: Look, model: DepthModel, *, g: float, tuning: Tuning, behind: Chip | None = None
) -> WakeMeasures:
    """``behind``: a chip read further back along the track at the look's scale (see :func:`crest_rows`)."""
    t = tuning
    chip, m = look.chip, look.chip.m_per_px
    u, h = model.speed_mps, model.depth_m
    back = (look.back_deg + model.delta_deg) % 360.0
    lam_pred = float(kelvin.transverse_wavelength(u, h, g=g))
    prof = track_profile(chip, back, lam_pred, m, gap_px=t.gap_px, box_px=t.box_px)
    lo, hi = t.transverse_band_finite if model.finite else t.transverse_band_deep
    crests = crests_mod.NOTHING
    if np.isfinite(lam_pred):
        rows = crest_rows(chip, behind, back, lam_pred, tuning=t)
        crests = crests_mod.crest_spacing_rows(
            rows,
            m,
            band_m=(lo * lam_pred, hi * lam_pred),
            groups=t.transverse_groups,
            block=max(1, round(t.transverse_block_waves * lam_pred / m)),
        )
    # a spacing read off a few crests has a spread the sets' scatter does not know: too few, not seen
    seen = bool(
        np.isfinite(crests.std_m)
        and crests.snr >= t.transverse_snr_min
        and crests.groups_agreeing >= crests.groups - 1
        and crests.crests >= t.transverse_crests_min
    )
    lam_t, lam_t_sd = crests.wavelength_m, crests.std_m
    arms, energy, evalid, reach = wedge_arms(
        chip,
        back,
        lam_pred if np.isfinite(lam_pred) else float(kelvin.transverse_wavelength(u, g=g)),
        m,
        gap_px=t.gap_px,
        k_hi_factor=t.arms_k_hi_factor,
    )
    half, half_sd = (
        (arms.half_angle_deg, float(np.hypot(arms.half_angle_std_deg, t.half_angle_sys_std_deg)))
        if arms
        else (None, None)
    )
    well_measured = half is not None and half_sd is not None and half_sd <= t.arms_draw_max_std_deg
    # Kelvin arms: wave-energy ridges (the track frame's +v is the image's counter-clockwise side, so its fan
    # angles change sign), searched near the measured half-angle when it is well measured, else near the one
    # the fit predicts (Kelvin's in deep water, Havelock's for the fitted or given depth)
    expected = float(havelock.half_angle(u / np.sqrt(g * h))) if np.isfinite(h) else kelvin.KELVIN_HALF_ANGLE_DEG
    near = half if well_measured else expected
    found = [
        replace(ln, angle_from_track_deg=-ln.angle_from_track_deg)
        for ln in lines_mod.kelvin_arm_lines(
            energy, evalid, u0=reach, near_deg=near, significance_min=t.wave_line_significance_min
        )
    ]
    if chip.radar:
        found += lines_mod.narrow_v_lines(
            chip.data, chip.valid, chip.vessel_rc, back, significance_min=t.wave_line_significance_min
        )
    tw = look.turbulent
    # the turbulent wake runs along the track the spectrum gives; a line well off it is something else
    if tw is not None:
        tw_angle = float((tw.angle_deg - back + 180.0) % 360.0 - 180.0)
        if tw.significance >= t.wave_line_significance_min and abs(tw_angle) <= t.turbulent_line_max_off_deg:
            kind = LineKind.TURBULENT_DARK if tw.dark else LineKind.TURBULENT_BRIGHT
            found.insert(
                0,
                lines_mod.WakeLine(kind, tw_angle, float(tw.significance), float(REACH_FRACTION * chip.data.shape[0])),
            )
    # draw the arms only when they were measured well enough to be worth showing as evidence
    drawing = wake_drawing(
        chip,
        back,
        half,
        arms if (arms is not None and well_measured) else None,
        [ln for ln in found if ln.kind == LineKind.NARROW_V],
    )
    note = "" if seen else crest_note(crests, tuning=t)
    return WakeMeasures(
        back,
        prof,
        lam_t if seen else None,
        lam_t_sd if seen else None,
        note,
        half,
        half_sd,
        arms,
        tuple(found),
        drawing,
    )
