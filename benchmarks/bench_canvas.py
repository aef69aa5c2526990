"""Benchmark (script): time to produce a view of a big scene at a new zoom level.

Run: ``QT_QPA_PLATFORM=offscreen .venv/bin/python benchmarks/bench_canvas.py [SCENE]``.  Without a
scene it makes a 20 000 x 20 000 uint16 GeoTIFF with internal overviews (benchmarks/bench_big_scene.py).
For several zoom levels it times (a) loading every visible tile of a 1200 x 800 view from the file
(overviews or pyramid) and painting it, and (b) painting the same view again from cached tiles.
Goals: (a) under 200 ms, (b) under 50 ms; medians over the zoom levels.
"""

from __future__ import annotations

import statistics
import sys
import tempfile
import time
from pathlib import Path

from PySide6.QtWidgets import QApplication

from timing import close_qt  # noqa: E402


def main() -> None:
    if len(sys.argv) > 1:
        path = Path(sys.argv[1])
    else:
        from bench_big_scene import make

        path = Path(tempfile.gettempdir()) / "wakemeter-bench" / "with_overviews_20000.tif"
        path.parent.mkdir(exist_ok=True)
        if not path.exists():
            make(path, 20000, True)
    from wakemeter.app.window import MainWindow

    app = QApplication.instance() or QApplication([])
    win = MainWindow()
    win.resize(1200, 800)
    win.show()
    win.open_path(str(path))
    app.processEvents()
    c = win.canvas
    from_file, from_cache = [], []
    for zoom in (1 / 16, 1 / 8, 1 / 4, 1 / 2, 1.0, 1 / 3, 1 / 6):
        c.set_zoom(zoom)
        c.centre_on(7000 + 1000 * zoom, 9000 - 500 * zoom)
        t = time.perf_counter()
        keys = c.visible_tiles(c.level())
        for k in keys:
            c.loader.get(k)
        while c.loader.pending:
            app.processEvents()
            c.loader.wait(5)
        c.grab()
        from_file.append(time.perf_counter() - t)
        t = time.perf_counter()
        c.grab()
        from_cache.append(time.perf_counter() - t)
        print(
            f"zoom 1/{1 / zoom:.0f}: {len(keys)} tiles, from file {from_file[-1] * 1e3:.0f} ms, "
            f"from cache {from_cache[-1] * 1e3:.1f} ms",
            flush=True,
        )
    print(
        f"median: new zoom level from the file {statistics.median(from_file) * 1e3:.0f} ms (goal < 200), "
        f"from cached tiles {statistics.median(from_cache) * 1e3:.1f} ms (goal < 50)"
    )
    close_qt(app, win)
    del c, win


if __name__ == "__main__":
    main()
