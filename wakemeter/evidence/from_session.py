"""Evidence from a saved session: every vessel that was not rejected, analysed again with the request
stored for it (deterministic: the same numbers as when it was saved), corrected by the analyst's hand
measurements through the same project rules the program uses, and exported."""

from __future__ import annotations

from collections.abc import Callable, Iterator
from contextlib import contextmanager
from dataclasses import replace
from pathlib import Path

from ..detect.analysis import analyze
from ..detect.result import WakeAnalysis
from ..errors import ParameterError
from ..project import Project
from ..project import session as session_mod
from ..scene.raster import Scene, open_scene
from .export import CaseDetails, EvidenceFiles, VesselEvidence, export_evidence_set, hand_measurement_rows


def with_plots(project: Project, vessel_id: int) -> WakeAnalysis:
    """The vessel's effective finding with its plot arrays: a finding read back from a session has none,
    so the request it answered is run again (the same request gives the same result)."""
    eff = project.effective_finding(vessel_id)
    if eff is not None and eff.plots is not None:
        return eff
    if project.scene is None:
        raise ParameterError("open the session's scene first")
    stored = project.findings.get(vessel_id)
    request = stored.request if stored is not None and stored.request is not None else project.request_for(vessel_id)
    project.findings[vessel_id] = analyze(project.scene, request)
    out = project.effective_finding(vessel_id)
    assert out is not None
    return out


def session_vessels(project: Project, vessel_name: str | None = None) -> list[VesselEvidence]:
    """Every vessel of the project that was not rejected (or the one named), with its effective finding
    (plots included) and its hand measurements, in the order they were marked."""
    vessels = [
        v
        for v in project.vessels.values()
        if v.id not in project.rejected and (vessel_name is None or v.name == vessel_name)
    ]
    out = []
    for v in vessels:
        if v.id not in project.findings:  # marked but never analysed: analyse it now, with its request
            assert project.scene is not None
            project.findings[v.id] = analyze(project.scene, project.request_for(v.id))
        hand = [m for m in project.measurements.values() if m.vessel_id == v.id]
        out.append(VesselEvidence(with_plots(project, v.id), v.name, tuple(hand_measurement_rows(hand))))
    return out


@contextmanager
def open_session_vessels(
    path: str | Path, vessel_name: str | None = None
) -> Iterator[tuple[Scene, list[VesselEvidence]]]:
    """The session's scene (opened, checked against its SHA-256, calibrated as saved) and its vessels."""
    data = session_mod.load(path)
    scene_path = data["scene"].get("resolved_path")
    if not scene_path or not Path(scene_path).exists():
        raise ParameterError(
            f"the session's scene was not found ({data['scene'].get('absolute_path')}); "
            "open the session in the program to locate it"
        )
    with open_scene(scene_path) as scene:
        saved = data["scene"].get("sha256")
        if not saved:
            raise ParameterError(
                "the session does not record its scene's SHA-256, so the scene cannot be checked to be the one "
                "analysed; open the session in the program (which checks the scene) and save it again"
            )
        if saved != scene.sha256():
            raise ParameterError(
                f"the scene {scene.info.origin.name} has changed since the session was saved (SHA-256 was "
                f"{saved[:12]}..., is now {scene.sha256()[:12]}...): the marked positions and findings may not "
                "belong to it. Open the session in the program to check the scene, or restore the original file"
            )
        session_mod.restore_calibration(scene, data)
        project = Project()
        project.scene = scene
        session_mod.fill_project(project, data)
        vessels = session_vessels(project, vessel_name)
        if not vessels:
            raise ParameterError("the session has no vessel to report (none marked, all rejected, or no such name)")
        yield scene, vessels


def report_from_session(
    path: str | Path,
    out_dir: str | Path,
    *,
    analyst: str | None = None,
    case_reference: str | None = None,
    force: bool = False,
    vessel_name: str | None = None,
    paper: str | None = None,
    compare: Callable[[list[tuple[str, WakeAnalysis]], str | None], tuple[list[dict | None], list[dict]] | None]
    | None = None,
) -> EvidenceFiles:
    """One evidence set for the session's vessels (every one not rejected, or the one named)."""
    with open_session_vessels(path, vessel_name) as (scene, vessels):
        unmatched = None
        if compare is not None:
            compared = compare([(v.name, v.analysis) for v in vessels], scene.info.acquisition_time)
            if compared is not None:
                vessels = [replace(v, position_report=c) for v, c in zip(vessels, compared[0], strict=True)]
                unmatched = compared[1]
        stem = scene.info.origin.stem
        base = f"{stem}_{vessels[0].name or 'vessel'}" if len(vessels) == 1 else f"{Path(path).stem}_report"
        return export_evidence_set(
            scene,
            vessels,
            out_dir,
            case=CaseDetails(analyst, case_reference),
            force=force,
            basename=base,
            paper=paper,
            parameters={"session": Path(path).name},
            unmatched_reports=unmatched,
        )


def is_session(path: str | Path) -> bool:
    """A ``.json`` file, or any file whose text starts with "{", is taken for a session (rasters are never
    JSON): reading it then says what is wrong with it."""
    p = Path(path)
    if not p.is_file():
        return False
    if p.suffix.lower() == ".json":
        return True
    try:
        with open(p, "rb") as fh:
            head = fh.read(64).lstrip()
    except OSError:
        return False
    return head.startswith(b"{")
