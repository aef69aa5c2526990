"""Atomic file writing: a temporary file in the target folder, then a rename.  No half-written files."""

from __future__ import annotations

import os
import tempfile
from pathlib import Path


def _umask() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return mask


def atomic_write_bytes(target: str | os.PathLike, data: bytes) -> Path:
    """Write ``data`` to ``target`` atomically with the usual permissions; raises OSError on failure."""
    target = Path(target)
    tmp = None
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".part", dir=target.parent)
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
        os.chmod(tmp, 0o666 & ~_umask())
        os.replace(tmp, target)
        tmp = None
    finally:
        if tmp:
            Path(tmp).unlink(missing_ok=True)
    return target
