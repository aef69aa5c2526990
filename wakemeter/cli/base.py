"""What every command module shares: the :class:`Command` record and the caution line."""

from __future__ import annotations

import argparse
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

from ..caution import CAUTION

#: printed after every command that shows a speed
CAUTION_LINE = "CAUTION: " + CAUTION


@dataclass(frozen=True)
class Command:
    name: str
    help: str
    add_arguments: Callable[[argparse.ArgumentParser], None]
    run: Callable[[argparse.Namespace], int]


#: what a scene argument also takes (``add_scene_argument``)
BAND_FILES = "or several single-band files of one acquisition named for their bands (..._B02.tif ..._B08.tif)"


def add_scene_argument(p: argparse.ArgumentParser, what: str) -> None:
    """The scene: ``what`` (one path), or band files one by one, made one scene by :func:`one_scene`."""
    p.add_argument("scene", nargs="+", help=f"{what}, {BAND_FILES}".replace("%", "%%"))


def one_scene(paths: list[str]) -> str:
    """The one path a command opens: the path given, or a virtual raster of the band files given."""
    if len(paths) == 1:
        return paths[0]
    from ..scene.band_set import band_list_vrt  # only when band files are given

    return str(band_list_vrt([Path(p) for p in paths]))
