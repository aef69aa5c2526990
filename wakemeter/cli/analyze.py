"""``wakemeter analyze``: speed, heading and depth regime of a vessel's wake, headless."""

from __future__ import annotations

import argparse
import json
from typing import TYPE_CHECKING

from .base import CAUTION_LINE, Command, add_scene_argument
from .options import add_reports_options, add_request_options, apply_calibration, checked_request, compare_with_reports

if TYPE_CHECKING:
    from ..detect.result import WakeAnalysis


def add_arguments(p: argparse.ArgumentParser) -> None:
    add_scene_argument(p, "raster file")
    add_request_options(p)
    add_reports_options(p)
    p.add_argument("--json", action="store_true", help="print one JSON object")


def run(args: argparse.Namespace) -> int:
    from ..detect.analysis import analyze
    from ..scene.raster import open_scene

    request = checked_request(args)
    with open_scene(args.scene) as scene:
        apply_calibration(scene, args)
        a = analyze(scene, request)
        acquired = scene.info.acquisition_time
    j = a.to_json()
    compared = compare_with_reports(args, [("vessel", a)], acquired)
    if compared is not None:
        j["position_report"] = compared[0][0]
        j["unmatched_reports"] = compared[1]
    if args.json:
        print(json.dumps(j, indent=2, default=str))
    else:
        print(format_analysis(a))
        if compared is not None:
            c = compared[0][0]
            print(f"Position report: {c['text'] if c else 'the vessel has no longitude and latitude to match'}")
    return 0


def format_analysis(a: WakeAnalysis) -> str:
    """A readable summary of a result: the rows every view shows, then the methods."""
    from ..evidence import summary

    rows = summary.summary_rows(a)
    width = max(len(k) for k, _ in rows) + 2
    out = [f"{k + ':':<{width}}{v}" for k, v in rows]
    if not a.wake_found:
        return "\n".join(out + ["no speed is given for a scene without a detectable wake", CAUTION_LINE])
    out.append("methods:")
    out += [f"  {name:<48} {speed} m/s  (95 %: {ci})" for name, speed, ci, _kn in summary.method_rows(a)]
    out.append("assumptions:")
    out += [f"  - {a}" for a in summary.assumption_texts(a)]
    out.append(a.decision)
    out.append("cautions:")
    out += [f"  - {c}" for c in summary.caution_texts(a)]
    return "\n".join(out)


COMMAND = Command(
    "analyze", "Find a vessel's wake and estimate speed (95 % interval), heading and depth regime.", add_arguments, run
)
