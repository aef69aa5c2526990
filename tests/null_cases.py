"""Wake-free scenes for calibrating and testing the wake / no-wake decision.

Synthetic (noise-only radar, swell-only optical from wakemeter's renderer) and natural
textures from scikit-image's data module (brick, grass, gravel, ...), which are not wakes.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import rasterio
from affine import Affine

from wakemeter.synth import AmbientSea, OpticalModel, RadarModel, SceneSpec, render, write

TEXTURES = ("brick", "grass", "gravel", "camera", "moon", "text", "coins", "page", "horse", "cell", "clock",
            "retina", "hubble_deep_field", "microaneurysms", "astronaut", "coffee", "rocket", "chelsea")


def synthetic_null(seed: int, folder: Path, size: int = 640) -> Path:
    rng = np.random.default_rng(50_000 + seed)
    p = float(np.exp(rng.uniform(np.log(0.5), np.log(10.0))))
    lon, lat = float(rng.uniform(-170, 170)), float(rng.uniform(-55, 55))
    radar = seed % 2 == 0
    imaging = RadarModel(looks=int(rng.integers(1, 7))) if radar else OpticalModel(
        sun_azimuth_deg=float(rng.uniform(0, 360)), noise_std=float(rng.uniform(0.01, 0.05)))
    sea = None
    if not radar or rng.random() < 0.7:
        sea = AmbientSea(peak_wavelength_m=float(p * rng.uniform(8, 60)), direction_deg=float(rng.uniform(0, 360)),
                         spreading_s=float(rng.uniform(2, 20)), strength=1.0)
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
    with rasterio.open(path, "w", driver="GTiff", width=size, height=size, count=1, dtype="uint8",
                       crs="EPSG:32631", transform=Affine(pixel_m, 0, 500_000, 0, -pixel_m, 6_000_000)) as dst:
        dst.write(img[None])
    return path
