"""``wakemeter export``: vessels, tracks, wake lines and analysed areas as GeoPackage or GeoJSON."""

from __future__ import annotations

import argparse
import sys
from dataclasses import replace
from typing import TYPE_CHECKING

from .base import CAUTION_LINE, Command, add_scene_argument
from .options import (
    add_reports_options,
    add_request_options,
    apply_calibration,
    checked_request,
    compare_with_reports,
)

if TYPE_CHECKING:
    from ..detect.result import WakeAnalysis
    from ..scene.raster import Scene


def add_arguments(p: argparse.ArgumentParser) -> None:
    add_scene_argument(p, "raster file, or a saved session (.json): every vessel not rejected")
    p.add_argument("--out", required=True, metavar="FILE", help="a .gpkg (one layer each) or .geojson file")
    p.add_argument(
        "--vessels",
        metavar="FILE",
        help="vessel positions to analyse: CSV (lon, lat, name), GeoJSON or GeoPackage points",
    )
    add_request_options(p)
    add_reports_options(p)
    p.add_argument("--force", action="store_true", help="replace an existing file")


def run(args: argparse.Namespace) -> int:
    from ..detect.analysis import analyze
    from ..errors import ParameterError
    from ..evidence.from_session import is_session
    from ..evidence.gis import read_vessel_positions
    from ..scene.raster import open_scene

    named: list[tuple[str, WakeAnalysis]] = []
    if is_session(args.scene):
        from ..evidence.from_session import open_session_vessels

        with open_session_vessels(args.scene) as (scene, vessels):
            named = [(v.name or f"vessel {i + 1}", v.analysis) for i, v in enumerate(vessels)]
            _write(args, scene, named)
        return 0
    positions = read_vessel_positions(args.vessels) if args.vessels else None
    if positions is not None and (args.vessel or args.vessel_px):
        raise ParameterError("give the vessels either with --vessels FILE or with --vessel/--vessel-px, not both")
    if positions is not None:
        args.vessel = f"{positions[0].lon},{positions[0].lat}"
    base = checked_request(args)
    with open_scene(args.scene) as scene:
        apply_calibration(scene, args)
        if positions is None:
            named = [("vessel", analyze(scene, base))]
        else:
            if not scene.info.georeferenced:
                raise ParameterError(
                    f"{scene.info.origin.name} has no georeference: positions in longitude and latitude need one"
                )
            inside = [p for p in positions if scene.holds_lonlat(p.lon, p.lat)]
            if not inside:
                raise ParameterError(f"none of the {len(positions)} listed vessel(s) lies in {scene.info.origin.name}")
            for p in positions:
                if p not in inside:  # recorded and passed over, as the batch does
                    print(
                        f"not used: vessel {p.name}: lon {p.lon:.6f}, lat {p.lat:.6f} lies outside the scene",
                        file=sys.stderr,
                    )
            named = [(p.name, analyze(scene, replace(base, vessel_lonlat=(p.lon, p.lat)))) for p in inside]
        _write(args, scene, named)
    return 0


def _write(args: argparse.Namespace, scene: Scene, named: list[tuple[str, WakeAnalysis]]) -> None:
    from ..evidence.gis import vessel_features, write_features

    compared = compare_with_reports(args, list(named), scene.info.acquisition_time)
    features = []
    for i, (name, a) in enumerate(named):
        features += vessel_features(scene, name, a, None if compared is None else compared[0][i])
    path = write_features(args.out, features, force=args.force)
    layers = sorted({f.layer for f in features})
    print(f"wrote {path} ({len(named)} vessel(s); {', '.join(layers)})")
    print(CAUTION_LINE)


COMMAND = Command(
    "export",
    "Write analysed vessels, their tracks, wake lines and areas as GeoPackage or GeoJSON (WGS 84).",
    add_arguments,
    run,
)
