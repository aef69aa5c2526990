"""What one batch task is and does.

A task carries paths and plain data only (the scene's path and SHA-256, the vessel's name and its analysis
request as JSON): the worker opens its own window of the scene, so nothing large travels through the
scheduler.  Its key is the SHA-256 of the scene's digest, the request and the software version, so a rerun
finds what is done.  The result is written by the worker itself, atomically, as ``results/<key>.json``.
"""

from __future__ import annotations

import contextlib
import hashlib
import json
import os
import traceback
from collections.abc import Iterator
from dataclasses import asdict, dataclass
from pathlib import Path
from typing import TYPE_CHECKING

from .. import __version__, fileio
from ..names import clean_name

if TYPE_CHECKING:
    from ..scene.raster import Scene


@dataclass(frozen=True)
class BatchTask:
    scene_path: str
    scene_sha256: str
    vessel_name: str
    request: dict  #: AnalysisRequest.to_json()
    found: dict | None = None  #: the vessel finder's candidate (VesselCandidate.to_json()) when it was found

    def __post_init__(self) -> None:
        object.__setattr__(self, "vessel_name", clean_name(self.vessel_name))

    @property
    def key(self) -> str:
        text = json.dumps([self.scene_sha256, self.request, __version__], sort_keys=True)
        return hashlib.sha256(text.encode()).hexdigest()[:32]


def result_path(out: Path, task: BatchTask) -> Path:
    return out / "results" / f"{task.key}.json"


def done(out: Path, task: BatchTask) -> bool:
    """True when a finished (not failed) result of this very task is on disk."""
    p = result_path(out, task)
    try:
        return json.loads(p.read_text()).get("status") == "done"
    except (OSError, ValueError):
        return False


@contextlib.contextmanager
def opened_scene(task: BatchTask) -> Iterator[Scene]:
    """The task's scene, opened and checked against the SHA-256 it had when the batch was planned."""
    from ..errors import WakemeterError
    from ..scene.raster import open_scene

    with open_scene(task.scene_path) as scene:
        if scene.sha256() != task.scene_sha256:
            raise WakemeterError(f"{Path(task.scene_path).name} changed after the batch was planned")
        yield scene


def run_task(task: BatchTask, out: str) -> dict:
    """Analyse one vessel (on a worker); never raises: a failure is recorded with its reason."""
    import cv2

    from ..detect.analysis import analyze
    from ..detect.request import AnalysisRequest
    from ..errors import WakemeterError

    cv2.setNumThreads(1)  # one thread per task: workers do not fight over the cores
    _fault_injection()
    record: dict = {"task": asdict(task), "key": task.key, "software": f"wakemeter {__version__}"}
    try:
        with opened_scene(task) as scene:
            a = analyze(scene, AnalysisRequest.from_json(task.request))
        record.update(status="done", result=a.to_json())
    except WakemeterError as err:
        record.update(status="failed", reason=str(err))
    except Exception as err:  # noqa: BLE001 - one vessel's unexpected failure must not stop the others
        record.update(status="failed", reason=f"unexpected error: {err!r}", trace=traceback.format_exc(limit=5))
    target = result_path(Path(out), task)
    target.parent.mkdir(parents=True, exist_ok=True)
    fileio.atomic_write_bytes(target, (json.dumps(record, indent=1, default=str) + "\n").encode())
    return {"key": task.key, "status": record["status"], "reason": record.get("reason")}


def evidence_name(task: BatchTask) -> str:
    """The name of a vessel's evidence set in a batch: scene, vessel and the task's key (so a rerun finds it)."""
    from ..evidence.export import safe_stem

    return f"{safe_stem(f'{Path(task.scene_path).stem}_{task.vessel_name}')}_{task.key[:8]}"


def evidence_task(
    task: BatchTask,
    out: str,
    *,
    analyst: str | None = None,
    case_reference: str | None = None,
    paper: str | None = None,
    position_report: dict | None = None,
) -> dict:
    """Write one vessel's evidence set into ``<out>/evidence/`` (on a worker); never raises.

    The analysis is run again from the task's request (the same request gives the same numbers as the
    stored result) because the report's plots need the arrays a stored result does not keep.  A set that
    is already there is left as it is ("kept")."""
    import cv2

    from ..detect.analysis import analyze
    from ..detect.request import AnalysisRequest
    from ..errors import WakemeterError
    from ..evidence.export import export_evidence

    cv2.setNumThreads(1)
    folder = Path(out) / "evidence"
    name = evidence_name(task)
    said = {"key": task.key, "name": name, "reason": None}
    if (folder / name).is_dir():
        return {**said, "status": "kept"}
    try:
        folder.mkdir(parents=True, exist_ok=True)
        with opened_scene(task) as scene:
            a = analyze(scene, AnalysisRequest.from_json(task.request))
            export_evidence(
                scene,
                a,
                folder,
                analyst=analyst,
                case_reference=case_reference,
                vessel_name=task.vessel_name,
                basename=name,
                paper=paper,
                position_report=position_report,
            )
    except WakemeterError as err:
        if (folder / name).is_dir():  # another run published it meanwhile
            return {**said, "status": "kept"}
        return {**said, "status": "failed", "reason": str(err)}
    except Exception as err:  # noqa: BLE001 - one vessel's unexpected failure must not stop the others
        return {**said, "status": "failed", "reason": f"unexpected error: {err!r}"}
    return {**said, "status": "written"}


#: test hook for worker deaths: when this variable names a file that does not exist yet, the first task to
#: see it creates the file and kills its own worker process (tests set it in the workers' environment)
DIE_ONCE_ENV = "WAKEMETER_TEST_DIE_ONCE"


def _fault_injection() -> None:
    marker = os.environ.get(DIE_ONCE_ENV)
    if marker:
        try:
            fd = os.open(marker, os.O_CREAT | os.O_EXCL | os.O_WRONLY)
        except FileExistsError:
            return
        os.close(fd)
        os._exit(3)


def find_task(scene_path: str, pfa_per_km2: float, land_path: str | None = None) -> list[dict]:
    """Find the vessels of one scene (on a worker): their candidates as JSON; ``land_path``, a land layer."""
    from ..detect.vessel_finder import find_vessels
    from ..scene.land_layer import LandLayer
    from ..scene.raster import open_scene

    with open_scene(scene_path) as scene:
        land = None
        if land_path:
            land = LandLayer.read(land_path, scene.georef if scene.info.georeferenced else None)
        return [c.to_json() for c in find_vessels(scene, pfa_per_km2=pfa_per_km2, land=land)]
