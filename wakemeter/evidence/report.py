"""The PDF report (reportlab): annotated image, numbers with intervals, methods, plots, assumptions,
provenance and the caution.  A4 or Letter by locale."""

from __future__ import annotations

import io
import locale
import os
from xml.sax.saxutils import escape as xml_escape

import cv2
import numpy as np
from reportlab.lib import colors
from reportlab.lib.pagesizes import A4, letter
from reportlab.lib.styles import getSampleStyleSheet
from reportlab.lib.units import mm
from reportlab.platypus import Image, PageBreak, Paragraph, SimpleDocTemplate, Spacer, Table, TableStyle

from ..caution import CAUTION
from .summary import assumption_texts, caution_texts, method_rows, summary_rows


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
    path: str, record: dict, evidence_img: np.ndarray, plots: list[np.ndarray], *, paper: str | None = None
) -> None:
    """Write the report to ``path`` (the caller makes it atomic)."""
    size = letter if (paper or page_size_for_locale()) == "Letter" else A4
    doc = SimpleDocTemplate(
        path,
        pagesize=size,
        leftMargin=16 * mm,
        rightMargin=16 * mm,
        topMargin=14 * mm,
        bottomMargin=14 * mm,
        title="wakemeter evidence report",
        author=record["provenance"]["analyst"] or "",
        creator=record["provenance"]["software"],
        invariant=1,
    )
    st = getSampleStyleSheet()
    small = st["BodyText"].clone("small", fontSize=8, leading=10)
    warn = st["BodyText"].clone("warn", textColor=colors.HexColor("#8a1c1c"), fontSize=9.5, leading=12)
    r, prov = record["result"], record["provenance"]
    width = size[0] - 32 * mm
    story = [
        Paragraph("Wake speed estimate - evidence report", st["Title"]),
        Paragraph(f"<b>Caution.</b> {_esc(CAUTION)}", warn),
        Spacer(1, 4 * mm),
    ]
    story.append(_table([list(row) for row in summary_rows(r)], [55 * mm, width - 55 * mm], small))
    story.append(Spacer(1, 4 * mm))
    h, w = evidence_img.shape[:2]
    img_w = width
    story.append(Image(_png(evidence_img), width=img_w, height=img_w * h / w))
    story.append(PageBreak())
    story.append(Paragraph("Methods", st["Heading2"]))
    mrows = [["Method", "Speed (m/s)", "95 % interval (m/s)", "Speed (kn)"]] + [list(m) for m in method_rows(r)]
    story.append(_table(mrows, [80 * mm, 25 * mm, 40 * mm, width - 145 * mm], small, header=True))
    for p in plots:
        ph, pw = p.shape[:2]
        pw_mm = min(width, 120 * mm * pw / max(ph, 1) if ph > pw * 0.6 else width)
        story += [Spacer(1, 3 * mm), Image(_png(p), width=pw_mm, height=pw_mm * ph / pw)]
    story.append(Paragraph("Inputs and assumptions", st["Heading2"]))
    arows = [[a] for a in assumption_texts(r)] + [["Caution: " + c] for c in caution_texts(r)]
    story.append(_table(arows, [width], small))
    story.append(Paragraph("Provenance", st["Heading2"]))
    g = prov["georeference"]
    prow = [
        ["Scene file", prov["scene_file"]],
        ["Size", f"{prov['scene_size_bytes']:,} bytes"],
        ["SHA-256", prov["scene_sha256"]],
        ["Acquisition time", prov["acquisition_time"] or "not in the metadata"],
        ["Georeference", f"{g['crs'] or 'none'}; {g['note'] or 'from the file'}"],
        ["Software", prov["software"]],
        ["Analysis parameters", describe_parameters(prov["analysis_parameters"]) or "defaults"],
        ["Exported", prov["exported_at"]],
        ["Analyst", prov["analyst"] or "not given"],
    ]
    story.append(_table(prow, [45 * mm, width - 45 * mm], small))
    story.append(Spacer(1, 4 * mm))
    story.append(Paragraph(f"<b>Caution.</b> {_esc(CAUTION)}", warn))

    def footer(canvas, doc_) -> None:
        canvas.saveState()
        canvas.setFont("Helvetica", 7)
        canvas.drawString(
            16 * mm,
            8 * mm,
            f"wakemeter evidence report - {prov['scene_file'][:80]} - "
            f"sha256 {prov['scene_sha256'][:16]}... - page {doc_.page}",
        )
        canvas.restoreState()

    doc.build(story, onFirstPage=footer, onLaterPages=footer)


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

    return "; ".join(f"{k} {value(k, v)}" for k, v in params.items() if v is not None)


def _table(rows, widths, small, header: bool = False):
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
    t.setStyle(TableStyle(style))
    return t


def _esc(text: str) -> str:
    """Text from files and users is never markup: escape it before it reaches a paragraph."""
    return xml_escape(str(text))
