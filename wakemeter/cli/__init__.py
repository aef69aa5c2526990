"""Headless commands: ``wakemeter <command> ...``; ``wakemeter [SCENE]`` opens the desktop program.

One module per command (each exposes ``COMMAND`` or ``COMMANDS``); shared options live in
:mod:`.options`, the caution in :mod:`wakemeter.caution`.  Command modules never import this package
back.  Every command prints a plain-language error and exits with status 2 on bad input instead of a
traceback.
"""

from __future__ import annotations

import argparse
import difflib
import sys
from collections.abc import Sequence
from pathlib import Path
from typing import NoReturn

from .. import __version__
from ..errors import WakemeterError
from . import analyze, batch, export, report, scene, speed, synth
from .base import Command, one_scene
from .options import join_negative_lists

COMMANDS: dict[str, Command] = {
    c.name: c
    for c in (
        speed.COMMAND,
        *scene.COMMANDS,
        synth.COMMAND,
        analyze.COMMAND,
        report.COMMAND,
        export.COMMAND,
        batch.COMMAND,
    )
}


class _Parser(argparse.ArgumentParser):
    """Usage errors in one line (the command, what is wrong, where to look), exit status 2."""

    def error(self, message: str) -> NoReturn:
        self.exit(2, f"{self.prog}: {message} (see '{self.prog} --help')\n")


def build_parser() -> argparse.ArgumentParser:
    p = _Parser(
        prog="wakemeter",
        description="Measure ship wakes on georeferenced imagery. "
        "'wakemeter SCENE' opens the desktop program on a scene.",
    )
    p.add_argument("--version", action="version", version=f"wakemeter {__version__}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    for name, c in sorted(COMMANDS.items()):
        # argparse %-formats help texts: a literal percent sign must be doubled
        # no abbreviations: "--vessel" must not be taken for "--vessels"
        sp = sub.add_parser(name, help=c.help.replace("%", "%%"), description=c.help, allow_abbrev=False)
        c.add_arguments(sp)
    return p


def main(argv: Sequence[str] | None = None) -> int:
    argv = join_negative_lists(list(sys.argv[1:] if argv is None else argv))
    if argv and argv[0] not in COMMANDS and _looks_like_a_command(argv[0]):
        close = difflib.get_close_matches(argv[0], COMMANDS, n=1, cutoff=0.6)
        hint = f"; did you mean 'wakemeter {close[0]}'?" if close else "; 'wakemeter --help' lists the commands"
        print(f"wakemeter: '{argv[0]}' is neither a command nor a file{hint}", file=sys.stderr)
        return 2
    if not argv or (argv[0] not in COMMANDS and argv[0] not in ("-h", "--help", "--version")):
        return _open_program(argv)
    args = build_parser().parse_args(argv)
    try:
        if isinstance(getattr(args, "scene", None), list):  # band files one by one: one scene
            args.scene = one_scene(args.scene)
        return COMMANDS[args.command].run(args)
    except WakemeterError as err:
        print(f"wakemeter {args.command}: {err}", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        print("wakemeter: interrupted", file=sys.stderr)
        return 130
    except OSError as err:  # the system refused a file (name too long, no space, no permission...)
        if isinstance(err, BrokenPipeError):  # output piped into a command that stopped reading (| head)
            sys.stderr.close()
            return 0
        where = f" ({err.filename if len(str(err.filename)) < 120 else str(err.filename)[:117] + '...'})"
        print(f"wakemeter {args.command}: {err.strerror or err}{where if err.filename else ''}", file=sys.stderr)
        return 2


def _looks_like_a_command(word: str) -> bool:
    """A bare word that is not a file (``wakemeter analyse``): a mistyped command, not a scene to open."""
    return word.isalpha() and not Path(word).exists()


def _open_program(argv: list[str]) -> int:
    from ..app.main import run_program

    return run_program(argv)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
