"""Speed from the fit of the steady-wave curve (k . U)^2 = g |k| tanh(|k| h) to the whitened 2-D spectrum
behind the vessel (Zilman et al. 2004, IEEE TGRS 42), with the quarter-box spread as its uncertainty."""

from __future__ import annotations

from dataclasses import replace

from ...physics import inversion as inv
from .base import NOTHING, MethodContext, MethodOutput


class SpectralFit:
    name = "spectral fit"
    reads_depth = True

    def estimate(self, ctx: MethodContext) -> MethodOutput:
        if ctx.waves is None:
            return NOTHING
        m = ctx.waves.model
        est = inv.speed_from_spectral_fit(
            inv.Uncertain(m.speed_mps, ctx.waves.spread.speed_std_mps), ctx.conditions, seed=ctx.rng
        )
        if m.fitted:
            est = replace(
                est,
                method="spectral fit (supercritical curve, depth fitted)"
                if m.supercritical
                else "spectral fit (finite-depth curve, depth fitted)",
            )
        return MethodOutput((est,))
