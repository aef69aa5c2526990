"""The result view of the results panel: the numbers with their intervals, methods, assumptions and cautions
(as the CLI and the PDF give them: :mod:`wakemeter.evidence.summary`), and the plots behind them."""

from __future__ import annotations

import html

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import Qt
from PySide6.QtWidgets import QTabWidget, QTextBrowser, QVBoxLayout, QWidget

from ..detect.result import WakeAnalysis
from ..evidence import summary

#: (title, bottom axis, left axis, bottom units) of the two upper plots, for a wave finding and a line finding
WAVE_TITLES = (
    ("Wave spectrum behind the vessel, fitted curve", "wavenumber along the track", "across (rad/m)", "rad/m"),
    ("Intensity along the track, crest spacing", "distance behind the vessel", "intensity", "m"),
)
LINE_TITLES = (
    ("Significance by direction (dashed: needed)", "angle from the wake line (°)", "significance", None),
    ("Brightness along the wake line", "distance from the vessel", "brightness", "m"),
)


class ResultView(QTabWidget):
    """Tabs "Numbers" and "Plots" for one result."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.text = QTextBrowser()
        self.text.setOpenExternalLinks(False)
        self.addTab(self.text, "Numbers")
        pg.setConfigOptions(antialias=True, imageAxisOrder="row-major")
        self.spec_plot = pg.PlotWidget(title="Wave spectrum behind the vessel, fitted curve")
        self.spec_plot.setLabel("bottom", "wavenumber along the track", units="rad/m")
        self.spec_plot.setLabel("left", "across", units="rad/m")
        self.spec_img = pg.ImageItem()
        self.spec_plot.addItem(self.spec_img)
        self.spec_curve = [self.spec_plot.plot(pen=pg.mkPen((255, 80, 80), width=2)) for _ in range(2)]
        self.spec_line = self.spec_plot.plot(pen=pg.mkPen((120, 200, 255), width=2))  #: a line finding's fan
        self.spec_threshold = self.spec_plot.plot(pen=pg.mkPen((255, 200, 0), width=1, style=Qt.PenStyle.DashLine))
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
            for side in ("bottom", "left"):  # plain units: no "mrad/m" or milli-degree ticks
                w.getAxis(side).enableAutoSIPrefix(False)
        pl.addWidget(self.spec_plot, 3)
        pl.addWidget(self.prof_plot, 2)
        pl.addWidget(self.radon_plot, 2)
        self.addTab(plots, "Plots")

    def show_result(
        self, analysis: WakeAnalysis | None, *, rejected: bool = False, position_report: str | None = None
    ) -> None:
        """Show a result (None: the hint what to do first); ``position_report`` is its comparison's text."""
        if analysis is None:
            self.text.setHtml(
                "<p>No analysis yet. Mark a vessel with the <b>Vessel</b> tool, select it, give "
                "what you know, and press <b>Analyse vessel</b>.</p><p>Every figure comes with its "
                "95 % interval, method and assumptions.</p>"
            )
            self._clear_plots()
            return
        self.text.setHtml(result_html(analysis, rejected, position_report))
        self._plots(analysis)

    def _titles(self, titles: tuple[tuple[str, str, str, str | None], ...]) -> None:
        for w, (title, bottom, left, units) in zip((self.spec_plot, self.prof_plot), titles, strict=True):
            w.setTitle(title)
            w.setLabel("bottom", bottom, units=units)
            w.setLabel("left", left)
        self.radon_plot.setVisible(titles is WAVE_TITLES)

    def _line_plots(self, p) -> None:
        """A wake found as a line: how each direction from the vessel stands against the scene's other lines
        (the wake's own above the threshold), and the brightness along the wake line."""
        self._titles(LINE_TITLES)
        self.spec_line.setData(p.angles_deg, p.significance)
        self.spec_threshold.setData([p.angles_deg[0], p.angles_deg[-1]], [p.threshold, p.threshold])
        x = np.arange(p.profile.size) * p.profile_m_per_px
        self.prof_line.setData(x, np.nan_to_num(p.profile))

    def _clear_plots(self) -> None:
        self.spec_img.clear()
        for c in self.spec_curve:
            c.setData([], [])
        self.prof_line.setData([], [])
        self.prof_marks.setData([], [])
        self.radon_img.clear()
        self.radon_pick.setData([], [])
        self.spec_line.setData([], [])
        self.spec_threshold.setData([], [])

    def _plots(self, a: WakeAnalysis) -> None:
        self._clear_plots()
        if a.plots is None:
            if a.line_plots is not None:
                self._line_plots(a.line_plots)
            return
        self._titles(WAVE_TITLES)
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
            if p.radon_pick is not None:
                ang, off, _sig = p.radon_pick
                self.radon_pick.setData([ang % 180], [off])
            else:
                self.radon_pick.setData([], [])


def result_html(a: WakeAnalysis, rejected: bool = False, position_report: str | None = None) -> str:
    """The result as HTML for the panel (the same rows as the CLI and the PDF: evidence.summary)."""
    esc = html.escape
    if not a.wake_found:
        return (
            f"<h3>No wake found</h3><p>{esc(a.decision)}</p><p>No speed is given for a vessel "
            "without a detectable wake. You can still measure by hand (crest ruler, track, arm).</p>"
        )
    main = summary.summary_rows(a)
    speed, interval = main[0][1], main[1][1]  # "not estimated" when the wake was seen as a line only
    if a.speed is not None:
        speed = f"{main[0][0]}: {speed}"
    else:
        speed = "Wake seen as a line: no speed (see the cautions)"
    checks = summary.speed_check_rows(a)
    verdicts = checks + ([("Position report", position_report)] if position_report else [])
    rest = main[2 + len(checks) :]
    said = "".join(f"<p style='margin:2px 0'><b>{esc(k)}:</b> {esc(v)}</p>" for k, v in verdicts)
    rows = "".join(f"<tr><td>{esc(k)}</td><td>{esc(v)}</td></tr>" for k, v in rest)
    methods = "".join("<tr>" + "".join(f"<td>{esc(c)}</td>" for c in m) + "</tr>" for m in summary.method_rows(a))
    return (
        ("<p style='color:#c33'><b>Rejected:</b> kept on record, not used or exported.</p>" if rejected else "")
        + f"<h2 style='margin-bottom:2px'>{esc(speed)}</h2>"
        f"<p style='margin-top:0'>95 % interval <b>{esc(interval)}</b></p>"
        f"{said}"
        f"<table cellspacing=4>{rows}</table>"
        "<h4>Methods</h4><table border=0 cellspacing=4><tr><th align=left>method</th><th>m/s</th>"
        f"<th>95 % (m/s)</th><th>kn</th></tr>{methods}</table>"
        "<h4>Assumptions</h4><ul>" + "".join(f"<li>{esc(x)}</li>" for x in summary.assumption_texts(a)) + "</ul>"
        "<h4>Cautions</h4><ul>" + "".join(f"<li>{esc(c)}</li>" for c in summary.caution_texts(a)) + "</ul>"
        f"<p><small>{esc(a.decision)}</small></p>"
    )
