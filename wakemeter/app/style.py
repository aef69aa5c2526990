"""The window's style sheets: one place for the dark frame around the image (Qt style sheet syntax)."""

from __future__ import annotations

BACKGROUND = "#1c2028"
PANEL = "#232935"
SELECTED = "#3a4a63"
TEXT = "#dfe6ee"

WINDOW = (
    f"QMainWindow {{ background: {BACKGROUND}; }} QDockWidget {{ color: {TEXT}; }} "
    f"QToolBar {{ background: {PANEL}; border: none; spacing: 4px; }} "
    f"QToolButton {{ color: {TEXT}; padding: 4px 8px; }} "
    f"QToolButton:checked {{ background: {SELECTED}; border-radius: 4px; }} "
    f"QListWidget {{ background: {PANEL}; color: {TEXT}; border: none; }} "
    f"QListWidget::item:selected {{ background: {SELECTED}; }} "
    f"QTableWidget {{ background: {PANEL}; color: {TEXT}; gridline-color: {SELECTED}; border: none; }} "
    f"QTableWidget::item:selected {{ background: {SELECTED}; }} "
    f"QHeaderView::section {{ background: {BACKGROUND}; color: {TEXT}; border: none; padding: 3px; }} "
    f"QStatusBar {{ background: {PANEL}; color: {TEXT}; }} QStatusBar QLabel {{ color: {TEXT}; }}"
)
RESULTS_SCROLL = (
    f"QScrollArea {{ background: {BACKGROUND}; }} QScrollArea > QWidget > QWidget {{ background: {BACKGROUND}; }}"
)
