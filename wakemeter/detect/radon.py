"""Fast Radon transform by the projection-slice theorem.

The 1-D Fourier transform of the projection at angle theta equals the 2-D
Fourier transform of the image along the radial line at that angle.  The
image is zero-padded (2x, which makes its spectrum smooth enough to
interpolate), transformed once with ``scipy.fft``, sampled along every radial
line with a Lanczos-3 kernel (exact on grid points, so 0 and 90 deg are exact)
and each line is inverse-transformed in 1-D.

Conventions follow ``skimage.transform.radon(image, theta, circle=True)``:
output shape (N, n_angles) with N = min(image.shape); detector position
s = x cos(theta) + y sin(theta) with x = col - N//2 (right), y = N//2 - row
(up), and s = 0 at output row N//2.

References
----------
1. Bracewell, R. N. (1956). Strip integration in radio astronomy.
   *Aust. J. Phys.* 9, 198-217 (projection-slice theorem).
2. Kak, A. C. & Slaney, M. (1988). *Principles of Computerized Tomographic
   Imaging*, IEEE Press, ch. 3.
3. Duchon, C. E. (1979). Lanczos filtering in one and two dimensions.
   *J. Appl. Meteorol.* 18, 1016-1022.
"""

from __future__ import annotations

import hashlib
import io
from functools import lru_cache
from pathlib import Path

import numpy as np
import scipy.fft as sfft
from scipy import sparse

from ..errors import ParameterError
from ..fileio import atomic_write_bytes

_A = 3  # Lanczos kernel half-width


def _lanczos(x: np.ndarray) -> np.ndarray:
    return np.where(np.abs(x) < _A, np.sinc(x) * np.sinc(x / _A), 0.0)


def radon(image: np.ndarray, theta_deg: np.ndarray | None = None, *, pad: int = 2, workers: int = -1) -> np.ndarray:
    """Radon transform (sinogram) of a square image, assumed zero outside its inscribed circle.

    Parameters
    ----------
    image : (N, N) array
        Image; non-square input is cropped to its central square.
    theta_deg : array of float, optional
        Projection angles in degrees (default 0..179).
    pad : int
        Zero-padding factor (>= 2 keeps interpolation error ~1e-3 of the maximum).

    Returns
    -------
    sinogram : (N, len(theta)) float64
    """
    img = np.asarray(image, dtype=np.float64)
    if img.ndim != 2 or min(img.shape) < 4:
        raise ParameterError(f"image must be a 2-D array at least 4 x 4, got shape {img.shape}")
    if not np.all(np.isfinite(img)):
        raise ParameterError("image contains NaN or inf; fill masked pixels before the Radon transform")
    n = min(img.shape)
    r0, c0 = (img.shape[0] - n) // 2, (img.shape[1] - n) // 2
    img = img[r0 : r0 + n, c0 : c0 + n]
    th = np.arange(180.0) if theta_deg is None else np.asarray(theta_deg, dtype=float).ravel()
    if th.size == 0 or not np.all(np.isfinite(th)):
        raise ParameterError(f"theta_deg must be finite angles, got {theta_deg!r}")
    if pad < 1:
        raise ParameterError(f"pad must be >= 1, got {pad!r}")
    nf = sfft.next_fast_len(n + 2)  # projection length: support n plus a guard against wrap-around
    m = pad * nf
    c = n // 2
    # place the image with its centre pixel at index (0, 0) (circularly) so phases are centred
    buf = np.zeros((m, m), dtype=np.float32)
    buf[:n, :n] = img
    buf = np.roll(buf, (-c, -c), axis=(0, 1))
    spec = sfft.rfft2(buf, workers=workers)  # complex64, (m, m//2+1); axis 0 row freq, axis 1 col freq
    matrix, neg = _interpolation_matrix(m, nf, tuple(np.round(th, 9)))
    ext = _extend(spec, m)
    # real weights times complex data: multiply the (re, im) pairs as a 2-column right-hand side
    pairs = matrix @ ext.reshape(-1).view(np.float32).reshape(-1, 2)
    vals = (pairs[:, 0] + 1j * pairs[:, 1]).reshape(th.size, nf)
    vals[neg] = np.conj(vals[neg])
    proj = sfft.ifft(vals, axis=1, workers=workers).real  # s = 0 at index 0
    proj = np.roll(proj, c, axis=1)[:, :n]
    return proj.T.astype(np.float64)


def _extend(spec: np.ndarray, m: int) -> np.ndarray:
    """Half spectrum with _A mirrored columns on the left (F(r, -c) = conj F(-r, c)) and _A zero columns right."""
    left = np.conj(spec[(-np.arange(m)) % m][:, _A:0:-1])
    return np.concatenate([left, spec, np.zeros((m, _A), spec.dtype)], axis=1)


#: version of the matrices stored in the cache folder (change it when _build_matrix changes)
MATRIX_CACHE_VERSION = 1


@lru_cache(maxsize=8)
def _interpolation_matrix(m: int, nf: int, theta: tuple[float, ...]):
    """The interpolation matrix, from memory, else from the user's cache folder, else built and stored there
    (building one takes ~0.6 s; a new process reads it back in a few tens of ms)."""
    path = _cache_path(m, nf, theta)
    found = _read_matrix(path, m, nf, len(theta))
    if found is not None:
        return found
    mat, neg = _build_matrix(m, nf, theta)
    _write_matrix(path, mat, neg)
    return mat, neg


def _cache_path(m: int, nf: int, theta: tuple[float, ...]) -> Path:
    from ..scene.pyramid import cache_dir

    digest = hashlib.sha1(np.asarray(theta, np.float64).tobytes()).hexdigest()[:12]
    return cache_dir() / "radon" / f"lanczos{_A}-v{MATRIX_CACHE_VERSION}-{m}-{nf}-{digest}.npz"


def _read_matrix(path: Path, m: int, nf: int, n_theta: int):
    """A stored matrix, or None when there is none or it does not fit (then it is simply built again)."""
    try:
        with np.load(path, allow_pickle=False) as z:
            mat = sparse.csr_matrix((z["data"], z["indices"], z["indptr"]), shape=tuple(z["shape"]))
            neg = z["neg"]
    except (OSError, KeyError, ValueError, EOFError):
        return None
    width = m // 2 + 1 + 2 * _A
    if mat.shape != (n_theta * nf, m * width) or neg.shape != (n_theta, nf) or neg.dtype != bool:
        return None
    return mat, neg


def _write_matrix(path: Path, mat, neg: np.ndarray) -> None:
    """Store a matrix for the next process; the cache is optional, so a failure to write is ignored."""
    buf = io.BytesIO()
    np.savez(buf, data=mat.data, indices=mat.indices, indptr=mat.indptr, shape=np.array(mat.shape), neg=neg)
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        atomic_write_bytes(path, buf.getvalue())
    except OSError:
        pass


def _build_matrix(m: int, nf: int, theta: tuple[float, ...]):
    """Sparse Lanczos-3 weights from the extended half spectrum to the radial samples.

    Radial sample k of angle theta sits at frequency index j = k m / nf (an integer, so
    0 and 90 deg fall on grid points): column j cos(theta), row -j sin(theta).  Points
    with a negative column frequency are mirrored and flagged for conjugation.
    """
    j = sfft.fftfreq(nf, 1.0 / nf) * (m // nf)
    t = np.radians(np.asarray(theta))
    fc = (j[None, :] * np.cos(t)[:, None]).ravel()
    fr = (-j[None, :] * np.sin(t)[:, None]).ravel()
    neg = fc < -1e-9
    fr = np.where(neg, -fr, fr)
    fc = np.where(neg, -fc, np.abs(fc))
    width = m // 2 + 1 + 2 * _A
    r0 = np.floor(fr + 1e-9).astype(np.int64)
    c0 = np.floor(fc + 1e-9).astype(np.int64)
    taps = np.arange(-_A + 1, _A + 1)
    rows = (r0[None, :] + taps[:, None]) % m
    cols = np.minimum(c0[None, :] + taps[:, None] + _A, width - 1)
    wr = _lanczos(fr[None, :] - (r0[None, :] + taps[:, None]))
    wc = _lanczos(fc[None, :] - (c0[None, :] + taps[:, None]))
    w = (wr[:, None, :] * wc[None, :, :]).reshape(-1, fr.size)
    idx = (rows[:, None, :] * width + cols[None, :, :]).reshape(-1, fr.size)
    keep = w != 0
    pts = np.broadcast_to(np.arange(fr.size), w.shape)
    mat = sparse.csr_matrix((w[keep].astype(np.float32), (pts[keep], idx[keep])), shape=(fr.size, m * width))
    return mat, neg.reshape(len(theta), nf)
