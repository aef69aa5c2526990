"""The wake seen as lines: the finding when the Kelvin crests are not resolved (most real scenes).

Runs when the spectral look finds no wave pattern, or cannot be taken (too little open water in its
box).  A line that starts at a hull and stands out against the scene's other lines
(:mod:`.wakeline`) is a wake: the finding gives the heading from the line with its uncertainty, lists
the lines, and gives a speed only from what the scene allows:

* the hull's shift between two bands recorded a known time apart (:mod:`.band_shift`; Sentinel-2),
  a speed over ground;
* otherwise none, with the reason (for example the transverse wavelength for 3-20 kn in pixels here).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import ParameterError
from ..physics import inversion as inv
from ..physics import kelvin
from ..physics.units import KNOT_MPS
from ..scene import geodesy
from ..scene.raster import Scene
from ..scene.sensor import band_timing
from .band_shift import BandShift, measure_band_shift
from .explain import opening_cautions
from .findings import Caution, CautionCode, Diagnostics, Drawing, LineKind, Segment, SegmentKind
from .line_chip import LineChip, prepare_line_chip
from .request import AnalysisRequest
from .result import WakeAnalysis
from .tuning import Tuning
from .wakeline import LineWake, find_wake_line

#: a hull this many times longer than wide shows its axis; its wake must leave along it within this angle
#: (plus twice the line's own uncertainty; common practice, no source: drift and yaw are a few degrees)
HULL_ELONGATION = 2.5
HULL_AXIS_MAX_DEG = 10.0
#: a hull is measured on the image only at pixels this small (m): coarser, its foam cannot be told apart
RESOLVED_HULL_PIXEL_M = 2.0
#: relative standard uncertainty of a hull length (given or measured; common practice, no source)
HULL_LENGTH_REL_STD = 0.05
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
    evidence of a vessel)."""
    try:
        chip = prepare_line_chip(scene, px, size_px=tuning.line_chip_px, snap_radius_m=tuning.line_snap_radius_m)
    except ParameterError as err:
        return LineLook(None, None, False, str(err))
    wake = find_wake_line(chip, reach_m=tuning.line_reach_m, rng_seed=request.seed)
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
    if chip.hull is None and not hull_elsewhere and not request.force and not _radar_v(wake):
        return LineLook(
            chip,
            wake,
            False,
            f"a line stands out here (significance {wake.significance:.1f}) but no hull is seen at the point: it "
            "may be the wake of a vessel elsewhere; mark that vessel, or ask again assuming a vessel here",
        )
    hull = chip.hull
    if chip.hull_at_land and not request.force:
        return LineLook(
            chip,
            wake,
            False,
            f"the hull lies alongside land or a quay (a line of significance {wake.significance:.1f} leaves it, but "
            "lines along a quay's edge are not wakes); a moored vessel makes no wake",
        )
    axis = hull_axis_deg
    if axis is None and hull is not None and not hull_elsewhere and hull.length_m >= HULL_ELONGATION * hull.width_m:
        axis = hull.axis_deg
    if axis is not None:
        # a wake leaves a hull along its long axis: a line across it belongs to something else (in radar, a
        # wake displaced from its hull, whose line from the hull runs obliquely into it; a displaced hull keeps
        # its orientation)
        off = abs((wake.back_deg - axis + 90.0) % 180.0 - 90.0)
        if off > HULL_AXIS_MAX_DEG + 2 * wake.back_std_deg:
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
    return (
        f"no speed from waves: no Kelvin crests are seen here ({spectral_note}); at {chip.m_per_px:.1f} m per "
        f"pixel the transverse wavelength for {NOTE_SPEEDS_KN[0]:g}-{NOTE_SPEEDS_KN[1]:g} kn is "
        f"{lam_px[0]:.1f}-{lam_px[1]:.1f} pixels, and crests need about {RESOLVABLE_WAVE_PX:g} pixels, so the "
        f"waves of a vessel slower than about {u_min:.0f} kn cannot show at this pixel size"
    )


def line_finding(
    scene: Scene,
    request: AnalysisRequest,
    look: LineLook,
    *,
    g: float,
    spectral_note: str,
    tuning: Tuning,
    hull_px: tuple[float, float] | None = None,
) -> WakeAnalysis:
    """The finding of a wake seen as a line (``look.found`` must be true); ``hull_px``: a radar hull seen
    away from the wake's start (scene pixels)."""
    chip, wake = look.chip, look.wake
    assert chip is not None and wake is not None and look.found
    vessel_px = chip.to_scene(*wake.vessel_rc)
    lonlat = None
    if scene.info.georeferenced:
        lon, lat = geodesy.pixel_to_lonlat(scene.georef, vessel_px[0], vessel_px[1])
        lonlat = (float(lon), float(lat))
    heading = _heading(chip, wake.back_deg)
    frame = chip.frame
    cautions = opening_cautions(
        hull_shift_m=None, frame_georeferenced=frame.georeferenced, north_known=frame.north_known
    )
    rng = np.random.default_rng(request.seed)
    shift = None if chip.radar else _band_shift(scene, vessel_px, wake, rng)
    methods: tuple[inv.SpeedEstimate, ...] = ()
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
    reason = _no_speed_reason(chip, g, spectral_note)
    if shift is not None:
        off = abs((shift.course_deg - heading + 180.0) % 360.0 - 180.0)
        if off <= tuning.band_shift_course_max_deg and shift.along_px > 0:
            methods = (shift.estimate,)
            cautions.append(
                Caution(
                    CautionCode.OVER_GROUND,
                    f"the speed is over ground, from the hull's shift of {np.hypot(*shift.shift_px):.2f} pixels "
                    f"between bands recorded {shift.timing.delay_s:.3f} s apart ({shift.timing.source}); it "
                    f"equals the speed through the water only in still water. Course over ground "
                    f"{shift.course_deg:.0f}\N{DEGREE SIGN}, {off:.0f}\N{DEGREE SIGN} from the wake's heading",
                )
            )
        else:
            cautions.append(
                Caution(
                    CautionCode.SHIFT_OFF_TRACK,
                    f"the hull's shift between bands (course {shift.course_deg:.0f}\N{DEGREE SIGN}) does not follow "
                    f"its wake (heading {heading:.0f}\N{DEGREE SIGN}): foam or a neighbour moved the hull's edge, "
                    "so no speed is taken from it",
                )
            )
    elif (
        scene.info.count > 1
        and band_timing(scene.info.band_descriptions, scene.info.path.name, scene.info.tags) is None
    ):
        reason += (
            "; the time between this sensor's bands is not known to the program (recognised: Sentinel-2 with "
            "named bands B02 and B04), so no speed over ground from the hull's shift between bands"
        )
    narrow = _narrow_arms_speed(chip, wake, request, g, rng)
    if narrow is not None:
        methods = (*methods, narrow)
        reason = reason.replace("no speed from waves: ", "no speed from wave crests: ")
    cautions.insert(1, Caution(CautionCode.LINES_ONLY, reason))
    combined = (
        _one_method(methods[0]) if len(methods) == 1 else (inv.combine_estimates(list(methods)) if methods else None)
    )
    kind = "dark calm band" if wake.dark else "bright foam line"
    decision = (
        f"wake found as a line from the vessel ({kind}): significance {wake.significance:.1f} against the scene's "
        f"other lines (needs {tuning.line_significance_min:g}); "
        + ("speed from the hull's shift between bands" if combined else "no speed: see the cautions")
    )
    regime = inv.DepthRegime(inv.Regime.UNKNOWN, None, None, None, None, "no waves resolved: depth regime not judged")
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
        heading_std_deg=wake.back_std_deg,
        speed=combined,
        methods=methods,
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
    )


def _narrow_arms_speed(
    chip: LineChip, wake: LineWake, request: AnalysisRequest, g: float, rng: np.random.Generator
) -> inv.SpeedEstimate | None:
    """Speed of a fast hull from its arms narrower than Kelvin's and its length (Rabaud & Moisy 2013): the
    length given by the analyst, or measured on the image when the hull is resolved (pixels of at most
    ``RESOLVED_HULL_PIXEL_M``, where the hull and its foam are told apart)."""
    if wake.half_angle is None or not any(ln.kind == LineKind.KELVIN_ARM for ln in wake.lines):
        return None
    half, half_std = wake.half_angle
    if half > kelvin.KELVIN_HALF_ANGLE_DEG - 2 * half_std - 1.0:
        return None
    if request.hull_length_m is not None:
        length = inv.Uncertain(request.hull_length_m, HULL_LENGTH_REL_STD * request.hull_length_m)
    elif chip.hull is not None and chip.m_per_px <= RESOLVED_HULL_PIXEL_M:
        length = inv.Uncertain(chip.hull.length_m, 2 * chip.m_per_px + HULL_LENGTH_REL_STD * chip.hull.length_m)
    else:
        return None
    try:
        return inv.speed_from_arm_angle_and_hull_length(
            inv.Uncertain(half, half_std), length, inv.Conditions(g_mps2=inv.Uncertain(g, 0.0005)), seed=rng
        )
    except ParameterError:  # the angle does not fit the fast-hull model
        return None


def _one_method(e: inv.SpeedEstimate) -> inv.CombinedSpeed:
    """A single method's own Monte Carlo interval (a speed from a shift's length is not symmetric about its
    median, so the normal interval of the combination would misstate it)."""
    return inv.CombinedSpeed(
        e.speed_mps,
        e.std_mps,
        e.ci95_low_mps,
        e.ci95_high_mps,
        0.0,
        0,
        1.0,
        True,
        None,
        (e.method,),
        "one method only: no cross-check possible",
    )


def _band_shift(
    scene: Scene, vessel_px: tuple[float, float], wake: LineWake, rng: np.random.Generator
) -> BandShift | None:
    timing = band_timing(scene.info.band_descriptions, scene.info.path.name, scene.info.tags)
    if timing is None:
        return None
    try:
        return measure_band_shift(scene, vessel_px, wake.back_deg, timing, rng=rng)
    except ParameterError:
        return None


def _ray(chip: LineChip, origin_rc: tuple[float, float], angle_deg: float, length: float, kind: SegmentKind) -> Segment:
    a = np.radians(angle_deg)
    r0, c0 = origin_rc
    return Segment(kind, (chip.to_scene(r0, c0), chip.to_scene(r0 - length * np.sin(a), c0 + length * np.cos(a))))
