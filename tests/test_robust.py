"""Group-wise robust statistics and wide smoothing against numpy and scipy, the reference libraries."""

import numpy as np
import pytest

from wakemeter.detect.robust import MAD_TO_SIGMA, group_median_spread


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_group_median_spread_matches_numpy_median_per_group(seed):
    rng = np.random.default_rng(seed)
    groups = rng.integers(0, 40, size=(60, 50))
    groups[groups == 7] = 8  # an empty group
    values = rng.standard_t(3, size=groups.shape) * (1 + groups)
    values[groups == 11] = 5.0  # a constant group: zero spread -> floor
    med, spread = group_median_spread(values, groups, 41, min_count=8, floor=1.0)
    for g in range(41):
        v = values[groups == g]
        if v.size < 8:
            assert (med[g], spread[g]) == (0.0, 1.0)
            continue
        m = np.median(v)  # numpy's median: mean of the two middle values for an even count
        s = MAD_TO_SIGMA * np.median(np.abs(v - m))
        assert med[g] == pytest.approx(m, rel=1e-12, abs=1e-12)
        assert spread[g] == pytest.approx(s if s > 0 else 1.0, rel=1e-12)


@pytest.mark.parametrize(
    ("shape", "sigma"), [((768, 768), 32.0), ((300, 500), 10.0), ((90, 70), 20.0), ((64, 64), 3.0)]
)
def test_wide_gaussian_matches_scipy_gaussian_filter(shape, sigma):
    """The FFT smoothing against scipy.ndimage.gaussian_filter (mirror edges, kernel to 4 sigma): the
    reference library's own result, to 2e-4 of the data's range (the difference is the kernel's tail beyond
    4 sigma, about 6e-5 of its mass)."""
    from scipy import ndimage

    from wakemeter.detect.wide_blur import wide_gaussian

    rng = np.random.default_rng(4)
    a = rng.normal(size=shape) + np.linspace(0, 50, shape[1])[None, :]
    a[: shape[0] // 10, : shape[1] // 8] += 30  # a bright corner: the edge handling shows
    ref = ndimage.gaussian_filter(a, sigma)
    assert np.max(np.abs(wide_gaussian(a, sigma) - ref)) < 2e-4 * np.ptp(a)
