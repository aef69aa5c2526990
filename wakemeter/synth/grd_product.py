"""Synthetic Sentinel-1 GRD products (for the tests and the product sweep), with the SAFE folder layout and
the XML elements of the real format (ESA, Sentinel-1 Product Specification, S1-RS-MDA-52-7441):
``manifest.safe``, the measurement GeoTIFF (uint16 amplitude with ground control points), the product
annotation (header, orbit state vectors, geolocation grid) and the calibration table.

The geometry is built as a real one is: a satellite 693 km up flying a geodesic track, ground range across it
at 10 m per pixel, zero-Doppler lines 10 m apart; the slant range, incidence angle and satellite velocity are
computed from Earth-centred, Earth-fixed positions by pyproj (WGS 84), independently of the reader
(:mod:`wakemeter.scene.s1_grd`); the tests check the reader against them and against GDAL's own Sentinel-1
driver, which opens these products.
"""

from __future__ import annotations

import zipfile
from dataclasses import dataclass
from datetime import UTC, datetime, timedelta
from pathlib import Path

import numpy as np
import rasterio
from pyproj import Geod, Transformer
from rasterio.control import GroundControlPoint
from rasterio.crs import CRS

C = 299_792_458.0
GEOD = Geod(ellps="WGS84")
_TO_ECEF = Transformer.from_crs("EPSG:4979", "EPSG:4978", always_xy=True)
#: Sentinel-1's orbit height, about 693 km (ESA Sentinel-1 user handbook, from memory)
HEIGHT_M = 693_000.0
SPACING_M = 10.0


@dataclass(frozen=True)
class Track:
    """The product's geometry: the near-range edge starts at (lon0, lat0) and runs along ``flight_deg``."""

    lon0: float
    lat0: float
    flight_deg: float
    near_ground_m: float = 420_000.0  #: nadir to the first pixel, along the ground
    start: datetime = datetime(2024, 5, 17, 17, 41, 3, 250000, tzinfo=UTC)
    line_s: float = 1.46e-3  #: azimuth time between lines (Sentinel-1 IW GRD: about 1.5 ms, from memory)
    spacing_m: float = SPACING_M  #: pixel and line spacing on the ground (IW GRD high resolution: 10 m)

    def edge(self, line) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Lon, lat of the near-range edge at ``line`` and the track's forward bearing there."""
        line = np.asarray(line, dtype=float)
        lon0, lat0 = np.full(line.shape, self.lon0), np.full(line.shape, self.lat0)
        lon, lat, back = GEOD.fwd(lon0, lat0, np.full(line.shape, self.flight_deg), line * self.spacing_m)
        return lon, lat, (np.asarray(back) + 180.0) % 360.0

    def ground(self, line, pixel) -> tuple[np.ndarray, np.ndarray]:
        lon, lat, fwd = self.edge(line)
        glon, glat, _ = GEOD.fwd(lon, lat, fwd + 90.0, np.asarray(pixel, dtype=float) * self.spacing_m)
        return np.asarray(glon), np.asarray(glat)

    def satellite(self, line) -> np.ndarray:
        """ECEF position (m) of the satellite at ``line`` (continuous; before 0 or past the end too)."""
        lon, lat, fwd = self.edge(line)
        nlon, nlat, _ = GEOD.fwd(lon, lat, fwd - 90.0, np.full(np.shape(lon), self.near_ground_m))
        x, y, z = _TO_ECEF.transform(nlon, nlat, np.full(np.shape(nlon), HEIGHT_M))
        return np.stack([x, y, z], axis=-1)

    def velocity(self, line) -> np.ndarray:
        d = 50.0
        return (self.satellite(np.asarray(line) + d) - self.satellite(np.asarray(line) - d)) / (2 * d * self.line_s)

    def time(self, line: float) -> datetime:
        return self.start + timedelta(seconds=float(line) * self.line_s)

    def slant_range(self, line, pixel) -> np.ndarray:
        glon, glat = self.ground(line, pixel)
        g = np.stack(_TO_ECEF.transform(glon, glat, np.zeros(np.shape(glon))), axis=-1)
        return np.linalg.norm(self.satellite(line) - g, axis=-1)

    def incidence(self, line, pixel) -> np.ndarray:
        glon, glat = self.ground(line, pixel)
        g = np.stack(_TO_ECEF.transform(glon, glat, np.zeros(np.shape(glon))), axis=-1)
        la, lo = np.radians(glat), np.radians(glon)
        up = np.stack([np.cos(la) * np.cos(lo), np.cos(la) * np.sin(lo), np.sin(la)], axis=-1)
        to_sat = self.satellite(line) - g
        cosang = np.sum(up * to_sat, axis=-1) / np.linalg.norm(to_sat, axis=-1)
        return np.degrees(np.arccos(cosang))


def amplitude_table(lines: np.ndarray, pixels: np.ndarray, width: int, height: int) -> np.ndarray:
    """A smooth sigmaNought calibration amplitude (real ones are a few hundred, growing with range)."""
    L, P = np.meshgrid(lines, pixels, indexing="ij")
    return 480.0 + 170.0 * P / width + 12.0 * L / height + 6.0 * np.sin(P / width * 5.0)


def _ts(t: datetime) -> str:
    return t.astimezone(UTC).strftime("%Y-%m-%dT%H:%M:%S.%f")


def _annotation(track: Track, width: int, height: int, pol: str, mission: str) -> str:
    stop = track.time(height - 1)
    gl = np.unique(np.round(np.linspace(0, height - 1, 6))).astype(int)
    gp = np.unique(np.round(np.linspace(0, width - 1, 7))).astype(int)
    points = []
    for line in gl:
        for px in gp:
            lon, lat = track.ground(line, px)
            points.append(
                "<geolocationGridPoint>"
                f"<azimuthTime>{_ts(track.time(line))}</azimuthTime>"
                f"<slantRangeTime>{2 * float(track.slant_range(line, px)) / C:.15e}</slantRangeTime>"
                f"<line>{line}</line><pixel>{px}</pixel>"
                f"<latitude>{float(lat):.12f}</latitude><longitude>{float(lon):.12f}</longitude><height>0</height>"
                f"<incidenceAngle>{float(track.incidence(line, px)):.10f}</incidenceAngle>"
                "<elevationAngle>30.0</elevationAngle></geolocationGridPoint>"
            )
    orbit = []
    for k in range(-4, 8):
        t_s = k * 10.0
        line = t_s / track.line_s
        p, v = track.satellite(line), track.velocity(line)
        orbit.append(
            f"<orbit><time>{_ts(track.start + timedelta(seconds=t_s))}</time><frame>Earth Fixed</frame>"
            f"<position><x>{p[0]:.6f}</x><y>{p[1]:.6f}</y><z>{p[2]:.6f}</z></position>"
            f"<velocity><x>{v[0]:.6f}</x><y>{v[1]:.6f}</y><z>{v[2]:.6f}</z></velocity></orbit>"
        )
    heading = (track.flight_deg + 180.0) % 360.0 - 180.0
    pass_ = "Ascending" if abs(heading) < 90 else "Descending"
    return (
        '<?xml version="1.0" encoding="UTF-8"?>\n<product>'
        f"<adsHeader><missionId>{mission}</missionId><productType>GRD</productType><polarisation>{pol}"
        f"</polarisation><mode>IW</mode><swath>IW</swath><startTime>{_ts(track.start)}</startTime>"
        f"<stopTime>{_ts(stop)}</stopTime><absoluteOrbitNumber>53870</absoluteOrbitNumber>"
        "<missionDataTakeId>421842</missionDataTakeId><imageNumber>001</imageNumber></adsHeader>"
        "<generalAnnotation><productInformation>"
        f"<pass>{pass_}</pass><timelinessCategory>Fast-24h</timelinessCategory>"
        f"<platformHeading>{heading:.6f}</platformHeading><projection>Ground Range</projection>"
        "<rangeSamplingRate>6.4345238e+07</rangeSamplingRate><radarFrequency>5.405e+09</radarFrequency>"
        f'</productInformation><orbitList count="{len(orbit)}">{"".join(orbit)}</orbitList></generalAnnotation>'
        "<imageAnnotation><imageInformation>"
        f"<productFirstLineUtcTime>{_ts(track.start)}</productFirstLineUtcTime>"
        f"<productLastLineUtcTime>{_ts(stop)}</productLastLineUtcTime>"
        f"<slantRangeTime>{2 * float(track.slant_range(0, 0)) / C:.15e}</slantRangeTime>"
        "<pixelValue>Detected</pixelValue><outputPixels>16 bit Unsigned Integer</outputPixels>"
        f"<rangePixelSpacing>{track.spacing_m}</rangePixelSpacing>"
        f"<azimuthPixelSpacing>{track.spacing_m}</azimuthPixelSpacing>"
        f"<azimuthTimeInterval>{track.line_s}</azimuthTimeInterval>"
        f"<numberOfSamples>{width}</numberOfSamples><numberOfLines>{height}</numberOfLines>"
        "</imageInformation></imageAnnotation>"
        f'<geolocationGrid><geolocationGridPointList count="{len(points)}">{"".join(points)}'
        "</geolocationGridPointList></geolocationGrid></product>\n"
    )


def calibration_lines(height: int) -> np.ndarray:
    # real tables start at or before the first line and end past the last
    return np.unique(np.concatenate([[-3], np.round(np.linspace(0, height + 40, 5)).astype(int)]))


def calibration_pixels(width: int) -> np.ndarray:
    return np.unique(np.concatenate([np.arange(0, width, 40), [width - 1]]))


def _calibration(track: Track, width: int, height: int, pol: str, mission: str) -> str:
    lines, pixels = calibration_lines(height), calibration_pixels(width)
    table = amplitude_table(lines, pixels, width, height)
    vecs = []
    for k, line in enumerate(lines):
        px = " ".join(str(int(p)) for p in pixels)
        a = " ".join(f"{v:.6e}" for v in table[k])
        vecs.append(
            f"<calibrationVector><azimuthTime>{_ts(track.time(line))}</azimuthTime><line>{line}</line>"
            f'<pixel count="{pixels.size}">{px}</pixel><sigmaNought count="{pixels.size}">{a}</sigmaNought>'
            f'<betaNought count="{pixels.size}">{" ".join("4.74e+02" for _ in pixels)}</betaNought>'
            f'<gamma count="{pixels.size}">{a}</gamma><dn count="{pixels.size}">{a}</dn></calibrationVector>'
        )
    return (
        '<?xml version="1.0" encoding="UTF-8"?>\n<calibration>'
        f"<adsHeader><missionId>{mission}</missionId><productType>GRD</productType><polarisation>{pol}"
        f"</polarisation><mode>IW</mode><swath>IW</swath><startTime>{_ts(track.start)}</startTime>"
        f"<stopTime>{_ts(track.time(height - 1))}</stopTime><imageNumber>001</imageNumber></adsHeader>"
        "<calibrationInformation><absoluteCalibrationConstant>1.0</absoluteCalibrationConstant>"
        f'</calibrationInformation><calibrationVectorList count="{len(vecs)}">{"".join(vecs)}'
        "</calibrationVectorList></calibration>\n"
    )


def _manifest(units: list[tuple[str, str, str, str]], start: datetime, stop: datetime, mission: str) -> str:
    """The manifest's package map, metadata objects and data objects (the part GDAL's SAFE driver reads)."""
    content, meta, data = [], [], []
    for ident, meas, ann, cal in units:
        content.append(
            '<xfdu:contentUnit unitType="Measurement Data Unit" repID="s1Level1MeasurementSchema" '
            f'dmdID="product{ident} calibration{ident}"><dataObjectPointer dataObjectID="{ident}"/>'
            "</xfdu:contentUnit>"
        )
        for kind, href, rep in (
            ("product", ann, "s1Level1ProductSchema"),
            ("calibration", cal, "s1Level1CalibrationSchema"),
        ):
            meta.append(
                f'<metadataObject ID="{kind}{ident}" classification="DESCRIPTION" category="DMD">'
                f'<dataObjectPointer dataObjectID="{kind}{ident}"/></metadataObject>'
            )
            data.append(
                f'<dataObject ID="{kind}{ident}" repID="{rep}"><byteStream mimeType="text/xml">'
                f'<fileLocation locatorType="URL" href="./{href}"/></byteStream></dataObject>'
            )
        data.append(
            f'<dataObject ID="{ident}" repID="s1Level1MeasurementSchema">'
            '<byteStream mimeType="application/octet-stream">'
            f'<fileLocation locatorType="URL" href="./{meas}"/></byteStream></dataObject>'
        )
    return (
        '<?xml version="1.0" encoding="UTF-8"?>\n'
        '<xfdu:XFDU xmlns:xfdu="urn:ccsds:schema:xfdu:1" xmlns:safe="http://www.esa.int/safe/sentinel-1.0" '
        'version="esa/safe/sentinel-1.0/sentinel-1/sar/level-1/standard/iwdp">'
        '<informationPackageMap><xfdu:contentUnit unitType="SAFE Archive Information Package">'
        f"{''.join(content)}</xfdu:contentUnit></informationPackageMap><metadataSection>"
        '<metadataObject ID="acquisitionPeriod" classification="DESCRIPTION" category="DMD">'
        '<metadataWrap mimeType="text/xml" vocabularyName="SAFE" textInfo="Acquisition Period"><xmlData>'
        f"<safe:acquisitionPeriod><safe:startTime>{_ts(start)}</safe:startTime><safe:stopTime>{_ts(stop)}"
        "</safe:stopTime></safe:acquisitionPeriod></xmlData></metadataWrap></metadataObject>"
        '<metadataObject ID="platform" classification="DESCRIPTION" category="DMD">'
        '<metadataWrap mimeType="text/xml" vocabularyName="SAFE" textInfo="Platform Description"><xmlData>'
        f"<safe:platform><safe:familyName>SENTINEL-1</safe:familyName><safe:number>{mission[-1]}</safe:number>"
        "</safe:platform></xmlData></metadataWrap></metadataObject>"
        + "".join(
            f'<metadataObject ID="{i}" classification="DESCRIPTION" category="DMD"><metadataWrap mimeType="text/xml" '
            f'vocabularyName="SAFE" textInfo="{i}"><xmlData/></metadataWrap></metadataObject>'
            for i in ("processing", "measurementOrbitReference", "measurementFrameSet")
        )
        + f"{''.join(meta)}</metadataSection><dataObjectSection>{''.join(data)}</dataObjectSection></xfdu:XFDU>\n"
    )


def write_grd(out: Path, sigma0: dict[str, np.ndarray], track: Track, *, mission: str = "S1A") -> Path:
    """A GRD product folder ``out/<name>.SAFE`` whose measurements are sigma0 (linear, (rows, cols) per
    polarisation) turned into DN with the calibration table: DN = sqrt(sigma0) A."""
    height, width = next(iter(sigma0.values())).shape
    stamp = track.start.strftime("%Y%m%dt%H%M%S")
    stop = track.time(height - 1)
    name = f"{mission}_IW_GRDH_1SDV_{stamp.upper()}_{stop.strftime('%Y%m%dT%H%M%S')}_053870_066FB2_A1B2.SAFE"
    safe = out / name
    for sub in ("measurement", "annotation/calibration"):
        (safe / sub).mkdir(parents=True, exist_ok=True)
    lines, pixels = calibration_lines(height), calibration_pixels(width)
    table = amplitude_table(lines, pixels, width, height)
    from scipy.interpolate import RegularGridInterpolator

    R, P = np.meshgrid(np.arange(height), np.arange(width), indexing="ij")
    amp = RegularGridInterpolator((lines.astype(float), pixels.astype(float)), table)(np.stack([R, P], -1))
    units = []
    for pol, s0 in sigma0.items():
        stem = f"{mission.lower()}-iw-grd-{pol.lower()}-{stamp}-{stop.strftime('%Y%m%dt%H%M%S')}-053870-066fb2-001"
        dn = np.clip(np.round(np.sqrt(np.clip(s0, 0, None)) * amp), 1, 65535).astype(np.uint16)
        gl = np.round(np.linspace(0, height - 1, 4)).astype(int)
        gp = np.round(np.linspace(0, width - 1, 4)).astype(int)
        gcps = []
        for line in gl:
            for px in gp:
                lon, lat = track.ground(line, px)
                gcps.append(GroundControlPoint(row=float(line), col=float(px), x=float(lon), y=float(lat), z=0.0))
        with rasterio.open(
            safe / "measurement" / f"{stem}.tiff",
            "w",
            driver="GTiff",
            width=width,
            height=height,
            count=1,
            dtype="uint16",
            gcps=gcps,
            crs=CRS.from_epsg(4326),
        ) as dst:
            dst.write(dn, 1)
        (safe / "annotation" / f"{stem}.xml").write_text(_annotation(track, width, height, pol.upper(), mission))
        (safe / "annotation" / "calibration" / f"calibration-{stem}.xml").write_text(
            _calibration(track, width, height, pol.upper(), mission)
        )
        units.append(
            (
                stem.replace("-", ""),
                f"measurement/{stem}.tiff",
                f"annotation/{stem}.xml",
                f"annotation/calibration/calibration-{stem}.xml",
            )
        )
    (safe / "manifest.safe").write_text(_manifest(units, track.start, stop, mission))
    return safe


def zipped(safe: Path, out: Path) -> Path:
    """The product as the zip it is downloaded in (``<name>.SAFE/...`` inside)."""
    z = out / (safe.name.removesuffix(".SAFE") + ".zip")
    with zipfile.ZipFile(z, "w", zipfile.ZIP_DEFLATED) as zf:
        for p in sorted(safe.rglob("*")):
            if p.is_file():
                zf.write(p, p.relative_to(safe.parent).as_posix())
    return z


@dataclass(frozen=True)
class WakeProduct:
    safe: Path
    truth: dict  #: the synthetic scene's truth of the vessel
    hull_px: tuple[float, float]  #: where the moving hull is imaged, in the product's pixels (col, row)
    geometry: dict  #: slant range, incidence, platform speed at the scene's centre, as imaged


def radar_wake_product(
    out: Path,
    *,
    speed_knots: float = 17.5,
    heading_deg: float = 205.0,
    hull: tuple[float, float] = (70.0, 12.0),
    seed: int = 202,
    descending: bool = False,
    size: int = 640,
    lon: float = -20.03,
    lat: float = -41.03,
) -> WakeProduct:
    """A vessel's radar wake imaged by the synthetic renderer with the geometry the product's annotation states,
    written as a GRD product at 10 m.  The rendered scene is north-up; the product's lines run with the flight:
    northwards on an ascending pass (flight 0 deg, look 90 deg: the scene turned upside down), southwards on a
    descending one (flight 180 deg, look 270 deg: the scene mirrored left to right)."""
    from .imaging import RadarModel
    from .scene_maker import SceneSpec, VesselSpec, render
    from .wavefield import Hull

    flight = 180.0 if descending else 0.0
    track = Track(lon0=lon, lat0=lat, flight_deg=flight)
    mid = size / 2 - 0.5
    lon_c, lat_c = track.ground(mid, mid)
    slant, incidence = float(track.slant_range(mid, mid)), float(track.incidence(mid, mid))
    speed = float(np.linalg.norm(track.velocity(mid)))
    lon_v, lat_v, _ = GEOD.fwd(float(lon_c), float(lat_c), heading_deg, 0.3 * size * track.spacing_m)
    vessel = VesselSpec("Orla Brandt", lon_v, lat_v, speed_knots * 1852.0 / 3600.0, heading_deg, Hull(*hull))
    model = RadarModel(
        look_bearing_deg=(flight + 90.0) % 360.0,
        incidence_deg=incidence,
        looks=4,
        slant_range_m=slant,
        platform_speed_mps=speed,
    )
    spec = SceneSpec(
        size, size, track.spacing_m, float(lon_c), float(lat_c), (vessel,), imaging=model, crs="EPSG:4326", seed=seed
    )
    scene = render(spec)
    img = np.fliplr(scene.data[0]) if descending else np.flipud(scene.data[0])
    safe = write_grd(out, {"VV": img}, track)
    t = scene.truth["vessels"][0]
    col, row = t["hull_pixel_col"], t["hull_pixel_row"]
    hull_px = (size - col, row) if descending else (col, size - row)
    geometry = {"slant_range_m": slant, "incidence_deg": incidence, "platform_speed_mps": speed}
    return WakeProduct(safe, t, hull_px, geometry)
