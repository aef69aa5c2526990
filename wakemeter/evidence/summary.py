"""One summary of a result, shared by the CLI text, the results panel (HTML) and the PDF report.

Each function takes the result JSON (:meth:`WakeAnalysis.to_json`) and returns plain strings; the
three renderers only lay them out (and escape them for their markup).
"""

from __future__ import annotations

from ..detect.result import stored_speed_basis
from ..physics.units import KNOT_MPS

_LINE_LABELS = (
    ("turbulent wake (dark)", "dark turbulent wake"),
    ("turbulent wake (bright)", "bright turbulent wake"),
    ("Kelvin arm", "Kelvin arms"),
    ("narrow-V arm", "narrow V"),
)


def describe_lines(result: dict) -> str:
    """One line of text for the wake lines of a result: angle from the track, significance."""
    parts = []
    for kind, label in _LINE_LABELS:
        found = [
            ln for ln in result.get("lines") or [] if ln["kind"] == kind and ln["angle_from_track_deg"] is not None
        ]
        if found:
            parts.append(
                label
                + " at "
                + ", ".join(
                    f"{ln['angle_from_track_deg']:+.1f}° (significance {ln['significance']:.0f})" for ln in found
                )
            )
    return "; ".join(parts) if parts else "none stands out"


def speed_text(r: dict) -> tuple[str, str]:
    """(speed, 95 % interval) in knots and m/s."""
    lo, hi = r["speed_ci95_mps"]
    return (
        f"{r['speed_mps'] / KNOT_MPS:.1f} kn ({r['speed_mps']:.2f} m/s)",
        f"{lo / KNOT_MPS:.1f} - {hi / KNOT_MPS:.1f} kn ({lo:.2f} - {hi:.2f} m/s)",
    )


def summary_rows(r: dict) -> list[tuple[str, str]]:
    """The main table: label and value, in the order shown everywhere."""
    if not r["wake_found"]:
        rows = [("Result", "No wake found: no speed estimate is given"), ("Decision", r["decision"])]
    else:
        if r["speed_mps"] is None:
            speed, interval = "not estimated (see the cautions for why)", "none"
        else:
            speed, interval = speed_text(r)
        label = "Speed over ground" if stored_speed_basis(r) == "over ground" else "Speed through water"
        rows = [
            (label, speed),
            ("95 % interval", interval),
            ("Heading (true bearing)", f"{r['heading_deg']:.1f}° (± {r['heading_std_deg']:.1f}°)"),
            (
                "Wake half-angle",
                "not measured"
                if r["half_angle_deg"] is None
                else f"{r['half_angle_deg']:.1f} ± {r['half_angle_std_deg']:.1f}°",
            ),
            (
                "Transverse crest spacing",
                "not seen" if r["transverse_wavelength_m"] is None else f"{r['transverse_wavelength_m']:.1f} m",
            ),
            ("Wake lines through the vessel", describe_lines(r)),
            ("Depth regime", f"{r['regime']} - {r['regime_explanation']}"),
            (
                "Depth",
                "not estimated"
                if r["depth_m"] is None
                else f"{r['depth_m']:.1f} m (95 %: {r['depth_ci95_m'][0]:.1f} - {r['depth_ci95_m'][1]:.1f} m)",
            ),
            ("Consistency of methods", r["consistency"] or "no speed: nothing to cross-check"),
        ]
        rows += speed_check_rows(r)
        if r.get("revised"):
            rows.append(("Hand measurements", "included: the result was revised with the analyst's hand measurements"))
    rows.append(
        (
            "Vessel position",
            (f"lon {r['vessel_lonlat'][0]:.6f}, lat {r['vessel_lonlat'][1]:.6f}; " if r["vessel_lonlat"] else "")
            + f"pixel ({r['vessel_px'][0]:.1f}, "
            f"{r['vessel_px'][1]:.1f})",
        )
    )
    return rows


def speed_check_rows(r: dict) -> list[tuple[str, str]]:
    """Speed over ground with a given current, and the limit judged with the uncertainty (when asked)."""
    c = r.get("speed_check")
    if not c:
        return []
    rows = []
    if c.get("current") and c.get("over_ground") and c.get("measured") == "through the water":
        g = c["over_ground"]
        rows.append(
            (
                "Speed over ground (with the current)",
                f"{g['median_knots']:.1f} kn, 95 % interval {g['ci95_knots'][0]:.1f} - {g['ci95_knots'][1]:.1f} kn",
            )
        )
    if c.get("current") and c.get("through_water") and c.get("measured") == "over ground":
        w = c["through_water"]
        rows.append(
            (
                "Speed through the water (with the current)",
                f"{w['median_knots']:.1f} kn, 95 % interval {w['ci95_knots'][0]:.1f} - {w['ci95_knots'][1]:.1f} kn",
            )
        )
    rows.append(("Speed limit" if c.get("limit") else "Lower bound", c["statement"]))
    if c.get("assumptions"):
        rows.append(("Assumed for these", "; ".join(c["assumptions"])))
    return rows


def overview_cells(r: dict) -> list[str]:
    """Speed, 95 % interval, heading and depth regime of a result, for the overview of several vessels."""
    if not r["wake_found"]:
        return ["no wake found", "-", "-", "-"]
    heading = f"{r['heading_deg']:.1f}° (± {r['heading_std_deg']:.1f}°)"
    if r["speed_mps"] is None:
        return ["not estimated", "-", heading, r["regime"]]
    lo, hi = r["speed_ci95_mps"]
    speed = f"{r['speed_mps'] / KNOT_MPS:.1f} kn" + (" over ground" if stored_speed_basis(r) == "over ground" else "")
    return [speed, f"{lo / KNOT_MPS:.1f} - {hi / KNOT_MPS:.1f} kn", heading, r["regime"]]


def method_rows(r: dict) -> list[tuple[str, str, str, str]]:
    """(method, speed m/s, 95 % interval m/s, speed kn) per method."""
    return [
        (
            m["name"] + (" [by hand]" if m.get("by_hand") and "(by hand)" not in m["name"] else ""),
            f"{m['speed_mps']:.2f}",
            f"{m['speed_ci95_mps'][0]:.2f} - {m['speed_ci95_mps'][1]:.2f}",
            f"{m['speed_mps'] / KNOT_MPS:.1f}",
        )
        for m in r["methods"]
    ]


def assumption_texts(r: dict) -> list[str]:
    out = sorted({a for m in r["methods"] for a in m.get("assumptions", [])})
    out.append(
        f"gravity {r['gravity_mps2']:.4f} m/s² (WGS 84 normal gravity at the vessel's latitude when "
        f"georeferenced); analysis pixel {r['pixel_m']:.2f} m"
    )
    return out


def caution_texts(r: dict) -> list[str]:
    return [c["text"] if isinstance(c, dict) else str(c) for c in r["cautions"]]
