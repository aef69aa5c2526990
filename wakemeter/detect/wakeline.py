"""Wake lines from the vessel on real imagery: the turbulent wake, foam, calm bands and narrow arms.

In most real scenes the strongest trace of a moving vessel is not its Kelvin crests but a line that
starts at the hull and runs back along the track: bright foam or a dark calm band (optical, and dark
in sun glint), a dark turbulent wake with bright narrow arms (radar).  This is a localised Radon
transform restricted to the rays from the vessel (Copeland et al. 1995), scored one-sidedly:

    score(theta) = mean along the ray at theta  -  max(mean along the opposite ray, mean of the rays beside it)

A line that only passes through the point (a quay, a detector seam, a slick, an old wake, a sediment
front) is as bright on the opposite ray and scores nothing; a line that *starts* at the vessel does.
Dark lines are scored with the sign turned.

The significance is measured against the lines elsewhere in the same scene: the same best score is
computed from many water points of the chip, and the vessel's score is compared with the median and
robust spread of theirs.  Its heading is refined by a straight-line fit to the line's lateral centroid
near the vessel, with the fit's standard error.

References
----------
1. Copeland, A. C., Ravichandran, G. & Trivedi, M. M. (1995). Localized Radon transform-based detection
   of ship wakes in SAR images. *IEEE Trans. Geosci. Remote Sens.* 33(1), 35-45.
2. Murphy, L. M. (1986). Linear feature detection and enhancement in noisy images via the Radon
   transform. *Pattern Recognit. Lett.* 4(4), 279-284.
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass, field

import numpy as np
from scipy import ndimage

from .findings import LineKind
from .line_chip import LineChip
from .lines import WakeLine
from .ray_grid import RayFan, nearest_valid
from .robust import median_spread
from .tuning import DEFAULT_TUNING, Tuning

#: directions searched (image angles, degrees)
ANGLE_STEP_DEG = 1.0
#: background points scored together (memory only: the same scores in any grouping)
_POINTS_AT_ONCE = 32


@dataclass(frozen=True)
class LineWake:
    """The best line from the vessel and its significance against the scene's other lines."""

    back_deg: float  #: image angle (counter-clockwise from the column axis) of the line, vessel -> wake
    back_std_deg: float  #: standard uncertainty of that angle (line fit; floor 0.5)
    score: float  #: the one-sided contrast of the line (standardised units)
    significance: float  #: best standardised score over the scene's other lines' (median, robust spread)
    null_median: float  #: of the background points' best standardised scores
    null_spread: float
    dark: bool  #: a dark line (calm band, radar turbulent wake) rather than bright foam
    length_px: float  #: length scored
    near_far_ratio: float  #: mean of the first half of the line over the second half (a wake fades away)
    lines: tuple[WakeLine, ...]  #: the main line and any arms (angles from the main line)
    vessel_rc: tuple[float, float]  #: where the line starts (chip row, col): the bow end of the hull's blob
    half_angle: tuple[float, float] | None = None  #: (half-angle, its std) when two arms of a V were seen
    fan_significance: np.ndarray = field(default_factory=lambda: np.zeros(0), compare=False, repr=False)
    along: np.ndarray = field(default_factory=lambda: np.zeros(0), compare=False, repr=False)  #: along the line
    from_streak: bool = False  #: read as a bright streak fading from its head (:mod:`.foam_streak`)
    #: the best bright line alone (significance, image angle, length in pixels), which a dark best line can hide
    bright_line: tuple[float, float, float] = (float("-inf"), 0.0, 0.0)


def _rays(img: np.ndarray, valid: np.ndarray, origin_rc, angles_deg: np.ndarray, r: np.ndarray, start=None):
    """Samples (angles, r) along rays and their validity; ``start`` (one per angle) moves each ray's first
    sample out by that many pixels (past the hull).  ``origin_rc`` may be an array of origins (points, 2): the
    samples are then (points, angles, r)."""
    a = np.radians(angles_deg)[:, None]
    rr = r[None, :] + (0.0 if start is None else np.asarray(start, float)[:, None])
    o = np.asarray(origin_rc, float)
    o_r, o_c = (o[0], o[1]) if o.ndim == 1 else (o[:, 0, None, None], o[:, 1, None, None])
    rows = o_r - rr * np.sin(a)
    cols = o_c + rr * np.cos(a)
    coords = [rows.ravel(), cols.ravel()]
    vals = ndimage.map_coordinates(img, coords, order=1, mode="constant", cval=0.0).reshape(rows.shape)
    return vals, nearest_valid(valid, rows, cols)


def _nanmedian_last(a: np.ndarray) -> np.ndarray:
    """Median over the last axis ignoring NaN (NaN where all are NaN): a sort instead of numpy's masked path
    (numpy's vectorised sort is faster here than a partition about the middle)."""
    srt = np.sort(a, axis=-1)  # NaN sort to the end
    cnt = np.sum(~np.isnan(a), axis=-1)
    lo = np.clip((cnt - 1) // 2, 0, None)
    hi = np.clip(cnt // 2, 0, None)
    m = 0.5 * (np.take_along_axis(srt, lo[..., None], -1)[..., 0] + np.take_along_axis(srt, hi[..., None], -1)[..., 0])
    return np.where(cnt > 0, m, np.nan)


def _profiles(vals: np.ndarray, ok: np.ndarray, n_r: int) -> np.ndarray:
    """Median along each ray (the last axis) over its first ``n_r`` samples (NaN when fewer than half are valid): a line
    crossing the ray adds a few bright samples and moves the median little; a line along it moves it."""
    v = np.where(ok[..., :n_r], vals[..., :n_r], np.nan)
    cnt = ok[..., :n_r].sum(axis=-1)
    return np.where(cnt >= 0.5 * n_r, _nanmedian_last(v), np.nan)


def _scores(prof: np.ndarray, angles: np.ndarray, r_mid: float, t: Tuning) -> np.ndarray:
    """One-sided line score for every direction (bright sign); ``prof`` covers 0-360 degrees evenly along its
    last axis (one profile, or one per point).  The rays beside the line lie ``line_side_gap_px`` and more to
    either side of it at mid-length."""
    m = angles.size
    step = 360.0 / m
    opp = np.roll(prof, -m // 2, axis=-1)
    lo_deg = max(np.degrees(np.arctan(t.line_side_gap_px / max(r_mid, 1.0))), 3.0)
    lo = int(np.ceil(lo_deg / step))
    hi = lo + int(round(t.line_side_span_deg / step))
    shifts = np.array(list(range(lo, hi + 1)) + list(range(-hi, -lo + 1)))
    stack = prof[..., (np.arange(m)[:, None] - shifts[None, :]) % m]  # column k: the profile turned by shifts[k]
    side = _nanmedian_last(stack)  # directions with no valid ray beside them: NaN, as wanted
    # ... and from the open water as a whole (0 after standardising): water beyond a calm patch or a slick is
    # brighter than the patch around it without being a line
    return prof - np.fmax(np.fmax(opp, side), 0.0)


def _line_scores(
    img: np.ndarray,
    valid: np.ndarray,
    origin_rc,
    r0: float,
    r_max: float,
    start=None,
    *,
    t: Tuning,
    keep: list | None = None,
    min_dark_px: float = 0.0,
    fan: RayFan | None = None,
) -> np.ndarray:
    """Best one-sided score for each length of ``line_length_fractions`` and each sign: shape (lengths, 2), with
    the angle of each best: (scores, angles).  ``start``: per-direction offset of the rays (past the hull).
    ``keep``: a list that receives every direction's scores, one array (directions,) per length and sign.
    Dark lines shorter than ``min_dark_px`` are not scored.  ``origin_rc`` may be an array of origins
    (points, 2): every shape then gains a leading axis of points (the same arithmetic, without a Python loop
    over the points).  ``fan``: the same rays prepared for many origins on whole pixels (:mod:`.ray_grid`; the
    same samples, faster), used instead of sampling ``img``."""
    angles = np.arange(0.0, 360.0, ANGLE_STEP_DEG)
    r = np.arange(r0, r_max, 1.0)
    if fan is not None and start is None:
        vals, ok = fan.sample(np.asarray(origin_rc))
    else:
        vals, ok = _rays(img, valid, origin_rc, angles, r, start)
    shape = vals.shape[:-2] + (len(t.line_length_fractions), 2)
    out = np.full(shape, -np.inf)
    where = np.full(shape, np.nan)
    medians: dict[int, np.ndarray] = {}  # a length's first half is often the length before it: taken once

    def profile(n: int) -> np.ndarray:
        if n not in medians:
            medians[n] = _profiles(vals, ok, n)
        return medians[n]

    for i, frac in enumerate(t.line_length_fractions):
        n_r = max(int(frac * r.size), 6)
        full, near = profile(n_r), profile(max(n_r // 2, 4))
        for j, sign in enumerate((1.0, -1.0)):
            # a wake is there from its start: the line's value is the lesser of its whole and its first half
            prof = np.fmin(sign * full, sign * near)
            s = _scores(prof, angles, r0 + n_r / 2, t)
            if sign < 0 and n_r < min_dark_px:
                s = np.full_like(s, np.nan)
            if keep is not None:
                keep.append(s)
            # the first best direction, as numpy's nanargmax takes it; none where no direction is scored
            finite = np.isfinite(s)
            k = np.argmax(np.where(finite, s, -np.inf), axis=-1)
            scored = finite.any(axis=-1)
            out[..., i, j] = np.where(scored, np.take_along_axis(s, k[..., None], axis=-1)[..., 0], -np.inf)
            where[..., i, j] = np.where(scored, angles[k], np.nan)
    return np.stack([out, where])


def _without_sidelobes(img: np.ndarray, valid: np.ndarray, chip: LineChip, angles: np.ndarray, t: Tuning) -> np.ndarray:
    """Radar: a bright target's sidelobes draw a cross through its brightest point; its arms are no wake and are
    set to the water's level before any line is scored."""
    cross = sidelobe_cross(img, valid, chip, angles, t) if chip.radar else None
    return img if cross is None else np.where(cross, 0.0, img)


def sidelobe_cross(
    img: np.ndarray, valid: np.ndarray, chip: LineChip, angles: np.ndarray, t: Tuning
) -> np.ndarray | None:
    """The pixels (a mask of the chip) of a bright target's sidelobe cross outside its core, or None.

    A strong point target in a SAR image spreads its sidelobes along the range and azimuth directions: four
    arms at right angles through its brightest point, each as bright as its opposite at the same distance from
    that point (the impulse response is symmetric; Curlander & McDonough 1991, Synthetic Aperture Radar:
    Systems and Signal Processing, from memory).  A wake leaves the hull one way only.  The cross is measured
    from the brightest pixel of the hull's core: for each orientation the least bright of the four arms
    (rays starting past the core in every direction), which must stand ``radar_cross_min_z`` above the water
    and ``radar_cross_margin_z`` above the same measure's median over all orientations."""
    if chip.hull is None or not chip.hull.core.any():
        return None
    core = np.where(chip.hull.core, chip.img, -np.inf)
    peak = np.unravel_index(int(np.argmax(core)), core.shape)
    rr, cc = np.nonzero(chip.hull.core)  # the blob holds the arms' bright start: the core is the target
    a = np.radians(angles)[:, None]
    reach = np.clip(((cc - peak[1])[None, :] * np.cos(a) - (rr - peak[0])[None, :] * np.sin(a)).max(axis=1), 0.0, None)
    quarter = angles.size // 4
    r_s = np.max([np.roll(reach, -k * quarter) for k in range(4)], axis=0) + t.hull_clearance_px
    arms = _arm_means(img, valid, peak, angles, r_s, t, whole=True)
    weakest = arms.reshape(4, quarter).min(axis=0)  # each orientation once: its least bright arm
    if not np.isfinite(weakest).any():
        return None
    best = int(np.nanargmax(weakest))
    if weakest[best] < t.radar_cross_min_z or weakest[best] - float(np.nanmedian(weakest)) < t.radar_cross_margin_z:
        return None
    # the arms' orientation refined to a tenth of a degree: the strongest sum of the four arms
    fine = np.arange(angles[best] - 1.5, angles[best] + 1.55, 0.1)
    four = (fine[None, :] + 90.0 * np.arange(4)[:, None]).ravel()
    starts = np.repeat(r_s[(best + quarter * np.arange(4)) % angles.size], fine.size)
    total = _arm_means(img, valid, peak, four, starts, t, whole=False).reshape(4, -1).sum(axis=0)
    phi = np.radians(float(fine[int(np.argmax(total))]))
    yy, xx = np.mgrid[0 : img.shape[0], 0 : img.shape[1]]
    dx, dy = xx - peak[1], peak[0] - yy  # x right, y up
    across_1 = np.abs(-dx * np.sin(phi) + dy * np.cos(phi))
    across_2 = np.abs(dx * np.cos(phi) + dy * np.sin(phi))
    # the arms leave from every bright point of the target: as wide as its core across them, and a margin
    w1 = float(across_1[chip.hull.core].max()) + t.radar_cross_halfwidth_px
    w2 = float(across_2[chip.hull.core].max()) + t.radar_cross_halfwidth_px
    band = (across_1 <= w1) | (across_2 <= w2)
    return band & ~chip.hull.core


def _arm_means(img, valid, peak, angles: np.ndarray, starts: np.ndarray, t: Tuning, *, whole: bool) -> np.ndarray:
    """Mean along each ray from ``peak`` over its valid pixels among ``radar_cross_arm_px`` past its start; with
    ``whole``, NaN when less than half of them are valid, else 0 when none is."""
    v, ok = _rays(img, valid, (float(peak[0]), float(peak[1])), angles, np.arange(0.0, t.radar_cross_arm_px), starts)
    n = ok.sum(axis=1)
    mean = np.where(ok > 0, v, 0.0).sum(axis=1) / np.maximum(n, 1)
    return np.where(n >= 0.5 * ok.shape[1], mean, np.nan) if whole else mean


def find_wake_line(
    chip: LineChip, *, reach_m: float = 1200.0, rng_seed: int = 0, tuning: Tuning = DEFAULT_TUNING
) -> LineWake | None:
    """The most significant line starting at the vessel, or None when the chip has no room for one.

    Parameters
    ----------
    chip : LineChip
        The prepared surroundings (:func:`~.line_chip.prepare_line_chip`).
    reach_m : float
        Longest line scored, ground metres (capped by the chip).
    rng_seed : int
        Seed of the background points (the result is deterministic for a given seed).
    tuning : Tuning
        The line search's thresholds (``line_*``, ``hull_clearance_px``, ``narrow_v_max_deg``).
    """
    t = tuning
    valid = chip.valid
    img = np.where(valid, np.clip(ndimage.gaussian_filter(chip.img, 0.7), -t.line_clip_z, t.line_clip_z), 0.0)
    r0 = t.hull_clearance_px
    n = img.shape[0]
    r_max = float(min(reach_m / chip.m_per_px, 0.42 * n))
    if r_max < r0 + 12:
        return None
    # rays leave from the hull's centre and start past its bright core in each direction (a line along the
    # hull itself is not a wake); from the click when no hull was seen
    angles = np.arange(0.0, 360.0, ANGLE_STEP_DEG)
    origin = chip.vessel_rc
    start = None if chip.hull is None else chip.hull.extent_px(angles, whole=True)
    img = _without_sidelobes(img, valid, chip, angles, t)
    fans: list = []
    # optical: a short dark line from a hull is its shadow (or a quay's), not a calm wake
    min_dark = 0.0 if chip.radar else t.optical_dark_line_min_m / chip.m_per_px
    own, own_angle = _line_scores(img, valid, origin, r0, r_max, start, t=t, keep=fans, min_dark_px=min_dark)
    background = _scene_lines(img, chip, r0, r_max, min_dark, rng_seed, t)
    if background is None:
        return None
    scored, centre, spread, med, sp = background
    own = np.where(scored, own, -np.inf)
    z_own = np.nan_to_num((own - centre) / spread, nan=-np.inf)
    i, j = np.unravel_index(int(np.argmax(z_own)), z_own.shape)
    sig = float((z_own[i, j] - med) / sp)
    bright_line = _best_bright(z_own, own_angle, med, sp, np.arange(r0, r_max, 1.0).size, t)
    score, angle, dark = float(own[i, j]), float(own_angle[i, j]), bool(j == 1)
    n_r = max(int(t.line_length_fractions[i] * np.arange(r0, r_max, 1.0).size), 6)
    # from the centre, past the core behind the vessel: the line's own start
    behind = 0.0 if chip.hull is None else float(chip.hull.extent_px(np.array([angle]), whole=True)[0])
    r_a = r0 + behind
    back, back_std = _refine(img, valid, origin, angle, r_a, min(r_a + 2 * n_r, r_max + behind), dark, t)
    # a V: a second line of the same kind from the vessel, as strong, on the other side of a track between
    # them (Kelvin arms, supercritical arms, radar arms); then the track is their bisector, not either line
    # (in radar the two arms can differ in sign: the look direction tilts one bright and the other dark)
    sig_fans = [((fans[2 * i + jj] - centre[i, jj]) / spread[i, jj] - med) / sp for jj in (0, 1)]
    sig_fan = np.fmax(sig_fans[0], sig_fans[1])
    partner = _partner(sig_fan, angle, sig, t)
    half_angle = None
    if partner is not None:
        b2 = float(chip.hull.extent_px(np.array([partner]), whole=True)[0]) if chip.hull is not None else 0.0
        p_ang, p_std = _refine(img, valid, origin, partner, r0 + b2, min(r0 + b2 + 2 * n_r, r_max + b2), dark, t)
        gap = (p_ang - back + 180.0) % 360.0 - 180.0
        half_angle = (abs(gap) / 2, 0.5 * float(np.hypot(back_std, p_std)))
        back, back_std = (back + gap / 2) % 360.0, half_angle[1]
    near_far = _near_far(img, valid, origin, back, r_a, r_a + n_r, dark)
    # the vessel's position: the front of the hull's core (the bow), opposite the line
    ahead = 0.0 if chip.hull is None else float(chip.hull.extent_px(np.array([back + 180.0]))[0])
    fa = np.radians(back + 180.0)
    vessel = (origin[0] - ahead * np.sin(fa), origin[1] + ahead * np.cos(fa))
    main_kind = LineKind.TURBULENT_DARK if dark else LineKind.TURBULENT_BRIGHT
    if half_angle is None:
        lines = [WakeLine(main_kind, 0.0, float(sig), float(n_r))]
        lines += _arms(img, valid, origin, back, r_a, r_max + behind, centre[-1, 0], spread[-1, 0], radar=chip.radar)
    else:
        arm_kind = LineKind.NARROW_V if chip.radar and half_angle[0] < t.narrow_v_max_deg else LineKind.KELVIN_ARM
        assert partner is not None
        lines = [
            WakeLine(arm_kind, float((angle - back + 180.0) % 360.0 - 180.0), float(sig), float(n_r)),
            WakeLine(
                arm_kind, float((partner - back + 180.0) % 360.0 - 180.0), float(sig_fan[int(partner)]), float(n_r)
            ),
        ]
    r_line = np.arange(r_a, min(r_a + 2 * n_r, r_max + behind), 1.0)
    vals, ok = _rays(img, valid, origin, np.array([back]), r_line)
    along = np.where(ok[0], vals[0], np.nan)
    return LineWake(
        float(back),
        float(back_std),
        score,
        sig,
        med,
        sp,
        dark,
        float(n_r),
        near_far,
        tuple(lines),
        vessel,
        half_angle,
        np.asarray(sig_fan, float),
        along,
        bright_line=bright_line,
    )


def _best_bright(z_own, own_angle, med: float, sp: float, n_rays: int, t: Tuning) -> tuple[float, float, float]:
    """The best bright line alone: (significance, image angle, length in pixels)."""
    i_b = int(np.argmax(z_own[:, 0]))
    n_b = max(int(t.line_length_fractions[i_b] * n_rays), 6)
    return float((z_own[i_b, 0] - med) / sp), float(own_angle[i_b, 0]), float(n_b)


def _scene_lines(img, chip: LineChip, r0: float, r_max: float, min_dark: float, rng_seed: int, t: Tuning):
    """The scene's own lines: the same best scores from ``line_null_points`` water points away from the vessel,
    standardised per length and sign; (scored pairs, centre, spread, median and robust spread of the points'
    best standardised scores), or None with too little open water."""
    rng = np.random.default_rng(rng_seed)
    wr, wc = np.nonzero(chip.valid)
    far = (wr - chip.vessel_rc[0]) ** 2 + (wc - chip.vessel_rc[1]) ** 2 > (r0 + 8) ** 2
    wr, wc = wr[far], wc[far]
    if wr.size < 50:
        return None
    pick = rng.choice(wr.size, size=min(t.line_null_points, wr.size), replace=False)
    valid = chip.valid
    points = np.stack([wr[pick], wc[pick]], axis=1).astype(float)
    fan = RayFan(img, valid, np.arange(0.0, 360.0, ANGLE_STEP_DEG), np.arange(r0, r_max, 1.0))
    null = np.concatenate(
        [
            _line_scores(img, valid, points[k : k + _POINTS_AT_ONCE], r0, r_max, t=t, min_dark_px=min_dark, fan=fan)[0]
            for k in range(0, len(points), _POINTS_AT_ONCE)
        ]
    )
    # standardise each length and sign on the background points, then take the best: the background's best
    # standardised scores are the reference for the vessel's best
    scored = np.isfinite(null).any(axis=0)  # (length, sign) pairs that are scored at all
    ok_null = np.isfinite(null[:, scored]).all(axis=1)
    null = null[ok_null]
    if null.shape[0] < 20:
        return None
    null = np.where(scored[None], null, 0.0)
    centre = np.median(null, axis=0)
    spread = np.maximum(1.4826 * np.median(np.abs(null - centre), axis=0), 1e-3)
    null = np.where(scored[None], null, -np.inf)
    z_null = ((null - centre) / spread).reshape(null.shape[0], -1).max(axis=1)
    med, sp = median_spread(z_null, floor=1e-3)
    return scored, centre, spread, med, sp


def _partner(sig_fan: np.ndarray, angle: float, sig: float, t: Tuning) -> float | None:
    """The other arm of a V with the line at ``angle``: the strongest direction 2-140 degrees away whose
    significance reaches ``line_partner_fraction`` of the line's and the line threshold; None without one."""
    angles = np.arange(0.0, 360.0, ANGLE_STEP_DEG)
    sep = np.abs((angles - angle + 180.0) % 360.0 - 180.0)
    cand = (sep >= 2 * t.line_partner_min_half_deg) & (sep <= 2 * t.line_partner_max_half_deg) & np.isfinite(sig_fan)
    if not cand.any():
        return None
    k = int(np.argmax(np.where(cand, sig_fan, -np.inf)))
    # a peak of its own, not the shoulder of the main line
    left, right = sig_fan[(k - 1) % angles.size], sig_fan[(k + 1) % angles.size]
    if not (sig_fan[k] >= left and sig_fan[k] >= right):
        return None
    if sig_fan[k] < max(t.line_partner_fraction * sig, t.line_partner_significance_min):
        return None
    # two lines, not one broad one: the fan must dip well below both between them
    i0 = int(round(angle / ANGLE_STEP_DEG)) % angles.size
    d = (k - i0) % angles.size
    between = (
        [(i0 + t) % angles.size for t in range(1, d)]
        if d <= angles.size // 2
        else [(k + t) % angles.size for t in range(1, angles.size - d)]
    )
    if not between or np.nanmin(sig_fan[between]) > t.line_partner_dip * min(sig, float(sig_fan[k])):
        return None
    return float(angles[k])


def _refine(
    img, valid, origin_rc, angle_deg: float, r0: float, r1: float, dark: bool, t: Tuning
) -> tuple[float, float]:
    """Angle of the line from a weighted straight-line fit, through the vessel, of the ridge's lateral
    centroid against distance; its standard uncertainty from the fit's residuals, with the vessel position
    (one pixel) over the fit's length and a floor of half a degree."""
    sign = -1.0 if dark else 1.0
    r = np.arange(r0, r1, 1.0)
    half = t.line_refine_half_px
    lat = np.arange(-half, half + 1e-9, 0.5)
    a = np.radians(angle_deg)
    ur, uc = -np.sin(a), np.cos(a)  # along the line (row, col)
    pr, pc = -uc, ur  # lateral unit vector (row, col): to the left of the line
    rows = origin_rc[0] + r[:, None] * ur + lat[None, :] * pr
    cols = origin_rc[1] + r[:, None] * uc + lat[None, :] * pc
    coords = [rows.ravel(), cols.ravel()]
    v = sign * ndimage.map_coordinates(img, coords, order=1, mode="constant").reshape(rows.shape)
    ok = ndimage.map_coordinates(valid.astype(np.float32), coords, order=0, mode="constant").reshape(rows.shape) > 0.5
    edge = np.abs(lat) >= half - 2
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)
        level = np.nanmedian(np.where(ok[:, edge], v[:, edge], np.nan), axis=1)
    level = np.where(np.isfinite(level), level, 0.0)
    w = np.where(ok & (np.abs(lat)[None, :] <= half - 2), np.clip(v - level[:, None], 0, None), 0.0)
    tot = w.sum(axis=1)
    use = tot > 0.05 * max(float(tot.max()), 1e-9)
    if use.sum() < 6:
        return angle_deg, 2.0 * ANGLE_STEP_DEG
    centroid = (w[use] * lat[None, :]).sum(axis=1) / tot[use]
    rr, wt = r[use], tot[use] / tot[use].max()
    slope = float(np.sum(wt * rr * centroid) / np.sum(wt * rr**2))
    resid = centroid - slope * rr
    n_eff = float(np.sum(wt) ** 2 / np.sum(wt**2))
    s2 = float(np.sum(wt * resid**2) / np.sum(wt)) * n_eff / max(n_eff - 1, 1.0)
    slope_se = float(np.sqrt(s2 / (np.sum(wt * rr**2) / np.sum(wt) * n_eff)))
    corr = float(np.degrees(np.arctan(slope)))  # a centroid to the left turns the line counter-clockwise
    if abs(corr) > t.line_refine_max_deg:  # the fit left the line: keep the fan's angle
        return angle_deg, 2.0 * ANGLE_STEP_DEG
    fit_std = float(np.degrees(np.arctan(slope_se)))
    place_std = float(np.degrees(np.arctan(1.0 / max(float(np.average(rr, weights=wt)), 1.0))))
    return angle_deg + corr, float(np.sqrt(fit_std**2 + place_std**2 + 0.5**2))


def _near_far(img, valid, origin_rc, angle_deg: float, r0: float, r1: float, dark: bool) -> float:
    sign = -1.0 if dark else 1.0
    r = np.arange(r0, r1, 1.0)
    vals, ok = _rays(sign * img, valid, origin_rc, np.array([angle_deg]), r)
    half = r.size // 2
    near = vals[0, :half][ok[0, :half]]
    far = vals[0, half:][ok[0, half:]]
    if near.size < 3 or far.size < 3:
        return float("nan")
    return float(np.mean(near) / max(np.mean(far), 0.05))


def _arms(img, valid, origin_rc, back_deg, r0, r_max, med, spread, *, radar: bool) -> list[WakeLine]:
    """Bright lines from the vessel on each side of the main one: radar narrow-V arms (1-6 degrees) and
    foam or texture lines along Kelvin arms (8-25 degrees), each scored like the main line."""
    out: list[WakeLine] = []
    angles = np.arange(0.0, 360.0, 0.5)
    r = np.arange(r0, r_max, 1.0)
    vals, ok = _rays(img, valid, origin_rc, angles, r)
    prof = _profiles(vals, ok, r.size)
    opp = np.roll(prof, -angles.size // 2)
    rel = (angles - back_deg + 180.0) % 360.0 - 180.0
    for lo, hi, kind in ((1.0, 6.0, LineKind.NARROW_V), (8.0, 25.0, LineKind.KELVIN_ARM)):
        if kind == LineKind.NARROW_V and not radar:
            continue
        for side in (1.0, -1.0):
            sel = (side * rel >= lo) & (side * rel <= hi) & np.isfinite(prof)
            if not sel.any():
                continue
            idx = np.nonzero(sel)[0]
            j = idx[int(np.argmax(prof[idx]))]
            # local background: the rays just outside the search on the same side, and the opposite ray
            out_sel = (side * rel > hi) & (side * rel <= hi + 10) & np.isfinite(prof)
            bg = np.nanmedian(prof[out_sel]) if out_sel.any() else 0.0
            s = float(prof[j] - max(bg, opp[j] if np.isfinite(opp[j]) else -np.inf))
            sig = (s - med) / spread
            if sig >= 6.0 and 0 < np.searchsorted(idx, j) < idx.size - 1:
                out.append(WakeLine(kind, float(rel[j]), float(sig), float(r.size)))
    return out
