"""Analysis sessions: a documented, versioned JSON file of our own schema ("wakemeter.session/1").

Fields: ``schema``; ``scene`` {``path`` (relative to the session file when possible),
``absolute_path``, ``sha256``, ``size_bytes``}; ``calibration`` (null or {``pixel_size_m``,
``north_up_deg``}); ``vessels`` [{``id``, ``name``, ``position_px``}]; ``measurements``
[{``id``, ``kind``, ``points_px``, ``vessel_id``}]; ``inputs`` {vessel id: {depth_m, hull_length_m,
radar_geometry}}; ``findings`` {vessel id: {``result`` (the analysis JSON), ``geometry``,
``rejected``}}; ``saved_at``.

Writes are atomic (temporary file, then rename); a corrupt or future-version file raises
:class:`SessionError` and nothing is changed.
"""

from __future__ import annotations

import datetime as _dt
import json
import os
from pathlib import Path

from .errors import WakemeterError
from .fileio import atomic_write_bytes

SCHEMA = "wakemeter.session/1"


class SessionError(WakemeterError, ValueError):
    """A session file cannot be read (corrupt, not a session, or from a newer version)."""


def save(path: str | os.PathLike, data: dict) -> Path:
    """Write a session dict atomically; relative scene path computed here."""
    target = Path(path)
    data = {"schema": SCHEMA, "saved_at": _dt.datetime.now(_dt.timezone.utc).replace(microsecond=0).isoformat(),
            **{k: v for k, v in data.items() if k not in ("schema", "saved_at")}}
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


def _plain(x):
    import numpy as np
    if isinstance(x, np.generic):
        return x.item()
    if isinstance(x, np.ndarray):
        return x.tolist()
    raise TypeError(f"cannot store {type(x).__name__} in a session")


def load(path: str | os.PathLike) -> dict:
    """Read and check a session file; resolves the scene path relative to the file."""
    p = Path(path)
    try:
        data = json.loads(p.read_text())
    except FileNotFoundError as err:
        raise SessionError(f"{p}: no such session file") from err
    except (OSError, UnicodeDecodeError) as err:
        raise SessionError(f"{p}: cannot be read ({err})") from err
    except json.JSONDecodeError as err:
        raise SessionError(f"{p}: not a valid session file (damaged or truncated JSON at line {err.lineno})") from err
    if not isinstance(data, dict) or not str(data.get("schema", "")).startswith("wakemeter.session/"):
        raise SessionError(f"{p}: not a wakemeter session file")
    if data["schema"] != SCHEMA:
        raise SessionError(f"{p}: written by a newer wakemeter ({data['schema']}); this version reads {SCHEMA}")
    for key in ("scene", "vessels", "measurements"):
        if key not in data:
            raise SessionError(f"{p}: the session is incomplete (no '{key}')")
    scene = data["scene"]
    rel = Path(scene.get("path") or "")
    candidate = (p.parent / rel) if not rel.is_absolute() else rel
    scene["resolved_path"] = str(candidate.resolve()) if candidate.exists() else scene.get("absolute_path")
    return data


def autosave_path() -> Path:
    base = os.environ.get("XDG_CACHE_HOME") or str(Path.home() / ".cache")
    return Path(base) / "wakemeter" / "autosave.session.json"
