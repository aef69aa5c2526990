#!/usr/bin/env python3
"""The project's two commands, needing nothing but Python 3.11+:

    python3 tasks.py run     # open the desktop program on the bundled demo scene
    python3 tasks.py test    # run the whole test suite

Both create or refresh ./.venv from pyproject.toml first (skipped when
pyproject.toml has not changed since the last install).  Extra arguments are
passed on: ``python3 tasks.py test -k physics``, ``python3 tasks.py run SCENE``.
``python3 tasks.py bench`` runs the benchmarks.
"""

from __future__ import annotations

import hashlib
import os
import subprocess
import sys
import venv
from pathlib import Path

ROOT = Path(__file__).resolve().parent
VENV = ROOT / ".venv"
STAMP = VENV / ".pyproject-sha256"
DEMO = ROOT / "sample_scenes" / "harbour_approach_optical.tif"
#: run before the tests by ``tasks.py test`` (without extra arguments)
CHECKS = (
    ("-m", "ruff", "check", "."),
    ("-m", "ruff", "format", "--check", "."),
    ("-c", "import sys; from importlinter.cli import lint_imports_command as c; sys.exit(c())"),  # lint-imports
    ("-m", "mypy"),
)


def _py() -> Path:
    return VENV / ("Scripts/python.exe" if os.name == "nt" else "bin/python")


def ensure_venv() -> Path:
    if sys.version_info < (3, 11):  # noqa: UP036 - tasks.py runs under whatever python3 the user has
        sys.exit(f"wakemeter needs Python 3.11 or newer; this is {sys.version.split()[0]}")
    want = hashlib.sha256((ROOT / "pyproject.toml").read_bytes()).hexdigest()
    if _py().exists() and STAMP.exists() and STAMP.read_text().strip() == want:
        return _py()
    if not _py().exists():
        print("creating .venv ...", flush=True)
        venv.EnvBuilder(with_pip=True).create(VENV)
    print("installing wakemeter and its dependencies into .venv ...", flush=True)
    subprocess.run([str(_py()), "-m", "pip", "install", "--quiet", "--upgrade", "pip"], check=True)
    subprocess.run([str(_py()), "-m", "pip", "install", "--quiet", "-e", f"{ROOT}[test]"], check=True)
    STAMP.write_text(want)
    return _py()


def main(argv: list[str]) -> int:
    if not argv or argv[0] not in {"run", "test", "bench"}:
        print(__doc__)
        return 2
    py = ensure_venv()
    what, rest = argv[0], argv[1:]
    env = dict(os.environ)
    if what == "run":
        cmd = [str(py), "-m", "wakemeter", *(rest or [str(DEMO)])]
    elif what == "test":
        env.setdefault("QT_QPA_PLATFORM", "offscreen")
        if not rest:  # the whole suite: lint, format, layer contracts and types first (configured in pyproject.toml)
            for step in CHECKS:
                print(f"$ python {' '.join(step)}", flush=True)
                if subprocess.call([str(py), *step], cwd=ROOT, env=env) != 0:
                    print(f"tasks.py test: '{' '.join(step)}' failed; fix it before the tests run", file=sys.stderr)
                    return 1
        cmd = [str(py), "-m", "pytest", "-q", "-p", "no:cacheprovider", *rest]
    else:
        env.setdefault("QT_QPA_PLATFORM", "offscreen")
        cmd = [str(py), "-m", "pytest", "benchmarks", "-q", "-p", "no:cacheprovider", "--benchmark-only", *rest]
    return subprocess.call(cmd, cwd=ROOT, env=env)


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
