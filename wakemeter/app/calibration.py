"""Calibrating an image without georeference from two points a known distance apart (the window's part)."""

from __future__ import annotations

from PySide6.QtWidgets import QInputDialog

from ..errors import WakemeterError
from ..scene import geodesy
from .document import Measurement, SetCalibration
from .window_part import WindowPart


class Calibration(WindowPart):
    """Mixed into the main window: the Calibrate tool's questions and the calibration it sets (one undo step)."""

    def _ask_calibration(self, p0, p1) -> None:
        if not self._calibration_possible():
            return
        dist, ok = QInputDialog.getDouble(
            self, "Calibrate", "Ground distance between the two points (m):", 100.0, 0.01, 1e7, 2
        )
        if not ok:
            return
        north, ok2 = QInputDialog.getDouble(
            self, "Calibrate", "True bearing of image up (deg; cancel if unknown):", 0.0, 0.0, 359.99, 1
        )
        self.calibrate_two_points(p0, p1, dist, north if ok2 else None)

    def _calibration_possible(self) -> bool:
        """Say at once when there is nothing to calibrate (before asking for a distance)."""
        sc = self.doc.scene
        if sc is None:
            return False
        if sc.info.georeferenced:
            self.error("Calibration not needed", "This scene is georeferenced; distances already use its geodesy.")
            return False
        return True

    def calibrate_two_points(self, p0, p1, distance_m: float, north_up_deg: float | None = None) -> bool:
        if not self._calibration_possible():
            return False
        try:
            px = geodesy.pixel_size_from_two_points(p0, p1, distance_m)
            frame = geodesy.calibrated_frame(pixel_size_m=px, north_up_deg=north_up_deg)
        except WakemeterError as err:
            self.error("Calibration not possible", str(err))
            return False
        marker = Measurement(self.doc.new_id(), "calibration", (p0, p1), None, values={"distance_m": distance_m})
        self.doc.undo.push(SetCalibration(self.doc, frame, marker))
        self.say(
            f"calibrated: {px:.3f} m per pixel"
            + ("" if north_up_deg is not None else "; headings relative to image up")
        )
        return True
