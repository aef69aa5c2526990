"""From wake measurements to speed estimates with 95 % intervals.

Each estimator takes measurements as :class:`Uncertain` values (value and
standard uncertainty) plus the :class:`Conditions` they were made under
(gravity, depth, pixel-size uncertainty) and propagates every uncertainty by
Monte Carlo with a seeded generator (JCGM 101:2008).  Independent estimates
are combined by inverse-variance weighting with a chi-square consistency test;
disagreement is reported, not averaged away.

References
----------
1. JCGM 101:2008. Evaluation of measurement data - Supplement 1 to the "Guide
   to the expression of uncertainty in measurement" - Propagation of
   distributions using a Monte Carlo method.
2. JCGM 100:2008 (GUM), section 5 (law of propagation of uncertainty).
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from enum import StrEnum

import numpy as np

from ..errors import ParameterError
from . import havelock, kelvin, radar
from .dispersion import phase_speed
from .gravity import STANDARD_GRAVITY
from .units import KNOT_MPS

DEFAULT_DRAWS = 100_000


@dataclass(frozen=True)
class Uncertain:
    """A measured value with its standard uncertainty (same unit)."""

    value: float
    std: float

    def __post_init__(self) -> None:
        if not np.isfinite(self.value):
            raise ParameterError(f"measured value must be finite, got {self.value!r}")
        if not np.isfinite(self.std) or self.std < 0:
            raise ParameterError(f"standard uncertainty must be finite and >= 0, got {self.std!r}")


@dataclass(frozen=True)
class Conditions:
    """What the measurements assume.

    ``g_mps2`` defaults to standard gravity with 0.015 m/s² standard
    uncertainty, which covers the WGS 84 normal gravity from equator
    (9.780) to pole (9.832) when the latitude is not used.  ``depth_m`` None
    means deep water is assumed (and said).  ``pixel_scale_rel_std`` is the
    relative standard uncertainty of the pixel size; every length scales with it.
    """

    g_mps2: Uncertain = Uncertain(STANDARD_GRAVITY, 0.015)
    depth_m: Uncertain | None = None
    pixel_scale_rel_std: float = 0.0

    def __post_init__(self) -> None:
        if self.g_mps2.value <= 0:
            raise ParameterError(f"gravity must be > 0 m/s², got {self.g_mps2.value!r}")
        if self.depth_m is not None and self.depth_m.value <= 0:
            raise ParameterError(f"depth_m must be > 0, got {self.depth_m.value!r}")
        if not np.isfinite(self.pixel_scale_rel_std) or not 0 <= self.pixel_scale_rel_std < 0.5:
            raise ParameterError(f"pixel_scale_rel_std must be within [0, 0.5), got {self.pixel_scale_rel_std!r}")

    def assumptions(self) -> tuple[str, ...]:
        out = [f"gravity {self.g_mps2.value:.4f} ± {self.g_mps2.std:.4f} m/s²"]
        if self.depth_m is None:
            out.append("deep water assumed (depth not given)")
        else:
            out.append(f"depth {self.depth_m.value:.2f} ± {self.depth_m.std:.2f} m")
        out.append(f"pixel size relative uncertainty {100 * self.pixel_scale_rel_std:.1f} %")
        out.append(
            "linear steady waves, vessel at constant speed and heading through the water (a uniform current carries "
            "the whole pattern and does not change it)"
        )
        return tuple(out)


@dataclass(frozen=True, kw_only=True)
class SpeedEstimate:
    """A speed through the water from one method, with its 95 % interval."""

    method: str
    speed_mps: float  #: median of the Monte Carlo draws
    std_mps: float
    ci95_low_mps: float
    ci95_high_mps: float
    draws: int
    valid_fraction: float  #: share of draws that gave a physical speed
    assumptions: tuple[str, ...] = field(default_factory=tuple)
    by_hand: bool = False  #: from a hand measurement (crest ruler, hand-drawn arm), not from the image analysis
    #: a speed over ground (the hull's motion against the Earth: shift between bands, radar azimuth offset), not
    #: through the water (waves move with the water)
    over_ground: bool = False

    @property
    def speed_knots(self) -> float:
        return self.speed_mps / KNOT_MPS

    @property
    def ci95_knots(self) -> tuple[float, float]:
        return self.ci95_low_mps / KNOT_MPS, self.ci95_high_mps / KNOT_MPS

    def summary(self) -> str:
        return (
            f"{self.method}: {self.speed_mps:.2f} m/s ({self.speed_knots:.1f} kn), "
            f"95 % interval {self.ci95_low_mps:.2f}-{self.ci95_high_mps:.2f} m/s "
            f"({self.ci95_knots[0]:.1f}-{self.ci95_knots[1]:.1f} kn)"
        )


def _rng(seed: int | np.random.Generator | None) -> np.random.Generator:
    return seed if isinstance(seed, np.random.Generator) else np.random.default_rng(seed)


def _draw(u: Uncertain, n: int, rng: np.random.Generator) -> np.ndarray:
    if u.std == 0:
        return np.full(n, u.value)
    return rng.normal(u.value, u.std, n)


def _check_draws(draws: int) -> None:
    if not isinstance(draws, (int, np.integer)) or draws < 100:
        raise ParameterError(f"draws must be an integer >= 100, got {draws!r}")


def _summarise(method: str, samples: np.ndarray, n: int, assumptions: tuple[str, ...]) -> SpeedEstimate:
    ok = np.isfinite(samples) & (samples > 0)
    frac = float(np.mean(ok))
    if frac < 0.5:
        raise ParameterError(
            f"{method}: only {100 * frac:.0f} % of the uncertainty draws give a physical speed; "
            "the measurements do not fit this method (check depth, angle and wavelength)"
        )
    s = samples[ok]
    lo, med, hi = np.percentile(s, [2.5, 50.0, 97.5])
    extra = () if frac > 0.999 else (f"{100 * (1 - frac):.1f} % of draws had no steady wave and were dropped",)
    return SpeedEstimate(
        method=method,
        speed_mps=float(med),
        std_mps=float(np.std(s, ddof=1)),
        ci95_low_mps=float(lo),
        ci95_high_mps=float(hi),
        draws=int(n),
        valid_fraction=frac,
        assumptions=assumptions + extra,
    )


def _common(conditions: Conditions, n: int, rng: np.random.Generator) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    g = _draw(conditions.g_mps2, n, rng)
    scale = rng.normal(1.0, conditions.pixel_scale_rel_std, n) if conditions.pixel_scale_rel_std > 0 else np.ones(n)
    if conditions.depth_m is None:
        h = np.full(n, np.inf)
    else:
        h = _draw(conditions.depth_m, n, rng)
        h = np.where(h > 0, h, np.nan)
    return g, scale, h


def _speed_from_crest(lam: np.ndarray, theta_deg: np.ndarray, h: np.ndarray, g: np.ndarray) -> np.ndarray:
    ok = (lam > 0) & np.isfinite(h) | np.isinf(h)
    ok &= (theta_deg >= 0) & (theta_deg < 89.0) & (lam > 0)
    lam_s = np.where(ok, lam, 1.0)
    h_s = np.where(ok & (np.isinf(h) | (h > 0)), h, 1.0)
    c = np.asarray(phase_speed(2 * np.pi / lam_s, h_s, g=1.0)) * np.sqrt(g)
    # phase_speed with g=1 then scaled by sqrt(g): c = sqrt(g/k tanh kh) exactly
    u = c / np.cos(np.radians(np.where(ok, theta_deg, 0.0)))
    return np.where(ok, u, np.nan)


def speed_from_transverse_wavelength(
    wavelength_m: Uncertain,
    conditions: Conditions = Conditions(),
    *,
    draws: int = DEFAULT_DRAWS,
    seed: int | np.random.Generator | None = 0,
) -> SpeedEstimate:
    """Speed from the transverse wavelength along the track (deep: U = sqrt(g lambda / 2 pi))."""
    if wavelength_m.value <= 0:
        raise ParameterError(f"transverse wavelength must be > 0 m, got {wavelength_m.value!r}")
    return speed_from_crest_wavelength(
        wavelength_m, Uncertain(0.0, 0.0), conditions, draws=draws, seed=seed, method="transverse wavelength"
    )


def speed_from_crest_wavelength(
    wavelength_m: Uncertain,
    propagation_deg: Uncertain,
    conditions: Conditions = Conditions(),
    *,
    draws: int = DEFAULT_DRAWS,
    seed: int | np.random.Generator | None = 0,
    method: str = "crest wavelength",
) -> SpeedEstimate:
    """Speed from the wavelength of a crest train propagating at angle theta to the track.

    U = c(k, h) / cos(theta); deep water U = sqrt(g lambda / 2 pi) / cos(theta).
    """
    if wavelength_m.value <= 0:
        raise ParameterError(f"wavelength_m must be > 0 m, got {wavelength_m.value!r}")
    if not 0 <= propagation_deg.value < 85:
        raise ParameterError(f"propagation angle must be within [0, 85) degrees, got {propagation_deg.value!r}")
    _check_draws(draws)
    rng = _rng(seed)
    g, scale, h = _common(conditions, draws, rng)
    lam = _draw(wavelength_m, draws, rng) * scale
    th = np.abs(_draw(propagation_deg, draws, rng))
    u = _speed_from_crest(lam, th, h, g)
    extra = (
        (f"crest propagation angle {propagation_deg.value:.1f} ± {propagation_deg.std:.1f}° to the track",)
        if propagation_deg.value > 0 or propagation_deg.std > 0
        else ()
    )
    return _summarise(method, u, draws, conditions.assumptions() + extra)


def speed_from_spectral_fit(
    speed_mps: Uncertain,
    conditions: Conditions = Conditions(),
    *,
    draws: int = DEFAULT_DRAWS,
    seed: int | np.random.Generator | None = 0,
) -> SpeedEstimate:
    """Wrap a spectral-fit speed (Zilman et al. 2004) and add the pixel-size uncertainty (U ~ sqrt(scale))."""
    if speed_mps.value <= 0:
        raise ParameterError(f"spectral-fit speed must be > 0 m/s, got {speed_mps.value!r}")
    _check_draws(draws)
    rng = _rng(seed)
    _, scale, _ = _common(conditions, draws, rng)
    u = _draw(speed_mps, draws, rng) * np.sqrt(np.clip(scale, 1e-6, None))
    return _summarise("spectral fit", u, draws, conditions.assumptions())


def speed_from_radar_offset(
    offset_m: Uncertain,
    slant_range_m: Uncertain,
    platform_speed_mps: Uncertain,
    *,
    incidence_deg: float,
    heading_deg: Uncertain,
    look_bearing_deg: float,
    conditions: Conditions = Conditions(),
    draws: int = DEFAULT_DRAWS,
    seed: int | np.random.Generator | None = 0,
) -> SpeedEstimate:
    """Speed from the hull-to-wake azimuth offset in a radar scene (Raney 1971)."""
    if slant_range_m.value <= 0 or platform_speed_mps.value <= 0:
        raise ParameterError(
            "slant_range_m and platform_speed_mps must be > 0, got "
            f"{slant_range_m.value!r} and {platform_speed_mps.value!r}"
        )
    _check_draws(draws)
    # fail early and clearly on an ill-posed geometry, also within two standard uncertainties of the heading:
    # where the projection factor can come near zero the ratio v_r / factor has no usable spread
    radar.ground_speed_from_radial(
        1.0, incidence_deg=incidence_deg, heading_deg=heading_deg.value, look_bearing_deg=look_bearing_deg
    )
    edge = radar.projection_factor(
        heading_deg.value + np.array([-2.0, 2.0]) * heading_deg.std, look_bearing_deg, incidence_deg
    )
    worst = float(edge[np.argmin(np.abs(edge))])
    if abs(worst) < radar.MIN_PROJECTION:
        raise ParameterError(
            "the vessel moves too nearly along the radar's flight direction: within two standard uncertainties "
            f"of its heading (±{2 * heading_deg.std:.1f}°) the projection factor reaches {worst:.3f}, below "
            f"{radar.MIN_PROJECTION}; the azimuth offset cannot give its speed"
        )
    rng = _rng(seed)
    _, scale, _ = _common(conditions, draws, rng)
    dx = _draw(offset_m, draws, rng) * scale
    r = _draw(slant_range_m, draws, rng)
    v = _draw(platform_speed_mps, draws, rng)
    hd = _draw(heading_deg, draws, rng)
    vr = -(v / r) * dx
    proj = radar.projection_factor(hd, look_bearing_deg, incidence_deg)
    u = np.abs(vr / proj)
    assumptions = conditions.assumptions()[2:3] + (
        f"slant range {slant_range_m.value:.0f} m, platform speed {platform_speed_mps.value:.0f} m/s, "
        f"incidence {incidence_deg:.1f}°, look bearing {look_bearing_deg:.1f}°",
        "speed over ground (the radar sees motion relative to the Earth, not the water)",
    )
    return replace(_summarise("radar azimuth offset", u, draws, assumptions), over_ground=True)


@dataclass(frozen=True)
class DepthEstimate:
    depth_m: float
    ci95_low_m: float
    ci95_high_m: float
    froude_depth: float
    froude_ci95: tuple[float, float]


def speed_and_depth_from_transverse_wavelength_and_half_angle(
    wavelength_m: Uncertain,
    half_angle_deg: Uncertain,
    conditions: Conditions = Conditions(),
    *,
    draws: int = DEFAULT_DRAWS,
    seed: int | np.random.Generator | None = 0,
) -> tuple[SpeedEstimate, DepthEstimate]:
    """Speed and depth together when the wedge is wider than Kelvin's and transverse waves exist.

    The half-angle gives Fr_h (Havelock, subcritical branch); the transverse
    waves satisfy Fr_h^2 = tanh(kh)/(kh), so kh, then h = kh / k and
    U = Fr_h sqrt(g h).
    """
    if wavelength_m.value <= 0:
        raise ParameterError(f"transverse wavelength must be > 0 m, got {wavelength_m.value!r}")
    if not kelvin.KELVIN_HALF_ANGLE_DEG < half_angle_deg.value < 90:
        raise ParameterError(
            f"half_angle_deg must be within ({kelvin.KELVIN_HALF_ANGLE_DEG:.2f}, 90) for a depth estimate, "
            f"got {half_angle_deg.value!r}"
        )
    _check_draws(draws)
    rng = _rng(seed)
    g, scale, _ = _common(conditions, draws, rng)
    lam = _draw(wavelength_m, draws, rng) * scale
    ang = _draw(half_angle_deg, draws, rng)
    fr = np.asarray(havelock.subcritical_froude_from_half_angle(ang))
    ok = np.isfinite(fr) & (lam > 0)
    kh = np.asarray(havelock.kh_from_froude(np.where(ok, fr, 0.5)))
    k = 2 * np.pi / np.where(lam > 0, lam, 1.0)
    h = np.where(ok, kh / k, np.nan)
    u = np.where(ok, fr * np.sqrt(g * h), np.nan)
    assumptions = (
        conditions.assumptions()[:1]
        + conditions.assumptions()[2:]
        + (
            f"depth inferred from the half-angle {half_angle_deg.value:.1f} ± {half_angle_deg.std:.1f}° "
            "(Havelock 1908, subcritical branch: transverse waves seen)",
        )
    )
    est = _summarise("transverse wavelength + half-angle (finite depth)", u, draws, assumptions)
    hv = h[np.isfinite(h)]
    fv = fr[np.isfinite(fr)]
    lo, med, hi = np.percentile(hv, [2.5, 50, 97.5])
    flo, fmed, fhi = np.percentile(fv, [2.5, 50, 97.5])
    return est, DepthEstimate(float(med), float(lo), float(hi), float(fmed), (float(flo), float(fhi)))


@dataclass(frozen=True, kw_only=True)
class CombinedSpeed:
    """Inverse-variance weighted speed and the chi-square consistency test."""

    speed_mps: float
    std_mps: float
    ci95_low_mps: float
    ci95_high_mps: float
    chi2: float
    dof: int
    p_value: float
    consistent: bool
    outlier: str | None  #: method standing out most when three or more are inconsistent (of two, neither)
    methods: tuple[str, ...]
    verdict: str


def speed_from_arm_angle_and_hull_length(
    arm_angle_deg: Uncertain,
    hull_length_m: Uncertain,
    conditions: Conditions,
    *,
    draws: int = 20_000,
    seed: int | np.random.Generator | None = None,
) -> SpeedEstimate:
    """Speed from the angle of the brightest arms of a fast hull and its length (deep water).

    A hull cannot make waves much longer than itself; above Fr_L ~ 0.5 the brightest arms close in from
    Kelvin's 19.47 deg (Rabaud & Moisy 2013, Phys. Rev. Lett. 110, 214503):
    U = Fr_L(phi) sqrt(g L) with Fr_L(phi) from :func:`wakemeter.physics.hull.hull_froude_from_arm_angle`.
    Only arms clearly narrower than Kelvin's carry this information.
    """
    from .hull import hull_froude_from_arm_angle

    _check_draws(draws)
    rng = _rng(seed)
    g, scale, _h = _common(conditions, draws, rng)
    phi = _draw(arm_angle_deg, draws, rng)
    length = _draw(hull_length_m, draws, rng) * scale
    fr = np.asarray(hull_froude_from_arm_angle(phi))
    u = fr * np.sqrt(g * np.where(length > 0, length, np.nan))
    return _summarise(
        "narrow arms and hull length",
        u,
        draws,
        conditions.assumptions()
        + (
            "deep water; the brightest arms follow the longest wave the hull makes (Rabaud & Moisy 2013)",
            f"hull length {hull_length_m.value:.0f} ± {hull_length_m.std:.0f} m",
        ),
    )


def weighted_mean(values: list[float], stds: list[float]) -> tuple[float, float]:
    """Several readings of one quantity: their inverse-variance weighted mean and its standard uncertainty,
    widened by the Birge ratio sqrt(chi2 / (n - 1)) when the readings scatter more than their uncertainties
    say (Birge 1932, Phys. Rev. 40, 207; never narrowed)."""
    x, s = np.asarray(values, float), np.asarray(stds, float)
    if x.size == 0 or x.size != s.size or np.any(~np.isfinite(x)) or np.any(~(s > 0)):
        raise ParameterError("weighted_mean needs readings with finite values and uncertainties > 0")
    w = 1.0 / s**2
    mean = float(np.sum(w * x) / np.sum(w))
    std = float(np.sqrt(1.0 / np.sum(w)))
    if x.size > 1:
        std *= max(1.0, float(np.sqrt(np.sum(w * (x - mean) ** 2) / (x.size - 1))))
    return mean, std


def combine_estimates(estimates: list[SpeedEstimate], *, alpha: float = 0.05) -> CombinedSpeed:
    """Combine independent speed estimates; test their consistency with chi-square.

    One estimate keeps its own Monte Carlo interval.  When the test rejects at level ``alpha``, the method
    with the largest normalised residual is named and the combined uncertainty is inflated by the Birge
    ratio sqrt(chi2/dof) instead of pretending the estimates agree.
    """
    if not estimates:
        raise ParameterError("combine_estimates needs at least one estimate, got none")
    if len(estimates) == 1:
        # one method: its own Monte Carlo interval (a speed from a length or a shift is not symmetric about its
        # median, so a normal interval would misstate it); no cross-check is possible
        e = estimates[0]
        return CombinedSpeed(
            speed_mps=e.speed_mps,
            std_mps=e.std_mps,
            ci95_low_mps=e.ci95_low_mps,
            ci95_high_mps=e.ci95_high_mps,
            chi2=0.0,
            dof=0,
            p_value=1.0,
            consistent=True,
            outlier=None,
            methods=(e.method,),
            verdict="one method only: no cross-check possible",
        )
    x = np.array([e.speed_mps for e in estimates])
    s = np.array([e.std_mps for e in estimates])
    if np.any(s <= 0):
        raise ParameterError("every estimate needs a standard uncertainty > 0 to be weighted")
    w = 1.0 / s**2
    mean = float(np.sum(w * x) / np.sum(w))
    std = float(np.sqrt(1.0 / np.sum(w)))
    dof = len(estimates) - 1
    chi2 = float(np.sum(w * (x - mean) ** 2))
    from scipy import special  # chi2.sf(x, k) is special.chdtrc(k, x); scipy.stats would cost ~0.6 s at start-up

    p = float(special.chdtrc(dof, chi2)) if dof > 0 else 1.0
    consistent = p >= alpha
    outlier = None
    methods = tuple(e.method for e in estimates)
    if dof == 0:
        verdict = "one method only: no cross-check possible"
    elif consistent:
        verdict = (
            f"the methods agree within their uncertainties (chance of a spread this large or larger: "
            f"{100 * p:.0f} %, chi-square test)"
        )
    else:
        std *= float(np.sqrt(chi2 / dof))
        if dof == 1:  # of two, the less precise always stands out more: which one is wrong cannot be told
            which = "two methods cannot tell which of them is wrong"
        else:
            resid = np.abs(x - mean) / s
            outlier = methods[int(np.argmax(resid))]
            which = f"'{outlier}' stands out"
        verdict = (
            f"methods DISAGREE: their spread has a chance of only {100 * p:.1f} % (chi-square test); "
            f"{which}; the uncertainty was widened by the excess spread (x {np.sqrt(chi2 / dof):.2f}, "
            "Birge ratio)"
        )
    return CombinedSpeed(
        speed_mps=mean,
        std_mps=std,
        ci95_low_mps=mean - 1.959964 * std,
        ci95_high_mps=mean + 1.959964 * std,
        chi2=chi2,
        dof=dof,
        p_value=p,
        consistent=consistent,
        outlier=outlier,
        methods=methods,
        verdict=verdict,
    )


# Depth-regime bands of Fr_h.  The 0.6 limit follows Havelock's curve (half-angle
# within ~0.3 deg of Kelvin's below it); 0.9 and 1.1 bound the near-critical band
# where the pattern changes fast (common practice, no source).
class Regime(StrEnum):
    """Depth regimes of a wake; the values are the words shown to users."""

    DEEP = "deep"
    FINITE_DEPTH = "finite depth"
    NEAR_CRITICAL = "near-critical"
    SUPERCRITICAL = "supercritical"
    UNKNOWN = "unknown"


_REGIME_BANDS = (
    (0.6, Regime.DEEP),
    (0.9, Regime.FINITE_DEPTH),
    (1.1, Regime.NEAR_CRITICAL),
    (np.inf, Regime.SUPERCRITICAL),
)


@dataclass(frozen=True, kw_only=True)
class DepthRegime:
    regime: Regime
    froude_depth: float | None
    froude_ci95: tuple[float, float] | None
    depth_m: float | None
    depth_ci95_m: tuple[float, float] | None
    explanation: str

    @classmethod
    def unmeasured(cls, regime: Regime, explanation: str) -> DepthRegime:
        """A regime told without a depth Froude number or a depth (only its explanation)."""
        return cls(
            regime=regime, froude_depth=None, froude_ci95=None, depth_m=None, depth_ci95_m=None, explanation=explanation
        )


def _band(fr: float) -> Regime:
    return next(name for top, name in _REGIME_BANDS if fr < top)


def assess_depth_regime(
    *,
    speed: SpeedEstimate | None = None,
    depth_m: Uncertain | None = None,
    half_angle_deg: Uncertain | None = None,
    transverse_seen: bool | None = None,
    g: float = STANDARD_GRAVITY,
    draws: int = 20_000,
    seed: int = 0,
    depth_source: str = "given",
) -> DepthRegime:
    """Say whether shallow water shaped the wake, from what is known.

    Known speed and depth give Fr_h directly.  Otherwise the half-angle tells:
    at Kelvin's value the pattern is deep-water like (depth unknown); wider
    means finite depth or supercritical (the presence of transverse waves
    decides); narrower than Kelvin's is not explained by depth alone.
    ``depth_source`` names where a known depth came from ("given" by the user or "fitted"
    to the waves) in the explanation.
    """
    rng = np.random.default_rng(seed)
    if speed is not None and depth_m is not None:
        if depth_m.value <= 0:
            raise ParameterError(f"depth_m must be > 0, got {depth_m.value!r}")
        u = rng.normal(speed.speed_mps, speed.std_mps, draws)
        # depth is positive and its uncertainty often large: log-normal with the given median
        h = depth_m.value * np.exp(rng.normal(0.0, depth_m.std / depth_m.value, draws))
        fr = u / np.sqrt(g * h)
        lo, med, hi = np.percentile(fr, [2.5, 50, 97.5])
        regime = _band(float(med))
        expl = (
            f"depth Froude number {med:.2f} (95 %: {lo:.2f}-{hi:.2f}) from speed and the {depth_source} depth "
            f"{depth_m.value:.1f} m: {regime}"
        )
        return DepthRegime(
            regime=regime,
            froude_depth=float(med),
            froude_ci95=(float(lo), float(hi)),
            depth_m=depth_m.value,
            depth_ci95_m=(depth_m.value - 1.96 * depth_m.std, depth_m.value + 1.96 * depth_m.std),
            explanation=expl,
        )
    if half_angle_deg is not None:
        return _regime_from_half_angle(half_angle_deg, speed, transverse_seen, g)
    return DepthRegime.unmeasured(Regime.UNKNOWN, "neither depth nor half-angle known: the depth regime cannot be told")


def _regime_from_half_angle(
    half_angle_deg: Uncertain, speed: SpeedEstimate | None, transverse_seen: bool | None, g: float
) -> DepthRegime:
    """The regime told by a half-angle (Havelock 1908): Kelvin's, narrower (not a depth effect), or wider
    (subcritical with transverse waves, supercritical without them)."""
    a, sa = half_angle_deg.value, max(half_angle_deg.std, 0.1)
    k = kelvin.KELVIN_HALF_ANGLE_DEG
    if abs(a - k) <= 2 * sa:
        return DepthRegime.unmeasured(
            Regime.DEEP,
            f"half-angle {a:.1f} ± {half_angle_deg.std:.1f}° agrees with Kelvin's {k:.2f}°: "
            "no visible shallow-water effect (Fr_h below about 0.6); depth cannot be told",
        )
    if a < k:
        return DepthRegime.unmeasured(
            Regime.UNKNOWN,
            f"half-angle {a:.1f}° is narrower than Kelvin's: not a depth effect; "
            "a fast, short hull (high hull Froude number) or a supercritical vessel without "
            "transverse waves could explain it",
        )
    br = havelock.froude_from_half_angle(a)
    if transverse_seen is True:
        fr_lo = float(havelock.subcritical_froude_from_half_angle(max(a - 1.96 * sa, k + 1e-3)))
        fr_hi = float(havelock.subcritical_froude_from_half_angle(min(a + 1.96 * sa, 89.9)))
        sub = br.subcritical if br.subcritical is not None else fr_lo
        depth = None
        depth_ci = None
        if speed is not None:
            depth = speed.speed_mps**2 / (g * sub**2)
            depth_ci = (speed.ci95_low_mps**2 / (g * fr_hi**2), speed.ci95_high_mps**2 / (g * fr_lo**2))
        return DepthRegime(
            regime=_band(sub),
            froude_depth=sub,
            froude_ci95=(fr_lo, fr_hi),
            depth_m=depth,
            depth_ci95_m=depth_ci,
            explanation=f"half-angle {a:.1f}° wider than Kelvin's with transverse waves: subcritical "
            f"Fr_h = {sub:.2f} (Havelock 1908)",
        )
    if transverse_seen is False:
        return DepthRegime(
            regime=Regime.SUPERCRITICAL,
            froude_depth=br.supercritical,
            froude_ci95=None,
            depth_m=None,
            depth_ci95_m=None,
            explanation=f"half-angle {a:.1f}° and no transverse waves: supercritical, "
            f"Fr_h = 1/sin(angle) = {br.supercritical:.2f}",
        )
    return DepthRegime.unmeasured(Regime.UNKNOWN, br.note)
