"""Scene positions and array indices, in one place.

Scene positions are GDAL's continuous pixel coordinates: the georeference maps (0, 0) to the corner of the
first pixel, so pixel i covers [i, i + 1) and its centre is at i + 0.5.  Arrays read from a window (chips,
the vessel finder's windows, hand-measurement profiles) are indexed by pixel centres.  A window starting at
scene pixel ``origin`` whose pixels each span ``step`` scene pixels has index j centred at
``origin + (j + 0.5) * step``.
"""

from __future__ import annotations

from typing import Any


def index_to_scene(origin: tuple[float, float], step: float, row: Any, col: Any) -> tuple[Any, Any]:
    """Scene (col, row) of the array index (row, col); scalars or numpy arrays."""
    return origin[0] + (col + 0.5) * step, origin[1] + (row + 0.5) * step


def scene_to_index(origin: tuple[float, float], step: float, col: Any, row: Any) -> tuple[Any, Any]:
    """Array index (row, col) of the scene position (col, row): the inverse of :func:`index_to_scene`."""
    return (row - origin[1]) / step - 0.5, (col - origin[0]) / step - 0.5
