"""What every command module shares: the :class:`Command` record and the caution line."""

from __future__ import annotations

import argparse
from collections.abc import Callable
from dataclasses import dataclass

from ..caution import CAUTION

#: printed after every command that shows a speed
CAUTION_LINE = "CAUTION: " + CAUTION


@dataclass(frozen=True)
class Command:
    name: str
    help: str
    add_arguments: Callable[[argparse.ArgumentParser], None]
    run: Callable[[argparse.Namespace], int]
