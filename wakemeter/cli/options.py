"""Options shared by ``analyze`` and ``report``, and their conversion into one :class:`AnalysisRequest`."""

from __future__ import annotations

import argparse
import re
import sys
from typing import TYPE_CHECKING

from ..errors import ParameterError

if TYPE_CHECKING:  # the analysis is imported when a command runs, not when the CLI starts
    from ..detect.request import AnalysisRequest
    from ..detect.result import WakeAnalysis
    from ..scene.raster import Scene

#: options whose value is a comma-separated list that may start with a minus sign (``--vessel -35,36``)
LIST_OPTIONS = ("--vessel", "--vessel-px", "--radar-geometry", "--current")
_NUMBERS = re.compile(r"^-?[\d.]+(e-?\d+)?(,-?[\d.]*(e-?\d+)?)+$", re.IGNORECASE)


def join_negative_lists(argv: list[str]) -> list[str]:
    """``--vessel -35,36`` -> ``--vessel=-35,36``: argparse would take ``-35,36`` for an option."""
    out: list[str] = []
    i = 0
    while i < len(argv):
        a = argv[i]
        if a in LIST_OPTIONS and i + 1 < len(argv) and argv[i + 1].startswith("-") and _NUMBERS.match(argv[i + 1]):
            out.append(f"{a}={argv[i + 1]}")
            i += 2
            continue
        out.append(a)
        i += 1
    return out


def numbers(text: str, count: int, what: str) -> tuple[float, ...]:
    try:
        values = tuple(float(x) for x in text.split(","))
    except ValueError:
        values = ()
    if len(values) != count:
        raise ParameterError(f"{what} needs {count} numbers separated by commas, got {text!r}")
    return values


def add_request_options(p: argparse.ArgumentParser, *, position: bool = True) -> None:
    """The analysis options; without ``position`` the vessel's position is not asked (batch: per task)."""
    if position:
        p.add_argument("--vessel", metavar="LON,LAT", help="vessel position in WGS 84 degrees")
        p.add_argument("--vessel-px", metavar="COL,ROW", help="vessel position in scene pixels (instead of --vessel)")
    else:
        p.set_defaults(vessel=None, vessel_px=None)
    p.add_argument("--depth", type=float, metavar="M", help="known water depth, m")
    p.add_argument("--depth-std", type=float, default=0.0, metavar="M", help="its standard uncertainty, m")
    p.add_argument("--hull-length", type=float, metavar="M", help="hull length, m (for the fast-hull check)")
    p.add_argument(
        "--radar-geometry",
        metavar="R,V,LOOK,INC",
        help="radar: slant range m, platform speed m/s, look bearing deg, incidence deg (a Sentinel-1 GRD "
        "product gives its own at the vessel's pixel; these figures replace them)",
    )
    p.add_argument(
        "--current",
        metavar="KN,TOWARD[,KN_STD,DEG_STD]",
        help="water current at the vessel: speed in knots, true bearing it sets toward, and their standard "
        "uncertainties (default 0); the result then gives the speed over ground too",
    )
    p.add_argument("--current-source", metavar="TEXT", default="", help="where the current comes from")
    p.add_argument("--speed-limit", type=float, metavar="KN", help="speed limit in knots, judged over ground")
    p.add_argument(
        "--limit-through-water",
        action="store_true",
        help="the limit applies to speed through the water, not over ground",
    )
    p.add_argument(
        "--pixel-size",
        type=float,
        metavar="M",
        help="an image without georeference: its pixel size on the ground in metres (use --vessel-px)",
    )
    p.add_argument(
        "--north-up",
        type=float,
        metavar="DEG",
        help="with --pixel-size: true bearing of image up (0: north up); without it, headings are from image up",
    )
    p.add_argument("--seed", type=int, default=0, help="seed of the Monte Carlo draws")
    p.add_argument(
        "--assume-vessel",
        action="store_true",
        help="give the speed of the waves here even when no hull or wake line marks a vessel at the point "
        "(the result says so)",
    )


def checked_request(args: argparse.Namespace) -> AnalysisRequest:
    """The request, with the options checked before the file is read; but when the vessel position is
    missing and the file is not an image at all (a damaged session, say), the file's problem is said first."""
    try:
        return request_from_args(args)
    except ParameterError:
        if args.vessel is None and args.vessel_px is None:
            from ..scene.raster import open_scene

            open_scene(args.scene).close()
        raise


def request_from_args(args: argparse.Namespace) -> AnalysisRequest:
    """The one request the options describe; errors in the options' own words."""
    from ..detect.request import AnalysisRequest, RadarGeometry, SpeedLimit, WaterCurrent
    from ..physics.inversion import Uncertain
    from ..physics.units import KNOT_MPS

    if (args.vessel is None) == (args.vessel_px is None):
        raise ParameterError("give the vessel position with --vessel LON,LAT or --vessel-px COL,ROW (one of them)")
    if args.depth is None and args.depth_std:
        raise ParameterError("--depth-std needs --depth")
    rg = None
    if args.radar_geometry:
        rg = RadarGeometry(
            *numbers(
                args.radar_geometry,
                4,
                "--radar-geometry (slant range m, platform speed m/s, look bearing deg, incidence deg)",
            )
        )
    depth = None
    if args.depth is not None:
        if not args.depth > 0:
            raise ParameterError(f"--depth must be > 0 m, got {args.depth}")
        if not args.depth_std >= 0:
            raise ParameterError(f"--depth-std must be >= 0 m, got {args.depth_std}")
        depth = Uncertain(args.depth, args.depth_std)
    current = None
    if args.current:
        text = args.current.split(",")
        if len(text) not in (2, 4):
            raise ParameterError(
                "--current needs 2 or 4 numbers (knots, toward degrees[, knots std, degrees std]), "
                f"got {args.current!r}"
            )
        c = numbers(args.current, len(text), "--current")
        current = WaterCurrent(
            c[0] * KNOT_MPS,
            c[1] % 360.0 if 0 <= c[1] <= 360 else c[1],
            (c[2] if len(c) == 4 else 0.0) * KNOT_MPS,
            c[3] if len(c) == 4 else 0.0,
            args.current_source,
        )
    elif args.current_source:
        raise ParameterError("--current-source needs --current")
    limit = None
    if args.speed_limit is not None:
        limit = SpeedLimit(args.speed_limit * KNOT_MPS, over_ground=not args.limit_through_water)
    elif args.limit_through_water:
        raise ParameterError("--limit-through-water needs --speed-limit")
    return AnalysisRequest(
        vessel_lonlat=_two(numbers(args.vessel, 2, "--vessel (longitude, latitude)")) if args.vessel else None,
        vessel_px=_two(numbers(args.vessel_px, 2, "--vessel-px (column, row)")) if args.vessel_px else None,
        depth=depth,
        hull_length_m=args.hull_length,
        radar_geometry=rg,
        seed=args.seed,
        force=args.assume_vessel,
        current=current,
        speed_limit=limit,
    )


def _two(values: tuple[float, ...]) -> tuple[float, float]:
    return values[0], values[1]


def apply_calibration(scene: Scene, args: argparse.Namespace) -> None:
    """``--pixel-size`` (and ``--north-up``) calibrate an image without georeference, as the program's
    Calibrate tool does; a georeferenced scene keeps its own geometry and the option is refused."""
    from ..scene import geodesy

    size, up = getattr(args, "pixel_size", None), getattr(args, "north_up", None)
    if size is None:
        if up is not None:
            raise ParameterError("--north-up needs --pixel-size")
        if not scene.info.georeferenced and scene.calibration is None:
            raise ParameterError(
                f"{scene.info.origin.name} has no georeference: give its pixel's ground size with --pixel-size M "
                "(and --north-up DEG when image up is not north), or calibrate it in the program"
                + (f" ({scene.photo_note})" if scene.photo_note else "")
            )
        return
    if scene.info.georeferenced:
        raise ParameterError(
            f"{scene.info.origin.name} is georeferenced: its own pixel size is used (leave out --pixel-size)"
        )
    lo, hi = geodesy.CALIBRATED_PIXEL_RANGE_M
    if not (lo <= size <= hi):
        raise ParameterError(f"--pixel-size must be a ground size in metres from {lo:g} to {hi:g}, got {size:g}")
    if up is not None and not -360 <= up <= 360:
        raise ParameterError(f"--north-up must be a bearing in degrees (0-360), got {up}")
    scene.calibrate(geodesy.calibrated_frame(pixel_size_m=size, north_up_deg=up))


def add_reports_options(p: argparse.ArgumentParser) -> None:
    """Options to compare the result with vessel position reports (AIS)."""
    p.add_argument("--reports", metavar="FILE", help="vessel position reports: CSV or NMEA (AIS) sentences")
    p.add_argument(
        "--report-columns",
        metavar="FIELD=NAME,...",
        help="CSV column names when they are not the usual ones (fields: id, time, lat, lon, sog, cog, heading)",
    )
    p.add_argument("--scene-time", metavar="ISO", help="the scene's time (UTC) when its metadata lacks it")
    p.add_argument(
        "--match-distance", type=float, default=500.0, metavar="M", help="farthest report to match a vessel (m)"
    )


def compare_with_reports(
    args: argparse.Namespace, named_results: list[tuple[str, WakeAnalysis]], acquisition_time: str | None
) -> tuple[list[dict | None], list[dict]] | None:
    """The comparisons (JSON) of each result and the reporting vessels matched to none; None without --reports."""
    if not getattr(args, "reports", None):
        for opt in ("report_columns", "scene_time"):
            if getattr(args, opt, None):
                raise ParameterError(f"--{opt.replace('_', '-')} needs --reports")
        return None
    from dataclasses import asdict

    from ..positions.match import compare_results, scene_time
    from ..positions.reports import parse_columns, read_reports

    when = scene_time(acquisition_time, args.scene_time)
    reports = read_reports(args.reports, parse_columns(args.report_columns))
    dropped = reports.dropped_text()
    if dropped:
        print(f"wakemeter: {dropped}", file=sys.stderr)
    comps, unmatched = compare_results(named_results, reports, when, gate_m=args.match_distance)
    return [None if c is None else c.to_json() for c in comps], [asdict(u) for u in unmatched]
