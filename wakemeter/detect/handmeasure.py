"""Hand measurements on a scene: ruler, track bearing, arm angle, crest ruler.

The program's tools call these; every length and angle comes from the scene's
geodesy (:class:`wakemeter.scene.geodesy.LocalFrame`), never from pixel counts.
Each result carries a standard uncertainty from the placement of the end points
(a fraction of a pixel) or, for the crest ruler, from the spectral peak.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy import ndimage

from ..errors import ParameterError
from ..scene import display
from ..scene.raster import Scene
from .pixels import scene_to_index
from .spectral import crest_spacing

#: Standard uncertainty of placing a point by hand, in scene pixels, at full zoom (common practice, no source).
PLACEMENT_PX = 0.5
#: ... and in screen pixels: a point placed on a zoomed-out view is uncertain by this many screen pixels
#: (common practice, no source); see :func:`placement_px`.
PLACEMENT_SCREEN_PX = 2.0


def placement_px(zoom: float) -> float:
    """Standard uncertainty (scene pixels) of a point placed at ``zoom`` screen pixels per scene pixel."""
    if not (np.isfinite(zoom) and zoom > 0):
        raise ParameterError(f"zoom must be > 0, got {zoom!r}")
    return max(PLACEMENT_PX, PLACEMENT_SCREEN_PX / zoom)


Point = tuple[float, float]


def _check(p0: Point, p1: Point) -> float:
    d = float(np.hypot(p1[0] - p0[0], p1[1] - p0[1]))
    if not np.isfinite(d) or d < 2.0:
        raise ParameterError(f"the two points are {d:.1f} pixels apart; draw a longer line")
    return d


@dataclass(frozen=True)
class Ruler:
    length_m: float
    length_std_m: float
    bearing_deg: float  #: true bearing from the first point to the second
    bearing_std_deg: float


def ruler(scene: Scene, p0: Point, p1: Point, *, placement: float = PLACEMENT_PX) -> Ruler:
    """Ground length and true bearing of a line (first point to second); ``placement`` is the standard
    uncertainty of each point in scene pixels."""
    d_px = _check(p0, p1)
    mid = ((p0[0] + p1[0]) / 2, (p0[1] + p1[1]) / 2)
    f = scene.local_frame(*mid)
    dc, dr = p1[0] - p0[0], p1[1] - p0[1]
    if scene.info.georeferenced:
        from ..scene import geodesy

        length, bearing = geodesy.ground_distance_and_bearing(scene.georef, p0, p1)
    else:
        length, bearing = float(f.length_of(dc, dr)), float(f.bearing_of(dc, dr))
    m_px = length / d_px
    return Ruler(
        length, np.sqrt(2) * placement * m_px, bearing % 360.0, float(np.degrees(np.sqrt(2) * placement / d_px))
    )


def track_heading(scene: Scene, vessel: Point, wake_end: Point, *, placement: float = PLACEMENT_PX) -> Ruler:
    """Heading of a vessel from a line drawn from it back along its wake: travel is away from the wake."""
    return ruler(scene, wake_end, vessel, placement=placement)


def angle_to_track(
    scene: Scene,
    track: tuple[Point, Point],
    arm: tuple[Point, Point],
    *,
    placement: float = PLACEMENT_PX,
    track_std_deg: float | None = None,
) -> tuple[float, float]:
    """Angle (deg) between an arm line and the track, folded into [0, 90], and its standard uncertainty.

    ``track_std_deg`` replaces the drawn track's own uncertainty when the track comes from the analysis."""
    t = ruler(scene, *track, placement=placement)
    a = ruler(scene, *arm, placement=placement)
    d = abs(((a.bearing_deg - t.bearing_deg) + 180.0) % 360.0 - 180.0)
    d = min(d, 180.0 - d)
    return float(d), float(np.hypot(t.bearing_std_deg if track_std_deg is None else track_std_deg, a.bearing_std_deg))


@dataclass(frozen=True)
class CrestRuler:
    spacing_m: float  #: crest spacing (wavelength) along the drawn line, m
    spacing_std_m: float
    snr: float
    bearing_deg: float
    profile: np.ndarray  #: sampled intensity along the line
    step_m: float  #: ground distance between profile samples


#: crests closer than this many pixels cannot be told from the pixel grid: 2 px per wave is the sampling limit
#: (Shannon 1949, Proc. IRE 37, 10-21); resampling and compression make 2-3 px moire of their own (common
#: practice, no source)
MIN_CREST_PX = 3.0
#: below this many pixels per crest a spacing may be a neighbouring alias: half a pixel is added to its
#: uncertainty (common practice, no source)
DOUBTFUL_CREST_PX = 5.0


def crest_ruler(
    scene: Scene,
    p0: Point,
    p1: Point,
    *,
    band_m: tuple[float, float] | None = None,
    placement: float = PLACEMENT_PX,
) -> CrestRuler:
    """Crest spacing along a line drawn across a train of crests (profile FFT, sub-bin peak).

    Draw the line perpendicular to the crests; the spacing is then the wavelength.
    """
    d_px = _check(p0, p1)
    if d_px < 16:
        raise ParameterError("the crest ruler needs at least 16 pixels (a few crests) to measure a spacing")
    r = ruler(scene, p0, p1, placement=placement)
    c0, r0 = int(np.floor(min(p0[0], p1[0]))) - 2, int(np.floor(min(p0[1], p1[1]))) - 2
    c1, r1 = int(np.ceil(max(p0[0], p1[0]))) + 3, int(np.ceil(max(p0[1], p1[1]))) + 3
    c0, r0 = max(c0, 0), max(r0, 0)
    c1, r1 = min(c1, scene.width), min(r1, scene.height)
    data, valid = scene.read(window=(c0, r0, c1 - c0, r1 - r0), bands=(1,))
    img = data[0]
    if display.looks_like_radar(scene.info.dtype, scene.info.count, img[valid[0]][:50_000]):
        img = display.to_db(np.where(valid[0], img, 1.0))
    n = int(np.ceil(d_px)) + 1
    t = np.linspace(0.0, 1.0, n)
    rows, cols = scene_to_index((c0, r0), 1, p0[0] + t * (p1[0] - p0[0]), p0[1] + t * (p1[1] - p0[1]))
    prof = ndimage.map_coordinates(np.nan_to_num(img.astype(float)), [rows, cols], order=1, mode="nearest")
    step_m = r.length_m / (n - 1)
    lam, sd, snr = crest_spacing(prof, step_m, band_m=band_m)
    if not np.isfinite(lam):
        raise ParameterError("no regular crests along this line; draw it across several crests")
    px_m = r.length_m / d_px  # ground size of one pixel along the line
    if lam < MIN_CREST_PX * px_m:
        raise ParameterError(
            f"the pattern repeats every {lam / px_m:.1f} pixels ({lam:.1f} m): that close to the pixel grid it "
            "cannot be told from aliasing or resampling moire; measure crests on finer imagery"
        )
    # the Cramer-Rao bound ignores crest curvature and placement; floor of 0.6 % (as the analysis uses,
    # calibrated on synthetic scenes) plus the ruler's own length uncertainty
    sd = float(np.hypot(max(sd, 0.006 * lam), lam * r.length_std_m / r.length_m))
    if lam < DOUBTFUL_CREST_PX * px_m:  # few pixels per crest: the grid may shift the peak by half a pixel
        sd = float(np.hypot(sd, 0.5 * px_m))
    return CrestRuler(lam, sd, snr, r.bearing_deg, prof, step_m)
