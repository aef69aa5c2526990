"""``wakemeter info`` and ``wakemeter quicklook``."""

from __future__ import annotations

import argparse
import json

from .base import Command, add_scene_argument


def _add_info(p: argparse.ArgumentParser) -> None:
    add_scene_argument(p, "raster file (GeoTIFF, COG, PNG, JPEG, ...), a folder of band files, a SAFE product")
    p.add_argument("--json", action="store_true", help="print the summary as JSON")


def run_info(args: argparse.Namespace) -> int:
    from ..scene.raster import open_scene
    from ..scene.summary import format_summary, summarise

    with open_scene(args.scene) as scene:
        s = summarise(scene)
    print(json.dumps(s, indent=2) if args.json else format_summary(s))
    return 0


def _add_quicklook(p: argparse.ArgumentParser) -> None:
    add_scene_argument(p, "raster file")
    p.add_argument("--out", required=True, help="PNG to write")
    p.add_argument("--max-size", type=int, default=1024, help="longest side of the preview, pixels")


def run_quicklook(args: argparse.Namespace) -> int:
    from ..scene.raster import open_scene
    from ..scene.summary import quicklook, write_png

    with open_scene(args.scene) as scene:
        img = quicklook(scene, max_size=args.max_size)
    print(f"wrote {write_png(img, args.out)} ({img.shape[1]} x {img.shape[0]})")
    return 0


COMMANDS = (
    Command(
        "info",
        "Describe a scene: size, bands, CRS, pixel size in metres, WGS 84 bounds, overviews.",
        _add_info,
        run_info,
    ),
    Command(
        "quicklook", "Write a stretched PNG preview of a scene (radar shown in dB).", _add_quicklook, run_quicklook
    ),
)
