"""``wakemeter synth``: make a synthetic wake scene of known truth (GeoTIFF + truth JSON)."""

from __future__ import annotations

import argparse
from pathlib import Path
from typing import TYPE_CHECKING

from .base import Command

if TYPE_CHECKING:
    from ..synth import VesselSpec


def _seed(text: str) -> int:
    try:
        value = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"the random seed must be a whole number >= 0, got {text!r}") from None
    if value < 0:
        raise argparse.ArgumentTypeError(f"the random seed must be a whole number >= 0, got {value}")
    return value


def add_arguments(p: argparse.ArgumentParser) -> None:
    p.add_argument("--out", required=True, help="output GeoTIFF path, or a folder with --demo")
    p.add_argument("--demo", action="store_true", help="write all the bundled demo scenes into the --out folder")
    p.add_argument(
        "--fleet",
        type=int,
        metavar="N",
        help="multispectral: N vessels at random (by --seed) positions, headings, speeds and hull lengths",
    )
    p.add_argument("--lon", type=float, default=-35.0, help="vessel longitude, deg (WGS 84)")
    p.add_argument("--lat", type=float, default=36.0, help="vessel latitude, deg (WGS 84)")
    sp = p.add_mutually_exclusive_group()
    sp.add_argument("--speed", type=float, help="speed through the water, m/s")
    sp.add_argument("--speed-knots", type=float, help="speed through the water, knots")
    p.add_argument("--heading", type=float, default=45.0, help="true heading, deg")
    p.add_argument("--hull-length", type=float, default=40.0, help="m")
    p.add_argument("--beam", type=float, default=8.0, help="m")
    p.add_argument("--depth", type=float, default=float("inf"), help="water depth, m (default deep)")
    p.add_argument("--pixel", type=float, default=2.0, help="pixel size on the ground, m")
    p.add_argument("--size", type=int, default=1024, help="width and height, pixels (<= 2048)")
    p.add_argument(
        "--kind",
        choices=["optical", "radar", "multispectral"],
        default="optical",
        help="multispectral: four bands B02 B03 B04 B08 as a Sentinel-2-like sensor records them (reflectance x "
        "10 000, sensor blur, wind sea, foam band, the hull moving between bands)",
    )
    p.add_argument("--dtype", choices=["uint8", "uint16"], default="uint8", help="optical pixel type")
    p.add_argument("--sun-azimuth", type=float, default=135.0, help="optical: true azimuth of the sun, deg")
    p.add_argument("--looks", type=int, default=4, help="radar: number of looks (speckle)")
    p.add_argument("--look-bearing", type=float, default=80.0, help="radar: true bearing of the look direction, deg")
    p.add_argument("--incidence", type=float, default=35.0, help="radar: incidence angle, deg")
    p.add_argument("--no-hull-shift", action="store_true", help="radar: do not displace the hull in azimuth")
    p.add_argument("--sea-wavelength", type=float, help="ambient sea peak wavelength, m (default: no sea)")
    p.add_argument("--sea-direction", type=float, default=30.0, help="true direction the sea travels toward, deg")
    p.add_argument("--sea-strength", type=float, default=0.5, help="sea rms slope relative to the wake's")
    p.add_argument("--wind", type=float, default=7.0, help="multispectral: wind speed of the JONSWAP sea, m/s")
    p.add_argument("--wind-direction", type=float, default=60.0, help="multispectral: true direction the sea travels")
    p.add_argument(
        "--coast-distance",
        type=float,
        help="multispectral: a straight coast this far from the vessel, m (default none)",
    )
    p.add_argument("--coast-bearing", type=float, default=90.0, help="multispectral: true bearing to the coast, deg")
    p.add_argument(
        "--photo",
        metavar="WxH",
        help="a drone photograph instead of a GeoTIFF: a JPEG of W x H pixels (e.g. 4000x3000) at --pixel metres "
        "(0.005-1), with the camera's EXIF lens and XMP height and gimbal angles, no georeference",
    )
    p.add_argument("--camera-yaw", type=float, default=0.0, help="photo: true bearing of image up, deg")
    p.add_argument("--crs", choices=["utm", "EPSG:4326"], default="utm")
    p.add_argument("--seed", type=_seed, default=0, help="random seed, a whole number >= 0")


def run(args: argparse.Namespace) -> int:
    from ..physics.units import knots_to_mps
    from ..synth import AmbientSea, Hull, OpticalModel, RadarModel, VesselSpec, render, write
    from ..synth.demo import vessel_scene, write_demo_scenes

    if args.demo:
        for path in write_demo_scenes(args.out):
            print(f"wrote {path}")
        return 0
    speed = args.speed if args.speed is not None else float(knots_to_mps(args.speed_knots or 12.0))
    vessel = VesselSpec("Synthetic vessel", args.lon, args.lat, speed, args.heading, Hull(args.hull_length, args.beam))
    imaging: OpticalModel | RadarModel
    if args.photo is not None:
        return _photo(args, vessel)
    if args.kind == "multispectral":
        return _multispectral(args, vessel)
    if args.fleet is not None:
        from ..errors import ParameterError

        raise ParameterError("--fleet makes multispectral scenes: add --kind multispectral")
    if args.kind == "optical":
        imaging = OpticalModel(sun_azimuth_deg=args.sun_azimuth, dtype=args.dtype)
    else:
        imaging = RadarModel(
            look_bearing_deg=args.look_bearing,
            incidence_deg=args.incidence,
            looks=args.looks,
            hull_displacement=not args.no_hull_shift,
        )
    sea = AmbientSea(args.sea_wavelength, args.sea_direction, 8.0, args.sea_strength) if args.sea_wavelength else None
    spec = vessel_scene(
        "custom",
        vessel,
        args.size,
        args.pixel,
        imaging=imaging,
        depth_m=args.depth,
        sea=sea,
        crs=args.crs,
        seed=args.seed,
    )
    out = Path(args.out)
    if out.suffix.lower() not in (".tif", ".tiff"):
        out = out.with_suffix(".tif")
    rendered = render(spec)
    tif, sidecar = write(rendered, out)
    print(f"wrote {tif} and {sidecar}")
    _say_where(rendered.truth)
    return 0


def _say_where(truth: dict) -> None:
    """Where to click: each vessel's position, and where a radar image shows its hull when that moved."""
    for v in truth.get("vessels", ()):
        fr = v.get("depth_froude")
        line = (
            f"{v['name']}: {v['speed_knots']:.1f} kn, heading {v['heading_deg']:.0f}°, at lon {v['lon']:.6f} "
            f"lat {v['lat']:.6f} (pixel {v['pixel_col']:.0f},{v['pixel_row']:.0f})"
            + ("" if fr is None else f"; depth Froude number {fr:.2f}")
        )
        if abs(v.get("radar_azimuth_offset_m", 0.0)) > 0:
            line += (
                f"; its hull is imaged {abs(v['radar_azimuth_offset_m']):.0f} m away, at pixel "
                f"{v['hull_pixel_col']:.0f},{v['hull_pixel_row']:.0f} (radar azimuth shift)"
            )
        if fr is not None and 0.9 <= fr <= 1.1:
            line += "; near the critical speed the wake has no Kelvin pattern to measure"
        print(line)


def _photo(args: argparse.Namespace, vessel: VesselSpec) -> int:
    """A drone photo of the vessel, framed with the vessel 70 % of the way from the centre to the edge ahead."""
    import math

    from ..errors import ParameterError
    from ..synth.photo import PhotoSpec, frame_position, render_photo, write_photo

    try:
        w, h = (int(x) for x in args.photo.lower().split("x"))
    except ValueError:
        raise ParameterError(
            f"--photo takes the frame as WIDTHxHEIGHT pixels, e.g. 4000x3000; got {args.photo!r}"
        ) from None
    if args.kind != "optical":
        raise ParameterError("--photo makes an optical photograph: leave out --kind")
    col, row = frame_position(w, h, vessel.heading_deg - args.camera_yaw)
    spec = PhotoSpec(
        w, h, args.pixel, vessel, col, row, yaw_deg=args.camera_yaw, sun_azimuth_deg=args.sun_azimuth, seed=args.seed
    )
    out = Path(args.out)
    if out.suffix.lower() not in (".jpg", ".jpeg"):
        out = out.with_suffix(".jpg")
    pixels, truth = render_photo(spec)
    jpg, sidecar = write_photo(pixels, truth, out)
    lam = 2 * math.pi * vessel.speed_mps**2 / truth["gravity_mps2"]
    print(f"wrote {jpg} and {sidecar} (camera {spec.camera_height_m:.1f} m above the water, looking straight down)")
    print(
        f"{vessel.name}: {truth['vessels'][0]['speed_knots']:.1f} kn, heading {vessel.heading_deg % 360:.0f}°, at "
        f"pixel {col:.0f},{row:.0f}; transverse wave {lam:.1f} m ({lam / args.pixel:.0f} pixels)"
    )
    return 0


def _multispectral(args: argparse.Namespace, vessel: VesselSpec) -> int:
    from ..synth import write
    from ..synth.demo import vessel_scene
    from ..synth.multispectral import BANDS, MultispectralLook, render_multispectral

    look = MultispectralLook(
        wind_mps=args.wind,
        wind_direction_deg=args.wind_direction,
        sun_azimuth_deg=args.sun_azimuth,
        coast_distance_m=args.coast_distance,
        coast_bearing_deg=args.coast_bearing,
    )
    if args.fleet is not None:
        from ..errors import ParameterError
        from ..synth.fleet import fleet_spec

        if not 1 <= args.fleet <= 50:
            raise ParameterError(f"--fleet must be 1-50 vessels, got {args.fleet}")
        try:
            spec = fleet_spec(
                args.fleet, seed=args.seed, size=args.size, pixel_m=args.pixel, lon=args.lon, lat=args.lat
            )
        except ValueError as err:
            raise ParameterError(str(err)) from err
    else:
        spec = vessel_scene("custom", vessel, args.size, args.pixel, depth_m=args.depth, crs=args.crs, seed=args.seed)
    out = Path(args.out)
    if out.suffix.lower() not in (".tif", ".tiff"):
        out = out.with_suffix(".tif")
    # the platform tag says whose band timing the hull's motion follows (the analysis reads it)
    tags = {"PLATFORM": "Sentinel-2-like (synthetic)"}
    rendered = render_multispectral(spec, look).rendered
    tif, sidecar = write(rendered, out, band_names=BANDS, tags=tags)
    print(f"wrote {tif} and {sidecar}")
    _say_where(rendered.truth)
    return 0


COMMAND = Command(
    "synth", "Make a synthetic wake scene of known truth (GeoTIFF plus <name>.truth.json).", add_arguments, run
)
