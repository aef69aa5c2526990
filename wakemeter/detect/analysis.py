"""analyze(): from a scene and an :class:`AnalysisRequest` to speed, heading and depth regime.

The analysis is a short pipeline of stages with typed outputs::

    look (scale)  ->  decision  ->  [displaced radar hull: look again from the wake's start]
      ->  depth model  ->  wake measures  ->  spread  ->  speed methods  ->  combination  ->  explanation

Each stage is a module of its own (:mod:`.look`, :mod:`.decision`, :mod:`.apex`, :mod:`.depth_model`,
:mod:`.wake_measures`, :mod:`.spread`, :mod:`.methods`, :mod:`.explain`); every tuned number is a field
of :class:`~.tuning.Tuning`.  A scene without a wake says so and gives no speed.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, replace

import numpy as np

from ..errors import CancelledError, ParameterError, TooLittleWaterError
from ..physics import inversion as inv
from ..physics.gravity import STANDARD_GRAVITY, normal_gravity
from ..scene import geodesy
from ..scene.raster import Scene
from .apex import find_displaced_apex
from .band_shift import moves_against, scene_band_timing
from .chip_measures import chip_outline
from .decision import Decision, decide, decision_text, vessel_evidence
from .depth_model import DepthModel, choose_depth_model
from .explain import closing_cautions, depth_regime, interval_cover, opening_cautions, widen
from .findings import Caution, CautionCode, Diagnostics, Drawing, PlotData, Segment, SegmentKind
from .line_finding import LineLook, line_finding, look_for_lines
from .look import Look, behind_chip, choose_look
from .methods import SPEED_METHODS, MethodContext, MethodOutput, SpeedMethod, WaveStages, combine, run_methods
from .request import AnalysisRequest, RadarGeometry, pixel_rel_std
from .result import WakeAnalysis
from .spectral import curve_points
from .spread import Spread, estimate_spread
from .tuning import DEFAULT_TUNING, Tuning
from .wake_measures import WakeMeasures, measure_wake

__all__ = ["analyze", "AnalysisRequest", "RadarGeometry", "WakeAnalysis"]

#: standard uncertainty of the WGS 84 normal gravity at a known latitude (local anomalies, m/s^2;
#: common practice, no source) and of standard gravity when the latitude is not known (covers 9.780-9.832)
GRAVITY_STD_AT_LATITUDE = 0.0005
GRAVITY_STD_UNKNOWN = 0.015

Progress = Callable[[float, str], None]


@dataclass(frozen=True, eq=False)
class _Attempt:
    """A look and its decision from one starting point."""

    look: Look
    decision: Decision
    g: float
    g_u: inv.Uncertain
    vessel_px: tuple[float, float]  #: snapped to the hull when one was found near the start
    vessel_lonlat: tuple[float, float] | None
    hull_px: tuple[float, float] | None  #: a radar hull seen away from this start


def analyze(
    scene: Scene,
    request: AnalysisRequest,
    tuning: Tuning = DEFAULT_TUNING,
    *,
    progress: Progress | None = None,
    cancelled: Callable[[], bool] | None = None,
    methods: tuple[SpeedMethod, ...] = SPEED_METHODS,
) -> WakeAnalysis:
    """Analyse the wake of one vessel.

    Parameters
    ----------
    scene : Scene
        An opened scene (georeferenced, or calibrated with :meth:`Scene.calibrate`).
    request : AnalysisRequest
        The vessel's position (snapped to a hull nearby) and what is known about it.
    tuning : Tuning
        Thresholds and sizes; the default is what the sweeps calibrated.
    progress, cancelled : callables, optional
        ``progress(fraction, what)`` is called between stages; when ``cancelled()`` returns
        True the analysis stops with :class:`~wakemeter.errors.CancelledError`.
    methods : tuple of SpeedMethod
        The speed methods run on a wake found (both paths); the default is :data:`SPEED_METHODS`.

    References
    ----------
    .. [1] Zilman, Zapolski & Marom 2004, IEEE TGRS 42 (steady-wave spectrum).
    .. [2] Havelock 1908, Proc. R. Soc. A 81 (finite-depth pattern).
    .. [3] Raney 1971, IEEE Trans. Aerosp. Electron. Syst. 7(3) (moving targets in radar).
    """
    if not isinstance(request, AnalysisRequest):
        raise ParameterError(f"analyze needs an AnalysisRequest, got {type(request).__name__}")

    def stage(fraction: float, what: str) -> None:
        if cancelled is not None and cancelled():
            raise CancelledError("the analysis was cancelled")
        if progress is not None:
            progress(fraction, what)

    stage(0.05, "reading the vessel's surroundings")
    start = _start_px(scene, request)
    request = _with_product_geometry(scene, request, start)
    try:
        attempt: _Attempt | None = _attempt(scene, request, start, radar=request.radar, hull_px=None, tuning=tuning)
    except TooLittleWaterError:
        attempt = None  # too little open water for the wave spectrum's box: the line search uses what is there
        spectral_note = "too little open water around the vessel for the wave spectrum"
    if attempt is not None:
        if not attempt.decision.found and attempt.look.chip.radar and attempt.look.chip.hull_rc is not None:
            stage(0.3, "looking for a wake displaced from the hull")
            shifted = _from_displaced_apex(scene, request, attempt, tuning)
            if shifted is not None and shifted.decision.found:
                attempt = shifted
        spectral_note = f"spectral significance {attempt.decision.significance:.1f}, needs {tuning.significance_min:g}"
        if attempt.decision.found:
            measured = _measure(scene, request, attempt, tuning, stage, methods)
            if isinstance(measured, WakeAnalysis):
                return measured
            against = measured
            # the wave fit read the wake on the wrong side of the hull: its heading and speed are not the
            # vessel's; the wake is looked for as lines, where the hull's shift gives the speed
            spectral_note = f"the wave fit (significance {attempt.decision.significance:.1f}) was set aside: {against}"
    # no wave pattern: look for the wake as lines (foam, calm band, radar arms), as real scenes mostly show it
    stage(0.5, "looking for wake lines")
    lines = look_for_lines(scene, start, request, tuning)
    g_u = attempt.g_u if attempt is not None else _gravity(scene, start)[1]
    g = g_u.value
    moved, hull_px = _displaced_lines(scene, request, lines, tuning, stage)
    if (
        moved is not None
        and moved.wake is not None
        and (not lines.found or lines.wake is None or moved.wake.significance > lines.wake.significance)
    ):
        return line_finding(
            scene,
            request,
            moved,
            gravity=g_u,
            spectral_note=spectral_note,
            tuning=tuning,
            hull_px=hull_px,
            methods=methods,
        )
    if lines.found:
        return line_finding(
            scene, request, lines, gravity=g_u, spectral_note=spectral_note, tuning=tuning, methods=methods
        )
    if attempt is None:
        return _no_wake_lines(scene, request, start, lines, g, spectral_note)
    return _no_wake(scene, request, attempt, tuning, lines_note=lines.why_not)


def _shift_against(scene: Scene, vessel_px: tuple[float, float], heading_deg: float, tuning: Tuning) -> str | None:
    """For an optical scene whose band timing is known: a reason when the hull's shift between bands says the
    vessel moves against the heading of the wave fit (see :func:`band_shift.moves_against`)."""
    if scene.info.count < 2:
        return None
    timing = scene_band_timing(scene)
    if timing is None:
        return None
    try:
        return moves_against(scene, vessel_px, heading_deg, timing, tuning)
    except ParameterError:
        return None


def _with_product_geometry(scene: Scene, request: AnalysisRequest, px: tuple[float, float]) -> AnalysisRequest:
    """A radar product that carries its geometry (Sentinel-1 GRD) gives the azimuth-offset method its figures
    at the vessel's pixel, unless the user gave them; a left-looking geometry is not one the method models."""
    product = scene.radar_product
    if request.radar_geometry is not None or product is None:
        return request
    g = product.at(*px)
    if not g.right_looking:
        return request
    rg = RadarGeometry.from_product(g)
    return replace(request, radar_geometry=rg)


def _start_px(scene: Scene, request: AnalysisRequest) -> tuple[float, float]:
    """The vessel's pixel position; one that lies outside the scene is reported as the user gave it."""
    if request.vessel_px is not None:
        c, r = request.vessel_px
        where = f"pixel (column {c:.1f}, row {r:.1f})"
    else:
        assert request.vessel_lonlat is not None
        lon, lat = request.vessel_lonlat
        c, r = (float(x) for x in geodesy.lonlat_to_pixel(scene.georef, lon, lat))
        where = f"longitude {lon:.6f}, latitude {lat:.6f}"
    if not (np.isfinite(c) and np.isfinite(r) and 0 <= c < scene.width and 0 <= r < scene.height):
        raise ParameterError(f"the vessel at {where} lies outside the scene ({scene.width} x {scene.height} pixels)")
    return float(c), float(r)


def _gravity(scene: Scene, px: tuple[float, float]) -> tuple[float, inv.Uncertain]:
    if scene.info.georeferenced:
        _lon, lat = geodesy.pixel_to_lonlat(scene.georef, px[0], px[1])
        g = float(normal_gravity(float(lat)))
        return g, inv.Uncertain(g, GRAVITY_STD_AT_LATITUDE)
    return STANDARD_GRAVITY, inv.Uncertain(STANDARD_GRAVITY, GRAVITY_STD_UNKNOWN)


def _attempt(
    scene: Scene,
    request: AnalysisRequest,
    px: tuple[float, float],
    *,
    radar: bool | None,
    hull_px: tuple[float, float] | None,
    tuning: Tuning,
) -> _Attempt:
    g, g_u = _gravity(scene, px)
    look = choose_look(
        scene,
        px,
        g=g,
        depth_m=np.inf if request.depth is None else request.depth.value,
        radar=radar,
        snap=hull_px is None,
        tuning=tuning,
    )
    decision = decide(look, g=g, depth_given=request.depth is not None, tuning=tuning)
    chip = look.chip
    snapped = chip.to_scene(*chip.hull_rc) if chip.hull_rc is not None else px
    lonlat = None
    if scene.info.georeferenced:
        lon, lat = geodesy.pixel_to_lonlat(scene.georef, snapped[0], snapped[1])
        lonlat = (float(lon), float(lat))
    return _Attempt(look, decision, g, g_u, (float(snapped[0]), float(snapped[1])), lonlat, hull_px)


def _from_displaced_apex(scene: Scene, request: AnalysisRequest, first: _Attempt, tuning: Tuning) -> _Attempt | None:
    """A radar hull beside its wake (moving targets are shifted in azimuth): look again from where the
    wake starts (only from a bright hull: without one there is nothing displaced)."""
    try:
        apex = find_displaced_apex(
            scene, first.vessel_px, step=first.look.chip.step, size_px=tuning.chip_px, radar=True, tuning=tuning
        )
        if apex is None or not _along_azimuth(scene, request, first.vessel_px, apex.apex_px, tuning):
            return None
        return _attempt(scene, request, apex.apex_px, radar=True, hull_px=first.vessel_px, tuning=tuning)
    except ParameterError:  # the wake's start lies too near the scene's edge to analyse: keep "no wake"
        return None


def _along_azimuth(
    scene: Scene, request: AnalysisRequest, hull_px: tuple[float, float], start_px: tuple[float, float], t: Tuning
) -> bool:
    """Whether a wake start found away from the hull can be where the radar shifted it from: a moving target is
    imaged shifted along the flight direction only (Raney 1971), so with the geometry known (typed, or read
    from the product) the hull must lie on the flight axis through the start, within ``apex_off_azimuth_px``
    or ``apex_off_azimuth_share`` of their distance; without the geometry nothing is checked."""
    geo = request.radar_geometry
    if geo is None:
        return True
    fdc, fdr = scene.local_frame(*hull_px).image_direction(geo.flight_bearing_deg)  # unit length, in pixels
    dc, dr = start_px[0] - hull_px[0], start_px[1] - hull_px[1]
    across = abs(dc * fdr - dr * fdc)
    return across <= max(t.apex_off_azimuth_px, t.apex_off_azimuth_share * float(np.hypot(dc, dr)))


def _displaced_lines(
    scene: Scene, request: AnalysisRequest, lines: LineLook, tuning: Tuning, stage: Callable[[float, str], None]
) -> tuple[LineLook | None, tuple[float, float] | None]:
    """A radar hull's wake may start away from it (moving targets are imaged shifted in azimuth, Raney 1971):
    the line search from where the dark wake begins, with the hull's position; (None, None) when that does
    not apply or finds nothing."""
    chip = lines.chip
    if chip is None or not chip.radar or chip.hull is None:
        return None, None
    stage(0.7, "looking for a wake displaced from the hull")
    hull_px = chip.to_scene(*chip.hull.rc)
    try:
        apex = find_displaced_apex(scene, hull_px, size_px=tuning.chip_px, radar=True, tuning=tuning)
    except ParameterError:
        return None, None
    if apex is None or not _along_azimuth(scene, request, hull_px, apex.apex_px, tuning):
        return None, None
    h = chip.hull
    axis = h.axis_deg if h.length_m >= tuning.hull_elongation_min * h.width_m else None
    moved = look_for_lines(scene, apex.apex_px, request, tuning, hull_elsewhere=True, hull_axis_deg=axis)
    if not moved.found or moved.wake is None or moved.chip is None:
        return None, None
    # the wake runs away from where the vessel was: a line from the "start" that runs back onto the hull means
    # the start found is the far end of the hull's own wake.  A hull shifted in azimuth (Raney 1971) lies off
    # the line from the true start, by the shift times the sine of the angle between wake and flight, so only
    # a hull close to the line's continuation is refused (a hull merely on the wake's side of the start is not)
    dc, dr = hull_px[0] - apex.apex_px[0], hull_px[1] - apex.apex_px[1]
    b = np.radians(moved.wake.back_deg)
    along, across = dc * np.cos(b) - dr * np.sin(b), abs(dc * np.sin(b) + dr * np.cos(b))
    if along > 0 and across <= max(tuning.apex_far_end_px, tuning.apex_far_end_share * along):
        return None, None
    return moved, hull_px


def _no_wake_lines(
    scene: Scene, request: AnalysisRequest, px: tuple[float, float], lines: LineLook, g: float, spectral_note: str
) -> WakeAnalysis:
    """No wake, when only the line search could look (too little open water for the spectrum's box)."""
    frame = scene.local_frame(*px)
    lonlat = None
    if scene.info.georeferenced:
        lon, lat = geodesy.pixel_to_lonlat(scene.georef, px[0], px[1])
        lonlat = (float(lon), float(lat))
    m_px = lines.chip.m_per_px if lines.chip is not None else float(np.sqrt(frame.m_per_col * frame.m_per_row_up))
    cautions = opening_cautions(
        hull_shift_m=None,
        frame=frame,
    )
    return WakeAnalysis.without_wake(
        f"no wake found: {spectral_note}; {lines.why_not}",
        float("nan") if lines.wake is None else lines.wake.significance,
        px,
        lonlat,
        gravity_mps2=g,
        pixel_m=m_px,
        cautions=tuple(cautions),
        request=request,
    )


def _no_wake(
    scene: Scene,
    request: AnalysisRequest,
    a: _Attempt,
    tuning: Tuning,
    *,
    no_vessel: bool = False,
    lines_note: str = "",
) -> WakeAnalysis:
    frame = scene.local_frame(*a.vessel_px)
    decision = decision_text(a.decision, a.look, tuning)
    if lines_note:
        decision += f"; as lines: {lines_note}"
    if no_vessel:
        decision = (
            f"no vessel at this point: waves stand out here (spectral significance "
            f"{a.decision.significance:.1f}) but neither a hull nor a wake line starts at the point, so they "
            "belong to a wake whose vessel is elsewhere; mark that vessel instead, or ask again assuming a vessel here"
        )
    cautions = opening_cautions(
        hull_shift_m=None,
        frame=frame,
    )
    return WakeAnalysis.without_wake(
        decision,
        a.decision.significance,
        a.vessel_px,
        a.vessel_lonlat,
        gravity_mps2=a.g,
        pixel_m=a.look.chip.m_per_px,
        cautions=tuple(cautions),
        drawing=Drawing((chip_outline(a.look.chip),)),
        diagnostics=Diagnostics(
            side_contrast=a.look.side_contrast,
            fit_speed_mps=a.look.fit.speed_mps,
            look_step=a.look.step,
            vessel_evidence="none" if no_vessel else "",
        ),
        request=request,
    )


def _track_heading(scene: Scene, a: _Attempt, model: DepthModel) -> tuple[geodesy.LocalFrame, float]:
    """(local frame at the vessel, true heading): the track the wave measures use (measure_wake's back_deg) is
    known from the look and the depth model before they are taken."""
    frame = scene.local_frame(*a.vessel_px)
    back = np.radians((a.look.back_deg + model.delta_deg) % 360.0 + 180)
    return frame, float(frame.bearing_of(np.cos(back), -np.sin(back)))


def _measure(
    scene: Scene,
    request: AnalysisRequest,
    a: _Attempt,
    tuning: Tuning,
    stage: Callable[[float, str], None],
    speed_methods: tuple[SpeedMethod, ...],
) -> WakeAnalysis | str:
    """The wave path's result; or, where the hull's shift between bands says the vessel moves against the fit's
    heading, the reason to set the fit aside (checked before the costly uncertainty and methods)."""
    look, g = a.look, a.g
    model = choose_depth_model(look, a.decision, g=g, depth_m=request.depth_m, tuning=tuning)
    frame, heading = _track_heading(scene, a, model)
    if look.chip.hull_rc is not None or a.hull_px is not None:  # a hull is the vessel's evidence (vessel_evidence)
        against = _shift_against(scene, a.vessel_px, heading, tuning)
        if against is not None:
            return against  # set aside before the crests and arms are measured
    stage(0.45, "measuring crests and arms")
    measures = measure_wake(look, model, g=g, tuning=tuning, behind=behind_chip(scene, look, tuning=tuning))
    evidence = vessel_evidence(
        look, measures.lines, hull_elsewhere=a.hull_px is not None, forced=request.force, tuning=tuning
    )
    if evidence == "none":
        return _no_wake(scene, request, a, tuning, no_vessel=True)
    against = _shift_against(scene, a.vessel_px, heading, tuning) if evidence != "hull" else None
    if against is not None:
        return against
    stage(0.65, "estimating uncertainty")
    spread = estimate_spread(look, model, g=g, tuning=tuning)
    depth = _depth(request, model, spread)
    cond = inv.Conditions(g_mps2=a.g_u, depth_m=depth, pixel_scale_rel_std=pixel_rel_std(request, frame))
    ctx = MethodContext(
        scene=scene,
        request=request,
        heading_deg=heading,
        frame=frame,
        conditions=cond,
        gravity=a.g_u,
        rng=np.random.default_rng(request.seed),
        hull_px=a.hull_px,
        tuning=tuning,
        waves=WaveStages(look=look, model=model, measures=measures, spread=spread),
    )
    outputs, methods, depth_source = run_methods(ctx, speed_methods)
    stage(0.9, "combining methods")
    combined = combine(methods)
    if combined is None:
        return _no_wake(scene, request, a, tuning, lines_note="no speed method gave a figure")
    regime = depth_regime(model, measures, spectral=depth_source, depth=depth, g=g, tuning=tuning)
    cover = interval_cover(model, combined)
    widened = widen(combined, cover)
    cautions = _cautions(
        a,
        frame,
        outputs,
        model,
        measures,
        widened,
        widened_from=combined,
        request=request,
        evidence=evidence,
        g=g,
        tuning=tuning,
    )
    drawing = measures.drawing.plus(s for o in outputs for s in o.segments)
    if a.hull_px is not None:  # from the hull as imaged to where its wake starts
        drawing = drawing.plus([Segment(SegmentKind.HULL_SHIFT, (a.hull_px, a.vessel_px))])
    plots = _plots(a, model, measures, g)
    return WakeAnalysis(
        wake_found=True,
        decision=decision_text(a.decision, look, tuning),
        significance=a.decision.significance,
        vessel_px=a.vessel_px,
        vessel_lonlat=a.vessel_lonlat,
        heading_deg=heading,
        heading_std_deg=float(np.hypot(spread.heading_std_deg, frame.bearing_std_deg)),
        speed=widened,
        methods=methods,
        half_angle_deg=measures.half_angle_deg,
        half_angle_std_deg=measures.half_angle_std_deg,
        transverse_wavelength_m=measures.transverse_wavelength_m,
        transverse_wavelength_std_m=measures.transverse_wavelength_std_m,
        regime=regime,
        depth_m=None if depth is None else depth.value,
        depth_ci95_m=None
        if depth is None
        else (max(depth.value - 1.96 * depth.std, 0.0), depth.value + 1.96 * depth.std),
        gravity_mps2=g,
        pixel_m=look.chip.m_per_px,
        cautions=tuple(cautions),
        drawing=drawing,
        diagnostics=_diagnostics(look, model, spread, evidence),
        lines=measures.lines,
        interval_cover=cover,
        transverse_note=measures.transverse_note,
        request=request,
        plots=plots,
    )


def _diagnostics(look, model: DepthModel, spread, evidence: str) -> Diagnostics:
    return Diagnostics(
        side_contrast=look.side_contrast,
        fit_speed_mps=look.fit.speed_mps,
        depth_gain=model.depth_gain,
        shallow_rule_out=model.rule_out,
        boot_speeds_mps=spread.boot_speeds_mps,
        look_step=look.step,
        vessel_evidence=evidence,
    )


def _cautions(
    a: _Attempt,
    frame: geodesy.LocalFrame,
    outputs: list[MethodOutput],
    model: DepthModel,
    measures: WakeMeasures,
    widened: inv.CombinedSpeed,
    *,
    widened_from: inv.CombinedSpeed,
    request: AnalysisRequest,
    evidence: str,
    g: float,
    tuning: Tuning,
) -> list[Caution]:
    """The result's cautions in their order: opening ones, each method's, closing ones; and the analyst's
    insistence when neither a hull nor a wake line showed a vessel."""
    shift_m = (
        None
        if a.hull_px is None
        else float(frame.length_of(a.hull_px[0] - a.vessel_px[0], a.hull_px[1] - a.vessel_px[1]))
    )
    cautions = (
        opening_cautions(
            hull_shift_m=shift_m,
            frame=frame,
        )
        + [c for o in outputs for c in o.cautions]
        + closing_cautions(
            model,
            measures,
            widened,
            widened=widened is not widened_from,
            depth_given=request.depth is not None,
            hull_length_m=request.hull_length_m,
            g=g,
            tuning=tuning,
        )
    )
    if evidence == "forced":
        cautions.insert(
            1,
            Caution(
                CautionCode.FORCED,
                "analysed at the analyst's insistence: neither a hull nor a "
                "wake line starts at this point, so these waves may belong to another vessel",
            ),
        )
    return cautions


def _plots(a: _Attempt, model: DepthModel, measures: WakeMeasures, g: float) -> PlotData:
    """The arrays behind the result's plots (spectrum, fitted curve, crest profile, Radon transform)."""
    look = a.look
    sp = a.decision.spectrum
    tw = look.turbulent
    plots = PlotData(
        whitened_spectrum=sp.white,
        spectrum_dk=(sp.dk_u, sp.dk_v),
        spectrum_band=(sp.k_lo, sp.k_hi),
        fitted_curve=curve_points(model.speed_mps, model.depth_m, model.delta_deg, g=g, k_max=1.05 * sp.k_hi),
        fit_speed_mps=model.speed_mps,
        fit_depth_m=model.depth_m,
        fit_delta_deg=model.delta_deg,
        profile=measures.profile,
        profile_m_per_px=look.chip.m_per_px,
        transverse_wavelength_m=measures.transverse_wavelength_m,
        speed_grid=look.fit.speed_grid,
        score_profile=look.fit.profile,
        radon=None if tw is None else tw.sinogram,
        radon_angles_deg=None if tw is None else tw.angles_deg,
        radon_pick=None if tw is None else (tw.radon_angle_deg, tw.offset_px, tw.significance),
    )
    return plots


def _depth(request: AnalysisRequest, model: DepthModel, spread: Spread) -> inv.Uncertain | None:
    """The depth the speed methods use: given, or fitted to the waves (with the quarter boxes' spread)."""
    if request.depth is not None:
        return request.depth
    return inv.Uncertain(model.depth_m, spread.depth_std_m) if model.fitted else None
