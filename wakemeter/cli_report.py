"""``wakemeter report``: analyse a vessel and write the evidence files (PNG, PDF, JSON)."""

from __future__ import annotations

import argparse

from .cli import CAUTION, command
from .cli_analyze import _add as _add_analysis
from .cli_analyze import _pair, check_position_and_radar


def _add(p: argparse.ArgumentParser) -> None:
    _add_analysis(p)
    p.add_argument("--out", required=True, metavar="FOLDER", help="folder for the three files")
    p.add_argument("--analyst", help="analyst name to record in the report")
    p.add_argument("--force", action="store_true", help="overwrite existing files of the same name")
    p.add_argument("--paper", choices=["A4", "Letter"], help="page size (default: by locale)")


@command("report", "Analyse a vessel's wake and write an annotated PNG, a PDF report and a JSON record.")(_add)
def run(args: argparse.Namespace) -> int:
    from .detect.analysis import analyze
    from .evidence.export import export_evidence
    from .evidence.from_session import is_session, report_from_session
    from .scene.raster import open_scene

    if is_session(args.scene):  # a saved session instead of a scene: every vessel not rejected
        for files in report_from_session(args.scene, args.out, analyst=args.analyst, force=args.force):
            print(f"wrote {files.image}\nwrote {files.report}\nwrote {files.data}")
        print(CAUTION)
        return 0

    radar_geo = check_position_and_radar(args)
    params = {k: v for k, v in {"vessel": args.vessel, "vessel_px": args.vessel_px, "depth_m": args.depth,
                                "depth_std_m": args.depth_std or None, "hull_length_m": args.hull_length,
                                "radar_geometry": args.radar_geometry, "seed": args.seed}.items() if v is not None}
    with open_scene(args.scene) as scene:
        a = analyze(scene, vessel_lonlat=_pair(args.vessel, "--vessel") if args.vessel else None,
                    vessel_px=_pair(args.vessel_px, "--vessel-px") if args.vessel_px else None,
                    depth_m=args.depth, depth_std_m=args.depth_std, hull_length_m=args.hull_length,
                    radar_geometry=radar_geo, seed=args.seed)
        files = export_evidence(scene, a, args.out, analyst=args.analyst, parameters=params, force=args.force,
                                paper=args.paper)
    print(f"wrote {files.image}\nwrote {files.report}\nwrote {files.data}")
    if a.wake_found:
        print(f"speed {a.speed.speed_mps:.2f} m/s, 95 % interval {a.speed.ci95_low_mps:.2f}-"
              f"{a.speed.ci95_high_mps:.2f} m/s; heading {a.heading_deg:.1f} deg")
    else:
        print("no wake found: the report says so and gives no speed")
    print(CAUTION)
    return 0

