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
        if geo is None or (ctx.waves is None and ctx.lines is None):
            return NOTHING
        try:
            est = self._offset(ctx) if ctx.waves is not None else self._offset_from_line(ctx)
        except ParameterError as err:  # e.g. a track almost along the flight direction: no radial speed to read
            return MethodOutput(
                cautions=(Caution(CautionCode.RADAR_OFFSET_MISSING, f"radar azimuth offset not usable: {err}"),)
            )
        if est is None:
            why = (
                "no bright hull found near the given position"
                if ctx.waves is not None
                else "no hull seen away from the wake line's start (a hull on its own wake line has no offset to "
                "measure), or a track almost along the flight direction"
            )
            return MethodOutput(
                cautions=(Caution(CautionCode.RADAR_OFFSET_MISSING, f"radar azimuth offset not measured: {why}"),)
            )
        return MethodOutput((est,))

    def _offset_from_line(self, ctx: MethodContext) -> inv.SpeedEstimate | None:
        """The line path: the wake seen as a line (the dark turbulent wake, or a ridge) and the hull imaged
        beside it; the hull's distance across the line, over the flight direction's share of that direction,
        is the azimuth offset.  Without a hull seen away from the line's start there is nothing to measure."""
        geo = ctx.request.radar_geometry
        assert ctx.lines is not None and geo is not None
        if ctx.hull_px is None:
            return None
        chip, wake = ctx.lines.chip, ctx.lines.wake
        apex_c, apex_r = chip.to_scene(*wake.vessel_rc)
        b = np.radians(wake.back_deg)
        n_c, n_r = np.sin(b), np.cos(b)  # the line's normal in (col, row); its direction is (cos b, -sin b)
        lateral_px = (ctx.hull_px[0] - apex_c) * n_c + (ctx.hull_px[1] - apex_r) * n_r
        fdc, fdr = ctx.frame.image_direction(geo.flight_bearing_deg)
        proj = fdc * n_c + fdr * n_r
        if abs(proj) < ctx.tuning.radar_min_flight_share:
            return None
        return self._speed(ctx, float(lateral_px / proj * chip.m_per_px / chip.step), chip.m_per_px / chip.step)

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
        if abs(proj) < t.radar_min_flight_share:
            return None
        return self._speed(ctx, float(lateral_px / proj * chip.m_per_px), chip.m_per_px)

    def _speed(self, ctx: MethodContext, offset_m: float, m_per_px: float) -> inv.SpeedEstimate:
        geo, t = ctx.request.radar_geometry, ctx.tuning
        assert geo is not None
        est = inv.speed_from_radar_offset(
            inv.Uncertain(offset_m, t.radar_offset_std_px * m_per_px),
            inv.Uncertain(geo.slant_range_m, geo.slant_range_std_m),
            inv.Uncertain(geo.platform_speed_mps, geo.platform_speed_std_mps),
            incidence_deg=geo.incidence_deg,
            heading_deg=inv.Uncertain(ctx.heading_deg, t.radar_heading_std_deg),
            look_bearing_deg=geo.look_bearing_deg,
            conditions=ctx.conditions,
            seed=ctx.rng,
        )
        # the figures' origin beside them: typed by the user, or read from the product at the vessel's pixel
        return replace(est, assumptions=(*est.assumptions, f"radar geometry {geo.source}"))
