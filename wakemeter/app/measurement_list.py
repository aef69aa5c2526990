"""The measurement list (a dock of the window): every vessel with its hand measurements and their speed, then
the measurements of no vessel; selecting a row selects the item, a double click centres the view on it."""

from __future__ import annotations

import numpy as np
from PySide6.QtCore import Qt
from PySide6.QtWidgets import QListWidget, QListWidgetItem

from ..evidence.summary import list_line
from .document import Document, Measurement, Vessel

#: measurement kinds as the list names them
KIND_NAMES = {"track": "track", "arm": "arm", "crest": "crest ruler", "ruler": "ruler", "calibration": "calibration"}


class MeasurementList(QListWidget):
    """Reads the document; writes only the selection through it; centres the canvas on a double click."""

    def __init__(self, doc: Document, canvas, parent=None):
        super().__init__(parent)
        self.doc = doc
        self.canvas = canvas
        self.setToolTip("Vessels and measurements; select one to highlight it, Delete removes it")
        self.setWordWrap(True)
        self.itemSelectionChanged.connect(self._selected)
        self.itemDoubleClicked.connect(self._go)
        doc.changed.connect(self.refresh)

    def refresh(self) -> None:
        self.blockSignals(True)
        self.clear()
        for v in self.doc.vessels.values():
            finding = self.doc.effective_finding(v.id)
            said = list_line(finding, rejected=v.id in self.doc.rejected)
            it = QListWidgetItem(f"Vessel: {v.name} — {said}")
            it.setData(Qt.ItemDataRole.UserRole, v.id)
            self.addItem(it)
            for m in self.doc.measurements.values():
                if m.vessel_id == v.id:
                    self._add_row(m, indent=True)
            hand = self.doc.speed_from_hand(v.id)
            if hand:
                it2 = QListWidgetItem("    → " + hand)
                it2.setData(Qt.ItemDataRole.UserRole, v.id)
                self.addItem(it2)
        for m in self.doc.measurements.values():
            if m.vessel_id is None:
                self._add_row(m, indent=False)
        for i in range(self.count()):
            if self.item(i).data(Qt.ItemDataRole.UserRole) == self.doc.selected:
                self.setCurrentRow(i)
                break
        self.blockSignals(False)

    def _add_row(self, m: Measurement, indent: bool) -> None:
        it = QListWidgetItem(f"{'    ' if indent else ''}{KIND_NAMES[m.kind]}: {m.error or m.text}")
        it.setData(Qt.ItemDataRole.UserRole, m.id)
        self.addItem(it)

    def _selected(self) -> None:
        it = self.currentItem()
        if it is not None:
            self.doc.select(int(it.data(Qt.ItemDataRole.UserRole)))

    def _go(self, it: QListWidgetItem) -> None:
        item = self.doc.item(int(it.data(Qt.ItemDataRole.UserRole)))
        if isinstance(item, Vessel):
            self.canvas.centre_on(*item.position)
        elif item is not None:
            self.canvas.centre_on(*np.mean(item.points, axis=0))
