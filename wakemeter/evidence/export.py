"""Writing the evidence as one set: a folder holding the PDF report, the JSON record, one annotated PNG per
vessel and ``SHA256SUMS`` (the digests of the other files, checkable with ``sha256sum -c``).

The set is written into a hidden temporary folder beside the target and published by one rename
(:func:`wakemeter.fileio.publish_folder`): a reader sees the old set or the new one, never a mix, and a
second writer of the same name gets a clear error (or, with ``force``, replaces the whole set).  Temporary
folders left by a killed writer are removed on the next export into that folder.
"""

from __future__ import annotations

import errno
import hashlib
import json
import os
from collections.abc import Sequence
from dataclasses import dataclass, field
from pathlib import Path

import cv2
import numpy as np

from .. import fileio
from ..detect.result import WakeAnalysis
from ..errors import ParameterError, SceneWriteError, SetExistsError
from ..names import clean_name
from ..scene.raster import Scene
from . import plots as plots_mod
from .annotate import render_evidence
from .record import build_record
from .report import write_pdf


@dataclass(frozen=True)
class VesselEvidence:
    """One vessel of a report: its finding, the name the analyst gave it and its hand measurements
    (each ``{"kind", "value", "points_px", "placement_px"}``, as :func:`hand_measurement_rows` gives)."""

    analysis: WakeAnalysis
    name: str = ""
    hand_measurements: tuple[dict, ...] = ()
    position_report: dict | None = None  #: the comparison with position reports (positions.match), as JSON

    def __post_init__(self) -> None:
        object.__setattr__(self, "name", clean_name(self.name))


@dataclass(frozen=True)
class CaseDetails:
    """Who made the report and for what: printed on the first page and kept in the record."""

    analyst: str | None = None
    reference: str | None = None

    def __post_init__(self) -> None:
        for f in ("analyst", "reference"):
            value = getattr(self, f)
            object.__setattr__(self, f, None if value is None else clean_name(value) or None)


@dataclass(frozen=True)
class EvidenceFiles:
    """The published set."""

    folder: Path
    report: Path
    data: Path
    images: tuple[Path, ...]
    checksums: Path
    cleaned: tuple[str, ...] = field(default=())  #: leftovers of killed writers removed before writing

    @property
    def image(self) -> Path:
        return self.images[0]

    def all_files(self) -> list[Path]:
        return [self.report, self.data, *self.images, self.checksums]


#: output names are kept this short (file systems allow 255 bytes; temporary names add about 30)
MAX_STEM_CHARS = 96
#: most vessels one report may hold (each adds pages and an image)
MAX_VESSELS_PER_REPORT = 200


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
    return safe_stem(f"{scene.info.origin.stem}_wake_{int(round(c))}_{int(round(r))}")


def set_folder(out_dir: str | os.PathLike, basename: str) -> Path:
    """Where a set of this name is published."""
    return Path(out_dir) / safe_stem(basename)


def export_evidence(
    scene: Scene,
    analysis: WakeAnalysis,
    out_dir: str | os.PathLike,
    *,
    analyst: str | None = None,
    case_reference: str | None = None,
    vessel_name: str = "",
    hand_measurements: Sequence[dict] = (),
    parameters: dict | None = None,
    force: bool = False,
    basename: str | None = None,
    paper: str | None = None,
    exported_at: str | None = None,
    position_report: dict | None = None,
    unmatched_reports: list[dict] | None = None,
) -> EvidenceFiles:
    """The evidence set of one vessel (see :func:`export_evidence_set`)."""
    return export_evidence_set(
        scene,
        [VesselEvidence(analysis, vessel_name, tuple(hand_measurements), position_report)],
        out_dir,
        case=CaseDetails(analyst, case_reference),
        parameters=parameters,
        force=force,
        basename=basename or default_basename(scene, analysis),
        paper=paper,
        exported_at=exported_at,
        unmatched_reports=unmatched_reports,
    )


def export_evidence_set(
    scene: Scene,
    vessels: Sequence[VesselEvidence],
    out_dir: str | os.PathLike,
    *,
    case: CaseDetails = CaseDetails(),
    parameters: dict | None = None,
    force: bool = False,
    basename: str | None = None,
    paper: str | None = None,
    exported_at: str | None = None,
    unmatched_reports: list[dict] | None = None,
) -> EvidenceFiles:
    """Write the set ``<out_dir>/<basename>/`` for one or several vessels of one scene; returns its paths.

    Raises :class:`SceneWriteError` when the folder is missing or not writable, when the set exists and
    ``force`` is not given (also when another export claims the name first), or when writing fails; then
    nothing of the new set is left behind and an existing set is untouched."""
    if not vessels:
        raise ParameterError("a report needs at least one vessel")
    if len(vessels) > MAX_VESSELS_PER_REPORT:
        raise ParameterError(f"one report holds at most {MAX_VESSELS_PER_REPORT} vessels, got {len(vessels)}")
    folder = Path(out_dir)
    if not folder.is_dir():
        raise SceneWriteError(f"cannot export: folder {folder} does not exist")
    if not os.access(folder, os.W_OK):
        raise SceneWriteError(f"cannot export: folder {folder} is not writable")
    base = safe_stem(basename or set_basename(scene, vessels))
    target = folder / base
    # a killed earlier writer's leftovers go first (a set moved aside and never replaced comes back), so a
    # run that then refuses to replace a set still tidies the folder
    cleaned_first = tuple(fileio.clean_stale(folder))
    if (target.exists() or target.is_symlink()) and not force:
        raise SetExistsError(
            f"cannot export: {base} already exists in {folder} (choose another name or folder, or allow replacing)",
            name=base,
            folder=str(folder),
        )
    names = _image_names(base, vessels)
    images = [
        render_evidence(scene, v.analysis, scene_label=scene.info.origin.name, vessel_name=v.name) for v in vessels
    ]
    plots = [
        [p for p in (plots_mod.spectrum_plot(v.analysis), plots_mod.profile_plot(v.analysis)) if p is not None]
        for v in vessels
    ]
    report_name, data_name, sums_name = f"{base}.pdf", f"{base}.json", "SHA256SUMS"
    files = {"report": report_name, "data": data_name, "images": names, "checksums": sums_name}
    record = build_record(
        scene,
        [(v.analysis, v.name, list(v.hand_measurements), v.position_report) for v in vessels],
        analyst=case.analyst,
        case_reference=case.reference,
        parameters=parameters or {},
        files=files,
        exported_at=exported_at,
        unmatched_reports=unmatched_reports,
    )
    cleaned = cleaned_first + tuple(fileio.clean_stale(folder))
    tmp: Path | None = None
    try:
        tmp = fileio.new_temp_folder(target)
        fileio.step("folder")
        for name, img in zip(names, images, strict=True):
            ok, buf = cv2.imencode(".png", np.ascontiguousarray(img[..., ::-1]))
            if not ok:
                raise SceneWriteError("cannot encode the evidence image as PNG")
            _write(tmp / name, buf.tobytes())
            fileio.step(f"image {name}")
        write_pdf(str(tmp / report_name), record, [v.analysis for v in vessels], images, plots, paper=paper)
        fileio.step("report")
        _write(tmp / data_name, (json.dumps(record, indent=2, sort_keys=False) + "\n").encode())
        fileio.step("data")
        sums = "".join(
            f"{hashlib.sha256((tmp / n).read_bytes()).hexdigest()}  {n}\n" for n in [report_name, data_name, *names]
        )
        _write(tmp / sums_name, sums.encode())
        fileio.step("checksums")
        fileio.publish_folder(tmp, target, replace=force)
        tmp = None
        fileio.step("published")
    except fileio.NameTaken as err:
        raise SetExistsError(
            f"cannot export: {err} (another export claimed it first)", name=base, folder=str(folder)
        ) from err
    except OSError as err:
        if err.errno == errno.ENOSPC:
            raise SceneWriteError(f"cannot export to {folder}: the disk is full") from err
        raise SceneWriteError(f"cannot export to {folder}: {err.strerror or err}") from err
    finally:
        if tmp is not None:
            fileio.remove_tree(tmp)
    return EvidenceFiles(
        target,
        target / report_name,
        target / data_name,
        tuple(target / n for n in names),
        target / sums_name,
        cleaned,
    )


def _write(path: Path, data: bytes) -> None:
    with open(path, "xb") as fh:
        fh.write(data)
        fh.flush()
        os.fsync(fh.fileno())


def set_basename(scene: Scene, vessels: Sequence[VesselEvidence]) -> str:
    """The default name of a set: scene and vessel position for one vessel, scene and count for several."""
    if len(vessels) == 1:
        return default_basename(scene, vessels[0].analysis)
    return f"{scene.info.origin.stem}_{len(vessels)}_vessels"


def _image_names(base: str, vessels: Sequence[VesselEvidence]) -> list[str]:
    if len(vessels) == 1:
        return [f"{base}.png"]
    names: list[str] = []
    for i, v in enumerate(vessels, 1):
        stem = safe_stem(f"{i:02d}_{v.name}" if v.name else f"{i:02d}_vessel")[:60]
        names.append(f"{base}_{stem}.png")
    return names


def hand_measurement_rows(measurements: Sequence[object]) -> list[dict]:
    """The report's rows for hand measurements (``project.Measurement``-like objects: kind, points, text,
    error, placement_px)."""
    rows = []
    for m in measurements:
        text = getattr(m, "text", "") or ""
        err = getattr(m, "error", "") or ""
        rows.append(
            {
                "kind": str(getattr(m, "kind", "")),
                "value": text if not err else f"not used: {err}",
                "points_px": [[round(float(c), 2) for c in p] for p in getattr(m, "points", ())],
                "placement_px": round(float(getattr(m, "placement_px", 0.0)), 2),
            }
        )
    return rows
