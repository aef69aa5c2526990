"""The results panel: the request form, the buttons, and the result view (numbers and plots), put together."""

from __future__ import annotations

from PySide6.QtCore import Signal
from PySide6.QtWidgets import QCheckBox, QHBoxLayout, QLabel, QPushButton, QVBoxLayout, QWidget

from ..detect.request import AnalysisRequest, SpeedLimit, WaterCurrent
from ..detect.result import WakeAnalysis
from .request_form import RequestForm
from .result_view import ResultView, result_html

__all__ = ["ResultsPanel", "result_html"]


class ResultsPanel(QWidget):
    analyse_one = Signal()
    analyse_all = Signal()
    reject_toggled = Signal(bool)
    export_requested = Signal()

    def __init__(self, parent=None):
        super().__init__(parent)
        lay = QVBoxLayout(self)
        self.setStyleSheet(
            "QLabel, QGroupBox, QCheckBox { color: #dfe6ee; } "
            "QGroupBox { border: 1px solid #3a4458; border-radius: 4px; margin-top: 14px; "
            "padding-top: 6px; } QGroupBox::title { subcontrol-origin: margin; left: 8px; }"
        )
        self.title = QLabel("Select a vessel")
        self.title.setStyleSheet("font-weight: bold; font-size: 13px;")
        lay.addWidget(self.title)
        self.form = RequestForm()
        self.form.resized.connect(self._fit)
        self.assume_vessel = self.form.assume_vessel
        lay.addWidget(self.form)
        lay.addLayout(self._buttons())
        self.view = ResultView()
        self.text = self.view.text
        lay.addWidget(self.view, 1)
        self.show_result(None, None)
        self._fit()

    def _buttons(self) -> QVBoxLayout:
        rows = QVBoxLayout()
        row = QHBoxLayout()
        self.run_button = QPushButton("Analyse vessel")
        self.run_button.setToolTip(
            "Find the wake of the selected vessel and estimate its speed (runs in the background)"
        )
        self.run_button.clicked.connect(self.analyse_one.emit)
        self.run_all_button = QPushButton("Analyse all")
        self.run_all_button.setToolTip("Analyse every marked vessel, one after the other")
        self.run_all_button.clicked.connect(self.analyse_all.emit)
        row.addWidget(self.run_button)
        row.addWidget(self.run_all_button)
        rows.addLayout(row)
        row2 = QHBoxLayout()
        self.reject = QCheckBox("Reject this finding")
        self.reject.setToolTip("Keep the finding on record but do not use it (it is not exported)")
        self.reject.toggled.connect(self.reject_toggled.emit)
        self.export_button = QPushButton("Export evidence…")
        self.export_button.setToolTip("Write the annotated image, the PDF report and the JSON record")
        self.export_button.clicked.connect(self.export_requested.emit)
        row2.addWidget(self.reject)
        row2.addWidget(self.export_button)
        rows.addLayout(row2)
        return rows

    #: the panel's height with both optional boxes closed (the results text takes what is left)
    BASE_HEIGHT = 520

    def _fit(self) -> None:
        """Grow the panel by the optional boxes that are open, so their rows are never squeezed (the panel
        sits in a scroll area)."""
        self.setMinimumHeight(self.BASE_HEIGHT + self.form.open_boxes_height())

    # ---- the request: the form's ----------------------------------------------
    def inputs(self) -> dict:
        return self.form.inputs()

    def request(self, position: tuple[float, float], base: AnalysisRequest | None = None) -> AnalysisRequest:
        return self.form.request(position, base)

    def limit_and_current(self) -> tuple[SpeedLimit | None, WaterCurrent | None]:
        return self.form.limit_and_current()

    def set_request(self, req: AnalysisRequest | None) -> None:
        self.form.set_request(req)

    # ---- the result: the view's -----------------------------------------------
    def show_result(
        self,
        name: str | None,
        result: WakeAnalysis | None,
        *,
        rejected: bool = False,
        position_report: str | None = None,
    ) -> None:
        """Show a vessel's result (None: not analysed yet) and its position-report comparison's text."""
        self.title.setText(f"Vessel: {name}" if name else "Select a vessel, then Analyse")
        self.reject.blockSignals(True)
        self.reject.setChecked(rejected)
        self.reject.blockSignals(False)
        self.reject.setEnabled(result is not None)
        self.export_button.setEnabled(result is not None and not rejected)
        self.view.show_result(result, rejected=rejected, position_report=position_report)
