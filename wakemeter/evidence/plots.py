"""Small plots for the report, drawn with OpenCV (no plotting library needed, same pixels every time).

* the whitened wave spectrum behind the vessel with the fitted steady-wave curve
  (k . U)^2 = g |k| tanh(|k| h) drawn over it;
* the intensity profile along the track with the measured transverse crest spacing.
"""

from __future__ import annotations

import cv2
import numpy as np

from ..detect.result import WakeAnalysis


def spectrum_plot(analysis: WakeAnalysis, *, size: int = 520) -> np.ndarray | None:
    p = analysis.plots
    if p is None:
        return None
    white = p.whitened_spectrum
    z = np.clip((white + 2.0) / 8.0, 0, 1)
    img = cv2.applyColorMap((z * 255).astype(np.uint8), cv2.COLORMAP_VIRIDIS)[..., ::-1]
    n_v, n_u = white.shape
    img = cv2.resize(img, (size, size), interpolation=cv2.INTER_NEAREST)
    sx, sy = size / n_u, size / n_v
    dk_u, dk_v = p.spectrum_dk
    u, h = p.fit_speed_mps, p.fit_depth_m
    ku, kv = p.fitted_curve
    for sign in (1, -1):
        cu = n_u / 2 + sign * ku / dk_u
        cv = n_v / 2 + sign * kv / dk_v
        ok = np.isfinite(cu) & np.isfinite(cv) & (cu >= 0) & (cu < n_u) & (cv >= 0) & (cv < n_v)
        pts = np.stack([(cu[ok] + 0.5) * sx, (cv[ok] + 0.5) * sy], axis=1).astype(np.int32)
        if len(pts) > 1:
            cv2.polylines(img, [pts], False, (255, 60, 60), 2, cv2.LINE_AA)
    img = np.ascontiguousarray(img)
    cv2.putText(img, "k along track ->", (8, size - 10), cv2.FONT_HERSHEY_SIMPLEX, 0.5, (255, 255, 255), 1, cv2.LINE_AA)
    cv2.putText(
        img,
        f"fitted curve: U = {u:.2f} m/s" + ("" if np.isinf(h) else f", h = {h:.1f} m"),
        (8, 20),
        cv2.FONT_HERSHEY_SIMPLEX,
        0.5,
        (255, 255, 255),
        1,
        cv2.LINE_AA,
    )
    return img


def profile_plot(analysis: WakeAnalysis, *, width: int = 760, height: int = 260) -> np.ndarray | None:
    p = analysis.plots
    if p is None or len(p.profile) < 4:
        return None
    prof, m = p.profile, p.profile_m_per_px
    img = np.full((height, width, 3), 255, np.uint8)
    x = np.arange(len(prof)) * m
    y = np.asarray(prof, float)
    lo, hi = np.percentile(y, [1, 99])
    hi = hi if hi > lo else lo + 1
    pad = 30
    xs = pad + (x / max(x[-1], 1e-9)) * (width - 2 * pad)
    ys = height - pad - (np.clip(y, lo, hi) - lo) / (hi - lo) * (height - 2 * pad)
    cv2.polylines(img, [np.stack([xs, ys], 1).astype(np.int32)], False, (40, 40, 40), 1, cv2.LINE_AA)
    lam = p.transverse_wavelength_m
    if lam:
        for xm in np.arange(0, x[-1], lam):
            xx = int(pad + xm / x[-1] * (width - 2 * pad))
            cv2.line(img, (xx, pad), (xx, height - pad), (255, 60, 170), 1)
        label = f"transverse crest spacing {lam:.1f} m"
    else:
        label = "no regular transverse crests found"
    cv2.putText(
        img,
        f"intensity along the track behind the vessel (0 - {x[-1]:.0f} m); {label}",
        (pad, 20),
        cv2.FONT_HERSHEY_SIMPLEX,
        0.45,
        (0, 0, 0),
        1,
        cv2.LINE_AA,
    )
    return img
