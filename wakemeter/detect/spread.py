"""Stage 5 of the analysis: how well the fit pins the speed, the heading and a fitted depth.

The curve is refitted on the four quarter-size boxes behind the vessel (each with the matching box
ahead); their spread, with Student's factor for few boxes, overstates the full box's error (half the
spectral resolution) and is scaled by factors set on the calibration sweeps (``Tuning``).

Four samples give a spread that itself scatters widely: a click a few pixels away, or a track a degree
off, placed the quarter boxes differently and stated an interval up to three times as wide.  So the
quarter boxes are refitted in track frames turned a little either way (``Tuning.spread_turn_deg``) and
the variances of the sets are pooled; Student's factor stays that of four boxes, since the turned sets
see the same water.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .depth_model import DepthModel
from .look import Look, box_frame
from .spectral import FR_MAX, FR_SUPER_RANGE, fit_curve, refine_speed_depth, student_inflation, whitened_spectrum
from .tuning import Tuning


@dataclass(frozen=True)
class Spread:
    speed_std_mps: float
    heading_std_deg: float
    depth_std_m: float  #: 0 unless the depth was fitted
    boot_speeds_mps: tuple[float, ...]


def quarter_box_fits(
    look: Look, model: DepthModel, *, g: float, tuning: Tuning, turn_deg: float = 0.0
) -> list[tuple[float, float, float]]:
    """Refit on four sub-boxes behind (with the matching ones ahead): (speed, track correction, depth), in the
    look's track frame turned by ``turn_deg`` (the track corrections are then given in the look's frame)."""
    t = tuning
    box = t.box_px
    half = box // 2
    tf = box_frame(look.chip, look.back_deg + turn_deg, t) if turn_deg else look.tf
    behind, ahead = tf[:, -box:], tf[:, :box][:, ::-1]
    fr_bounds = FR_SUPER_RANGE if model.supercritical else (0.2, FR_MAX)
    speed, depth, delta = model.speed_mps, model.depth_m, model.delta_deg
    lo, hi = t.boot_speed_range
    out = []
    for rv in (slice(0, half), slice(half, box)):
        for ru in (slice(0, half), slice(half, box)):
            sp = whitened_spectrum(behind[rv, ru], ahead[rv, ru], look.chip.m_per_px, tuning)
            f = fit_curve(
                sp,
                g=g,
                depth_m=depth,
                delta_max_deg=t.boot_delta_extra_deg + abs(delta),
                speed_range=(lo * speed, hi * speed),
            )
            if not (np.isfinite(f.speed_mps) and f.score >= t.boot_score_min):
                continue  # a quarter with no wake of its own says nothing about the speed
            if model.fitted:
                r = refine_speed_depth(sp, f.speed_mps, depth, f.delta_deg, g=g, fr_bounds=fr_bounds)
                out.append((r.speed_mps, r.delta_deg + turn_deg, r.depth_m))
            else:
                out.append((f.speed_mps, f.delta_deg + turn_deg, depth))
    return out


def estimate_spread(look: Look, model: DepthModel, *, g: float, tuning: Tuning) -> Spread:
    t = tuning
    turns = (0.0, -t.spread_turn_deg, t.spread_turn_deg) if t.spread_turn_deg > 0 else (0.0,)
    sets = [quarter_box_fits(look, model, g=g, tuning=t, turn_deg=turn) for turn in turns]
    sub = sets[0]
    counted = [s for s in sets if len(s) >= 3]
    n_boxes = round(float(np.mean([len(s) for s in counted]))) if counted else 0
    infl = student_inflation(n_boxes) if n_boxes >= 3 else 2.0

    def boot_std(index: int, floor: float) -> float:
        if not counted:
            values = [b[index] for b in sub]
            return max(floor, 0.05 * abs(float(np.mean(values))) if values else floor)
        pooled = float(np.mean([np.var([b[index] for b in s], ddof=1) for s in counted]))
        return max(float(np.sqrt(pooled / n_boxes) * infl), floor)

    # a fitted depth adds a nearly degenerate direction (speed against depth): no shrinking of the spread,
    # and a larger floor
    u, h = model.speed_mps, model.depth_m
    if model.fitted:
        scale, floor = 1.0, t.fitted_depth_rel_std
    else:
        scale = t.spectral_sigma_scale_radar if look.chip.radar else t.spectral_sigma_scale
        floor = t.speed_rel_std_floor
    u_std = scale * boot_std(0, floor * u / scale)
    d_std = max(t.heading_sigma_scale * boot_std(1, t.heading_std_floor_deg), t.heading_std_floor_deg)
    h_std = min(boot_std(2, t.fitted_depth_std_floor * h), t.fitted_depth_std_cap * h) if model.fitted else 0.0
    return Spread(u_std, d_std, h_std, tuple(b[0] for b in sub))
