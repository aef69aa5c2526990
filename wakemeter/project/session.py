"""Analysis sessions: a documented, versioned JSON file of our own schema ("wakemeter.session/2").

Fields: ``schema``; ``scene`` {``path`` (relative to the session file when possible),
``absolute_path``, ``sha256``, ``size_bytes``}; ``calibration`` (null or {``pixel_size_m``,
``north_up_deg``}); ``vessels`` [{``id``, ``name``, ``position_px``, optional ``found_score`` (the vessel
finder's) and ``merged`` (detections or rows of the same vessel folded into it)}]; ``measurements``
[{``id``, ``kind``, ``points_px``, ``vessel_id``, ``values``}]; ``requests`` {vessel id: the analysis
request JSON (``wakemeter.request/1``: depth with its uncertainty, hull length, radar geometry, seed)};
``findings`` {vessel id: {``result`` (the analysis JSON, with its drawing and request), ``rejected``}};
``saved_at``.  Sessions of schema 1 (``inputs`` instead of ``requests``, a separate ``geometry``) are read.

Writes are atomic (temporary file, then rename); a corrupt or future-version file raises
:class:`SessionError` and nothing is changed.
"""

from __future__ import annotations

import datetime as _dt
import json
import math
import os
import re
import secrets
from pathlib import Path
from typing import TYPE_CHECKING, Any

from ..errors import WakemeterError
from ..fileio import atomic_write_bytes, clean_stale
from .model import Measurement, Project, Vessel

if TYPE_CHECKING:
    from ..scene.raster import Scene

SCHEMA = "wakemeter.session/2"
READABLE = ("wakemeter.session/1", SCHEMA)


class SessionError(WakemeterError, ValueError):
    """A session file cannot be read (corrupt, not a session, or from a newer version)."""


def save(path: str | os.PathLike, data: dict) -> Path:
    """Write a session dict atomically; relative scene path computed here."""
    target = Path(path)
    data = {
        "schema": SCHEMA,
        "saved_at": _dt.datetime.now(_dt.UTC).replace(microsecond=0).isoformat(),
        **{k: v for k, v in data.items() if k not in ("schema", "saved_at")},
    }
    scene = dict(data.get("scene") or {})
    if scene.get("absolute_path"):
        try:
            scene["path"] = os.path.relpath(scene["absolute_path"], target.parent.resolve())
        except ValueError:  # another drive
            scene["path"] = scene["absolute_path"]
    data["scene"] = scene
    text = json.dumps(data, indent=2, default=_plain)
    try:
        atomic_write_bytes(target, (text + "\n").encode())
    except OSError as err:
        raise SessionError(f"cannot save the session to {target}: {err.strerror or err}") from err
    return target


def _schema_age(schema: str) -> str:
    """Says whether an unreadable session schema is newer, older or not one we know."""
    newest = max(int(r.rsplit("/", 1)[1]) for r in READABLE)
    oldest = min(int(r.rsplit("/", 1)[1]) for r in READABLE)
    try:
        n = int(schema.rsplit("/", 1)[1])
    except (ValueError, IndexError):
        return f"an unknown session format ({schema[:40]})"
    if n > newest:
        return f"written by a newer wakemeter ({schema[:40]})"
    if n < oldest:
        return f"written by an older wakemeter whose format this version no longer reads ({schema[:40]})"
    return f"an unknown session format ({schema[:40]})"


def _plain(x: object) -> object:
    import numpy as np

    if isinstance(x, np.generic):
        return x.item()
    if isinstance(x, np.ndarray):
        return x.tolist()
    raise TypeError(f"cannot store {type(x).__name__} in a session")


#: a session larger than this is refused before it is read (a real one is a few hundred kB)
MAX_SESSION_BYTES = 64 << 20
#: sessions are shallow (about 8 levels); deeper nesting is refused before validation
MAX_DEPTH = 32
#: the most vessels and measurements a session holds: the work of reading, checking and reporting it stays
#: bounded (a whole-scene vessel search marks a few thousand; an analyst measures tens per vessel)
MAX_VESSELS = 10_000
MAX_MEASUREMENTS = 20_000


def load(path: str | os.PathLike) -> dict:
    """Read and check a session file; resolves the scene path relative to the file.

    The file is bounded in size and nesting, numbers must be finite, and the content must follow the
    schema ``session.schema.json``; anything else raises :class:`SessionError` with one line naming the
    field and what was expected.  The file is never changed.
    """
    p = Path(path)
    clean_stale(p.parent)  # a killed save's hidden temporaries beside the session go when it is next read
    try:
        size = p.stat().st_size
        if size > MAX_SESSION_BYTES:
            raise SessionError(
                f"{p.name}: {size / 2**20:.0f} MB is too large for a session file "
                f"(at most {MAX_SESSION_BYTES >> 20} MB)"
            )
        text = p.read_bytes().decode("utf-8")
    except FileNotFoundError as err:
        raise SessionError(f"{p}: no such session file") from err
    except UnicodeDecodeError as err:
        raise SessionError(f"{p.name}: not a valid session file (not UTF-8 text at byte {err.start})") from err
    except OSError as err:
        raise SessionError(f"{p}: cannot be read ({err.strerror or err})") from err
    try:
        data = json.loads(text, parse_constant=_reject_constant)
    except json.JSONDecodeError as err:
        raise SessionError(
            f"{p.name}: not a valid session file (damaged or truncated JSON at line {err.lineno})"
        ) from err
    except RecursionError as err:
        raise SessionError(f"{p.name}: not a valid session file (nested deeper than a session can be)") from err
    except ValueError as err:  # NaN or Infinity
        raise SessionError(f"{p.name}: not a valid session file ({err})") from err
    if not isinstance(data, dict) or not str(data.get("schema", "")).startswith("wakemeter.session/"):
        raise SessionError(f"{p.name}: not a wakemeter session file")
    if data["schema"] not in READABLE:
        raise SessionError(f"{p.name}: {_schema_age(str(data['schema']))}; this version reads {', '.join(READABLE)}")
    for key in ("scene", "vessels", "measurements"):
        if key not in data:
            raise SessionError(f"{p.name}: the session is incomplete (no '{key}')")
    if _depth(data) > MAX_DEPTH:
        raise SessionError(f"{p.name}: not a valid session file (nested deeper than {MAX_DEPTH} levels)")
    for key, most in (("vessels", MAX_VESSELS), ("measurements", MAX_MEASUREMENTS)):
        if isinstance(data[key], list) and len(data[key]) > most:
            raise SessionError(
                f"{p.name}: {len(data[key]):,} {key} is more than a session holds (at most {most:,}); "
                "the file may be damaged or generated"
            )
    problem = schema_problem(data)
    if problem:
        raise SessionError(f"{p.name}: {problem}")
    scene = data["scene"]
    # the scene beside the session (its relative path) first, else where it was; a missing or empty path
    # names no file (it must not resolve to the session's own folder)
    resolved = scene.get("absolute_path")
    if scene.get("path"):
        rel = Path(scene["path"])
        candidate = (p.parent / rel) if not rel.is_absolute() else rel
        if candidate.exists():  # a file, or a folder of band files
            resolved = str(candidate.resolve())
    scene["resolved_path"] = resolved
    return data


def schema() -> dict:
    """The session's JSON Schema (draft 2020-12)."""
    from importlib import resources

    return json.loads(resources.files(__package__).joinpath("session.schema.json").read_text())


def schema_problem(data: dict) -> str | None:
    """The first way ``data`` departs from the schema, in one line naming the field; None when it follows it."""
    import jsonschema
    from jsonschema.exceptions import best_match

    from ..detect.result import schema_registry

    validator = jsonschema.Draft202012Validator(_schema_cached(), registry=schema_registry())
    err = best_match(validator.iter_errors(data))
    if err is None:
        return None
    nullable = False
    while err.context:  # anyOf: the cause in the branch meant for this kind of value (not the "null" one)
        branches = err.validator_value
        nullable = nullable or {"type": "null"} in branches
        useful = [e for e in err.context if branches[e.schema_path[0]] != {"type": "null"}]
        err = best_match(useful or err.context) or err
    where = (
        "".join(f"[{k}]" if isinstance(k, int) else (f".{k}" if i else str(k)) for i, k in enumerate(err.absolute_path))
        or "the session"
    )
    return f"{where} {_expected(err, nullable)}"


_SCHEMA: dict | None = None


def _schema_cached() -> dict:
    global _SCHEMA
    if _SCHEMA is None:
        _SCHEMA = schema()
    return _SCHEMA


def _expected(err: Any, nullable: bool = False) -> str:
    v, got = err.validator, _short(err.instance)
    if v == "type":
        want = err.validator_value if isinstance(err.validator_value, list) else [err.validator_value]
        want = [*want, "null"] if nullable and "null" not in want else want
        return f"must be {' or '.join(_TYPE_WORDS.get(str(t), str(t)) for t in want)}, got {got}"
    if v == "required":
        missing = [k for k in err.validator_value if isinstance(err.instance, dict) and k not in err.instance]
        return f"lacks '{missing[0] if missing else err.validator_value[0]}'"
    if v in ("enum", "const"):
        options = err.validator_value if v == "enum" else [err.validator_value]
        return f"must be one of {', '.join(repr(o) for o in options)}, got {got}"
    if v in ("minimum", "exclusiveMinimum", "maximum", "exclusiveMaximum"):
        op = {"minimum": ">=", "exclusiveMinimum": ">", "maximum": "<=", "exclusiveMaximum": "<"}[v]
        return f"must be {op} {err.validator_value}, got {got}"
    if v in ("minItems", "maxItems"):
        return f"has the wrong number of items ({len(err.instance)}; {v} {err.validator_value})"
    if v == "pattern":
        return f"is not in the expected form, got {got}"
    if v == "propertyNames":
        return "uses a key that is not a vessel id (a whole number from 1)"
    if v == "minLength":
        return "must not be empty"
    return err.message[:120]


_TYPE_WORDS = {
    "integer": "a whole number",
    "number": "a number",
    "string": "text",
    "object": "an object",
    "array": "a list",
    "boolean": "true or false",
    "null": "null",
}


def _short(x: Any) -> str:
    if isinstance(x, (dict, list)):
        return f"{'an object' if isinstance(x, dict) else 'a list'} of {len(x)}"
    text = json.dumps(x) if not isinstance(x, str) else repr(x)
    return text if len(text) <= 40 else text[:37] + "..."


def _reject_constant(name: str) -> float:
    raise ValueError(f"{name} is not a number a session can hold")


def _depth(node: Any) -> int:
    """Nesting depth, without recursion."""
    deepest, stack = 0, [(node, 1)]
    while stack:
        item, d = stack.pop()
        deepest = max(deepest, d)
        if d > MAX_DEPTH:
            return d
        if isinstance(item, dict):
            stack.extend((v, d + 1) for v in item.values())
        elif isinstance(item, list):
            stack.extend((v, d + 1) for v in item)
    return deepest


def autosave_folder() -> Path:
    base = os.environ.get("XDG_CACHE_HOME") or str(Path.home() / ".cache")
    return Path(base) / "wakemeter" / "autosave"


#: one autosave per window: <process id>-<random>.session.json
_AUTOSAVE_NAME = re.compile(r"^(\d+)-[0-9a-f]{8}\.session\.json$")
_LIVE_AUTOSAVES: set[Path] = set()  #: those of windows open in this process


def new_autosave_path() -> Path:
    """A fresh autosave file name for one window of this process (registered as alive until released)."""
    p = autosave_folder() / f"{os.getpid()}-{secrets.token_hex(4)}.session.json"
    _LIVE_AUTOSAVES.add(p)
    return p


def release_autosave(p: Path, *, remove: bool) -> None:
    """The window that owns ``p`` closes: forget it, and remove the file when nothing would be lost."""
    _LIVE_AUTOSAVES.discard(p)
    if remove:
        p.unlink(missing_ok=True)


def orphaned_autosaves() -> list[Path]:
    """Autosaves whose window is gone without closing (its process died, or it was dropped in this one),
    newest first.  Another running window's autosave is never among them."""
    folder = autosave_folder()
    clean_stale(folder)  # a killed autosave's hidden temporaries
    try:
        entries = [p for p in folder.iterdir() if _AUTOSAVE_NAME.match(p.name)]
    except OSError:
        return []
    out = []
    for p in entries:
        pid = int(_AUTOSAVE_NAME.match(p.name)[1])  # type: ignore[index]
        if pid == os.getpid():
            if p not in _LIVE_AUTOSAVES:
                out.append(p)
        elif not _process_alive(pid):
            out.append(p)
    return sorted(out, key=lambda q: q.stat().st_mtime if q.exists() else 0.0, reverse=True)


def describe_autosave(p: Path) -> str:
    """What an automatic save holds, in a few words: its scene's file name and how much work."""
    try:
        if p.stat().st_size > MAX_SESSION_BYTES:
            return "contents too large to read here"
        data = json.loads(p.read_bytes().decode("utf-8"))
        scene = Path(str((data.get("scene") or {}).get("absolute_path") or "an unknown scene")).name
        vessels, measurements = len(data.get("vessels") or ()), len(data.get("measurements") or ())
        analysed = len(data.get("findings") or {})
    except (OSError, ValueError, AttributeError, TypeError):
        return "contents unreadable"
    return f"{scene}: {vessels} vessel(s) ({analysed} analysed), {measurements} hand measurement(s)"


def adopt_autosave(orphan: Path) -> Path:
    """Make a dead window's autosave this window's own (one rename), so no other window offers it again."""
    new = new_autosave_path()
    os.replace(orphan, new)
    return new


def _process_alive(pid: int) -> bool:
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:
        return True
    return True


# ---- the project in a session ------------------------------------------------------------------


def to_session(project: Project) -> dict:
    """The session dict of a project (without ``schema``/``saved_at``, which :func:`save` adds)."""
    sc = project.scene
    if sc is None:
        raise SessionError("open a scene first")
    cal = sc.calibration
    findings = {}
    for vid in project.findings:
        eff = project.effective_finding(vid)
        if eff is not None:
            findings[str(vid)] = {"result": eff.to_json(), "rejected": vid in project.rejected}
    return {
        "scene": {"absolute_path": str(sc.info.origin), "sha256": sc.sha256(), "size_bytes": sc.info.file_size},
        "calibration": None
        if cal is None
        else {"pixel_size_m": cal.m_per_col, "north_up_deg": cal.bearing_up_deg if cal.north_known else None},
        "vessels": [_vessel_json(v) for v in project.vessels.values()],
        "measurements": [
            {
                "id": m.id,
                "kind": str(m.kind),
                "points_px": [list(p) for p in m.points],
                "vessel_id": m.vessel_id,
                "placement_px": m.placement_px,
                "values": {k: v for k, v in m.values.items() if k in ("distance_m",)},
            }
            for m in project.measurements.values()
        ],
        "requests": {
            str(vid): project.requests[vid].at_pixel(project.vessels[vid].position).to_json()
            for vid in project.requests
            if vid in project.vessels
        },
        "scene_check": None
        if project.scene_limit is None and project.scene_current is None
        else {
            "speed_limit": None if project.scene_limit is None else project.scene_limit.to_json(),
            "current": None if project.scene_current is None else project.scene_current.to_json(),
        },
        "findings": findings,
    }


def fill_project(project: Project, data: dict) -> None:
    """Put a loaded session's vessels, measurements, requests and findings into ``project`` (whose scene
    is open and calibrated already).  Raises :class:`SessionError` naming what is wrong."""
    from ..detect.request import AnalysisRequest, SpeedLimit, WaterCurrent
    from ..detect.result import WakeAnalysis
    from ..errors import ParameterError

    project.clear()
    try:
        for v in data["vessels"]:
            vid = int(v["id"])
            score = v.get("found_score")
            project.vessels[vid] = Vessel(
                vid,
                str(v["name"]),
                _point(v["position_px"]),
                None if score is None else float(score),
                int(v.get("merged") or 0),
            )
        for m in data["measurements"]:
            pts = m["points_px"]
            item = Measurement(
                int(m["id"]),
                str(m["kind"]),
                (_point(pts[0]), _point(pts[1])),
                None if m.get("vessel_id") is None else int(m["vessel_id"]),
                values=dict(m.get("values") or {}),
                placement_px=float(m.get("placement_px") or Measurement.placement_px),
            )
            project.measurements[item.id] = item
        requests = data.get("requests")
        if requests is None:  # schema 1: the inputs the user typed
            requests = {
                k: AnalysisRequest.from_inputs(project.vessels[int(k)].position, v).to_json()
                for k, v in (data.get("inputs") or {}).items()
                if int(k) in project.vessels
            }
        for k, r in requests.items():
            project.requests[int(k)] = AnalysisRequest.from_json(r)
        check = data.get("scene_check") or {}
        if check.get("speed_limit"):
            project.scene_limit = SpeedLimit.from_json(check["speed_limit"])
        if check.get("current"):
            project.scene_current = WaterCurrent.from_json(check["current"])
        for k, f in (data.get("findings") or {}).items():
            project.findings[int(k)] = WakeAnalysis.from_json(f["result"], drawing=f.get("geometry"))
            if f.get("rejected"):
                project.rejected.add(int(k))
    except (KeyError, TypeError, ValueError, IndexError, AttributeError, OverflowError) as err:
        if isinstance(err, ParameterError):
            raise SessionError(f"the session holds a bad value: {err}") from err
        raise SessionError(f"the session is damaged ({type(err).__name__}: {err})") from err
    project.reevaluate_all()
    project.continue_ids()


def _vessel_json(v: Vessel) -> dict:
    out: dict = {"id": v.id, "name": v.name, "position_px": list(v.position)}
    if v.found_score is not None:
        out["found_score"] = v.found_score
    if v.merged:
        out["merged"] = v.merged
    return out


def _point(p: Any) -> tuple[float, float]:
    x, y = float(p[0]), float(p[1])
    if not (math.isfinite(x) and math.isfinite(y)) or len(p) != 2:
        raise ValueError(f"a position must be two finite numbers, got {p!r}")
    return x, y


def restore_calibration(scene: Scene, data: dict) -> None:
    """Give a scene without georeference the calibration its session saved; a photo already calibrated from
    its own metadata to the same pixel size and north keeps that calibration (and its stated uncertainty)."""
    c = data.get("calibration")
    if not c or scene.info.georeferenced:
        return
    from ..scene import geodesy

    now, north = scene.calibration, c["north_up_deg"]
    if now is not None and abs(now.m_per_col - c["pixel_size_m"]) <= 1e-12 * c["pixel_size_m"]:
        if (north is None and not now.north_known) or (
            north is not None and now.north_known and abs(now.bearing_up_deg - north % 360.0) < 1e-9
        ):
            return
    scene.calibrate(geodesy.calibrated_frame(pixel_size_m=c["pixel_size_m"], north_up_deg=north))
