"""What every sweep script shares: its command line (with ``--tune NAME=VALUE``) and its record.

A sweep writes its figures to ``benchmarks/results/<sweep>-<arguments>.json`` (commit, arguments, tuning
changes, summary numbers and every case), after printing its summary side by side with the last record
of the same sweep and arguments, so a change can be compared with the run before it.  ``--no-record``
prints only.
"""

from __future__ import annotations

import argparse
import datetime as _dt
import json
import os
import subprocess
import tempfile
from pathlib import Path

from wakemeter.detect.tuning import DEFAULT_TUNING, Tuning

RESULTS = Path(__file__).resolve().parent / "results"


def parse(description: str, positional: list[tuple[str, type, object, str]]) -> tuple[argparse.Namespace, Tuning]:
    """Parse ``[POSITIONAL...] [--tune NAME=VALUE ...] [--no-record]``; returns the args and the tuning."""
    p = argparse.ArgumentParser(description=description)
    for name, kind, default, help_text in positional:
        p.add_argument(name, type=kind, nargs="?", default=default, help=help_text)
    p.add_argument(
        "--tune",
        action="append",
        default=[],
        metavar="NAME=VALUE",
        help="change one field of wakemeter.detect.tuning.Tuning for this run",
    )
    p.add_argument("--no-record", action="store_true", help="print only; do not write benchmarks/results/")
    args = p.parse_args()
    return args, DEFAULT_TUNING.with_overrides(args.tune)


def _commit() -> tuple[str, bool]:
    root = Path(__file__).resolve().parents[1]
    try:
        sha = subprocess.run(
            ["git", "rev-parse", "HEAD"], cwd=root, capture_output=True, text=True, check=True
        ).stdout.strip()
        dirty = bool(
            subprocess.run(
                ["git", "status", "--porcelain", "--", "wakemeter"], cwd=root, capture_output=True, text=True
            ).stdout.strip()
        )
    except (OSError, subprocess.CalledProcessError):
        return "unknown", True
    return sha, dirty


def record(
    sweep: str, arguments: dict, tuning: Tuning, summary: dict, cases: list[dict], *, write: bool = True
) -> Path | None:
    """Print the summary beside the last record's and (unless ``write`` is False) store the new record."""
    key = "-".join(f"{v}" for v in arguments.values() if v is not None)
    changes = tuning.changed_fields()
    tag = key + ("".join(f"-{k}={v}" for k, v in sorted(changes.items())) if changes else "")
    path = RESULTS / f"{sweep}-{tag}.json"
    last = json.loads(path.read_text()) if path.exists() else None
    print(f"\n{'figure':<36} {'this run':>14} {'last record':>14}")
    for k, v in summary.items():
        old = None if last is None else last["summary"].get(k)
        print(f"{k:<36} {_fmt(v):>14} {_fmt(old):>14}")
    if last is not None:
        changed = _changed_cases(last["cases"], cases)
        extra = len(cases) - len(last["cases"])
        more = f", {extra} more than it had" if extra > 0 else (f", {-extra} fewer than it had" if extra < 0 else "")
        print(
            f"(last record: commit {last['commit'][:10]}, {last['date']}; {changed} of {len(cases)} cases "
            f"differ from it, timings aside{more})"
        )
    if not write:
        return None
    sha, dirty = _commit()
    rec = {
        "sweep": sweep,
        "arguments": arguments,
        "commit": sha,
        "uncommitted_changes": dirty,
        "date": _dt.datetime.now(_dt.UTC).replace(microsecond=0).isoformat(),
        "tuning_changes": changes,
        "summary": summary,
        "cases": cases,
    }
    RESULTS.mkdir(exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", dir=RESULTS)
    with os.fdopen(fd, "w") as fh:
        json.dump(rec, fh, indent=1, default=_plain)
        fh.write("\n")
    os.replace(tmp, path)
    print(f"recorded {path.relative_to(RESULTS.parent.parent)}")
    return path


def _changed_cases(old: list[dict], new: list[dict]) -> int:
    """Cases whose figures differ from the last record's, case by case in order (wall times are left out); when
    one run has more cases (a group added or left out), the cases beyond the shorter one count as differing."""

    def strip(c: dict) -> str:
        return json.dumps({k: v for k, v in c.items() if k != "time_s"}, sort_keys=True, default=_plain)

    return sum(strip(a) != strip(b) for a, b in zip(old, new)) + abs(len(old) - len(new))


def _fmt(v: object) -> str:
    if v is None:
        return "-"
    if isinstance(v, float):
        return f"{v:.4g}"
    return str(v)


def _plain(x: object) -> object:
    import numpy as np

    if isinstance(x, np.generic):
        return x.item()
    raise TypeError(f"cannot store {type(x).__name__}")
