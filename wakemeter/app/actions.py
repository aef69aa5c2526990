"""The window's menus and keys as data: one table, read by :meth:`MainWindow._build_actions`.

Each entry names the window method it calls, so the table holds no widgets and a test can check it without
building a window (no key bound twice, every method present).  Special entries build what Qt makes itself
(the undo stack's actions, the recent-scenes and panels submenus, a checkable toggle).
"""

from __future__ import annotations

from dataclasses import dataclass

from PySide6.QtGui import QKeySequence

SEPARATOR = "-"
#: entries whose action Qt or the window builds itself
RECENT, PANELS, UNDO, REDO = "<recent>", "<panels>", "<undo>", "<redo>"


@dataclass(frozen=True)
class Entry:
    text: str  #: the menu text ("&" marks the mnemonic); SEPARATOR for a line
    slot: str = ""  #: name of the MainWindow method it calls (or a special entry above)
    #: its keys: a portable text ("Ctrl+E") or a platform's standard key; at most one entry holds a key
    keys: tuple[str | QKeySequence.StandardKey, ...] = ()
    checkable: bool = False
    attribute: str = ""  #: the window keeps the action under this name


_S = QKeySequence.StandardKey
MENUS: tuple[tuple[str, str, tuple[Entry, ...]], ...] = (
    (
        "&File",
        "file_menu",
        (
            Entry("&Open scene…", "open_dialog", (_S.Open,)),
            Entry("Open a &folder (band files, or a SAFE product)…", "open_folder_dialog"),
            Entry("Open &recent", RECENT),
            Entry("&Save session…", "save_dialog", (_S.Save,)),
            Entry("Open &session…", "open_session_dialog"),
            Entry("&Export evidence…", "export_dialog", ("Ctrl+E",)),
            Entry(SEPARATOR),
            Entry("Load position &reports (AIS)…", "load_reports_dialog"),
            Entry("&Import vessel positions…", "import_vessels_dialog"),
            Entry("Export &map layers (GeoPackage, GeoJSON)…", "export_gis_dialog"),
            Entry(SEPARATOR),
            Entry("&Quit", "close", (_S.Quit,)),
        ),
    ),
    (
        "&Edit",
        "edit_menu",
        (
            # the platform's redo keys (Ctrl+Shift+Z on Linux desktops) only: the same key given twice made Qt
            # call the shortcut ambiguous and do nothing
            Entry("&Undo", UNDO, (_S.Undo,)),
            Entry("&Redo", REDO, (_S.Redo,)),
            Entry("&Delete selected", "delete_selected", (_S.Delete,)),
            Entry("Re&name vessel…", "rename_selected"),
        ),
    ),
    (
        "&View",
        "view_menu",
        (
            Entry("Zoom &in", "zoom_in", ("+",)),
            Entry("Zoom &out", "zoom_out", ("-",)),
            Entry("&Fit to window", "zoom_fit", ("F",)),
            Entry("&1:1", "zoom_one", ("1",)),
            Entry(SEPARATOR),
            Entry("&Panels", PANELS),  # docks closed by the user come back from here
            Entry(SEPARATOR),
            Entry("Brighter (gamma up)", "brighter"),
            Entry("Darker (gamma down)", "darker"),
            Entry("Choose &bands…", "choose_bands"),
            Entry("Radar intensity in dB", "_toggle_db", checkable=True, attribute="db_action"),
            Entry("Contrast set on the &water", "_toggle_water_stretch", checkable=True, attribute="water_action"),
        ),
    ),
    (
        "Ve&ssels",
        "vessels_menu",
        (
            Entry("Find vessels in &view", "find_in_view"),
            Entry("Find vessels in the whole &scene", "find_in_scene"),
            Entry("Find vessels in a &rectangle you drag…", "pick_find_area"),
            Entry("Land la&yer for the search…", "choose_land_layer"),
            Entry("&No land layer", "clear_land_layer"),
            Entry("&Limit and current of this vessel for every vessel", "limit_for_every_vessel"),
            Entry("&Analyse all vessels", "analyse_all"),
        ),
    ),
    (
        "&Help",
        "help_menu",
        (
            Entry("&Keys and tools", "help_keys"),
            Entry("&How the speed is measured", "help_methods"),
            Entry("&About wakemeter", "help_about"),
        ),
    ),
)
#: keys of the tool bar (tool name -> key); Esc returns to Look
TOOL_KEYS = {"look": "Esc", "vessel": "2", "track": "3", "arm": "4", "crest": "5", "ruler": "6", "calibrate": "7"}
ANALYSE_KEY = "Ctrl+R"


def sequences(keys: tuple[str | QKeySequence.StandardKey, ...]) -> list[QKeySequence]:
    """The key sequences of an entry (a standard key may stand for several on a platform), without repeats."""
    out: list[QKeySequence] = []
    for k in keys:
        for seq in QKeySequence.keyBindings(k) if isinstance(k, QKeySequence.StandardKey) else [QKeySequence(k)]:
            if not seq.isEmpty() and seq not in out:
                out.append(seq)
    return out
