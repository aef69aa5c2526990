"""The ground size of a photograph's pixels from the photo's own metadata (a drone's or an aircraft's camera
looking straight down), with its uncertainty and what it rests on.

For a camera looking straight down from a height ``H`` above the water, one pixel covers
``H * pitch / f`` on the water (pinhole camera; pitch: the sensor's pixel pitch, f: the focal length).  The
pitch comes from EXIF ``FocalPlaneXResolution`` and its unit; failing that, the 35 mm equivalent focal length
``f35`` gives the angle of view over the image diagonal (the 35 mm frame's diagonal is 43.27 mm), so one pixel
covers ``H * 43.27 / (f35 * diagonal_px)``.  Drone cameras write the height above the take-off point and the
gimbal's angles in XMP (``drone-dji:RelativeAltitude``, ``GimbalPitchDegree``, ``GimbalYawDegree``): a pitch of
-90° looks straight down and the yaw is then the true bearing of image up.

A photo whose camera is tilted more than a few degrees from straight down has a pixel size that changes across
the frame: it is not calibrated (the reason is kept) rather than given one wrong scale.  Within those few degrees
the scale still changes across the frame: a pinhole camera tilted by ``t`` sees the water at field angle
``a`` (toward the tilt) with a ground pixel ``H p cos²a / (f cos²(a + t))`` long, which differs from the
centre's by about ``2 tan(t) tan(a)``; that at the frame's corners, with the tilt read plus 0.5° for the
gimbal's own attitude error (common practice, no source), joins the pixel size's uncertainty (a 1-inch drone
camera's 68° diagonal view: 1.2 % looking straight down, 13 % at 5°).

Uncertainties (common practice, no source): the height above the take-off point is barometric, ±0.5 m plus
2 %, and the water need not lie at the take-off point's level: ±1 m more; the focal length ±1 %; the gimbal's
yaw, from the drone's compass, ±3° (it enters every heading read on the photo).
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from pathlib import Path

#: the 35 mm film frame's diagonal (36 x 24 mm), mm
FULL_FRAME_DIAGONAL_MM = math.hypot(36.0, 24.0)
#: largest tilt from straight down taken as a plan view (degrees; cos(5°) changes the scale by 0.4 %)
MAX_TILT_DEG = 5.0
_HEIGHT_STD_M = math.hypot(0.5, 1.0)
_HEIGHT_REL_STD = 0.02
_FOCAL_REL_STD = 0.01
_YAW_STD_DEG = 3.0
_GIMBAL_TILT_STD_DEG = 0.5
#: EXIF tags (CIPA DC-008, Exif 2.32)
_FOCAL_LENGTH, _FOCAL_35, _FP_XRES, _FP_UNIT = 0x920A, 0xA405, 0xA20E, 0xA210
_EXIF_IFD = 0x8769
_UNIT_MM = {2: 25.4, 3: 10.0, 4: 1.0, 5: 0.001}  # inch, cm, mm, µm


@dataclass(frozen=True)
class PhotoScale:
    pixel_size_m: float | None  #: None when the photo cannot be calibrated (see ``reason``)
    rel_std: float
    north_up_deg: float | None
    source: str  #: what was read, and from where
    reason: str = ""  #: why no pixel size, when there is none
    yaw_std_deg: float = 0.0  #: standard uncertainty of image up's bearing (0 when north is unknown)


def _xmp_number(xmp: str, name: str) -> float | None:
    """A drone-dji XMP value, written as an attribute (name="+50.2") or an element (<name>+50.2</name>)."""
    m = re.search(rf'drone-dji:{name}\s*=\s*"([+\-]?[0-9.]+)"', xmp) or re.search(
        rf"<drone-dji:{name}>\s*([+\-]?[0-9.]+)\s*</drone-dji:{name}>", xmp
    )
    try:
        return float(m[1]) if m else None
    except ValueError:
        return None


def read_photo_scale(path: Path) -> PhotoScale | None:
    """The photo's scale from its EXIF and XMP, or None when it carries neither height nor lens."""
    try:
        from PIL import Image

        with Image.open(path) as im:
            width, height = im.size
            exif = im.getexif()
            sub = exif.get_ifd(_EXIF_IFD)
            raw = im.info.get("xmp") or b""
    except Exception:  # noqa: BLE001 - not a photo Pillow reads: nothing to say
        return None
    xmp = raw.decode("utf-8", "replace") if isinstance(raw, (bytes, bytearray)) else str(raw)
    h = _xmp_number(xmp, "RelativeAltitude")
    focal = _num(sub.get(_FOCAL_LENGTH))
    if h is None and focal is None:
        return None
    if h is None or h <= 0:
        return PhotoScale(None, 0.0, None, "", "the photo gives no height above the water (XMP RelativeAltitude)")
    pitch = _xmp_number(xmp, "GimbalPitchDegree")
    tilt = None if pitch is None else abs(90.0 + pitch)
    if tilt is None or tilt > MAX_TILT_DEG:
        said = "no gimbal pitch in the photo" if tilt is None else f"its camera is tilted {tilt:.1f}° from vertical"
        return PhotoScale(
            None, 0.0, None, "", f"{said}: the pixel size changes across the frame; calibrate it by hand or by size"
        )
    fpx, unit = _num(sub.get(_FP_XRES)), sub.get(_FP_UNIT)
    f35 = _num(sub.get(_FOCAL_35))
    if focal and fpx and unit in _UNIT_MM:
        pitch_mm = _UNIT_MM[int(unit)] / fpx
        size = h * pitch_mm / focal
        tan_half_view = 0.5 * math.hypot(width, height) * pitch_mm / focal
        lens = f"focal length {focal:g} mm and pixel pitch {1000 * pitch_mm:.2f} µm (EXIF)"
    elif f35:
        size = h * FULL_FRAME_DIAGONAL_MM / (f35 * math.hypot(width, height))
        tan_half_view = 0.5 * FULL_FRAME_DIAGONAL_MM / f35
        lens = f"35 mm equivalent focal length {f35:g} mm over the {width} x {height} frame (EXIF)"
    else:
        return PhotoScale(None, 0.0, None, "", "the photo gives no focal length with a pixel pitch (EXIF)")
    yaw = _xmp_number(xmp, "GimbalYawDegree")
    tilt_rel = 2 * math.tan(math.radians(tilt + _GIMBAL_TILT_STD_DEG)) * tan_half_view  # the scale across the frame
    rel = math.hypot(_HEIGHT_STD_M / h, _HEIGHT_REL_STD, _FOCAL_REL_STD, tilt_rel)
    source = (
        f"the photo's own metadata: {h:g} m above the take-off point (XMP RelativeAltitude; the water taken at "
        f"that level), {lens}, camera {tilt:.1f}° from straight down"
        + (
            f", image up toward {yaw % 360:.1f}° ± {_YAW_STD_DEG:g}° (XMP GimbalYawDegree, the drone's compass)"
            if yaw is not None
            else ", north unknown"
        )
        + f": {size:.4f} m per pixel ± {100 * rel:.1f} %"
    )
    return PhotoScale(
        size, rel, None if yaw is None else yaw % 360.0, source, yaw_std_deg=0.0 if yaw is None else _YAW_STD_DEG
    )


def _num(v: object) -> float | None:
    try:
        x = float(v)  # type: ignore[arg-type]
    except (TypeError, ValueError, ZeroDivisionError):
        return None
    return x if math.isfinite(x) and x > 0 else None


#: EXIF DateTimeOriginal and OffsetTimeOriginal (CIPA DC-008, Exif 2.32: the camera's clock, and its offset from
#: UTC, which Exif 2.31 added)
_TIME_ORIGINAL, _OFFSET_ORIGINAL = 0x9003, 0x9011


def camera_time(path: Path) -> tuple[str, str] | None:
    """When the photo was taken, from its EXIF, and what that rests on: with the clock's offset from UTC a full
    time (ISO 8601 with the offset); without it a date only (the camera's local clock, of a zone the photo does
    not say, cannot be compared with position reports in UTC). None when the photo carries no time."""
    try:
        from PIL import Image

        with Image.open(path) as im:
            sub = im.getexif().get_ifd(_EXIF_IFD)
    except Exception:  # noqa: BLE001 - not a photo Pillow reads: nothing to say
        return None
    when = str(sub.get(_TIME_ORIGINAL) or "").strip().strip("\x00")
    m = re.fullmatch(r"(\d{4}):(\d\d):(\d\d)[ T](\d\d):(\d\d):(\d\d)", when)
    if not m:
        return None
    date = f"{m[1]}-{m[2]}-{m[3]}"
    offset = str(sub.get(_OFFSET_ORIGINAL) or "").strip().strip("\x00")
    if re.fullmatch(r"[+-]\d\d:\d\d", offset):
        return (
            f"{date}T{m[4]}:{m[5]}:{m[6]}{offset}",
            "the camera's clock (EXIF DateTimeOriginal with its OffsetTimeOriginal from UTC)",
        )
    return date, "the camera's clock (EXIF DateTimeOriginal) without its offset from UTC; a date only"
