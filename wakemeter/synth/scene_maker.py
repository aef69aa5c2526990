"""Georeferenced synthetic scenes of known truth: GeoTIFF plus a JSON truth sidecar.

Velocity is given as speed and *true* heading at a lon/lat; the scene gets a
real CRS (the UTM zone of its centre, either hemisphere, or EPSG:4326) and a
north-up affine transform, and the true heading is turned into a grid
direction through :func:`wakemeter.scene.geodesy.local_frame` (grid
convergence included).  The same spec and seed give the same bytes.
"""

from __future__ import annotations

import json
import os
from dataclasses import asdict, dataclass, field
from pathlib import Path

import numpy as np
import rasterio
from affine import Affine
from rasterio.errors import RasterioError

from .. import __version__
from ..errors import ParameterError, SceneWriteError
from ..fileio import FILE_MODE, clean_stale, temp_name
from ..physics import havelock, kelvin
from ..physics import radar as radar_phys
from ..physics.gravity import normal_gravity
from ..physics.units import KNOT_MPS
from ..scene import geodesy
from .imaging import (
    AmbientSea,
    OpticalModel,
    RadarModel,
    ambient_slopes,
    narrow_v_profile,
    optical_pixels,
    radar_pixels,
    track_profile,
)
from .wavefield import Hull, hull_pressure, kelvin_elevation

TRUTH_SCHEMA = "wakemeter.synth-truth/1"


@dataclass(frozen=True)
class VesselSpec:
    """One vessel: invented name, position (WGS 84), speed through the water, true heading, hull."""

    name: str
    lon: float
    lat: float
    speed_mps: float
    heading_deg: float
    hull: Hull = field(default_factory=Hull)

    def __post_init__(self) -> None:
        if not (-180 <= self.lon <= 180 and -80 <= self.lat <= 84):
            raise ParameterError(
                f"vessel {self.name!r}: lon/lat must be within -180..180 / -80..84, got {self.lon!r}, {self.lat!r}"
            )
        if not np.isfinite(self.speed_mps) or not 0 < self.speed_mps <= 40:
            raise ParameterError(f"vessel {self.name!r}: speed_mps must be within (0, 40], got {self.speed_mps!r}")
        if not np.isfinite(self.heading_deg):
            raise ParameterError(f"vessel {self.name!r}: heading_deg must be finite, got {self.heading_deg!r}")


@dataclass(frozen=True)
class SceneSpec:
    """Everything that defines a synthetic scene."""

    width: int
    height: int
    pixel_m: float
    center_lon: float
    center_lat: float
    vessels: tuple[VesselSpec, ...]
    imaging: OpticalModel | RadarModel = field(default_factory=OpticalModel)
    depth_m: float = float("inf")
    sea: AmbientSea | None = None
    crs: str = "utm"  #: "utm" or "EPSG:4326"
    seed: int = 0
    description: str = ""
    acquisition_time: str = ""  #: ISO 8601 UTC, written to the GeoTIFF metadata when given

    def __post_init__(self) -> None:
        if not (isinstance(self.width, int) and isinstance(self.height, int)) or self.width < 32 or self.height < 32:
            raise ParameterError(
                f"width and height must be integers >= 32 pixels, got {self.width!r} x {self.height!r}"
            )
        if max(self.width, self.height) > 2048:
            raise ParameterError(
                f"{self.width} x {self.height} pixels is too large for the renderer "
                "(at most 2048 on a side: the wave field is computed on a 4x padded grid)"
            )
        if not np.isfinite(self.pixel_m) or not 0.05 <= self.pixel_m <= 100:
            raise ParameterError(f"pixel_m must be within [0.05, 100] m, got {self.pixel_m!r}")
        if not (self.depth_m > 0):
            raise ParameterError(f"depth_m must be > 0 (inf for deep water), got {self.depth_m!r}")
        if self.crs not in ("utm", "EPSG:4326"):
            raise ParameterError(f"crs must be 'utm' or 'EPSG:4326', got {self.crs!r}")
        geodesy.utm_crs_for(self.center_lon, self.center_lat)  # validates the position


@dataclass(frozen=True)
class RenderedScene:
    data: np.ndarray  #: (bands, rows, cols)
    georef: geodesy.GeoRef
    truth: dict


def build_georef(spec: SceneSpec) -> geodesy.GeoRef:
    """North-up georeference with the scene centre at (center_lon, center_lat)."""
    if spec.crs == "utm":
        crs = geodesy.utm_crs_for(spec.center_lon, spec.center_lat)
        probe = geodesy.GeoRef(Affine.identity(), crs)
        x0, y0 = geodesy.lonlat_to_map(probe, spec.center_lon, spec.center_lat)
        # pixel_m is a ground size: divide out the projection's scale factor at the centre
        k = geodesy.local_frame(geodesy.GeoRef(Affine(1, 0, float(x0), 0, -1, float(y0)), crs), 0, 0).m_per_col
        p = spec.pixel_m / k
        t = Affine(p, 0, float(x0) - spec.width / 2 * p, 0, -p, float(y0) + spec.height / 2 * p)
        return geodesy.GeoRef(t, crs)
    dlon_m, _ = geodesy.geodesic(spec.center_lon - 0.0005, spec.center_lat, spec.center_lon + 0.0005, spec.center_lat)
    dlat_m, _ = geodesy.geodesic(spec.center_lon, spec.center_lat - 0.0005, spec.center_lon, spec.center_lat + 0.0005)
    px = spec.pixel_m / (float(dlon_m) / 0.001)
    py = spec.pixel_m / (float(dlat_m) / 0.001)
    t = Affine(px, 0, spec.center_lon - spec.width / 2 * px, 0, -py, spec.center_lat + spec.height / 2 * py)
    return geodesy.GeoRef(t, "EPSG:4326")


def _grid_direction(frame: geodesy.LocalFrame, bearing_deg: float) -> tuple[float, float]:
    """Unit direction (x right, y up) in the metric render grid of a true bearing."""
    dc, dr = frame.image_direction(bearing_deg)
    vx, vy = dc * frame.m_per_col, -dr * frame.m_per_row_up
    n = np.hypot(vx, vy)
    return float(vx / n), float(vy / n)


def vessel_wave_slopes(
    spec: SceneSpec, georef: geodesy.GeoRef, v: VesselSpec, shape: tuple[int, int], dx: float, dy: float, g: float
) -> tuple[float, float, geodesy.LocalFrame, tuple[float, float], np.ndarray, np.ndarray]:
    """A vessel's pixel position, local frame, heading in the metric grid and its Kelvin pattern's slopes
    (d/dx, d/dy up)."""
    col, row = (float(a) for a in geodesy.lonlat_to_pixel(georef, v.lon, v.lat))
    if not (0 <= col < spec.width and 0 <= row < spec.height):
        raise ParameterError(f"vessel {v.name!r} at {v.lon}, {v.lat} lies outside the scene")
    frame = geodesy.local_frame(georef, col, row)
    ux, uy = _grid_direction(frame, v.heading_deg)
    _, gx, gy = kelvin_elevation(
        shape,
        dx_m=dx,
        dy_m=dy,
        vessel_xy_m=(col * dx, row * dy),
        speed_mps=v.speed_mps,
        heading_xy=(ux, uy),
        hull=v.hull,
        depth_m=spec.depth_m,
        g=g,
        with_slopes=True,
    )
    return col, row, frame, (ux, uy), gx, gy


def render_grid(
    spec: SceneSpec,
) -> tuple[
    np.random.Generator,
    geodesy.GeoRef,
    tuple[int, int],
    geodesy.LocalFrame,
    float,
    float,
    float,
    np.ndarray,
    np.ndarray,
]:
    """What every renderer starts from: the seeded generator, georeference, shape, the frame at the centre,
    ground metres per column and row, gravity at the latitude, and the metric grid (x right, y up)."""
    rng = np.random.default_rng(spec.seed)
    georef = build_georef(spec)
    shape = (spec.height, spec.width)
    centre = geodesy.local_frame(georef, spec.width / 2, spec.height / 2)
    dx, dy = centre.m_per_col, centre.m_per_row_up
    g = float(normal_gravity(spec.center_lat))
    yy, xx = np.mgrid[0 : spec.height, 0 : spec.width].astype(float)
    return rng, georef, shape, centre, dx, dy, g, (xx + 0.5) * dx, -(yy + 0.5) * dy


def truth_header(spec: SceneSpec, georef: geodesy.GeoRef, g: float) -> dict:
    """The scene-wide part of a truth record (schema ``wakemeter.synth-truth/1``)."""
    return {
        "schema": TRUTH_SCHEMA,
        "generator": f"wakemeter {__version__}",
        "seed": spec.seed,
        "description": spec.description,
        "acquisition_time": spec.acquisition_time or None,
        "width": spec.width,
        "height": spec.height,
        "pixel_m": spec.pixel_m,
        "crs": georef.crs,
        "transform": list(georef.transform)[:6],
        "depth_m": None if np.isinf(spec.depth_m) else spec.depth_m,
        "gravity_mps2": g,
    }


def render(spec: SceneSpec) -> RenderedScene:
    """Render the scene (pixels, georeference and truth) without writing anything."""
    rng, georef, shape, centre, dx, dy, g, xm, ym_up = render_grid(spec)
    sx = np.zeros(shape)
    sy = np.zeros(shape)
    wake = np.zeros(shape)
    hulls = np.zeros(shape)
    narrow = np.zeros(shape)
    vessels_truth = []
    is_radar = isinstance(spec.imaging, RadarModel)
    radar_m = spec.imaging if isinstance(spec.imaging, RadarModel) else None
    optical_m = spec.imaging if isinstance(spec.imaging, OpticalModel) else None
    for v in spec.vessels:
        col, row, frame, (ux, uy), gx, gy = vessel_wave_slopes(spec, georef, v, shape, dx, dy, g)
        sx += gx
        sy += gy
        rel_x, rel_y = xm - col * dx, ym_up + row * dy
        wake = np.maximum(
            wake,
            track_profile(
                rel_x,
                rel_y,
                (ux, uy),
                beam_m=v.hull.beam_m * (radar_m.wake_width_factor if radar_m is not None else 1.0),
                length_m=v.hull.length_m,
                decay_m=40 * v.hull.length_m,
            ),
        )
        if radar_m is not None and radar_m.narrow_v_half_angle_deg > 0:
            narrow = np.maximum(
                narrow,
                narrow_v_profile(
                    rel_x,
                    rel_y,
                    (ux, uy),
                    half_angle_deg=radar_m.narrow_v_half_angle_deg,
                    width_m=max(0.7 * spec.pixel_m, v.hull.beam_m / 3),
                    length_m=v.hull.length_m,
                    decay_m=25 * v.hull.length_m,
                ),
            )
        offset_m = 0.0
        hull_col, hull_row = col, row
        if radar_m is not None and radar_m.hull_displacement:
            m = radar_m
            vr = (
                v.speed_mps
                * np.cos(np.radians(v.heading_deg - m.look_bearing_deg))
                * np.sin(np.radians(m.incidence_deg))
            )
            offset_m = float(radar_phys.azimuth_offset(vr, m.slant_range_m, m.platform_speed_mps))
            fx, fy = _grid_direction(frame, m.flight_bearing_deg)
            rel_x, rel_y = rel_x - offset_m * fx, rel_y - offset_m * fy
            hull_col, hull_row = col + offset_m * fx / dx, row - offset_m * fy / dy
        p = hull_pressure(rel_x, rel_y, (ux, uy), v.hull, g=g)
        hulls = np.maximum(hulls, p / p.max() if p.max() > 0 else p)
        fr_h = v.speed_mps / np.sqrt(g * spec.depth_m) if np.isfinite(spec.depth_m) else 0.0
        lam_t = kelvin.transverse_wavelength(v.speed_mps, spec.depth_m, g=g)
        vessels_truth.append(
            {
                "name": v.name,
                "lon": v.lon,
                "lat": v.lat,
                "pixel_col": col,
                "pixel_row": row,
                "speed_mps": v.speed_mps,
                "speed_knots": v.speed_mps / KNOT_MPS,
                "heading_deg": v.heading_deg % 360,
                "hull_length_m": v.hull.length_m,
                "hull_beam_m": v.hull.beam_m,
                "depth_froude": float(fr_h),
                "hull_froude": float(v.speed_mps / np.sqrt(g * v.hull.length_m)),
                "transverse_wavelength_m": None if np.isnan(lam_t) else float(lam_t),
                "half_angle_deg": float(havelock.half_angle(fr_h)) if fr_h > 0 else kelvin.KELVIN_HALF_ANGLE_DEG,
                "radar_azimuth_offset_m": offset_m,
                "hull_pixel_col": hull_col,
                "hull_pixel_row": hull_row,
            }
        )
    wake_rms = float(np.sqrt(np.mean(sx**2 + sy**2))) or 1.0
    if not spec.vessels and spec.sea is None:
        wake_rms = 1.0
    sx, sy = sx / wake_rms, sy / wake_rms
    if spec.sea is not None:
        ax, ay = ambient_slopes(
            shape, dx_m=dx, dy_m=dy, sea=spec.sea, direction_xy=_grid_direction(centre, spec.sea.direction_deg), rng=rng
        )
        sx, sy = sx + spec.sea.strength * ax, sy + spec.sea.strength * ay
    pixels = _image(sx, sy, centre, wake, hulls, narrow, radar_m, optical_m, rng)
    truth = {
        **truth_header(spec, georef, g),
        "imaging": {"kind": "radar" if is_radar else "optical", **asdict(spec.imaging)},
        "ambient_sea": asdict(spec.sea) if spec.sea else None,
        "vessels": vessels_truth,
    }
    return RenderedScene(pixels[None, ...], georef, truth)


def _atomic_path(target: Path) -> tuple[int, str]:
    """A hidden temporary file of ours beside ``target`` (open, exclusive); a dead writer's are tidied first."""
    clean_stale(target.parent)
    tmp = temp_name(target)
    return os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o600), str(tmp)


def write(
    scene: RenderedScene,
    path: str | os.PathLike,
    *,
    band_names: tuple[str, ...] | None = None,
    tags: dict[str, str] | None = None,
) -> tuple[Path, Path]:
    """Write the GeoTIFF and its truth sidecar (``<name>.truth.json``) atomically; ``band_names`` become the
    bands' descriptions and ``tags`` extra metadata items."""
    tif = Path(path)
    sidecar = tif.with_suffix(".truth.json")
    if not tif.parent.is_dir():
        raise SceneWriteError(f"cannot write {tif}: folder {tif.parent} does not exist")
    data = scene.data
    profile = {
        "driver": "GTiff",
        "width": data.shape[2],
        "height": data.shape[1],
        "count": data.shape[0],
        "dtype": data.dtype.name,
        "crs": scene.georef.crs,
        "transform": scene.georef.transform,
        "compress": "deflate",
        "predictor": 3 if data.dtype.kind == "f" else 2,
        "tiled": True,
        "blockxsize": 256,
        "blockysize": 256,
    }
    tmp_files: list[str] = []
    try:
        fd, tmp_tif = _atomic_path(tif)
        os.close(fd)
        tmp_files.append(tmp_tif)
        with rasterio.open(tmp_tif, "w", **profile) as dst:
            dst.write(data)
            dst.update_tags(WAKEMETER_SYNTHETIC="yes", WAKEMETER_TRUTH=sidecar.name)
            if scene.truth.get("acquisition_time"):
                dst.update_tags(ACQUISITION_START_TIME=scene.truth["acquisition_time"])
            if data.dtype.kind == "f":
                dst.update_tags(1, UNITS="linear backscatter (sigma0, synthetic)")
            for i, name in enumerate(band_names or ()):
                dst.set_band_description(i + 1, name)
            if tags:
                dst.update_tags(**tags)
        fd, tmp_json = _atomic_path(sidecar)
        tmp_files.append(tmp_json)
        with os.fdopen(fd, "w") as fh:
            json.dump(scene.truth, fh, indent=2, sort_keys=True)
            fh.write("\n")
        mode = FILE_MODE
        for f in (tmp_tif, tmp_json):
            os.chmod(f, mode)
        os.replace(tmp_tif, tif)
        os.replace(tmp_json, sidecar)
        tmp_files.clear()
    except (OSError, RasterioError) as err:
        raise SceneWriteError(f"cannot write {tif}: {err}") from err
    finally:
        for f in tmp_files:
            Path(f).unlink(missing_ok=True)
    return tif, sidecar


def _image(sx, sy, centre, wake, hulls, narrow, radar_m, optical_m, rng) -> np.ndarray:
    """The sensor's image of the surface slopes: radar backscatter along the look, or optical brightness along
    the sun's azimuth; normalised so that the strongest wake slopes reach a few units of the rms."""
    scale = 1.0 / max(np.percentile(np.hypot(sx, sy), 99.5), 1e-9) * 3.0
    if radar_m is not None:
        lx, ly = _grid_direction(centre, radar_m.look_bearing_deg)
        return radar_pixels(
            (sx * lx + sy * ly) * scale,
            wake,
            hulls,
            radar_m,
            rng,
            narrow if radar_m.narrow_v_half_angle_deg > 0 else None,
            look_xy=(lx, ly),
        )
    assert optical_m is not None
    lx, ly = _grid_direction(centre, optical_m.sun_azimuth_deg)
    return optical_pixels((sx * lx + sy * ly) * scale, wake, hulls, optical_m, rng)
