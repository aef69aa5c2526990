"""Scenes of known truth for the tests and the sweeps: random wakes (:func:`make_case`) and wake-free
scenes (:func:`synthetic_null`, :func:`texture_null`).

Synthetic data from wakemeter's own renderer, plus natural textures from scikit-image's data module
(brick, grass, gravel, ...), which are not wakes.  Seeds 0-59 of :func:`make_case` are the calibration
set of :class:`wakemeter.detect.tuning.Tuning`; tests use other seeds (300 and up).  Detectors never
import this module (``tests/test_architecture.py``).
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from pathlib import Path

import numpy as np
import rasterio
from affine import Affine

from . import AmbientSea, Hull, OpticalModel, RadarModel, SceneSpec, VesselSpec, render, write
from .demo import vessel_scene

#: gravity the random cases are drawn with (the renderer takes the WGS 84 value at the latitude)
G = 9.81


@dataclass(frozen=True)
class Case:
    seed: int
    spec: SceneSpec
    speed_mps: float
    heading_deg: float
    depth_m: float | None


def make_case(seed: int, *, radar: bool | None = None, depth_froude: float | None = None, size: int = 640) -> Case:
    rng = np.random.default_rng(10_000 + seed)
    while True:
        u = float(rng.uniform(2.0, 15.0))
        p = float(np.exp(rng.uniform(np.log(0.5), np.log(10.0))))
        lam = 2 * np.pi * u * u / G
        if 7.0 <= lam / p <= 45.0:
            break
    heading = float(rng.uniform(0, 360))
    fr_l = float(rng.uniform(0.25, 0.45))
    length = u * u / (G * fr_l * fr_l)
    lat = float(rng.uniform(-55, 55))
    lon = float(rng.uniform(-170, 170))
    radar = bool(rng.random() < 0.5) if radar is None else radar
    imaging: RadarModel | OpticalModel
    if radar:
        imaging = RadarModel(
            look_bearing_deg=float(rng.uniform(0, 360)),
            incidence_deg=float(rng.uniform(25, 45)),
            looks=int(rng.integers(3, 7)),
            hull_displacement=False,
        )
    else:
        imaging = OpticalModel(sun_azimuth_deg=float(rng.uniform(0, 360)), noise_std=float(rng.uniform(0.01, 0.04)))
    sea = None
    if rng.random() < 0.5:
        sea = AmbientSea(
            peak_wavelength_m=float(lam * rng.uniform(1.5, 3.0)),
            direction_deg=float(rng.uniform(0, 360)),
            spreading_s=6.0,
            strength=float(rng.uniform(0.2, 0.6)),
        )
    depth = np.inf if depth_froude is None else u * u / (G * depth_froude**2)
    vessel = VesselSpec("Case", lon, lat, u, heading, Hull(length, length / 5))
    spec = vessel_scene("case", vessel, size, p, imaging=imaging, sea=sea, depth_m=depth, seed=seed)
    return Case(seed, spec, u, heading, None if np.isinf(depth) else depth)


def realistic_radar(model: RadarModel, rng: np.random.Generator, *, wake: bool = True) -> RadarModel:
    """The same radar with what real scenes add: K-distributed clutter (gamma texture of order 1.5-8, common
    practice, no source for the range), a hull 30-50 dB above the sea with a sidelobe cross at -25 to -15 dB,
    a turbulent wake 0.6-2 times the usual width and, in half the scenes, a bright narrow V at 2-4 degrees
    (the values are our choice, common practice, no source).  ``wake=False``: no wake darkening and no V."""
    v = bool(rng.random() < 0.5) and wake
    return replace(
        model,
        clutter_shape=float(np.exp(rng.uniform(np.log(1.5), np.log(8.0)))),
        clutter_corr_px=float(rng.uniform(1.0, 3.0)),
        hull_brightness=float(10 ** rng.uniform(3.0, 5.0)),
        sidelobe_level=float(10 ** rng.uniform(-2.5, -1.5)),
        wake_width_factor=float(rng.uniform(0.6, 2.0)),
        wake_darkening=model.wake_darkening if wake else 0.0,
        narrow_v_half_angle_deg=float(rng.uniform(2.0, 4.0)) if v else 0.0,
        narrow_v_brightness=float(rng.uniform(0.8, 2.0)) if v else 1.0,
    )


def write_case(case: Case, folder) -> tuple:
    return write(render(case.spec), folder / f"case_{case.seed}.tif")


TEXTURES = (
    "brick",
    "grass",
    "gravel",
    "camera",
    "moon",
    "text",
    "coins",
    "page",
    "horse",
    "cell",
    "clock",
    "retina",
    "hubble_deep_field",
    "microaneurysms",
    "astronaut",
    "coffee",
    "rocket",
    "chelsea",
)


def synthetic_null(seed: int, folder: Path, size: int = 640) -> Path:
    rng = np.random.default_rng(50_000 + seed)
    p = float(np.exp(rng.uniform(np.log(0.5), np.log(10.0))))
    lon, lat = float(rng.uniform(-170, 170)), float(rng.uniform(-55, 55))
    radar = seed % 2 == 0
    imaging = (
        RadarModel(looks=int(rng.integers(1, 7)))
        if radar
        else OpticalModel(sun_azimuth_deg=float(rng.uniform(0, 360)), noise_std=float(rng.uniform(0.01, 0.05)))
    )
    sea = None
    if not radar or rng.random() < 0.7:
        sea = AmbientSea(
            peak_wavelength_m=float(p * rng.uniform(8, 60)),
            direction_deg=float(rng.uniform(0, 360)),
            spreading_s=float(rng.uniform(2, 20)),
            strength=1.0,
        )
    spec = SceneSpec(size, size, p, lon, lat, (), imaging, sea=sea, seed=seed)
    tif, _ = write(render(spec), folder / f"null_{seed}.tif")
    return tif


def texture_null(name: str, folder: Path, pixel_m: float = 2.0, size: int = 640) -> Path:
    from skimage import data
    from skimage.color import rgb2gray
    from skimage.transform import resize

    img = getattr(data, name)()
    if img.ndim == 3:
        img = rgb2gray(img[..., :3])
    img = resize(img.astype(float), (size, size), anti_aliasing=True)
    img = (255 * (img - img.min()) / (np.ptp(img) or 1)).astype(np.uint8)
    path = folder / f"texture_{name}.tif"
    with rasterio.open(
        path,
        "w",
        driver="GTiff",
        width=size,
        height=size,
        count=1,
        dtype="uint8",
        crs="EPSG:32631",
        transform=Affine(pixel_m, 0, 500_000, 0, -pixel_m, 6_000_000),
    ) as dst:
        dst.write(img[None])
    return path
