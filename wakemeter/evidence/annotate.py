"""The annotated evidence image: the vessel's surroundings with what was found, drawn in pixels.

Pure numpy + OpenCV (Hershey fonts, so the same analysis always gives the same pixels).
Everything drawn comes from the analysis and the scene's geodesy: a scale bar in
ground metres, a true-north arrow (grid convergence and image rotation included),
lat/lon of the corners, and a result box with the speed, its 95 % interval,
heading and method.
"""

from __future__ import annotations

from dataclasses import dataclass

import cv2
import numpy as np

from ..detect.findings import ARM_KINDS, NARROW_V_KINDS, CautionCode, SegmentKind
from ..detect.result import WakeAnalysis
from ..physics.units import KNOT_MPS
from ..scene import display, geodesy
from ..scene.raster import Scene

#: Our colours (RGB).  The arms colour is used for nothing else, so tests can find it.
COLOURS = {
    "track": (255, 200, 0),
    "arm": (255, 60, 170),
    "vessel": (60, 230, 90),
    "chip": (120, 170, 255),
    "narrow_v": (170, 255, 240),
    "text": (255, 255, 255),
    "box": (20, 24, 32),
    "north": (255, 255, 255),
}
FONT = cv2.FONT_HERSHEY_SIMPLEX


@dataclass(frozen=True)
class Crop:
    """Where the evidence image lies in the scene (full-resolution pixels)."""

    col0: int
    row0: int
    width: int
    height: int


#: evidence pictures smaller than this (pixels) are enlarged by a whole factor, pixels kept square
MIN_EVIDENCE_SIDE = 480


def crop_for(scene: Scene, analysis: WakeAnalysis, *, max_side: int = 2400) -> tuple[Crop, int]:
    """The chip area around the vessel, clipped to the scene, and the decimation to keep it <= max_side."""
    pts = np.array(analysis.drawing.points_of(SegmentKind.AREA) or [analysis.vessel_px])
    c0, r0 = np.floor(pts.min(axis=0)).astype(int)
    c1, r1 = np.ceil(pts.max(axis=0)).astype(int)
    c0, r0 = max(c0, 0), max(r0, 0)
    c1, r1 = min(c1, scene.width), min(r1, scene.height)
    step = max(1, int(np.ceil(max(c1 - c0, r1 - r0) / max_side)))
    return Crop(int(c0), int(r0), int(c1 - c0), int(r1 - r0)), step


def _nice_length(target_m: float) -> float:
    e = 10 ** np.floor(np.log10(target_m))
    for f in (5, 2, 1):
        if f * e <= target_m:
            return float(f * e)
    return float(e)


def _text(img: np.ndarray, txt: str, org: tuple[int, int], scale: float, colour=COLOURS["text"], thick: int = 1):
    """Text with a dark outline (the same glyphs shifted, since OpenCV spaces thicker text wider)."""
    for dx, dy in ((-1, -1), (-1, 1), (1, -1), (1, 1), (0, 2), (2, 0), (0, -2), (-2, 0)):
        cv2.putText(img, txt, (org[0] + dx, org[1] + dy), FONT, scale, (0, 0, 0), thick, cv2.LINE_AA)
    cv2.putText(img, txt, org, FONT, scale, colour, thick, cv2.LINE_AA)


def render_evidence(scene: Scene, analysis: WakeAnalysis, *, scene_label: str = "", max_side: int = 2400) -> np.ndarray:
    """RGB uint8 image of the crop around the vessel with every annotation drawn."""
    crop, step = crop_for(scene, analysis, max_side=max_side)
    oh, ow = crop.height // step, crop.width // step
    bands = display.true_colour_bands(scene.info.band_descriptions) if scene.info.count >= 3 else (1,)
    data, valid = scene.read(window=(crop.col0, crop.row0, crop.width, crop.height), out_shape=(oh, ow), bands=bands)
    radar = display.looks_like_radar(scene.info.dtype, scene.info.count, data[0][valid[0]][:100_000])
    if len(bands) == 3 and scene.info.dtype == "uint16":
        # reflectance (multispectral products): a wide stretch with a gamma keeps dark water dark and foam white
        img = display.to_uint8(display.composite(data, valid, rgb=(0, 1, 2), low=0.5, high=99.9, gamma=2.0))
    elif len(bands) == 3:
        img = display.to_uint8(display.composite(data, valid, rgb=(0, 1, 2)))
    else:
        g = display.composite(data, valid, db=radar, low=1.0, high=99.5)
        img = np.repeat(display.to_uint8(g)[..., None], 3, axis=2)
    # a small crop (a few hundred pixels) is enlarged by whole pixels so the text does not cover it
    up = max(1, int(np.ceil(MIN_EVIDENCE_SIDE / max(min(img.shape[:2]), 1)))) if step == 1 else 1
    if up > 1:
        img = cv2.resize(img, None, fx=up, fy=up, interpolation=cv2.INTER_NEAREST)
    img = np.ascontiguousarray(img)
    h, w = img.shape[:2]
    s = max(0.45, min(w, h) / 1400)  # text scale
    lw = max(1, int(round(min(w, h) / 500)))

    def px(pt: tuple[float, float]) -> tuple[int, int]:
        return int(round((pt[0] - crop.col0) / step * up)), int(round((pt[1] - crop.row0) / step * up))

    d = analysis.drawing
    for seg in d.segments:
        pts = [px(p) for p in seg.points]
        if seg.kind == SegmentKind.AREA:
            cv2.polylines(img, [np.array(pts, np.int32)], True, COLOURS["chip"], lw, cv2.LINE_AA)
        elif seg.kind == SegmentKind.TRACK:
            cv2.line(img, pts[0], pts[1], COLOURS["track"], 2 * lw, cv2.LINE_AA)
        elif seg.kind in ARM_KINDS:
            cv2.line(img, pts[0], pts[1], COLOURS["arm"], 2 * lw, cv2.LINE_AA)
        elif seg.kind == SegmentKind.HULL_SHIFT:  # the hull as the radar imaged it, and where its wake starts
            hx, hy = pts[0]
            cv2.line(img, (hx, hy), pts[1], COLOURS["vessel"], lw, cv2.LINE_AA)
            r = int(6 * s + 3)
            cv2.rectangle(img, (hx - r, hy - r), (hx + r, hy + r), COLOURS["vessel"], lw, cv2.LINE_AA)
        elif seg.kind in NARROW_V_KINDS:
            cv2.line(img, pts[0], pts[1], COLOURS["narrow_v"], lw, cv2.LINE_AA)
    vx, vy = px(analysis.vessel_px)
    # what the result box must not hide: the vessel, a displaced hull and the ends of the drawn lines
    avoid = [(vx, vy)] + [px(p) for p in d.points_of(SegmentKind.TRACK, *ARM_KINDS, SegmentKind.HULL_SHIFT)]
    cv2.circle(img, (vx, vy), int(10 * s + 4), COLOURS["vessel"], 2 * lw, cv2.LINE_AA)
    _decorations(img, scene, analysis, crop, step / up, s, lw, scene_label, avoid)
    return img


def _decorations(img, scene, analysis, crop, step, s, lw, scene_label, avoid=()) -> None:
    h, w = img.shape[:2]
    try:
        frame = scene.local_frame(*analysis.vessel_px)
    except Exception:  # noqa: BLE001 - an unreferenced, uncalibrated image has no scale to draw
        frame = None
    margin = int(20 * s)
    if frame is not None:
        # scale bar along image rows, in ground metres
        m_per_px = frame.length_of(step, 0)
        length_m = _nice_length(0.22 * w * m_per_px)
        n = int(round(length_m / m_per_px))
        x0, y0 = margin, h - margin
        cv2.rectangle(img, (x0 - 6, y0 - int(34 * s) - 6), (x0 + n + 6, y0 + 6), COLOURS["box"], -1)
        cv2.line(img, (x0, y0), (x0 + n, y0), COLOURS["text"], 3 * lw)
        for xx in (x0, x0 + n):
            cv2.line(img, (xx, y0 - int(8 * s)), (xx, y0), COLOURS["text"], 2 * lw)
        label = f"{length_m:g} m" if length_m < 1000 else f"{length_m / 1000:g} km"
        _text(img, label, (x0, y0 - int(14 * s)), 0.9 * s)
        # true-north arrow (or image-up arrow when north is unknown)
        dc, dr = frame.image_direction(0.0) if frame.north_known else (0.0, -1.0)
        cx, cy = w - margin - int(40 * s), margin + int(110 * s)
        ln = int(45 * s)
        tip = (int(cx + dc * ln), int(cy + dr * ln))
        tail = (int(cx - dc * ln * 0.6), int(cy - dr * ln * 0.6))
        cv2.arrowedLine(img, tail, tip, COLOURS["north"], 3 * lw, cv2.LINE_AA, tipLength=0.35)
        _text(img, "N" if frame.north_known else "up", (tip[0] - int(8 * s), tip[1] - int(10 * s)), 1.0 * s, thick=2)
    if scene.info.georeferenced:
        gr = scene.georef
        corners = [
            (crop.col0, crop.row0),
            (crop.col0 + crop.width, crop.row0),
            (crop.col0, crop.row0 + crop.height),
            (crop.col0 + crop.width, crop.row0 + crop.height),
        ]
        lon, lat = geodesy.pixel_to_lonlat(gr, [c[0] for c in corners], [c[1] for c in corners])
        labels = [f"{la:.5f}, {lo:.5f}" for lo, la in zip(lon, lat)]
        size = cv2.getTextSize(labels[1], FONT, 0.7 * s, 1)[0]
        _text(img, labels[0], (4, int(18 * s) + 4), 0.7 * s)
        _text(img, labels[1], (w - size[0] - 4, int(18 * s) + 4), 0.7 * s)
        _text(img, labels[2], (4, h - int(50 * s) - 40), 0.7 * s)
        size3 = cv2.getTextSize(labels[3], FONT, 0.7 * s, 1)[0]
        _text(img, labels[3], (w - size3[0] - 4, h - 6), 0.7 * s)
    _result_box(img, analysis, s, scene_label, scene.info.acquisition_time, avoid)


def result_lines(analysis: WakeAnalysis) -> list[str]:
    """The lines of the result box (also used in the report)."""
    if not analysis.wake_found:
        return ["NO WAKE FOUND - no speed estimate", analysis.decision]
    if analysis.speed is None:  # a wake seen as lines only
        return [
            "WAKE FOUND AS A LINE - no speed estimate",
            f"Heading {analysis.heading_deg:.1f} deg true (+/- {analysis.heading_std_deg:.1f})",
            "No speed: no wave crests resolved (see the report)",
        ]
    sp = analysis.speed
    over_ground = analysis.has_caution(CautionCode.OVER_GROUND)
    lines = [
        f"Speed {'over ground ' if over_ground else ''}{sp.speed_mps / KNOT_MPS:.1f} kn = {sp.speed_mps:.2f} m/s",
        f"95% interval {sp.ci95_low_mps / KNOT_MPS:.1f}-{sp.ci95_high_mps / KNOT_MPS:.1f} kn "
        f"({sp.ci95_low_mps:.2f}-{sp.ci95_high_mps:.2f} m/s)",
        f"Heading {analysis.heading_deg:.1f} deg true (+/- {analysis.heading_std_deg:.1f})",
        f"Depth regime: {analysis.regime.regime}"
        + (f", depth {analysis.depth_m:.1f} m" if analysis.depth_m is not None else ""),
        "Method: " + " + ".join(m.method.split(" (")[0] for m in analysis.methods),
    ]
    return lines


def _result_box(img, analysis: WakeAnalysis, s: float, scene_label: str, acquired: str | None, avoid=()) -> None:
    lines = result_lines(analysis)
    lines += [
        f"Scene: {scene_label}" if scene_label else "",
        f"Acquired: {acquired}" if acquired else "",
        "Estimate from imagery - not a certified measurement",
    ]
    lines = [ln for ln in lines if ln]
    scale = 0.75 * s
    sizes = [cv2.getTextSize(ln, FONT, scale, 1)[0] for ln in lines]
    lh = int(max(sz[1] for sz in sizes) * 1.8)
    bw = max(sz[0] for sz in sizes) + int(24 * s)
    bh = lh * len(lines) + int(16 * s)
    h, w = img.shape[:2]
    # top left unless that hides what was drawn; then top right (below the north arrow), then bottom right
    corners = [
        (int(20 * s), int(40 * s)),
        (w - bw - int(20 * s), int(110 * s)),
        (w - bw - int(20 * s), h - bh - int(40 * s)),
    ]
    pad = int(10 * s)

    def hidden(corner: tuple[int, int]) -> int:
        x, y = corner
        return sum(x - pad <= ax <= x + bw + pad and y - pad <= ay <= y + bh + pad for ax, ay in avoid)

    x0, y0 = min(((max(x, 0), max(y, 0)) for x, y in corners), key=hidden)
    roi = img[y0 : y0 + bh, x0 : x0 + bw]
    roi[:] = (0.25 * roi + 0.75 * np.array(COLOURS["box"])).astype(np.uint8)
    for i, ln in enumerate(lines):
        _text(
            img, ln, (x0 + int(12 * s), y0 + int(8 * s) + lh * (i + 1) - int(lh * 0.3)), scale, thick=2 if i == 0 else 1
        )
