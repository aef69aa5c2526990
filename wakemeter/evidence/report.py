"""The PDF report (reportlab): annotated image, numbers with intervals, methods, plots, assumptions,
provenance and the caution.  A4 or Letter by locale."""

from __future__ import annotations

import io
import locale
import os

import cv2
import numpy as np

from reportlab.lib import colors
from reportlab.lib.pagesizes import A4, letter
from reportlab.lib.styles import getSampleStyleSheet
from reportlab.lib.units import mm
from reportlab.platypus import Image, PageBreak, Paragraph, SimpleDocTemplate, Spacer, Table, TableStyle

from ..physics.units import KNOT_MPS
from .record import CAUTION_TEXT, describe_lines


def page_size_for_locale() -> str:
    """'Letter' for the US and Canada style locales, 'A4' elsewhere (common practice, no source)."""
    loc = (os.environ.get("LC_PAPER") or os.environ.get("LC_ALL") or os.environ.get("LANG")
           or (locale.getlocale()[0] or ""))
    return "Letter" if any(t in loc for t in ("_US", "_CA", "_PH", "_MX", "_CL", "_CO", "_VE")) else "A4"


def _png(img: np.ndarray) -> io.BytesIO:
    ok, buf = cv2.imencode(".png", np.ascontiguousarray(img[..., ::-1] if img.ndim == 3 else img))
    assert ok
    return io.BytesIO(buf.tobytes())


def write_pdf(path: str, record: dict, evidence_img: np.ndarray, plots: list[np.ndarray], *,
              paper: str | None = None) -> None:
    """Write the report to ``path`` (the caller makes it atomic)."""
    size = letter if (paper or page_size_for_locale()) == "Letter" else A4
    doc = SimpleDocTemplate(path, pagesize=size, leftMargin=16 * mm, rightMargin=16 * mm, topMargin=14 * mm,
                            bottomMargin=14 * mm, title="wakemeter evidence report", author=record["provenance"]["analyst"] or "",
                            creator=record["provenance"]["software"], invariant=1)
    st = getSampleStyleSheet()
    small = st["BodyText"].clone("small", fontSize=8, leading=10)
    warn = st["BodyText"].clone("warn", textColor=colors.HexColor("#8a1c1c"), fontSize=9.5, leading=12)
    r, prov = record["result"], record["provenance"]
    width = size[0] - 32 * mm
    story = [Paragraph("Wake speed estimate - evidence report", st["Title"]),
             Paragraph(f"<b>Caution.</b> {CAUTION_TEXT}", warn), Spacer(1, 4 * mm)]
    if r["wake_found"]:
        lo, hi = r["speed_ci95_mps"]
        rows = [["Speed through water", f"{r['speed_knots']:.1f} kn  ({r['speed_mps']:.2f} m/s)"],
                ["95 % interval", f"{lo / KNOT_MPS:.1f} - {hi / KNOT_MPS:.1f} kn  ({lo:.2f} - {hi:.2f} m/s)"],
                ["Heading (true bearing)", f"{r['heading_deg']:.1f} deg  (+/- {r['heading_std_deg']:.1f})"],
                ["Wake half-angle", "not measured" if r["half_angle_deg"] is None else
                 f"{r['half_angle_deg']:.1f} +/- {r['half_angle_std_deg']:.1f} deg"],
                ["Transverse crest spacing", "not seen" if r["transverse_wavelength_m"] is None else
                 f"{r['transverse_wavelength_m']:.1f} m"],
                ["Wake lines through the vessel", describe_lines(r)],
                ["Depth regime", f"{r['regime']}"],
                ["Depth", "not estimated" if r["depth_m"] is None else
                 f"{r['depth_m']:.1f} m (95 %: {r['depth_ci95_m'][0]:.1f} - {r['depth_ci95_m'][1]:.1f} m)"],
                ["Consistency of methods", r["consistency"] or ""]]
    else:
        rows = [["Result", "No wake found: no speed estimate is given"], ["Decision", r["decision"]]]
    rows.append(["Vessel position", (f"lon {r['vessel_lonlat'][0]:.6f}, lat {r['vessel_lonlat'][1]:.6f}; "
                                     if r["vessel_lonlat"] else "") + f"pixel ({r['vessel_px'][0]:.1f}, "
                 f"{r['vessel_px'][1]:.1f})"])
    story.append(_table(rows, [55 * mm, width - 55 * mm], small))
    story.append(Spacer(1, 4 * mm))
    h, w = evidence_img.shape[:2]
    img_w = width
    story.append(Image(_png(evidence_img), width=img_w, height=img_w * h / w))
    story.append(PageBreak())
    story.append(Paragraph("Methods", st["Heading2"]))
    mrows = [["Method", "Speed (m/s)", "95 % interval (m/s)", "Speed (kn)"]]
    for m in r["methods"]:
        mrows.append([Paragraph(m["name"], small), f"{m['speed_mps']:.2f}",
                      f"{m['speed_ci95_mps'][0]:.2f} - {m['speed_ci95_mps'][1]:.2f}",
                      f"{m['speed_mps'] / KNOT_MPS:.1f}"])
    story.append(_table(mrows, [80 * mm, 25 * mm, 40 * mm, width - 145 * mm], small,
                        header=True))
    story.append(Paragraph(f"Depth regime: {r['regime_explanation']}", small))
    for p in plots:
        ph, pw = p.shape[:2]
        pw_mm = min(width, 120 * mm * pw / max(ph, 1) if ph > pw * 0.6 else width)
        story += [Spacer(1, 3 * mm), Image(_png(p), width=pw_mm, height=pw_mm * ph / pw)]
    story.append(Paragraph("Inputs and assumptions", st["Heading2"]))
    arows = [[Paragraph(a, small)] for a in record["assumptions"]]
    arows.append([Paragraph(f"gravity used {r['gravity_mps2']:.4f} m/s^2 (WGS 84 normal gravity at the vessel's "
                            f"latitude when georeferenced); analysis pixel {r['pixel_m']:.2f} m", small)])
    arows += [[Paragraph("Caution: " + c, small)] for c in r["cautions"]]
    story.append(_table(arows, [width], small))
    story.append(Paragraph("Provenance", st["Heading2"]))
    g = prov["georeference"]
    prow = [["Scene file", prov["scene_file"]], ["Size", f"{prov['scene_size_bytes']:,} bytes"],
            ["SHA-256", Paragraph(prov["scene_sha256"], small)],
            ["Acquisition time", prov["acquisition_time"] or "not in the metadata"],
            ["Georeference", Paragraph(f"{g['crs'] or 'none'}; {g['note'] or 'from the file'}", small)],
            ["Software", prov["software"]],
            ["Analysis parameters", Paragraph(", ".join(f"{k}={v}" for k, v in prov["analysis_parameters"].items())
                                              or "defaults", small)],
            ["Exported", prov["exported_at"]], ["Analyst", prov["analyst"] or "not given"]]
    story.append(_table(prow, [45 * mm, width - 45 * mm], small))
    story.append(Spacer(1, 4 * mm))
    story.append(Paragraph(f"<b>Caution.</b> {CAUTION_TEXT}", warn))

    def footer(canvas, doc_) -> None:
        canvas.saveState()
        canvas.setFont("Helvetica", 7)
        canvas.drawString(16 * mm, 8 * mm, f"wakemeter evidence report - {prov['scene_file']} - "
                                           f"sha256 {prov['scene_sha256'][:16]}... - page {doc_.page}")
        canvas.restoreState()
    doc.build(story, onFirstPage=footer, onLaterPages=footer)


def _table(rows, widths, small, header: bool = False):
    t = Table([[c if not isinstance(c, str) else Paragraph(c, small) for c in row] for row in rows], colWidths=widths)
    style = [("GRID", (0, 0), (-1, -1), 0.3, colors.grey), ("VALIGN", (0, 0), (-1, -1), "TOP"),
             ("FONTSIZE", (0, 0), (-1, -1), 8)]
    if header:
        style.append(("BACKGROUND", (0, 0), (-1, 0), colors.HexColor("#dde4ee")))
    t.setStyle(TableStyle(style))
    return t
