"""The enforcement question on a result: speed over ground with a given current, and a speed limit judged
with the result's uncertainty ("at least 11.2 kn with 95 % confidence; exceeds the 10 kn limit with
probability 0.99").  The arithmetic is :mod:`wakemeter.physics.over_ground`; this module says it in words.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..physics import over_ground as og
from ..physics.units import KNOT_MPS
from .request import SpeedLimit, WaterCurrent

DRAWS = 20_000


@dataclass(frozen=True)
class SpeedCheck:
    measured_over_ground: bool  #: the analysis measured speed over ground (hull shift) rather than through water
    through_water: og.Exceedance | None
    over_ground: og.Exceedance | None
    limit: SpeedLimit | None
    judged: og.Exceedance | None  #: on the limit's basis
    current: WaterCurrent | None
    assumptions: tuple[str, ...]
    statement: str

    def to_json(self) -> dict:
        def ex(e: og.Exceedance | None) -> dict | None:
            if e is None:
                return None
            return {
                "median_mps": e.median_mps,
                "ci95_mps": list(e.ci95_mps),
                "lower95_mps": e.lower95_mps,
                "median_knots": e.median_mps / KNOT_MPS,
                "ci95_knots": [e.ci95_mps[0] / KNOT_MPS, e.ci95_mps[1] / KNOT_MPS],
                "lower95_knots": e.lower95_mps / KNOT_MPS,
            }

        return {
            "measured": "over ground" if self.measured_over_ground else "through the water",
            "through_water": ex(self.through_water),
            "over_ground": ex(self.over_ground),
            "limit": None
            if self.limit is None
            else {**self.limit.to_json(), "limit_knots": self.limit.limit_mps / KNOT_MPS},
            "probability_over_limit": None if self.judged is None else self.judged.probability_over,
            "lower95_on_limit_basis_mps": None if self.judged is None else self.judged.lower95_mps,
            "current": None if self.current is None else self.current.to_json(),
            "assumptions": list(self.assumptions),
            "statement": self.statement,
            "draws": DRAWS,
        }


def probability_text(p: float) -> str:
    """A probability from draws, never shown as a certainty the draws cannot give."""
    floor = 1.0 / DRAWS
    if p >= 1 - floor:
        return f"more than {1 - 10 * floor:.4f}"
    if p <= floor:
        return f"less than {10 * floor:.4f}"
    return f"{p:.2f}" if 0.01 <= p <= 0.99 else f"{p:.3f}"


def check_speed(
    speed_mps: float,
    ci95_mps: tuple[float, float],
    *,
    measured_over_ground: bool,
    heading_deg: float | None,
    heading_std_deg: float | None,
    current: WaterCurrent | None,
    limit: SpeedLimit | None,
    seed: int = 0,
) -> SpeedCheck:
    rng = np.random.default_rng([seed, 7919])
    u = np.maximum(og.split_normal_draws(speed_mps, ci95_mps[0], ci95_mps[1], DRAWS, rng), 0.0)
    measured = "over ground" if measured_over_ground else "through the water"
    assumptions = [
        f"the measured speed ({measured}) drawn from two half normals that keep its 95 % interval and its "
        "value as the median",
    ]
    water = ground = None
    if current is not None and heading_deg is not None:
        h = rng.normal(heading_deg, heading_std_deg or 0.0, DRAWS)
        cs = np.maximum(rng.normal(current.speed_mps, current.speed_std_mps, DRAWS), 0.0)
        cd = rng.normal(current.toward_deg, current.toward_std_deg, DRAWS)
        other = og.add_current(u, h, cs, cd, -1.0 if measured_over_ground else 1.0)
        water_d, ground_d = (other, u) if measured_over_ground else (u, other)
        assumptions.append(
            f"current {current.speed_mps / KNOT_MPS:.1f} ± {current.speed_std_mps / KNOT_MPS:.1f} kn setting toward "
            f"{current.toward_deg:.0f} ± {current.toward_std_deg:.0f}°"
            + (f" ({current.source})" if current.source else " (source not given)")
            + "; the vessel's course through the water taken as its heading"
        )
    else:
        water_d = ground_d = u
        if current is not None:
            assumptions.append("the current was not applied: the result has no heading")
        else:
            assumptions.append(
                "no current given: speed over ground taken equal to speed through the water (a current adds "
                "to or takes from it)"
            )
    limit_value = np.inf if limit is None else limit.limit_mps
    water = og.exceedance(water_d, limit_value)
    ground = og.exceedance(ground_d, limit_value)
    judged = None
    if limit is None:
        basis = ground if measured_over_ground or current is not None else water
        statement = (
            f"speed {'over ground' if basis is ground else 'through the water'} at least "
            f"{basis.lower95_mps / KNOT_MPS:.1f} kn with 95 % confidence (no limit given)"
        )
    else:
        judged = ground if limit.over_ground else water
        where = "over ground" if limit.over_ground else "through the water"
        p = judged.probability_over
        verb = "exceeds" if p >= 0.5 else "is below"
        statement = (
            f"speed {where} at least {judged.lower95_mps / KNOT_MPS:.1f} kn with 95 % confidence; "
            f"{verb} the {limit.limit_mps / KNOT_MPS:.1f} kn limit ({where}): probability of exceeding it "
            f"{probability_text(p)}"
        )
    return SpeedCheck(
        measured_over_ground,
        water,
        ground,
        limit,
        judged,
        current,
        tuple(assumptions),
        statement,
    )
