"""Stage 2 of the analysis: is there a wake, and which curve family explains it?

The deep-water (or given-depth) fit of the look must stand out (spectral significance) and the
wave energy must sit on one side of the vessel (wake-side contrast); both thresholds were set on
wake-free scenes (:class:`~wakemeter.detect.tuning.Tuning`).  Without a given depth the
supercritical curve and the subcritical finite-depth curve (speed, depth and track together) are
fitted too; a wake seen only as supercritical needs a higher significance (more free parameters).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..physics import kelvin
from .findings import LineKind
from .look import Look
from .spectral import DepthFit, SpectrumPair, fit_speed_depth, fit_supercritical
from .tuning import Tuning

NO_FIT = DepthFit(np.nan, np.nan, 0.0, np.nan)


@dataclass(frozen=True, eq=False)
class Decision:
    found: bool
    significance: float  #: of the curve that explains the wake
    supercritical: bool  #: the supercritical curve beats the others clearly
    joint: DepthFit  #: subcritical finite-depth fit (NaN when not tried)
    sup: DepthFit  #: supercritical fit (NaN when not tried)
    spectrum: SpectrumPair
    waves_in_box: float = np.inf  #: fitted transverse waves the spectral box holds along the track


def decide(look: Look, *, g: float, depth_given: bool, tuning: Tuning) -> Decision:
    t = tuning
    fit = look.fit
    sp = look.spectrum(t)
    sup = joint = NO_FIT
    if not depth_given and look.side_contrast >= t.side_contrast_min:
        sup = fit_supercritical(sp, g=g)
        if np.isfinite(fit.speed_mps):
            joint = fit_speed_depth(sp, fit.speed_mps, fit.delta_deg, g=g)
    best_sub = np.nanmax([fit.score, joint.score, -np.inf])
    supercritical = bool(np.isfinite(sup.score) and sup.score >= best_sub + t.super_gain_min)
    significance = float(sup.score if supercritical else fit.significance)
    u = sup.speed_mps if supercritical else fit.speed_mps
    waves = np.inf
    if np.isfinite(u) and not supercritical:  # a wave fit on one or two waves in the box is outside its domain
        waves = t.box_px * look.chip.m_per_px / float(kelvin.transverse_wavelength(u, g=g))
    found = bool(
        look.side_contrast >= t.side_contrast_min
        and (
            (np.isfinite(fit.speed_mps) and fit.significance >= t.significance_min and waves >= t.box_waves_min)
            or (supercritical and sup.score >= t.super_significance_min)
        )
    )
    return Decision(found, significance, supercritical, joint, sup, sp, waves)


def decision_text(decision: Decision, look: Look, tuning: Tuning) -> str:
    t = tuning
    if decision.found:
        return (
            f"wake found: spectral significance {decision.significance:.1f}, wake-side contrast "
            f"{look.side_contrast:.1f} ({t.false_alarm_note})"
        )
    passed = decision.significance >= t.significance_min and look.side_contrast >= t.side_contrast_min
    if passed and decision.waves_in_box < t.box_waves_min:
        lam = t.box_px * look.chip.m_per_px / decision.waves_in_box
        return (
            f"no speed from waves: the waves that fit best are {lam:.0f} m long, and the area analysed holds only "
            f"{decision.waves_in_box:.1f} of them (needs {t.box_waves_min:g}): the image does not hold enough "
            "of this wake to measure its waves (significance "
            f"{decision.significance:.1f}, wake-side contrast {look.side_contrast:.1f})"
        )
    # the significance is the supercritical curve's where that curve explains the wake best: it needs more
    needs = (
        f"{t.super_significance_min} for the supercritical curve, which fits best"
        if decision.supercritical
        else f"{t.significance_min}"
    )
    return (
        f"no wake found: spectral significance {decision.significance:.1f} (needs {needs}) and "
        f"wake-side contrast {look.side_contrast:.1f} (needs {t.side_contrast_min}); thresholds set for "
        f"{t.false_alarm_note}"
    )


def vessel_evidence(look: Look, lines: tuple, *, hull_elsewhere: bool, forced: bool, tuning: Tuning) -> str:
    """What shows a vessel at the analysed point: its hull (a bright blob at the click, or the radar hull seen
    shifted off this wake's start), or the apex of a V there: the radar narrow V, or Kelvin arms on both sides.
    A turbulent wake alone does not count (it runs through every point ahead of the vessel on its track), nor
    does one arm (a ray from a point beside the hull can run along the real arm).  Without any of these the
    waves may be real but belong to a wake whose apex is elsewhere: "none" (or "forced" when the analyst
    insisted).  Measured with benchmarks/phantom_sweep.py."""
    if look.chip.hull_rc is not None or hull_elsewhere:
        return "hull"
    strong = [ln for ln in lines if ln.significance >= tuning.presence_line_min]
    arms = {ln.angle_from_track_deg > 0 for ln in strong if ln.kind == LineKind.KELVIN_ARM}
    if any(ln.kind == LineKind.NARROW_V for ln in strong) or arms == {True, False}:
        return "wake lines"
    return "forced" if forced else "none"
