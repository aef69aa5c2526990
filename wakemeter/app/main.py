"""Entry point of the desktop program: ``wakemeter [SCENE] [--screenshot OUT.png]``."""

from __future__ import annotations

import argparse
import sys


def run_program(argv: list[str]) -> int:
    p = argparse.ArgumentParser(
        prog="wakemeter",
        description="Measure ship wakes on georeferenced imagery. Headless commands: wakemeter --help",
    )
    p.add_argument("scene", nargs="?", help="scene to open")
    p.add_argument("--screenshot", metavar="OUT.png", help="render the window after loading, save it and exit")
    p.add_argument("--size", default="1320x860", help="window size for --screenshot, e.g. 1320x860")
    args = p.parse_args(argv)
    missing = missing_system_libraries()
    if missing:
        print(
            f"wakemeter: the desktop program needs system libraries that are not installed: {', '.join(missing)} "
            f"(on Debian or Ubuntu: sudo apt install {' '.join(missing)}; if they are installed where this check "
            "cannot see them, set WAKEMETER_SKIP_LIBRARY_CHECK=1)",
            file=sys.stderr,
        )
        return 2
    from PySide6.QtWidgets import QApplication

    from .window import MainWindow, wait_for_tiles

    app = QApplication.instance() or QApplication(sys.argv[:1])
    app.setApplicationName("wakemeter")
    win = MainWindow()
    if args.screenshot:
        w, h = (int(x) for x in args.size.lower().split("x"))
        win.resize(w, h)
    win.show()
    if args.scene:
        app.processEvents()
        win.open_path(args.scene)
    if not args.screenshot:  # also with a scene given (as `tasks.py run` does): restoring replaces it
        win.controller.offer_restore()
    if args.screenshot:
        app.processEvents()
        win.canvas.fit()
        wait_for_tiles(win, app)
        win.grab().save(args.screenshot)
        print(f"wrote {args.screenshot}")
        win.close()
        return 0 if (not args.scene or win.doc.scene is not None) else 2
    return app.exec()


#: what Qt's X11 platform plugin loads besides Qt itself (library name for ctypes -> Debian package)
XCB_LIBRARIES = {
    "xcb-cursor": "libxcb-cursor0",
    "xcb-icccm": "libxcb-icccm4",
    "xcb-keysyms": "libxcb-keysyms1",
    "xkbcommon-x11": "libxkbcommon-x11-0",
}


def missing_system_libraries(find=None) -> list[str]:
    """Debian package names of the X11 libraries Qt would fail on (Qt aborts with a long message instead).
    Only checked for a real X11 display on Linux; offscreen and Wayland runs need none of them."""
    import ctypes.util
    import os

    platform = os.environ.get("QT_QPA_PLATFORM", "")
    if not sys.platform.startswith("linux") or platform not in ("", "xcb") or not os.environ.get("DISPLAY"):
        return []
    if os.environ.get("WAKEMETER_SKIP_LIBRARY_CHECK"):  # libraries in a place ctypes does not search
        return []
    find = find or ctypes.util.find_library
    return [pkg for lib, pkg in XCB_LIBRARIES.items() if find(lib) is None]
