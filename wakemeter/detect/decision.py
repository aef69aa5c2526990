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
    found = bool(
        look.side_contrast >= t.side_contrast_min
        and (
            (np.isfinite(fit.speed_mps) and fit.significance >= t.significance_min)
            or (supercritical and sup.score >= t.super_significance_min)
        )
    )
    return Decision(found, significance, supercritical, joint, sup, sp)


def decision_text(decision: Decision, look: Look, tuning: Tuning) -> str:
    t = tuning
    if decision.found:
        return (
            f"wake found: spectral significance {decision.significance:.1f}, wake-side contrast "
            f"{look.side_contrast:.1f} ({t.false_alarm_note})"
        )
    return (
        f"no wake found: spectral significance {decision.significance:.1f} (needs {t.significance_min}) and "
        f"wake-side contrast {look.side_contrast:.1f} (needs {t.side_contrast_min}); thresholds set for "
        f"{t.false_alarm_note}"
    )
