"""The evidence record: everything in the report as data, with a schema version and provenance.

The JSON schema is ``wakemeter/evidence/evidence.schema.json`` (JSON Schema draft 2020-12).
"""

from __future__ import annotations

import datetime as _dt
import json
import platform
from importlib import resources
from pathlib import Path

from .. import __version__
from ..caution import CAUTION
from ..detect.result import WakeAnalysis
from ..scene.raster import Scene
from .summary import method_assumptions

SCHEMA_VERSION = "wakemeter.evidence/3"

CAUTION_TEXT = CAUTION  #: the one caution text (wakemeter/caution.py)


def schema() -> dict:
    return json.loads(resources.files(__package__).joinpath("evidence.schema.json").read_text())


def provenance(scene: Scene, *, parameters: dict) -> dict:
    i = scene.info
    return {
        "scene_file": i.origin.name,
        "scene_path": str(i.origin),
        "scene_size_bytes": i.file_size,
        "scene_sha256": scene.sha256(),
        "scene_driver": i.driver,
        "acquisition_time": i.acquisition_time,
        "georeference": {
            "georeferenced": i.georeferenced,
            "crs": i.crs,
            "transform": list(i.transform)[:6] if i.georeferenced else None,
            "note": i.georeference_note,
        },
        "software": f"wakemeter {__version__}",
        "python": platform.python_version(),
        "analysis_parameters": parameters,
    }


def now_utc() -> str:
    return _dt.datetime.now(_dt.UTC).replace(microsecond=0).isoformat()


def build_record(
    scene: Scene,
    vessels: list[tuple[WakeAnalysis, str, list[dict], dict | None]],
    *,
    analyst: str | None,
    parameters: dict,
    files: dict,
    case_reference: str | None = None,
    exported_at: str | None = None,
    unmatched_reports: list[dict] | None = None,
) -> dict:
    """The full evidence record (plain data): the case, one entry per vessel (name, result, its
    assumptions, its hand measurements, its image) and the provenance."""
    entries = []
    for i, (analysis, name, hand, compared) in enumerate(vessels):
        result = analysis.to_json()
        entries.append(
            {
                "name": name or None,
                "result": result,
                "request": analysis.request.to_json() if analysis.request is not None else None,
                "assumptions": method_assumptions(analysis),
                "hand_measurements": hand,
                "position_report": compared,
                "image": files["images"][i],
            }
        )
    return {
        "schema": SCHEMA_VERSION,
        "caution": CAUTION_TEXT,
        "case": {
            "reference": case_reference or None,
            "analyst": analyst or None,
            "exported_at": exported_at or now_utc(),
        },
        "vessels": entries,
        "unmatched_reports": unmatched_reports,
        "provenance": provenance(scene, parameters=parameters),
        "files": files,
    }


def validate(record: dict) -> None:
    """Raise ``jsonschema.ValidationError`` when the record does not follow the schema."""
    import jsonschema

    from ..detect.result import schema_registry

    jsonschema.Draft202012Validator(schema(), registry=schema_registry()).validate(record)


def schema_path() -> Path:
    return Path(str(resources.files(__package__).joinpath("evidence.schema.json")))
