"""Linear-theory wake renderer for tests and demo scenes (never imported by ``detect``). No Qt."""

from .imaging import AmbientSea, OpticalModel, RadarModel
from .scene_maker import RenderedScene, SceneSpec, VesselSpec, build_georef, render, write
from .wavefield import Hull, kelvin_elevation

__all__ = [
    "AmbientSea",
    "OpticalModel",
    "RadarModel",
    "RenderedScene",
    "SceneSpec",
    "VesselSpec",
    "Hull",
    "build_georef",
    "render",
    "write",
    "kelvin_elevation",
]
