"""The vessel table (a dock of the window): every marked vessel in one sortable row after scene-wide work, with
the same columns as the batch table (``detect.result.result_row``), its verdict against the position reports,
the finder's score and how many detections or rows of the same vessel were merged into it; selecting a row
selects the vessel."""

from __future__ import annotations

from collections.abc import Callable

from PySide6.QtCore import Qt, QTimer
from PySide6.QtWidgets import QAbstractItemView, QTableWidget, QTableWidgetItem

from ..detect.result import result_row
from .document import Document

#: (header, row key or a special name, number format)
COLUMNS = (
    ("Vessel", "name", None),
    ("Speed (kn)", "speed_kn", "{:.1f}"),
    ("95 % low", "speed_ci95_low_kn", "{:.1f}"),
    ("95 % high", "speed_ci95_high_kn", "{:.1f}"),
    ("Basis", "speed_basis", None),
    ("Heading (°)", "heading_deg", "{:.0f}"),
    ("Limit (kn)", "limit_kn", "{:.1f}"),
    ("P(over limit)", "p_over_limit", "{:.3f}"),
    ("Lower bound (kn)", "lower95_kn", "{:.1f}"),
    ("Finding", "finding", None),
    ("Position report", "report_verdict", None),
    ("Finder score", "found_score", "{:.1f}"),
    ("Merged", "merged", "{:.0f}"),
)


class _Cell(QTableWidgetItem):
    """A cell of a number column sorts by its number (an empty one as the smallest: last when sorted from the
    largest, as speeds are read), a text cell by its text."""

    def __init__(self, text: str, number: float | None, numeric: bool):
        super().__init__(text)
        self.number = number if number is not None else (float("-inf") if numeric else None)

    def __lt__(self, other: QTableWidgetItem) -> bool:
        a, b = self.number, getattr(other, "number", None)
        if a is None or b is None:
            return self.text() < other.text()
        return a < b


class VesselTable(QTableWidget):
    """Reads the document (refreshed once per burst of changes); writes only the selection through it."""

    def __init__(self, doc: Document, parent=None, *, reports: Callable[[], dict] | None = None):
        """``reports()`` gives {vessel id: comparison with the position reports} (None: no report column)."""
        super().__init__(0, len(COLUMNS), parent)
        self.doc = doc
        self.reports = reports
        self.setHorizontalHeaderLabels([c[0] for c in COLUMNS])
        self.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.setSelectionMode(QAbstractItemView.SelectionMode.SingleSelection)
        self.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        self.setSortingEnabled(True)
        self.verticalHeader().setVisible(False)
        # columns fit their headers and the first rows (all of 500 rows would cost 30 ms at every refresh)
        self.horizontalHeader().setResizeContentsPrecision(100)
        self.setToolTip("Every vessel with its speed, interval, heading and limit verdict; click a header to sort")
        self._later = QTimer(self)
        self._later.setSingleShot(True)
        self._later.setInterval(0)
        self._later.timeout.connect(self.refresh)
        doc.changed.connect(self._later.start)
        doc.findings_changed.connect(lambda _v: self._later.start())
        self.itemSelectionChanged.connect(self._selected)

    def rows(self) -> list[dict]:
        """One row per vessel: its name, the shared result columns and what the finding is."""
        out = []
        compared = self.reports() if self.reports is not None else {}
        for vid, v in self.doc.vessels.items():
            a = self.doc.effective_finding(vid)
            row = result_row(a)
            c = compared.get(vid)
            row.update(
                vid=vid,
                name=v.name,
                report_verdict=None if c is None else c.verdict,
                found_score=v.found_score,
                merged=v.merged or None,
            )
            row["finding"] = (
                "not analysed"
                if a is None
                else "rejected"
                if vid in self.doc.rejected
                else "no wake"
                if not a.wake_found
                else "no speed"
                if a.speed is None
                else "speed"
            )
            out.append(row)
        return out

    def refresh(self) -> None:
        self.blockSignals(True)
        self.setSortingEnabled(False)
        rows = self.rows()
        self.setRowCount(len(rows))
        for i, row in enumerate(rows):
            for j, (_h, key, fmt) in enumerate(COLUMNS):
                v = row.get(key)
                number = float(v) if fmt is not None and v is not None else None
                text = "" if v is None else (fmt.format(v) if fmt else str(v))
                cell = _Cell(text, number, fmt is not None)
                cell.setData(Qt.ItemDataRole.UserRole, row["vid"])
                self.setItem(i, j, cell)
        self.setSortingEnabled(True)
        self.resizeColumnsToContents()  # every header readable ("Lower bound (kn)" was cut)
        for i in range(self.rowCount()):
            it = self.item(i, 0)
            if it is not None and it.data(Qt.ItemDataRole.UserRole) == self.doc.selected:
                self.selectRow(i)
        self.blockSignals(False)

    def _selected(self) -> None:
        items = self.selectedItems()
        if items:
            self.doc.select(int(items[0].data(Qt.ItemDataRole.UserRole)))
