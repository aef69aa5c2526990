"""Findings corrected by hand, and the fitted crest pattern for display.

An analyst may reject a finding, or correct it with a hand measurement: a crest
spacing from the crest ruler becomes one more speed estimate; a hand-drawn arm
replaces the measured half-angle (and so the depth regime).  The estimates are
then combined again by the inversion core.  Hand estimates are marked
(:attr:`SpeedEstimate.by_hand`) so a second revision replaces them.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from ..physics import inversion as inv
from ..physics import kelvin
from ..scene.raster import Scene
from .explain import widen
from .findings import Caution, CautionCode, Segment, SegmentKind
from .result import WakeAnalysis

HAND_CODES = (CautionCode.HAND_CREST, CautionCode.HAND_ARM, CautionCode.METHODS_DISAGREE)
#: standard uncertainty of the crest direction read off a hand-drawn ruler (common practice, no source)
HAND_ANGLE_STD_DEG = 2.0
#: crests further than this from transverse are too oblique to invert reliably (cos^2 theta -> 0)
HAND_ANGLE_MAX_DEG = 80.0


def revise(
    analysis: WakeAnalysis,
    *,
    hand_crest: tuple[float, float, float] | None = None,
    hand_half_angle: tuple[float, float] | None = None,
    seed: int = 0,
) -> WakeAnalysis:
    """Recombine with hand measurements.

    Parameters
    ----------
    hand_crest : (spacing_m, spacing_std_m, angle_to_track_deg), optional
        A crest-ruler reading; the ruler runs along the crests' propagation direction, so the
        angle to the track is the propagation angle theta (0 for transverse crests).
    hand_half_angle : (half_angle_deg, std_deg), optional
        A hand-drawn arm replacing the measured half-angle.
    """
    had_hand = any(m.by_hand for m in analysis.methods)
    if not analysis.wake_found or (hand_crest is None and hand_half_angle is None and not had_hand):
        return analysis  # nothing to revise: the analysis' own interval stands as it is
    g = analysis.gravity_mps2
    depth = None
    if analysis.depth_m is not None and analysis.depth_ci95_m is not None:
        depth = inv.Uncertain(analysis.depth_m, max((analysis.depth_ci95_m[1] - analysis.depth_ci95_m[0]) / 3.92, 0.0))
    cond = inv.Conditions(g_mps2=inv.Uncertain(g, 0.0005), depth_m=depth)
    rng = np.random.default_rng(seed)
    methods = [m for m in analysis.methods if not m.by_hand]
    cautions = [c for c in analysis.cautions if c.code not in HAND_CODES]
    half, half_sd = analysis.half_angle_deg, analysis.half_angle_std_deg
    if hand_crest is not None:
        lam, sd, ang = hand_crest
        theta = min(max(ang, 0.0), HAND_ANGLE_MAX_DEG)
        est = inv.speed_from_crest_wavelength(
            inv.Uncertain(lam, max(sd, 0.005 * lam)),
            inv.Uncertain(theta, HAND_ANGLE_STD_DEG),
            cond,
            seed=rng,
            method="crest ruler (by hand)",
        )
        methods.append(replace(est, by_hand=True))
        cautions.append(Caution(CautionCode.HAND_CREST, "includes a crest spacing measured by hand"))
    regime = analysis.regime
    if hand_half_angle is not None:
        half, half_sd = hand_half_angle
        cautions.append(Caution(CautionCode.HAND_ARM, f"half-angle corrected by hand to {half:.1f} ± {half_sd:.1f}°"))
        lam_t = analysis.transverse_wavelength_m
        if depth is None:
            regime = inv.assess_depth_regime(
                half_angle_deg=inv.Uncertain(half, half_sd), transverse_seen=lam_t is not None, g=g
            )
            if lam_t and half > kelvin.KELVIN_HALF_ANGLE_DEG + 2 * half_sd:
                est, _dep = inv.speed_and_depth_from_transverse_wavelength_and_half_angle(
                    inv.Uncertain(lam_t, max(analysis.transverse_wavelength_std_m or 0.0, 0.006 * lam_t)),
                    inv.Uncertain(half, half_sd),
                    cond,
                    seed=rng,
                )
                methods.append(replace(est, method=est.method + " (by hand)", by_hand=True))
    if not methods:  # a wake seen as a line only, and no hand crest: still no speed
        return replace(
            analysis,
            half_angle_deg=half,
            half_angle_std_deg=half_sd,
            regime=regime,
            cautions=tuple(cautions),
            revised=True,
        )
    # shallower water the analysis could not rule out stays inside the interval
    combined = widen(inv.combine_estimates(methods), analysis.interval_cover)
    if not combined.consistent:
        cautions.append(Caution(CautionCode.METHODS_DISAGREE, combined.verdict))
    revised = hand_crest is not None or hand_half_angle is not None
    return replace(
        analysis,
        methods=tuple(methods),
        speed=combined,
        half_angle_deg=half,
        half_angle_std_deg=half_sd,
        regime=regime,
        cautions=tuple(cautions),
        revised=revised,
    )


def with_crest_lines(scene: Scene, analysis: WakeAnalysis, *, n_crests: int = 4) -> WakeAnalysis:
    """The finding with a few fitted crest lines added to its drawing (once)."""
    if analysis.drawing.first(SegmentKind.CREST) is not None:
        return analysis
    crests = [
        Segment(SegmentKind.CREST, tuple(line)) for line in kelvin_crest_lines(scene, analysis, n_crests=n_crests)
    ]
    return replace(analysis, drawing=analysis.drawing.plus(crests)) if crests else analysis


def kelvin_crest_lines(scene: Scene, analysis: WakeAnalysis, *, n_crests: int = 4) -> list[list[tuple[float, float]]]:
    """A few crest lines of the fitted deep-water Kelvin pattern, in scene pixels, for display.

    Crest of phase 2 pi n (Lamb 1932 sec. 256): behind the vessel at distance a = n lambda_t,
    x = a cos(theta)(1 + sin^2 theta), y = a cos^2(theta) sin(theta), theta in (-90, 90) deg.
    Drawn only for the deep-water regime (finite depth bends the crests differently).
    """
    if (
        not analysis.wake_found
        or analysis.speed is None
        or analysis.heading_deg is None
        or analysis.regime.regime not in (inv.Regime.DEEP, inv.Regime.UNKNOWN)
        or analysis.has_caution(CautionCode.LINES_ONLY)  # no waves were fitted: drawing crests would suggest so
    ):
        return []
    u = analysis.speed.speed_mps
    lam_t = float(kelvin.transverse_wavelength(u, g=analysis.gravity_mps2))
    frame = scene.local_frame(*analysis.vessel_px)
    hb = np.radians((analysis.heading_deg + 180.0) % 360.0)  # bearing of "behind"
    be, bn = np.sin(hb), np.cos(hb)  # unit ground vector behind
    le, ln = -bn, be  # lateral unit vector
    th = np.radians(np.linspace(-80, 80, 81))
    lines = []
    for n in range(2, 2 + n_crests):
        a = n * lam_t
        x = a * np.cos(th) * (1 + np.sin(th) ** 2)
        y = a * np.cos(th) ** 2 * np.sin(th)
        east, north = x * be + y * le, x * bn + y * ln
        dc, dr = frame.pixel_vector(east, north)
        lines.append([(float(analysis.vessel_px[0] + c), float(analysis.vessel_px[1] + r)) for c, r in zip(dc, dr)])
    return lines
