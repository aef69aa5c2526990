"""Stage 3 of the analysis: which depth the speed is read at.

Given depth: that depth.  Otherwise (Zilman et al. 2004 curve, Havelock 1908 geometry) the deep-water
fit is kept unless the supercritical curve won the decision, or the joint (speed, depth, track) fit on
the finite-depth curve beats it clearly at a depth Froude number where depth matters; without a depth
effect the fits at a few shallower depths (``Tuning.fr_open_check``) say whether shallow water is ruled
out or stays open (the interval must then cover it, see :mod:`.explain`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .decision import Decision
from .look import Look
from .spectral import DepthFit, fit_at_froude, fit_curve, fit_speed_depth
from .tuning import Tuning


@dataclass(frozen=True)
class DepthCheck:
    """The given depth against what the waves say without it."""

    alternative: str  #: "deep water" or "water about N m deep"
    speed_mps: float  #: the speed the alternative fit reads
    score: float  #: its score
    given_score: float  #: the score at the given depth

    @property
    def gain(self) -> float:
        return self.score - self.given_score


@dataclass(frozen=True, eq=False)
class DepthModel:
    speed_mps: float  #: the fitted speed at this depth
    depth_m: float  #: inf: deep water
    delta_deg: float  #: track correction of the fit
    finite: bool  #: a finite depth is used (given or fitted)
    fitted: bool  #: the depth was fitted to the waves (not given)
    supercritical: bool
    evidence: str  #: why a fitted depth was preferred (empty otherwise)
    depth_gain: float  #: joint-fit score minus deep-fit score (NaN with a given depth)
    rule_out: float  #: best score minus the score at Fr_h fr_rule_out (NaN when not tried)
    shallow_alt: DepthFit | None  #: the fit at Fr_h fr_rule_out
    open_alts: tuple[tuple[float, DepthFit], ...]  #: shallower fits not ruled out: (Fr_h, fit)
    deep_score: float  #: score of the deep-water (or given-depth) fit
    depth_check: DepthCheck | None = None  #: with a given depth: the best fit without it

    def shallow_open(self, tuning: Tuning) -> bool:
        """Shallow water (Fr_h fr_rule_out) fits almost as well as the best: the regime stays unknown."""
        return self.shallow_alt is not None and not self.rule_out >= tuning.rule_out_min


def choose_depth_model(
    look: Look, decision: Decision, *, g: float, depth_m: float | None, tuning: Tuning
) -> DepthModel:
    t = tuning
    fit, joint, sup = look.fit, decision.joint, decision.sup
    if depth_m is not None:
        return DepthModel(
            fit.speed_mps,
            float(depth_m),
            fit.delta_deg,
            True,
            False,
            False,
            "",
            np.nan,
            np.nan,
            None,
            (),
            fit.score,
            check_given_depth(look, decision, g=g, tuning=t),
        )
    gain = joint.score - fit.score if np.isfinite(joint.score) else np.nan
    if decision.supercritical:
        return DepthModel(
            sup.speed_mps,
            sup.depth_m,
            sup.delta_deg,
            True,
            True,
            True,
            f"no transverse waves: the supercritical curve fits the wave spectrum far better (score "
            f"{sup.score:.1f}) than the deep-water ({fit.score:.1f}) or subcritical ({joint.score:.1f}) "
            "curves",
            gain,
            np.nan,
            None,
            (),
            fit.score,
        )
    if gain >= t.depth_gain_min and joint.depth_froude(g) >= t.fr_depth_effect:
        return DepthModel(
            joint.speed_mps,
            joint.depth_m,
            joint.delta_deg,
            True,
            True,
            False,
            f"the finite-depth curve fits the wave spectrum better than the deep-water curve "
            f"(score {joint.score:.1f} against {fit.score:.1f}); the deep-water fit would read "
            f"{fit.speed_mps:.2f} m/s",
            gain,
            np.nan,
            None,
            (),
            fit.score,
        )
    best = max(fit.score, joint.score)
    open_alts: list[tuple[float, DepthFit]] = []
    shallow_alt, rule_out = None, np.nan
    for fr_try in t.fr_open_check:
        alt = fit_at_froude(decision.spectrum, fit.speed_mps, fit.delta_deg, fr_try, g=g)
        drop = best - alt.score if np.isfinite(alt.score) else np.inf
        if not drop >= t.rule_out_min:
            open_alts.append((fr_try, alt))
        if fr_try == t.fr_rule_out:
            shallow_alt, rule_out = alt, drop
    return DepthModel(
        fit.speed_mps,
        np.inf,
        fit.delta_deg,
        False,
        False,
        False,
        "",
        gain,
        rule_out,
        shallow_alt,
        tuple(open_alts),
        fit.score,
    )


def check_given_depth(look: Look, decision: Decision, *, g: float, tuning: Tuning) -> DepthCheck | None:
    """Fit the waves without the given depth (deep water, and speed, depth and track together) and return the
    better of the two, so that a wrong chart depth or tide shows (the result then says so)."""
    t = tuning
    fit, sp = look.fit, decision.spectrum
    deep = fit_curve(sp, g=g, depth_m=np.inf, delta_max_deg=t.delta_max_deg, delta_step_deg=t.delta_step_deg)
    best = None
    if np.isfinite(deep.score):
        best = DepthCheck("deep water", deep.speed_mps, deep.score, fit.score)
    if np.isfinite(fit.speed_mps):
        joint = fit_speed_depth(sp, fit.speed_mps, fit.delta_deg, g=g)
        if np.isfinite(joint.score) and (best is None or joint.score > best.score):
            best = DepthCheck(f"water about {joint.depth_m:.1f} m deep", joint.speed_mps, joint.score, fit.score)
    return best
