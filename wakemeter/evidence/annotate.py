"""The annotated evidence image: the vessel's surroundings with what was found, drawn in pixels.

Lines with OpenCV, text with Pillow in DejaVu Sans (the same analysis always gives the same pixels).
Everything drawn comes from the analysis and the scene's geodesy: a scale bar in ground metres, a
true-north arrow (grid convergence and image rotation included), latitude and longitude of the corners,
and a result box with the speed, its 95 % interval, heading and method.  Every label is placed inside
the picture and the result box where it hides the least: not the arrow, the scale, the corner labels,
the vessel or the ends of the drawn lines.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path

import cv2
import numpy as np
from PIL import Image, ImageDraw, ImageFont

from ..detect.findings import ARM_KINDS, NARROW_V_KINDS, SegmentKind
from ..detect.result import WakeAnalysis
from ..names import clean_name
from ..palette import COLOURS
from ..physics.units import KNOT_MPS
from ..scene import display, geodesy
from ..scene.raster import Scene

#: Our colours (RGB).  The arms colour is used for nothing else, so tests can find it.
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


@lru_cache(maxsize=16)
def _font(size_px: int, bold: bool = False) -> ImageFont.FreeTypeFont | ImageFont.ImageFont:
    """DejaVu Sans (shipped with matplotlib: it has the degree and plus-minus signs), else Pillow's own."""
    name = "DejaVuSans-Bold.ttf" if bold else "DejaVuSans.ttf"
    try:
        import matplotlib

        return ImageFont.truetype(str(Path(matplotlib.get_data_path()) / "fonts" / "ttf" / name), size_px)
    except (ImportError, OSError):
        return ImageFont.load_default(size_px)


@dataclass(frozen=True)
class _Label:
    text: str
    x: int
    y: int  #: top of the text
    size: int
    bold: bool = False
    colour: tuple[int, int, int] = COLOURS["text"]


def _text_size(text: str, size: int, bold: bool = False) -> tuple[int, int]:
    x0, y0, x1, y1 = _font(size, bold).getbbox(text, stroke_width=max(1, size // 10))
    return int(x1 - min(x0, 0)), int(y1 - min(y0, 0))


Rect = tuple[int, int, int, int]  #: x0, y0, x1, y1


def _overlap(a: Rect, b: Rect) -> int:
    return max(0, min(a[2], b[2]) - max(a[0], b[0])) * max(0, min(a[3], b[3]) - max(a[1], b[1]))


def render_evidence(
    scene: Scene, analysis: WakeAnalysis, *, scene_label: str = "", vessel_name: str = "", max_side: int = 2400
) -> np.ndarray:
    """RGB uint8 image of the crop around the vessel with every annotation drawn."""
    return evidence_layout(scene, analysis, scene_label=scene_label, vessel_name=vessel_name, max_side=max_side)[0]


@dataclass(frozen=True)
class Layout:
    """Where the decorations went (picture pixels): every text label, and the boxes of the marks."""

    labels: tuple[_Label, ...]
    marks: dict[str, Rect]

    def label_rect(self, lb: _Label) -> Rect:
        tw, th = _text_size(lb.text, lb.size, lb.bold)
        return (lb.x, lb.y, lb.x + tw, lb.y + th)


def evidence_layout(
    scene: Scene, analysis: WakeAnalysis, *, scene_label: str = "", vessel_name: str = "", max_side: int = 2400
) -> tuple[np.ndarray, Layout]:
    """The evidence picture and where its decorations were placed (names drawn as one bounded line)."""
    scene_label, vessel_name = clean_name(scene_label), clean_name(vessel_name)
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
    s = max(0.45, min(w, h) / 1400)  # size of marks
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
    marks: dict[str, Rect] = {}
    labels = _decorations(img, scene, analysis, crop, step / up, s, lw, scene_label, vessel_name, avoid, marks)
    return _draw_labels(img, labels), Layout(tuple(labels), marks)


def _draw_labels(img: np.ndarray, labels: list[_Label]) -> np.ndarray:
    """Draw the text with a dark outline (readable on bright foam and dark water alike)."""
    pil = Image.fromarray(img)
    draw = ImageDraw.Draw(pil)
    for lb in labels:
        draw.text(
            (lb.x, lb.y),
            lb.text,
            font=_font(lb.size, lb.bold),
            fill=lb.colour,
            stroke_width=max(1, lb.size // 10),
            stroke_fill=(0, 0, 0),
        )
    return np.ascontiguousarray(np.asarray(pil))


def _decorations(img, scene, analysis, crop, step, s, lw, scene_label, vessel_name, avoid, marks) -> list[_Label]:
    """Draw the scale bar, north arrow and result box background; return the text labels to draw."""
    h, w = img.shape[:2]
    size = max(12, int(round(min(w, h) / 48)))  # text height in pixels
    margin = max(6, size // 2)
    labels: list[_Label] = []
    taken: list[Rect] = []

    def put(text: str, x: int, y: int, sz: int, bold: bool = False) -> Rect:
        tw, th = _text_size(text, sz, bold)
        x = int(min(max(x, 2), max(w - tw - 2, 2)))
        y = int(min(max(y, 2), max(h - th - 2, 2)))
        labels.append(_Label(text, x, y, sz, bold))
        rect = (x, y, x + tw, y + th)
        taken.append(rect)
        return rect

    if scene.info.georeferenced:
        gr = scene.georef
        cols = [crop.col0, crop.col0 + crop.width, crop.col0, crop.col0 + crop.width]
        rows = [crop.row0, crop.row0, crop.row0 + crop.height, crop.row0 + crop.height]
        lon, lat = geodesy.pixel_to_lonlat(gr, cols, rows)
        texts = [f"lat {la:.5f}°, lon {lo:.5f}°" for lo, la in zip(lon, lat)]
        csz = max(11, int(size * 0.8))
        th = _text_size(texts[0], csz)[1]
        for i, (x, y) in enumerate(((margin, margin), (w, margin), (margin, h - margin - th), (w, h - margin - th))):
            marks[f"corner {i}"] = put(texts[i], x, y, csz)
    try:
        frame = scene.local_frame(*analysis.vessel_px)
    except Exception:  # noqa: BLE001 - an unreferenced, uncalibrated image has no scale to draw
        frame = None
    if frame is not None:
        # scale bar along image rows, in ground metres, above the bottom-left corner label
        m_per_px = frame.length_of(step, 0)
        length_m = _nice_length(0.22 * w * m_per_px)
        n = int(round(length_m / m_per_px))
        bottom = min([r[1] for r in taken if r[1] > h / 2] + [h]) - margin
        label = f"{length_m:g} m" if length_m < 1000 else f"{length_m / 1000:g} km"
        tw, th = _text_size(label, size)
        x0, y0 = margin + 6, bottom - 6
        box = (x0 - 6, y0 - th - int(12 * s) - 6, x0 + max(n, tw) + 6, y0 + 6)
        cv2.rectangle(img, box[:2], box[2:], COLOURS["box"], -1)
        cv2.line(img, (x0, y0), (x0 + n, y0), COLOURS["text"], 3 * lw)
        for xx in (x0, x0 + n):
            cv2.line(img, (xx, y0 - int(8 * s)), (xx, y0), COLOURS["text"], 2 * lw)
        labels.append(_Label(label, x0, y0 - th - int(12 * s), size))
        taken.append(box)
        marks["scale bar"] = box
        # true-north arrow (or image-up arrow when north is unknown), below the top-right corner label
        dc, dr = frame.image_direction(0.0) if frame.north_known else (0.0, -1.0)
        ln = max(int(45 * s), 2 * size)
        top = max([r[3] for r in taken if r[3] < h / 2 and r[0] > w / 2] + [0]) + margin
        cx, cy = w - margin - ln, top + ln + 2 * size
        tip = (int(cx + dc * ln), int(cy + dr * ln))
        tail = (int(cx - dc * ln * 0.6), int(cy - dr * ln * 0.6))
        cv2.arrowedLine(img, tail, tip, COLOURS["north"], 3 * lw, cv2.LINE_AA, tipLength=0.35)
        letter = "N" if frame.north_known else "up"
        lw_, lh_ = _text_size(letter, size, True)
        lx = int(tip[0] - lw_ / 2)
        ly = int(min(tip[1], tail[1]) - lh_ - max(3, size // 4)) if dr <= 0 else int(max(tip[1], tail[1]) + 3)
        labels.append(_Label(letter, lx, max(ly, top), size, True))
        taken.append((cx - ln - lw_, top, cx + ln + lw_, cy + ln))
        marks["north arrow"] = taken[-1]
    labels += _result_box(img, analysis, size, scene_label, vessel_name, scene.info.acquisition_time, avoid, taken)
    marks["result box"] = taken[-1]
    return labels


def result_lines(analysis: WakeAnalysis) -> list[str]:
    """The lines of the result box (also used in the report)."""
    if not analysis.wake_found:
        return ["NO WAKE FOUND - no speed estimate", analysis.decision]
    if analysis.speed is None:  # a wake seen as lines only
        return [
            "WAKE FOUND AS A LINE - no speed estimate",
            f"Heading {analysis.heading_deg:.1f}° true (± {analysis.heading_std_deg:.1f}°)",
            "No speed: no wave crests resolved (see the report)",
        ]
    sp = analysis.speed
    over_ground = analysis.speed_over_ground
    lines = [
        f"Speed {'over ground ' if over_ground else ''}{sp.speed_mps / KNOT_MPS:.1f} kn = {sp.speed_mps:.2f} m/s",
        f"95% interval {sp.ci95_low_mps / KNOT_MPS:.1f}-{sp.ci95_high_mps / KNOT_MPS:.1f} kn "
        f"({sp.ci95_low_mps:.2f}-{sp.ci95_high_mps:.2f} m/s)",
        f"Heading {analysis.heading_deg:.1f}° true (± {analysis.heading_std_deg:.1f}°)",
        f"Depth regime: {analysis.regime.regime}"
        + (f", depth {analysis.depth_m:.1f} m" if analysis.depth_m is not None else ""),
        "Method: " + " + ".join(m.method.split(" (")[0] for m in analysis.methods),
    ]
    return lines


def _result_box(
    img, analysis: WakeAnalysis, size: int, scene_label: str, vessel_name: str, acquired, avoid, taken
) -> list[_Label]:
    """The result box where it hides the least (drawn lines' ends and the vessel weigh most), its text
    made smaller until it fits inside the picture."""
    lines = ([f"Vessel: {vessel_name}"] if vessel_name else []) + result_lines(analysis)
    lines += [
        f"Scene: {scene_label}" if scene_label else "",
        f"Acquired: {acquired}" if acquired else "",
        "Estimate from imagery - not a certified measurement",
    ]
    lines = [ln for ln in lines if ln]
    h, w = img.shape[:2]
    margin = max(6, size // 2)
    sz = max(10, int(size * 0.85))
    while True:
        sizes = [_text_size(ln, sz, i == 0) for i, ln in enumerate(lines)]
        bw = max(t[0] for t in sizes) + 2 * margin
        if bw <= w - 2 * margin or sz <= 8:
            break
        sz -= 1
    if bw > w - 2 * margin:  # still too wide at the smallest size: cut the longest lines
        limit = max(10, int(len(max(lines, key=len)) * (w - 4 * margin) / bw))
        lines = [ln if len(ln) <= limit else ln[: limit - 3] + "..." for ln in lines]
        sizes = [_text_size(ln, sz, i == 0) for i, ln in enumerate(lines)]
        bw = min(max(t[0] for t in sizes) + 2 * margin, w - 2 * margin)
    lh = int(max(t[1] for t in sizes) * 1.35)
    bh = lh * len(lines) + margin
    top = max([r[3] for r in taken if r[3] < h / 2 and r[2] < w / 2] + [0]) + margin
    right_top = max([r[3] for r in taken if r[3] < h / 2 and r[0] > w / 2] + [0]) + margin
    bottom_r = min([r[1] for r in taken if r[1] > h / 2 and r[2] > w / 2] + [h]) - margin
    bottom_l = min([r[1] for r in taken if r[1] > h / 2 and r[0] < w / 2] + [h]) - margin
    candidates = [
        (margin, top),
        (w - bw - margin, right_top),
        (w - bw - margin, bottom_r - bh),
        (margin, bottom_l - bh),
    ]

    def cost(c: tuple[int, int]) -> float:
        x, y = c
        r = (x, y, x + bw, y + bh)
        hidden = sum(x - margin <= ax <= x + bw + margin and y - margin <= ay <= y + bh + margin for ax, ay in avoid)
        return 1e9 * hidden + sum(_overlap(r, t) for t in taken)

    x0, y0 = min(((max(x, 0), max(y, 0)) for x, y in candidates), key=cost)
    y0 = min(y0, max(h - bh, 0))
    roi = img[y0 : y0 + bh, x0 : x0 + bw]
    roi[:] = (0.25 * roi + 0.75 * np.array(COLOURS["box"])).astype(np.uint8)
    taken.append((x0, y0, x0 + bw, y0 + bh))
    return [_Label(ln, x0 + margin, y0 + margin // 2 + lh * i, sz, i == 0) for i, ln in enumerate(lines)]
