"""Entry point of the desktop program: ``wakemeter [SCENE] [--screenshot OUT.png]``."""

from __future__ import annotations

import argparse
import sys


def run_program(argv: list[str]) -> int:
    p = argparse.ArgumentParser(
        prog="wakemeter",
        description="Measure ship wakes on georeferenced imagery. Headless commands: wakemeter --help-commands",
    )
    p.add_argument("scene", nargs="?", help="scene to open")
    p.add_argument("--screenshot", metavar="OUT.png", help="render the window after loading, save it and exit")
    p.add_argument("--size", default="1320x860", help="window size for --screenshot, e.g. 1320x860")
    args = p.parse_args(argv)
    from PySide6.QtWidgets import QApplication

    from .window import MainWindow, wait_for_tiles

    app = QApplication.instance() or QApplication(sys.argv[:1])
    app.setApplicationName("wakemeter")
    win = MainWindow()
    if args.screenshot:
        w, h = (int(x) for x in args.size.lower().split("x"))
        win.resize(w, h)
    win.show()
    if not args.screenshot and not args.scene:
        win.controller.offer_restore()
    if args.scene:
        app.processEvents()
        win.open_path(args.scene)
    if args.screenshot:
        app.processEvents()
        win.canvas.fit()
        wait_for_tiles(win, app)
        win.grab().save(args.screenshot)
        print(f"wrote {args.screenshot}")
        win.close()
        return 0 if (not args.scene or win.doc.scene is not None) else 2
    return app.exec()
