"""Synthetic drone photographs: a wake at centimetre pixels, written as a JPEG with the metadata a drone camera
writes (EXIF lens, XMP height and gimbal angles), and its truth beside it.

The wave field carries no energy at scales far below the hull's beam and the transverse wavelength, so it is
rendered on a coarser grid (a pixel of at most 1/16 of the shorter of the two, and at most 2048 on a side) and
brought to the photo's pixels by a cubic spline, band by band of rows; the sensor's noise is added at the photo's
own pixels.  A 4000 x 3000 frame so stays within a few hundred MB.

The camera looks straight down from ``H = pixel x focal / pitch`` (pinhole); image up is the gimbal's yaw, so a
vessel of true heading ``h`` is drawn at ``h - yaw`` on the photo (and the sun likewise).
"""

from __future__ import annotations

import json
import math
import os
from dataclasses import dataclass, replace
from pathlib import Path

import numpy as np
from scipy import ndimage

from ..errors import ParameterError, SceneWriteError
from ..fileio import clean_stale, temp_name
from .demo import _moved
from .imaging import OpticalModel
from .scene_maker import SceneSpec, VesselSpec, render

#: the camera written into the photo: a 1-inch sensor drone camera (pixel pitch 2.41 µm, focal length 8.8 mm)
PITCH_MM = 0.00241
FOCAL_MM = 8.8
#: the wave field's grid: at most this fraction of the shorter of beam and transverse wavelength per pixel
_WAVE_GRID_FRACTION = 1.0 / 16.0
_MIN_RENDER_PIXEL_M = 0.05  # the scene renderer's finest pixel
_MAX_RENDER_SIDE = 2048
_ROWS_PER_BAND = 256
#: the water's colour (red, green, blue gains on the rendered brightness): a green-blue coastal water
_WATER_RGB = (0.62, 0.86, 1.0)


@dataclass(frozen=True)
class PhotoSpec:
    """A drone photo of one vessel: frame in pixels, ground pixel size, the vessel (true heading), camera yaw."""

    width: int
    height: int
    pixel_m: float
    vessel: VesselSpec
    vessel_col: float  #: the vessel's position on the photo, pixels
    vessel_row: float
    yaw_deg: float = 0.0  #: true bearing of image up
    sun_azimuth_deg: float = 135.0
    noise_std: float = 0.02
    seed: int = 0
    jpeg_quality: int = 92

    def __post_init__(self) -> None:
        if not (isinstance(self.width, int) and isinstance(self.height, int)) or min(self.width, self.height) < 64:
            raise ParameterError(f"a photo must be at least 64 x 64 pixels, got {self.width!r} x {self.height!r}")
        if max(self.width, self.height) > 8192:
            raise ParameterError(f"{self.width} x {self.height} pixels: at most 8192 on a side")
        if not (math.isfinite(self.pixel_m) and 0.005 <= self.pixel_m <= 1.0):
            raise ParameterError(f"a drone photo's pixel must be within 0.005-1 m, got {self.pixel_m!r}")
        if not (0 <= self.vessel_col < self.width and 0 <= self.vessel_row < self.height):
            raise ParameterError("the vessel must lie inside the photo")
        if not 1 <= self.jpeg_quality <= 100:
            raise ParameterError(f"JPEG quality must be 1-100, got {self.jpeg_quality!r}")

    @property
    def camera_height_m(self) -> float:
        return self.pixel_m * FOCAL_MM / PITCH_MM


def frame_reach(width: int, height: int, heading_on_photo_deg: float) -> float:
    """Pixels from the frame's centre to its edge along a direction (clockwise from image up)."""
    a = math.radians(heading_on_photo_deg)
    return min(width / 2 / max(abs(math.sin(a)), 1e-9), height / 2 / max(abs(math.cos(a)), 1e-9))


def frame_position(width: int, height: int, heading_on_photo_deg: float) -> tuple[float, float]:
    """Where an operator frames a vessel: 70 % of the way from the centre to the edge ahead of it, so its wake
    runs across the frame (``heading_on_photo_deg``: clockwise from image up); 1.7 reaches of frame lie behind."""
    a = math.radians(heading_on_photo_deg)
    reach = frame_reach(width, height, heading_on_photo_deg)
    return width / 2 + 0.7 * reach * math.sin(a), height / 2 - 0.7 * reach * math.cos(a)


def render_factor(spec: PhotoSpec, g: float = 9.81) -> int:
    """Photo pixels per rendering pixel of the wave field (see the module text)."""
    u = spec.vessel.speed_mps
    lam = 2 * math.pi * u * u / g
    fine = min(spec.vessel.hull.beam_m, lam) * _WAVE_GRID_FRACTION
    f = max(1, int(fine // spec.pixel_m), math.ceil(_MIN_RENDER_PIXEL_M / spec.pixel_m - 1e-9))
    return max(f, math.ceil(max(spec.width, spec.height) / _MAX_RENDER_SIDE))


def _coarse_spec(spec: PhotoSpec, f: int) -> SceneSpec:
    """The scene rendered at ``f`` photo pixels per pixel, north up = image up, and the vessel's place on it."""
    wc, hc = math.ceil(spec.width / f), math.ceil(spec.height / f)
    pc = spec.pixel_m * f
    v = spec.vessel
    # the scene centre: the vessel's offset from the frame centre, walked back on the sphere of the renderer
    dx = (wc / 2 - spec.vessel_col / f) * pc
    dy = (spec.vessel_row / f - hc / 2) * pc
    lon, lat = _moved(v.lon, v.lat, math.degrees(math.atan2(dx, dy)) % 360, math.hypot(dx, dy))
    drawn = replace(v, heading_deg=(v.heading_deg - spec.yaw_deg) % 360)
    imaging = OpticalModel(sun_azimuth_deg=(spec.sun_azimuth_deg - spec.yaw_deg) % 360, noise_std=0.0, dtype="uint16")
    # geographic grid: its columns run true north, as the photo's image up runs along the yaw
    return SceneSpec(wc, hc, pc, lon, lat, (drawn,), imaging=imaging, crs="EPSG:4326", seed=spec.seed)


def render_photo(spec: PhotoSpec, *, factor: int | None = None) -> tuple[np.ndarray, dict]:
    """The photo (rows, cols, 3) uint8 and its truth record (``factor``: photo pixels per rendering pixel, by
    default :func:`render_factor`)."""
    f = render_factor(spec) if factor is None else int(factor)
    if f < 1:
        raise ParameterError(f"the rendering factor must be a whole number >= 1, got {factor!r}")
    rendered = render(_coarse_spec(spec, f))
    coarse = rendered.data[0].astype(np.float32) / np.float32(4095.0)
    coeffs = ndimage.spline_filter(coarse, order=3, mode="mirror")
    t = rendered.truth["vessels"][0]
    rng = np.random.default_rng(spec.seed + 1)
    out = np.empty((spec.height, spec.width, 3), np.uint8)
    cols = ((np.arange(spec.width, dtype=np.float32) + 0.5) / f - 0.5).astype(np.float32)
    gains = np.asarray(_WATER_RGB, np.float32)
    for r0 in range(0, spec.height, _ROWS_PER_BAND):
        r1 = min(spec.height, r0 + _ROWS_PER_BAND)
        rows = ((np.arange(r0, r1, dtype=np.float32) + 0.5) / f - 0.5).astype(np.float32)
        rr, cc = np.meshgrid(rows, cols, indexing="ij")
        b = ndimage.map_coordinates(coeffs, [rr, cc], order=3, mode="mirror", prefilter=False)
        b += rng.normal(0.0, spec.noise_std, b.shape).astype(np.float32)
        out[r0:r1] = np.clip(np.rint(b[..., None] * gains * 255.0), 0, 255).astype(np.uint8)
    truth = {
        **{k: v for k, v in rendered.truth.items() if k not in ("transform", "crs", "vessels", "width", "height")},
        "width": spec.width,
        "height": spec.height,
        "pixel_m": spec.pixel_m,
        "render_factor": f,
        "camera": {
            "height_m": spec.camera_height_m,
            "focal_mm": FOCAL_MM,
            "pitch_mm": PITCH_MM,
            "gimbal_pitch_deg": -90.0,
            "yaw_deg": spec.yaw_deg % 360,
        },
        "vessels": [
            {
                **t,
                "heading_deg": spec.vessel.heading_deg % 360,
                "pixel_col": spec.vessel_col,
                "pixel_row": spec.vessel_row,
                "hull_pixel_col": spec.vessel_col,
                "hull_pixel_row": spec.vessel_row,
                "lon": None,
                "lat": None,
            }
        ],
    }
    return out, truth


def drone_xmp(height_m: float, pitch_deg: float, yaw_deg: float | None) -> bytes:
    """The XMP packet a drone camera writes (the ``drone-dji`` namespace fields the program reads)."""
    yaw = "" if yaw_deg is None else f' drone-dji:GimbalYawDegree="{yaw_deg:+.1f}"'
    return (
        '<x:xmpmeta xmlns:x="adobe:ns:meta/"><rdf:RDF xmlns:rdf="http://www.w3.org/1999/02/22-rdf-syntax-ns#">'
        '<rdf:Description rdf:about="" xmlns:drone-dji="http://www.dji.com/drone-dji/1.0/"'
        f' drone-dji:RelativeAltitude="{height_m:+.2f}" drone-dji:GimbalPitchDegree="{pitch_deg:+.1f}"{yaw}/>'
        "</rdf:RDF></x:xmpmeta>"
    ).encode()


def drone_exif(focal_mm: float | None, pitch_mm: float | None, f35_mm: float | None = None):
    """EXIF with the lens fields (CIPA DC-008: FocalLength, FocalPlaneXResolution in mm, FocalLengthIn35mmFilm)."""
    from PIL import Image

    exif = Image.Exif()
    sub: dict[int, object] = {}
    if focal_mm is not None:
        sub[0x920A] = focal_mm
    if pitch_mm is not None:
        sub[0xA20E] = 1.0 / pitch_mm  # pixels per unit
        sub[0xA210] = 4  # unit: mm
    if f35_mm is not None:
        sub[0xA405] = int(f35_mm)
    exif.get_ifd(0x8769).update(sub)
    return exif


def write_photo(pixels: np.ndarray, truth: dict, path: str | os.PathLike) -> tuple[Path, Path]:
    """Write the JPEG with its drone metadata and ``<name>.truth.json`` (each by a temporary file and a rename)."""
    from PIL import Image

    jpg = Path(path)
    sidecar = jpg.with_suffix(".truth.json")
    if not jpg.parent.is_dir():
        raise SceneWriteError(f"cannot write {jpg}: folder {jpg.parent} does not exist")
    cam = truth["camera"]
    clean_stale(jpg.parent)
    written: list[Path] = []
    try:
        tmp = temp_name(jpg)
        written.append(tmp)
        Image.fromarray(pixels).save(
            tmp,
            format="JPEG",
            quality=int(truth.get("jpeg_quality", 92)),
            exif=drone_exif(cam["focal_mm"], cam["pitch_mm"]),
            xmp=drone_xmp(cam["height_m"], cam["gimbal_pitch_deg"], cam["yaw_deg"]),
        )
        tmp_json = temp_name(sidecar)
        written.append(tmp_json)
        tmp_json.write_text(json.dumps(truth, indent=1, sort_keys=True))
        os.replace(tmp, jpg)
        os.replace(tmp_json, sidecar)
        written.clear()
    except OSError as err:
        raise SceneWriteError(f"cannot write {jpg}: {err}") from err
    finally:
        for p in written:
            p.unlink(missing_ok=True)
    return jpg, sidecar
