"""What the analyst asks for: one frozen :class:`AnalysisRequest` used by the CLI, the program, sessions
and reports alike, with a JSON round trip (schema ``wakemeter.request/1``).

Everything the analysis may be told about a vessel lives here and only here, so an input given
on the command line, typed in the program or stored in a session reaches :func:`analyze` the same
way.  Values are checked when the request is built; messages use the user's words (longitude and
latitude, slant range), not argument names.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import TYPE_CHECKING, Any

import numpy as np

from ..errors import ParameterError
from ..physics.inversion import Uncertain

if TYPE_CHECKING:
    from ..scene.sar_geometry import PixelGeometry

REQUEST_SCHEMA = "wakemeter.request/1"
#: the deepest ocean trench is about 11 km (Challenger Deep, from memory); a larger depth is a typing error
MAX_DEPTH_M = 12_000.0
Point = tuple[float, float]


def _finite(x: Any, what: str) -> float:
    try:
        v = float(x)
    except (TypeError, ValueError) as err:
        raise ParameterError(f"{what} must be a number, got {x!r}") from err
    if not math.isfinite(v):
        raise ParameterError(f"{what} must be a finite number, got {x!r}")
    return v


def _pair(x: Any, what: str) -> Point:
    if not isinstance(x, (list, tuple)) or len(x) != 2:
        raise ParameterError(f"{what} must be two numbers, got {x!r}")
    return _finite(x[0], what), _finite(x[1], what)


#: how a radar geometry read from the scene's own product begins its ``source`` (typed figures say otherwise)
PRODUCT_GEOMETRY_SOURCE = "read from the product"


@dataclass(frozen=True)
class RadarGeometry:
    """Radar acquisition geometry for the azimuth-offset method (Raney 1971)."""

    slant_range_m: float
    platform_speed_mps: float
    look_bearing_deg: float  #: true bearing from the radar toward the scene
    incidence_deg: float
    slant_range_std_m: float = 1000.0
    platform_speed_std_mps: float = 10.0
    #: where the figures come from (typed by the user, or a product's annotation)
    source: str = field(default="as given by the user", kw_only=True)

    def __post_init__(self) -> None:
        checks = (
            ("slant range", self.slant_range_m, "m", lambda v: v > 0, "> 0"),
            ("platform speed", self.platform_speed_mps, "m/s", lambda v: v > 0, "> 0"),
            ("look bearing", self.look_bearing_deg, "deg", lambda v: 0 <= v <= 360, "within 0-360"),
            ("incidence angle", self.incidence_deg, "deg", lambda v: 0 < v < 90, "between 0 and 90"),
            ("slant range uncertainty", self.slant_range_std_m, "m", lambda v: v >= 0, ">= 0"),
            ("platform speed uncertainty", self.platform_speed_std_mps, "m/s", lambda v: v >= 0, ">= 0"),
        )
        for name, value, unit, ok, allowed in checks:
            v = _finite(value, f"radar geometry: the {name}")
            if not ok(v):
                raise ParameterError(f"radar geometry: the {name} must be {allowed} {unit}, got {value!r}")

    @property
    def flight_bearing_deg(self) -> float:
        return (self.look_bearing_deg - 90.0) % 360.0

    def to_json(self) -> dict:
        return {
            "slant_range_m": self.slant_range_m,
            "platform_speed_mps": self.platform_speed_mps,
            "look_bearing_deg": self.look_bearing_deg,
            "incidence_deg": self.incidence_deg,
            "slant_range_std_m": self.slant_range_std_m,
            "platform_speed_std_mps": self.platform_speed_std_mps,
            "source": self.source,
        }

    @classmethod
    def from_product(cls, g: PixelGeometry) -> RadarGeometry:
        """The geometry a radar product states at one pixel (:meth:`~wakemeter.scene.sar_geometry.GrdGeometry.at`),
        with its uncertainties and its source."""
        return cls(
            g.slant_range_m,
            g.platform_speed_mps,
            g.look_bearing_deg,
            g.incidence_deg,
            slant_range_std_m=g.slant_range_std_m,
            platform_speed_std_mps=g.platform_speed_std_mps,
            source=f"{PRODUCT_GEOMETRY_SOURCE}: {g.source} at the vessel's pixel (line time {g.azimuth_time})",
        )

    @classmethod
    def from_json(cls, data: Any) -> RadarGeometry:
        """From its JSON object, or the older form of four numbers (range, speed, look bearing, incidence)."""
        if isinstance(data, (list, tuple)):
            if len(data) != 4:
                raise ParameterError(
                    "radar geometry needs four numbers: slant range m, platform speed m/s, "
                    f"look bearing deg, incidence deg; got {data!r}"
                )
            r, v, look, inc = (_finite(x, "radar geometry") for x in data)
            return cls(r, v, look, inc)
        if not isinstance(data, dict):
            raise ParameterError(f"radar geometry must be an object or four numbers, got {data!r}")
        names = ("slant_range_m", "platform_speed_mps", "look_bearing_deg", "incidence_deg")
        missing = [n for n in names if n not in data]
        if missing:
            raise ParameterError(f"radar geometry lacks {', '.join(missing)}")
        extra = {k: data[k] for k in ("slant_range_std_m", "platform_speed_std_mps") if k in data}
        if isinstance(data.get("source"), str):
            extra["source"] = data["source"]
        return cls(*(data[n] for n in names), **extra)


#: faster than any vessel or current at sea (knots are converted where given); a larger value is a typing error
MAX_SPEED_MPS = 60.0


@dataclass(frozen=True)
class WaterCurrent:
    """The water's own motion at the vessel: speed (m/s) and the true bearing it sets toward, each with its
    standard uncertainty, and where the figure comes from (a tide table, a model, a buoy)."""

    speed_mps: float
    toward_deg: float
    speed_std_mps: float = 0.0
    toward_std_deg: float = 0.0
    source: str = ""

    def __post_init__(self) -> None:
        for name, value, ok, allowed in (
            ("current speed", self.speed_mps, lambda v: 0 <= v <= MAX_SPEED_MPS, f"within 0-{MAX_SPEED_MPS:g} m/s"),
            ("current direction", self.toward_deg, lambda v: 0 <= v <= 360, "within 0-360°"),
            ("current speed uncertainty", self.speed_std_mps, lambda v: 0 <= v <= MAX_SPEED_MPS, ">= 0 m/s"),
            ("current direction uncertainty", self.toward_std_deg, lambda v: 0 <= v <= 180, "within 0-180°"),
        ):
            if not ok(_finite(value, f"the {name}")):
                raise ParameterError(f"the {name} must be {allowed}, got {value!r}")
        if not isinstance(self.source, str) or len(self.source) > 500:
            raise ParameterError("the current's source must be a text of at most 500 characters")

    def to_json(self) -> dict:
        return {
            "speed_mps": self.speed_mps,
            "toward_deg": self.toward_deg,
            "speed_std_mps": self.speed_std_mps,
            "toward_std_deg": self.toward_std_deg,
            "source": self.source,
        }

    @classmethod
    def from_json(cls, data: Any) -> WaterCurrent:
        if not isinstance(data, dict) or "speed_mps" not in data or "toward_deg" not in data:
            raise ParameterError(f"a water current needs speed_mps and toward_deg, got {data!r}")
        return cls(
            data["speed_mps"],
            data["toward_deg"],
            data.get("speed_std_mps", 0.0),
            data.get("toward_std_deg", 0.0),
            str(data.get("source") or ""),
        )


@dataclass(frozen=True)
class SpeedLimit:
    """A speed limit (m/s) and what it applies to: over ground (the usual case) or through the water."""

    limit_mps: float
    over_ground: bool = True

    def __post_init__(self) -> None:
        v = _finite(self.limit_mps, "the speed limit")
        if not 0 < v <= MAX_SPEED_MPS:
            raise ParameterError(f"the speed limit must be > 0 and at most {MAX_SPEED_MPS:g} m/s, got {v:g} m/s")
        if not isinstance(self.over_ground, bool):
            raise ParameterError(f"'over_ground' must be true or false, got {self.over_ground!r}")

    def to_json(self) -> dict:
        return {"limit_mps": self.limit_mps, "over_ground": self.over_ground}

    @classmethod
    def from_json(cls, data: Any) -> SpeedLimit:
        if not isinstance(data, dict) or "limit_mps" not in data:
            raise ParameterError(f"a speed limit needs limit_mps, got {data!r}")
        return cls(data["limit_mps"], data.get("over_ground", True))


@dataclass(frozen=True)
class AnalysisRequest:
    """One vessel to analyse and everything known about it.

    Parameters
    ----------
    vessel_px, vessel_lonlat : (col, row) or (lon, lat)
        Where the vessel is, in scene pixels or WGS 84 degrees (exactly one).
    depth : Uncertain, optional
        Known water depth in metres with its standard uncertainty; None: not known (the waves decide).
    hull_length_m : float, optional
        Hull length for the fast-hull check (Rabaud & Moisy 2013).
    radar_geometry : RadarGeometry, optional
        Enables the radar azimuth-offset method.
    radar : bool, optional
        Force radar (True) or optical (False) treatment; None: decided from the data.
    pixel_rel_std : float
        Relative standard uncertainty of the pixel size.
    seed : int
        Seed of the Monte Carlo draws (results are reproducible).
    force : bool
        Give the waves' speed even when neither a hull nor a wake line marks a vessel at the point (the
        result then says so); by default such waves are credited to no vessel.
    current : WaterCurrent, optional
        The water current at the vessel: the result then also gives the speed over ground.
    speed_limit : SpeedLimit, optional
        A limit to judge the speed against (probability of exceeding it, one-sided lower bound).
    """

    vessel_px: Point | None = None
    vessel_lonlat: Point | None = None
    depth: Uncertain | None = None
    hull_length_m: float | None = None
    radar_geometry: RadarGeometry | None = None
    radar: bool | None = None
    pixel_rel_std: float = 0.005
    seed: int = 0
    force: bool = False  #: analyse the waves here even when no vessel is seen at the point (said in the result)
    current: WaterCurrent | None = None
    speed_limit: SpeedLimit | None = None

    def __post_init__(self) -> None:
        if (self.vessel_px is None) == (self.vessel_lonlat is None):
            raise ParameterError(
                "give the vessel's position once: either in scene pixels (column, row) or as longitude and latitude"
            )
        if self.vessel_px is not None:
            object.__setattr__(self, "vessel_px", _pair(self.vessel_px, "the vessel's pixel position"))
        if self.vessel_lonlat is not None:
            lon, lat = _pair(self.vessel_lonlat, "the vessel's longitude and latitude")
            if not (-180 <= lon <= 360 and -90 <= lat <= 90):
                raise ParameterError(
                    f"the vessel's longitude {lon} and latitude {lat} are not on Earth "
                    "(longitude -180 to 360, latitude -90 to 90)"
                )
            object.__setattr__(self, "vessel_lonlat", (lon, lat))
        if self.depth is not None and not 0 < self.depth.value <= MAX_DEPTH_M:
            raise ParameterError(
                f"the water depth must be > 0 m and at most {MAX_DEPTH_M:.0f} m (deeper than any "
                f"ocean), got {self.depth.value:g} m"
            )
        if self.hull_length_m is not None and not _finite(self.hull_length_m, "the hull length") > 0:
            raise ParameterError(f"the hull length must be > 0 m, got {self.hull_length_m!r}")
        rel = _finite(self.pixel_rel_std, "the pixel size uncertainty")
        if not 0 <= rel < 0.5:
            raise ParameterError(f"the pixel size uncertainty must be within 0-50 %, got {100 * rel:.1f} %")
        if not isinstance(self.force, bool):
            raise ParameterError(f"'force' must be true or false, got {self.force!r}")
        if isinstance(self.seed, bool) or not isinstance(self.seed, int) or self.seed < 0:
            raise ParameterError(f"the random seed must be a whole number >= 0, got {self.seed!r}")

    @property
    def depth_m(self) -> float | None:
        return None if self.depth is None else self.depth.value

    def at_pixel(self, px: Point) -> AnalysisRequest:
        """The same request for a vessel at another pixel position."""
        return replace(self, vessel_px=px, vessel_lonlat=None)

    def to_json(self) -> dict:
        return {
            "schema": REQUEST_SCHEMA,
            "vessel_px": list(self.vessel_px) if self.vessel_px else None,
            "vessel_lonlat": list(self.vessel_lonlat) if self.vessel_lonlat else None,
            "depth": None if self.depth is None else {"value_m": self.depth.value, "std_m": self.depth.std},
            "hull_length_m": self.hull_length_m,
            "radar_geometry": None if self.radar_geometry is None else self.radar_geometry.to_json(),
            "radar": self.radar,
            "pixel_rel_std": self.pixel_rel_std,
            "seed": self.seed,
            "force": self.force,
            "current": None if self.current is None else self.current.to_json(),
            "speed_limit": None if self.speed_limit is None else self.speed_limit.to_json(),
        }

    @classmethod
    def from_json(cls, data: Any) -> AnalysisRequest:
        """Read a request written by :meth:`to_json`; a clear :class:`ParameterError` otherwise."""
        if not isinstance(data, dict):
            raise ParameterError(f"an analysis request must be a JSON object, got {type(data).__name__}")
        if data.get("schema", REQUEST_SCHEMA) != REQUEST_SCHEMA:
            raise ParameterError(
                f"analysis request of an unknown version {data.get('schema')!r}; this version reads {REQUEST_SCHEMA}"
            )
        d = data.get("depth")
        if d is not None and not isinstance(d, dict):
            raise ParameterError(f"the depth must be an object with value_m and std_m, got {d!r}")
        radar = data.get("radar")
        if radar is not None and not isinstance(radar, bool):
            raise ParameterError(f"'radar' must be true, false or null, got {radar!r}")
        seed = data.get("seed", 0)
        if isinstance(seed, float) and seed.is_integer():
            seed = int(seed)
        return cls(
            vessel_px=_pair(data["vessel_px"], "the vessel's pixel position") if data.get("vessel_px") else None,
            vessel_lonlat=(
                _pair(data["vessel_lonlat"], "the vessel's longitude and latitude")
                if data.get("vessel_lonlat")
                else None
            ),
            depth=None
            if d is None
            else Uncertain(
                _finite(d.get("value_m"), "the water depth"), _finite(d.get("std_m", 0.0), "the depth uncertainty")
            ),
            hull_length_m=(
                None if data.get("hull_length_m") is None else _finite(data["hull_length_m"], "the hull length")
            ),
            radar_geometry=(
                None if data.get("radar_geometry") is None else RadarGeometry.from_json(data["radar_geometry"])
            ),
            radar=radar,
            pixel_rel_std=_finite(data.get("pixel_rel_std", 0.005), "the pixel size uncertainty"),
            seed=seed,
            force=data.get("force", False),
            current=None if data.get("current") is None else WaterCurrent.from_json(data["current"]),
            speed_limit=None if data.get("speed_limit") is None else SpeedLimit.from_json(data["speed_limit"]),
        )

    @classmethod
    def from_inputs(cls, position_px: Point, inputs: dict | None) -> AnalysisRequest:
        """From the per-vessel inputs of an older session (``depth_m``, ``depth_std_m``, ``hull_length_m``,
        ``radar_geometry`` as four numbers) or of this version (a request object)."""
        inputs = dict(inputs or {})
        if inputs.get("schema") == REQUEST_SCHEMA:
            return cls.from_json(inputs).at_pixel(position_px)
        depth = inputs.get("depth_m")
        return cls(
            vessel_px=position_px,
            depth=None
            if depth is None
            else Uncertain(
                _finite(depth, "the water depth"), _finite(inputs.get("depth_std_m") or 0.0, "the depth uncertainty")
            ),
            hull_length_m=inputs.get("hull_length_m") or None,
            radar_geometry=(
                None if not inputs.get("radar_geometry") else RadarGeometry.from_json(inputs["radar_geometry"])
            ),
        )


def pixel_rel_std(request: AnalysisRequest, frame: Any) -> float:
    """The pixel size's relative standard uncertainty an analysis uses: the request's, and a calibration's
    (a photo's own metadata) added in quadrature."""
    return float(np.hypot(request.pixel_rel_std, getattr(frame, "scale_rel_std", 0.0)))
