"""False-alarm sweep (script): the decision statistics on wake-free scenes.

Run: ``.venv/bin/python benchmarks/null_sweep.py [N] [SIZE] [--tune NAME=VALUE]``.  Analyses every wake-free
scene (N synthetic noise/swell scenes and the scikit-image textures, SIZE x SIZE pixels, 640 by default)
at three positions and records how many would be called a wake, beside the last record in
``benchmarks/results/``.  Scenes of 1024 px or more also exercise the half-resolution look.
"""

from __future__ import annotations

import tempfile
from pathlib import Path

import numpy as np

from wakemeter.detect.analysis import AnalysisRequest, analyze
from wakemeter.scene.raster import open_scene
from wakemeter.synth.cases import TEXTURES, synthetic_null, texture_null

from sweep_record import parse, record


def main(n: int, size: int, tuning) -> tuple[dict, list[dict]]:
    rows = []
    f = size / 640
    with tempfile.TemporaryDirectory() as tmp:
        paths = [synthetic_null(s, Path(tmp), size=size) for s in range(n)] + [
            texture_null(t, Path(tmp), size=size) for t in TEXTURES
        ]
        for path in paths:
            with open_scene(path) as sc:
                for pos in ((320 * f, 320 * f), (200 * f, 420 * f), (440 * f, 250 * f)):
                    a = analyze(sc, AnalysisRequest(vessel_px=pos), tuning)
                    rows.append(
                        {
                            "scene": path.name,
                            "position_px": list(pos),
                            "significance": a.significance,
                            "side_contrast": a.diagnostics.side_contrast,
                            "wake": a.wake_found,
                        }
                    )
                    print(
                        f"{path.name:<24} {pos} significance {a.significance:6.2f} side "
                        f"{a.diagnostics.side_contrast:7.2f} {'WAKE' if a.wake_found else ''}",
                        flush=True,
                    )
    sig = np.array([r["significance"] for r in rows])
    summary = {
        "trials": len(rows),
        "called_a_wake": int(sum(r["wake"] for r in rows)),
        "max_significance": float(np.nanmax(sig)),
        "significance_p99": float(np.nanpercentile(sig, 99)),
    }
    return summary, rows


if __name__ == "__main__":
    args, tuning = parse(
        __doc__.splitlines()[0],
        [("n", int, 30, "synthetic wake-free scenes"), ("size", int, 640, "scene side, pixels")],
    )
    summary, rows = main(args.n, args.size, tuning)
    record("null_sweep", {"n": args.n, "size": args.size}, tuning, summary, rows, write=not args.no_record)
