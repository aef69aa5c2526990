"""The evidence export form: who exports, for which case, which vessels, where and under what name."""

from __future__ import annotations

from dataclasses import dataclass

from PySide6.QtCore import QSettings
from PySide6.QtWidgets import (
    QButtonGroup,
    QDialog,
    QDialogButtonBox,
    QFileDialog,
    QFormLayout,
    QHBoxLayout,
    QLineEdit,
    QPushButton,
    QRadioButton,
    QVBoxLayout,
    QWidget,
)


@dataclass(frozen=True)
class ExportChoice:
    folder: str
    analyst: str
    case_reference: str
    all_vessels: bool
    name: str


class ExportForm(QDialog):
    """Asks what the evidence needs; the analyst's name and the last folder are remembered."""

    def __init__(
        self,
        parent: QWidget | None,
        *,
        n_vessels: int,
        selected_name: str,
        settings: QSettings,
        selected_rejected: bool = False,
    ):
        super().__init__(parent)
        self.setWindowTitle("Export evidence")
        self.settings = settings
        self.analyst = QLineEdit(str(settings.value("export/analyst", "") or ""))
        self.analyst.setPlaceholderText("your name, as it should appear in the report")
        self.case = QLineEdit()
        self.case.setPlaceholderText("case or file reference (optional)")
        self.folder = QLineEdit(str(settings.value("export/folder", "") or ""))
        browse = QPushButton("Choose…")
        browse.clicked.connect(self._browse)
        row = QHBoxLayout()
        row.addWidget(self.folder, 1)
        row.addWidget(browse)
        self.name = QLineEdit()
        self.name.setPlaceholderText("default: scene and vessel position")
        self.one = QRadioButton(
            f"the selected vessel ({selected_name or 'unnamed'})"
            + (": its finding is rejected" if selected_rejected else "")
        )
        self.every = QRadioButton(f"every vessel not rejected ({n_vessels})")
        # a rejected finding is kept on record but never exported: it is not offered, let alone preselected
        self.one.setEnabled(not selected_rejected)
        (self.every if selected_rejected else self.one).setChecked(True)
        self.every.setEnabled(n_vessels > 1 or selected_rejected)
        group = QButtonGroup(self)
        group.addButton(self.one)
        group.addButton(self.every)
        which = QVBoxLayout()
        which.addWidget(self.one)
        which.addWidget(self.every)
        form = QFormLayout()
        form.addRow("Analyst", self.analyst)
        form.addRow("Case reference", self.case)
        form.addRow("Vessels", which)
        form.addRow("Folder", row)
        form.addRow("Name of the set", self.name)
        buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Ok | QDialogButtonBox.StandardButton.Cancel)
        buttons.button(QDialogButtonBox.StandardButton.Ok).setText("Export")
        buttons.accepted.connect(self._accept)
        buttons.rejected.connect(self.reject)
        outer = QVBoxLayout(self)
        outer.addLayout(form)
        outer.addWidget(buttons)

    def _browse(self) -> None:
        folder = QFileDialog.getExistingDirectory(self, "Folder for the evidence", self.folder.text())
        if folder:
            self.folder.setText(folder)

    def _accept(self) -> None:
        if not self.folder.text().strip():
            self.folder.setPlaceholderText("choose a folder first")
            self.folder.setFocus()
            return
        self.settings.setValue("export/analyst", self.analyst.text().strip())
        self.settings.setValue("export/folder", self.folder.text().strip())
        self.accept()

    def choice(self) -> ExportChoice:
        return ExportChoice(
            self.folder.text().strip(),
            self.analyst.text().strip(),
            self.case.text().strip(),
            self.every.isChecked(),
            self.name.text().strip(),
        )
