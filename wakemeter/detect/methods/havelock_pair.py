"""Speed and depth together from the transverse crest spacing and a half-angle wider than Kelvin's:
Havelock's (1908) angle gives Fr_h, the transverse waves give k.  Used when the depth was fitted to the
spectrum, as a check independent of that fit."""

from __future__ import annotations

from ...physics import inversion as inv
from ...physics import kelvin
from .base import NOTHING, MethodContext, MethodOutput
from .transverse import crest_spacing


class HavelockPair:
    name = "transverse waves and Havelock half-angle"
    reads_depth = False

    def estimate(self, ctx: MethodContext) -> MethodOutput:
        lam = crest_spacing(ctx)
        if lam is None or ctx.waves is None:
            return NOTHING
        half, half_sd = ctx.waves.measures.half_angle_deg, ctx.waves.measures.half_angle_std_deg
        if not ctx.waves.model.fitted or half is None or half_sd is None:
            return NOTHING
        if not (half > kelvin.KELVIN_HALF_ANGLE_DEG + 2 * half_sd and half_sd < ctx.tuning.havelock_pair_max_std_deg):
            return NOTHING
        cond = inv.Conditions(g_mps2=ctx.gravity, pixel_scale_rel_std=ctx.conditions.pixel_scale_rel_std)
        est, _depth = inv.speed_and_depth_from_transverse_wavelength_and_half_angle(
            lam, inv.Uncertain(half, half_sd), cond, seed=ctx.rng
        )
        return MethodOutput((est,))
