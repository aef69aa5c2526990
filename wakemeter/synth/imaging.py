"""Imaging models that turn a wave field into optical or radar pixels.

Optical: brightness follows the surface slope along the sun's horizontal
direction (shading), plus foam along the track; the hull is an opaque white
deck over the water it covers; sensor noise; quantised to uint8 or uint16.

Radar: backscatter is modulated by the slope along the look direction (tilt
modulation), darkened along the turbulent wake, with a bright hull and
multiplicative speckle (gamma distributed, mean 1, for ``looks`` looks);
float32 linear intensity.

Both see the scene through the sensor's point-spread function, a Gaussian whose modulation transfer at the
Nyquist frequency is 0.2 (``psf_sigma_px`` 0.57 px): imagers are specified near 0.1-0.3 there (from memory;
Sentinel-2's requirement is of that order).  Without it, waves near two pixels long, which a pixel averages
away, came out as black-and-white checkerboards around small slow hulls.

These are simple, documented models for tests and demos, not sensor simulators.

References
----------
1. Alpers, W. & Hasselmann, K. (1978). The two-frequency microwave technique
   for measuring ocean-wave spectra from an airplane or satellite.
   *Boundary-Layer Meteorology* 13, 215-230 (tilt modulation, from memory).
2. Goodman, J. W. (1976). Some fundamental properties of speckle.
   *J. Opt. Soc. Am.* 66, 1145-1150 (multi-look intensity is gamma distributed).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.fft as sfft
from scipy import ndimage

from ..errors import ParameterError


@dataclass(frozen=True)
class OpticalModel:
    """Optical imaging: sun azimuth (true, deg), shading gain, foam, noise and output type."""

    sun_azimuth_deg: float = 135.0
    shading_gain: float = 1.0
    foam: float = 0.6
    noise_std: float = 0.02
    dtype: str = "uint8"
    psf_sigma_px: float = 0.0  #: the sensor's Gaussian blur, pixels (0: none, a perfect sensor)

    def __post_init__(self) -> None:
        if self.dtype not in ("uint8", "uint16"):
            raise ParameterError(f"optical dtype must be 'uint8' or 'uint16', got {self.dtype!r}")
        if self.noise_std < 0 or self.foam < 0 or self.shading_gain <= 0 or not 0 <= self.psf_sigma_px <= 5:
            raise ParameterError(
                "noise_std and foam must be >= 0, shading_gain > 0 and psf_sigma_px within [0, 5], got "
                f"{self.noise_std!r}, {self.foam!r}, {self.shading_gain!r}, {self.psf_sigma_px!r}"
            )


@dataclass(frozen=True)
class RadarModel:
    """Radar imaging geometry and look.

    ``look_bearing_deg`` is the true bearing from the radar toward the scene
    (across track); the platform flies at look - 90 deg (right-looking).
    """

    look_bearing_deg: float = 80.0
    incidence_deg: float = 35.0
    looks: int = 4
    tilt_gain: float = 1.0
    wake_darkening: float = 0.6
    hull_brightness: float = 40.0
    slant_range_m: float = 850_000.0
    platform_speed_mps: float = 7_500.0
    hull_displacement: bool = True
    #: narrow bright V behind the vessel (Bragg-scattering waves along two lines a few degrees off the
    #: track; seen in radar only).  0 = none.  Brightness is relative to the calm backscatter.
    narrow_v_half_angle_deg: float = 0.0
    narrow_v_brightness: float = 1.0
    psf_sigma_px: float = 0.0  #: the radar's impulse response as a Gaussian blur, pixels (0: none)
    #: order nu of K-distributed sea clutter: the backscatter is modulated by a gamma texture of mean 1 and
    #: shape nu (small nu: spiky, heavy-tailed clutter; Ward 1981, Electronics Letters 17(16), from memory);
    #: 0 = no texture (plain speckle)
    clutter_shape: float = 0.0
    clutter_corr_px: float = 2.0  #: correlation length of that texture, pixels
    #: peak sidelobe level of a bright target, relative to its peak (intensity; 0.01 = -20 dB): the impulse
    #: response's sidelobes draw a cross along the range (look) and azimuth (flight) directions, this level at
    #: the first pixel and falling as 1/k^2 beyond (a sinc^2's envelope; from memory).  0 = none
    sidelobe_level: float = 0.0
    sidelobe_extent_px: int = 96  #: how far the cross's arms are drawn, pixels
    wake_width_factor: float = 1.0  #: the dark turbulent wake's width relative to the usual (beam-sized)

    def __post_init__(self) -> None:
        if not (0 <= self.clutter_shape <= 100 and 0.5 <= self.clutter_corr_px <= 20):
            raise ParameterError(
                f"clutter_shape must be within [0, 100] and clutter_corr_px within [0.5, 20], got "
                f"{self.clutter_shape!r} and {self.clutter_corr_px!r}"
            )
        if not (0 <= self.sidelobe_level < 0.5 and 4 <= self.sidelobe_extent_px <= 512):
            raise ParameterError(
                f"sidelobe_level must be within [0, 0.5) and sidelobe_extent_px within [4, 512], got "
                f"{self.sidelobe_level!r} and {self.sidelobe_extent_px!r}"
            )
        if not 0.1 <= self.wake_width_factor <= 10:
            raise ParameterError(f"wake_width_factor must be within [0.1, 10], got {self.wake_width_factor!r}")
        if not 0 < self.incidence_deg < 90:
            raise ParameterError(f"incidence_deg must be within (0, 90), got {self.incidence_deg!r}")
        if not isinstance(self.looks, int) or self.looks < 1:
            raise ParameterError(f"looks must be an integer >= 1, got {self.looks!r}")
        if not 0 <= self.wake_darkening < 1:
            raise ParameterError(f"wake_darkening must be within [0, 1), got {self.wake_darkening!r}")
        if self.slant_range_m <= 0 or self.platform_speed_mps <= 0:
            raise ParameterError("slant_range_m and platform_speed_mps must be > 0")
        if not 0 <= self.psf_sigma_px <= 5:
            raise ParameterError(f"psf_sigma_px must be within [0, 5], got {self.psf_sigma_px!r}")
        if not 0 <= self.narrow_v_half_angle_deg < 15 or self.narrow_v_brightness < 0:
            raise ParameterError(
                "narrow_v_half_angle_deg must be within [0, 15) deg and narrow_v_brightness >= 0, "
                f"got {self.narrow_v_half_angle_deg!r} and {self.narrow_v_brightness!r}"
            )

    @property
    def flight_bearing_deg(self) -> float:
        return (self.look_bearing_deg - 90.0) % 360.0


@dataclass(frozen=True)
class AmbientSea:
    """Random directional sea: peak wavelength (m), direction waves travel toward (true, deg),
    cos^2s spreading exponent ``spreading_s`` and rms slope relative to the wake's."""

    peak_wavelength_m: float = 60.0
    direction_deg: float = 45.0
    spreading_s: float = 8.0
    strength: float = 0.5

    def __post_init__(self) -> None:
        if self.peak_wavelength_m <= 0 or self.spreading_s <= 0 or self.strength < 0:
            raise ParameterError("ambient sea needs peak_wavelength_m > 0, spreading_s > 0 and strength >= 0")


def ambient_slopes(
    shape: tuple[int, int],
    *,
    dx_m: float,
    dy_m: float,
    sea: AmbientSea,
    direction_xy: tuple[float, float],
    rng: np.random.Generator,
) -> tuple[np.ndarray, np.ndarray]:
    """Slopes (d/dx, d/dy up) of a random sea with unit rms slope; x right, y up."""
    ny, nx = shape
    kx = 2 * np.pi * sfft.fftfreq(nx, dx_m)[None, :]
    ky = -2 * np.pi * sfft.fftfreq(ny, dy_m)[:, None]
    k = np.hypot(kx, ky)
    kp = 2 * np.pi / sea.peak_wavelength_m
    ang = np.arctan2(ky, kx) - np.arctan2(direction_xy[1], direction_xy[0])
    spread = np.clip(np.cos(ang), 0.0, None) ** (2 * sea.spreading_s)
    amp = np.exp(-0.5 * ((k - kp) / (0.25 * kp)) ** 2) * spread
    phase = np.exp(2j * np.pi * rng.random((ny, nx)))
    z = amp * phase
    sx = np.real(sfft.ifft2(1j * kx * z, workers=-1))
    sy = np.real(sfft.ifft2(1j * ky * z, workers=-1))
    rms = np.sqrt(np.mean(sx**2 + sy**2)) or 1.0
    return sx / rms, sy / rms


def track_profile(
    x: np.ndarray, y: np.ndarray, heading_xy: tuple[float, float], *, beam_m: float, length_m: float, decay_m: float
) -> np.ndarray:
    """Turbulent-wake strength (0..1) behind a vessel at the origin: narrow, widening, fading."""
    ux, uy = heading_xy
    behind = -(x * ux + y * uy) - length_m / 2
    lateral = -x * uy + y * ux
    width = beam_m * (0.6 + 0.02 * np.sqrt(np.clip(behind, 0, None) * beam_m))
    prof = np.exp(-0.5 * (lateral / width) ** 2) * np.exp(-np.clip(behind, 0, None) / decay_m)
    return np.where(behind > -length_m / 2, prof, 0.0) * np.clip((behind + length_m / 2) / length_m, 0, 1)


def narrow_v_profile(
    x: np.ndarray,
    y: np.ndarray,
    heading_xy: tuple[float, float],
    *,
    half_angle_deg: float,
    width_m: float,
    length_m: float,
    decay_m: float,
) -> np.ndarray:
    """Strength (0..1) of a narrow V: two thin lines from the stern at +/- ``half_angle_deg``, fading."""
    ux, uy = heading_xy
    behind = -(x * ux + y * uy) - length_m / 2
    lateral = -x * uy + y * ux
    t = np.tan(np.radians(half_angle_deg))
    b = np.clip(behind, 0, None)
    lines = np.maximum(
        np.exp(-0.5 * ((lateral - b * t) / width_m) ** 2), np.exp(-0.5 * ((lateral + b * t) / width_m) ** 2)
    )
    return np.where(behind > 0, lines * np.exp(-b / decay_m) * np.clip(b / length_m, 0, 1), 0.0)


def sensor_blur(img: np.ndarray, sigma_px: float) -> np.ndarray:
    """The Gaussian MTF of ``sigma_px`` pixels applied exactly in the Fourier domain (a sampled kernel this
    narrow would not have the stated transfer); single precision; 0 leaves the image as it is."""
    if sigma_px <= 0:
        return img
    return np.real(sfft.ifft2(ndimage.fourier_gaussian(sfft.fft2(img.astype(np.float32)), sigma_px)))


def mtf_sigma_px(mtf_nyquist: float) -> float:
    """Gaussian blur whose transfer at 0.5 cycles per pixel is ``mtf_nyquist``: exp(-2 pi^2 s^2 f^2)."""
    return float(np.sqrt(-np.log(mtf_nyquist) / (2 * np.pi**2 * 0.25)))


#: a deck's brightness (white paint: with the sun on it the brightest thing on the water, at or near the top of
#: an 8-bit scene's range)
DECK = 1.0


def optical_pixels(
    slope_sun: np.ndarray, foam: np.ndarray, hull: np.ndarray, model: OpticalModel, rng: np.random.Generator
) -> np.ndarray:
    """Quantised optical brightness from the slope along the sun direction (unit rms), foam and hull masks.
    The hull is opaque: where it covers the water (``hull`` near 1) its deck is seen, not the water's shading
    or foam beneath it."""
    cover = np.clip(hull, 0.0, 1.0)
    water = 0.35 + 0.12 * model.shading_gain * slope_sun + model.foam * 0.4 * foam
    b = water * (1.0 - cover) + DECK * cover
    b = sensor_blur(b, model.psf_sigma_px) + rng.normal(0.0, model.noise_std, b.shape)
    top = 255 if model.dtype == "uint8" else 4095  # 12-bit data in uint16, as many sensors deliver
    return np.clip(np.round(b * top), 0, top).astype(model.dtype)


def clutter_texture(shape: tuple[int, ...], nu: float, corr_px: float, rng: np.random.Generator) -> np.ndarray:
    """A gamma texture of mean 1 and shape ``nu``, correlated over about ``corr_px`` pixels: a smoothed
    Gaussian field mapped through its normal quantiles onto the gamma distribution (so each pixel's value is
    exactly gamma distributed; times speckle, the intensity is K distributed)."""
    from scipy import special, stats

    g = ndimage.gaussian_filter(rng.standard_normal(shape), corr_px, mode="wrap")
    g = g / max(float(g.std()), 1e-12)
    u = np.clip(special.ndtr(g), 1e-9, 1 - 1e-9)
    return stats.gamma.ppf(u, nu, scale=1.0 / nu).astype(np.float32)


def sidelobe_cross(bright: np.ndarray, look_xy: tuple[float, float], model: RadarModel) -> np.ndarray:
    """The sidelobes of the brightest targets (90 % of the peak or more): their intensity times
    ``sidelobe_level (1.5 / (k + 0.5))^2`` at k = 1..extent pixels along the range and azimuth directions, both
    ways (the envelope of a sinc^2 impulse response, from memory; ``sidelobe_level`` at k = 1)."""
    from scipy.signal import fftconvolve

    n = int(model.sidelobe_extent_px)
    size = 2 * n + 1
    kern = np.zeros((size, size), dtype=np.float64)
    lx, ly = look_xy
    for ax, ay in ((lx, ly), (-ly, lx)):  # range, then azimuth (perpendicular)
        for k in range(1, n + 1):
            level = model.sidelobe_level * (1.5 / (k + 0.5)) ** 2  # 1 at k = 1, then as 1/k^2
            for sign in (1, -1):
                c = n + sign * k * ax
                r = n - sign * k * ay  # grid y is north, rows run south
                c0, r0 = int(np.floor(c)), int(np.floor(r))
                fc, fr = c - c0, r - r0
                for dc, dr, w in (
                    (0, 0, (1 - fc) * (1 - fr)),
                    (1, 0, fc * (1 - fr)),
                    (0, 1, (1 - fc) * fr),
                    (1, 1, fc * fr),
                ):
                    if 0 <= c0 + dc < size and 0 <= r0 + dr < size:
                        kern[r0 + dr, c0 + dc] += level * w
    peak = np.where(bright >= 0.9 * bright.max(), bright, 0.0) if bright.max() > 0 else bright
    return np.clip(fftconvolve(peak, kern, mode="same"), 0.0, None)


def radar_pixels(
    slope_look: np.ndarray,
    wake: np.ndarray,
    hull: np.ndarray,
    model: RadarModel,
    rng: np.random.Generator,
    narrow_v: np.ndarray | None = None,
    look_xy: tuple[float, float] | None = None,
) -> np.ndarray:
    """Float32 linear backscatter with speckle from the slope along the look direction (unit rms);
    ``look_xy``: the look direction on the grid (x east, y north), for the sidelobe cross."""
    sigma0 = 0.05
    s = sigma0 * np.clip(1.0 + 0.5 * model.tilt_gain * slope_look, 0.05, None)
    s = s * (1.0 - model.wake_darkening * wake) + sigma0 * model.hull_brightness * hull
    if narrow_v is not None:
        s = s + sigma0 * model.narrow_v_brightness * narrow_v
    if model.sidelobe_level > 0 and look_xy is not None:
        s = s + sidelobe_cross(sigma0 * model.hull_brightness * hull, look_xy, model)
    s = sensor_blur(s, model.psf_sigma_px)
    if model.clutter_shape > 0:
        s = s * clutter_texture(s.shape, model.clutter_shape, model.clutter_corr_px, rng)
    speckle = rng.gamma(model.looks, 1.0 / model.looks, s.shape)
    out = (s * speckle).astype(np.float32)
    # keep 10 mantissa bits (0.1 % precision, far below speckle) so scenes compress well
    return (out.view(np.uint32) & np.uint32(0xFFFFE000)).view(np.float32)
