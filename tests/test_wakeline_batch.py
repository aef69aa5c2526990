"""The line search's background scored for many points at once must give the very scores of one point at a
time (a speed change only: same arithmetic on a leading axis).  Source of the check values: none outside the
project is needed or used; the reference is the one-point-at-a-time path itself, whose results the real sweep
(benchmarks/real_sweep.py, 156 real cases) shows unchanged.  On a real Sentinel-2 crop (tests/data/sentinel2,
MIT licence), with and without a dark-line length limit, and with points whose rays leave the chip."""

from pathlib import Path

import numpy as np
import pytest

from wakemeter.detect.line_chip import prepare_line_chip
from wakemeter.detect.tuning import DEFAULT_TUNING
from wakemeter.detect.wakeline import _line_scores
from wakemeter.scene.raster import open_scene

CROP = Path(__file__).resolve().parent / "data" / "sentinel2" / "marseille_01_S2L2A_2023-08-22_wake_whole.tif"


@pytest.mark.parametrize("min_dark", [0.0, 40.0])
def test_many_points_at_once_equal_one_at_a_time(min_dark):
    t = DEFAULT_TUNING
    with open_scene(CROP) as sc:
        chip = prepare_line_chip(sc, (200.0, 193.0), tuning=t)
    img = np.where(chip.valid, chip.img, 0.0)
    rng = np.random.default_rng(0)
    wr, wc = np.nonzero(chip.valid)
    pick = rng.choice(wr.size, 37, replace=False)
    points = np.stack([wr[pick], wc[pick]], axis=1).astype(float)
    # points near the chip's edge too: rays leaving the chip
    points = np.vstack([points, [[2.0, 3.0], [chip.img.shape[0] - 2.0, 5.0]]])
    r0, r_max = t.hull_clearance_px, 0.42 * chip.img.shape[0]
    one = np.stack([_line_scores(img, chip.valid, tuple(p), r0, r_max, t=t, min_dark_px=min_dark)[0] for p in points])
    many = _line_scores(img, chip.valid, points, r0, r_max, t=t, min_dark_px=min_dark)[0]
    assert np.array_equal(one, many)
