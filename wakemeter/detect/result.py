"""What an analysis returns: the radar geometry it may use and the frozen result with its JSON form."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..physics import inversion as inv
from ..physics.units import KNOT_MPS


@dataclass(frozen=True)
class RadarGeometry:
    """Radar acquisition geometry for the azimuth-offset method (Raney 1971)."""

    slant_range_m: float
    platform_speed_mps: float
    look_bearing_deg: float  #: true bearing from the radar toward the scene
    incidence_deg: float
    slant_range_std_m: float = 1000.0
    platform_speed_std_mps: float = 10.0

    @property
    def flight_bearing_deg(self) -> float:
        return (self.look_bearing_deg - 90.0) % 360.0


@dataclass(frozen=True)
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
    cautions: tuple[str, ...]
    geometry: dict = field(default_factory=dict, compare=False, repr=False)  #: lines for drawing, scene px
    plots: dict = field(default_factory=dict, compare=False, repr=False)  #: arrays for plots
    lines: tuple = ()  #: lines.WakeLine found through the vessel (Kelvin arms, radar narrow V)

    def to_json(self) -> dict:
        """Plain data with the documented field names; unknown numbers are None."""
        sp = self.speed
        return {
            "wake_found": self.wake_found, "decision": self.decision, "significance": _num(self.significance),
            "speed_mps": _num(sp.speed_mps) if sp else None,
            "speed_knots": _num(sp.speed_mps / KNOT_MPS) if sp else None,
            "speed_ci95_mps": [_num(sp.ci95_low_mps), _num(sp.ci95_high_mps)] if sp else None,
            "speed_ci95_knots": ([_num(sp.ci95_low_mps / KNOT_MPS), _num(sp.ci95_high_mps / KNOT_MPS)]
                                 if sp else None),
            "consistency": sp.verdict if sp else None,
            "heading_deg": _num(self.heading_deg), "heading_std_deg": _num(self.heading_std_deg),
            # the side of the vessel the wake lies on (behind it): true bearing from the vessel along the wake
            "wake_bearing_deg": _num((self.heading_deg + 180.0) % 360.0) if self.heading_deg is not None else None,
            "half_angle_deg": _num(self.half_angle_deg), "half_angle_std_deg": _num(self.half_angle_std_deg),
            "transverse_wavelength_m": _num(self.transverse_wavelength_m),
            "regime": self.regime.regime.replace(" ", "-"), "regime_explanation": self.regime.explanation,
            "depth_froude": _num(self.regime.froude_depth),
            "depth_m": _num(self.depth_m),
            "depth_ci95_m": [_num(self.depth_ci95_m[0]), _num(self.depth_ci95_m[1])] if self.depth_ci95_m else None,
            "methods": [{"name": m.method, "speed_mps": _num(m.speed_mps), "std_mps": _num(m.std_mps),
                         "speed_ci95_mps": [_num(m.ci95_low_mps), _num(m.ci95_high_mps)],
                         "assumptions": list(m.assumptions)} for m in self.methods],
            "vessel_px": [_num(self.vessel_px[0]), _num(self.vessel_px[1])],
            "vessel_lonlat": [_num(v) for v in self.vessel_lonlat] if self.vessel_lonlat else None,
            "gravity_mps2": _num(self.gravity_mps2), "pixel_m": _num(self.pixel_m),
            "cautions": list(self.cautions),
            "lines": [{"kind": ln.kind, "angle_from_track_deg": _num(ln.angle_from_track_deg),
                       "significance": _num(ln.significance)} for ln in self.lines],
            "narrow_v_half_angle_deg": _num(self.narrow_v_half_angle_deg),
        }

    @property
    def narrow_v_half_angle_deg(self) -> float | None:
        """Mean half-angle of the radar narrow-V arms found (None when none was)."""
        nv = [abs(ln.angle_from_track_deg) for ln in self.lines if ln.kind == "narrow-V arm"]
        return float(np.mean(nv)) if nv else None


def _num(x: float | None) -> float | None:
    return None if x is None or not np.isfinite(x) else float(x)
