"""Speed from the transverse crest spacing along the track: lambda_t = 2 pi U^2 / g in deep water,
U = sqrt((g/k) tanh(k h)) at a given depth (Lamb 1932, sec. 256).  Not used with a depth fitted to the
same waves (it would count the spectrum twice); see :mod:`.havelock_pair` for that case."""

from __future__ import annotations

from ...physics import inversion as inv
from .base import NOTHING, MethodContext, MethodOutput


def crest_spacing(ctx: MethodContext) -> inv.Uncertain | None:
    """The measured transverse spacing with its stated uncertainty, or None when not seen."""
    if ctx.waves is None:
        return None
    w = ctx.waves.measures
    if w.transverse_wavelength_m is None:
        return None
    t = ctx.tuning
    lam, sd = w.transverse_wavelength_m, w.transverse_wavelength_std_m or 0.0
    return inv.Uncertain(lam, max(t.transverse_std_inflation * sd, t.transverse_rel_std_floor * lam))


class TransverseCrests:
    name = "transverse crest spacing"
    reads_depth = False

    def estimate(self, ctx: MethodContext) -> MethodOutput:
        lam = crest_spacing(ctx)
        if lam is None or ctx.waves is None or ctx.waves.model.fitted:
            return NOTHING
        return MethodOutput((inv.speed_from_transverse_wavelength(lam, ctx.conditions, seed=ctx.rng),))
