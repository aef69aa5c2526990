"""A vessel seen as a short bright streak that fades from its head: the hull and its foam, at coarse pixels.

At Sentinel-2's 10 m pixels a small or mid-sized vessel and its white water make one bright streak 10-25
pixels long: the hull is its bright head and the foam behind fades away over 100-200 m.  The line search
(:mod:`.wakeline`) scores lines that start *past* the bright blob around the click, and here the blob is the
whole streak, so it finds little behind it; on hazy, glinting water the hull is not even seen against the
chip's spread.  This test reads the streak itself:

* brightness against the water around the click only (a ring of ``streak_ring_px``): haze and glint change
  over kilometres, not over the few hundred metres around a vessel;
* the object above a fifth of its peak is elongated and at least ``streak_length_min_px`` long;
* its brightness along its axis is skewed: bright at one end, a long fading tail at the other (the third
  standardised moment along the axis; a hull seen alone is an even plateau, skew near 0);
* its rear half is darker in the near infrared than in the visible (its excess over the water in the
  near-infrared band at most ``streak_nir_share_max`` of its mean excess in the visible bands): foam reflects
  less in the near infrared than in the visible, a grey or white hull about as much (:mod:`.foam_colour`).
  Without a near-infrared band the streak is not read at all: a hull brighter at its stern than at its bow
  fades from one end just as a streak does (a synthetic 150 m hull with a bright aft superstructure was read as
  a wake with its heading reversed at 5 of 6 clicks without this test, and at none with it);
* it touches no land, quay or scene edge;
* the best bright line from its head, scored against the scene's other lines as any line is, runs along it.

The direction of travel is towards the bright head.  This reads the same cue a person reads on these images
(the bright head at one end of the streak), so it shares its failure: a vessel whose stern is brighter than
its bow and trailing foam that a person would also miss would be read backwards, and the finding says so.

The shape thresholds were set on the real Sentinel-2 data described in the README ("Real scenes"): nine
wakes of two ports read by eye, and the port vessels and sea specks without a wake; where they sit against
those cases is recorded there; they are not general constants.  The near-infrared bound stands on the
published spectra: on the same data foam tails measure 0.49-0.87 and the hulls without a wake that pass the
shape tests 1.9-2.8.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy import ndimage

from .foam_colour import nir_share
from .line_chip import LineChip
from .robust import median_spread
from .tuning import Tuning


@dataclass(frozen=True)
class FoamStreak:
    """A bright streak fading from its head (chip pixels and image angles)."""

    head_rc: tuple[float, float]  #: the front of the streak (the vessel's bow end)
    back_deg: float  #: image angle (counter-clockwise from the column axis) from the head along the streak
    back_std_deg: float  #: standard uncertainty of that angle from the streak's own shape (model term not included)
    length_px: float
    peak_z: float  #: the brightest point against the water around it (robust spreads)
    skew: float  #: third standardised moment of the brightness along the axis (towards the tail)
    nir_share: float  #: the tail's excess over the water in the near infrared over that in the visible


def _local_z(chip: LineChip, rc: tuple[float, float], t: Tuning) -> np.ndarray | None:
    img, ok = chip.img, chip.valid
    n = img.shape[0]
    rr, cc = np.mgrid[:n, :n]
    d = np.hypot(rr - rc[0], cc - rc[1])
    ring = ok & (d > t.streak_ring_inner_px) & (d < t.streak_ring_outer_px)
    if ring.sum() < 50:
        return None
    med, spread = median_spread(img[ring])
    return np.asarray(ndimage.gaussian_filter(np.where(ok, (img - med) / spread, 0.0), 0.7))


def foam_streak(chip: LineChip, t: Tuning) -> tuple[FoamStreak | None, str]:
    """The streak at the click, or (None, why not)."""
    rc = chip.click_rc
    sm = _local_z(chip, rc, t)
    if sm is None:
        return None, "too little open water around the point to read a streak"
    n = sm.shape[0]
    rr, cc = np.mgrid[:n, :n]
    near = np.hypot(rr - rc[0], cc - rc[1]) <= max(t.line_snap_radius_m / chip.m_per_px, 3.0)
    k = int(np.argmax(np.where(near & chip.valid, sm, -np.inf)))
    pr, pc = divmod(k, n)
    peak = float(sm[pr, pc])
    if peak < t.streak_peak_z_min:
        return None, f"nothing bright at the point ({peak:.1f} spreads above the water around it)"
    level = max(3.0, 0.2 * peak)
    lab, _ = ndimage.label(chip.valid & (sm > level))
    blob = lab == lab[pr, pc]
    if (ndimage.binary_dilation(blob, iterations=t.moored_gap_px) & ~chip.valid).any():
        return None, "the bright object at the point touches land, a quay or the scene's edge"
    ys, xs = np.nonzero(blob)
    if ys.size < 4:
        return None, "the bright object at the point is a speck"
    w = sm[ys, xs] - level
    cy, cx = float(np.average(ys, weights=w)), float(np.average(xs, weights=w))
    ev, evec = np.linalg.eigh(np.cov(np.vstack([xs - cx, ys - cy]), aweights=w))
    elong = float(np.sqrt(ev[1] / max(ev[0], 1e-9)))
    ax = evec[:, 1]  # (col, row) of the long axis
    along = (xs - cx) * ax[0] + (ys - cy) * ax[1]
    skew = float(np.average(along**3, weights=w) / np.average(along**2, weights=w) ** 1.5)
    if skew < 0:  # point the axis towards the long tail
        ax, along, skew = -ax, -along, -skew
    ts = np.arange(np.floor(along.min()), np.ceil(along.max()) + 1.0)
    length = float(ts.size)
    if elong < t.streak_elongation_min or length < t.streak_length_min_px:
        return None, (
            f"the bright object at the point is {length:.0f} pixels long and {elong:.1f} times longer than wide"
        )
    if skew < t.streak_skew_min:
        return None, f"the bright object at the point is evenly bright along its length (skew {skew:.2f}): a hull"
    share = nir_share(chip, ys[along >= 0], xs[along >= 0], rc, t)
    if share is None:
        return None, "no near-infrared and visible bands named in the file to tell foam from a hull"
    if share > t.streak_nir_share_max:
        return None, (
            f"the bright object's tail is not darker in the near infrared than in the visible (a share of "
            f"{share:.2f}; foam's is at most {t.streak_nir_share_max:g}): a hull or superstructure, not foam"
        )
    lat = np.array([-1.0, 0.0, 1.0])
    prof = ndimage.map_coordinates(
        sm, [cy + ts[:, None] * ax[1] + lat[None] * ax[0], cx + ts[:, None] * ax[0] - lat[None] * ax[1]], order=1
    ).max(axis=1)
    top = int(np.argmax(prof))
    front = int(np.nonzero(prof >= 0.5 * prof[top])[0][0])
    head = (cy + ts[front] * ax[1], cx + ts[front] * ax[0])
    back = float(np.degrees(np.arctan2(-ax[1], ax[0])))
    # the axis of an object of this length to within half a pixel at its ends
    std = float(np.degrees(np.arctan(0.5 / max(0.5 * length, 1.0))))
    return FoamStreak(head, back % 360.0, std, length, peak, skew, share), ""
