"""Texts of the Help menu: keys and tools, how the numbers are measured, versions.  Plain text built from
the program's own tables (no physics here: the numbers are the core's)."""

from __future__ import annotations

import platform

METHODS = """How wakemeter measures a vessel's speed

The analysis reads a square around the marked vessel, finds which side its wake lies on and fits the
steady-wave curve (k . U)^2 = g |k| tanh(|k| h) to the 2-D spectrum of the water behind the vessel,
whitened by the spectrum ahead of it (Zilman et al. 2004). Transverse waves are lambda = 2 pi U^2 / g long
in deep water (Lamb 1932); the Kelvin arms open at 19.47 deg unless shallow water widens them (Havelock
1908). A finding needs a vessel at the point: its hull, or the apex of its V. Each method gives a speed
with a 95 % interval from Monte Carlo draws (JCGM 101:2008); the methods are combined with a chi-square
cross-check. A radar hull is imaged shifted along the flight direction (Raney 1971); with the radar
geometry that shift gives one more speed.

Every figure is an estimate from imagery. Local regulations, certified measuring instruments and licensed
professionals decide any enforcement; verify scene timing and georeferencing independently."""


def keys_text(tools: dict[str, tuple[str, str]]) -> str:
    lines = ["Tools (keys 1-7, Esc for Look)"]
    for i, (label, tip) in enumerate(tools.values()):
        lines.append(f"  {'Esc' if i == 0 else i + 1:<4} {label}: {tip}")
    lines += [
        "",
        "View: wheel or + / - zoom, F fit, 1 for 1:1, arrows pan",
        "Ctrl+R analyse the selected vessel, Ctrl+E export evidence, Ctrl+S save the session",
        "Ctrl+Z / Ctrl+Shift+Z undo and redo, Delete removes the selected item",
    ]
    return "\n".join(lines)


def about_text() -> str:
    import numpy
    import PySide6
    import rasterio
    import scipy

    from .. import __version__

    return (
        f"wakemeter {__version__}\nPython {platform.python_version()}, Qt (PySide6) {PySide6.__version__}, "
        f"numpy {numpy.__version__}, scipy {scipy.__version__}, rasterio {rasterio.__version__} "
        f"(GDAL {rasterio.__gdal_version__})"
    )
