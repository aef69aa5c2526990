"""The request form of the results panel: what the analyst knows about a vessel (depth, hull length, radar
geometry, a speed limit and a current), read into an :class:`~wakemeter.detect.request.AnalysisRequest` and
filled back from one."""

from __future__ import annotations

from dataclasses import replace

from PySide6.QtCore import Signal
from PySide6.QtWidgets import (
    QCheckBox,
    QComboBox,
    QDoubleSpinBox,
    QFormLayout,
    QGroupBox,
    QLineEdit,
    QWidget,
)

from ..detect.request import PRODUCT_GEOMETRY_SOURCE, AnalysisRequest, RadarGeometry, SpeedLimit, WaterCurrent
from ..physics.inversion import Uncertain
from ..physics.units import KNOT_MPS

TYPED_GEOMETRY = "Radar geometry (hull offset from its wake)"
PRODUCT_GEOMETRY = "Radar geometry (read from the product)"
TYPED_GEOMETRY_TIP = "Enables the azimuth-offset method for radar scenes (Raney 1971)"
PRODUCT_GEOMETRY_TIP = (
    "The scene's own radar geometry (slant range, platform speed, look bearing, incidence) is read at the vessel's "
    "pixel; tick to give other figures"
)


def _spin(lo: float, hi: float, dec: int, suffix: str, tip: str, special: str = "unknown") -> QDoubleSpinBox:
    s = QDoubleSpinBox()
    s.setRange(lo, hi)
    s.setDecimals(dec)
    s.setSuffix(f" {suffix}")
    s.setSpecialValueText(special)  # the minimum means "not given"
    s.setValue(lo)
    s.setToolTip(tip)
    return s


class RequestForm(QGroupBox):
    """The inputs of one vessel's analysis; ``resized`` when an optional box opens or closes."""

    resized = Signal()

    def __init__(self, parent=None):
        super().__init__("What you know (optional)", parent)
        form = QFormLayout(self)
        self.depth_input = _spin(0.0, 5000.0, 1, "m", "Known water depth; leave at 'unknown' to let the wake tell")
        self.hull = _spin(0.0, 500.0, 1, "m", "Hull length, for the check of narrow arms of fast hulls")
        self.depth_std = _spin(
            0.0, 500.0, 1, "m", "Standard uncertainty of the depth (chart accuracy, tide); 0 treats it as exact", ""
        )
        self.depth_std.setPrefix("± ")
        form.addRow("Water depth", self.depth_input)
        form.addRow("Depth uncertainty", self.depth_std)
        form.addRow("Hull length", self.hull)
        self.assume_vessel = QCheckBox("Assume a vessel here (no hull or V seen)")
        self.assume_vessel.setToolTip(
            "Give the speed of the waves at this point even when neither a hull nor the apex of a V shows a "
            "vessel there; the result then says so. Leave off unless you know the vessel is there."
        )
        form.addRow(self.assume_vessel)
        self.use_radar = QCheckBox(TYPED_GEOMETRY)
        self.use_radar.setToolTip(TYPED_GEOMETRY_TIP)
        form.addRow(self.use_radar)
        self.slant = _spin(0.0, 2e6, 0, "m", "Slant range from the radar to the vessel", special="-")
        self.vplat = _spin(0.0, 10000.0, 0, "m/s", "Platform (satellite or aircraft) speed", special="-")
        self.look = _spin(-1.0, 360.0, 1, "°", "True bearing from the radar toward the scene", special="-")
        self.inc = _spin(0.0, 89.0, 1, "°", "Incidence angle at the vessel", special="-")
        self.radar_box = QWidget()
        rform = QFormLayout(self.radar_box)
        rform.setContentsMargins(12, 0, 0, 0)
        for lab, w in (
            ("Slant range", self.slant),
            ("Platform speed", self.vplat),
            ("Look bearing", self.look),
            ("Incidence", self.inc),
        ):
            rform.addRow(lab, w)
        form.addRow(self.radar_box)
        self.radar_box.setVisible(False)
        self.use_radar.toggled.connect(self.radar_box.setVisible)
        self.use_limit = QCheckBox("Speed limit and water current")
        self.use_limit.setToolTip(
            "Judge the speed against a limit, with its uncertainty, and give the speed over ground with a known "
            "current (analyse again after changing them)"
        )
        form.addRow(self.use_limit)
        self.limit = _spin(0.0, 100.0, 1, "kn", "Speed limit; leave at 'none' for no limit", special="none")
        self.limit_basis = QComboBox()
        self.limit_basis.addItems(["over ground", "through the water"])
        self.limit_basis.setToolTip("What the limit applies to (most limits are over ground)")
        self.use_current = QCheckBox("Current known")
        self.current_speed = _spin(0.0, 20.0, 2, "kn", "Speed of the water current at the vessel", special="0 kn")
        self.current_std = _spin(0.0, 20.0, 2, "kn", "Its standard uncertainty", special="")
        self.current_std.setPrefix("± ")
        self.current_toward = _spin(0.0, 360.0, 0, "°", "True bearing the current sets toward", special="0°")
        self.current_toward_std = _spin(0.0, 180.0, 0, "°", "Its standard uncertainty", special="")
        self.current_toward_std.setPrefix("± ")
        self.current_source = QLineEdit()
        self.current_source.setPlaceholderText("tide table, model, buoy…")
        self.limit_box = QWidget()
        lform = QFormLayout(self.limit_box)
        lform.setContentsMargins(12, 0, 0, 0)
        for lab, w in (
            ("Limit", self.limit),
            ("Applies to", self.limit_basis),
            ("", self.use_current),
            ("Current speed", self.current_speed),
            ("", self.current_std),
            ("Sets toward", self.current_toward),
            ("", self.current_toward_std),
            ("Source", self.current_source),
        ):
            lform.addRow(lab, w)
        form.addRow(self.limit_box)
        self.limit_box.setVisible(False)
        self.use_limit.toggled.connect(self.limit_box.setVisible)
        self.use_limit.toggled.connect(lambda _on: self.resized.emit())
        self.use_radar.toggled.connect(lambda _on: self.resized.emit())

    def open_boxes_height(self) -> int:
        """The height the open optional boxes (radar geometry, limit and current) need."""
        return sum(b.sizeHint().height() for b in (self.radar_box, self.limit_box) if not b.isHidden())

    def inputs(self) -> dict:
        """What the panel shows, as plain numbers (None: not given)."""
        out = {
            "depth_m": self.depth_input.value() or None,
            "depth_std_m": self.depth_std.value(),
            "hull_length_m": self.hull.value() or None,
            "radar_geometry": None,
        }
        if self.use_radar.isChecked() and self.slant.value() > 0 and self.vplat.value() > 0 and self.inc.value() > 0:
            out["radar_geometry"] = [
                self.slant.value(),
                self.vplat.value(),
                max(self.look.value(), 0.0),
                self.inc.value(),
            ]
        return out

    def request(self, position: tuple[float, float], base: AnalysisRequest | None = None) -> AnalysisRequest:
        """The analysis request for a vessel at ``position``: the panel's values over ``base`` (which keeps
        what the panel does not show: radar uncertainties, pixel-size uncertainty, seed)."""
        base = (base or AnalysisRequest(vessel_px=position)).at_pixel(position)
        d = self.inputs()
        depth = None
        if d["depth_m"]:
            depth = Uncertain(d["depth_m"], d["depth_std_m"])
        rg = None
        if d["radar_geometry"]:
            r, v, look, inc = d["radar_geometry"]
            old = base.radar_geometry
            rg = (
                RadarGeometry(r, v, look, inc)
                if old is None or old.source.startswith(PRODUCT_GEOMETRY_SOURCE)  # typed figures are the user's own
                else replace(old, slant_range_m=r, platform_speed_mps=v, look_bearing_deg=look, incidence_deg=inc)
            )
        limit, current = self.limit_and_current()
        return replace(
            base,
            depth=depth,
            hull_length_m=d["hull_length_m"],
            radar_geometry=rg,
            force=self.assume_vessel.isChecked(),
            current=current,
            speed_limit=limit,
        )

    def limit_and_current(self) -> tuple[SpeedLimit | None, WaterCurrent | None]:
        """The limit and the current the panel gives (None when not given or the section is off)."""
        if not self.use_limit.isChecked():
            return None, None
        limit = None
        if self.limit.value() > 0:
            limit = SpeedLimit(self.limit.value() * KNOT_MPS, over_ground=self.limit_basis.currentIndex() == 0)
        current = None
        if self.use_current.isChecked():
            current = WaterCurrent(
                self.current_speed.value() * KNOT_MPS,
                self.current_toward.value() % 360.0,
                self.current_std.value() * KNOT_MPS,
                self.current_toward_std.value(),
                self.current_source.text().strip(),
            )
        return limit, current

    def geometry_in_scene(self, present: bool) -> None:
        """A radar product that carries its geometry gives the azimuth-offset method its figures: the box then
        says so, and ticking it types other figures instead."""
        self.use_radar.setText(PRODUCT_GEOMETRY if present else TYPED_GEOMETRY)
        self.use_radar.setToolTip(PRODUCT_GEOMETRY_TIP if present else TYPED_GEOMETRY_TIP)

    def set_request(self, req: AnalysisRequest | None) -> None:
        self.depth_input.setValue(req.depth.value if req is not None and req.depth is not None else 0.0)
        self.depth_std.setValue(req.depth.std if req is not None and req.depth is not None else 0.0)
        self.hull.setValue(req.hull_length_m or 0.0 if req is not None else 0.0)
        rg = None if req is None else req.radar_geometry
        if rg is not None and rg.source.startswith(PRODUCT_GEOMETRY_SOURCE):
            rg = None  # read from the product at the vessel's pixel on each analysis: nothing typed to show
        self.use_radar.setChecked(rg is not None)
        self.assume_vessel.setChecked(bool(req is not None and req.force))
        values = (
            (0, 0, -1, 0)
            if rg is None
            else (rg.slant_range_m, rg.platform_speed_mps, rg.look_bearing_deg, rg.incidence_deg)
        )
        for w, v in zip((self.slant, self.vplat, self.look, self.inc), values):
            w.setValue(v)
        limit = None if req is None else req.speed_limit
        current = None if req is None else req.current
        self.use_limit.setChecked(limit is not None or current is not None)
        self.limit.setValue(0.0 if limit is None else limit.limit_mps / KNOT_MPS)
        self.limit_basis.setCurrentIndex(0 if limit is None or limit.over_ground else 1)
        self.use_current.setChecked(current is not None)
        self.current_speed.setValue(0.0 if current is None else current.speed_mps / KNOT_MPS)
        self.current_std.setValue(0.0 if current is None else current.speed_std_mps / KNOT_MPS)
        self.current_toward.setValue(0.0 if current is None else current.toward_deg)
        self.current_toward_std.setValue(0.0 if current is None else current.toward_std_deg)
        self.current_source.setText("" if current is None else current.source)
