"""A vessel's dark calm wake across sun glint, among wind slicks: the failure class of real 10 m scenes where a
person sees a dark line 1-2 km long behind a vessel and the analysis does not.

In sun glint the rough sea is bright; where the small waves are damped it is darker: behind a vessel (its
turbulent wake smooths the surface for kilometres) and along wind slicks (surface films drawn into long lines
by the wind and currents; they start and end nowhere near a vessel).  The scene holds:

* bright glint over the whole sea (``glint``, the same in every band: glint is the sun's own colour), textured
  over a couple of pixels with a spread of ``texture_share`` of it;
* a small hull (grey, ``hull_contrast`` in every band) with a short bright foam tail (``foam_tail_m``; foam's
  near-infrared share 0.65, as for :func:`.hull_scenes.white_hull_scene`);
* the calm wake: from the stern back along the track for ``calm_wake_m``, ``calm_width_m`` wide and widening
  slowly, the glint lowered by ``calm_depth`` (a share of it; by default one texture spread, faint as on the
  real crops, where the calm line is 0.2-0.3 of the scene's spread darker than the glint beside it);
* ``slicks`` wind slicks as dark as the wake, 1-3 km long and 20-60 m wide, at random places and angles,
  none passing within ``slick_clearance_m`` of the hull.

Pixel values are invented, of the order of a Level-2A product's (4 bands named B02 B03 B04 B08).  Truth: the
heading (true bearing of the bow).
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import numpy as np
from scipy import ndimage

from .hull_scenes import FOAM_NIR_SHARE, WATER, HullScene, hull_frame, write_bands


def _segment_distance(px: np.ndarray, py: np.ndarray, a: tuple[float, float], b: tuple[float, float]) -> np.ndarray:
    """Distance of the points (px, py) from the segment a-b (same units)."""
    ax, ay = a
    dx, dy = b[0] - ax, b[1] - ay
    t = np.clip(((px - ax) * dx + (py - ay) * dy) / max(dx * dx + dy * dy, 1e-12), 0.0, 1.0)
    return np.hypot(px - (ax + t * dx), py - (ay + t * dy))


@dataclass(frozen=True)
class GlintScene(HullScene):
    #: each slick's ends, scene (col, row) in GDAL's continuous pixel coordinates
    slicks: tuple[tuple[tuple[float, float], tuple[float, float]], ...] = ()


def _slicks(n: int, pixel_m: float, count: int, clearance_m: float, rng: np.random.Generator):
    """Cover (0..1) of ``count`` straight slicks 1-3 km long and 20-60 m wide (soft-edged), none within
    ``clearance_m`` of the scene's centre (the hull)."""
    rr, cc = np.mgrid[:n, :n].astype(float)
    x, y = (cc + 0.5) * pixel_m, (rr + 0.5) * pixel_m
    centre = (n / 2 * pixel_m, n / 2 * pixel_m)
    cover = np.zeros((n, n))
    ends = []
    made = 0
    while made < count:
        mid = rng.uniform(0.0, n * pixel_m, 2)
        ang = rng.uniform(0.0, np.pi)
        half = rng.uniform(500.0, 1500.0)
        a = (mid[0] - half * np.cos(ang), mid[1] - half * np.sin(ang))
        b = (mid[0] + half * np.cos(ang), mid[1] + half * np.sin(ang))
        if _segment_distance(np.array(centre[0]), np.array(centre[1]), a, b) < clearance_m:
            continue
        width = rng.uniform(20.0, 60.0)
        cover = np.maximum(cover, np.clip(1.0 - _segment_distance(x, y, a, b) / width, 0.0, 1.0))
        ends.append((a, b))
        made += 1
    return cover, ends


def _px(xy_m: tuple[float, float], pixel_m: float) -> tuple[float, float]:
    return float(xy_m[0] / pixel_m), float(xy_m[1] / pixel_m)


def glint_wake_scene(
    path: str | Path,
    *,
    pixel_m: float = 10.0,
    length_m: float = 40.0,
    beam_m: float = 8.0,
    heading_deg: float = 300.0,
    hull_contrast: float = 1500.0,
    foam_tail_m: float = 60.0,
    glint: float = 1500.0,
    calm_wake_m: float = 1500.0,
    calm_width_m: float = 40.0,
    calm_depth: float = 0.06,
    texture_share: float = 0.06,
    slicks: int = 6,
    slick_clearance_m: float = 400.0,
    size_px: int = 320,
    seed: int = 1,
) -> GlintScene:
    """Write the scene and return its truth (see the module's description)."""
    rng = np.random.default_rng(seed)
    n = size_px
    _, _, c0, r0, (ux, uy), along, across = hull_frame(n, heading_deg, pixel_m)
    hull = (np.abs(along) <= length_m / 2) & (np.abs(across) <= beam_m / 2)
    behind = -(along + length_m / 2)  # distance behind the stern (m)
    foam = np.where((behind > 0) & (behind < foam_tail_m) & (np.abs(across) <= beam_m / 2), 1 - behind / foam_tail_m, 0)
    calm = (behind > 0) & (behind < calm_wake_m) & (np.abs(across) <= (calm_width_m + 0.02 * behind) / 2)
    slick_cover, slick_ends = _slicks(n, pixel_m, slicks, slick_clearance_m, rng)
    damped = np.maximum(ndimage.gaussian_filter(calm.astype(float), 1.0), slick_cover)
    texture = ndimage.gaussian_filter(rng.normal(0.0, 1.0, (n, n)), 1.5)
    sea = glint * (1.0 + texture_share * texture / max(float(texture.std()), 1e-12)) * (1.0 - calm_depth * damped)
    out = np.empty((4, n, n), np.float32)
    for i in range(4):
        tint = FOAM_NIR_SHARE if i == 3 else 1.0
        b = WATER[i] + sea + rng.normal(0, 15, (n, n))
        b = np.where(foam > 0, b + tint * 0.8 * hull_contrast * foam, b)
        b = np.where(hull, WATER[i] + glint + hull_contrast + rng.normal(0, 20, (n, n)), b)
        out[i] = ndimage.gaussian_filter(b, 0.6)
    target = write_bands(path, out, pixel_m)
    return GlintScene(
        path=target,
        centre_px=(c0, r0),
        along_px=(float(ux), float(uy)),
        heading_deg=heading_deg,
        pixel_m=pixel_m,
        length_m=length_m,
        slicks=tuple((_px(a, pixel_m), _px(b, pixel_m)) for a, b in slick_ends),
    )
