"""Fast Radon transform: against analytic projections and the reference library scikit-image."""

import numpy as np
import pytest
from scipy.ndimage import gaussian_filter
from skimage import data
from skimage.transform import radon as sk_radon
from skimage.transform import resize

from wakemeter.detect.radon import radon
from wakemeter.errors import ParameterError


def _disc(img):
    n = img.shape[0]
    yy, xx = np.mgrid[:n, :n]
    img = img.copy()
    img[(xx - n // 2) ** 2 + (yy - n // 2) ** 2 > (n // 2) ** 2] = 0
    return img


def test_gaussian_blobs_match_analytic_projection():
    # Source: Kak & Slaney 1988, ch. 3: the projection of A exp(-r^2 / 2 s^2) is
    # A sqrt(2 pi) s exp(-(t - t0)^2 / 2 s^2), t0 = x0 cos(theta) + y0 sin(theta).
    n = 256
    yy, xx = np.mgrid[:n, :n]
    x, y = xx - n // 2, n // 2 - yy
    blobs = [(30, -20, 3.0, 1.0), (-50, 40, 5.0, 2.0), (10, 60, 2.0, 1.5)]
    img = sum(a * np.exp(-((x - x0) ** 2 + (y - y0) ** 2) / (2 * s**2)) for x0, y0, s, a in blobs)
    th = np.arange(0, 180, 7.0)
    t = np.arange(n) - n // 2
    exact = np.stack(
        [
            sum(
                a
                * np.sqrt(2 * np.pi)
                * s
                * np.exp(-((t - (x0 * np.cos(np.radians(q)) + y0 * np.sin(np.radians(q)))) ** 2) / (2 * s**2))
                for x0, y0, s, a in blobs
            )
            for q in th
        ],
        axis=1,
    )
    ours = radon(img, th)
    assert np.abs(ours - exact).max() / exact.max() < 0.006
    ref = sk_radon(_disc(img), th, circle=True)
    assert np.abs(ours - exact).max() <= np.abs(ref - exact).max()  # at least as close as skimage


def test_agrees_with_skimage_on_a_natural_image():
    # Reference library: skimage.transform.radon (circle=True); goal <= 2 % of the sinogram
    # maximum, and exact (<= 0.1 %) at 0 and 90 deg where skimage's sums are exact.
    img = _disc(gaussian_filter(resize(data.camera().astype(float), (256, 256)), 1.0))
    th = np.arange(180.0)
    ref = sk_radon(img, th, circle=True)
    ours = radon(img, th)
    mx = ref.max()
    assert ours.shape == ref.shape == (256, 180)
    assert np.abs(ours - ref).max() / mx < 0.02
    assert np.abs(ours[:, 0] - ref[:, 0]).max() / mx < 1e-3
    assert np.abs(ours[:, 90] - ref[:, 90]).max() / mx < 1e-3


def test_line_through_centre_peaks_at_its_normal():
    # Self-consistency: a bright line at 30 deg to the x axis projects to a sharp peak at theta = 120 deg, s = 0.
    n = 129
    yy, xx = np.mgrid[:n, :n]
    x, y = xx - n // 2, n // 2 - yy
    img = np.exp(-((-np.sin(np.radians(30)) * x + np.cos(np.radians(30)) * y) ** 2) / 2.0)
    sino = radon(_disc(img), np.arange(180.0))
    s, a = np.unravel_index(np.argmax(sino), sino.shape)
    assert a == 120 and s == n // 2


def test_bad_input():
    with pytest.raises(ParameterError, match="2-D"):
        radon(np.zeros(10))
    with pytest.raises(ParameterError, match="NaN"):
        radon(np.full((8, 8), np.nan))


def test_interpolation_matrix_cache_gives_the_same_transform(tmp_path, monkeypatch):
    # Self-consistency: the matrix read back from the cache folder must give exactly the transform built in
    # memory; a damaged cache file is ignored and replaced.
    from wakemeter.detect import radon as radon_mod

    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path))
    img = np.random.default_rng(3).random((96, 96))
    radon_mod._interpolation_matrix.cache_clear()
    built = radon_mod.radon(img)
    files = list((tmp_path / "wakemeter" / "radon").glob("*.npz"))
    assert len(files) == 1
    radon_mod._interpolation_matrix.cache_clear()
    assert np.array_equal(radon_mod.radon(img), built)  # read from the file
    files[0].write_bytes(b"not a matrix")
    radon_mod._interpolation_matrix.cache_clear()
    assert np.array_equal(radon_mod.radon(img), built)  # rebuilt
    assert files[0].stat().st_size > 1000
    radon_mod._interpolation_matrix.cache_clear()
