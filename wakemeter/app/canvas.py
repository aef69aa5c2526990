"""The scene canvas: tiled image, pan and zoom, overlays, and the hand-measurement tools.

Coordinates: scene pixels (continuous, GDAL convention) map to widget pixels by
``screen = (scene - origin) * zoom``.  The canvas draws the document; edits go through
undoable commands on the document.
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np
from PySide6.QtCore import QPointF, QRectF, Qt, Signal
from PySide6.QtGui import QBrush, QColor, QFont, QPainter, QPainterPath, QPen, QPolygonF
from PySide6.QtWidgets import QWidget

from ..detect.findings import SegmentKind
from ..detect.handmeasure import placement_px
from ..errors import WakemeterError
from ..palette import COLOURS, FINDING_ALPHA
from .document import AddItem, ChangeItem, Document, Measurement, Vessel
from .tiles import TILE, TileLoader, estimate_contrast

# Our own palette (not borrowed from any program): calm blue-greys for chrome, clear hues for items.
ITEM_COLOURS = {
    **{name: QColor(*COLOURS[name]) for name in ("vessel", "track", "arm", "crest", "ruler", "calibration", "report")},
    "finding_track": QColor(*COLOURS["track"], FINDING_ALPHA["track"]),
    "finding_arm": QColor(*COLOURS["arm"], FINDING_ALPHA["arm"]),
    "chip": QColor(*COLOURS["chip"], FINDING_ALPHA["chip"]),
    "crest_fit": QColor(*COLOURS["crest"], FINDING_ALPHA["crest"]),
    "finding_narrow_v": QColor(*COLOURS["narrow_v"], FINDING_ALPHA["narrow_v"]),
}
TOOLS = ("look", "vessel", "track", "arm", "crest", "ruler", "calibrate")
HANDLE_PX = 7


#: how each kind of drawn segment of a finding looks: (colour key, pen width, dashed)
SEGMENT_STYLES = {
    SegmentKind.AREA: ("chip", 1, True),
    SegmentKind.TRACK: ("finding_track", 2, False),
    SegmentKind.ARM_LEFT: ("finding_arm", 2, False),
    SegmentKind.ARM_RIGHT: ("finding_arm", 2, False),
    SegmentKind.HULL_SHIFT: ("vessel", 1, True),
    SegmentKind.NARROW_V_LEFT: ("finding_narrow_v", 1, True),
    SegmentKind.NARROW_V_RIGHT: ("finding_narrow_v", 1, True),
    SegmentKind.CREST: ("crest_fit", 1, False),
}


#: more vessels than this in view are drawn as dots without names (a scene-wide search marks thousands)
MAX_MARKED_VESSELS = 300


class Canvas(QWidget):
    cursor_moved = Signal(float, float)  # scene col, row
    zoom_changed = Signal(float)
    calibration_line = Signal(object, object)  # two scene points drawn with the calibrate tool
    message = Signal(str)
    area_drawn = Signal(object)  # (col, row, width, height) of a rectangle drawn after pick_area()

    def __init__(self, doc: Document, parent=None):
        super().__init__(parent)
        self.doc = doc
        self.labels_drawn: list[QRectF] = []  #: label boxes of the last paint (a label never covers another)
        self.vessels_drawn_as_dots = False  #: the last paint had too many vessels in view for names
        self.loader = TileLoader()
        self.loader.tile_ready.connect(self.update)
        self.loader.read_failed.connect(lambda m: self.message.emit(f"could not read part of the scene: {m}"))
        self.zoom = 1.0
        self.origin = QPointF(0, 0)
        self.tool = "look"
        # ("pan", start_screen, start_origin) | ("new", kind, p0, p1) | ("handle", id, idx, before) | ("area", p0, p1)
        self._drag: tuple | None = None
        self.picking_area = False  #: the next left drag draws a rectangle (area_drawn), whatever the tool
        self.setMouseTracking(True)
        self.setFocusPolicy(Qt.FocusPolicy.StrongFocus)
        self.setMinimumSize(320, 240)
        self.setAutoFillBackground(False)
        doc.scene_changed.connect(self._on_scene)
        doc.changed.connect(self.update)

    # ---- view ---------------------------------------------------------------
    report_marks: list[tuple[float, float, str, float | None]] = []  #: set by the window (scene pixels)

    def _on_scene(self) -> None:
        sc = self.doc.scene
        self.loader.reset(sc, estimate_contrast(sc) if sc else None)
        self.fit()

    def set_contrast(self, **kw) -> None:
        if self.doc.scene is None:
            return
        self.loader.reset(self.doc.scene, estimate_contrast(self.doc.scene, **kw))
        self.update()

    def fit(self) -> None:
        sc = self.doc.scene
        if sc is None:
            return
        self.zoom = min(self.width() / sc.width, self.height() / sc.height) * 0.98
        self.origin = QPointF(
            sc.width / 2 - self.width() / 2 / self.zoom, sc.height / 2 - self.height() / 2 / self.zoom
        )
        self.zoom_changed.emit(self.zoom)
        self.update()

    def set_zoom(self, zoom: float, anchor: QPointF | None = None) -> None:
        zoom = float(np.clip(zoom, 1 / 512, 32.0))
        anchor = anchor if anchor is not None else QPointF(self.width() / 2, self.height() / 2)  # (0, 0) is falsy
        p = self.to_scene(anchor)
        self.zoom = zoom
        self.origin = QPointF(p.x() - anchor.x() / zoom, p.y() - anchor.y() / zoom)
        self.zoom_changed.emit(self.zoom)
        self.update()

    def centre_on(self, col: float, row: float) -> None:
        self.origin = QPointF(col - self.width() / 2 / self.zoom, row - self.height() / 2 / self.zoom)
        self.update()

    def to_scene(self, p: QPointF) -> QPointF:
        return QPointF(self.origin.x() + p.x() / self.zoom, self.origin.y() + p.y() / self.zoom)

    def to_screen(self, p) -> QPointF:
        x, y = (p.x(), p.y()) if isinstance(p, QPointF) else p
        return QPointF((x - self.origin.x()) * self.zoom, (y - self.origin.y()) * self.zoom)

    def level(self) -> int:
        return max(0, int(math.floor(math.log2(max(1.0, 1.0 / self.zoom)))))

    def visible_tiles(self, level: int):
        f = 2**level
        span = TILE * f
        sc = self.doc.scene
        c0 = max(0, int(self.origin.x() // span))
        r0 = max(0, int(self.origin.y() // span))
        c1 = min(int((self.origin.x() + self.width() / self.zoom) // span) + 1, int(math.ceil(sc.width / span)))
        r1 = min(int((self.origin.y() + self.height() / self.zoom) // span) + 1, int(math.ceil(sc.height / span)))
        return [(level, tx, ty) for ty in range(r0, r1) for tx in range(c0, c1)]

    # ---- painting ---------------------------------------------------------
    def paintEvent(self, _event) -> None:
        qp = QPainter(self)
        qp.fillRect(self.rect(), QColor(28, 32, 40))
        sc = self.doc.scene
        if sc is None:
            qp.setPen(QColor(200, 205, 215))
            qp.drawText(self.rect(), Qt.AlignmentFlag.AlignCenter, "Open a scene (Ctrl+O) or drop an image here")
            qp.end()
            return
        qp.setRenderHint(QPainter.RenderHint.SmoothPixmapTransform, self.zoom < 1)
        lvl = self.level()
        for key in self.visible_tiles(lvl):
            img = self.loader.get(key)
            if img is None:  # show a coarser cached tile meanwhile
                for up in range(1, 6):
                    k2 = (lvl + up, key[1] >> up, key[2] >> up)
                    img2 = self.loader.cached(k2)
                    if img2 is not None:
                        f2 = 2 ** (lvl + up)
                        src_span = TILE / 2**up
                        sx = (key[1] - (k2[1] << up)) * src_span
                        sy = (key[2] - (k2[2] << up)) * src_span
                        self._draw_tile(qp, img2, k2, QRectF(sx, sy, src_span, src_span), key, f2)
                        break
                continue
            self._draw_tile(qp, img, key)
        qp.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        self.labels_drawn = []
        self._draw_selected_label(qp)
        self._draw_findings(qp)
        self._draw_reports(qp)
        self._draw_items(qp)
        self._draw_drag(qp)
        self._draw_scale_and_north(qp)
        qp.end()

    def _draw_tile(self, qp, img, key, src: QRectF | None = None, target_key=None, f_src=None) -> None:
        lvl, tx, ty = target_key or key
        f = 2**lvl
        c0, r0 = tx * TILE * f, ty * TILE * f
        if src is None:
            w, h = img.width() * f, img.height() * f
            src = QRectF(0, 0, img.width(), img.height())
        else:
            w, h = src.width() * f_src, src.height() * f_src
            w = min(w, img.width() * f_src - src.x() * f_src)
            h = min(h, img.height() * f_src - src.y() * f_src)
            src = QRectF(src.x(), src.y(), w / f_src, h / f_src)
        sc = self.doc.scene
        if sc is not None:  # an edge tile covers only the scene's rest, though its last pixel is whole
            fx, fy = min(w, sc.width - c0) / w if w > 0 else 1.0, min(h, sc.height - r0) / h if h > 0 else 1.0
            src = QRectF(src.x(), src.y(), src.width() * fx, src.height() * fy)
            w, h = w * fx, h * fy
        tl = self.to_screen((c0, r0))
        qp.drawImage(QRectF(tl.x(), tl.y(), w * self.zoom, h * self.zoom), img, src)

    def _pen(self, colour: QColor, width: float = 2.0, dash: bool = False) -> QPen:
        pen = QPen(colour, width)
        pen.setCosmetic(True)
        if dash:
            pen.setStyle(Qt.PenStyle.DashLine)
        return pen

    def _label(self, qp: QPainter, at: QPointF, text: str, colour: QColor, *, first: bool = False) -> bool:
        """Draw a label unless it would cover one already drawn in this paint (``first``: the selected item's,
        always drawn); says whether it was drawn."""
        if not text:
            return False
        qp.setFont(QFont("Sans", 9))
        fm = qp.fontMetrics()
        r = fm.boundingRect(text)
        box = QRectF(at.x() + 8, at.y() - r.height() - 6, r.width() + 10, r.height() + 6)
        if not first and any(box.intersects(t) for t in self.labels_drawn):
            return False
        self.labels_drawn.append(box)
        qp.fillRect(box, QColor(15, 18, 24, 200))
        qp.setPen(colour)
        qp.drawText(box, Qt.AlignmentFlag.AlignCenter, text)
        return True

    def _draw_items(self, qp: QPainter) -> None:
        for m in self.doc.measurements.values():
            col = ITEM_COLOURS.get(m.kind, QColor(255, 255, 255))
            a, b = self.to_screen(m.points[0]), self.to_screen(m.points[1])
            sel = m.id == self.doc.selected
            qp.setPen(self._pen(col, 3 if sel else 2, dash=m.kind == "crest"))
            qp.drawLine(a, b)
            for p in (a, b):
                qp.setBrush(QBrush(col if sel else QColor(20, 20, 20)))
                qp.drawEllipse(p, HANDLE_PX / 2 + 1, HANDLE_PX / 2 + 1)
            if m.kind == "track":  # arrow at the vessel end: direction of travel
                self._arrow(qp, b, a, col)
            t = {"track": 0.35, "arm": 0.8, "crest": 0.65}.get(m.kind, 0.5)  # labels of a vessel's lines apart
            self._label(
                qp,
                QPointF(a.x() + t * (b.x() - a.x()), a.y() + t * (b.y() - a.y())),
                m.error or m.text,
                QColor(255, 120, 120) if m.error else col,
            )
        view = self.rect().adjusted(-20, -20, 20, 20)
        shown = [(v, self.to_screen(v.position)) for v in self.doc.vessels.values()]
        shown = [(v, p) for v, p in shown if view.contains(p.toPoint())]
        crowded = len(shown) > MAX_MARKED_VESSELS  # zoomed out over many: dots, no names (zoom in for them)
        for v, p in shown:
            sel = v.id == self.doc.selected
            qp.setPen(self._pen(ITEM_COLOURS["vessel"], 3 if sel else 2))
            qp.setBrush(Qt.BrushStyle.NoBrush)
            if crowded and not sel:
                qp.drawEllipse(p, 2, 2)
                continue
            qp.drawEllipse(p, 9, 9)
            qp.drawLine(QPointF(p.x() - 14, p.y()), QPointF(p.x() - 5, p.y()))
            qp.drawLine(QPointF(p.x() + 5, p.y()), QPointF(p.x() + 14, p.y()))
            if not sel:  # the selected one's name was drawn first
                self._label(qp, QPointF(p.x() + 6, p.y() - 8), v.name, ITEM_COLOURS["vessel"])
        self.vessels_drawn_as_dots = crowded

    def _draw_selected_label(self, qp: QPainter) -> None:
        """The selected vessel's name first: no other label covers it."""
        v = self.doc.vessels.get(self.doc.selected)
        if v is not None:
            p = self.to_screen(v.position)
            self._label(qp, QPointF(p.x() + 6, p.y() - 8), v.name, ITEM_COLOURS["vessel"], first=True)

    def _draw_reports(self, qp: QPainter) -> None:
        """Position reports at the scene time: a diamond, a tick along the reported course, id and speed."""
        col = ITEM_COLOURS["report"]
        sc = self.doc.scene
        for c, r, label, course in self.report_marks:
            p = self.to_screen((c, r))
            if not self.rect().adjusted(-40, -40, 40, 40).contains(p.toPoint()):
                continue
            qp.setPen(self._pen(col, 2))
            qp.setBrush(Qt.BrushStyle.NoBrush)
            qp.drawPolygon(
                QPolygonF(
                    [
                        QPointF(p.x(), p.y() - 7),
                        QPointF(p.x() + 7, p.y()),
                        QPointF(p.x(), p.y() + 7),
                        QPointF(p.x() - 7, p.y()),
                    ]
                )
            )
            if course is not None and sc is not None:
                try:
                    dc, dr = sc.local_frame(c, r).image_direction(course)
                    qp.drawLine(p, QPointF(p.x() + 22 * dc, p.y() + 22 * dr))
                except Exception:  # noqa: BLE001 - no frame: no course tick
                    pass
            self._label(qp, QPointF(p.x() + 4, p.y() + 20), label, col)

    def _arrow(self, qp: QPainter, tail: QPointF, tip: QPointF, col: QColor) -> None:
        d = tip - tail
        n = math.hypot(d.x(), d.y())
        if n < 1:
            return
        ux, uy = d.x() / n, d.y() / n
        s = 12
        poly = QPolygonF(
            [
                tip,
                QPointF(tip.x() - s * ux + 0.5 * s * uy, tip.y() - s * uy - 0.5 * s * ux),
                QPointF(tip.x() - s * ux - 0.5 * s * uy, tip.y() - s * uy + 0.5 * s * ux),
            ]
        )
        qp.setBrush(QBrush(col))
        qp.drawPolygon(poly)

    def _draw_findings(self, qp: QPainter) -> None:
        for vid in list(self.doc.findings):
            a = self.doc.effective_finding(vid)
            if a is None or vid in self.doc.rejected:
                continue
            for seg in a.drawing.segments:
                if seg.kind != SegmentKind.AREA and not a.wake_found:
                    continue
                colour, width, dash = SEGMENT_STYLES[seg.kind]
                qp.setPen(self._pen(ITEM_COLOURS[colour], width, dash=dash))
                qp.setBrush(Qt.BrushStyle.NoBrush)
                pts = [self.to_screen(p) for p in seg.points]
                if seg.kind == SegmentKind.AREA:
                    qp.drawPolygon(self.area_on_screen(seg.points))
                    continue
                path = QPainterPath(pts[0])
                for p in pts[1:]:
                    path.lineTo(p)
                qp.drawPath(path)

    def area_on_screen(self, points) -> QPolygonF:
        """An analysed area's outline on screen, cut to the scene (the analysis reads no pixel beyond it)."""
        sc = self.doc.scene
        poly = QPolygonF([self.to_screen(p) for p in points])
        if sc is None:
            return poly
        edge = QRectF(self.to_screen((0.0, 0.0)), self.to_screen((float(sc.width), float(sc.height))))
        return poly.intersected(QPolygonF(edge))

    def pick_area(self) -> None:
        """Let the next left drag draw a rectangle, given by :attr:`area_drawn` (Esc gives it up)."""
        self.picking_area = True
        self.setCursor(Qt.CursorShape.CrossCursor)

    def cancel_area(self) -> None:
        if self.picking_area:
            self.picking_area = False
            self._drag = None
            self.set_tool(self.tool)  # the tool's own cursor
            self.update()

    def _draw_drag(self, qp: QPainter) -> None:
        if self._drag and self._drag[0] == "area":
            _, p0, p1 = self._drag
            qp.setPen(self._pen(QColor(255, 255, 255), 2, dash=True))
            qp.setBrush(QColor(255, 255, 255, 30))
            qp.drawRect(QRectF(self.to_screen(p0), self.to_screen(p1)).normalized())
            qp.setBrush(Qt.BrushStyle.NoBrush)
        if self._drag and self._drag[0] == "new":
            _, kind, p0, p1 = self._drag
            col = ITEM_COLOURS.get("calibration" if kind == "calibrate" else kind, QColor(255, 255, 255))
            qp.setPen(self._pen(col, 2, dash=True))
            qp.drawLine(self.to_screen(p0), self.to_screen(p1))

    def _draw_scale_and_north(self, qp: QPainter) -> None:
        sc = self.doc.scene
        centre = self.to_scene(QPointF(self.width() / 2, self.height() / 2))
        try:
            col = float(np.clip(centre.x(), 0, sc.width - 1))
            row = float(np.clip(centre.y(), 0, sc.height - 1))
            frame = sc.local_frame(col, row)
        except WakemeterError:
            qp.setPen(QColor(255, 200, 120))
            qp.drawText(
                QRectF(10, self.height() - 28, 420, 20),
                Qt.AlignmentFlag.AlignLeft,
                "no georeference: calibrate to measure in metres",
            )
            return  # the caller ends the painter
        m_per_screen_px = frame.length_of(1.0 / self.zoom, 0.0)
        target = 140 * m_per_screen_px
        e = 10 ** math.floor(math.log10(target))
        length = next(f * e for f in (5, 2, 1) if f * e <= target)
        px = length / m_per_screen_px
        x0, y0 = 16, self.height() - 18
        qp.fillRect(QRectF(x0 - 8, y0 - 26, px + 16, 34), QColor(15, 18, 24, 190))
        qp.setPen(self._pen(QColor(240, 240, 240), 3))
        qp.drawLine(QPointF(x0, y0), QPointF(x0 + px, y0))
        qp.drawLine(QPointF(x0, y0 - 6), QPointF(x0, y0))
        qp.drawLine(QPointF(x0 + px, y0 - 6), QPointF(x0 + px, y0))
        qp.setFont(QFont("Sans", 9))
        qp.drawText(
            QRectF(x0, y0 - 24, px, 16),
            Qt.AlignmentFlag.AlignCenter,
            f"{length:g} m" if length < 1000 else f"{length / 1000:g} km",
        )
        # true north (grid convergence and image rotation included), or image up when unknown
        dc, dr = frame.image_direction(0.0) if frame.north_known else (0.0, -1.0)
        cx, cy = self.width() - 34, 44
        tip = QPointF(cx + dc * 22, cy + dr * 22)
        tail = QPointF(cx - dc * 16, cy - dr * 16)
        qp.setBrush(QBrush(QColor(15, 18, 24, 190)))
        qp.setPen(Qt.PenStyle.NoPen)
        qp.drawEllipse(QPointF(cx, cy), 28, 28)
        qp.setPen(self._pen(QColor(240, 240, 240), 2))
        qp.drawLine(tail, tip)
        self._arrow(qp, tail, tip, QColor(240, 240, 240))
        qp.setPen(QColor(240, 240, 240))
        qp.drawText(QRectF(cx - 20, cy + 10, 40, 16), Qt.AlignmentFlag.AlignCenter, "N" if frame.north_known else "up")

    # ---- interaction ------------------------------------------------------
    def set_tool(self, tool: str) -> None:
        if tool not in TOOLS:
            raise ValueError(tool)
        self.tool = tool
        self.setCursor(Qt.CursorShape.OpenHandCursor if tool == "look" else Qt.CursorShape.CrossCursor)

    def _hit_handle(self, pos: QPointF):
        best = None
        for m in self.doc.measurements.values():
            for i, p in enumerate(m.points):
                d = (self.to_screen(p) - pos).manhattanLength()
                if d <= HANDLE_PX + 3 and (best is None or d < best[0]):
                    best = (d, m.id, i)
        for v in self.doc.vessels.values():
            d = (self.to_screen(v.position) - pos).manhattanLength()
            if d <= 12 and (best is None or d < best[0]):
                best = (d, v.id, -1)
        return best

    def mousePressEvent(self, ev) -> None:
        if self.doc.scene is None:
            return
        pos = ev.position()
        sp = self.to_scene(pos)
        if self.picking_area and ev.button() == Qt.MouseButton.LeftButton:
            self._drag = ("area", (sp.x(), sp.y()), (sp.x(), sp.y()))
            return
        if ev.button() == Qt.MouseButton.MiddleButton or (
            ev.button() == Qt.MouseButton.LeftButton and self.tool == "look"
        ):
            hit = self._hit_handle(pos) if self.tool == "look" else None
            if hit is not None:
                _, item_id, idx = hit
                self.doc.select(item_id)
                self._drag = ("handle", item_id, idx, self.doc.item(item_id))
                return
            self._drag = ("pan", pos, QPointF(self.origin))
            self.setCursor(Qt.CursorShape.ClosedHandCursor)
            return
        if ev.button() != Qt.MouseButton.LeftButton:
            return
        p = (sp.x(), sp.y())
        if self.tool == "vessel":
            n = len(self.doc.vessels) + 1
            v = Vessel(self.doc.new_id(), f"Vessel {n}", p)
            self.doc.undo.push(AddItem(self.doc, v, "mark vessel"))
            return
        self._drag = ("new", self.tool, p, p)

    def mouseMoveEvent(self, ev) -> None:
        pos = ev.position()
        sp = self.to_scene(pos)
        self.cursor_moved.emit(sp.x(), sp.y())
        if not self._drag:
            return
        if self._drag[0] == "pan":
            _, start, orig = self._drag
            d = (pos - start) / self.zoom
            self.origin = QPointF(orig.x() - d.x(), orig.y() - d.y())
            self.update()
        elif self._drag[0] == "new":
            self._drag = ("new", self._drag[1], self._drag[2], (sp.x(), sp.y()))
            self.update()
        elif self._drag[0] == "area":
            self._drag = ("area", self._drag[1], (sp.x(), sp.y()))
            self.update()
        elif self._drag[0] == "handle":
            _, item_id, idx, before = self._drag
            cur = self.doc.item(item_id)
            if isinstance(cur, Vessel):
                moved = Vessel(cur.id, cur.name, (sp.x(), sp.y()))
                self.doc.vessels[cur.id] = moved
            else:
                pts = list(cur.points)
                pts[idx] = (sp.x(), sp.y())
                self.doc.measurements[cur.id] = replace(
                    cur, points=tuple(pts), placement_px=max(cur.placement_px, placement_px(self.zoom))
                )
            self.update()

    def mouseReleaseEvent(self, ev) -> None:
        drag, self._drag = self._drag, None
        if self.tool == "look":
            self.setCursor(Qt.CursorShape.OpenHandCursor)
        if not drag:
            return
        if drag[0] == "area":
            self.finish_area(drag[1], drag[2])
            return
        if drag[0] == "handle":
            _, item_id, _idx, before = drag
            after = self.doc.item(item_id)
            if after != before:
                self.doc.undo.push(ChangeItem(self.doc, before, after, "move point"))
        elif drag[0] == "new":
            _, kind, p0, p1 = drag
            if math.hypot(p1[0] - p0[0], p1[1] - p0[1]) * self.zoom < 4:
                self.message.emit("drag to draw a line")
                return
            self.finish_line(kind, p0, p1)

    def finish_area(self, p0, p1) -> None:
        """End the area pick with the rectangle p0-p1 (scene col, row), clipped to the scene (used by the mouse
        and by tests); a rectangle of a few screen pixels is not taken."""
        self.cancel_area()
        sc = self.doc.scene
        if sc is None:
            return
        c0, c1 = sorted((p0[0], p1[0]))
        r0, r1 = sorted((p0[1], p1[1]))
        if (c1 - c0) * self.zoom < 8 or (r1 - r0) * self.zoom < 8:
            self.message.emit("drag a rectangle over the water to search in it")
            return
        c0, r0 = max(int(c0), 0), max(int(r0), 0)
        c1, r1 = min(int(math.ceil(c1)), sc.width), min(int(math.ceil(r1)), sc.height)
        if c1 - c0 < 1 or r1 - r0 < 1:
            self.message.emit("the rectangle lies outside the scene")
            return
        self.area_drawn.emit((c0, r0, c1 - c0, r1 - r0))

    def finish_line(self, kind: str, p0, p1) -> None:
        """Add a drawn line as a measurement (used by the mouse and by tests)."""
        if kind == "calibrate":
            self.calibration_line.emit(p0, p1)
            return
        vid = self.doc.nearest_vessel(p0) if kind in ("track", "arm", "crest") else None
        if kind == "track" and vid is not None:  # from the vessel back along the wake: store (vessel, wake end)
            v = self.doc.vessels[vid]
            if math.dist(v.position, p1) < math.dist(v.position, p0):
                p0, p1 = p1, p0
        # each point is as uncertain as the zoom it was placed at (a few screen pixels)
        m = Measurement(self.doc.new_id(), kind, (p0, p1), vid, placement_px=placement_px(self.zoom))
        self.doc.undo.push(AddItem(self.doc, m, f"draw {kind}"))

    def wheelEvent(self, ev) -> None:
        steps = ev.angleDelta().y() / 120.0
        self.set_zoom(self.zoom * (1.25**steps), ev.position())

    def keyPressEvent(self, ev) -> None:
        k = ev.key()
        step = 80 / self.zoom
        moves = {
            Qt.Key.Key_Left: (-step, 0),
            Qt.Key.Key_Right: (step, 0),
            Qt.Key.Key_Up: (0, -step),
            Qt.Key.Key_Down: (0, step),
        }
        if k in moves:
            dx, dy = moves[k]
            self.origin = QPointF(self.origin.x() + dx, self.origin.y() + dy)
            self.update()
        elif k in (Qt.Key.Key_Plus, Qt.Key.Key_Equal):
            self.set_zoom(self.zoom * 1.25)
        elif k == Qt.Key.Key_Minus:
            self.set_zoom(self.zoom / 1.25)
        elif k == Qt.Key.Key_F:
            self.fit()
        elif k == Qt.Key.Key_1:
            self.set_zoom(1.0)
        else:
            super().keyPressEvent(ev)

    def resizeEvent(self, ev) -> None:
        super().resizeEvent(ev)
        if self.doc.scene is not None and ev.oldSize().width() <= 0:
            self.fit()
