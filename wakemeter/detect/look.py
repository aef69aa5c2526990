"""Stage 1 of the analysis: a look at the vessel's surroundings at the right scale.

A look is a chip around the vessel, the side its wake lies on and the deep-water (or given-depth)
fit of the steady-wave curve to the spectrum behind it, whitened by the spectrum ahead (Zilman et al.
2004).  :func:`choose_look` picks the scale: half resolution when nothing is found at full resolution
in a big scene (waves too long for the box), coarser again while the fitted waves are long for the box.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import ParameterError
from ..physics import kelvin
from ..scene.raster import Scene
from . import arms as arms_mod
from .prepare import Chip, prepare_chip
from .spectral import CurveFit, SpectrumPair, fit_curve, whitened_spectrum
from .trackframe import track_frame, wake_side
from .tuning import Tuning


@dataclass(frozen=True, eq=False)
class Look:
    """One look at one scale: the chip, the backward track, the wake-side contrast and the curve fit."""

    chip: Chip
    back_deg: float  #: image angle (counter-clockwise from the column axis) of the backward track
    side_contrast: float
    fit: CurveFit
    tf: np.ndarray  #: track-frame texture, (v, u) with u from -(gap + box) to gap + box
    turbulent: arms_mod.TurbulentWake | None  #: the turbulent wake line (localised Radon), if any
    step: int  #: decimation (1: full resolution)

    def spectrum(self, tuning: Tuning) -> SpectrumPair:
        """The whitened spectrum behind the vessel (boxes of ``tuning.box_px``)."""
        return whitened_spectrum(
            self.tf[:, -tuning.box_px :], self.tf[:, : tuning.box_px][:, ::-1], self.chip.m_per_px, tuning
        )

    def passes(self, tuning: Tuning) -> bool:
        """Whether the deep-water fit alone would call a wake."""
        return bool(self.fit.significance >= tuning.significance_min and self.side_contrast >= tuning.side_contrast_min)


def take_look(
    scene: Scene,
    px: tuple[float, float],
    *,
    step: int,
    g: float,
    depth_m: float,
    radar: bool | None,
    snap: bool,
    tuning: Tuning,
) -> Look:
    """Prepare a chip, find which way the wake lies and fit the curve.

    Two candidate track directions are tried, the centre of the energetic wedge and the
    turbulent wake line (localised Radon); the one whose spectrum fits better wins.
    """
    t = tuning
    chip = prepare_chip(
        scene, px, size_px=t.chip_px, step=step, radar=radar, snap_radius_m=t.snap_radius_m if snap else 0.0
    )
    side = wake_side(chip)
    candidates = [side.back_angle_deg]
    tw = arms_mod.turbulent_wake(chip.data, chip.valid, chip.vessel_rc, side.back_angle_deg)
    if (
        tw is not None
        and tw.significance >= t.turbulent_candidate_min
        and abs(((tw.angle_deg - side.back_angle_deg) + 180) % 360 - 180) > t.turbulent_candidate_sep_deg
    ):
        candidates.append(tw.angle_deg)
    best: Look | None = None
    reach = t.gap_px + t.box_px
    for back in candidates:
        tf = track_frame(chip.data, chip.vessel_rc, back, u_range=(-reach, reach), v_half=t.box_px / 2)
        sp = whitened_spectrum(tf[:, -t.box_px :], tf[:, : t.box_px][:, ::-1], chip.m_per_px, t)
        fit = fit_curve(sp, g=g, depth_m=depth_m, delta_max_deg=t.delta_max_deg, delta_step_deg=t.delta_step_deg)
        cand = Look(chip, back, side.contrast, fit, tf, tw, step)
        if best is None or (np.isfinite(fit.score) and not fit.score <= best.fit.score):
            best = cand
    assert best is not None
    return best


def choose_look(
    scene: Scene, px: tuple[float, float], *, g: float, depth_m: float, radar: bool | None, snap: bool, tuning: Tuning
) -> Look:
    """The look at the scale that suits the waves (see the module text)."""
    t = tuning

    def room_for(step: int) -> bool:
        return min(scene.width, scene.height) >= t.coarse_scene_factor * t.chip_px * step

    look = take_look(scene, px, step=1, g=g, depth_m=depth_m, radar=radar, snap=snap, tuning=t)
    if not look.passes(t) and room_for(1):
        # nothing at full resolution: the waves may be too long for the box (a few wavelengths only); one
        # look at half resolution (the false-alarm check covers both looks, see DEVELOPERS.md)
        try:
            coarse = take_look(scene, px, step=2, g=g, depth_m=depth_m, radar=radar, snap=snap, tuning=t)
        except ParameterError:
            coarse = None
        if coarse is not None and coarse.passes(t):
            look = coarse
    for _ in range(t.coarse_looks_max):
        u = look.fit.speed_mps
        lam_px = float(kelvin.transverse_wavelength(u, g=g)) / look.chip.m_per_px if np.isfinite(u) else np.nan
        if not (
            np.isfinite(lam_px)
            and lam_px > t.coarse_wave_box_fraction * t.box_px
            and look.fit.significance >= t.significance_min
        ):
            break
        if not room_for(look.step):
            break  # no room for a coarser chip
        try:
            look = take_look(scene, px, step=2 * look.step, g=g, depth_m=depth_m, radar=radar, snap=snap, tuning=t)
        except ParameterError:
            break
    return look
