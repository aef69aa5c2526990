"""False-alarm sweep (script): the decision statistics on wake-free scenes.

Run: ``.venv/bin/python benchmarks/null_sweep.py [N] [SIZE]``.  Prints the spectral significance
and wake-side contrast of every wake-free scene (N synthetic noise/swell scenes and the
scikit-image textures, SIZE x SIZE pixels, 640 by default) at three positions, and how many
would be called a wake.  Scenes of 1024 px or more also exercise the half-resolution look.
"""

from __future__ import annotations

import sys
import tempfile
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "tests"))
from null_cases import TEXTURES, synthetic_null, texture_null  # noqa: E402

from wakemeter.detect.analysis import analyze  # noqa: E402
from wakemeter.scene.raster import open_scene  # noqa: E402


def main(n: int, size: int = 640) -> None:
    rows = []
    f = size / 640
    with tempfile.TemporaryDirectory() as tmp:
        paths = ([synthetic_null(s, Path(tmp), size=size) for s in range(n)]
                 + [texture_null(t, Path(tmp), size=size) for t in TEXTURES])
        for path in paths:
            with open_scene(path) as sc:
                for pos in ((320 * f, 320 * f), (200 * f, 420 * f), (440 * f, 250 * f)):
                    a = analyze(sc, vessel_px=pos)
                    rows.append((path.name, pos, a.significance, a.plots.get("side_contrast"), a.wake_found))
                    print(f"{path.name:<24} {pos} significance {a.significance:6.2f} side {rows[-1][3]:7.2f} "
                          f"{'WAKE' if a.wake_found else ''}", flush=True)
    sig = np.array([r[2] for r in rows])
    print(f"\n{len(rows)} wake-free trials: {sum(r[4] for r in rows)} called a wake; significance max {sig.max():.2f}, "
          f"99th percentile {np.percentile(sig, 99):.2f}")


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 30, int(sys.argv[2]) if len(sys.argv) > 2 else 640)
