"""Evidence from a saved session: every vessel that was not rejected, with the analyst's inputs and
hand corrections (crest ruler, arm), analysed again (deterministic) and exported."""

from __future__ import annotations

from pathlib import Path

from .. import session as session_mod
from ..detect import handmeasure as hm
from ..detect.analysis import RadarGeometry, analyze
from ..detect.revise import revise
from ..errors import ParameterError, WakemeterError
from ..scene import geodesy
from ..scene.raster import open_scene
from .export import EvidenceFiles, export_evidence


def _hand(scene, measurements: list[dict], vid: int):
    track = [m for m in measurements if m["kind"] == "track" and m.get("vessel_id") == vid]
    crest = [m for m in measurements if m["kind"] == "crest" and m.get("vessel_id") == vid]
    arm = [m for m in measurements if m["kind"] == "arm" and m.get("vessel_id") == vid]
    tpts = tuple(tuple(p) for p in track[-1]["points_px"]) if track else None
    hand_crest = hand_arm = None
    try:
        if crest:
            pts = tuple(tuple(p) for p in crest[-1]["points_px"])
            c = hm.crest_ruler(scene, *pts)
            ang = hm.angle_to_track(scene, tpts, pts)[0] if tpts else 0.0
            hand_crest = (c.spacing_m, c.spacing_std_m, min(ang, 80.0))
        if arm and tpts:
            a, sd = hm.angle_to_track(scene, tpts, tuple(tuple(p) for p in arm[-1]["points_px"]))
            hand_arm = (a, max(sd, 0.5))
    except WakemeterError:
        pass
    return hand_crest, hand_arm


def report_from_session(path: str | Path, out_dir: str | Path, *, analyst: str | None = None, force: bool = False,
                        vessel_name: str | None = None) -> list[EvidenceFiles]:
    data = session_mod.load(path)
    scene_path = data["scene"].get("resolved_path")
    if not scene_path or not Path(scene_path).exists():
        raise ParameterError(f"the session's scene was not found ({data['scene'].get('absolute_path')}); "
                             "open the session in the program to locate it")
    rejected = {int(k) for k, f in (data.get("findings") or {}).items() if f.get("rejected")}
    out = []
    with open_scene(scene_path) as scene:
        if data.get("calibration") and not scene.info.georeferenced:
            c = data["calibration"]
            scene.calibrate(geodesy.calibrated_frame(pixel_size_m=c["pixel_size_m"], north_up_deg=c["north_up_deg"]))
        vessels = [v for v in data["vessels"] if int(v["id"]) not in rejected
                   and (vessel_name is None or v["name"] == vessel_name)]
        if not vessels:
            raise ParameterError("the session has no vessel to report (none marked, all rejected, or no such name)")
        for v in vessels:
            vid = int(v["id"])
            inp = (data.get("inputs") or {}).get(str(vid), {})
            rg = RadarGeometry(*inp["radar_geometry"]) if inp.get("radar_geometry") else None
            a = analyze(scene, vessel_px=tuple(v["position_px"]), depth_m=inp.get("depth_m"),
                        hull_length_m=inp.get("hull_length_m"), radar_geometry=rg)
            hand_crest, hand_arm = _hand(scene, data["measurements"], vid)
            a = revise(a, hand_crest=hand_crest, hand_half_angle=hand_arm)
            safe = "".join(ch if ch.isalnum() else "_" for ch in v["name"]).strip("_") or f"vessel_{vid}"
            out.append(export_evidence(scene, a, out_dir, analyst=analyst, force=force,
                                       basename=f"{scene.info.path.stem}_{safe}",
                                       parameters={"session": Path(path).name, "vessel": v["name"],
                                                   **{k: val for k, val in inp.items() if val}}))
    return out


def is_session(path: str | Path) -> bool:
    p = Path(path)
    if p.suffix.lower() != ".json" or not p.is_file():
        return False
    try:
        import json
        return str(json.loads(p.read_text()).get("schema", "")).startswith("wakemeter.session/")
    except (OSError, ValueError, AttributeError):
        return False
