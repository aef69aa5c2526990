"""Options shared by ``analyze`` and ``report``, and their conversion into one :class:`AnalysisRequest`."""

from __future__ import annotations

import argparse
import re
from typing import TYPE_CHECKING

from ..errors import ParameterError

if TYPE_CHECKING:  # the analysis is imported when a command runs, not when the CLI starts
    from ..detect.request import AnalysisRequest

#: options whose value is a comma-separated list that may start with a minus sign (``--vessel -35,36``)
LIST_OPTIONS = ("--vessel", "--vessel-px", "--radar-geometry")
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


def add_request_options(p: argparse.ArgumentParser) -> None:
    p.add_argument("--vessel", metavar="LON,LAT", help="vessel position in WGS 84 degrees")
    p.add_argument("--vessel-px", metavar="COL,ROW", help="vessel position in scene pixels (instead of --vessel)")
    p.add_argument("--depth", type=float, metavar="M", help="known water depth, m")
    p.add_argument("--depth-std", type=float, default=0.0, metavar="M", help="its standard uncertainty, m")
    p.add_argument("--hull-length", type=float, metavar="M", help="hull length, m (for the fast-hull check)")
    p.add_argument(
        "--radar-geometry",
        metavar="R,V,LOOK,INC",
        help="radar: slant range m, platform speed m/s, look bearing deg, incidence deg",
    )
    p.add_argument("--seed", type=int, default=0, help="seed of the Monte Carlo draws")
    p.add_argument(
        "--assume-vessel",
        action="store_true",
        help="give the speed of the waves here even when no hull or wake line marks a vessel at the point "
        "(the result says so)",
    )


def request_from_args(args: argparse.Namespace) -> AnalysisRequest:
    """The one request the options describe; errors in the options' own words."""
    from ..detect.request import AnalysisRequest, RadarGeometry
    from ..physics.inversion import Uncertain

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
    return AnalysisRequest(
        vessel_lonlat=_two(numbers(args.vessel, 2, "--vessel (longitude, latitude)")) if args.vessel else None,
        vessel_px=_two(numbers(args.vessel_px, 2, "--vessel-px (column, row)")) if args.vessel_px else None,
        depth=depth,
        hull_length_m=args.hull_length,
        radar_geometry=rg,
        seed=args.seed,
        force=args.assume_vessel,
    )


def _two(values: tuple[float, ...]) -> tuple[float, float]:
    return values[0], values[1]
