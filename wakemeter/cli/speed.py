"""``wakemeter speed``: speed from hand-measured wake quantities, with a 95 % interval."""

from __future__ import annotations

import argparse
import math
from typing import TYPE_CHECKING

from ..errors import ParameterError
from .base import CAUTION_LINE, Command

if TYPE_CHECKING:
    from ..physics.inversion import Uncertain


def add_arguments(p: argparse.ArgumentParser) -> None:
    p.add_argument(
        "--transverse-wavelength", type=float, metavar="M", help="transverse crest spacing along the track, m"
    )
    p.add_argument("--crest-wavelength", type=float, metavar="M", help="crest spacing of a divergent train, m")
    p.add_argument(
        "--crest-angle",
        type=float,
        default=0.0,
        metavar="DEG",
        help="propagation angle of that crest train to the track, degrees",
    )
    p.add_argument("--crest-angle-std", type=float, default=1.0, metavar="DEG")
    p.add_argument(
        "--wavelength-std",
        type=float,
        default=None,
        metavar="M",
        help="standard uncertainty of the wavelength, m (default 3 %% of it)",
    )
    p.add_argument("--half-angle", type=float, metavar="DEG", help="measured wake half-angle, degrees")
    p.add_argument("--half-angle-std", type=float, default=1.0, metavar="DEG")
    p.add_argument("--depth", type=float, metavar="M", help="known water depth, m (default: deep water)")
    p.add_argument("--depth-std", type=float, default=0.0, metavar="M")
    p.add_argument("--latitude", type=float, metavar="DEG", help="latitude for WGS 84 normal gravity")
    p.add_argument(
        "--pixel-rel-std",
        type=float,
        default=0.0,
        metavar="FRACTION",
        help="relative standard uncertainty of the pixel size",
    )
    p.add_argument("--seed", type=int, default=0)


#: (option, allowed, test): every number the user types is checked here, in the option's own name
_CHECKS = (
    ("transverse_wavelength", "a number > 0 m", lambda v: v > 0),
    ("crest_wavelength", "a number > 0 m", lambda v: v > 0),
    ("crest_angle", "an angle from 0 to 80 deg", lambda v: 0 <= v <= 80),
    ("crest_angle_std", "a number >= 0 deg", lambda v: v >= 0),
    ("wavelength_std", "a number >= 0 m", lambda v: v >= 0),
    ("half_angle", "an angle between 0 and 90 deg", lambda v: 0 < v < 90),
    ("half_angle_std", "a number >= 0 deg", lambda v: v >= 0),
    ("depth", "a number > 0 m", lambda v: v > 0),
    ("depth_std", "a number >= 0 m", lambda v: v >= 0),
    ("latitude", "a latitude from -90 to 90 deg", lambda v: -90 <= v <= 90),
    ("pixel_rel_std", "a fraction from 0 to 0.5", lambda v: 0 <= v < 0.5),
)


def _check(args: argparse.Namespace) -> None:
    for name, allowed, ok in _CHECKS:
        v = getattr(args, name)
        if v is not None and not (math.isfinite(v) and ok(v)):
            raise ParameterError(f"--{name.replace('_', '-')} must be {allowed}, got {v:g}")
    if args.seed < 0:
        raise ParameterError(f"--seed must be a whole number >= 0, got {args.seed}")


def run(args: argparse.Namespace) -> int:
    from ..physics import inversion as inv
    from ..physics import kelvin
    from ..physics.gravity import normal_gravity

    _check(args)
    if args.latitude is not None:
        g = inv.Uncertain(float(normal_gravity(args.latitude)), 0.0005)
    else:
        g = inv.Conditions().g_mps2
    depth = inv.Uncertain(args.depth, args.depth_std) if args.depth is not None else None
    cond = inv.Conditions(g_mps2=g, depth_m=depth, pixel_scale_rel_std=args.pixel_rel_std)
    estimates: list[inv.SpeedEstimate] = []
    half = inv.Uncertain(args.half_angle, args.half_angle_std) if args.half_angle is not None else None
    wider = half is not None and half.value > kelvin.KELVIN_HALF_ANGLE_DEG + 2 * max(half.std, 1e-9)
    fitted_depth = None
    if args.transverse_wavelength is not None:
        s = args.wavelength_std if args.wavelength_std is not None else 0.03 * abs(args.transverse_wavelength)
        lam = inv.Uncertain(args.transverse_wavelength, s)
        if wider and depth is None and half is not None:
            # the half-angle wider than Kelvin's says the water is not deep: speed and depth from the pair
            est, fitted_depth = inv.speed_and_depth_from_transverse_wavelength_and_half_angle(
                lam, half, cond, seed=args.seed
            )
            estimates.append(est)
        else:
            estimates.append(inv.speed_from_transverse_wavelength(lam, cond, seed=args.seed))
    if args.crest_wavelength is not None:
        s = args.wavelength_std if args.wavelength_std is not None else 0.03 * abs(args.crest_wavelength)
        estimates.append(
            inv.speed_from_crest_wavelength(
                inv.Uncertain(args.crest_wavelength, s),
                inv.Uncertain(args.crest_angle, args.crest_angle_std),
                cond,
                seed=args.seed,
            )
        )
    if not estimates:
        print("wakemeter speed: give --transverse-wavelength or --crest-wavelength (metres)")
        return 2
    for e in estimates:
        print(e.summary())
        for a in e.assumptions:
            print(f"    assumes: {a}")
    if len(estimates) > 1:
        c = inv.combine_estimates(estimates)
        print(
            f"combined: {c.speed_mps:.2f} m/s, 95 % interval {c.ci95_low_mps:.2f}-{c.ci95_high_mps:.2f} m/s; "
            f"{c.verdict}"
        )
    if fitted_depth is not None:
        print(
            f"depth from the pair: {fitted_depth.depth_m:.1f} m (95 % interval {fitted_depth.ci95_low_m:.1f}-"
            f"{fitted_depth.ci95_high_m:.1f} m), Fr_h {fitted_depth.froude_depth:.2f}"
        )
    if half is not None and depth is not None:
        _say_contradiction(estimates[0].speed_mps, depth.value, half, g.value)
    regime = inv.assess_depth_regime(
        speed=estimates[0],
        depth_m=depth,  # a depth from the pair is not a given one: the half-angle speaks for itself
        half_angle_deg=half,
        transverse_seen=args.transverse_wavelength is not None,
        g=g.value,
    )
    print(f"depth regime: {regime.regime} - {regime.explanation}")
    print(CAUTION_LINE)
    return 0


def _say_contradiction(speed_mps: float, depth_m: float, half: Uncertain, g: float) -> None:
    """Both a depth and a half-angle given: the half-angle the speed makes at that depth (Havelock 1908) beside
    the one measured, and a stated contradiction when they differ by more than two standard uncertainties."""
    from ..physics import havelock

    fr = speed_mps / math.sqrt(g * depth_m)
    expected = float(havelock.half_angle(fr))
    print(
        f"half-angle: measured {half.value:.1f} ± {half.std:.1f}°; at {depth_m:g} m the speed gives "
        f"{expected:.1f}° (Fr_h {fr:.2f}, Havelock 1908)"
    )
    if abs(expected - half.value) > 2 * max(half.std, 1e-9):
        print(
            "CONTRADICTION: the measured half-angle and the given depth do not fit one speed; check the depth "
            "(tide, chart datum) and the half-angle before using the speed"
        )


COMMAND = Command(
    "speed",
    "Speed through the water from measured wavelengths and angles (Monte Carlo 95 % interval).",
    add_arguments,
    run,
)
