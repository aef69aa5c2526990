"""The PDF report (reportlab): annotated image, numbers with intervals, methods, plots, assumptions,
provenance and the caution.  A4 or Letter by locale."""

from __future__ import annotations

import datetime as _dt
import io
import locale
import os
from collections.abc import Sequence
from xml.sax.saxutils import escape as xml_escape

import cv2
import numpy as np
from reportlab.lib import colors
from reportlab.lib.pagesizes import A4, letter
from reportlab.lib.styles import getSampleStyleSheet
from reportlab.lib.units import mm
from reportlab.platypus import Image, PageBreak, Paragraph, SimpleDocTemplate, Spacer, Table, TableStyle

from ..caution import CAUTION
from ..detect.result import WakeAnalysis
from ..names import clean_name
from ..palette import COLOURS, LEGEND
from .summary import assumption_texts, caution_texts, method_rows, overview_cells, speed_check_rows, summary_rows

#: hand measurements listed per vessel in the PDF (all of them are in the JSON record)
MAX_HAND_ROWS = 200


def page_size_for_locale() -> str:
    """'Letter' for the US and Canada style locales, 'A4' elsewhere (common practice, no source)."""
    loc = (
        os.environ.get("LC_PAPER")
        or os.environ.get("LC_ALL")
        or os.environ.get("LANG")
        or (locale.getlocale()[0] or "")
    )
    return "Letter" if any(t in loc for t in ("_US", "_CA", "_PH", "_MX", "_CL", "_CO", "_VE")) else "A4"


def _png(img: np.ndarray) -> io.BytesIO:
    ok, buf = cv2.imencode(".png", np.ascontiguousarray(img[..., ::-1] if img.ndim == 3 else img))
    assert ok
    return io.BytesIO(buf.tobytes())


def write_pdf(
    path: str,
    record: dict,
    analyses: Sequence[WakeAnalysis],
    evidence_imgs: list[np.ndarray],
    plots: list[list[np.ndarray]],
    *,
    paper: str | None = None,
) -> None:
    """Write the report to ``path`` (the caller makes it atomic): the case and, when several, an overview of
    the vessels on the first page; then per vessel its numbers, image, methods, plots, hand measurements,
    assumptions and cautions; then the provenance and the caution again.  ``record`` is the evidence record
    (case, provenance, names, hand measurements), ``analyses`` the results in the record's vessel order."""
    size = letter if (paper or page_size_for_locale()) == "Letter" else A4
    case, prov, vessels = record["case"], record["provenance"], record["vessels"]
    doc = SimpleDocTemplate(
        path,
        pagesize=size,
        leftMargin=16 * mm,
        rightMargin=16 * mm,
        topMargin=14 * mm,
        bottomMargin=14 * mm,
        title="wakemeter evidence report" + (f" - {case['reference']}" if case["reference"] else ""),
        author=case["analyst"] or "",
        creator=prov["software"],
        invariant=1,  # the same inputs give the same bytes; the dates are set from the export time below
    )
    st = getSampleStyleSheet()
    small = st["BodyText"].clone("small", fontSize=8, leading=10)
    warn = st["BodyText"].clone("warn", textColor=colors.HexColor("#8a1c1c"), fontSize=9.5, leading=12)
    width = size[0] - 32 * mm
    story = [
        Paragraph("Wake speed estimate - evidence report", st["Title"]),
        Paragraph(f"<b>Caution.</b> {_esc(CAUTION)}", warn),
        Spacer(1, 3 * mm),
    ]
    crows = [
        ["Case reference", case["reference"] or "not given"],
        ["Analyst", case["analyst"] or "not given"],
        ["Scene", prov["scene_file"]],
        ["Acquisition time", prov["acquisition_time"] or "not in the metadata"],
        ["Exported (UTC)", case["exported_at"]],
        ["Vessels in this report", str(len(vessels))],
    ]
    story.append(_table(crows, [45 * mm, width - 45 * mm], small))
    if not case["analyst"]:
        story.append(
            Paragraph(
                "<b>Unattributed:</b> no analyst was named for this report; it cannot be attributed to a person.",
                warn,
            )
        )
    if len(vessels) > 1:
        story += [Spacer(1, 3 * mm), Paragraph("Vessels", st["Heading2"])]
        orows = [["#", "Vessel", "Speed", "95 % interval", "Heading", "Depth regime"]]
        for i, (v, a) in enumerate(zip(vessels, analyses, strict=True), 1):
            orows.append([str(i), v["name"] or f"vessel {i}", *overview_cells(a)])
        story.append(_table(orows, [8 * mm, 42 * mm, 32 * mm, 40 * mm, 28 * mm, width - 150 * mm], small, header=True))
    for i, (v, a, img, vplots) in enumerate(zip(vessels, analyses, evidence_imgs, plots, strict=True), 1):
        story += _vessel_section(v, a, i, len(vessels), img, vplots, width, st, small)
    if record.get("unmatched_reports"):
        story += _unmatched_section(record["unmatched_reports"], width, st, small)
    story.append(Paragraph("Provenance", st["Heading2"]))
    g = prov["georeference"]
    params = dict(prov["analysis_parameters"])
    prow = [
        ["Scene file", prov["scene_file"]],
        ["Size", f"{prov['scene_size_bytes']:,} bytes"],
        ["SHA-256", prov["scene_sha256"]],
        ["Acquisition time", prov["acquisition_time"] or "not in the metadata"],
        ["Georeference", f"{g['crs'] or 'none'}; {g['note'] or 'from the file'}"],
        ["Software", prov["software"]],
        ["Analysis parameters", describe_parameters(params) or "defaults"],
    ]
    for i, (v, a) in enumerate(zip(vessels, analyses, strict=True), 1):
        if a.request is not None:
            label = "Request" + (f" ({v['name'] or f'vessel {i}'})" if len(vessels) > 1 else "")
            prow.append([label, describe_parameters(a.request.to_json())])
    prow += [["Exported (UTC)", case["exported_at"]], ["Analyst", case["analyst"] or "not given"]]
    story.append(_table(prow, [45 * mm, width - 45 * mm], small))
    story.append(Spacer(1, 4 * mm))
    story.append(Paragraph(f"<b>Caution.</b> {_esc(CAUTION)}", warn))
    stamp = pdf_date(case["exported_at"])
    ref = f"{clean_name(case['reference'], limit=40)} - " if case["reference"] else ""
    who = clean_name(case["analyst"], limit=40) if case["analyst"] else "no analyst named"
    line = (
        f"wakemeter evidence report - {ref}{who} - {clean_name(prov['scene_file'], limit=50)} - "
        f"sha256 {prov['scene_sha256'][:16]}..."
    )

    def dates(canvas, _doc) -> None:
        canvas.setDateFormatter(lambda *_: stamp)  # creation and change dates: the export time

    doc.build(story, onFirstPage=dates, onLaterPages=dates, canvasmaker=_footed_canvas(line))


def _footed_canvas(line: str):
    """A canvas class that writes ``line`` and "page N of M" at the foot of every page (the count is known
    only at the end: each page is kept until the document is saved)."""
    from reportlab.pdfgen.canvas import Canvas

    class Footed(Canvas):
        def __init__(self, *args, **kwargs):
            super().__init__(*args, **kwargs)
            self._pages: list[dict] = []

        def showPage(self) -> None:  # noqa: N802 - reportlab's name
            self._pages.append(dict(self.__dict__))
            self._startPage()

        def save(self) -> None:
            total = len(self._pages)
            for state in self._pages:
                self.__dict__.update(state)
                self.saveState()
                self.setFont("Helvetica", 7)
                self.drawString(16 * mm, 8 * mm, f"{line} - page {self._pageNumber} of {total}")
                self.restoreState()
                super().showPage()
            super().save()

    return Footed


def _unmatched_section(unmatched: list, width, st, small) -> list:
    """The reporting vessels that no analysed vessel matched, as a heading and a table."""
    urows = [["Identifier", "Position at the scene time", "Speed over ground", "Course", "From"]]
    for u in unmatched:
        urows.append(
            [
                str(u["vessel_id"]),
                f"lat {u['lat']:.5f}°, lon {u['lon']:.5f}°",
                "-" if u.get("sog_kn") is None else f"{u['sog_kn']:.1f} kn",
                "-" if u.get("cog_deg") is None else f"{u['cog_deg']:.0f}°",
                str(u.get("how", "")),
            ]
        )
    return [
        Paragraph("Reporting vessels matched to none analysed", st["Heading2"]),
        _table(urows, [30 * mm, 50 * mm, 28 * mm, 18 * mm, width - 126 * mm], small, header=True),
    ]


def _vessel_section(v: dict, r: WakeAnalysis, i: int, n: int, img: np.ndarray, vplots, width, st, small) -> list:
    title = v["name"] or (f"Vessel {i}" if n > 1 else "")
    out: list = [PageBreak()] if n > 1 else [Spacer(1, 3 * mm)]
    if title:
        out.append(Paragraph(_esc(f"Vessel {i} of {n}: {title}" if n > 1 else f"Vessel: {title}"), st["Heading2"]))
    rows = [list(row) for row in summary_rows(r)]
    n_checks = len(speed_check_rows(r)) if r.wake_found else 0
    if v.get("position_report"):
        rows.insert(2 + n_checks, ["Position report", v["position_report"]["text"]])
        n_checks += 1
    marked = range(2, 2 + n_checks) if r.wake_found else ()
    out.append(_table(rows, [55 * mm, width - 55 * mm], small, marked=marked))
    out.append(Spacer(1, 3 * mm))
    h, w = img.shape[:2]
    img_w = min(width, 170 * mm * w / max(h, 1))
    out.append(Image(_png(img), width=img_w, height=img_w * h / w))
    out.append(_legend(small))
    out.append(PageBreak())
    out.append(Paragraph("Methods" + (f" - {_esc(title)}" if n > 1 else ""), st["Heading2"]))
    mrows = [["Method", "Speed (m/s)", "95 % interval (m/s)", "Speed (kn)"]] + [list(m) for m in method_rows(r)]
    if len(mrows) == 1:
        mrows.append(["no speed method gave a result", "-", "-", "-"])
    out.append(_table(mrows, [80 * mm, 25 * mm, 40 * mm, width - 145 * mm], small, header=True))
    for p in vplots:
        ph, pw = p.shape[:2]
        pw_mm = min(width, 130 * mm * pw / max(ph, 1) if ph > pw * 0.6 else width)
        out += [Spacer(1, 3 * mm), Image(_png(p), width=pw_mm, height=pw_mm * ph / pw)]
    out.append(Paragraph("Hand measurements", st["Heading3"]))
    hand = v.get("hand_measurements") or []
    if hand:
        hrows = [["Kind", "Value (standard uncertainty)", "Points (scene pixels)", "Placement (px)"]]
        hrows += [
            [
                m["kind"],
                m["value"],
                "; ".join(f"({p[0]:.1f}, {p[1]:.1f})" for p in m["points_px"]),
                f"{m['placement_px']:.1f}",
            ]
            for m in hand[:MAX_HAND_ROWS]
        ]
        if len(hand) > MAX_HAND_ROWS:
            hrows.append(["...", f"{len(hand) - MAX_HAND_ROWS:,} more: every one is in the JSON record", "", ""])
        out.append(_table(hrows, [22 * mm, 70 * mm, 60 * mm, width - 152 * mm], small, header=True))
    else:
        out.append(Paragraph("none made for this vessel", small))
    out.append(Paragraph("Inputs and assumptions", st["Heading3"]))
    arows = [[a] for a in assumption_texts(r)] + [["Caution: " + c] for c in caution_texts(r)]
    out.append(_table(arows, [width], small))
    return out


def _legend(small) -> Paragraph:
    """What the colours of the picture show, each behind a square of its colour."""
    parts = [
        f"<font color='#{r:02x}{g:02x}{b:02x}'>\u25a0</font> {_esc(text)}"
        for key, text in LEGEND.items()
        for (r, g, b) in [COLOURS[key]]
    ]
    return Paragraph("Colours: " + "; ".join(parts), small)


def pdf_date(iso: str) -> str:
    """A PDF date string (ISO 32000-1, 7.9.4) from an ISO 8601 time; UTC when no zone is given."""
    t = _dt.datetime.fromisoformat(iso)
    if t.tzinfo is None:
        t = t.replace(tzinfo=_dt.UTC)
    t = t.astimezone(_dt.UTC)
    return t.strftime("D:%Y%m%d%H%M%S+00'00'")


def describe_parameters(params: dict) -> str:
    """The analysis parameters in plain words: what was given, numbers rounded to what they mean (pixels to
    0.01, longitude and latitude to 1e-6 degrees, other numbers to 4 significant digits), unset fields and
    schema names left out."""

    def value(key: str, v: object) -> str:
        if isinstance(v, bool) or v is None:
            return str(v).lower()
        if isinstance(v, float):
            if "lonlat" in key or key in ("lon", "lat"):
                return f"{v:.6f}"
            return f"{v:.2f}" if key.endswith("_px") else f"{v:.4g}"
        if isinstance(v, (list, tuple)):
            return "(" + ", ".join(value(key, x) for x in v) + ")"
        if isinstance(v, dict):
            return "; ".join(f"{k} {value(k, x)}" for k, x in v.items() if x is not None and k != "schema")
        return str(v)

    return "; ".join(f"{k} {value(k, v)}" for k, v in params.items() if v is not None and k != "schema")


def _table(rows, widths, small, header: bool = False, marked: Sequence[int] = ()):
    """A table of text cells; ``marked`` rows (the verdicts) are set off in bold on a tinted ground."""
    bold = small.clone("small_bold", fontName="Helvetica-Bold")
    rows = [
        [Paragraph(_esc(c), bold) if isinstance(c, str) and i in marked else c for c in row]
        for i, row in enumerate(rows)
    ]
    t = Table(
        [[c if not isinstance(c, str) else Paragraph(_esc(c), small) for c in row] for row in rows], colWidths=widths
    )
    style = [
        ("GRID", (0, 0), (-1, -1), 0.3, colors.grey),
        ("VALIGN", (0, 0), (-1, -1), "TOP"),
        ("FONTSIZE", (0, 0), (-1, -1), 8),
    ]
    if header:
        style.append(("BACKGROUND", (0, 0), (-1, 0), colors.HexColor("#dde4ee")))
    for i in marked:
        style.append(("BACKGROUND", (0, i), (-1, i), colors.HexColor("#fff1c9")))
    t.setStyle(TableStyle(style))
    return t


def _esc(text: str) -> str:
    """Text from files and users is never markup: escape it before it reaches a paragraph."""
    return xml_escape(str(text))
