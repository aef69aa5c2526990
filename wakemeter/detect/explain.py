"""Stage 7 of the analysis: the depth regime in words, the interval's cover of shallower water that
was not ruled out, and the cautions that go with the result (each with a code)."""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from ..caution import CAUTION
from ..physics import havelock, kelvin
from ..physics import inversion as inv
from ..physics.hull import apparent_arm_angle, hull_froude
from ..scene.geodesy import LocalFrame
from .depth_model import DepthModel
from .findings import Caution, CautionCode, IntervalCover
from .tuning import Tuning
from .wake_measures import WakeMeasures


def depth_regime(
    model: DepthModel,
    measures: WakeMeasures,
    *,
    spectral: inv.SpeedEstimate | None,
    depth: inv.Uncertain | None,
    g: float,
    tuning: Tuning,
) -> inv.DepthRegime:
    """The regime with its explanation (given depth, fitted depth, deep water, or not told); ``spectral``: the
    estimate of the method that reads the depth (:attr:`SpeedMethod.reads_depth`)."""
    t = tuning
    u, fit_score = model.speed_mps, model.deep_score
    half, half_sd = measures.half_angle_deg, measures.half_angle_std_deg
    h_alt = u**2 / (g * t.fr_rule_out**2)
    if depth is not None and spectral is None:
        regime = inv.DepthRegime.unmeasured(inv.Regime.UNKNOWN, "no speed method that reads the depth gave a figure")
    elif depth is not None:
        regime = inv.assess_depth_regime(
            speed=spectral, depth_m=depth, g=g, depth_source="fitted" if model.fitted else "given"
        )
    elif model.shallow_open(t):
        alt = model.shallow_alt
        assert alt is not None
        regime = inv.DepthRegime.unmeasured(
            inv.Regime.UNKNOWN,
            (
                f"the wave spectrum cannot tell deep water from water about {h_alt:.0f} m deep "
                f"(Fr_h {t.fr_rule_out}): the shallow-water curve fits almost as well (score {alt.score:.1f} "
                f"against {fit_score:.1f}, at {alt.speed_mps:.2f} m/s); the 95 % interval covers both"
            ),
        )
    else:
        worse = (
            ""
            if model.shallow_alt is None
            else f"; water shallow enough for Fr_h {t.fr_rule_out} (about {h_alt:.0f} m) fits clearly worse "
            f"(score {model.shallow_alt.score:.1f} against {fit_score:.1f})"
        )
        regime = inv.DepthRegime.unmeasured(
            inv.Regime.DEEP,
            "the wave spectrum fits the deep-water dispersion curve: no depth effect found"
            + worse
            + "".join(
                f"; water with Fr_h {f:.2f} (about {u**2 / (g * f * f):.0f} m) fits almost as well, "
                "the 95 % interval covers it"
                for f, _ in model.open_alts
            ),
        )
    if half is not None and depth is None:
        regime = replace(regime, explanation=regime.explanation + f"; arms measured at {half:.1f} ± {half_sd:.1f}°")
    if model.fitted:
        fr = u / np.sqrt(g * model.depth_m)
        regime = replace(
            regime,
            explanation=regime.explanation
            + f"; evidence: {model.evidence}; Havelock's half-angle for Fr_h {fr:.2f} is "
            f"{float(havelock.half_angle(fr)):.1f}°"
            + (f", measured {half:.1f} ± {half_sd:.1f}°" if half is not None else ""),
        )
    return regime


def interval_cover(model: DepthModel, combined: inv.CombinedSpeed) -> IntervalCover | None:
    """Speeds the interval must cover: those of shallower water that fits almost as well, with the same
    precision as at the fitted depth."""
    if not model.open_alts:
        return None
    alts = [a for _, a in model.open_alts if np.isfinite(a.speed_mps)]
    half_w = 0.5 * (combined.ci95_high_mps - combined.ci95_low_mps)
    lo = max(min(a.speed_mps for a in alts) - half_w, 0.0) if alts else combined.ci95_low_mps
    hi = max(a.speed_mps for a in alts) + half_w if alts else combined.ci95_high_mps
    return IntervalCover(float(lo), float(hi), tuple(f for f, _ in model.open_alts))


def widen(combined: inv.CombinedSpeed, cover: IntervalCover | None) -> inv.CombinedSpeed:
    """The combined speed with its interval widened to the cover (unchanged when it already covers it)."""
    if cover is None or not (cover.low_mps < combined.ci95_low_mps or cover.high_mps > combined.ci95_high_mps):
        return combined
    return replace(
        combined,
        ci95_low_mps=min(cover.low_mps, combined.ci95_low_mps),
        ci95_high_mps=max(cover.high_mps, combined.ci95_high_mps),
        verdict=combined.verdict + "; interval widened to cover shallower water that fits almost as "
        f"well (Fr_h {cover.froude_text})",
    )


def opening_cautions(*, hull_shift_m: float | None, frame: LocalFrame) -> list[Caution]:
    """The cautions every result opens with: it is an estimate; a radar hull away from its wake; distances from
    a calibration (by hand, or from a photo's own metadata) rather than a georeference."""
    out = [Caution(CautionCode.ESTIMATE, CAUTION)]
    if hull_shift_m is not None:
        out.append(
            Caution(
                CautionCode.DISPLACED_HULL,
                f"the hull is seen {hull_shift_m:.0f} m from the start of its wake (radar shows moving "
                "targets shifted in azimuth, Raney 1971): the analysis starts where the wake starts, the "
                "vessel's true position at the time of imaging; check that this wake belongs to this hull",
            )
        )
    if not frame.georeferenced:
        out.append(
            Caution(
                CautionCode.NO_GEOREFERENCE,
                "the image has no georeference: distances use "
                + (frame.source or "the hand calibration")
                + ("" if frame.north_known else "; headings are relative to image up, not true bearings"),
            )
        )
    return out


def closing_cautions(
    model: DepthModel,
    measures: WakeMeasures,
    combined: inv.CombinedSpeed,
    *,
    widened: bool,
    depth_given: bool,
    hull_length_m: float | None,
    g: float,
    tuning: Tuning,
) -> list[Caution]:
    t = tuning
    out = []
    shallow_open = model.shallow_open(t)
    if widened and not shallow_open:
        out.append(
            Caution(
                CautionCode.INTERVAL_WIDENED,
                f"the 95 % interval was widened to {combined.ci95_low_mps:.2f}-{combined.ci95_high_mps:.2f} "
                f"m/s because water with Fr_h {', '.join(f'{f:.2f}' for f, _ in model.open_alts)} fits the "
                "waves almost as well; give the depth to narrow it",
            )
        )
    half, half_sd = measures.half_angle_deg, measures.half_angle_std_deg
    if (
        half is not None
        and half_sd is not None
        and half < kelvin.KELVIN_HALF_ANGLE_DEG - max(2 * half_sd, t.narrow_arm_margin_deg)
    ):
        msg = f"arms at {half:.1f}° are narrower than Kelvin's 19.47°"
        if hull_length_m:
            fr_l = float(hull_froude(combined.speed_mps, hull_length_m, g=g))
            msg += (
                f"; hull Froude number {fr_l:.2f} predicts brightest arms at "
                f"{float(apparent_arm_angle(fr_l)):.1f}° (Rabaud & Moisy 2013)"
            )
        else:
            msg += "; a fast, short hull can explain it (give the hull length to check)"
        out.append(Caution(CautionCode.NARROW_ARMS, msg))
    if not combined.consistent:
        out.append(Caution(CautionCode.METHODS_DISAGREE, combined.verdict))
    check = model.depth_check
    if depth_given and check is not None and check.gain >= t.depth_check_gain_min:
        out.append(
            Caution(
                CautionCode.DEPTH_CONTRADICTED,
                f"the waves contradict the given depth of {model.depth_m:.1f} m: {check.alternative} fits them "
                f"clearly better (score {check.score:.1f} against {check.given_score:.1f}) and reads "
                f"{check.speed_mps:.2f} m/s, against {combined.speed_mps:.2f} m/s at the given depth; check the depth "
                "(chart datum, tide)",
            )
        )
    h_alt = model.speed_mps**2 / (g * t.fr_rule_out**2)
    if model.fitted:
        out.append(
            Caution(
                CautionCode.DEPTH_FITTED,
                "water depth not given: the wave pattern shows a depth effect and the depth was fitted "
                f"({model.depth_m:.1f} m); give a charted depth to check it",
            )
        )
    elif shallow_open:
        out.append(
            Caution(
                CautionCode.DEPTH_OPEN,
                f"water depth not given and the waves cannot tell deep water from water about {h_alt:.0f} m "
                "deep: the interval covers both; give the depth to narrow it",
            )
        )
    elif not depth_given:
        out.append(
            Caution(
                CautionCode.DEEP_ASSUMED,
                "water depth not given: deep water assumed (the wave spectrum shows no depth effect)",
            )
        )
    out.append(
        Caution(CautionCode.THROUGH_WATER, "speed is through the water; a current adds to the speed over ground")
    )
    return out
