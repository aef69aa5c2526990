"""The wake seen as lines: the finding when the Kelvin crests are not resolved (most real scenes).

Runs when the spectral look finds no wave pattern, or cannot be taken (too little open water in its
box).  A line that starts at a hull and stands out against the scene's other lines
(:mod:`.wakeline`) is a wake: the finding gives the heading from the line with its uncertainty, lists
the lines, and gives a speed only from what the scene allows:

* from the speed methods that read lines (the same :data:`~.methods.SPEED_METHODS` as the wave path): the
  hull's shift between two bands recorded a known time apart (Sentinel-2), a speed over ground, and the
  narrow arms of a fast hull with its length, each inside its own domain;
* otherwise none, with the reason (for example the transverse wavelength for 3-20 kn in pixels here).
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np
from scipy import ndimage

from ..errors import ParameterError
from ..physics import inversion as inv
from ..physics import kelvin
from ..physics.units import KNOT_MPS
from ..scene import geodesy
from ..scene.raster import Scene
from .explain import opening_cautions
from .findings import Caution, CautionCode, Diagnostics, Drawing, LineKind, LinePlotData, Segment, SegmentKind
from .foam_colour import nir_share, ray_pixels, visible_tilt
from .foam_streak import foam_streak
from .hull_outline import line_is_the_hull
from .line_chip import LineChip, prepare_line_chip
from .lines import WakeLine
from .methods import SPEED_METHODS, LineStages, MethodContext, SpeedMethod, combine, run_methods
from .request import AnalysisRequest, pixel_rel_std
from .result import WakeAnalysis
from .tuning import Tuning
from .wakeline import LineWake, find_wake_line

#: speeds for which the "why no speed" note gives the transverse wavelength in pixels (knots)
NOTE_SPEEDS_KN = (3.0, 20.0)
#: fewer pixels per transverse wave than this cannot show crests (two samples per crest and some margin;
#: common practice, no source)
RESOLVABLE_WAVE_PX = 4.0


@dataclass(frozen=True, eq=False)
class LineLook:
    """What the line search saw at a point (also when it found no wake)."""

    chip: LineChip | None
    wake: LineWake | None
    found: bool
    why_not: str  #: empty when found


def look_for_lines(
    scene: Scene,
    px: tuple[float, float],
    request: AnalysisRequest,
    tuning: Tuning,
    *,
    hull_elsewhere: bool = False,
    hull_axis_deg: float | None = None,
) -> LineLook:
    """Search the vessel's surroundings for a wake line; never raises for a poor area (says why instead).
    ``hull_elsewhere``: the search starts where a radar hull's displaced wake begins (the hull is the
    evidence of a vessel).  A line that does not make a wake alone may still run along a bright streak
    fading from its head (hull and foam at coarse pixels, :mod:`.foam_streak`)."""
    try:
        chip = prepare_line_chip(
            scene, px, size_px=tuning.line_chip_px, snap_radius_m=tuning.line_snap_radius_m, tuning=tuning
        )
    except ParameterError as err:
        return LineLook(None, None, False, str(err))
    wake = find_wake_line(chip, reach_m=tuning.line_reach_m, rng_seed=request.seed, tuning=tuning)
    structure = _structure(chip, tuning)
    look = _line_look(
        chip, wake, request, tuning, hull_elsewhere=hull_elsewhere, hull_axis_deg=hull_axis_deg, structure=structure
    )
    if look.found or wake is None or hull_elsewhere or chip.hull_at_land or structure:
        return look
    if chip.radar or chip.m_per_px < tuning.streak_pixel_min_m:
        return look
    streak_look, why = _streak_look(chip, request.seed, tuning)
    if streak_look is not None:
        return streak_look
    return LineLook(chip, wake, False, f"{look.why_not}; nor is it a streak from its head: {why}")


def _streak_look(chip: LineChip, seed: int, tuning: Tuning) -> tuple[LineLook | None, str]:
    """The wake as a bright streak fading from its head, when the best bright line from the head (scored as
    any line, against the scene's other lines) runs back along the streak."""
    streak, why = foam_streak(chip, tuning)
    if streak is None:
        return None, why
    wake = find_wake_line(
        replace(chip, click_rc=streak.head_rc, hull=None), reach_m=tuning.line_reach_m, rng_seed=seed, tuning=tuning
    )
    if wake is None:
        return None, "too little open water around the streak to compare lines"
    sig, angle, length = wake.bright_line
    off = abs((angle - streak.back_deg + 180.0) % 360.0 - 180.0)
    if off > tuning.streak_axis_agree_deg or sig < tuning.streak_line_significance_min:
        return None, (
            f"the best bright line from its head (significance {sig:.1f}, "
            f"{tuning.streak_line_significance_min:g} needed) runs {off:.0f}\N{DEGREE SIGN} off the streak "
            f"({tuning.streak_axis_agree_deg:g}\N{DEGREE SIGN} allowed)"
        )
    r = np.arange(0.0, 2.0 * streak.length_px, 1.0)
    a = np.radians(streak.back_deg)
    rows, cols = streak.head_rc[0] - r * np.sin(a), streak.head_rc[1] + r * np.cos(a)
    along = ndimage.map_coordinates(chip.img, [rows, cols], order=1, mode="constant", cval=np.nan)
    found = LineWake(
        streak.back_deg,
        streak.back_std_deg,
        wake.score,
        sig,
        wake.null_median,
        wake.null_spread,
        False,
        streak.length_px,
        float("nan"),
        (WakeLine(LineKind.TURBULENT_BRIGHT, 0.0, sig, streak.length_px),),
        streak.head_rc,
        fan_significance=wake.fan_significance,  # every direction from the head: the plot of what it rests on
        along=np.asarray(along, float),
        from_streak=True,
    )
    return LineLook(chip, found, True, ""), ""


def _line_look(
    chip: LineChip,
    wake: LineWake | None,
    request: AnalysisRequest,
    tuning: Tuning,
    *,
    hull_elsewhere: bool,
    hull_axis_deg: float | None,
    structure: str,
) -> LineLook:
    """The line search's own verdict on its best line; ``structure``: why the object at the point is a pier or
    quay (:func:`_structure`), empty when it may be a vessel."""
    if wake is None:
        return LineLook(chip, None, False, "too little open water around the vessel to compare lines")
    if wake.significance < tuning.line_significance_min:
        return LineLook(
            chip,
            wake,
            False,
            f"no line starts at the vessel: best line significance {wake.significance:.1f} against the scene's "
            f"other lines (needs {tuning.line_significance_min:g})",
        )
    refused = structure or _not_foam(chip, wake, tuning)
    if refused and not request.force:
        return LineLook(chip, wake, False, f"no wake: {refused}")
    if chip.hull is None and not hull_elsewhere and not request.force and not _radar_v(wake):
        return LineLook(
            chip,
            wake,
            False,
            f"a line stands out here (significance {wake.significance:.1f}) but no hull is seen at the point: it "
            "may be the wake of a vessel elsewhere; mark that vessel, or ask again assuming a vessel here",
        )
    hull = chip.hull
    own_hull = "" if hull_elsewhere else line_is_the_hull(chip, wake, tuning)
    if own_hull and not request.force:
        return LineLook(chip, wake, False, f"no wake: {own_hull}")
    if chip.hull_at_land and not request.force:
        return LineLook(
            chip,
            wake,
            False,
            f"the hull lies alongside land or a quay (a line of significance {wake.significance:.1f} leaves it, but "
            "lines along a quay's edge are not wakes); a moored vessel makes no wake",
        )
    axis = hull_axis_deg
    if (
        axis is None
        and hull is not None
        and not hull_elsewhere
        and hull.length_m >= tuning.hull_elongation_min * hull.width_m
        and hull.length_m >= tuning.hull_axis_min_length_px * chip.m_per_px
    ):
        axis = hull.axis_deg
    if axis is not None:
        # a wake leaves a hull along its long axis: a line across it belongs to something else (in radar, a
        # wake displaced from its hull, whose line from the hull runs obliquely into it; a displaced hull keeps
        # its orientation)
        off = abs((wake.back_deg - axis + 90.0) % 180.0 - 90.0)
        # optical: the spread measured on real wakes with the heading's whole uncertainty; radar: tighter, as a
        # line from a hull displaced in azimuth runs obliquely into its wake (synthetic radar, 8 m pixels)
        tol = (
            tuning.hull_axis_max_deg_radar + 2 * wake.back_std_deg
            if chip.radar
            else tuning.hull_axis_max_deg + 2 * float(np.hypot(wake.back_std_deg, tuning.line_heading_model_std_deg))
        )
        if off > tol:
            return LineLook(
                chip,
                wake,
                False,
                f"the line from the hull (significance {wake.significance:.1f}) leaves {off:.0f}\N{DEGREE SIGN} off "
                "the hull's long axis, so it is not this hull's wake",
            )
    return LineLook(chip, wake, True, "")


def _radar_v(wake: LineWake) -> bool:
    arms = {ln.angle_from_track_deg > 0 for ln in wake.lines if ln.kind == LineKind.NARROW_V}
    return arms == {True, False}


def _heading(chip: LineChip, back_deg: float) -> float:
    b = np.radians(back_deg + 180.0)
    return float(chip.frame.bearing_of(np.cos(b), -np.sin(b))) % 360.0


def _no_speed_reason(chip: LineChip, g: float, spectral_note: str) -> str:
    lam_px = [float(kelvin.transverse_wavelength(k * KNOT_MPS, g=g)) / chip.m_per_px for k in NOTE_SPEEDS_KN]
    resolvable = RESOLVABLE_WAVE_PX * chip.m_per_px
    u_min = float(np.sqrt(g * resolvable / (2 * np.pi))) / KNOT_MPS
    said = (
        f"no speed from waves: no Kelvin crests are seen here ({spectral_note}); at {chip.m_per_px:.3g} m per "
        f"pixel the transverse wavelength for {NOTE_SPEEDS_KN[0]:g}-{NOTE_SPEEDS_KN[1]:g} kn is "
        f"{lam_px[0]:.1f}-{lam_px[1]:.1f} pixels, and crests need about {RESOLVABLE_WAVE_PX:g} pixels"
    )
    if u_min <= NOTE_SPEEDS_KN[0]:  # every speed's waves are resolved: faint, or too long for the area seen
        return said + (
            ": waves of every such speed are resolved, so here they are too faint, or longer than the area "
            "analysed holds several of (a small photo frame holds few of a fast vessel's waves)"
        )
    return said + f", so the waves of a vessel slower than about {u_min:.0f} kn cannot show at this pixel size"


_STREAK_CAUTION = (
    "the wake is a short bright streak (the hull and its foam in one): the track is its axis and the direction of "
    "travel is read from its bright, sharp head, away from the fading tail; a vessel brighter at its stern than at "
    "its bow would be read backwards; the heading's uncertainty includes the streak's shape and the model term, "
    "not that reversal"
)


def _structure(chip: LineChip, tuning: Tuning) -> str:
    """Why the bright object at the point is no vessel but a pier, breakwater or quay (empty when it may be one):
    its brightest part (the hull, and foam as bright as it) is longer than the longest ships
    (``finder_max_length_m``) and, where the file has near-infrared and visible bands, not darker in the near
    infrared than foam is (``streak_nir_share_max``: a ship trailing a long bright foam wake is).  On the shared
    real ports the piers clicked measured 0.9-1.9 km, the vessels with a wake 26-149 m; the water index misses a
    pier one or two pixels wide (NDWI 0.0-0.1, mixed with the water)."""
    hull = chip.hull
    # optical only: a radar hull's sidelobes, as bright as half its peak in decibels, would lengthen its core
    if hull is None or chip.radar or hull.core_length_m <= tuning.finder_max_length_m:
        return ""
    ys, xs = np.nonzero(hull.core)
    share = nir_share(chip, ys, xs, hull.rc, tuning)
    if share is not None and share <= tuning.streak_nir_share_max:
        return ""  # foam: a ship with its long bright wake
    return (
        f"the bright object at the point is {hull.core_length_m:.0f} m long, longer than any vessel "
        f"({tuning.finder_max_length_m:.0f} m), and not foam: a pier, breakwater or quay, and lines along it are "
        "not wakes"
    )


def _not_foam(chip: LineChip, wake: LineWake, tuning: Tuning) -> str:
    """Why a single bright line from the point is not a foam wake (empty when it may be one): in a file with
    near-infrared and visible bands, its pixels are not darker in the near infrared than foam is
    (``streak_nir_share_max``, :mod:`.foam_colour`; on the shared real ports: wake lines 0.45-0.77, lines from
    rocky islets and along piers 1.06-1.6), or not about white in the visible (:func:`_not_white`).  Dark lines
    and the two arms of a V are not foam and are not judged."""
    if chip.spectral is None or wake.dark or wake.half_angle is not None:
        return ""
    behind = 0.0 if chip.hull is None else float(chip.hull.extent_px(np.array([wake.back_deg]), whole=True)[0])
    px = ray_pixels(chip, chip.vessel_rc, wake.back_deg, tuning.hull_clearance_px + behind, wake.length_px)
    if px is None:
        return ""
    share = nir_share(chip, px[0], px[1], chip.vessel_rc, tuning)
    if share is not None and share > tuning.streak_nir_share_max:
        return (
            f"the bright line from the point is not foam: as bright in the near infrared as in the visible (a share "
            f"of {share:.2f}; foam's is at most {tuning.streak_nir_share_max:g}): a shore, rock, pier or hull edge"
        )
    return _not_white(chip, px, tuning)


def _not_white(chip: LineChip, px: tuple[np.ndarray, np.ndarray], tuning: Tuning) -> str:
    """Why a single bright line (its pixels ``px``: rows, cols) is not foam by its colour in the visible (empty
    when it may be): foam is about white there, a shallow bottom or a plume seen through the water is green or
    blue-green (:mod:`.foam_colour`)."""
    tilt = visible_tilt(chip, px[0], px[1], chip.vessel_rc, tuning)
    if tilt is None:
        return ""
    green, red = tilt
    if green <= tuning.foam_green_blue_max and red >= tuning.foam_red_blue_min:
        return ""
    return (
        f"the bright line from the point is not foam: it is not white in the visible (its excess over the water in "
        f"green is {green:.2f} and in red {red:.2f} times that in blue; foam's at most "
        f"{tuning.foam_green_blue_max:g} and at least {tuning.foam_red_blue_min:g}): a shallow bottom, a plume or "
        "a bloom seen through the water"
    )


def _seen(wake: LineWake, tuning: Tuning) -> str:
    """The decision's opening: how the wake was seen, with its significance and what was needed."""
    if wake.from_streak:
        return (
            f"wake found as a bright streak fading from the vessel's head (hull and foam, {wake.length_px:.0f} "
            f"pixels), with a line along it of significance {wake.significance:.1f} against the scene's other lines "
            f"(a streak needs {tuning.streak_line_significance_min:g}, a line alone {tuning.line_significance_min:g}); "
        )
    kind = "dark calm band" if wake.dark else "bright foam line"
    return (
        f"wake found as a line from the vessel ({kind}): significance {wake.significance:.1f} against the "
        f"scene's other lines (needs {tuning.line_significance_min:g}); "
    )


def line_finding(
    scene: Scene,
    request: AnalysisRequest,
    look: LineLook,
    *,
    gravity: inv.Uncertain,
    spectral_note: str,
    tuning: Tuning,
    hull_px: tuple[float, float] | None = None,
    methods: tuple[SpeedMethod, ...] = SPEED_METHODS,
) -> WakeAnalysis:
    """The finding of a wake seen as a line (``look.found`` must be true); ``hull_px``: a radar hull seen
    away from the wake's start (scene pixels); ``gravity``: with its uncertainty, as the wave path has it."""
    chip, wake = look.chip, look.wake
    g = gravity.value
    assert chip is not None and wake is not None and look.found
    vessel_px = chip.to_scene(*wake.vessel_rc)
    lonlat = None
    if scene.info.georeferenced:
        lon, lat = geodesy.pixel_to_lonlat(scene.georef, vessel_px[0], vessel_px[1])
        lonlat = (float(lon), float(lat))
    heading = _heading(chip, wake.back_deg)
    frame = chip.frame
    ctx = MethodContext(
        scene=scene,
        request=request,
        heading_deg=heading,
        frame=frame,
        conditions=inv.Conditions(g_mps2=gravity, pixel_scale_rel_std=pixel_rel_std(request, frame)),
        gravity=gravity,
        rng=np.random.default_rng(request.seed),
        hull_px=hull_px,
        tuning=tuning,
        lines=LineStages(chip=chip, wake=wake),
    )
    outputs, estimates, _depth_source = run_methods(ctx, methods)
    cautions = opening_cautions(
        hull_shift_m=None,
        frame=frame,
    ) + [c for o in outputs for c in o.cautions]
    segments = _line_segments(chip, wake) + [s for o in outputs for s in o.segments]
    reason = "; ".join([_no_speed_reason(chip, g, spectral_note), *(o.why_not for o in outputs if o.why_not)])
    cautions.insert(1, Caution(CautionCode.LINES_ONLY, reason))
    combined = combine(estimates)
    if wake.from_streak:
        cautions.insert(2, Caution(CautionCode.STREAK, _STREAK_CAUTION))
    decision = _seen(wake, tuning) + (
        "speed from " + " and ".join(dict.fromkeys(e.method for e in estimates))
        if combined is not None
        else "no speed: see the cautions"
    )
    regime = inv.DepthRegime.unmeasured(inv.Regime.UNKNOWN, "no waves resolved: depth regime not judged")
    n = chip.img.shape[0]
    outline = Segment(
        SegmentKind.AREA, tuple(chip.to_scene(r - 0.5, c - 0.5) for r, c in ((0, 0), (0, n), (n, n), (n, 0), (0, 0)))
    )
    if hull_px is not None:
        segments.append(Segment(SegmentKind.HULL_SHIFT, (hull_px, vessel_px)))
    evidence = "hull" if chip.hull is not None or hull_px is not None else ("forced" if request.force else "wake lines")
    return WakeAnalysis(
        wake_found=True,
        decision=decision,
        significance=wake.significance,
        vessel_px=vessel_px,
        vessel_lonlat=lonlat,
        heading_deg=heading,
        heading_std_deg=float(
            np.hypot(np.hypot(wake.back_std_deg, tuning.line_heading_model_std_deg), chip.frame.bearing_std_deg)
        ),
        speed=combined,
        methods=estimates,
        half_angle_deg=None if wake.half_angle is None else wake.half_angle[0],
        half_angle_std_deg=None if wake.half_angle is None else wake.half_angle[1],
        transverse_wavelength_m=None,
        transverse_wavelength_std_m=None,
        regime=regime,
        depth_m=None,
        depth_ci95_m=None,
        gravity_mps2=g,
        pixel_m=chip.m_per_px,
        cautions=tuple(cautions),
        drawing=Drawing((outline, *segments)),
        diagnostics=Diagnostics(vessel_evidence=evidence),
        lines=wake.lines,
        request=request,
        line_plots=_line_plots(wake, chip, tuning),
    )


def _line_plots(wake: LineWake, chip: LineChip, tuning: Tuning) -> LinePlotData | None:
    """The significance of every direction from the vessel (the wake's own standing out) and the brightness
    along the wake line."""
    fan = wake.fan_significance
    if fan.size == 0:
        return None
    angles = np.arange(fan.size) * (360.0 / fan.size)
    rel = (wake.back_deg - angles + 180.0) % 360.0 - 180.0  # image angles turn counter-clockwise: clockwise from it
    order = np.argsort(rel)
    return LinePlotData(
        rel[order],
        np.nan_to_num(fan[order], nan=0.0, neginf=0.0),
        tuning.streak_line_significance_min if wake.from_streak else tuning.line_significance_min,
        wake.along,
        chip.m_per_px,
        wake.dark,
    )


def _line_segments(chip: LineChip, wake: LineWake) -> list[Segment]:
    """The track and any arms (narrow V or Kelvin arms) of a wake seen as lines, in scene pixels."""
    segments = [_ray(chip, wake.vessel_rc, wake.back_deg, 2 * wake.length_px, SegmentKind.TRACK)]
    for ln in wake.lines:
        if ln.kind in (LineKind.NARROW_V, LineKind.KELVIN_ARM):
            left = ln.angle_from_track_deg > 0
            seg_kind = {
                (LineKind.NARROW_V, True): SegmentKind.NARROW_V_LEFT,
                (LineKind.NARROW_V, False): SegmentKind.NARROW_V_RIGHT,
                (LineKind.KELVIN_ARM, True): SegmentKind.ARM_LEFT,
                (LineKind.KELVIN_ARM, False): SegmentKind.ARM_RIGHT,
            }[(ln.kind, left)]
            segments.append(_ray(chip, wake.vessel_rc, wake.back_deg + ln.angle_from_track_deg, ln.length_px, seg_kind))
    return segments


def _ray(chip: LineChip, origin_rc: tuple[float, float], angle_deg: float, length: float, kind: SegmentKind) -> Segment:
    a = np.radians(angle_deg)
    r0, c0 = origin_rc
    return Segment(kind, (chip.to_scene(r0, c0), chip.to_scene(r0 - length * np.sin(a), c0 + length * np.cos(a))))
