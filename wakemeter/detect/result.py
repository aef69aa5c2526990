"""What an analysis returns: the frozen :class:`WakeAnalysis` with its JSON form and the way back.

The JSON (documented in ``wakemeter/detect/result.schema.json``, which the session and evidence schemas both
refer to) echoes the request it answers and the software version.  :meth:`WakeAnalysis.from_json` rebuilds
everything but the plot arrays, so a finding read from a session can be revised, drawn and reported; the
arrays come back by running the same request again (the analysis is deterministic).
"""

from __future__ import annotations

import json
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from .. import __version__
from ..errors import ParameterError
from ..physics import inversion as inv
from ..physics.units import KNOT_MPS
from .findings import Caution, CautionCode, Diagnostics, Drawing, IntervalCover, LineKind, LinePlotData, PlotData
from .lines import WakeLine
from .request import AnalysisRequest, RadarGeometry
from .speed_check import SpeedCheck, check_speed

__all__ = ["RadarGeometry", "WakeAnalysis", "SOFTWARE"]

SOFTWARE = f"wakemeter {__version__}"
#: what a limit or current asked for says when the analysis gave no speed to apply it to
NO_SPEED_TO_CHECK = "no speed estimate: the limit and the current cannot be applied to this image"
_REGIME_OF_JSON = {r.value.replace(" ", "-"): r for r in inv.Regime}


@dataclass(frozen=True, kw_only=True)
class WakeAnalysis:
    """Everything the analysis found for one vessel (units in field names)."""

    wake_found: bool
    decision: str
    significance: float
    vessel_px: tuple[float, float]
    vessel_lonlat: tuple[float, float] | None
    heading_deg: float | None
    heading_std_deg: float | None
    speed: inv.CombinedSpeed | None
    methods: tuple[inv.SpeedEstimate, ...]
    half_angle_deg: float | None
    half_angle_std_deg: float | None
    transverse_wavelength_m: float | None
    transverse_wavelength_std_m: float | None
    regime: inv.DepthRegime
    depth_m: float | None
    depth_ci95_m: tuple[float, float] | None
    gravity_mps2: float
    pixel_m: float
    cautions: tuple[Caution, ...]
    drawing: Drawing = field(default_factory=Drawing, compare=False)  #: lines for drawing, scene px
    diagnostics: Diagnostics = field(default_factory=Diagnostics, compare=False)
    lines: tuple[WakeLine, ...] = ()  #: straight wake lines through the vessel
    interval_cover: IntervalCover | None = None  #: shallower water the interval keeps covering
    transverse_note: str = ""  #: why the transverse crest spacing was not read, when the wave path looked for it
    request: AnalysisRequest | None = None  #: what was asked
    revised: bool = False  #: hand measurements were combined in (see detect.revise)
    software: str = SOFTWARE
    plots: PlotData | None = field(default=None, compare=False, repr=False)  #: arrays for plots (not stored)
    line_plots: LinePlotData | None = field(default=None, compare=False, repr=False)  #: a line finding's arrays

    @classmethod
    def without_wake(
        cls,
        decision: str,
        significance: float,
        vessel_px: tuple[float, float],
        vessel_lonlat: tuple[float, float] | None,
        *,
        gravity_mps2: float,
        pixel_m: float,
        cautions: tuple[Caution, ...],
        **more: Any,
    ) -> WakeAnalysis:
        """A result that found no wake: no speed, heading or wave measures; the regime unknown."""
        regime = inv.DepthRegime.unmeasured(inv.Regime.UNKNOWN, "no wake: nothing to judge")
        return cls(
            wake_found=False,
            decision=decision,
            significance=significance,
            vessel_px=vessel_px,
            vessel_lonlat=vessel_lonlat,
            heading_deg=None,
            heading_std_deg=None,
            speed=None,
            methods=(),
            half_angle_deg=None,
            half_angle_std_deg=None,
            transverse_wavelength_m=None,
            transverse_wavelength_std_m=None,
            regime=regime,
            depth_m=None,
            depth_ci95_m=None,
            gravity_mps2=gravity_mps2,
            pixel_m=pixel_m,
            cautions=cautions,
            **more,
        )

    def caution_codes(self) -> tuple[CautionCode, ...]:
        return tuple(c.code for c in self.cautions)

    def has_caution(self, code: CautionCode) -> bool:
        return any(c.code == code for c in self.cautions)

    @property
    def speed_over_ground(self) -> bool:
        """The speed given is over ground: every method combined into it measured the hull against the Earth
        (a mix with methods through the water is taken as through the water, as the waves are)."""
        used = [m for m in self.methods if self.speed is not None and m.method in self.speed.methods]
        return bool(used) and all(m.over_ground for m in used)

    @property
    def speed_basis(self) -> str | None:
        """What the speed is: "over ground" or "through the water" (None without a speed)."""
        if self.speed is None:
            return None
        return "over ground" if self.speed_over_ground else "through the water"

    @property
    def narrow_v_half_angle_deg(self) -> float | None:
        """Mean half-angle of the radar narrow-V arms found (None when none was)."""
        nv = [abs(ln.angle_from_track_deg) for ln in self.lines if ln.kind == LineKind.NARROW_V]
        return float(np.mean(nv)) if nv else None

    def to_json(self) -> dict:
        """Plain data with the documented field names; unknown numbers are None."""
        sp = self.speed
        return {
            "wake_found": self.wake_found,
            "decision": self.decision,
            "significance": _num(self.significance),
            "speed_mps": _num(sp.speed_mps) if sp else None,
            "speed_knots": _num(sp.speed_mps / KNOT_MPS) if sp else None,
            "speed_ci95_mps": [_num(sp.ci95_low_mps), _num(sp.ci95_high_mps)] if sp else None,
            "speed_ci95_knots": ([_num(sp.ci95_low_mps / KNOT_MPS), _num(sp.ci95_high_mps / KNOT_MPS)] if sp else None),
            "speed_basis": self.speed_basis,
            "consistency": sp.verdict if sp else None,
            "combination": None
            if sp is None
            else {
                "std_mps": _num(sp.std_mps),
                "chi2": _num(sp.chi2),
                "dof": sp.dof,
                "p_value": _num(sp.p_value),
                "consistent": sp.consistent,
                "outlier": sp.outlier,
            },
            "heading_deg": _num(self.heading_deg),
            "heading_std_deg": _num(self.heading_std_deg),
            # the side of the vessel the wake lies on (behind it): true bearing from the vessel along the wake
            "wake_bearing_deg": _num((self.heading_deg + 180.0) % 360.0) if self.heading_deg is not None else None,
            "half_angle_deg": _num(self.half_angle_deg),
            "half_angle_std_deg": _num(self.half_angle_std_deg),
            "transverse_wavelength_m": _num(self.transverse_wavelength_m),
            "transverse_wavelength_std_m": _num(self.transverse_wavelength_std_m),
            "regime": self.regime.regime.value.replace(" ", "-"),
            "regime_explanation": self.regime.explanation,
            "depth_froude": _num(self.regime.froude_depth),
            "depth_froude_ci95": _pair_json(self.regime.froude_ci95),
            "depth_m": _num(self.depth_m),
            "depth_ci95_m": _pair_json(self.depth_ci95_m),
            "methods": [
                {
                    "name": m.method,
                    "speed_mps": _num(m.speed_mps),
                    "std_mps": _num(m.std_mps),
                    "speed_ci95_mps": [_num(m.ci95_low_mps), _num(m.ci95_high_mps)],
                    "draws": m.draws,
                    "valid_fraction": _num(m.valid_fraction),
                    "by_hand": m.by_hand,
                    "over_ground": m.over_ground,
                    "assumptions": list(m.assumptions),
                }
                for m in self.methods
            ],
            "vessel_px": [_num(self.vessel_px[0]), _num(self.vessel_px[1])],
            "vessel_lonlat": [_num(v) for v in self.vessel_lonlat] if self.vessel_lonlat else None,
            "gravity_mps2": _num(self.gravity_mps2),
            "pixel_m": _num(self.pixel_m),
            "cautions": [c.to_json() for c in self.cautions],
            "lines": [
                {
                    "kind": str(ln.kind),
                    "angle_from_track_deg": _num(ln.angle_from_track_deg),
                    "significance": _num(ln.significance),
                    "length_px": _num(ln.length_px),
                }
                for ln in self.lines
            ],
            "narrow_v_half_angle_deg": _num(self.narrow_v_half_angle_deg),
            "interval_cover": None if self.interval_cover is None else self.interval_cover.to_json(),
            "transverse_note": self.transverse_note,
            "diagnostics": self.diagnostics.to_json(),
            "drawing": self.drawing.to_json(),
            "revised": self.revised,
            "request": None if self.request is None else self.request.to_json(),
            "software": self.software,
            "speed_check": self.speed_check_json(),
        }

    def speed_check(self) -> SpeedCheck | None:
        """Speed over ground and the limit, when the request gives a current or a limit and there is a speed."""
        req, sp = self.request, self.speed
        if req is None or (req.current is None and req.speed_limit is None) or sp is None:
            return None
        return check_speed(
            sp.speed_mps,
            (sp.ci95_low_mps, sp.ci95_high_mps),
            measured_over_ground=self.speed_over_ground,
            heading_deg=self.heading_deg,
            heading_std_deg=self.heading_std_deg,
            current=req.current,
            limit=req.speed_limit,
            seed=req.seed,
        )

    @property
    def check_asked(self) -> bool:
        """The request gives a speed limit or a water current to apply to the speed."""
        return self.request is not None and (self.request.current is not None or self.request.speed_limit is not None)

    def speed_check_json(self) -> dict | None:
        req = self.request
        if req is None or (req.current is None and req.speed_limit is None):
            return None
        check = self.speed_check()
        if check is None:
            return {
                "statement": NO_SPEED_TO_CHECK,
                "limit": None if req.speed_limit is None else req.speed_limit.to_json(),
                "current": None if req.current is None else req.current.to_json(),
            }
        return check.to_json()

    @classmethod
    def from_json(cls, j: Any, *, drawing: Any = None) -> WakeAnalysis:
        """Rebuild a finding from :meth:`to_json` (the plot arrays are not stored: ``plots`` is None).

        ``drawing`` is the older sessions' separate geometry dict, used when the result has none.
        """
        if not isinstance(j, dict):
            raise ParameterError(f"a stored finding must be a JSON object, got {type(j).__name__}")
        try:
            return _from_json(cls, j, drawing)
        except (KeyError, TypeError, ValueError, IndexError) as err:
            raise ParameterError(f"the stored finding is damaged or incomplete ({type(err).__name__}: {err})") from err


def _from_json(cls: type[WakeAnalysis], j: dict, drawing: Any) -> WakeAnalysis:
    methods = tuple(
        inv.SpeedEstimate(
            method=m["name"],
            speed_mps=_f(m["speed_mps"]),
            std_mps=_f(m["std_mps"]),
            ci95_low_mps=_f(m["speed_ci95_mps"][0]),
            ci95_high_mps=_f(m["speed_ci95_mps"][1]),
            draws=int(m.get("draws") or 0),
            valid_fraction=_f(m.get("valid_fraction", 1.0)),
            assumptions=tuple(m.get("assumptions") or ()),
            by_hand=bool(m.get("by_hand", "(by hand)" in m["name"])),
            # older records: the method's name says it ("hull shift between bands (speed over ground)")
            over_ground=bool(
                m.get("over_ground", "speed over ground" in m["name"] or m["name"] == "radar azimuth offset")
            ),
        )
        for m in j.get("methods") or ()
    )
    speed = None
    if j.get("speed_mps") is not None:
        c = j.get("combination") or {}
        lo, hi = j["speed_ci95_mps"]
        std = c.get("std_mps")
        speed = inv.CombinedSpeed(
            speed_mps=_f(j["speed_mps"]),
            std_mps=_f(std if std is not None else (hi - lo) / 3.92),
            ci95_low_mps=_f(lo),
            ci95_high_mps=_f(hi),
            chi2=_f(c.get("chi2", 0.0)),
            dof=int(c.get("dof", max(len(methods) - 1, 0))),
            p_value=_f(c.get("p_value", 1.0)),
            consistent=bool(c.get("consistent", True)),
            outlier=c.get("outlier"),
            methods=tuple(m.method for m in methods),
            verdict=str(j.get("consistency") or ""),
        )
    regime = inv.DepthRegime(
        regime=_REGIME_OF_JSON[j["regime"]],
        froude_depth=_opt(j.get("depth_froude")),
        froude_ci95=_opt_pair(j.get("depth_froude_ci95")),
        depth_m=_opt(j.get("depth_m")),
        depth_ci95_m=_opt_pair(j.get("depth_ci95_m")),
        explanation=str(j.get("regime_explanation") or ""),
    )
    lines = tuple(
        WakeLine(
            LineKind(ln["kind"]), _f(ln["angle_from_track_deg"]), _f(ln["significance"]), _f(ln.get("length_px") or 0.0)
        )
        for ln in j.get("lines") or ()
        if ln.get("angle_from_track_deg") is not None
    )
    req = j.get("request")
    lonlat = j.get("vessel_lonlat")
    return cls(
        wake_found=bool(j["wake_found"]),
        decision=str(j.get("decision") or ""),
        significance=_f(j.get("significance")),
        vessel_px=(_f(j["vessel_px"][0]), _f(j["vessel_px"][1])),
        vessel_lonlat=None if not lonlat else (_f(lonlat[0]), _f(lonlat[1])),
        heading_deg=_opt(j.get("heading_deg")),
        heading_std_deg=_opt(j.get("heading_std_deg")),
        speed=speed,
        methods=methods,
        half_angle_deg=_opt(j.get("half_angle_deg")),
        half_angle_std_deg=_opt(j.get("half_angle_std_deg")),
        transverse_wavelength_m=_opt(j.get("transverse_wavelength_m")),
        transverse_wavelength_std_m=_opt(j.get("transverse_wavelength_std_m")),
        regime=regime,
        depth_m=_opt(j.get("depth_m")),
        depth_ci95_m=_opt_pair(j.get("depth_ci95_m")),
        gravity_mps2=_f(j["gravity_mps2"]),
        pixel_m=_f(j["pixel_m"]),
        cautions=tuple(Caution.from_json(c) for c in j.get("cautions") or ()),
        drawing=Drawing.from_json(j.get("drawing") or drawing),
        diagnostics=Diagnostics.from_json(j.get("diagnostics")),
        lines=lines,
        interval_cover=IntervalCover.from_json(j.get("interval_cover")),
        transverse_note=str(j.get("transverse_note") or ""),
        request=None if req is None else AnalysisRequest.from_json(req),
        revised=bool(j.get("revised", False)),
        software=str(j.get("software") or "unknown"),
    )


def _f(x: Any) -> float:
    return float("nan") if x is None else float(x)


def _opt(x: Any) -> float | None:
    return None if x is None else float(x)


def _opt_pair(x: Any) -> tuple[float, float] | None:
    return None if not x or x[0] is None or x[1] is None else (float(x[0]), float(x[1]))


def _pair_json(x: tuple[float, float] | None) -> list | None:
    return [_num(x[0]), _num(x[1])] if x else None


def _num(x: float | None) -> float | None:
    return None if x is None or not np.isfinite(x) else float(x)


#: the identifier by which the session and evidence schemas refer to the one result schema
RESULT_SCHEMA_ID = "urn:wakemeter:result"


def result_schema() -> dict:
    """The JSON Schema (draft 2020-12) of :meth:`WakeAnalysis.to_json`: ``detect/result.schema.json``, the one
    description of a result that the session and the evidence schemas both refer to (``$ref``)."""
    from importlib import resources

    return json.loads(resources.files(__package__).joinpath("result.schema.json").read_text())


def schema_registry() -> Any:
    """A ``referencing`` registry that resolves :data:`RESULT_SCHEMA_ID` for a jsonschema validator."""
    from referencing import Registry
    from referencing.jsonschema import DRAFT202012

    return Registry().with_resource(RESULT_SCHEMA_ID, DRAFT202012.create_resource(result_schema()))


#: the columns of one analysed vessel that the batch table and the GIS layer both show (in this order)
RESULT_ROW_FIELDS = (
    "speed_kn",
    "speed_ci95_low_kn",
    "speed_ci95_high_kn",
    "speed_basis",
    "heading_deg",
    "heading_std_deg",
    "regime",
    "depth_m",
    "method",
    "limit_kn",
    "p_over_limit",
    "lower95_kn",
)


def result_row(a: WakeAnalysis | None) -> dict:
    """One vessel's result as a flat row (:data:`RESULT_ROW_FIELDS`; None gives a row of None): the one row the
    batch table and the GIS layer share."""
    if a is None:
        return dict.fromkeys(RESULT_ROW_FIELDS)
    sp = a.speed
    check = a.speed_check()
    judged = None if check is None or check.judged is None else check.judged
    return {
        "speed_kn": None if sp is None else _num(sp.speed_mps / KNOT_MPS),
        "speed_ci95_low_kn": None if sp is None else _num(sp.ci95_low_mps / KNOT_MPS),
        "speed_ci95_high_kn": None if sp is None else _num(sp.ci95_high_mps / KNOT_MPS),
        "speed_basis": a.speed_basis,  # none without a speed: a row with no figure has no basis either
        "heading_deg": _num(a.heading_deg),
        "heading_std_deg": _num(a.heading_std_deg),
        "regime": a.regime.regime.value.replace(" ", "-"),
        "depth_m": _num(a.depth_m),
        "method": " + ".join(m.method for m in a.methods) or None,
        "limit_kn": None if check is None or check.limit is None else check.limit.limit_mps / KNOT_MPS,
        "p_over_limit": None if judged is None else judged.probability_over,
        # one-sided 95 % lower bound of the speed on the limit's basis (over ground or through the water)
        "lower95_kn": None if judged is None else judged.lower95_mps / KNOT_MPS,
    }
