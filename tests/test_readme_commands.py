"""The README's command examples, run as written: each block that starts with `.venv/bin/wakemeter ...` runs
with exit status 0, and every output line the README shows is printed (so the README's figures are the
program's, not remembered ones).

Source: the README itself (self-consistency of the documentation), no external reference needed.
"""

from __future__ import annotations

import contextlib
import io
import re
import shlex
from pathlib import Path

import pytest

from wakemeter.cli import main

ROOT = Path(__file__).resolve().parents[1]
PREFIX = ".venv/bin/wakemeter "


def _examples() -> list[tuple[str, list[str]]]:
    text = (ROOT / "README.md").read_text()
    out = []
    for block in re.findall(r"```\n(.*?)```", text, flags=re.S):
        lines = [ln for ln in block.splitlines() if ln.strip()]
        if lines and lines[0].startswith(PREFIX):
            out.append((lines[0], lines[1:]))
    return out


EXAMPLES = _examples()


def test_the_readme_has_command_examples():
    assert len(EXAMPLES) >= 2


@pytest.mark.parametrize("command, shown", EXAMPLES, ids=[c[len(PREFIX) :][:40] for c, _ in EXAMPLES])
def test_a_readme_example_prints_what_the_readme_shows(command, shown, monkeypatch):
    monkeypatch.chdir(ROOT)
    stdout = io.StringIO()
    with contextlib.redirect_stdout(stdout), contextlib.redirect_stderr(io.StringIO()):
        rc = main(shlex.split(command[len(PREFIX) :]))
    assert rc == 0, command
    printed = [" ".join(ln.split()) for ln in stdout.getvalue().splitlines()]
    for line in shown:
        assert " ".join(line.split()) in printed, f"the README shows {line!r}; the program printed:\n" + "\n".join(
            printed
        )
