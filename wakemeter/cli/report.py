"""``wakemeter report``: analyse a vessel (or a session's vessels) and write one evidence set."""

from __future__ import annotations

import argparse
import os
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
    from ..evidence.export import EvidenceFiles


def add_arguments(p: argparse.ArgumentParser) -> None:
    add_scene_argument(p, "raster file, or a saved session (.json): every vessel not rejected")
    add_request_options(p)
    add_reports_options(p)
    p.add_argument("--out", required=True, metavar="FOLDER", help="folder in which the evidence set is made")
    p.add_argument("--name", metavar="TEXT", help="name of the set (default: scene and vessel position)")
    p.add_argument("--analyst", help="analyst name to record in the report")
    p.add_argument("--case", metavar="REFERENCE", help="case reference to print on every page")
    p.add_argument("--vessel-name", metavar="TEXT", help="name of the vessel (with a session: report only this one)")
    p.add_argument("--force", action="store_true", help="replace an existing set of the same name, as a whole")
    p.add_argument("--paper", choices=["A4", "Letter"], help="page size (default: by locale)")


def run(args: argparse.Namespace) -> int:
    from ..errors import SetExistsError

    try:
        return _run(args)
    except SetExistsError as err:  # in the command's own words
        raise SetExistsError(
            f"{err.name} already exists in {err.folder}: give --force to replace it, or --name for another name",
            name=err.name,
            folder=err.folder,
        ) from err


def _run(args: argparse.Namespace) -> int:
    from ..detect.analysis import analyze
    from ..evidence.export import export_evidence
    from ..evidence.from_session import is_session, report_from_session
    from ..scene.raster import open_scene

    _check_folder(args.out)  # before any analysis: a missing folder is said at once
    if is_session(args.scene):  # a saved session instead of a scene: its vessels in one report
        files = report_from_session(
            args.scene,
            args.out,
            analyst=args.analyst,
            case_reference=args.case,
            force=args.force,
            vessel_name=args.vessel_name,
            paper=args.paper,
            compare=lambda named, acquired: compare_with_reports(args, named, acquired),
        )
        _say_written(files)
        print(CAUTION_LINE)
        return 0
    request = checked_request(args)
    _refuse_early(args)
    with open_scene(args.scene) as scene:
        apply_calibration(scene, args)
        a = analyze(scene, request)
        compared = compare_with_reports(args, [(args.vessel_name or "vessel", a)], scene.info.acquisition_time)
        files = export_evidence(
            scene,
            a,
            args.out,
            analyst=args.analyst,
            case_reference=args.case,
            vessel_name=args.vessel_name or "",
            basename=args.name,
            force=args.force,
            paper=args.paper,
            parameters={"calibration": {"pixel_size_m": args.pixel_size, "north_up_deg": args.north_up}}
            if args.pixel_size
            else None,
            position_report=None if compared is None else compared[0][0],
            unmatched_reports=None if compared is None else compared[1],
        )
    _say_written(files)
    if a.speed is not None:
        kind = f"speed {a.speed_basis}"
        print(
            f"{kind} {a.speed.speed_mps:.2f} m/s, 95 % interval {a.speed.ci95_low_mps:.2f}-"
            f"{a.speed.ci95_high_mps:.2f} m/s; heading {a.heading_deg:.1f}°"
        )
    elif a.wake_found:
        print(
            f"wake found as lines: heading {a.heading_deg:.1f}° (± {a.heading_std_deg:.1f}°); no speed, and the "
            "report says why"
        )
    else:
        print("no wake found: the report says so and gives no speed")
    print(CAUTION_LINE)
    return 0


def _say_written(files: EvidenceFiles) -> None:
    for line in files.cleaned:
        print(f"tidied a leftover of an interrupted export: {line}")
    print(f"wrote {files.folder}{os.sep}")
    for f in files.all_files():
        print(f"  {f.name}")


def _refuse_early(args: argparse.Namespace) -> None:
    """A set named with --name that is already there is refused before any analysis (without --force)."""
    from pathlib import Path

    from .. import fileio
    from ..errors import SetExistsError
    from ..evidence.export import safe_stem

    if not args.name or args.force:
        return
    fileio.clean_stale(args.out)  # a killed writer's leftovers go first, even from a run that is refused
    if (Path(args.out) / safe_stem(args.name)).exists():
        raise SetExistsError("already exists", name=safe_stem(args.name), folder=args.out)


def _check_folder(folder: str) -> None:
    import os
    from pathlib import Path

    from ..errors import SceneWriteError

    p = Path(folder)
    if not p.is_dir():
        raise SceneWriteError(f"the output folder {folder} does not exist (create it first)")
    if not os.access(p, os.W_OK):
        raise SceneWriteError(f"the output folder {folder} is not writable")


COMMAND = Command(
    "report",
    "Analyse vessels' wakes and write one evidence set: PDF report, JSON record, annotated PNG per vessel, checksums.",
    add_arguments,
    run,
)
