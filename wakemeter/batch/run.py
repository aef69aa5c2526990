"""Planning a batch, running it on dask.distributed, and the results table.

* ``plan``: every vessel of every scene, from a list (CSV, GeoJSON or GeoPackage positions: each vessel
  goes to the scenes that hold it) and/or found by the vessel finder (one finding task per scene).
* ``run``: the tasks on a ``dask.distributed`` LocalCluster (the embedded case) or on the cluster at
  ``scheduler`` (same code); finished tasks (by key) are skipped, so a rerun resumes; a worker that dies has
  its tasks redone by the scheduler; one failing vessel is recorded and the others go on.
* ``table``: every result in ``results.csv`` and ``results.gpkg`` (vessels with their attributes).
"""

from __future__ import annotations

import csv
import json
import time
from collections.abc import Callable, Sequence
from dataclasses import dataclass, replace
from pathlib import Path

from .. import fileio
from ..detect.request import AnalysisRequest
from ..detect.result import RESULT_ROW_FIELDS, WakeAnalysis, result_row
from ..errors import ParameterError, WakemeterError
from .tasks import BatchTask, done, evidence_task, find_task, result_path, run_task


@dataclass(frozen=True)
class Summary:
    planned: int
    skipped: int
    done: int
    failed: int
    seconds: float
    failures: tuple[tuple[str, str], ...]  #: (vessel, reason)

    def text(self) -> str:
        lines = [
            f"{self.planned} vessel(s): {self.done} analysed, {self.skipped} already done (skipped), "
            f"{self.failed} failed; {self.seconds:.1f} s"
        ]
        lines += [f"  failed: {v}: {r}" for v, r in self.failures]
        return "\n".join(lines)


#: how long a given scheduler has to answer (s)
SCHEDULER_TIMEOUT_S = 10


def _scheduler_address(text: str) -> str:
    """A dask scheduler address (``tcp://host:port``, ``tls://...``, ``host:port``), checked before connecting."""
    import re

    m = re.fullmatch(r"(?:(?:tcp|tls|ws|wss|inproc|ucx)://)?[A-Za-z0-9_.\-\[\]:]+:(\d{1,5})/?", text.strip())
    if m is None or not 0 < int(m[1]) < 65536:
        shown = text if len(text) <= 60 else text[:57] + "..."
        raise ParameterError(f"--scheduler {shown!r} is not a scheduler address such as tcp://10.0.0.5:8786")
    return text.strip()


def _client(scheduler: str | None, workers: int):
    from distributed import Client, LocalCluster

    if scheduler is not None:  # given, even empty: never fall back to a local cluster silently
        address = _scheduler_address(scheduler)
        try:
            return Client(address, timeout=SCHEDULER_TIMEOUT_S), None
        except (OSError, TimeoutError, ValueError) as err:
            raise ParameterError(
                f"no scheduler answers at {address} (waited {SCHEDULER_TIMEOUT_S} s; {type(err).__name__})"
            ) from err
    if not 1 <= workers <= 256:
        raise ParameterError(f"--workers must be 1-256, got {workers}")
    cluster = LocalCluster(
        n_workers=workers, threads_per_worker=1, processes=True, dashboard_address=":0", silence_logs=40
    )
    return Client(cluster), cluster


def plan(
    scenes: Sequence[str],
    base: AnalysisRequest,
    *,
    vessels_file: str | None = None,
    find: bool = False,
    pfa_per_km2: float = 1e-3,
    land: str | None = None,
    client=None,
) -> tuple[list[BatchTask], list[tuple[str, str]], list[tuple[str, str]]]:
    """The tasks (one per vessel per scene), the scenes that could not be used with the reason, and the listed
    vessels that lie in none of the scenes (name, where)."""
    from ..evidence.gis import read_vessel_positions
    from ..scene.raster import open_scene

    if not vessels_file and not find:
        raise ParameterError("say which vessels: --vessels FILE, --find, or both")
    positions = read_vessel_positions(vessels_file) if vessels_file else []
    tasks: list[BatchTask] = []
    unreadable: list[tuple[str, str]] = []
    usable = []
    placed: set[int] = set()
    for s in scenes:
        try:
            open_scene(s).close()
            usable.append(s)
        except WakemeterError as err:
            unreadable.append((Path(s).name, str(err)))
    found: dict[str, list[dict]] = {}
    if find:
        futures = (
            {} if client is None else {s: client.submit(find_task, s, pfa_per_km2, land, pure=False) for s in usable}
        )
        for s in list(usable):
            try:
                found[s] = find_task(s, pfa_per_km2, land) if client is None else futures[s].result()
            except WakemeterError as err:  # this scene cannot be searched (say, a land layer without georeference)
                unreadable.append((Path(s).name, f"vessels not sought: {err}"))
    for s in usable:
        with open_scene(s) as sc:
            digest = sc.sha256()
            if positions and not sc.info.georeferenced:
                raise ParameterError(
                    f"{Path(s).name} has no georeference: positions in longitude and latitude need one"
                )
            for k, p in enumerate(positions):
                if sc.holds_lonlat(p.lon, p.lat):
                    placed.add(k)
                    req = replace(base, vessel_lonlat=(p.lon, p.lat), vessel_px=None)
                    tasks.append(BatchTask(str(Path(s).resolve()), digest, p.name, req.to_json()))
            for i, c in enumerate(found.get(s, []), 1):
                req = replace(base, vessel_px=tuple(c["px"]), vessel_lonlat=None)
                tasks.append(BatchTask(str(Path(s).resolve()), digest, f"found {i}", req.to_json(), found=c))
    outside = [
        (f"vessel {p.name}", f"lon {p.lon:.6f}, lat {p.lat:.6f} lies in none of the scenes")
        for k, p in enumerate(positions)
        if k not in placed and usable
    ]
    if not tasks:
        raise ParameterError(
            "no vessel lies in the given scenes" + "".join(f"; {n} not used: {w}" for n, w in unreadable)
        )
    return tasks, unreadable, outside


def run(
    tasks: Sequence[BatchTask],
    out: str | Path,
    *,
    client=None,
    progress: Callable[[int, int], None] | None = None,
) -> Summary:
    """Run the tasks not yet done; returns the summary (the table is written by :func:`table`)."""
    from distributed import as_completed

    out = Path(out)
    (out / "results").mkdir(parents=True, exist_ok=True)
    fileio.clean_stale(out / "results")
    t0 = time.perf_counter()
    todo = [t for t in tasks if not done(out, t)]
    skipped = len(tasks) - len(todo)
    n_done = n_failed = 0
    failures: list[tuple[str, str]] = []
    names = {t.key: f"{Path(t.scene_path).name}: {t.vessel_name}" for t in todo}
    if todo:
        assert client is not None
        futures = [client.submit(run_task, t, str(out), key=f"wakemeter-{t.key}", pure=False) for t in todo]
        for i, fut in enumerate(as_completed(futures), 1):
            try:
                r = fut.result()
            except Exception as err:  # noqa: BLE001 - a task lost for good (its worker died too often)
                r = {"key": "", "status": "failed", "reason": f"the task was lost: {err!r}"}
            if r["status"] == "done":
                n_done += 1
            else:
                n_failed += 1
                failures.append((names.get(r["key"], "?"), r.get("reason") or "unknown"))
            if progress is not None:
                progress(i, len(todo))
    return Summary(len(tasks), skipped, n_done, n_failed, time.perf_counter() - t0, tuple(failures))


COLUMNS = (
    "scene",
    "vessel",
    "status",
    "lon",
    "lat",
    "col",
    "row",
    *RESULT_ROW_FIELDS,
    "reason",
    "report_verdict",
    "report_id",
    "report_text",
    "found_length_m",
    "found_width_m",
    "found_score",
    "found_false_alarm_per_pixel",
    "found_merged",
    "same_vessel_rows",
    "key",
)


def stored_result(rec: dict) -> tuple[WakeAnalysis | None, str | None]:
    """A task record's result read back (None when it has none) and, when it cannot be read, why."""
    j = rec.get("result")
    if not j:
        return None, None
    try:
        return WakeAnalysis.from_json(j), None
    except ParameterError as err:
        return None, f"the stored result cannot be read: {err}"


def rows(tasks: Sequence[BatchTask], out: Path) -> list[dict]:
    """One row per vessel: a row of the finder whose result is the same vessel as another's
    (``detect.same_vessel``) is folded into that row, whose ``same_vessel_rows`` names it."""
    return _fold_repeats(tasks, *_task_rows(tasks, out))


def _task_rows(tasks: Sequence[BatchTask], out: Path) -> tuple[list[dict], list[WakeAnalysis | None]]:
    """One row per task, and its result."""
    out_rows = []
    analysed: list[WakeAnalysis | None] = []
    for t in tasks:
        try:
            rec = json.loads(result_path(out, t).read_text())
        except (OSError, ValueError):
            rec = {"status": "not run"}
        a, problem = stored_result(rec)
        analysed.append(a)
        ll = (a and a.vessel_lonlat) or (None, None)
        px = (None, None) if a is None else a.vessel_px
        out_rows.append(
            {
                "scene": Path(t.scene_path).name,
                "vessel": t.vessel_name,
                "status": rec.get("status"),
                "lon": ll[0],
                "lat": ll[1],
                "col": px[0],
                "row": px[1],
                **result_row(a),
                "reason": rec.get("reason") or problem or (None if a is None or a.wake_found else a.decision),
                "report_verdict": None,
                "report_id": None,
                "report_text": None,
                "found_length_m": None if t.found is None else t.found.get("length_m"),
                "found_width_m": None if t.found is None else t.found.get("width_m"),
                "found_score": None if t.found is None else t.found.get("score"),
                "found_false_alarm_per_pixel": None if t.found is None else t.found.get("pfa"),
                "found_merged": None if t.found is None else t.found.get("merged"),
                "same_vessel_rows": None,
                "key": t.key,
            }
        )
    return out_rows, analysed


def _fold_repeats(tasks: Sequence[BatchTask], rs: list[dict], analysed: list[WakeAnalysis | None]) -> list[dict]:
    from ..detect.same_vessel import same_as

    by_scene: dict[str, list[int]] = {}
    for i, t in enumerate(tasks):
        by_scene.setdefault(t.scene_path, []).append(i)
    folded: set[int] = set()
    for idx in by_scene.values():
        repeats = same_as([(tasks[i].vessel_name, analysed[i], tasks[i].found is not None) for i in idx])
        for j, k in repeats.items():
            keep, drop = rs[idx[k]], idx[j]
            keep["same_vessel_rows"] = "; ".join(filter(None, (keep["same_vessel_rows"], rs[drop]["vessel"])))
            folded.add(drop)
    return [r for i, r in enumerate(rs) if i not in folded]


def compare_reports(
    tasks: Sequence[BatchTask], out: Path, reports: Sequence, rs: list[dict], *, gate_m: float
) -> dict[str, dict]:
    """Fill the report columns: each scene's vessels matched one to one with the reports at its time.
    Returns each compared vessel's comparison (JSON) by task key."""
    from ..positions.match import compare_results, scene_time
    from ..scene.raster import open_scene

    found: dict[str, dict] = {}
    by_scene: dict[str, list[int]] = {}
    for i, t in enumerate(tasks):
        by_scene.setdefault(t.scene_path, []).append(i)
    for path, idx in by_scene.items():
        with open_scene(path) as sc:
            acquired = sc.info.acquisition_time
        named, placed = [], []
        for i in idx:
            try:
                rec = json.loads(result_path(out, tasks[i]).read_text())
            except (OSError, ValueError):
                rec = {}
            a, _problem = stored_result(rec)
            if a is not None:
                named.append((tasks[i].vessel_name, a))
                placed.append(i)
        try:
            comps, _unmatched = compare_results(named, reports, scene_time(acquired, None), gate_m=gate_m)
        except WakemeterError as err:
            for i in idx:
                rs[i]["report_text"] = f"not compared: {err}"
            continue
        for i, c in zip(placed, comps, strict=True):
            if c is not None:
                rs[i].update(
                    report_verdict=c.verdict, report_id=c.reported and c.reported.vessel_id, report_text=c.text
                )
                found[tasks[i].key] = c.to_json()
    return found


@dataclass(frozen=True)
class TableFiles:
    csv: Path
    gpkg: Path | None  #: None when no vessel has a longitude and latitude
    comparisons: dict[str, dict]  #: each compared vessel's comparison with the position reports, by task key


def table(tasks: Sequence[BatchTask], out: str | Path, *, reports: Sequence = (), gate_m: float = 500.0) -> TableFiles:
    """``results.csv`` and, when any vessel has a longitude and latitude, ``results.gpkg``; with position
    reports, each vessel's verdict against them."""
    import io

    import shapely

    from ..evidence.gis import Feature, write_features

    out = Path(out)
    rs, analysed = _task_rows(tasks, out)
    comparisons = compare_reports(tasks, out, reports, rs, gate_m=gate_m) if reports else {}
    rs = _fold_repeats(tasks, rs, analysed)
    buf = io.StringIO()
    w = csv.DictWriter(buf, fieldnames=COLUMNS)
    w.writeheader()
    for r in rs:
        w.writerow({k: ("" if v is None else (f"{v:.6g}" if isinstance(v, float) else v)) for k, v in r.items()})
    csv_path = fileio.atomic_write_bytes(out / "results.csv", buf.getvalue().encode())
    feats = [
        Feature("vessels", shapely.Point(r["lon"], r["lat"]), {k: r[k] for k in COLUMNS if k not in ("lon", "lat")})
        for r in rs
        if r["lon"] is not None
    ]
    gpkg = None
    if feats:
        try:
            gpkg = write_features(out / "results.gpkg", feats, force=True)
        except WakemeterError:
            gpkg = None
    return TableFiles(csv_path, gpkg, comparisons)


@dataclass(frozen=True)
class EvidenceSummary:
    written: int
    kept: int
    failed: tuple[tuple[str, str], ...]  #: (set name, reason)

    def text(self) -> str:
        lines = [
            f"evidence: {self.written} set(s) written, {self.kept} already there (kept), {len(self.failed)} failed"
        ]
        lines += [f"  evidence failed: {n}: {r}" for n, r in self.failed]
        return "\n".join(lines)


def evidence(
    tasks: Sequence[BatchTask],
    out: str | Path,
    *,
    client,
    analyst: str | None = None,
    case_reference: str | None = None,
    paper: str | None = None,
    comparisons: dict[str, dict] | None = None,
    progress: Callable[[int, int], None] | None = None,
) -> EvidenceSummary:
    """One evidence set per analysed vessel in ``<out>/evidence/`` (one task each); sets already there are kept."""
    from distributed import as_completed

    out = Path(out)
    todo = [t for t in tasks if done(out, t)]
    comparisons = comparisons or {}
    futures = [
        client.submit(
            evidence_task,
            t,
            str(out),
            analyst=analyst,
            case_reference=case_reference,
            paper=paper,
            position_report=comparisons.get(t.key),
            key=f"wakemeter-evidence-{t.key}",
            pure=False,
        )
        for t in todo
    ]
    counts = {"written": 0, "kept": 0}
    failed: list[tuple[str, str]] = []
    for i, fut in enumerate(as_completed(futures), 1):
        try:
            r = fut.result()
        except Exception as err:  # noqa: BLE001 - a task lost for good
            r = {"name": "?", "status": "failed", "reason": f"the task was lost: {err!r}"}
        if r["status"] == "failed":
            failed.append((r["name"], r["reason"] or "unknown"))
        else:
            counts[r["status"]] += 1
        if progress is not None:
            progress(i, len(todo))
    return EvidenceSummary(counts["written"], counts["kept"], tuple(failed))
