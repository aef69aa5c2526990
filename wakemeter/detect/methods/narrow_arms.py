"""Speed of a fast hull from its arms narrower than Kelvin's and its length (Rabaud & Moisy 2013, Phys. Rev.
Lett. 110, 214503): U = Fr_L(phi) sqrt(g L).

Its domain, checked here: arms clearly narrower than 19.47 deg seen as a V of two lines; a hull length from a
source that excludes foam (given by the analyst, or the hull's own outline where it is resolved and separated
from its foam, :mod:`..hull_outline`); and a hull Froude number a vessel can reach (``narrow_arms_fr_max``).
Outside it the method gives no figure: a coded caution says why."""

from __future__ import annotations

import numpy as np

from ...errors import ParameterError
from ...physics import inversion as inv
from ...physics import kelvin
from ...physics.units import KNOT_MPS
from ..findings import Caution, CautionCode, LineKind
from ..hull_outline import hull_outline_length_m
from .base import NOTHING, MethodContext, MethodOutput


class NarrowArms:
    name = "narrow arms and hull length"
    reads_depth = False

    def estimate(self, ctx: MethodContext) -> MethodOutput:
        if ctx.lines is None:
            return NOTHING
        chip, wake, t = ctx.lines.chip, ctx.lines.wake, ctx.tuning
        if wake.half_angle is None or not any(ln.kind == LineKind.KELVIN_ARM for ln in wake.lines):
            return NOTHING
        half, half_std = wake.half_angle
        if half > kelvin.KELVIN_HALF_ANGLE_DEG - 2 * half_std - 1.0:
            return NOTHING
        if ctx.request.hull_length_m is not None:
            given = ctx.request.hull_length_m
            length = inv.Uncertain(given, t.hull_length_rel_std * given)
            source = "given"
        elif chip.hull is not None:
            measured, why = hull_outline_length_m(chip.hull, wake.back_deg, chip.m_per_px, t)
            if measured is None:
                return MethodOutput(why_not=f"no speed from the narrow arms: {why}; give the hull length if known")
            length = inv.Uncertain(measured, 2 * chip.m_per_px + t.hull_length_rel_std * measured)
            source = "measured on the image"
        else:
            return MethodOutput(why_not="no speed from the narrow arms: no hull seen to measure; give its length")
        try:
            est = inv.speed_from_arm_angle_and_hull_length(
                inv.Uncertain(half, half_std), length, ctx.conditions, seed=ctx.rng
            )
        except ParameterError:  # the angle does not fit the fast-hull model
            return NOTHING
        fr = est.speed_mps / float(np.sqrt(ctx.gravity.value * length.value))
        if not np.isfinite(fr) or fr > t.narrow_arms_fr_max:
            return MethodOutput(
                cautions=(
                    Caution(
                        CautionCode.OUT_OF_DOMAIN,
                        f"the narrow arms ({half:.1f}\N{DEGREE SIGN}) and the hull length ({length.value:.0f} m, "
                        f"{source}) would give {est.speed_mps / KNOT_MPS:.0f} kn, a hull Froude number of {fr:.1f}: "
                        f"above {t.narrow_arms_fr_max:g}, beyond what hulls reach and outside the method's domain, "
                        "so no speed is given. The arms may be foam edges, or the length wrong",
                    ),
                )
            )
        return MethodOutput((est,))
