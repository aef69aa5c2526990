"""The results panel: inputs for the analysis, the numbers with their intervals and reasons, and plots."""

from __future__ import annotations

import html
from dataclasses import replace

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import Signal
from PySide6.QtWidgets import (
    QCheckBox,
    QComboBox,
    QDoubleSpinBox,
    QFormLayout,
    QGroupBox,
    QHBoxLayout,
    QLabel,
    QLineEdit,
    QPushButton,
    QTabWidget,
    QTextBrowser,
    QVBoxLayout,
    QWidget,
)

from ..detect.request import AnalysisRequest, RadarGeometry, SpeedLimit, WaterCurrent
from ..evidence import summary
from ..physics.inversion import Uncertain
from ..physics.units import KNOT_MPS


def _spin(lo: float, hi: float, dec: int, suffix: str, tip: str, special: str = "unknown") -> QDoubleSpinBox:
    s = QDoubleSpinBox()
    s.setRange(lo, hi)
    s.setDecimals(dec)
    s.setSuffix(f" {suffix}")
    s.setSpecialValueText(special)  # the minimum means "not given"
    s.setValue(lo)
    s.setToolTip(tip)
    return s


class ResultsPanel(QWidget):
    analyse_one = Signal()
    analyse_all = Signal()
    reject_toggled = Signal(bool)
    export_requested = Signal()

    def __init__(self, parent=None):
        super().__init__(parent)
        lay = QVBoxLayout(self)
        self.setStyleSheet(
            "QLabel, QGroupBox, QCheckBox { color: #dfe6ee; } "
            "QGroupBox { border: 1px solid #3a4458; border-radius: 4px; margin-top: 14px; "
            "padding-top: 6px; } QGroupBox::title { subcontrol-origin: margin; left: 8px; }"
        )
        self.title = QLabel("Select a vessel")
        self.title.setStyleSheet("font-weight: bold; font-size: 13px;")
        lay.addWidget(self.title)
        box = QGroupBox("What you know (optional)")
        form = QFormLayout(box)
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
        self.use_radar = QCheckBox("Radar geometry (hull offset from its wake)")
        self.use_radar.setToolTip("Enables the azimuth-offset method for radar scenes (Raney 1971)")
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
        self.use_limit.toggled.connect(lambda _on: self._fit())
        self.use_radar.toggled.connect(lambda _on: self._fit())
        lay.addWidget(box)
        row = QHBoxLayout()
        self.run_button = QPushButton("Analyse vessel")
        self.run_button.setToolTip(
            "Find the wake of the selected vessel and estimate its speed (runs in the background)"
        )
        self.run_button.clicked.connect(self.analyse_one.emit)
        self.run_all_button = QPushButton("Analyse all")
        self.run_all_button.setToolTip("Analyse every marked vessel, one after the other")
        self.run_all_button.clicked.connect(self.analyse_all.emit)
        row.addWidget(self.run_button)
        row.addWidget(self.run_all_button)
        lay.addLayout(row)
        row2 = QHBoxLayout()
        self.reject = QCheckBox("Reject this finding")
        self.reject.setToolTip("Keep the finding on record but do not use it (it is not exported)")
        self.reject.toggled.connect(self.reject_toggled.emit)
        self.export_button = QPushButton("Export evidence…")
        self.export_button.setToolTip("Write the annotated image, the PDF report and the JSON record")
        self.export_button.clicked.connect(self.export_requested.emit)
        row2.addWidget(self.reject)
        row2.addWidget(self.export_button)
        lay.addLayout(row2)
        self.tabs = QTabWidget()
        self.text = QTextBrowser()
        self.text.setOpenExternalLinks(False)
        self.tabs.addTab(self.text, "Numbers")
        pg.setConfigOptions(antialias=True, imageAxisOrder="row-major")
        self.spec_plot = pg.PlotWidget(title="Wave spectrum behind the vessel, fitted curve")
        self.spec_plot.setLabel("bottom", "wavenumber along the track", units="rad/m")
        self.spec_plot.setLabel("left", "across", units="rad/m")
        self.spec_img = pg.ImageItem()
        self.spec_plot.addItem(self.spec_img)
        self.spec_curve = [self.spec_plot.plot(pen=pg.mkPen((255, 80, 80), width=2)) for _ in range(2)]
        self.prof_plot = pg.PlotWidget(title="Intensity along the track, crest spacing")
        self.prof_plot.setLabel("bottom", "distance behind the vessel", units="m")
        self.prof_line = self.prof_plot.plot(pen=pg.mkPen((220, 220, 220)))
        self.prof_marks = self.prof_plot.plot(pen=None, symbol="t", symbolBrush=(255, 60, 170), symbolSize=9)
        self.radon_plot = pg.PlotWidget(title="Radon transform around the vessel (behind it), picked wake line")
        self.radon_plot.setLabel("bottom", "line normal angle", units="°")
        self.radon_plot.setLabel("left", "offset from the vessel", units="px")
        self.radon_img = pg.ImageItem()
        self.radon_plot.addItem(self.radon_img)
        self.radon_pick = self.radon_plot.plot(
            pen=None, symbol="o", symbolPen=pg.mkPen((255, 200, 0), width=2), symbolBrush=None, symbolSize=14
        )
        plots = QWidget()
        pl = QVBoxLayout(plots)
        pl.setContentsMargins(0, 0, 0, 0)
        for w in (self.spec_plot, self.prof_plot, self.radon_plot):
            w.setMinimumHeight(60)
        pl.addWidget(self.spec_plot, 3)
        pl.addWidget(self.prof_plot, 2)
        pl.addWidget(self.radon_plot, 2)
        self.tabs.addTab(plots, "Plots")
        lay.addWidget(self.tabs, 1)
        self.show_result(None, None)
        self._fit()

    #: the panel's height with both optional boxes closed (the results text takes what is left)
    BASE_HEIGHT = 520

    def _fit(self) -> None:
        """Grow the panel by the optional boxes that are open, so their rows are never squeezed (the panel
        sits in a scroll area)."""
        extra = sum(b.sizeHint().height() for b in (self.radar_box, self.limit_box) if not b.isHidden())
        self.setMinimumHeight(self.BASE_HEIGHT + extra)

    # ---- inputs -----------------------------------------------------------
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
                if old is None
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

    def set_request(self, req: AnalysisRequest | None) -> None:
        self.depth_input.setValue(req.depth.value if req is not None and req.depth is not None else 0.0)
        self.depth_std.setValue(req.depth.std if req is not None and req.depth is not None else 0.0)
        self.hull.setValue(req.hull_length_m or 0.0 if req is not None else 0.0)
        rg = None if req is None else req.radar_geometry
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

    # ---- display ----------------------------------------------------------
    def show_result(self, name: str | None, result, *, rejected: bool = False, analysis=None) -> None:
        """``result`` is the analysis JSON (``WakeAnalysis.to_json()``), ``analysis`` the object when at hand."""
        self.title.setText(f"Vessel: {name}" if name else "Select a vessel, then Analyse")
        self.reject.blockSignals(True)
        self.reject.setChecked(rejected)
        self.reject.blockSignals(False)
        self.reject.setEnabled(result is not None)
        self.export_button.setEnabled(result is not None and not rejected)
        if result is None:
            self.text.setHtml(
                "<p>No analysis yet. Mark a vessel with the <b>Vessel</b> tool, select it, give "
                "what you know, and press <b>Analyse vessel</b>.</p><p>Every figure comes with its "
                "95 % interval, method and assumptions.</p>"
            )
            self._clear_plots()
            return
        self.text.setHtml(result_html(result, rejected))
        self._plots(analysis)

    def _clear_plots(self) -> None:
        self.spec_img.clear()
        for c in self.spec_curve:
            c.setData([], [])
        self.prof_line.setData([], [])
        self.prof_marks.setData([], [])
        self.radon_img.clear()
        self.radon_pick.setData([], [])

    def _plots(self, a) -> None:
        if a is None or a.plots is None:
            self._clear_plots()
            return
        p = a.plots
        white = p.whitened_spectrum
        dk_u, dk_v = p.spectrum_dk
        n_v, n_u = white.shape
        self.spec_img.setImage(np.clip(white, -2, 6), levels=(-2, 6))
        self.spec_img.setColorMap(pg.colormap.get("viridis"))
        from PySide6.QtCore import QRectF

        self.spec_img.setRect(QRectF(-n_u / 2 * dk_u, -n_v / 2 * dk_v, n_u * dk_u, n_v * dk_v))
        ku, kv = p.fitted_curve  # computed by the analysis; the panel only draws
        for c, sgn in zip(self.spec_curve, (1, -1)):
            c.setData(sgn * ku, sgn * kv, connect="finite")
        prof = np.asarray(p.profile, float)
        x = np.arange(prof.size) * p.profile_m_per_px
        self.prof_line.setData(x, prof)
        lam = p.transverse_wavelength_m
        if lam:
            xs = np.arange(0, x[-1], lam)
            self.prof_marks.setData(xs, np.full(xs.size, np.nanmax(prof)))
        else:
            self.prof_marks.setData([], [])
        sino = p.radon
        if sino is not None:
            from PySide6.QtCore import QRectF

            n = sino.shape[0]
            lo, hi = np.percentile(sino, [1, 99.5])
            self.radon_img.setImage(sino, levels=(lo, hi))
            self.radon_img.setColorMap(pg.colormap.get("viridis"))
            self.radon_img.setRect(QRectF(0, -n / 2, 180, n))
            ang, off, _sig = p.radon_pick
            self.radon_pick.setData([ang % 180], [off])


def result_html(r: dict, rejected: bool = False) -> str:
    """The result as HTML for the panel (the same rows as the CLI and the PDF: evidence.summary)."""
    esc = html.escape
    if not r.get("wake_found"):
        return (
            f"<h3>No wake found</h3><p>{esc(r.get('decision', ''))}</p><p>No speed is given for a vessel "
            "without a detectable wake. You can still measure by hand (crest ruler, track, arm).</p>"
        )
    main = summary.summary_rows(r)
    speed, interval = main[0][1], main[1][1]  # "not estimated" when the wake was seen as a line only
    if r.get("speed_mps") is not None:
        speed = f"{main[0][0]}: {speed}"
    else:
        speed = "Wake seen as a line: no speed (see the cautions)"
    extra = [("Position report", r["position_report"]["text"])] if r.get("position_report") else []
    rows = "".join(f"<tr><td>{esc(k)}</td><td>{esc(v)}</td></tr>" for k, v in main[2:] + extra)
    methods = "".join("<tr>" + "".join(f"<td>{esc(c)}</td>" for c in m) + "</tr>" for m in summary.method_rows(r))
    return (
        ("<p style='color:#c33'><b>Rejected:</b> kept on record, not used or exported.</p>" if rejected else "")
        + f"<h2 style='margin-bottom:2px'>{esc(speed)}</h2>"
        f"<p style='margin-top:0'>95 % interval <b>{esc(interval)}</b></p>"
        f"<table cellspacing=4>{rows}</table>"
        "<h4>Methods</h4><table border=0 cellspacing=4><tr><th align=left>method</th><th>m/s</th>"
        f"<th>95 % (m/s)</th><th>kn</th></tr>{methods}</table>"
        "<h4>Assumptions</h4><ul>" + "".join(f"<li>{esc(a)}</li>" for a in summary.assumption_texts(r)) + "</ul>"
        "<h4>Cautions</h4><ul>" + "".join(f"<li>{esc(c)}</li>" for c in summary.caution_texts(r)) + "</ul>"
        f"<p><small>{esc(r['decision'])}</small></p>"
    )
