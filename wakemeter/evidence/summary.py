"""One summary of a result, shared by the CLI text, the results panel (HTML) and the PDF report.

Each function takes the typed result (:class:`~wakemeter.detect.result.WakeAnalysis`) and returns plain
strings; the three renderers only lay them out (and escape them for their markup).  A stored result comes
back through :meth:`WakeAnalysis.from_json` first.
"""

from __future__ import annotations

from ..detect.findings import LineKind
from ..detect.result import NO_SPEED_TO_CHECK, WakeAnalysis
from ..physics.units import KNOT_MPS

_LINE_LABELS = (
    (LineKind.TURBULENT_DARK, "dark turbulent wake"),
    (LineKind.TURBULENT_BRIGHT, "bright turbulent wake"),
    (LineKind.KELVIN_ARM, "Kelvin arms"),
    (LineKind.NARROW_V, "narrow V"),
)


def describe_lines(a: WakeAnalysis) -> str:
    """One line of text for the wake lines of a result: angle from the track, significance."""
    parts = []
    for kind, label in _LINE_LABELS:
        found = [ln for ln in a.lines if ln.kind == kind]
        if found:
            parts.append(
                label
                + " at "
                + ", ".join(f"{ln.angle_from_track_deg:+.1f}° (significance {ln.significance:.0f})" for ln in found)
            )
    return "; ".join(parts) if parts else "none stands out"


def _kn(lo_mps: float, hi_mps: float) -> str:
    return f"{lo_mps / KNOT_MPS:.1f} - {hi_mps / KNOT_MPS:.1f} kn"


def speed_text(a: WakeAnalysis) -> tuple[str, str]:
    """(speed, 95 % interval) in knots and m/s (the result must have a speed)."""
    sp = a.speed
    assert sp is not None
    lo, hi = sp.ci95_low_mps, sp.ci95_high_mps
    return (
        f"{sp.speed_mps / KNOT_MPS:.1f} kn ({sp.speed_mps:.2f} m/s)",
        f"{_kn(lo, hi)} ({lo:.2f} - {hi:.2f} m/s)",
    )


def speed_label(a: WakeAnalysis) -> str:
    """The speed row's label: what the figure is (over ground or through the water), or plain "Speed" when there
    is no figure to qualify."""
    if a.speed is None:
        return "Speed"
    return "Speed over ground" if a.speed_over_ground else "Speed through water"


def summary_rows(a: WakeAnalysis) -> list[tuple[str, str]]:
    """The main table: label and value, in the order shown everywhere."""
    if not a.wake_found:
        rows = [("Result", "No wake found: no speed estimate is given"), ("Decision", a.decision)]
    else:
        if a.speed is None:
            speed, interval = "not estimated (see the cautions for why)", "none"
        else:
            speed, interval = speed_text(a)
        rows = [
            (speed_label(a), speed),
            ("95 % interval", interval),
            *speed_check_rows(a),  # the limit's verdict and the speed it is judged on, beside the headline
            ("Heading (true bearing)", _heading(a)),
            (
                "Wake half-angle",
                "not measured"
                if a.half_angle_deg is None
                else f"{a.half_angle_deg:.1f} ± {a.half_angle_std_deg or 0.0:.1f}°",
            ),
            (
                "Transverse crest spacing",
                (f"not read: {a.transverse_note}" if a.transverse_note else "not seen")
                if a.transverse_wavelength_m is None
                else f"{a.transverse_wavelength_m:.1f} m",
            ),
            ("Wake lines through the vessel", describe_lines(a)),
            ("Depth regime", f"{_regime(a)} - {a.regime.explanation}"),
            ("Depth", _depth(a)),
            ("Consistency of methods", (a.speed.verdict if a.speed else "") or "no speed: nothing to cross-check"),
        ]
        if a.revised:
            rows.append(("Hand measurements", "included: the result was revised with the analyst's hand measurements"))
    lonlat = a.vessel_lonlat
    rows.append(
        (
            "Vessel position",
            (f"lon {lonlat[0]:.6f}, lat {lonlat[1]:.6f}; " if lonlat else "")
            + f"pixel ({a.vessel_px[0]:.1f}, {a.vessel_px[1]:.1f})",
        )
    )
    return rows


def _heading(a: WakeAnalysis) -> str:
    if a.heading_deg is None:
        return "not measured"
    return f"{a.heading_deg:.1f}° (± {a.heading_std_deg or 0.0:.1f}°)"


def _regime(a: WakeAnalysis) -> str:
    """The regime as the stored form names it (``finite-depth``, ``deep``...)."""
    return a.regime.regime.value.replace(" ", "-")


def _depth(a: WakeAnalysis) -> str:
    if a.depth_m is None:
        return "not estimated"
    if a.depth_ci95_m is None:
        return f"{a.depth_m:.1f} m"
    return f"{a.depth_m:.1f} m (95 %: {a.depth_ci95_m[0]:.1f} - {a.depth_ci95_m[1]:.1f} m)"


def speed_check_rows(a: WakeAnalysis) -> list[tuple[str, str]]:
    """Speed over ground with a given current, and the limit judged with the uncertainty (when asked)."""
    if not a.check_asked:
        return []
    assert a.request is not None
    c = a.speed_check()
    if c is None:
        return [("Speed limit" if a.request.speed_limit else "Lower bound", NO_SPEED_TO_CHECK)]
    rows = []
    if c.current is not None and c.over_ground is not None and not c.measured_over_ground:
        g = c.over_ground
        rows.append(
            (
                "Speed over ground (with the current)",
                f"{g.median_mps / KNOT_MPS:.1f} kn, 95 % interval {_kn(*g.ci95_mps)}",
            )
        )
    if c.current is not None and c.through_water is not None and c.measured_over_ground:
        w = c.through_water
        rows.append(
            (
                "Speed through the water (with the current)",
                f"{w.median_mps / KNOT_MPS:.1f} kn, 95 % interval {_kn(*w.ci95_mps)}",
            )
        )
    rows.append(("Speed limit" if c.limit else "Lower bound", c.statement))
    if c.assumptions:
        rows.append(("Assumed for these", "; ".join(c.assumptions)))
    return rows


def overview_cells(a: WakeAnalysis) -> list[str]:
    """Speed, 95 % interval, heading and depth regime of a result, for the overview of several vessels."""
    if not a.wake_found:
        return ["no wake found", "-", "-", "-"]
    heading = _heading(a)
    if a.speed is None:
        return ["not estimated", "-", heading, _regime(a)]
    sp = a.speed
    speed = f"{sp.speed_mps / KNOT_MPS:.1f} kn" + (" over ground" if a.speed_over_ground else "")
    return [speed, _kn(sp.ci95_low_mps, sp.ci95_high_mps), heading, _regime(a)]


def method_rows(a: WakeAnalysis) -> list[tuple[str, str, str, str]]:
    """(method, speed m/s, 95 % interval m/s, speed kn) per method."""
    return [
        (
            m.method + (" [by hand]" if m.by_hand and "(by hand)" not in m.method else ""),
            f"{m.speed_mps:.2f}",
            f"{m.ci95_low_mps:.2f} - {m.ci95_high_mps:.2f}",
            f"{m.speed_mps / KNOT_MPS:.1f}",
        )
        for m in a.methods
    ]


def method_assumptions(a: WakeAnalysis) -> list[str]:
    """What the speed methods assumed, each once, sorted."""
    return sorted({x for m in a.methods for x in m.assumptions})


def assumption_texts(a: WakeAnalysis) -> list[str]:
    """The methods' assumptions, then the gravity and the pixel the analysis used."""
    if a.vessel_lonlat is not None:
        where = f"WGS 84 normal gravity at the vessel's latitude, {a.vessel_lonlat[1]:.4f}°"
    else:
        where = "standard gravity: the image has no latitude, so its uncertainty spans every latitude"
    return [*method_assumptions(a), f"gravity {a.gravity_mps2:.4f} m/s² ({where}); analysis pixel {a.pixel_m:.2f} m"]


def caution_texts(a: WakeAnalysis) -> list[str]:
    return [c.text for c in a.cautions]


def list_line(a: WakeAnalysis | None, *, rejected: bool = False) -> str:
    """One short line for a vessel in a list: its speed and interval, and the limit's verdict when asked."""
    if a is None:
        return "not analysed"
    if rejected:
        return "finding rejected"
    if not a.wake_found:
        return "no wake found"
    if a.speed is None:
        return f"wake seen as a line, heading {_heading(a)}, no speed"
    sp = a.speed
    text = f"{sp.speed_mps / KNOT_MPS:.1f} kn ({_kn(sp.ci95_low_mps, sp.ci95_high_mps)})"
    text += " over ground" if a.speed_over_ground else ""
    check = a.speed_check() if a.check_asked else None
    if check is not None and check.limit is not None and check.judged is not None:
        p = check.judged.probability_over
        verdict = "over" if p >= 0.5 else "under"
        text += f"; {verdict} the {check.limit.limit_mps / KNOT_MPS:.0f} kn limit (p {p:.2f})"
    return text
