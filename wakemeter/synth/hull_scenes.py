"""Fine-resolution optical scenes of one white hull seen from above, for the failure classes of real imagery.

Not a wave renderer: these scenes hold what linear theory leaves out and real 0.5-3 m images show, each
switchable on its own:

* a white hull with a brighter superstructure (the blob around a click is then the superstructure; the rest
  of the hull is a bright line from it, which must not be taken for a wake);
* a foam trail fading behind the stern (a wake seen as a line), along the hull's axis or turned off it;
* a planing boat's foam V: two bright foam arms from the stern at a small half-angle (not Kelvin wave ridges;
  attached to the hull, so the hull's length cannot be read from the blob);
* haze and glint over the water: a smooth brightness field kilometres across (``haze_contrast``, the same in
  every band), as over a hazy, glinting bay where the water's spread across the scene is several times its
  spread around a vessel;
* foam's colour: ``foam_nir_share`` is the foam's excess over the water in the near-infrared band (B08) as a
  share of its excess in the visible bands.  Real foam reflects less in the near infrared (Moore et al. 1998;
  Dierssen 2019: a share of about 0.6-0.8, from memory of their spectra; default 0.65); 1 makes grey foam,
  which no sea makes.  The hull stays grey (the same excess in every band).

The scene is a 4-band (B02 B03 B04 B08 named) or single-band uint16 GeoTIFF in UTM zone 31N; the pixel values
are invented, of the order of a Level-2A product's.  Truth: the heading (true bearing of the bow).
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import rasterio
from rasterio.transform import from_origin
from scipy import ndimage

WATER = np.array([900.0, 800.0, 600.0, 300.0])  #: calm water per band (B02 B03 B04 B08)
BAND_NAMES = ("B02", "B03", "B04", "B08")
#: foam's excess over the water in B08 as a share of its excess in the visible bands (Moore et al. 1998; Dierssen
#: 2019; from memory of their spectra, about 0.6-0.8)
FOAM_NIR_SHARE = 0.65


@dataclass(frozen=True, kw_only=True)
class HullScene:
    path: Path
    centre_px: tuple[float, float]  #: the hull's centre (scene col, row, GDAL's continuous coordinates)
    along_px: tuple[float, float]  #: unit vector from stern to bow (col, row)
    heading_deg: float  #: true bearing of the bow (north up)
    pixel_m: float
    length_m: float

    def at(self, fraction: float) -> tuple[float, float]:
        """A point on the hull's centre line: 0 the centre, +0.5 the bow, -0.5 the stern."""
        d = fraction * self.length_m / self.pixel_m
        return self.centre_px[0] + d * self.along_px[0], self.centre_px[1] + d * self.along_px[1]


def white_hull_scene(
    path: str | Path,
    *,
    pixel_m: float = 1.5,
    length_m: float = 60.0,
    beam_m: float | None = None,
    heading_deg: float = 60.0,
    hull_contrast: float = 300.0,
    foam_contrast: float | None = None,
    superstructure_factor: float = 6.0,
    foam_trail_m: float = 0.0,
    trail_off_axis_deg: float = 0.0,
    foam_v_half_angle_deg: float | None = None,
    foam_v_length_m: float = 150.0,
    bands: int = 4,
    size_px: int = 400,
    seed: int = 1,
    haze_contrast: float = 0.0,
    foam_nir_share: float = FOAM_NIR_SHARE,
    trail_colour: tuple[float, float, float] = (1.0, 1.0, 1.0),
) -> HullScene:
    """Write the scene and return its truth (see the module's description).  ``trail_colour``: the trail's
    excess over the water in B02, B03 and B04 relative to ``foam_contrast`` (foam is about white: equal)."""
    rng = np.random.default_rng(seed)
    n = size_px
    beam = length_m / 5 if beam_m is None else beam_m
    rr, cc, c0, r0, (ux, uy), along, across = hull_frame(n, heading_deg, pixel_m)
    half_beam = beam / 2 * np.clip((length_m / 2 - along) / (0.2 * length_m), 0, 1)  # a pointed bow
    hull = (np.abs(along) <= length_m / 2) & (np.abs(across) <= half_beam)
    deck = hull & (np.abs(along + 0.2 * length_m) <= 0.12 * length_m) & (np.abs(across) <= 0.3 * beam)
    behind = -(along + length_m / 2)  # distance behind the stern (m)
    foam = np.zeros((n, n))
    if foam_trail_m > 0:
        # the trail leaves the stern turned by trail_off_axis_deg from the hull's axis (a turning track, a hull
        # crabbing in a cross current, foam drifting with the wind)
        t = np.radians(trail_off_axis_deg)
        sx, sy = (cc + 0.5 - c0) * pixel_m + length_m / 2 * ux * 1.0, (rr + 0.5 - r0) * pixel_m + length_m / 2 * uy
        bx, by = -(ux * np.cos(t) - uy * np.sin(t)), -(ux * np.sin(t) + uy * np.cos(t))  # back along the trail
        t_along = sx * bx + sy * by
        t_across = -sx * by + sy * bx
        trail = (t_along > 0) & (np.abs(t_across) <= beam / 2)
        foam = np.maximum(foam, np.where(trail, 1 - t_along / foam_trail_m, 0))
    if foam_v_half_angle_deg is not None:
        t = np.tan(np.radians(foam_v_half_angle_deg))
        for side in (1.0, -1.0):
            off = np.abs(across - side * (beam / 2 + behind * t))
            arm = (behind > 0) & (behind < foam_v_length_m) & (off <= 1.2 * pixel_m)
            foam = np.maximum(foam, np.where(arm, 1 - behind / foam_v_length_m, 0))
    foam = np.clip(foam, 0, 1)
    foam_level = 0.8 * hull_contrast if foam_contrast is None else foam_contrast
    out = np.empty((bands, n, n), np.float32)
    haze = np.zeros((n, n))
    if haze_contrast > 0:  # drawn only then, so the scenes without haze stay as they were
        haze = ndimage.gaussian_filter(rng.normal(0, 1, (n, n)), n / 4, mode="wrap")
        haze = haze_contrast * (haze - haze.min()) / max(float(np.ptp(haze)), 1e-12)
    for i in range(bands):
        white = WATER[i] + hull_contrast
        b = WATER[i] + rng.normal(0, 15, (n, n))
        tint = foam_nir_share if BAND_NAMES[i] == "B08" and bands == 4 else 1.0
        if bands == 4 and i < 3:
            tint = trail_colour[i]
        b = np.where(foam > 0, WATER[i] + tint * foam_level * foam, b)
        b = np.where(hull, white + rng.normal(0, 20, (n, n)), b)
        b = np.where(deck, WATER[i] + superstructure_factor * hull_contrast, b)
        out[i] = ndimage.gaussian_filter(b + haze, 0.6)
    target = write_bands(path, out, pixel_m)
    return HullScene(
        path=target,
        centre_px=(c0, r0),
        along_px=(float(ux), float(uy)),
        heading_deg=heading_deg,
        pixel_m=pixel_m,
        length_m=length_m,
    )


def hull_frame(n: int, heading_deg: float, pixel_m: float):
    """An n x n scene's pixel grid (rows, cols), its centre (c0, r0, where the hull is), the unit vector from
    stern to bow (col, row) and each pixel centre's distance along and across the hull's axis (m)."""
    rr, cc = np.mgrid[:n, :n].astype(float)
    c0 = r0 = n / 2
    a = np.radians(90.0 - heading_deg)  # image angle (counter-clockwise from the column axis), north up
    ux, uy = np.cos(a), -np.sin(a)
    along = ((cc + 0.5 - c0) * ux + (rr + 0.5 - r0) * uy) * pixel_m
    across = (-(cc + 0.5 - c0) * uy + (rr + 0.5 - r0) * ux) * pixel_m
    return rr, cc, c0, r0, (ux, uy), along, across


def write_bands(path: str | Path, out: np.ndarray, pixel_m: float) -> Path:
    """Write ``out`` (bands, n, n) as a uint16 GeoTIFF in UTM zone 31N with ``pixel_m`` pixels, the bands named
    B02, B03, B04, B08 in turn, through a temporary file renamed into place."""
    target = Path(path)
    part = target.with_name(f".{target.name}.{os.getpid()}.part")
    bands, h, w = out.shape
    prof = dict(
        driver="GTiff",
        width=w,
        height=h,
        count=bands,
        dtype="uint16",
        crs="EPSG:32631",
        transform=from_origin(500000, 4800000, pixel_m, pixel_m),
    )
    with rasterio.open(part, "w", **prof) as ds:
        ds.write(np.clip(out, 0, 65535).astype("uint16"))
        for i in range(bands):
            ds.set_band_description(i + 1, BAND_NAMES[i])
    os.replace(part, target)
    return target
