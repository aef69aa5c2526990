"""``wakemeter batch``: every vessel of every scene, one task each on dask.distributed, resumable."""

from __future__ import annotations

import argparse
import sys
from collections.abc import Callable

from .base import CAUTION_LINE, Command
from .options import add_request_options, request_from_args

#: the most local worker processes (each holds a scene chip and its analysis in memory)
MAX_WORKERS = 64


def add_arguments(p: argparse.ArgumentParser) -> None:
    p.add_argument("scenes", nargs="+", metavar="SCENE", help="raster files")
    p.add_argument("--out", required=True, metavar="FOLDER", help="results: results.csv, results.gpkg, results/")
    p.add_argument("--vessels", metavar="FILE", help="vessel positions: CSV (lon, lat, name), GeoJSON or GeoPackage")
    p.add_argument("--find", action="store_true", help="find the vessels of each scene with the vessel finder")
    p.add_argument("--pfa", type=float, default=1e-3, metavar="PER_KM2", help="finder's false-alarm rate per km²")
    p.add_argument(
        "--land",
        metavar="FILE",
        help="with --find: land polygons (GeoPackage, GeoJSON or shapefile) where no vessel is sought",
    )
    p.add_argument("--scheduler", metavar="ADDRESS", help="an existing dask scheduler (default: a local cluster)")
    p.add_argument("--workers", type=int, default=2, metavar="N", help="local worker processes (default 2)")
    p.add_argument("--reports", metavar="FILE", help="vessel position reports (CSV or NMEA) to compare with")
    p.add_argument("--report-columns", metavar="FIELD=NAME,...", help="CSV column names when they are not the usual")
    p.add_argument("--match-distance", type=float, default=500.0, metavar="M", help="farthest report to match (m)")
    p.add_argument(
        "--evidence",
        action="store_true",
        help="also write each analysed vessel's evidence set (PDF, JSON, PNG, SHA256SUMS) in FOLDER/evidence/",
    )
    p.add_argument("--analyst", help="with --evidence: analyst name to record in the reports")
    p.add_argument("--case", metavar="REFERENCE", help="with --evidence: case reference to print on every page")
    p.add_argument("--paper", choices=["A4", "Letter"], help="with --evidence: page size (default: by locale)")
    add_request_options(p, position=False)


def run(args: argparse.Namespace) -> int:
    from pathlib import Path

    from ..batch.run import _client, evidence, plan, table
    from ..batch.run import run as run_batch
    from ..errors import ParameterError

    out = Path(args.out)
    if out.exists() and not out.is_dir():
        raise ParameterError(f"--out must be a folder, {out} is a file")
    for opt in ("analyst", "case", "paper"):
        if getattr(args, opt) and not args.evidence:
            raise ParameterError(f"--{opt} is for the evidence sets: give --evidence too")
    args.vessel = "0,0"  # the base request: every task puts its own vessel position in
    base = request_from_args(args)
    reports: list = []
    if args.reports:  # read before the cluster starts: a bad file is said at once
        from ..positions.reports import parse_columns, read_reports

        reports = read_reports(args.reports, parse_columns(args.report_columns))
    if not 1 <= args.workers <= MAX_WORKERS:
        raise ParameterError(f"--workers must be a number of processes from 1 to {MAX_WORKERS}, got {args.workers}")
    if args.land and not args.find:
        raise ParameterError("--land is for the vessel finder: give --find too")
    if args.land and not Path(args.land).exists():
        raise ParameterError(f"--land: {args.land}: no such file")
    if not (0.0 < args.pfa <= 10.0):  # also NaN
        raise ParameterError(f"--pfa must be a false-alarm rate per km² above 0 and at most 10, got {args.pfa}")
    client, cluster = _client(args.scheduler, args.workers)
    out.mkdir(parents=True, exist_ok=True)
    try:
        tasks, unreadable, outside = plan(
            args.scenes,
            base,
            vessels_file=args.vessels,
            find=args.find,
            pfa_per_km2=args.pfa,
            land=args.land,
            client=client,
        )
        for name, why in unreadable + outside:  # only a scene not read makes the run incomplete (exit 1)
            print(f"not used: {name}: {why}", file=sys.stderr)
        print(
            f"{len(tasks)} vessel(s) in {len(args.scenes)} scene(s); workers: {len(client.scheduler_info()['workers'])}"
        )
        bar = _bar(len(tasks))
        summary = run_batch(tasks, out, client=client, progress=bar)
        if hasattr(bar, "close"):
            bar.close()
        files = table(tasks, out, reports=reports, gate_m=args.match_distance)
        made = None
        if args.evidence:
            bar = _bar(summary.done + summary.skipped, unit="set")
            made = evidence(
                tasks,
                out,
                client=client,
                analyst=args.analyst,
                case_reference=args.case,
                paper=args.paper,
                comparisons=files.comparisons,
                progress=bar,
            )
            if hasattr(bar, "close"):
                bar.close()
    finally:
        client.close()
        if cluster is not None:
            cluster.close()
    print(summary.text())
    print(f"wrote {files.csv}" + (f" and {files.gpkg}" if files.gpkg else ""))
    if made is not None:
        print(made.text() + f" in {out / 'evidence'}")
    print(CAUTION_LINE)
    return 0 if summary.failed == 0 and not unreadable and (made is None or not made.failed) else 1


def _bar(total: int, unit: str = "vessel") -> Callable[[int, int], None]:
    """A progress bar on the terminal (tqdm), or nothing when output is not a terminal."""
    try:
        from tqdm import tqdm
    except ImportError:
        return lambda i, n: None
    bar = tqdm(total=total, unit=unit, file=sys.stderr, disable=not sys.stderr.isatty())

    class _Bar:
        def __call__(self, i: int, n: int) -> None:
            bar.update(1)

        def close(self) -> None:
            bar.close()

    return _Bar()


COMMAND = Command(
    "batch",
    "Analyse every vessel of many scenes (listed or found) on a dask cluster; results in one table; resumable.",
    add_arguments,
    run,
)
