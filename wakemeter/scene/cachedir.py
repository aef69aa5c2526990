"""The user's cache folder for wakemeter (``$XDG_CACHE_HOME/wakemeter``, else ``~/.cache/wakemeter``)."""

from __future__ import annotations

import os
from pathlib import Path


def cache_dir() -> Path:
    base = os.environ.get("XDG_CACHE_HOME") or str(Path.home() / ".cache")
    return Path(base) / "wakemeter"
