"""A reduced-resolution pyramid for big scenes that have no internal overviews.

Built once, in the user's cache folder (``$XDG_CACHE_HOME/wakemeter/pyramids``,
default ``~/.cache/...``), never beside the user's data; streamed strip by
strip so the full-resolution scene is never held in memory; reports progress
and can be cancelled (partial files are removed).
"""

from __future__ import annotations

import hashlib
import os
from collections.abc import Callable
from pathlib import Path

import numpy as np
import rasterio
from rasterio.windows import Window

from .. import fileio
from ..errors import CancelledError, SceneReadError, SceneWriteError
from .cachedir import cache_dir
from .raster import GDAL_ERRORS, Scene, gdal_reason

#: Scenes at most this many pixels on a side need no pyramid.
PYRAMID_MIN_SIDE = 4096
LEVEL_STEP = 4


def _key(scene: Scene) -> str:
    st = scene.info.path.stat()
    raw = f"{scene.info.path}|{st.st_size}|{st.st_mtime_ns}".encode()
    return hashlib.sha1(raw).hexdigest()[:20]


def pyramid_levels(width: int, height: int) -> list[int]:
    """Reduction factors (4, 16, ...) until the smallest level fits in 1024 pixels."""
    out, f = [], LEVEL_STEP
    while max(width, height) / (f / LEVEL_STEP) > 1024 and max(width, height) > PYRAMID_MIN_SIDE:
        out.append(f)
        f *= LEVEL_STEP
    return out


def needs_pyramid(scene: Scene) -> bool:
    return not scene.info.overview_factors and max(scene.width, scene.height) > PYRAMID_MIN_SIDE


def ensure_pyramid(
    scene: Scene,
    *,
    progress: Callable[[float], None] | None = None,
    cancelled: Callable[[], bool] | None = None,
    folder: Path | None = None,
) -> list[tuple[int, Path]]:
    """Build (or reuse) the cached pyramid and attach it to ``scene.pyramid``.

    Returns the list of (factor, path); empty when the scene has overviews or is small.
    """
    if not needs_pyramid(scene):
        return []
    folder = (folder or cache_dir() / "pyramids") / _key(scene)
    levels = pyramid_levels(scene.width, scene.height)
    paths = [(f, folder / f"level_{f}.tif") for f in levels]
    if all(p.exists() for _, p in paths):
        scene.pyramid = paths
        return paths
    try:
        folder.mkdir(parents=True, exist_ok=True)
    except OSError as err:
        raise SceneWriteError(f"cannot create the cache folder {folder}: {err.strerror}") from err
    total = sum(int(np.ceil(scene.height / (f * 256))) for f in levels)
    done = 0
    for f, target in paths:
        if target.exists():
            done += int(np.ceil(scene.height / (f * 256)))
            continue
        w, h = int(np.ceil(scene.width / f)), int(np.ceil(scene.height / f))
        fileio.clean_stale(folder)
        tmp = str(fileio.temp_name(target))
        try:
            profile = {
                "driver": "GTiff",
                "width": w,
                "height": h,
                "count": scene.info.count,
                "dtype": "float32",
                "tiled": True,
                "blockxsize": 256,
                "blockysize": 256,
                "compress": "deflate",
                "nodata": float("nan"),
                "crs": scene.info.crs,
                "transform": scene.info.transform @ rasterio.Affine.scale(f),
            }
            with rasterio.open(tmp, "w", **profile) as dst:
                for r in range(0, h, 256):
                    if cancelled is not None and cancelled():
                        raise CancelledError("building the overview pyramid was cancelled")
                    rows = min(256, h - r)
                    data, valid = scene.read(
                        window=(0, r * f, scene.width, rows * f),
                        out_shape=(int(np.ceil(min(rows * f, scene.height - r * f) / f)), w),
                    )
                    data = np.where(valid, data, np.nan).astype(np.float32)
                    dst.write(data, window=Window(0, r, w, data.shape[1]))
                    done += 1
                    if progress is not None:
                        progress(min(done / max(total, 1), 1.0))
            os.replace(tmp, target)
        except GDAL_ERRORS as err:
            raise SceneWriteError(f"cannot write the overview pyramid in {folder}: {gdal_reason(err)}") from err
        except SceneReadError:
            raise
        finally:
            Path(tmp).unlink(missing_ok=True)
    scene.pyramid = paths
    return paths


def read_level_factor(scene: Scene) -> int:
    """The coarsest reduction available (1 when none)."""
    facs = list(scene.info.overview_factors) + [f for f, _ in scene.pyramid]
    return max(facs) if facs else 1


__all__ = ["cache_dir", "ensure_pyramid", "needs_pyramid", "pyramid_levels"]
