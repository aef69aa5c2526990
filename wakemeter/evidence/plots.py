"""The report's plots, drawn with matplotlib (object interface and the Agg renderer: no window, no pyplot
state, safe off the main thread), each with labelled axes, units and, for images, a colour scale:

* the whitened wave spectrum behind the vessel with the fitted steady-wave curve
  (k . U)^2 = g |k| tanh(|k| h) drawn over it;
* the intensity profile along the track with the measured transverse crest spacing.

Each returns an RGB uint8 array (or None when the analysis has nothing to plot).
"""

from __future__ import annotations

import numpy as np
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure

from ..detect.result import WakeAnalysis

#: the same look every time: fixed size, resolution and font size
DPI = 150
_RC = {"font.size": 8.0}


def _rgb(fig: Figure) -> np.ndarray:
    canvas = FigureCanvasAgg(fig)
    canvas.draw()
    return np.asarray(canvas.buffer_rgba())[..., :3].copy()


def spectrum_plot(analysis: WakeAnalysis) -> np.ndarray | None:
    fig = spectrum_figure(analysis)
    return None if fig is None else _rgb(fig)


def profile_plot(analysis: WakeAnalysis) -> np.ndarray | None:
    fig = profile_figure(analysis)
    return None if fig is None else _rgb(fig)


def spectrum_figure(analysis: WakeAnalysis) -> Figure | None:
    p = analysis.plots
    if p is None:
        return None
    white = np.asarray(p.whitened_spectrum, float)
    n_v, n_u = white.shape
    dk_u, dk_v = p.spectrum_dk
    # pixel i is centred on k = (i - n/2) dk (the spectrum is shifted so that k = 0 is at n/2)
    extent = (
        (-n_u / 2 - 0.5) * dk_u,
        (n_u / 2 - 0.5) * dk_u,
        (n_v / 2 - 0.5) * dk_v,
        (-n_v / 2 - 0.5) * dk_v,
    )
    fig = Figure(figsize=(5.6, 4.4), dpi=DPI, layout="constrained")
    ax = fig.add_subplot()
    im = ax.imshow(white, cmap="viridis", vmin=-2.0, vmax=6.0, extent=extent, interpolation="nearest")
    ku, kv = (np.asarray(a, float) for a in p.fitted_curve)
    for sign in (1, -1):
        ok = np.isfinite(ku) & np.isfinite(kv)
        ax.plot(sign * ku[ok], sign * kv[ok], color="#ff3c3c", lw=1.2, label="fitted curve" if sign == 1 else None)
    ax.set_xlim(extent[0], extent[1])
    ax.set_ylim(extent[2], extent[3])
    ax.set_xlabel("wavenumber along the track (rad/m)")
    ax.set_ylabel("wavenumber across the track (rad/m)")
    u, h = p.fit_speed_mps, p.fit_depth_m
    ax.set_title(
        f"Wave spectrum behind the vessel; fitted U = {u:.2f} m/s" + ("" if np.isinf(h) else f", h = {h:.1f} m"),
        fontsize=8.5,
    )
    ax.legend(loc="upper right", fontsize=7, framealpha=0.8)
    bar = fig.colorbar(im, ax=ax, shrink=0.9)
    bar.set_label("log(power behind / ahead)\nabove its ring median (ring spreads)")
    return fig


def profile_figure(analysis: WakeAnalysis) -> Figure | None:
    p = analysis.plots
    if p is None or len(p.profile) < 4:
        return None
    y = np.asarray(p.profile, float)
    x = np.arange(len(y)) * p.profile_m_per_px
    fig = Figure(figsize=(6.4, 2.4), dpi=DPI, layout="constrained")
    ax = fig.add_subplot()
    ax.plot(x, y, color="#282828", lw=0.9, label="image intensity")
    lam = p.transverse_wavelength_m
    if lam:
        for i, xm in enumerate(np.arange(0, x[-1], lam)):
            ax.axvline(xm, color="#ff3caa", lw=0.7, label="crest spacing" if i == 0 else None)
        title = f"Intensity along the track behind the vessel; transverse crest spacing {lam:.1f} m"
    else:
        title = "Intensity along the track behind the vessel; no regular transverse crests found"
    lo, hi = np.percentile(y, [1, 99])
    if hi > lo:
        pad = 0.1 * (hi - lo)
        ax.set_ylim(lo - pad, hi + pad)
    ax.set_xlim(0, x[-1])
    ax.set_xlabel("distance behind the vessel (m)")
    ax.set_ylabel("intensity (scene units)")
    ax.set_title(title, fontsize=8.5)
    ax.legend(loc="upper right", fontsize=7, framealpha=0.8)
    return fig
