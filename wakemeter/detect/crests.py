"""Transverse crest spacing along the track, from a band of parallel profiles.

A single profile down the track's centre line runs through the turbulent wake, whose foam texture can
hide the crests there while they stand out a few pixels to either side: the spacing then came and went
with a click a few pixels away.  Here every profile of a band about the track gives a periodogram, each
normalised by its own median so that a foamy profile counts no more than a clear one (the profiles are
means of a few adjacent rows, across which the crests are straight), and their mean is searched for the crest
peak (the averaging of periodograms of Bartlett 1948).  The uncertainty comes from
the spread of the peaks found in a few contiguous sets of profiles (their standard error, widened for the
few sets by Student's t), so it includes what the crests' curvature away from the centre line does.

References
----------
1. Bartlett, M. S. (1948). Smoothing periodograms from time-series with continuous spectra.
   *Nature* 161, 686-687 (averaging periodograms of separate stretches of a record).
2. Student (1908). The probable error of a mean. *Biometrika* 6(1), 1-25.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .spectral import student_inflation


@dataclass(frozen=True)
class CrestSpacing:
    wavelength_m: float  #: nan when no peak could be read
    std_m: float
    snr: float  #: peak of the mean normalised periodogram over its median away from the peak, minus 1
    groups_agreeing: int  #: sets of profiles whose own peak lies within ``agree_fraction`` of the spacing
    groups: int
    length_m: float  #: length of the profiles

    @property
    def crests(self) -> float:
        return self.length_m / self.wavelength_m if np.isfinite(self.wavelength_m) else 0.0


NOTHING = CrestSpacing(np.nan, np.nan, 0.0, 0, 0, 0.0)


def _normalised_periodograms(rows: np.ndarray, nfft: int, wide: np.ndarray) -> np.ndarray:
    n = rows.shape[1]
    x = np.arange(n, dtype=float)
    design = np.vstack([x, np.ones(n)]).T
    coef, *_ = np.linalg.lstsq(design, rows.T, rcond=None)
    detrended = rows - (design @ coef).T
    spec = np.abs(np.fft.rfft(detrended * np.hanning(n), nfft, axis=1)) ** 2
    scale = np.median(spec[:, wide], axis=1)
    return spec / np.maximum(scale, 1e-300)[:, None]


def _peak(spectrum: np.ndarray, band: np.ndarray, df: float) -> float:
    """Frequency (cycles/px) of the highest bin in ``band``, refined by a parabola through the log power;
    nan when that bin is the band's first or last (a slope running out of the band, not a peak)."""
    idx = np.nonzero(band)[0]
    j = int(np.argmax(spectrum[idx]))
    i = int(idx[j])
    if j in (0, idx.size - 1) or i <= 0 or i >= spectrum.size - 1:
        return np.nan
    a, b, c = np.log(spectrum[i - 1 : i + 2] + 1e-300)
    d = 0.5 * (a - c) / (a - 2 * b + c) if (a - 2 * b + c) < 0 else 0.0
    return (i + float(np.clip(d, -0.5, 0.5))) * df


def crest_spacing_rows(
    rows: np.ndarray,
    m_per_px: float,
    *,
    band_m: tuple[float, float],
    groups: int = 4,
    agree_fraction: float = 0.05,
    block: int = 1,
) -> CrestSpacing:
    """Crest spacing (m) shared by parallel profiles ``rows`` (one per row, 1-px steps) within ``band_m``.

    ``block``: adjacent rows are first averaged in blocks of this many (across a band narrow enough for the
    crests to be straight, their signal adds up while the noise averages down); the blocks are the profiles.
    """
    rows = np.asarray(rows, dtype=float)
    if block > 1 and rows.shape[0] >= block:
        n_blocks = rows.shape[0] // block
        lead = (rows.shape[0] - n_blocks * block) // 2
        rows = rows[lead : lead + n_blocks * block].reshape(n_blocks, block, -1).mean(axis=1)
    n_rows, n = rows.shape
    if n < 16 or n_rows < groups:
        return NOTHING
    nfft = max(4096, 1 << int(np.ceil(np.log2(16 * n))))
    f = np.fft.rfftfreq(nfft)
    lam_m = np.where(f > 0, 1.0 / np.maximum(f, 1e-12), np.inf) * m_per_px
    usable = (f > 2.0 / n) & (lam_m >= 2.5 * m_per_px)
    wide = usable & (lam_m >= band_m[0] / 1.6) & (lam_m <= band_m[1] * 1.6)
    narrow = usable & (lam_m >= band_m[0]) & (lam_m <= band_m[1])
    if narrow.sum() < 3 or wide.sum() < 8:
        return NOTHING
    norm = _normalised_periodograms(rows, nfft, wide)
    df = float(f[1] - f[0])
    total = norm.mean(axis=0)
    fpk = _peak(total, narrow, df)
    if not np.isfinite(fpk) or fpk <= 0:
        return NOTHING
    away = wide & (np.abs(f - fpk) > 3.0 / n)
    noise = float(np.median(total[away])) if away.any() else float(np.median(total[wide]))
    snr = max(float(total[int(round(fpk / df))]) / max(noise, 1e-300) - 1.0, 0.0)
    lam = m_per_px / fpk
    sets = [s for s in np.array_split(np.arange(n_rows), groups) if s.size]
    lams = np.array([m_per_px / _peak(norm[s].mean(axis=0), narrow, df) for s in sets])
    lams = lams[np.isfinite(lams)]
    agreeing = int(np.sum(np.abs(lams / lam - 1.0) <= agree_fraction))
    sd = float(np.std(lams, ddof=1) / np.sqrt(lams.size) * student_inflation(lams.size)) if lams.size >= 2 else np.nan
    return CrestSpacing(float(lam), sd, snr, agreeing, len(sets), n * m_per_px)
