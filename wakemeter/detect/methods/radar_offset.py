"""Speed from the radar azimuth offset of a moving hull off its own turbulent wake: a target with radial
speed v_r is imaged shifted by -(R/V) v_r in azimuth (Raney 1971, IEEE Trans. Aerosp. Electron. Syst. 7(3)).
Needs the radar geometry in the request and a bright hull."""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from ...errors import ParameterError
from ...physics import inversion as inv
from .. import arms as arms_mod
from ..findings import Caution, CautionCode
from .base import NOTHING, MethodContext, MethodOutput


class RadarOffset:
    name = "radar azimuth offset"
    reads_depth = False

    def estimate(self, ctx: MethodContext) -> MethodOutput:
        geo = ctx.request.radar_geometry
        if geo is None or ctx.waves is None:
            return NOTHING
        try:
            est = self._offset(ctx)
        except ParameterError as err:  # e.g. a track almost along the flight direction: no radial speed to read
            return MethodOutput(
                cautions=(Caution(CautionCode.RADAR_OFFSET_MISSING, f"radar azimuth offset not usable: {err}"),)
            )
        if est is None:
            return MethodOutput(
                cautions=(
                    Caution(
                        CautionCode.RADAR_OFFSET_MISSING,
                        "radar azimuth offset not measured: no bright hull found near the given position",
                    ),
                )
            )
        return MethodOutput((est,))

    def _offset(self, ctx: MethodContext) -> inv.SpeedEstimate | None:
        geo, t = ctx.request.radar_geometry, ctx.tuning
        assert geo is not None and ctx.waves is not None
        chip = ctx.waves.look.chip
        if ctx.hull_px is not None:  # the hull is not at the wake's start: use where it was seen
            chip = replace(
                chip,
                hull_rc=chip.from_scene(*ctx.hull_px),
            )
        if chip.hull_rc is None:
            return None
        back = ctx.waves.measures.back_deg
        # the wake line is found anywhere within the largest plausible displacement
        max_off_m = geo.slant_range_m / geo.platform_speed_mps * t.radar_max_radial_mps
        found = arms_mod.wake_line_offset(chip.data, chip.valid, back, max_offset_px=max_off_m / chip.m_per_px)
        if found is None or found[2] < t.radar_wake_line_min:
            return None
        s_wake, theta_deg, _sig = found
        n = chip.data.shape[0]
        th = np.radians(theta_deg)
        # Radon detector coordinate of the hull: s = x cos(theta) + y sin(theta), x right, y up, about the centre
        x_h, y_h = chip.hull_rc[1] - n // 2, n // 2 - chip.hull_rc[0]
        lateral_px = x_h * np.cos(th) + y_h * np.sin(th) - s_wake
        fdc, fdr = ctx.frame.image_direction(geo.flight_bearing_deg)
        proj = fdc * np.cos(th) - fdr * np.sin(th)  # the flight direction's component along the line normal
        if abs(proj) < 0.1:
            return None
        offset_m = float(lateral_px / proj * chip.m_per_px)
        return inv.speed_from_radar_offset(
            inv.Uncertain(offset_m, t.radar_offset_std_px * chip.m_per_px),
            inv.Uncertain(geo.slant_range_m, geo.slant_range_std_m),
            inv.Uncertain(geo.platform_speed_mps, geo.platform_speed_std_mps),
            incidence_deg=geo.incidence_deg,
            heading_deg=inv.Uncertain(ctx.heading_deg, t.radar_heading_std_deg),
            look_bearing_deg=geo.look_bearing_deg,
            conditions=ctx.conditions,
            seed=ctx.rng,
        )
