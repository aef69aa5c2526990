"""The Qt binding keeps Python's reference counts: PySide6 6.12.0 dropped a reference to True or False on every
bool argument (setChecked, setEnabled), so on Python 3.11, where the two are not immortal, a session with a
few vessels ended in "Fatal Python error: bool_dealloc" when the program quit (found by marking six vessels;
pyproject.toml excludes that release).  Source: sys.getrefcount (Python documentation); no external values."""

import sys

import pytest

pytest.importorskip("PySide6")

from PySide6.QtWidgets import QCheckBox  # noqa: E402


def test_bool_arguments_keep_their_references(qtbot):
    box = QCheckBox()
    qtbot.addWidget(box)
    before = sys.getrefcount(False), sys.getrefcount(True)
    for i in range(500):
        box.setChecked(i % 2 == 0)
        box.setEnabled(i % 3 != 0)
    after = sys.getrefcount(False), sys.getrefcount(True)
    # a few references may come and go with the interpreter's own work; the bug lost one per call (1000 here)
    assert abs(after[0] - before[0]) < 50 and abs(after[1] - before[1]) < 50, (before, after)
