"""Scenes that look like a push-broom multispectral sensor (Sentinel-2-like), with known truth.

The linear-theory renderer (:mod:`.scene_maker`) draws crisp Kelvin crests; real 10 m scenes mostly show
other things.  This maker keeps the same linear-theory wave pattern (so its truth still holds) and adds
what a real optical sensor records:

* four bands named B02, B03, B04 and B08, surface reflectance x 10 000 in uint16 (as Level-2A products);
  12-bit radiometry (steps of 1e-4 reflectance) and a noise floor;
* a wind sea from the JONSWAP spectrum (Hasselmann et al. 1973) with cos^2s spreading, its waves moving
  by their own phase speed between bands;
* sun glint as a linearised brightness change with the surface slope toward the sun (facets tilted toward
  the specular direction are brighter; Cox & Munk 1954), scaled by ``glint_gain``;
* a foam band (turbulent wake) behind each hull that widens and fades with distance and is far brighter
  than the waves, fixed in the water;
* the hull (and the Kelvin pattern, which is steady in the hull's frame) moving between bands: band b
  is recorded ``band_times_s[b]`` after B02, so the hull is ``U * t_b`` further along its track;
* sensor blur as a Gaussian modulation transfer function with the given value at the Nyquist frequency;
* optionally a straight coast of land in the box.

Band timing: B04 is 1.005 s after B02 (published; see :mod:`wakemeter.scene.sensor`).  B03 and B08 are
drawn at the midpoint (0.5025 s); that is a choice of this renderer, not a published value, and the
analysis never uses those two bands' timing.

References
----------
1. Hasselmann, K. et al. (1973). Measurements of wind-wave growth and swell decay during the Joint North
   Sea Wave Project (JONSWAP). *Dtsch. Hydrogr. Z.* A8(12) (spectrum and fetch laws, from memory:
   alpha = 0.076 (U^2 / (F g))^0.22, omega_p = 22 (g^2 / (U F))^(1/3), gamma = 3.3, sigma 0.07 / 0.09).
2. Cox, C. & Munk, W. (1954). Measurement of the roughness of the sea surface from photographs of the
   sun's glitter. *J. Opt. Soc. Am.* 44(11), 838-850.
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import asdict, dataclass, field

import numpy as np
import scipy.fft as sfft
from scipy import ndimage

from ..errors import ParameterError
from ..physics.units import KNOT_MPS
from ..scene import geodesy
from .imaging import mtf_sigma_px as _mtf_sigma_px
from .imaging import sensor_blur
from .scene_maker import RenderedScene, SceneSpec, _grid_direction, render_grid, truth_header, vessel_wave_slopes
from .wavefield import hull_pressure

BANDS = ("B02", "B03", "B04", "B08")
#: B02 -> B04 is published (1.005 s); B03 and B08 at the midpoint are this renderer's choice (see module text)
S2_LIKE_TIMES_S = (0.0, 0.5025, 1.005, 0.5025)


@dataclass(frozen=True)
class MultispectralLook:
    """How the sensor and the sea look (reflectances are fractions; 1 = a perfect white reflector)."""

    band_times_s: tuple[float, ...] = S2_LIKE_TIMES_S
    water: tuple[float, ...] = (0.045, 0.030, 0.012, 0.006)  #: clear open water, B02 B03 B04 B08
    foam: tuple[float, ...] = (0.25, 0.25, 0.22, 0.15)  #: fresh foam at the stern
    hull: tuple[float, ...] = (0.30, 0.30, 0.30, 0.28)
    land: tuple[float, ...] = (0.08, 0.10, 0.12, 0.30)
    glint_gain: float = 0.05  #: reflectance change per unit slope toward the sun
    sun_azimuth_deg: float = 150.0
    wind_mps: float = 7.0  #: JONSWAP wind speed (0: no wind sea)
    wind_direction_deg: float = 60.0  #: true direction the wind sea travels toward
    fetch_km: float = 40.0
    spreading_s: float = 6.0
    foam_decay_lengths: float = 5.0  #: foam fades over this many hull lengths
    mtf_nyquist: float = 0.3  #: sensor modulation transfer at the Nyquist frequency
    noise: float = 0.0015  #: reflectance noise (standard deviation)
    coast_distance_m: float | None = None  #: a straight coast this far from the first vessel (None: open sea)
    coast_bearing_deg: float = 90.0  #: true bearing from the vessel to the nearest point of the coast

    def __post_init__(self) -> None:
        n = len(BANDS)
        for name in ("band_times_s", "water", "foam", "hull", "land"):
            if len(getattr(self, name)) != n:
                raise ParameterError(f"{name} needs {n} values (bands {', '.join(BANDS)})")
        if not 0 < self.mtf_nyquist < 1:
            raise ParameterError(f"mtf_nyquist must be within (0, 1), got {self.mtf_nyquist!r}")
        if self.wind_mps < 0 or self.fetch_km <= 0 or self.noise < 0 or self.glint_gain < 0:
            raise ParameterError("wind_mps, noise and glint_gain must be >= 0 and fetch_km > 0")


@dataclass(frozen=True)
class MultispectralScene:
    rendered: RenderedScene
    band_names: tuple[str, ...] = field(default=BANDS)


def jonswap_slopes(
    shape: tuple[int, int],
    *,
    dx_m: float,
    dy_m: float,
    wind_mps: float,
    fetch_km: float,
    direction_xy: tuple[float, float],
    spreading_s: float,
    times_s: tuple[float, ...],
    g: float,
    rng: np.random.Generator,
) -> Iterator[tuple[np.ndarray, np.ndarray]]:
    """Surface slopes (d/dx, d/dy up) of one JONSWAP wind sea at each time (deep water, linear)."""
    ny, nx = shape
    # the spectrum in single precision (a 1024² scene's temporaries: 4 MB each instead of 8)
    kx = (2 * np.pi * sfft.fftfreq(nx, dx_m)[None, :]).astype(np.float32)
    ky = (-2 * np.pi * sfft.fftfreq(ny, dy_m)[:, None]).astype(np.float32)
    k = np.hypot(kx, ky)
    k[0, 0] = np.inf
    omega = np.sqrt(g * k)
    f = fetch_km * 1000.0
    alpha = 0.076 * (wind_mps**2 / (f * g)) ** 0.22
    wp = 22.0 * (g * g / (wind_mps * f)) ** (1.0 / 3.0)
    sig = np.where(omega <= wp, 0.07, 0.09)
    with np.errstate(over="ignore", divide="ignore", invalid="ignore"):
        s_w = (
            alpha
            * g
            * g
            * omega**-5
            * np.exp(-1.25 * (wp / omega) ** 4)
            * 3.3 ** np.exp(-((omega - wp) ** 2) / (2 * sig**2 * wp**2))
        )
        s_k = s_w * g / (2 * omega) / k  # S(omega) d(omega)/dk, per unit area of the (kx, ky) plane
    ang = np.arctan2(ky, kx) - np.arctan2(direction_xy[1], direction_xy[0])
    spread = np.clip(np.cos(ang), 0.0, None) ** (2 * spreading_s)
    dtheta = np.diff(np.linspace(-np.pi, np.pi, 721))[0]
    norm = np.sum(np.clip(np.cos(np.linspace(-np.pi, np.pi, 720)), 0, None) ** (2 * spreading_s)) * dtheta
    s2 = np.nan_to_num(s_k * spread / norm)
    del s_w, s_k, spread, ang, sig, k  # the spectrum's pieces (memory: a 1024^2 scene holds 8-16 MB each)
    dk = (2 * np.pi / (nx * dx_m)) * (2 * np.pi / (ny * dy_m))
    # one-sided random modes (the spreading keeps only directions downwind): the real part of the inverse FFT
    # holds cos waves of amplitude |z| / (nx ny), whose variance a^2 / 2 is S dk
    amp = (np.sqrt(2 * s2 * dk) * (nx * ny)).astype(np.float32)
    del s2
    phase = (2 * np.pi * rng.random((ny, nx))).astype(np.float32)
    omega = np.where(np.isfinite(omega), omega, 0.0)
    for t in times_s:  # one time at a time: the caller adds each to its band and lets it go
        z = amp * np.exp(1j * (phase - omega * t))
        sx = np.real(sfft.ifft2(1j * kx * z, workers=-1))
        sy = np.real(sfft.ifft2(1j * ky * z, workers=-1))
        del z
        yield sx, sy


def foam_band(x: np.ndarray, y: np.ndarray, heading_xy: tuple[float, float], *, hull, decay_m: float) -> np.ndarray:
    """Foam cover (0..1) behind a hull centred at the origin: one beam wide at the stern, widening slowly
    (as the square root of the distance, like a turbulent wake; common practice, no source) and fading
    exponentially with distance."""
    ux, uy = heading_xy
    behind = -(x * ux + y * uy) - hull.length_m / 2
    lateral = -x * uy + y * ux
    b = np.clip(behind, 0, None)
    width = hull.beam_m * (0.5 + 0.08 * np.sqrt(b / hull.beam_m))
    cover = np.exp(-0.5 * (lateral / width) ** 2) * np.exp(-b / decay_m)
    return np.where(behind > -0.1 * hull.length_m, cover, 0.0)


def _hull_cover(shape, dx: float, dy: float, col: float, row: float, heading_xy, hull, g: float) -> np.ndarray:
    """Share (0..1) of each pixel covered by the hull centred at (col, row): the pressure patch averaged over
    a 5 x 5 grid inside each pixel (a sensor integrates over its pixel; point samples would alias a hull a few
    pixels long and make its sub-pixel motion between bands jump)."""
    out = np.zeros(shape)
    reach = int(np.ceil(hull.length_m / min(dx, dy))) + 3
    r0, r1 = max(int(row) - reach, 0), min(int(row) + reach + 1, shape[0])
    c0, c1 = max(int(col) - reach, 0), min(int(col) + reach + 1, shape[1])
    if r0 >= r1 or c0 >= c1:
        return out
    sub = (np.arange(5) + 0.5) / 5
    rr = (np.arange(r0, r1)[:, None] + sub[None, :]).ravel()
    cc = (np.arange(c0, c1)[:, None] + sub[None, :]).ravel()
    x = (cc[None, :] - col) * dx
    y = -(rr[:, None] - row) * dy
    p = hull_pressure(x, y, heading_xy, hull, g=g)
    p = p / p.max() if p.max() > 0 else p
    out[r0:r1, c0:c1] = p.reshape(r1 - r0, 5, c1 - c0, 5).mean(axis=(1, 3))
    return out


def _bands(look, shape, slopes_x, slopes_y, foam, hulls, land, sun, sigma, rng) -> np.ndarray:
    """The four bands' pixels (reflectance x 10 000, uint16) from the slopes, foam, hulls and land."""
    data = np.zeros((len(BANDS), *shape), np.uint16)
    for b in range(len(BANDS)):
        tilt = slopes_x[b] * sun[0] + slopes_y[b] * sun[1]
        refl = look.water[b] + look.glint_gain * tilt
        refl = refl + (look.foam[b] - look.water[b]) * foam
        refl = refl + (look.hull[b] - refl) * hulls[b]
        if land.any():
            texture = look.land[b] * (1 + 0.15 * ndimage.gaussian_filter(rng.normal(0, 1, shape), 2.0))
            refl = np.where(land, texture, refl)
        refl = sensor_blur(refl, sigma)
        refl = refl + rng.normal(0.0, look.noise, shape)
        data[b] = np.clip(np.round(refl * 10_000), 0, 4095 * 4).astype(np.uint16)
    return data


def render_multispectral(spec: SceneSpec, look: MultispectralLook) -> MultispectralScene:
    """Render ``spec`` (its vessels, depth and position; its ``imaging`` is replaced by ``look``)."""
    rng, georef, shape, centre, dx, dy, g, xm, ym_up = render_grid(spec)
    nb = len(BANDS)
    # single precision per band (the pixels are quantised to 1e-4 reflectance): a 1024² scene's four bands of
    # slopes and hulls fit in 48 MB instead of 96
    slopes_x: list[np.ndarray] = []
    slopes_y: list[np.ndarray] = []
    hulls: list[np.ndarray] = []
    truth_vessels = []
    for v in spec.vessels:
        col, row, _frame, (ux, uy), gx, gy = vessel_wave_slopes(spec, georef, v, shape, dx, dy, g)
        spectra = (sfft.fft2(gx), sfft.fft2(gy))  # once per vessel; each band shifts them
        del gx, gy
        if not slopes_x:  # made after the first wave field, whose padded grid is the largest thing held
            slopes_x, slopes_y, hulls = ([np.zeros(shape, np.float32) for _ in range(nb)] for _ in range(3))
            foam = np.zeros(shape, np.float32)
        band_px = []
        for b, t in enumerate(look.band_times_s):
            shift_x, shift_y = v.speed_mps * t * ux, v.speed_mps * t * uy  # metres, y up
            sh = (-shift_y / dy, shift_x / dx)  # (rows, cols)
            # the Kelvin pattern is steady in the hull's frame: it moves with the hull between bands
            slopes_x[b] += np.real(sfft.ifft2(ndimage.fourier_shift(spectra[0], sh))).astype(np.float32)
            slopes_y[b] += np.real(sfft.ifft2(ndimage.fourier_shift(spectra[1], sh))).astype(np.float32)
            np.maximum(
                hulls[b], _hull_cover(shape, dx, dy, col + sh[1], row + sh[0], (ux, uy), v.hull, g), out=hulls[b]
            )
            band_px.append([col + sh[1], row + sh[0]])
        del spectra
        # foam stays where it was made; it reaches the stern as it is at the middle of the recording
        tm = 0.5 * (min(look.band_times_s) + max(look.band_times_s))
        # in single precision (the foam's cover is a smooth fraction): its temporaries are half the size
        rel_x = np.subtract(xm, col * dx + v.speed_mps * tm * ux, dtype=np.float32)
        rel_y = np.add(ym_up, row * dy - v.speed_mps * tm * uy, dtype=np.float32)
        np.maximum(
            foam,
            foam_band(rel_x, rel_y, (ux, uy), hull=v.hull, decay_m=look.foam_decay_lengths * v.hull.length_m),
            out=foam,
        )
        del rel_x, rel_y
        truth_vessels.append(
            {
                "name": v.name,
                "lon": v.lon,
                "lat": v.lat,
                "pixel_col": col,
                "pixel_row": row,
                "speed_mps": v.speed_mps,
                "speed_knots": v.speed_mps / KNOT_MPS,
                "heading_deg": v.heading_deg % 360,
                "hull_length_m": v.hull.length_m,
                "hull_beam_m": v.hull.beam_m,
                "hull_pixel_per_band": dict(zip(BANDS, band_px)),
                "speed_over_ground_mps": v.speed_mps,
            }
        )
    if not slopes_x:  # no vessel: the sea alone
        slopes_x, slopes_y, hulls = ([np.zeros(shape, np.float32) for _ in range(nb)] for _ in range(3))
        foam = np.zeros(shape, np.float32)
    if look.wind_mps > 0:
        sea = jonswap_slopes(
            shape,
            dx_m=dx,
            dy_m=dy,
            wind_mps=look.wind_mps,
            fetch_km=look.fetch_km,
            direction_xy=_grid_direction(centre, look.wind_direction_deg),
            spreading_s=look.spreading_s,
            times_s=look.band_times_s,
            g=g,
            rng=rng,
        )
        for b, (sx, sy) in enumerate(sea):
            slopes_x[b] += sx
            slopes_y[b] += sy
        del sea, sx, sy
    land = np.zeros(shape, bool)
    if look.coast_distance_m is not None and spec.vessels:
        c0, r0 = (float(a) for a in geodesy.lonlat_to_pixel(georef, spec.vessels[0].lon, spec.vessels[0].lat))
        cx, cy = _grid_direction(centre, look.coast_bearing_deg)
        along = (xm - c0 * dx) * cx + (ym_up + r0 * dy) * cy
        land = along >= look.coast_distance_m
    sigma = _mtf_sigma_px(look.mtf_nyquist)
    sun = _grid_direction(centre, look.sun_azimuth_deg)
    data = _bands(look, shape, slopes_x, slopes_y, foam, hulls, land, sun, sigma, rng)
    truth = {
        **truth_header(spec, georef, g),
        "imaging": {"kind": "multispectral", "bands": list(BANDS), **asdict(look), "mtf_sigma_px": sigma},
        "vessels": truth_vessels,
    }
    return MultispectralScene(RenderedScene(data, georef, truth))
