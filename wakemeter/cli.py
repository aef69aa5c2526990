"""Headless commands: ``wakemeter <command> ...``; ``wakemeter [SCENE]`` opens the desktop program.

Every command prints a plain-language error and exits with status 2 on bad
input instead of a traceback.
"""

from __future__ import annotations

import argparse
import sys
from collections.abc import Callable, Sequence

from . import __version__
from .errors import WakemeterError

CAUTION = ("CAUTION: these figures are estimates from imagery for analysis. Local regulations, certified "
           "measuring instruments and licensed professionals decide any enforcement; verify scene timing "
           "and georeferencing independently.")

_COMMANDS: dict[str, tuple[str, Callable[[argparse.ArgumentParser], None], Callable[[argparse.Namespace], int]]] = {}


def command(name: str, help_text: str):
    """Register a subcommand: the decorated function adds arguments; ``run`` does the work."""
    def deco(add_args: Callable[[argparse.ArgumentParser], None]):
        def with_run(run: Callable[[argparse.Namespace], int]):
            _COMMANDS[name] = (help_text, add_args, run)
            return run
        return with_run
    return deco


def _load_commands() -> None:
    from . import cli_physics  # noqa: F401  (registers 'speed')
    for mod in ("cli_scene", "cli_synth", "cli_analyze", "cli_report"):
        try:
            __import__(f"{__package__}.{mod}")
        except ModuleNotFoundError as err:  # a layer not yet built
            if err.name != f"{__package__}.{mod}":
                raise


def build_parser() -> argparse.ArgumentParser:
    _load_commands()
    p = argparse.ArgumentParser(prog="wakemeter", description="Measure ship wakes on georeferenced imagery.")
    p.add_argument("--version", action="version", version=f"wakemeter {__version__}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND")
    for name, (help_text, add_args, _run) in sorted(_COMMANDS.items()):
        sp = sub.add_parser(name, help=help_text, description=help_text)
        add_args(sp)
    return p


def main(argv: Sequence[str] | None = None) -> int:
    argv = list(sys.argv[1:] if argv is None else argv)
    _load_commands()
    if not argv or (argv[0] not in _COMMANDS and argv[0] not in ("-h", "--help", "--version")):
        return _open_program(argv)
    parser = build_parser()
    args = parser.parse_args(argv)
    try:
        return _COMMANDS[args.command][2](args)
    except WakemeterError as err:
        print(f"wakemeter {args.command}: {err}", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        print("wakemeter: interrupted", file=sys.stderr)
        return 130


def _open_program(argv: list[str]) -> int:
    try:
        from .app.main import run_program
    except ModuleNotFoundError as err:
        if err.name is None or not err.name.startswith(f"{__package__}.app"):
            raise
        # The desktop program is not built yet: show the scene headlessly instead.
        if argv and "info" in _COMMANDS:
            return main(["info", *argv])
        print("wakemeter: the desktop program is not available; run 'wakemeter --help' for the commands.")
        return 1
    return run_program(argv)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
