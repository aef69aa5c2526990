"""Stage 1 of the analysis: a look at the vessel's surroundings at the right scale.

A look is a chip around the vessel, the side its wake lies on and the deep-water (or given-depth)
fit of the steady-wave curve to the spectrum behind it, whitened by the spectrum ahead (Zilman et al.
2004).  :func:`choose_look` picks the scale: it starts at the pixel size where the slowest vessel's waves are
still resolved (full resolution at 0.09 m and coarser; a centimetre photo starts at a decimated look), goes
to half that resolution when nothing is found in a big scene (waves too long for the box), and coarser again
while the fitted waves are long for the box.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from ..errors import ParameterError, TooLittleWaterError
from ..physics import kelvin
from ..physics.units import KNOT_MPS
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


def box_frame(chip: Chip, back_deg: float, tuning: Tuning) -> np.ndarray:
    """The track frame the spectral boxes are cut from: (v, u), u from -(gap + box) to gap + box."""
    reach = tuning.gap_px + tuning.box_px
    return track_frame(chip.data, chip.vessel_rc, back_deg, u_range=(-reach, reach), v_half=tuning.box_px / 2)


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
        scene,
        px,
        size_px=t.chip_px,
        step=step,
        radar=radar,
        snap_radius_m=t.snap_radius_m if snap else 0.0,
        reach_px=t.gap_px + t.box_px,
        snap_max_px=t.snap_radius_px_max,
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
    for back in candidates:
        tf = box_frame(chip, back, t)
        sp = whitened_spectrum(tf[:, -t.box_px :], tf[:, : t.box_px][:, ::-1], chip.m_per_px, t)
        fit = fit_curve(sp, g=g, depth_m=depth_m, delta_max_deg=t.delta_max_deg, delta_step_deg=t.delta_step_deg)
        fit = fundamental(sp, fit, g=g, depth_m=depth_m, tuning=t)
        cand = Look(chip, back, side.contrast, fit, tf, tw, step)
        if best is None or (np.isfinite(fit.score) and not fit.score <= best.fit.score):
            best = cand
    assert best is not None
    return best


def fundamental(sp: SpectrumPair, fit: CurveFit, *, g: float, depth_m: float, tuning: Tuning) -> CurveFit:
    """The fit moved from a harmonic to its fundamental: the pattern's n-th harmonic (n k) lies on the curve of a
    vessel sqrt(n) slower, so where the curve of a sqrt(2) or sqrt(3) faster vessel also fits (at least
    ``tuning.harmonic_keep_fraction`` of the best score and ``tuning.harmonic_score_min``), that is the speed.
    The moved fit keeps the family's score and significance: the harmonic is the same pattern's evidence."""
    t = tuning
    if not np.isfinite(fit.speed_mps):
        return fit
    best = fit
    for n in (2, 3):
        u = fit.speed_mps * np.sqrt(n)
        f = fit_curve(
            sp,
            g=g,
            depth_m=depth_m,
            delta_max_deg=t.delta_max_deg,
            delta_step_deg=t.delta_step_deg,
            speed_range=(0.96 * u, 1.04 * u),
        )
        if (
            np.isfinite(f.score)
            and f.score >= max(t.harmonic_score_min, t.harmonic_keep_fraction * fit.score)
            and f.speed_mps > best.speed_mps
        ):
            best = replace(
                f, score=fit.score, significance=fit.significance, speed_grid=fit.speed_grid, profile=fit.profile
            )
    return best


def first_step(pixel_m: float, tuning: Tuning, *, g: float) -> int:
    """The first look's decimation: the largest power of two at which the slowest vessel's transverse wave
    still spans ``tuning.first_look_px_per_wave`` pixels (1 at pixels of 0.09 m and more)."""
    shortest = float(kelvin.transverse_wavelength(tuning.slowest_vessel_kn * KNOT_MPS, g=g))
    step = 1
    while np.isfinite(pixel_m) and pixel_m > 0 and shortest / (pixel_m * 2 * step) >= tuning.first_look_px_per_wave:
        step *= 2
    return step


def _long_for(look: Look, finer_step: int, g: float, t: Tuning) -> bool:
    """The look's fitted transverse wave is long for the box of a look at ``finer_step``."""
    u = look.fit.speed_mps
    if not np.isfinite(u):
        return False
    lam_px = float(kelvin.transverse_wavelength(u, g=g)) / (look.chip.m_per_px * finer_step / look.step)
    return lam_px > t.coarse_wave_box_fraction * t.box_px


def choose_look(
    scene: Scene, px: tuple[float, float], *, g: float, depth_m: float, radar: bool | None, snap: bool, tuning: Tuning
) -> Look:
    """The look at the scale that suits the waves (see the module text)."""
    t = tuning
    frame = scene.local_frame(*px)
    s0 = first_step(float(np.sqrt(frame.m_per_col * frame.m_per_row_up)), t, g=g)

    def room_for(step: int) -> bool:
        # the scene's size counted in the first look's pixels
        return min(scene.width, scene.height) >= t.coarse_scene_factor * t.chip_px * step / s0

    while True:  # a photo's frame may be too small for the first scale's reach: finer until it fits
        try:
            look = take_look(scene, px, step=s0, g=g, depth_m=depth_m, radar=radar, snap=snap, tuning=t)
            break
        except ParameterError:
            if s0 == 1:
                raise
            s0 //= 2
    if not look.passes(t):
        # nothing at the first scale: the waves may be too long for the box (a few wavelengths only); up to two
        # looks at half the resolution each, kept only when the waves they fit are long for the finer look's
        # box, the reason for looking coarser (the false-alarm check covers the looks, see DEVELOPERS.md)
        step = s0
        while room_for(step) and step < 4 * s0:
            try:
                coarse = take_look(scene, px, step=2 * step, g=g, depth_m=depth_m, radar=radar, snap=snap, tuning=t)
            except ParameterError:
                break
            if coarse.passes(t) and _long_for(coarse, step, g, t):
                look = coarse
                break
            step *= 2
    for _ in range(t.coarse_looks_max):
        if not (_long_for(look, look.step, g, t) and look.fit.significance >= t.significance_min):
            break
        if not room_for(look.step):
            break  # no room for a coarser chip
        try:
            coarser = take_look(scene, px, step=2 * look.step, g=g, depth_m=depth_m, radar=radar, snap=snap, tuning=t)
        except ParameterError:
            break
        if not coarser.passes(t):
            break  # the coarser chip lost the wake (its edge reached the frame's): keep the look that saw it
        look = coarser
    return look


def behind_chip(scene: Scene, look: Look, *, tuning: Tuning) -> Chip | None:
    """A chip at the look's scale whose near edge is at the vessel and which runs back along the track (for the
    crest profiles, :func:`.wake_measures.crest_rows`); None where the scene has too little there."""
    t = tuning
    col, row = look.chip.to_scene(*look.chip.vessel_rc)
    shift = (t.chip_px / 2 - t.gap_px) * look.step
    a = np.radians(look.back_deg)
    centre = (col + shift * np.cos(a), row - shift * np.sin(a))
    if not (0 <= centre[0] < scene.width and 0 <= centre[1] < scene.height):
        return None
    try:
        return prepare_chip(scene, centre, size_px=t.chip_px, step=look.step, radar=look.chip.radar, find_hull=False)
    except (TooLittleWaterError, ParameterError):
        return None
