"""Evidence from a saved session: every vessel that was not rejected, analysed again with the request
stored for it (deterministic: the same numbers as when it was saved), corrected by the analyst's hand
measurements through the same project rules the program uses, and exported."""

from __future__ import annotations

from pathlib import Path

from ..detect.analysis import analyze
from ..detect.result import WakeAnalysis
from ..errors import ParameterError
from ..project import Project
from ..project import session as session_mod
from ..scene import geodesy
from ..scene.raster import open_scene
from .export import EvidenceFiles, export_evidence


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


def report_from_session(
    path: str | Path,
    out_dir: str | Path,
    *,
    analyst: str | None = None,
    force: bool = False,
    vessel_name: str | None = None,
) -> list[EvidenceFiles]:
    data = session_mod.load(path)
    scene_path = data["scene"].get("resolved_path")
    if not scene_path or not Path(scene_path).exists():
        raise ParameterError(
            f"the session's scene was not found ({data['scene'].get('absolute_path')}); "
            "open the session in the program to locate it"
        )
    out = []
    with open_scene(scene_path) as scene:
        if data.get("calibration") and not scene.info.georeferenced:
            c = data["calibration"]
            scene.calibrate(geodesy.calibrated_frame(pixel_size_m=c["pixel_size_m"], north_up_deg=c["north_up_deg"]))
        project = Project()
        project.scene = scene
        session_mod.fill_project(project, data)
        vessels = [
            v
            for v in project.vessels.values()
            if v.id not in project.rejected and (vessel_name is None or v.name == vessel_name)
        ]
        if not vessels:
            raise ParameterError("the session has no vessel to report (none marked, all rejected, or no such name)")
        for v in vessels:
            if v.id not in project.findings:  # marked but never analysed: analyse it now, with its request
                project.findings[v.id] = analyze(scene, project.request_for(v.id))
            a = with_plots(project, v.id)
            out.append(
                export_evidence(
                    scene,
                    a,
                    out_dir,
                    analyst=analyst,
                    force=force,
                    basename=f"{scene.info.path.stem}_{v.name or f'vessel_{v.id}'}",
                    parameters={"session": Path(path).name, "vessel": v.name},
                )
            )
    return out


def is_session(path: str | Path) -> bool:
    """A ``.json`` file is taken for a session (rasters are never JSON): reading it then says what is wrong."""
    p = Path(path)
    return p.suffix.lower() == ".json" and p.is_file()
