"""A plain summary of a scene (what ``wakemeter info`` prints) and quicklook images."""

from __future__ import annotations

import os
from pathlib import Path

import numpy as np

from ..errors import ParameterError, SceneWriteError
from ..fileio import atomic_write_bytes
from . import display, geodesy
from .raster import Scene


def lonlat_bounds(scene: Scene, samples: int = 21) -> tuple[float, float, float, float]:
    """(west, south, east, north) in WGS 84 degrees, from points along the four edges."""
    t = np.linspace(0, 1, samples)
    w, h = scene.width, scene.height
    cols = np.concatenate([t * w, np.full(samples, w), t * w, np.zeros(samples)])
    rows = np.concatenate([np.zeros(samples), t * h, np.full(samples, h), t * h])
    lon, lat = geodesy.pixel_to_lonlat(scene.georef, cols, rows)
    return float(lon.min()), float(lat.min()), float(lon.max()), float(lat.max())


def summarise(scene: Scene) -> dict:
    """Everything ``wakemeter info`` reports, as plain data."""
    i = scene.info
    out = {
        "file": str(i.path),
        "opened": str(i.origin) if i.origin != i.path else None,
        "file_size_bytes": i.file_size,
        "driver": i.driver,
        "width": i.width,
        "height": i.height,
        "bands": i.count,
        "dtype": i.dtype,
        "nodata": i.nodata,
        "georeferenced": i.georeferenced,
        "georeference_note": i.georeference_note,
        "crs": i.crs,
        "overviews": list(i.overview_factors),
        "acquisition_time": i.acquisition_time,
        "acquisition_time_source": i.tags.get("ACQUISITION_TIME_SOURCE") if i.acquisition_time else None,
        "band_names": _band_list(scene),
        "band_timing": _timing(scene),
        "pixel_size_m": None,
        "image_up_true_bearing_deg": None,
        "bounds_wgs84": None,
        "platform": _platform(i.tags),
        "backscatter": i.tags.get("BACKSCATTER"),
        "radar_geometry": _radar_geometry(scene),
    }
    if i.georeferenced:
        f = scene.local_frame()
        out["pixel_size_m"] = {"along_rows": f.m_per_col, "along_columns": f.m_per_row_up}
        out["image_up_true_bearing_deg"] = f.bearing_up_deg
        west, south, east, north = lonlat_bounds(scene)
        out["bounds_wgs84"] = {"west": west, "south": south, "east": east, "north": north}
    return out


def _platform(tags: dict) -> str | None:
    """The spacecraft and, for a radar product, its mode, pass and polarisations (as its metadata says)."""
    craft = tags.get("SPACECRAFT_NAME")
    if not craft:
        return None
    parts = [craft]
    if tags.get("MODE"):
        parts.append(f"{tags['MODE']} mode")
    if tags.get("PASS"):
        parts.append(f"{tags['PASS'].lower()} pass")
    if tags.get("POLARISATION"):
        others = tags.get("OTHER_POLARISATIONS", "").split()
        parts.append(
            f"polarisation {tags['POLARISATION']}" + (f" ({', '.join(others)} also in the product)" if others else "")
        )
    return ", ".join(parts)


def _radar_geometry(scene: Scene) -> dict | None:
    """The radar geometry a product carries, at the scene's centre."""
    if scene.radar_product is None:
        return None
    g = scene.radar_product.at(scene.width / 2, scene.height / 2)
    return {
        "source": g.source,
        "slant_range_m": g.slant_range_m,
        "incidence_deg": g.incidence_deg,
        "look_bearing_deg": g.look_bearing_deg,
        "flight_bearing_deg": g.flight_bearing_deg,
        "right_looking": g.right_looking,
        "platform_speed_mps": g.platform_speed_mps,
        "azimuth_time": g.azimuth_time,
    }


def _band_list(scene: Scene) -> list[dict]:
    """Each band's number, name (as the file gives it) and role where the sensor table knows it."""
    from .sensor import band_roles

    roles = {b: str(r.value if hasattr(r, "value") else r) for r, b in band_roles(scene.info.band_descriptions).items()}
    return [{"band": k, "name": d, "role": roles.get(k)} for k, d in enumerate(scene.info.band_descriptions, 1)]


def _timing(scene: Scene) -> str | None:
    """The sensor whose band timing applies and what told us (None when no sensor with published timing)."""
    from .sensor import band_timing

    t = band_timing(scene.info.band_descriptions, scene.info.path.name, scene.info.tags)
    if t is None:
        return None
    return (
        f"{t.sensor}: band {t.last_band} {t.delay_s:.3f} s after band {t.first_band} "
        f"(recognised from {t.recognised_from})"
    )


def format_summary(s: dict) -> str:
    lines = [f"opened:         {s['opened']} (read through the file below)"] if s.get("opened") else []
    lines += [
        f"file:           {s['file']} ({s['file_size_bytes']:,} bytes, {s['driver']})",
        f"size:           {s['width']} x {s['height']} pixels, {s['bands']} band(s), {s['dtype']}"
        + (f", nodata {s['nodata']}" if s["nodata"] is not None else ""),
        f"georeferenced:  {'yes' if s['georeferenced'] else 'NO'}"
        + (f" ({s['georeference_note']})" if s["georeference_note"] else ""),
    ]
    if s["georeferenced"]:
        crs = s["crs"] if s["crs"].startswith("EPSG:") else "WKT: " + s["crs"]
        px = s["pixel_size_m"]
        b = s["bounds_wgs84"]
        lines += [
            f"CRS:            {crs}",
            f"pixel size:     {px['along_rows']:.3f} m along rows x {px['along_columns']:.3f} m along columns "
            "(scene centre, on the ground)",
            f"image up:       true bearing {s['image_up_true_bearing_deg']:.3f}°",
            f"bounds (WGS 84): lon {b['west']:.6f} .. {b['east']:.6f}, lat {b['south']:.6f} .. {b['north']:.6f}",
        ]
    lines.append(f"overviews:      {', '.join(map(str, s['overviews'])) if s['overviews'] else 'none'}")
    acquired = s["acquisition_time"] or "unknown (not in the metadata)"
    if s.get("acquisition_time_source"):
        acquired += f" (from {s['acquisition_time_source']})"
    lines.append(f"acquired:       {acquired}")
    named = [b for b in s.get("band_names", []) if b["name"] or b["role"]]
    if named:
        lines.append(
            "bands:          "
            + ", ".join(f"{b['band']} {b['name'] or '?'}" + (f" ({b['role']})" if b["role"] else "") for b in named)
        )
    if s.get("band_timing"):
        lines.append(f"band timing:    {s['band_timing']}")
    if s.get("platform"):
        lines.append(f"platform:       {s['platform']}")
    if s.get("backscatter"):
        lines.append(f"backscatter:    {s['backscatter']}")
    g = s.get("radar_geometry")
    if g:
        side = "right" if g["right_looking"] else "NOT right"
        look, flight = round(g["look_bearing_deg"], 1) % 360, round(g["flight_bearing_deg"], 1) % 360
        lines.append(
            f"radar geometry: from {g['source']}, at each pixel; at the scene centre: slant range "
            f"{g['slant_range_m'] / 1000:.1f} km, incidence {g['incidence_deg']:.2f}°, look bearing "
            f"{look:.1f}° ({side} of the flight bearing {flight:.1f}°), platform "
            f"speed {g['platform_speed_mps']:.0f} m/s, line time {g['azimuth_time']}"
        )
    return "\n".join(lines)


def quicklook(scene: Scene, *, max_size: int = 1024) -> np.ndarray:
    """Stretched uint8 preview, longest side ``max_size``; radar-like data shown in dB."""
    if max_size < 8:
        raise ParameterError(f"max_size must be >= 8 pixels, got {max_size!r}")
    scale = min(1.0, max_size / max(scene.width, scene.height))
    oh, ow = max(1, round(scene.height * scale)), max(1, round(scene.width * scale))
    bands = (1, 2, 3) if scene.info.count >= 3 else (1,)
    data, valid = scene.read(out_shape=(oh, ow), bands=bands)
    db = display.looks_like_radar(scene.info.dtype, scene.info.count, data[0][valid[0]][:100_000])
    if len(bands) == 3:
        img = display.composite(data, valid, rgb=(0, 1, 2))
    else:
        img = display.composite(data, valid, db=db)
    return display.to_uint8(img)


def write_png(image: np.ndarray, path: str | os.PathLike) -> Path:
    """Write a uint8 grey or RGB image as PNG atomically (temporary file, then rename)."""
    import cv2

    target = Path(path)
    if not target.parent.is_dir():
        raise SceneWriteError(f"cannot write {target}: folder {target.parent} does not exist")
    arr = image if image.ndim == 2 else image[..., ::-1]  # OpenCV wants BGR
    ok, buf = cv2.imencode(".png", np.ascontiguousarray(arr))
    if not ok:
        raise SceneWriteError(f"cannot encode {target} as PNG")
    try:
        atomic_write_bytes(target, buf.tobytes())
    except OSError as err:
        raise SceneWriteError(f"cannot write {target}: {err.strerror or err}") from err
    return target
