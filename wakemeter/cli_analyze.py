"""``wakemeter analyze``: speed, heading and depth regime of a vessel's wake, headless."""

from __future__ import annotations

import argparse
import json

from .cli import CAUTION, command
from .errors import ParameterError


def _pair(text: str, what: str) -> tuple[float, float]:
    try:
        a, b = (float(x) for x in text.split(","))
    except ValueError as err:
        raise ParameterError(f"{what} must be two numbers separated by a comma, got {text!r}") from err
    return a, b


def _add(p: argparse.ArgumentParser) -> None:
    p.add_argument("scene", help="raster file (for 'report': or a saved session, .json)")
    p.add_argument("--vessel", metavar="LON,LAT", help="vessel position in WGS 84 degrees")
    p.add_argument("--vessel-px", metavar="COL,ROW", help="vessel position in scene pixels (instead of --vessel)")
    p.add_argument("--depth", type=float, metavar="M", help="known water depth, m")
    p.add_argument("--depth-std", type=float, default=0.0, metavar="M", help="its standard uncertainty, m")
    p.add_argument("--hull-length", type=float, metavar="M", help="hull length, m (for the fast-hull check)")
    p.add_argument("--radar-geometry", metavar="R,V,LOOK,INC",
                   help="radar: slant range m, platform speed m/s, look bearing deg, incidence deg")
    p.add_argument("--json", action="store_true", help="print one JSON object")
    p.add_argument("--seed", type=int, default=0, help="seed of the Monte Carlo draws")


def check_position_and_radar(args: argparse.Namespace):
    """Validate the vessel position options; the radar geometry when given."""
    from .detect.analysis import RadarGeometry

    if (args.vessel is None) == (args.vessel_px is None):
        raise ParameterError("give the vessel position with --vessel LON,LAT or --vessel-px COL,ROW (one of them)")
    if not args.radar_geometry:
        return None
    try:
        r, v, look, inc = (float(x) for x in args.radar_geometry.split(","))
    except ValueError as err:
        raise ParameterError("--radar-geometry needs four numbers: slant range m, platform speed m/s, "
                             f"look bearing deg, incidence deg; got {args.radar_geometry!r}") from err
    return RadarGeometry(r, v, look, inc)


@command("analyze", "Find a vessel's wake and estimate speed (95 % interval), heading and depth regime.")(_add)
def run(args: argparse.Namespace) -> int:
    from .detect.analysis import analyze
    from .scene.raster import open_scene

    radar_geo = check_position_and_radar(args)
    with open_scene(args.scene) as scene:
        a = analyze(scene, vessel_lonlat=_pair(args.vessel, "--vessel") if args.vessel else None,
                    vessel_px=_pair(args.vessel_px, "--vessel-px") if args.vessel_px else None,
                    depth_m=args.depth, depth_std_m=args.depth_std, hull_length_m=args.hull_length,
                    radar_geometry=radar_geo, seed=args.seed)
    if args.json:
        print(json.dumps(a.to_json(), indent=2))
    else:
        print(format_analysis(a))
    return 0


def format_analysis(a) -> str:
    """A readable summary of a :class:`WakeAnalysis`."""
    from .evidence.record import describe_lines
    from .physics.units import mps_to_knots

    j = a.to_json()
    lines = [f"vessel at pixel ({j['vessel_px'][0]:.1f}, {j['vessel_px'][1]:.1f})"
             + (f", lon {j['vessel_lonlat'][0]:.6f} lat {j['vessel_lonlat'][1]:.6f}" if j["vessel_lonlat"] else "")]
    if not a.wake_found:
        lines += [a.decision, "no speed is given for a scene without a detectable wake", CAUTION]
        return "\n".join(lines)
    lo, hi = j["speed_ci95_mps"]
    lines += [
        f"speed through water: {j['speed_mps']:.2f} m/s = {mps_to_knots(j['speed_mps']):.1f} kn "
        f"(95 % interval {lo:.2f}-{hi:.2f} m/s = {mps_to_knots(lo):.1f}-{mps_to_knots(hi):.1f} kn)",
        f"heading (true):      {j['heading_deg']:.1f} deg +/- {j['heading_std_deg']:.1f}",
        "wake half-angle:     " + (f"{j['half_angle_deg']:.1f} +/- {j['half_angle_std_deg']:.1f} deg"
                                    if j["half_angle_deg"] is not None else "not measured"),
        "transverse waves:    " + (f"{j['transverse_wavelength_m']:.1f} m apart" if j["transverse_wavelength_m"]
                                    else "not seen"),
        f"wake lines:          {describe_lines(j)}",
        f"depth regime:        {j['regime']} - {j['regime_explanation']}",
    ]
    if j["depth_m"] is not None:
        lines.append(f"depth:               {j['depth_m']:.1f} m (95 %: {j['depth_ci95_m'][0]:.1f}-{j['depth_ci95_m'][1]:.1f} m)")
    lines.append("methods:")
    for m in j["methods"]:
        lines.append(f"  {m['name']:<48} {m['speed_mps']:.2f} m/s  (95 %: {m['speed_ci95_mps'][0]:.2f}-"
                     f"{m['speed_ci95_mps'][1]:.2f})")
    lines.append(f"consistency:         {j['consistency']}")
    lines.append(f"gravity {j['gravity_mps2']:.4f} m/s^2, analysis pixel {j['pixel_m']:.2f} m; {a.decision}")
    lines.append("cautions:")
    lines += [f"  - {c}" for c in j["cautions"]]
    return "\n".join(lines)
