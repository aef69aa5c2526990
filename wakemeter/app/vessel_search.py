"""Finding vessel-like targets in the view, the whole scene or a dragged rectangle (the window's part)."""

from __future__ import annotations

import math
from pathlib import Path

from ..detect.tuning import DEFAULT_TUNING
from ..errors import WakemeterError
from ..scene.land_layer import LandLayer
from .window_part import WindowPart
from .workers import Job


class VesselSearch(WindowPart):
    """Mixed into the main window: the Vessels menu's finding commands, run off the GUI thread."""

    #: land polygons the search leaves out (read for the open scene; dropped when another scene opens)
    land_layer: LandLayer | None = None

    def choose_land_layer(self) -> None:
        if self.doc.scene is None:
            self.say("open a scene first")
            return
        path = self._ask_open(
            "land", "Land layer for the vessel search", "Land polygons (*.gpkg *.geojson *.json *.shp);;All files (*)"
        )
        if path:
            self.set_land_layer(path)

    def set_land_layer(self, path: str) -> bool:
        """Read land polygons for the open scene; Find vessels then leaves them out (and out of the sea's
        statistics).  A bad file is said and nothing changes."""
        sc = self.doc.scene
        if sc is None:
            self.say("open a scene first")
            return False
        try:
            layer = LandLayer.read(path, sc.georef if sc.info.georeferenced else None)
        except WakemeterError as err:
            self.error("Cannot use the land layer", str(err))
            return False
        self.land_layer = layer
        self.say(f"land layer: {layer.polygons} polygon(s) from {Path(path).name}; Find vessels leaves them out")
        return True

    def clear_land_layer(self) -> None:
        self.land_layer = None
        self.say("no land layer: Find vessels judges land from the scene's pixels")

    def find_in_view(self) -> None:
        self.find_vessels(whole=False)

    def find_in_scene(self) -> None:
        self.find_vessels(whole=True)

    def pick_find_area(self) -> None:
        """The next drag on the image draws the rectangle to search (Esc gives it up)."""
        if self.doc.scene is None:
            self.say("open a scene first")
            return
        self.canvas.pick_area()
        self.say("drag a rectangle over the water to search for vessels in it (Esc: give up)")

    def find_vessels(self, *, whole: bool = False, area: tuple[int, int, int, int] | None = None) -> None:
        """Find vessel-like targets (in the view, the whole scene or ``area``: col, row, width, height) in the
        background; each becomes a vessel named "found N" (one undo step for all); delete the ones that are
        not vessels, then Analyse all."""
        sc = self.doc.scene
        if sc is None:
            self.say("open a scene first")
            return
        if area is None and whole:
            area = (0, 0, sc.width, sc.height)
        elif area is None:
            o = self.canvas.origin
            w, h = self.canvas.width() / self.canvas.zoom, self.canvas.height() / self.canvas.zoom
            c0, r0 = max(int(o.x()), 0), max(int(o.y()), 0)
            area = (c0, r0, int(min(o.x() + w, sc.width)) - c0, int(min(o.y() + h, sc.height)) - r0)

        land = self.land_layer

        def work(progress, cancelled):
            from ..detect.vessel_finder import find_vessels

            return find_vessels(sc, area=area, progress=lambda f: progress(f, ""), cancelled=cancelled, land=land)

        self.run_job(Job(work, "finding vessels"), self._mark_found)

    def _mark_found(self, cands) -> None:
        from ..project.model import Vessel
        from .document import AddItems

        if not cands:
            self.say("no vessel-like target found here")
            return
        # a target on a vessel already marked (by hand, or by an earlier search) is that vessel
        sc = self.doc.scene
        m_px = 1.0 if sc is None else sc.local_frame(sc.width / 2, sc.height / 2).length_of(1, 0)
        marked = [v.position for v in self.doc.vessels.values()]
        new = [
            c
            for c in cands
            if all(
                math.hypot(c.px[0] - p[0], c.px[1] - p[1]) * m_px > max(c.length_m, DEFAULT_TUNING.same_place_m)
                for p in marked
            )
        ]
        first = 1 + sum(v.name.startswith("found ") for v in self.doc.vessels.values())
        found = [
            # no length in the name: the finder measures the bright part it found, which is not the hull's length
            # (a solid deck part at fine pixels, a hull with its foam at coarse ones) and must not be read as one
            Vessel(self.doc.new_id(), f"found {i}", c.px, c.score, c.merged)
            for i, c in enumerate(new, first)
        ]
        again = f"; {len(cands) - len(new)} already marked" if len(new) < len(cands) else ""
        if found:
            self.doc.undo.push(AddItems(self.doc, found, f"find {len(found)} vessels"))
        self.say(
            f"{len(found)} vessel-like target(s) marked 'found N'{again}: delete those that are not vessels "
            "(Delete), then Vessels → Analyse all"
        )
