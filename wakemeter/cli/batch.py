"""``wakemeter batch``: every vessel of every scene, one task each on dask.distributed, resumable."""

from __future__ import annotations

import argparse
import sys
from collections.abc import Callable

from .base import CAUTION_LINE, Command
from .options import add_request_options, request_from_args


def add_arguments(p: argparse.ArgumentParser) -> None:
    p.add_argument("scenes", nargs="+", metavar="SCENE", help="raster files")
    p.add_argument("--out", required=True, metavar="FOLDER", help="results: results.csv, results.gpkg, results/")
    p.add_argument("--vessels", metavar="FILE", help="vessel positions: CSV (lon, lat, name), GeoJSON or GeoPackage")
    p.add_argument("--find", action="store_true", help="find the vessels of each scene with the vessel finder")
    p.add_argument("--pfa", type=float, default=1e-3, metavar="PER_KM2", help="finder's false-alarm rate per km²")
    p.add_argument("--scheduler", metavar="ADDRESS", help="an existing dask scheduler (default: a local cluster)")
    p.add_argument("--workers", type=int, default=2, metavar="N", help="local worker processes (default 2)")
    p.add_argument("--reports", metavar="FILE", help="vessel position reports (CSV or NMEA) to compare with")
    p.add_argument("--report-columns", metavar="FIELD=NAME,...", help="CSV column names when they are not the usual")
    p.add_argument("--match-distance", type=float, default=500.0, metavar="M", help="farthest report to match (m)")
    add_request_options(p, position=False)


def run(args: argparse.Namespace) -> int:
    from pathlib import Path

    from ..batch.run import _client, plan, table
    from ..batch.run import run as run_batch

    out = Path(args.out)
    if out.exists() and not out.is_dir():
        from ..errors import ParameterError

        raise ParameterError(f"--out must be a folder, {out} is a file")
    out.mkdir(parents=True, exist_ok=True)
    args.vessel = "0,0"  # the base request: every task puts its own vessel position in
    base = request_from_args(args)
    reports: list = []
    if args.reports:  # read before the cluster starts: a bad file is said at once
        from ..positions.reports import parse_columns, read_reports

        reports = read_reports(args.reports, parse_columns(args.report_columns))
    client, cluster = _client(args.scheduler, args.workers)
    try:
        tasks, unreadable = plan(
            args.scenes, base, vessels_file=args.vessels, find=args.find, pfa_per_km2=args.pfa, client=client
        )
        for name, why in unreadable:
            print(f"scene not used: {name}: {why}", file=sys.stderr)
        print(
            f"{len(tasks)} vessel(s) in {len(args.scenes)} scene(s); workers: {len(client.scheduler_info()['workers'])}"
        )
        bar = _bar(len(tasks))
        summary = run_batch(tasks, out, client=client, progress=bar)
        if hasattr(bar, "close"):
            bar.close()
    finally:
        client.close()
        if cluster is not None:
            cluster.close()
    csv_path, gpkg = table(tasks, out, reports=reports, gate_m=args.match_distance)
    print(summary.text())
    print(f"wrote {csv_path}" + (f" and {gpkg}" if gpkg else ""))
    print(CAUTION_LINE)
    return 0 if summary.failed == 0 and not unreadable else 1


def _bar(total: int) -> Callable[[int, int], None]:
    """A progress bar on the terminal (tqdm), or nothing when output is not a terminal."""
    try:
        from tqdm import tqdm
    except ImportError:
        return lambda i, n: None
    bar = tqdm(total=total, unit="vessel", file=sys.stderr, disable=not sys.stderr.isatty())

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
