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
from dataclasses import dataclass

#: Sentinel-2 MSI: time after band B02 at which each band sees the same ground point (s).  Only the pair
#: with a value we have in front of us is listed (ref. 1; the other 10 m bands lie between them and are left
#: out rather than recalled).
SENTINEL2_BAND_TIME_S: dict[str, float] = {"B02": 0.0, "B04": 1.005}
#: relative standard uncertainty of the published delay (ref. 2: up to +/-2 % across the swath; taken as the
#: standard uncertainty, conservative)
SENTINEL2_DELAY_REL_STD = 0.02

_S2_BAND = re.compile(r"^\s*B0?(\d{1,2}A?)\s*$", re.IGNORECASE)


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


def _s2_name(desc: str | None) -> str | None:
    if not desc:
        return None
    m = _S2_BAND.match(desc)
    if not m:
        return None
    num = m.group(1).upper()
    return f"B{int(num[:-1]):02d}A" if num.endswith("A") else f"B{int(num):02d}"


_S2_WORD = re.compile(r"(^|[^a-z0-9])(s2[abc]?|sentinel-?2[abc]?)(l1c|l2a|msi)?([^a-z0-9]|$)", re.IGNORECASE)
#: metadata items that name the platform (Sentinel-2 products: SPACECRAFT_NAME; others: PLATFORM, SENSOR)
_PLATFORM_TAGS = ("SPACECRAFT_NAME", "PLATFORM", "SENSOR", "SATELLITE", "MISSION")


def band_timing(
    band_descriptions: tuple[str | None, ...], file_name: str = "", tags: dict | None = None
) -> BandTiming | None:
    """The timing between two bands of a Sentinel-2 scene whose bands are named (``B02``, ``B4``...),
    or None when the sensor or the band timing is not known.

    A scene is taken as Sentinel-2 when its bands carry Sentinel-2 band names and its metadata
    (``SPACECRAFT_NAME``, ``PLATFORM``...) or, failing that, its file name says ``S2`` or ``Sentinel-2``
    (band names alone are shared by other sensors).
    """
    names = [_s2_name(d) for d in band_descriptions]
    where = {n: i + 1 for i, n in enumerate(names) if n is not None}
    platform = " ".join(str(v) for k, v in (tags or {}).items() if k.upper() in _PLATFORM_TAGS)
    if _S2_WORD.search(platform):
        recognised = "band names and the platform in the metadata"
    elif _S2_WORD.search(file_name.replace("_", " ")):
        recognised = "band names and the file name"
    else:
        return None
    if "B02" not in where or "B04" not in where:
        return None
    return BandTiming(
        "Sentinel-2 MSI",
        where["B02"],
        where["B04"],
        SENTINEL2_BAND_TIME_S["B04"] - SENTINEL2_BAND_TIME_S["B02"],
        SENTINEL2_DELAY_REL_STD,
        "Sentinel-2 MSI: B04 recorded 1.005 s after B02 (Markuse 2017), ±2 % (Binet et al. 2022)",
        recognised,
    )
