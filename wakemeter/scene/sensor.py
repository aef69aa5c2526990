"""What the scene's sensor is, as far as the file tells: band names and the published time between bands.

Push-broom sensors whose spectral bands sit side by side on the focal plane record a ground point in one
band a fraction of a second after another; a moving hull is then imaged at a different place in each band
while the land and the water around it are not.  Only published timing is used here; a sensor or band
not in the table has no timing, and the analysis says so instead of guessing.

References
----------
1. Markuse, P. (2017). Hurricane Jose as seen by Sentinel-2 - more than meets the eye (blog article with
   the MSI band timing): band B04 is recorded 1.005 s after band B02.
2. Binet, R., Bergsma, E. & Poulain, V. (2022). Accurate Sentinel-2 inter-band time delays.
   *ISPRS Annals* V-1-2022, 57-66: the delays vary by up to +/-2 % with respect to the handbook's fixed
   values across and along the track (optical distortion, altitude), 0.28 % rms after their correction.
3. Heiselberg, H. (2019). Aircraft and ship velocity determination in Sentinel-2 multispectral images.
   *Sensors* 19(13), 2873: the method (ship positions in the bands and the temporal offsets).
"""

from __future__ import annotations

import re
from collections.abc import Callable
from dataclasses import dataclass, field
from enum import StrEnum

#: Sentinel-2 MSI: time after band B02 at which each band sees the same ground point (s).  Only the pair
#: with a value we have in front of us is listed (ref. 1; the other 10 m bands lie between them and are left
#: out rather than recalled).
SENTINEL2_BAND_TIME_S: dict[str, float] = {"B02": 0.0, "B04": 1.005}
#: relative standard uncertainty of the published delay (ref. 2: up to +/-2 % across the swath; taken as the
#: standard uncertainty, conservative)
SENTINEL2_DELAY_REL_STD = 0.02


class BandRole(StrEnum):
    """What a band sees, as the analysis uses it (true colour, the water index, hull detection)."""

    BLUE = "blue"
    GREEN = "green"
    RED = "red"
    NIR = "near infrared"


@dataclass(frozen=True)
class BandTiming:
    """Bands of one scene with a published acquisition time (1-based band numbers)."""

    sensor: str
    first_band: int
    last_band: int
    delay_s: float  #: time from first_band to last_band
    delay_rel_std: float
    source: str  #: where the timing comes from, for the result's assumptions
    recognised_from: str  #: what in the file told us the sensor
    co_registration_std_px: float = 0.0  #: standard uncertainty of one band's position (pixels per axis)
    #: bands recorded between first_band and last_band (1-based band numbers): a moving hull's edge in each lies
    #: between its edges in those two
    between: tuple[int, ...] = ()
    between_names: tuple[str, ...] = ()  #: their names (as the sensor calls them)
    pair_names: tuple[str, str] = ("the first band", "the last band")  #: the names of first_band and last_band


@dataclass(frozen=True, kw_only=True)
class SensorRecord:
    """One sensor of the table: how its band names are written, what each band sees, and (where published)
    when each band is recorded.  Like a file-format backend it answers whether it recognises a scene."""

    name: str
    #: canonical band name -> role (only bands whose role the analysis uses)
    roles: dict[str, BandRole]
    #: a file's band description -> canonical band name, or None when it is not one of this sensor's
    canonical: Callable[[str | None], str | None]
    #: the platform as metadata items or file names write it; None: band names alone say the sensor
    platform: re.Pattern[str] | None = None
    #: canonical band name -> time after the first band (s), only published values
    band_time_s: dict[str, float] = field(default_factory=dict)
    delay_rel_std: float = 0.0
    timing_source: str = ""
    #: the two bands whose published delay the hull's shift uses
    timing_pair: tuple[str, str] | None = None
    #: standard uncertainty of one band's position from the registration of the bands (pixels per axis)
    co_registration_std_px: float = 0.0
    #: bands recorded after the timing pair's first band and before its last (their times need not be known)
    recorded_between: tuple[str, ...] = ()

    def band_numbers(self, descriptions: tuple[str | None, ...]) -> dict[str, int]:
        """Canonical band name -> 1-based band number, for the bands the file names in this sensor's way."""
        out: dict[str, int] = {}
        for i, d in enumerate(descriptions):
            n = self.canonical(d)
            if n is not None and n not in out:
                out[n] = i + 1
        return out

    def recognised_from(self, file_name: str = "", tags: dict | None = None) -> str | None:
        """What in the file says it is this sensor (for the result's provenance), or None."""
        if self.platform is None:
            return "band names"
        platform = " ".join(str(v) for k, v in (tags or {}).items() if k.upper() in PLATFORM_TAGS)
        if self.platform.search(platform):
            return "band names and the platform in the metadata"
        if self.platform.search(file_name.replace("_", " ")):
            return "band names and the file name"
        return None

    def timing(
        self, descriptions: tuple[str | None, ...], file_name: str = "", tags: dict | None = None
    ) -> BandTiming | None:
        """The published time between this sensor's timing pair in the scene, or None."""
        if self.timing_pair is None:
            return None
        how = self.recognised_from(file_name, tags)
        where = self.band_numbers(descriptions)
        first, last = self.timing_pair
        if how is None or first not in where or last not in where:
            return None
        return BandTiming(
            self.name,
            where[first],
            where[last],
            self.band_time_s[last] - self.band_time_s[first],
            self.delay_rel_std,
            self.timing_source,
            how,
            self.co_registration_std_px,
            tuple(where[b] for b in self.recorded_between if b in where),
            tuple(b for b in self.recorded_between if b in where),
            (first, last),
        )


_S2_BAND = re.compile(r"^\s*B0?(\d{1,2}A?)\s*$", re.IGNORECASE)


def _s2_name(desc: str | None) -> str | None:
    if not desc:
        return None
    m = _S2_BAND.match(desc)
    if not m:
        return None
    num = m.group(1).upper()
    return f"B{int(num[:-1]):02d}A" if num.endswith("A") else f"B{int(num):02d}"


def _plain_name(desc: str | None) -> str | None:
    n = (desc or "").strip().upper()
    return n if n in ("BLUE", "GREEN", "RED", "NIR") else None


_S2_WORD = re.compile(r"(^|[^a-z0-9])(s2[abc]?|sentinel-?2[abc]?)(l1c|l2a|msi)?([^a-z0-9]|$)", re.IGNORECASE)
#: metadata items that name the platform (Sentinel-2 products: SPACECRAFT_NAME; others: PLATFORM, SENSOR)
PLATFORM_TAGS = ("SPACECRAFT_NAME", "PLATFORM", "SENSOR", "SATELLITE", "MISSION")

SENTINEL2 = SensorRecord(
    name="Sentinel-2 MSI",
    roles={"B02": BandRole.BLUE, "B03": BandRole.GREEN, "B04": BandRole.RED, "B08": BandRole.NIR},
    canonical=_s2_name,
    platform=_S2_WORD,
    band_time_s=SENTINEL2_BAND_TIME_S,
    delay_rel_std=SENTINEL2_DELAY_REL_STD,
    timing_source="Sentinel-2 MSI: B04 recorded 1.005 s after B02 (Markuse 2017), ±2 % (Binet et al. 2022)",
    timing_pair=("B02", "B04"),
    # Sentinel-2's multispectral registration requirement is 0.3 px at 3 sigma for the 10 m bands (from memory)
    co_registration_std_px=0.1,
    # B08 and B03 are recorded between B02 and B04 (from memory: about 0.26 s and 0.53 s after B02, the band
    # timing tabulated by Heiselberg 2019, ref. 3; only the order is used, not the times)
    recorded_between=("B08", "B03"),
)
#: any sensor whose bands are named by what they see
PLAIN_NAMES = SensorRecord(
    name="bands named by colour",
    roles={"BLUE": BandRole.BLUE, "GREEN": BandRole.GREEN, "RED": BandRole.RED, "NIR": BandRole.NIR},
    canonical=_plain_name,
)
#: the sensor table, asked in order; adding a sensor is one record here (and its test)
SENSORS: tuple[SensorRecord, ...] = (SENTINEL2, PLAIN_NAMES)


def band_roles(band_descriptions: tuple[str | None, ...]) -> dict[BandRole, int]:
    """Role -> 1-based band number, from the band names of the first sensor in the table that names them
    (band names say what a band sees even when they cannot say which platform recorded it)."""
    for sensor in SENSORS:
        where = sensor.band_numbers(band_descriptions)
        roles = {sensor.roles[n]: b for n, b in where.items() if n in sensor.roles}
        if roles:
            return roles
    return {}


def band_timing(
    band_descriptions: tuple[str | None, ...], file_name: str = "", tags: dict | None = None
) -> BandTiming | None:
    """The published time between two bands of a scene, from the first sensor of the table that recognises it,
    or None when no sensor with published timing does.

    A scene is taken as Sentinel-2 when its bands carry Sentinel-2 band names and its metadata
    (``SPACECRAFT_NAME``, ``PLATFORM``...) or, failing that, its file name says ``S2`` or ``Sentinel-2``
    (band names alone are shared by other sensors).
    """
    for sensor in SENSORS:
        timing = sensor.timing(band_descriptions, file_name, tags)
        if timing is not None:
            return timing
    return None
