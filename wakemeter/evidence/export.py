"""Writing the three evidence files - annotated PNG, PDF report, JSON record - atomically.

All three are written to temporary files in the target folder first and renamed only
when every one succeeded; an existing file is never replaced unless ``force`` is given.
"""

from __future__ import annotations

import hashlib
import json
import os
import tempfile
from dataclasses import dataclass
from pathlib import Path

import cv2
import numpy as np

from ..detect.analysis import WakeAnalysis
from ..errors import SceneWriteError
from ..scene.raster import Scene
from . import plots as plots_mod
from .annotate import render_evidence
from .record import build_record
from .report import write_pdf


@dataclass(frozen=True)
class EvidenceFiles:
    image: Path
    report: Path
    data: Path


#: output names are kept this short (file systems allow 255 bytes; temporary names add about 20)
MAX_STEM_CHARS = 96


def safe_stem(text: str) -> str:
    """A file-name stem from any text: letters, digits, '-', '_' and '.' kept, the rest '_'; a long one is
    cut and given a short hash of the whole text so that different long names stay different.  The whole
    text is kept inside the files (provenance), never lost."""
    stem = "".join(ch if (ch.isalnum() or ch in "-_.") and ch.isascii() else "_" for ch in text).strip("._")
    stem = "_".join(part for part in stem.split("_") if part) or "wakemeter"
    if len(stem) > MAX_STEM_CHARS:
        digest = hashlib.sha1(text.encode("utf-8", "surrogateescape")).hexdigest()[:8]
        stem = f"{stem[: MAX_STEM_CHARS - 9]}_{digest}"
    return stem


def default_basename(scene: Scene, analysis: WakeAnalysis) -> str:
    c, r = analysis.vessel_px
    return safe_stem(f"{scene.info.path.stem}_wake_{int(round(c))}_{int(round(r))}")


def export_evidence(
    scene: Scene,
    analysis: WakeAnalysis,
    out_dir: str | os.PathLike,
    *,
    analyst: str | None = None,
    parameters: dict | None = None,
    force: bool = False,
    basename: str | None = None,
    paper: str | None = None,
    exported_at: str | None = None,
) -> EvidenceFiles:
    """Write ``<basename>.png``, ``.pdf`` and ``.json`` into ``out_dir``; returns their paths."""
    folder = Path(out_dir)
    if not folder.is_dir():
        raise SceneWriteError(f"cannot export: folder {folder} does not exist")
    if not os.access(folder, os.W_OK):
        raise SceneWriteError(f"cannot export: folder {folder} is not writable")
    base = safe_stem(basename) if basename else default_basename(scene, analysis)
    targets = EvidenceFiles(folder / f"{base}.png", folder / f"{base}.pdf", folder / f"{base}.json")
    existing = [p.name for p in (targets.image, targets.report, targets.data) if p.exists()]
    if existing and not force:
        raise SceneWriteError(
            f"cannot export: {', '.join(existing)} already exist in {folder} "
            "(choose another folder or allow overwriting)"
        )
    img = render_evidence(scene, analysis, scene_label=scene.info.path.name)
    plots = [p for p in (plots_mod.spectrum_plot(analysis), plots_mod.profile_plot(analysis)) if p is not None]
    record = build_record(
        scene,
        analysis,
        analyst=analyst,
        parameters=parameters or {},
        files={"image": targets.image.name, "report": targets.report.name, "data": targets.data.name},
        exported_at=exported_at,
    )
    temps: list[str] = []
    try:

        def temp(suffix: str) -> str:
            fd, name = tempfile.mkstemp(prefix=f".{base}.", suffix=suffix, dir=folder)
            os.close(fd)
            temps.append(name)
            return name

        t_png, t_pdf, t_json = temp(".png.part"), temp(".pdf.part"), temp(".json.part")
        ok, buf = cv2.imencode(".png", np.ascontiguousarray(img[..., ::-1]))
        if not ok:
            raise SceneWriteError("cannot encode the evidence image as PNG")
        Path(t_png).write_bytes(buf.tobytes())
        write_pdf(t_pdf, record, img, plots, paper=paper)
        Path(t_json).write_text(json.dumps(record, indent=2, sort_keys=False) + "\n")
        mask = os.umask(0)
        os.umask(mask)
        for name in temps:
            os.chmod(name, 0o666 & ~mask)
        os.replace(t_png, targets.image)
        os.replace(t_pdf, targets.report)
        os.replace(t_json, targets.data)
        temps.clear()
    except OSError as err:
        raise SceneWriteError(f"cannot export to {folder}: {err.strerror or err}") from err
    finally:
        for name in temps:
            Path(name).unlink(missing_ok=True)
    return targets
