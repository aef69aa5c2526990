"""analyze(): from a scene and a vessel position to speed, heading and depth regime.

Composes detection (chip, wake side, spectral fit, transverse crests, arms,
turbulent wake) and the inversion core (Monte Carlo intervals, combination,
depth regime).  A scene without a wake says so and gives no speed.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, replace

import numpy as np

from ..errors import CancelledError, ParameterError
from ..physics import inversion as inv
from ..physics import havelock, kelvin
from ..physics.gravity import normal_gravity
from ..physics.hull import apparent_arm_angle, hull_froude
from ..scene import geodesy
from ..scene.raster import Scene
from . import arms as arms_mod
from . import lines as lines_mod
from .apex import find_displaced_apex
from .chip_measures import (chip_outline, radar_offset_estimate, track_profile, wake_geometry,
                            wedge_arms)
from .prepare import Chip, prepare_chip
from .result import RadarGeometry, WakeAnalysis
from .spectral import (FR_MAX, FR_SUPER_RANGE, CurveFit, DepthFit, crest_spacing, curve_points, fit_at_froude,
                       fit_curve,
                       fit_speed_depth, fit_supercritical, refine_speed_depth, student_inflation, whitened_spectrum)
from .trackframe import track_frame, wake_side

#: Decision thresholds, calibrated on wake-free scenes (see tests/test_wake_decision.py and DEVELOPERS.md).
SIGNIFICANCE_MIN = 7.0
SIDE_CONTRAST_MIN = 8.0
#: Measured with benchmarks/null_sweep.py: 0 alarms in 354 trials on 640 px and 234 on 1024 px wake-free scenes
#: (noise, swell, scikit-image textures); upper 95 % bound by the rule of three, 3 / 588.
FALSE_ALARM_RATE_MAX = 3.0 / 588
FALSE_ALARM_NOTE = (f"false-alarm rate below {100 * FALSE_ALARM_RATE_MAX:.1f} % per decision: none in 588 wake-free "
                    "test scenes")

CHIP_PX = 640
BOX_PX = 256
GAP_PX = 12
DEPTH_GAIN_MIN = 1.0  # score gain of the joint (speed, depth, track) fit over the deep one to call a depth effect
TRANSVERSE_SNR_MIN = 12.0
#: The spread of speeds refitted on four quarter-size sub-boxes overstates the error of the full box
#: (each sub-box has half the spectral resolution).  Scale calibrated on synthetic scenes (seeds 0-59 of
#: tests/wake_cases.py: 95 % of |error| / (scaled sigma) <= 1.96); checked on other seeds in the tests.
SPECTRAL_SIGMA_SCALE = 0.5
#: Radar chips are analysed in dB, where the quarter boxes scatter more: on seeds 0-59 the 95th percentile of
#: |error| / sigma was 0.53 for radar at scale 0.5 (1.13 for optical); 0.3 keeps radar intervals on the safe side.
SPECTRAL_SIGMA_SCALE_RADAR = 0.3
BOOT_SCORE_MIN = 3.0  #: a quarter-box refit counts only when its own curve stands out this much
#: The quarter boxes' track angles scatter far more than the full box's error: on seeds 0-59 the 95th percentile
#: of |heading error| / (unscaled sigma) was 0.29; 0.4 still leaves the stated heading uncertainty conservative.
HEADING_SIGMA_SCALE = 0.4
#: Below this depth Froude number depth changes the pattern too little to matter (Havelock: < 0.3 deg).
FR_DEPTH_EFFECT = 0.6
#: Without a depth effect, shallow water is ruled out when the curve for Fr_h FR_RULE_OUT (speed and track
#: refitted) scores at least RULE_OUT_MIN below the best fit; otherwise the regime is "unknown" and the interval
#: covers both.  Both gates set on synthetic seeds 0-59 (deep) and 420-431 (Fr_h 0.85 and 0.92), see DEVELOPERS.md.
FR_RULE_OUT = 0.9
RULE_OUT_MIN = 1.5
#: The supercritical curve replaces the others only when it scores this much higher (a different pattern: no
#: transverse waves, half-angle arcsin(1/Fr_h)).  Set on synthetic seeds 470-477 at Fr_h 1.3 against the deep and
#: Fr_h 0.85/0.92 sets.
SUPER_GAIN_MIN = 2.0
#: A wake seen only through the supercritical curve (more free parameters) needs a higher significance.
SUPER_SIGNIFICANCE_MIN = 9.0
#: Depth Froude numbers tried against the best fit; the interval covers the speeds of those not ruled out.
FR_OPEN_CHECK = (0.75, FR_RULE_OUT)
#: Smallest relative standard uncertainty of a speed fitted together with the depth: on seeds 420-431 at
#: Fr_h 0.85 and 0.92 the joint fit's errors were within 2 % in 19 of 20 found cases.
FITTED_DEPTH_REL_STD = 0.01
ARMS_DRAW_MAX_STD = 6.0  # deg


@dataclass(frozen=True)
class _Pass:
    chip: Chip
    back_deg: float
    side_contrast: float
    fit: CurveFit
    tf: np.ndarray  #: track-frame texture, (v, u) with u from -(GAP+BOX) to GAP+BOX
    u_start: int
    turbulent: object = None  #: arms.TurbulentWake (localised Radon) or None


def _one_pass(scene: Scene, px: tuple[float, float], step: int, g: float, depth: float,
              radar: bool | None, snap: bool = True) -> _Pass:
    """Prepare a chip, find which way the wake lies and fit the deep-water (or given-depth) curve.

    Two candidate track directions are tried, the centre of the energetic wedge and the
    turbulent wake line (localised Radon); the one whose spectrum fits better wins.
    """
    chip = prepare_chip(scene, px, size_px=CHIP_PX, step=step, radar=radar, snap_radius_m=40.0 if snap else 0.0)
    side = wake_side(chip)
    candidates = [side.back_angle_deg]
    tw = arms_mod.turbulent_wake(chip.data, chip.valid, chip.vessel_rc, side.back_angle_deg)
    if tw is not None and tw.significance >= 8.0 and abs(((tw.angle_deg - side.back_angle_deg) + 180) % 360 - 180) > 2:
        candidates.append(tw.angle_deg)
    best: _Pass | None = None
    u0 = -(GAP_PX + BOX_PX)
    for back in candidates:
        tf = track_frame(chip.data, chip.vessel_rc, back, u_range=(u0, GAP_PX + BOX_PX), v_half=BOX_PX / 2)
        sp = whitened_spectrum(tf[:, -BOX_PX:], tf[:, :BOX_PX][:, ::-1], chip.m_per_px)
        fit = fit_curve(sp, g=g, depth_m=depth, delta_max_deg=20.0, delta_step_deg=1.5)
        cand = _Pass(chip, back, side.contrast, fit, tf, u0, tw)
        if best is None or (np.isfinite(fit.score) and not fit.score <= best.fit.score):
            best = cand
    assert best is not None
    return best


def analyze(scene: Scene, *, vessel_px: tuple[float, float] | None = None,
            vessel_lonlat: tuple[float, float] | None = None, depth_m: float | None = None,
            depth_std_m: float = 0.0, hull_length_m: float | None = None,
            radar_geometry: RadarGeometry | None = None, radar: bool | None = None,
            pixel_rel_std: float = 0.005, seed: int = 0,
            progress: Callable[[float, str], None] | None = None,
            cancelled: Callable[[], bool] | None = None,
            displaced_hull_px: tuple[float, float] | None = None) -> WakeAnalysis:
    """Analyse the wake of one vessel.

    Parameters
    ----------
    scene : Scene
        An opened scene (georeferenced, or calibrated with :meth:`Scene.calibrate`).
    vessel_px, vessel_lonlat : (col, row) or (lon, lat)
        Where the vessel is (one of the two); snapped to a hull nearby.
    depth_m, depth_std_m : float, optional
        Known water depth; otherwise deep water is assumed unless the wake's
        half-angle shows a depth effect, and the depth is then estimated.
    hull_length_m : float, optional
        For the high-speed (narrow arms) caveat.
    radar_geometry : RadarGeometry, optional
        Enables the radar azimuth-offset method.
    progress, cancelled : callables, optional
        ``progress(fraction, what)`` is called between stages; when ``cancelled()`` returns
        True the analysis stops with :class:`~wakemeter.errors.CancelledError`.
    displaced_hull_px : (col, row), optional
        Radar: the hull is seen here, away from its wake (azimuth shift of a moving target), and
        ``vessel_px`` is where the wake starts.  Found automatically when a radar hull shows no wake
        of its own (:mod:`wakemeter.detect.apex`).
    """
    def stage(fraction: float, what: str) -> None:
        if cancelled is not None and cancelled():
            raise CancelledError("the analysis was cancelled")
        if progress is not None:
            progress(fraction, what)

    if (vessel_px is None) == (vessel_lonlat is None):
        raise ParameterError("give the vessel position either as vessel_px or as vessel_lonlat (exactly one)")
    if depth_m is not None and not (np.isfinite(depth_m) and depth_m > 0):
        raise ParameterError(f"depth_m must be > 0 m, got {depth_m!r}")
    if hull_length_m is not None and not (np.isfinite(hull_length_m) and hull_length_m > 0):
        raise ParameterError(f"hull_length_m must be > 0 m, got {hull_length_m!r}")
    if vessel_lonlat is not None:
        c, r = geodesy.lonlat_to_pixel(scene.georef, vessel_lonlat[0], vessel_lonlat[1])
        vessel_px = (float(c), float(r))
    assert vessel_px is not None
    lonlat = None
    if scene.info.georeferenced:
        lon, lat = geodesy.pixel_to_lonlat(scene.georef, vessel_px[0], vessel_px[1])
        lonlat = (float(lon), float(lat))
        g = float(normal_gravity(lonlat[1]))
        g_u = inv.Uncertain(g, 0.0005)
    else:
        g, g_u = 9.80665, inv.Uncertain(9.80665, 0.015)
    depth_fit = np.inf if depth_m is None else float(depth_m)

    # scale selection: coarser when the waves are long for the box, finer when too short
    stage(0.05, "reading the vessel's surroundings")
    step = 1
    snap = displaced_hull_px is None
    p = _one_pass(scene, vessel_px, step, g, depth_fit, radar, snap)
    if not (p.fit.significance >= SIGNIFICANCE_MIN and p.side_contrast >= SIDE_CONTRAST_MIN) \
            and min(scene.width, scene.height) >= 0.8 * CHIP_PX * 2:
        # nothing at full resolution: the waves may be too long for the box (a few wavelengths only); one
        # look at half resolution (the false-alarm check covers both looks, see DEVELOPERS.md)
        try:
            p_coarse = _one_pass(scene, vessel_px, 2, g, depth_fit, radar, snap)
        except ParameterError:
            p_coarse = None
        if p_coarse is not None and p_coarse.fit.significance >= SIGNIFICANCE_MIN \
                and p_coarse.side_contrast >= SIDE_CONTRAST_MIN:
            p, step = p_coarse, 2
    for _ in range(3):
        lam_px = 2 * np.pi * p.fit.speed_mps ** 2 / g / p.chip.m_per_px if np.isfinite(p.fit.speed_mps) else np.nan
        if not (np.isfinite(lam_px) and lam_px > BOX_PX / 5 and p.fit.significance >= SIGNIFICANCE_MIN):
            break
        if min(scene.width, scene.height) < 0.8 * CHIP_PX * 2 * step:
            break  # no room for a coarser chip
        try:
            p_coarse = _one_pass(scene, vessel_px, 2 * step, g, depth_fit, radar, snap)
        except ParameterError:
            break
        p, step = p_coarse, 2 * step
    assert p is not None
    stage(0.45, "measuring crests and arms")
    chip, fit = p.chip, p.fit
    # snap to the hull when one was found close to the click
    snapped = chip.to_scene(*chip.hull_rc) if chip.hull_rc is not None else vessel_px
    if scene.info.georeferenced:
        lon, lat = geodesy.pixel_to_lonlat(scene.georef, snapped[0], snapped[1])
        lonlat = (float(lon), float(lat))
    m = chip.m_per_px
    sp = whitened_spectrum(p.tf[:, -BOX_PX:], p.tf[:, :BOX_PX][:, ::-1], m)
    # a supercritical vessel (Fr_h > 1) has no transverse waves and the deep-water curve may lock onto
    # anything: when the wake side is clear, the supercritical curve is tried too (speed unrestricted), and
    # the subcritical finite-depth curve (speed, depth and track together)
    sup = joint = DepthFit(np.nan, np.nan, 0.0, np.nan)
    if depth_m is None and p.side_contrast >= SIDE_CONTRAST_MIN:
        sup = fit_supercritical(sp, g=g)
        if np.isfinite(fit.speed_mps):
            joint = fit_speed_depth(sp, fit.speed_mps, fit.delta_deg, g=g)
    best_sub = np.nanmax([fit.score, joint.score, -np.inf])
    supercritical = bool(np.isfinite(sup.score) and sup.score >= best_sub + SUPER_GAIN_MIN)
    significance = float(sup.score if supercritical else fit.significance)
    found = bool(p.side_contrast >= SIDE_CONTRAST_MIN and (
        (np.isfinite(fit.speed_mps) and fit.significance >= SIGNIFICANCE_MIN)
        or (supercritical and sup.score >= SUPER_SIGNIFICANCE_MIN)))
    frame = scene.local_frame(snapped[0], snapped[1])
    cautions = [CAUTION_ESTIMATE]
    if displaced_hull_px is not None:
        d_m = frame.length_of(displaced_hull_px[0] - snapped[0], displaced_hull_px[1] - snapped[1])
        cautions.append(f"the hull is seen {d_m:.0f} m from the start of its wake (radar shows moving targets shifted "
                        "in azimuth, Raney 1971): the analysis starts where the wake starts, the vessel's true "
                        "position at the time of imaging; check that this wake belongs to this hull")
    if not frame.georeferenced:
        cautions.append("the image has no georeference: distances use the hand calibration"
                        + ("" if frame.north_known else "; headings are relative to image up, not true bearings"))
    regime_none = inv.DepthRegime("unknown", None, None, None, None, "no wake: nothing to judge")
    if not found and chip.radar and chip.hull_rc is not None and displaced_hull_px is None:
        # a radar hull beside its wake (moving targets are shifted in azimuth): look for where the wake starts
        # (only from a bright hull: without one there is nothing displaced)
        stage(0.3, "looking for a wake displaced from the hull")
        try:
            apex = find_displaced_apex(scene, snapped, step=chip.step, size_px=CHIP_PX, radar=True)
            moved = None if apex is None else analyze(
                scene, vessel_px=apex.apex_px, depth_m=depth_m, depth_std_m=depth_std_m,
                hull_length_m=hull_length_m, radar_geometry=radar_geometry, radar=True,
                pixel_rel_std=pixel_rel_std, seed=seed, progress=progress, cancelled=cancelled,
                displaced_hull_px=snapped)
        except ParameterError:  # the wake's start lies too near the scene's edge to analyse: keep "no wake"
            moved = None
        if moved is not None and moved.wake_found:
            return moved
    if not found:
        why = (f"no wake found: spectral significance {significance:.1f} (needs {SIGNIFICANCE_MIN}) and "
               f"wake-side contrast {p.side_contrast:.1f} (needs {SIDE_CONTRAST_MIN}); thresholds set for "
               f"{FALSE_ALARM_NOTE}")
        return WakeAnalysis(False, why, significance, snapped, lonlat, None, None, None, (), None, None,
                            None, None, regime_none, None, None, g, chip.m_per_px, tuple(cautions),
                            geometry={"chip": chip_outline(chip)},
                            plots={"side_contrast": p.side_contrast, "fit_speed": fit.speed_mps})
    # depth: given, or tested by fitting speed, depth and track together on the finite-depth curve
    # (Zilman et al. 2004); the deep-water fit is kept unless depth clearly improves the fit
    u_fit, h_fit, delta_fit, finite = fit.speed_mps, depth_fit, fit.delta_deg, depth_m is not None
    depth_gain = rule_out = np.nan
    shallow_alt = None
    open_alts: list = []  #: shallower-water fits (Fr_h FR_OPEN_CHECK) that cannot be ruled out
    evidence = ""
    if depth_m is None:
        depth_gain = joint.score - fit.score if np.isfinite(joint.score) else np.nan
        if supercritical:
            u_fit, h_fit, delta_fit, finite, supercritical = sup.speed_mps, sup.depth_m, sup.delta_deg, True, True
            evidence = (f"no transverse waves: the supercritical curve fits the wave spectrum far better (score "
                        f"{sup.score:.1f}) than the deep-water ({fit.score:.1f}) or subcritical ({joint.score:.1f}) "
                        "curves")
        elif depth_gain >= DEPTH_GAIN_MIN and joint.depth_froude(g) >= FR_DEPTH_EFFECT:
            u_fit, h_fit, delta_fit, finite = joint.speed_mps, joint.depth_m, joint.delta_deg, True
            evidence = (f"the finite-depth curve fits the wave spectrum better than the deep-water curve "
                        f"(score {joint.score:.1f} against {fit.score:.1f}); the deep-water fit would read "
                        f"{fit.speed_mps:.2f} m/s")
        else:
            best = max(fit.score, joint.score)
            for fr_try in FR_OPEN_CHECK:
                alt = fit_at_froude(sp, fit.speed_mps, fit.delta_deg, fr_try, g=g)
                drop = best - alt.score if np.isfinite(alt.score) else np.inf
                if not drop >= RULE_OUT_MIN:
                    open_alts.append((fr_try, alt))
                if fr_try == FR_RULE_OUT:
                    shallow_alt, rule_out = alt, drop
    back = (p.back_deg + delta_fit) % 360.0
    lam_pred = float(kelvin.transverse_wavelength(u_fit, h_fit, g=g))
    prof = track_profile(chip, back, lam_pred, m, gap_px=GAP_PX, box_px=BOX_PX)
    band = (0.85 * lam_pred, 1.18 * lam_pred) if finite else (0.8 * lam_pred, 1.25 * lam_pred)
    lam_t, lam_t_sd, snr = crest_spacing(prof, m, band_m=band) if np.isfinite(lam_pred) else (np.nan, np.nan, 0.0)
    transverse_seen = bool(np.isfinite(lam_t) and snr >= TRANSVERSE_SNR_MIN)
    arms, energy, evalid, reach = wedge_arms(
        chip, back, lam_pred if np.isfinite(lam_pred) else float(kelvin.transverse_wavelength(u_fit, g=g)), m,
        gap_px=GAP_PX)
    half, half_sd = (arms.half_angle_deg, arms.half_angle_std_deg) if arms else (None, None)
    # straight lines through the vessel with their significance: Kelvin arms (wave-energy ridges; the track
    # frame's +v is the image's counter-clockwise side, so its fan angles change sign) and the radar narrow V
    # searched near the measured half-angle when it is well measured, else near the one the fit predicts
    # (Kelvin's in deep water, Havelock's for the fitted or given depth)
    expected = float(havelock.half_angle(u_fit / np.sqrt(g * h_fit))) if np.isfinite(h_fit) \
        else kelvin.KELVIN_HALF_ANGLE_DEG
    near = half if (half is not None and half_sd <= ARMS_DRAW_MAX_STD) else expected
    lines = [replace(ln, angle_from_track_deg=-ln.angle_from_track_deg)
             for ln in lines_mod.kelvin_arm_lines(energy, evalid, u0=reach, near_deg=near)]
    if chip.radar:
        lines += lines_mod.narrow_v_lines(chip.data, chip.valid, chip.vessel_rc, back)
    tw = p.turbulent
    tw_angle = float((tw.angle_deg - back + 180.0) % 360.0 - 180.0) if tw is not None else np.nan
    # the turbulent wake runs along the track the spectrum gives; a line well off it is something else
    if tw is not None and tw.significance >= lines_mod.LINE_SIGNIFICANCE_MIN and abs(tw_angle) <= 4.0:
        lines.insert(0, lines_mod.WakeLine("turbulent wake (dark)" if tw.dark else "turbulent wake (bright)",
                                           tw_angle, float(tw.significance), float(0.46 * chip.data.shape[0])))
    stage(0.65, "estimating uncertainty")
    sub = _bootstrap(p, g, h_fit, u_fit, delta_fit, fitted_depth=finite and depth_m is None,
                     fr_bounds=FR_SUPER_RANGE if supercritical else (0.2, FR_MAX))
    infl = student_inflation(len(sub)) if len(sub) >= 3 else 2.0

    def boot_std(values: list[float], floor: float) -> float:
        if len(values) < 3:
            return max(floor, 0.05 * abs(np.mean(values)) if values else floor)
        return max(float(np.std(values, ddof=1) / np.sqrt(len(values)) * infl), floor)
    # a fitted depth adds a nearly degenerate direction (speed against depth): no shrinking of the spread,
    # and a larger floor (FITTED_DEPTH_REL_STD)
    fitted = finite and depth_m is None
    scale = 1.0 if fitted else (SPECTRAL_SIGMA_SCALE_RADAR if chip.radar else SPECTRAL_SIGMA_SCALE)
    u_std = scale * boot_std([b[0] for b in sub], (FITTED_DEPTH_REL_STD if fitted else 0.006) * u_fit / scale)
    d_std = max(HEADING_SIGMA_SCALE * boot_std([b[1] for b in sub], 0.3), 0.3)
    h_std = min(boot_std([b[2] for b in sub], 0.05 * h_fit), 0.5 * h_fit) if finite and depth_m is None else 0.0
    dcol, drow = np.cos(np.radians(back + 180)), -np.sin(np.radians(back + 180))
    heading = float(frame.bearing_of(dcol, drow))
    # speed estimates with Monte Carlo intervals
    if depth_m is not None:
        cond_depth: inv.Uncertain | None = inv.Uncertain(depth_m, depth_std_m)
    elif finite:
        cond_depth = inv.Uncertain(h_fit, h_std)
    else:
        cond_depth = None
    cond = inv.Conditions(g_mps2=g_u, depth_m=cond_depth, pixel_scale_rel_std=pixel_rel_std)
    rng = np.random.default_rng(seed)
    methods = [inv.speed_from_spectral_fit(inv.Uncertain(u_fit, u_std), cond, seed=rng)]
    if finite and depth_m is None:
        methods[0] = replace(methods[0], method="spectral fit (supercritical curve, depth fitted)" if supercritical
                             else "spectral fit (finite-depth curve, depth fitted)")
    lam_u = inv.Uncertain(lam_t, max(1.25 * lam_t_sd, 0.006 * lam_t)) if transverse_seen else None
    if lam_u is not None and not (finite and depth_m is None):
        methods.append(inv.speed_from_transverse_wavelength(lam_u, cond, seed=rng))
    elif lam_u is not None and half is not None and half > kelvin.KELVIN_HALF_ANGLE_DEG + 2 * half_sd \
            and half_sd < 4.0:
        # independent of the spectral fit: Havelock's angle gives Fr_h, the transverse waves give k
        est, _dep = inv.speed_and_depth_from_transverse_wavelength_and_half_angle(
            lam_u, inv.Uncertain(half, half_sd), inv.Conditions(g_mps2=g_u, pixel_scale_rel_std=pixel_rel_std),
            seed=rng)
        methods.append(est)
    if radar_geometry is not None:
        hull_chip = chip
        if displaced_hull_px is not None:  # the hull is not at the wake's start: use where it was seen
            hull_chip = replace(chip, hull_rc=((displaced_hull_px[1] - chip.origin_px[1]) / chip.step,
                                               (displaced_hull_px[0] - chip.origin_px[0]) / chip.step))
        est = radar_offset_estimate(hull_chip, back, heading, frame, radar_geometry, cond, rng)
        if est is not None:
            methods.append(est)
        else:
            cautions.append("radar azimuth offset not measured: no bright hull found near the given position")
    stage(0.9, "combining methods")
    combined = inv.combine_estimates(methods)
    shallow_open = shallow_alt is not None and not rule_out >= RULE_OUT_MIN
    h_alt = u_fit ** 2 / (g * FR_RULE_OUT ** 2)
    if cond_depth is not None:
        regime = inv.assess_depth_regime(speed=methods[0], depth_m=cond_depth, g=g)
    elif shallow_open:
        regime = inv.DepthRegime(
            "unknown", None, None, None, None,
            f"the wave spectrum cannot tell deep water from water about {h_alt:.0f} m deep (Fr_h {FR_RULE_OUT}): "
            f"the shallow-water curve fits almost as well (score {shallow_alt.score:.1f} against "
            f"{fit.score:.1f}, at {shallow_alt.speed_mps:.2f} m/s); the 95 % interval covers both")
    else:
        regime = inv.DepthRegime(
            "deep", None, None, None, None,
            "the wave spectrum fits the deep-water dispersion curve: no depth effect found; water shallow enough "
            f"for Fr_h {FR_RULE_OUT} (about {h_alt:.0f} m) fits clearly worse (score {shallow_alt.score:.1f} "
            f"against {fit.score:.1f})"
            + "".join(f"; water with Fr_h {f:.2f} (about {u_fit ** 2 / (g * f * f):.0f} m) fits almost as well, "
                      "the 95 % interval covers it" for f, _ in open_alts))
    if half is not None and cond_depth is None:
        regime = replace(regime, explanation=regime.explanation + f"; arms measured at {half:.1f} +/- {half_sd:.1f} deg")
    interval_cover = None  #: speeds the interval must keep covering (shallower water not ruled out)
    if open_alts:  # the interval covers the speeds of shallower water that fits almost as well
        alts = [a for _, a in open_alts if np.isfinite(a.speed_mps)]
        half_w = 0.5 * (combined.ci95_high_mps - combined.ci95_low_mps)  # the same precision at the other depth
        lo_alt = max(min(a.speed_mps for a in alts) - half_w, 0.0) if alts else combined.ci95_low_mps
        hi_alt = max(a.speed_mps for a in alts) + half_w if alts else combined.ci95_high_mps
        interval_cover = (float(lo_alt), float(hi_alt), ", ".join(f"{f:.2f}" for f, _ in open_alts))
        if lo_alt < combined.ci95_low_mps or hi_alt > combined.ci95_high_mps:
            frs = interval_cover[2]
            combined = replace(combined, ci95_low_mps=min(lo_alt, combined.ci95_low_mps),
                               ci95_high_mps=max(hi_alt, combined.ci95_high_mps),
                               verdict=combined.verdict + f"; interval widened to cover shallower water that fits "
                               f"almost as well (Fr_h {frs})")
            if not shallow_open:
                cautions.append(f"the 95 % interval was widened to {combined.ci95_low_mps:.2f}-"
                                f"{combined.ci95_high_mps:.2f} m/s because water with Fr_h {frs} fits the waves "
                                "almost as well; give the depth to narrow it")
    depth_est = depth_ci = None
    if cond_depth is not None:
        depth_est = cond_depth.value
        depth_ci = (max(cond_depth.value - 1.96 * cond_depth.std, 0.0), cond_depth.value + 1.96 * cond_depth.std)
    if finite and depth_m is None:
        fr = u_fit / np.sqrt(g * h_fit)
        regime = replace(regime, explanation=regime.explanation.replace("the given depth", "the fitted depth")
                         + f"; evidence: {evidence}; Havelock's half-angle for Fr_h {fr:.2f} is "
                         f"{float(havelock.half_angle(fr)):.1f} deg"
                         + (f", measured {half:.1f} +/- {half_sd:.1f} deg" if half is not None else ""))
    if half is not None and half < kelvin.KELVIN_HALF_ANGLE_DEG - max(2 * half_sd, 2.0):
        msg = f"arms at {half:.1f} deg are narrower than Kelvin's 19.47 deg"
        if hull_length_m:
            fr_l = float(hull_froude(combined.speed_mps, hull_length_m, g=g))
            msg += (f"; hull Froude number {fr_l:.2f} predicts brightest arms at "
                    f"{float(apparent_arm_angle(fr_l)):.1f} deg (Rabaud & Moisy 2013)")
        else:
            msg += "; a fast, short hull can explain it (give the hull length to check)"
        cautions.append(msg)
    if not combined.consistent:
        cautions.append(combined.verdict)
    if finite and depth_m is None:
        cautions.append(f"water depth not given: the wave pattern shows a depth effect and the depth was fitted "
                        f"({h_fit:.1f} m); give a charted depth to check it")
    elif shallow_open:
        cautions.append(f"water depth not given and the waves cannot tell deep water from water about {h_alt:.0f} m "
                        "deep: the interval covers both; give the depth to narrow it")
    elif cond_depth is None:
        cautions.append("water depth not given: deep water assumed (the wave spectrum shows no depth effect)")
    cautions.append("speed is through the water; a current adds to the speed over ground")
    # draw the arms only when they were measured well enough to be worth showing as evidence
    geometry = wake_geometry(chip, back, half, arms if (arms is not None and half_sd <= ARMS_DRAW_MAX_STD) else None,
                         [ln for ln in lines if ln.kind == "narrow-V arm"])
    if displaced_hull_px is not None:  # from the hull as imaged to where its wake starts
        geometry["hull_shift"] = [tuple(displaced_hull_px), tuple(snapped)]
    plots = {"whitened_spectrum": sp.white, "spectrum_dk": (sp.dk_u, sp.dk_v), "profile": prof,
             "fit_speed_mps": u_fit, "fit_depth_m": h_fit, "fit_delta_deg": delta_fit,
             "fitted_curve": curve_points(u_fit, h_fit, delta_fit, g=g, k_max=1.05 * sp.k_hi),
             "spectrum_band": (sp.k_lo, sp.k_hi), "transverse_wavelength_m": lam_t if transverse_seen else None,
             "profile_m_per_px": m, "interval_cover": interval_cover, "depth_gain": depth_gain, "shallow_rule_out": rule_out, "side_contrast": p.side_contrast,
             "boot_speeds": [b[0] for b in sub],
             "radon": None if p.turbulent is None else p.turbulent.sinogram,
             "radon_angles_deg": None if p.turbulent is None else p.turbulent.angles_deg,
             "radon_pick": None if p.turbulent is None else (p.turbulent.radon_angle_deg, p.turbulent.offset_px,
                                                            p.turbulent.significance),
             "speed_grid": fit.speed_grid, "score_profile": fit.profile}
    decision = (f"wake found: spectral significance {significance:.1f}, wake-side contrast {p.side_contrast:.1f} "
                f"({FALSE_ALARM_NOTE})")
    return WakeAnalysis(True, decision, significance, snapped, lonlat, heading, d_std, combined,
                        tuple(methods), half, half_sd, lam_t if transverse_seen else None,
                        lam_t_sd if transverse_seen else None, regime, depth_est, depth_ci, g, m,
                        tuple(cautions), geometry, plots, tuple(lines))


CAUTION_ESTIMATE = ("estimates from imagery for analysis: local regulations, certified instruments and licensed "
                    "practice decide any enforcement; verify scene timing and georeferencing independently")


def _bootstrap(p: _Pass, g: float, depth: float, speed: float, delta: float, *, fitted_depth: bool,
               fr_bounds: tuple[float, float] = (0.2, FR_MAX)) -> list[tuple[float, float, float]]:
    """Refit on four sub-boxes behind (with the matching ones ahead): (speed, track correction, depth)."""
    half = BOX_PX // 2
    behind, ahead = p.tf[:, -BOX_PX:], p.tf[:, :BOX_PX][:, ::-1]
    out = []
    for rv in (slice(0, half), slice(half, BOX_PX)):
        for ru in (slice(0, half), slice(half, BOX_PX)):
            sp = whitened_spectrum(behind[rv, ru], ahead[rv, ru], p.chip.m_per_px)
            f = fit_curve(sp, g=g, depth_m=depth, delta_max_deg=6.0 + abs(delta),
                          speed_range=(0.75 * speed, 1.33 * speed))
            if not (np.isfinite(f.speed_mps) and f.score >= BOOT_SCORE_MIN):
                continue  # a quarter with no wake of its own says nothing about the speed
            if fitted_depth:
                r = refine_speed_depth(sp, f.speed_mps, depth, f.delta_deg, g=g, fr_bounds=fr_bounds)
                out.append((r.speed_mps, r.delta_deg, r.depth_m))
            else:
                out.append((f.speed_mps, f.delta_deg, depth))
    return out
