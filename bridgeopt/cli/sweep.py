"""``bridgeopt sweep``: every case of a sweep file, with a progress bar."""

from __future__ import annotations

import sys
import time
from pathlib import Path

from bridgeopt import __version__
from bridgeopt.cautions import CAUTIONS
from bridgeopt.cli.common import EXIT_INPUT, EXIT_INTERNAL, EXIT_OK, EXIT_SOLVE, say_error
from bridgeopt.errors import InputError

__all__ = ["SweepProgress", "add_sweep"]

class SweepProgress:
    """A progress bar on stderr (one line, redrawn on a terminal; a line per 5 % otherwise).

    Called as ``progress(done, total, case, row)`` by
    :func:`~bridgeopt.sweep.run.run_sweep` after each finished case.

    Parameters
    ----------
    stream : file, optional
        Where the bar is written (default ``sys.stderr``).
    """

    WIDTH = 30

    def __init__(self, stream=None) -> None:
        self.stream = stream or sys.stderr
        self.tty = hasattr(self.stream, "isatty") and self.stream.isatty()
        self.t0 = time.perf_counter()
        self.start_done: int | None = None
        self.failed = 0
        self.last_step = -1

    def __call__(self, done: int, total: int, case, row: dict) -> None:
        if self.start_done is None:
            self.start_done = done - 1
        if row.get("status") != "ok":
            self.failed += 1
        elapsed = time.perf_counter() - self.t0
        ran = done - self.start_done
        rate = 60.0 * ran / elapsed if elapsed > 0 else 0.0
        left = (total - done) * elapsed / ran if ran else 0.0
        fill = int(self.WIDTH * done / total) if total else self.WIDTH
        text = (f"[{'#' * fill}{'.' * (self.WIDTH - fill)}] {done}/{total} cases, "
                f"{self.failed} failed, {rate:.1f} cases/min, {left / 60:.1f} min left")
        if self.tty:
            print("\r" + text, end="\n" if done == total else "", file=self.stream, flush=True)
        else:
            step = int(20 * done / total) if total else 20
            if step != self.last_step or done == total:
                self.last_step = step
                print(text, file=self.stream, flush=True)


def run_sweep_command(args) -> int:
    from bridgeopt.sweep import load_sweep, run_sweep

    sweep = load_sweep(args.file)
    if args.jobs is not None and args.jobs < 1:
        raise InputError("--jobs", args.jobs, "a whole number >= 1 (worker processes)")
    out = Path(args.output)
    if out.exists() and not out.is_dir():
        raise InputError("--output", str(out), "a folder (created if missing), not a file")
    print(f"bridgeopt {__version__}: sweep {sweep.name}: {len(sweep)} cases"
          + (f" over {', '.join(sweep.varied)}" if sweep.varied else ""))
    print(f"  source: {sweep.source}")
    where = f"Dask scheduler {args.scheduler}" if args.scheduler else "local processes"
    outcome = run_sweep(sweep, out, jobs=args.jobs, scheduler=args.scheduler,
                        retry_failed=args.retry_failed, progress=SweepProgress())
    if outcome.skipped:
        print(f"  {outcome.skipped} case(s) already finished in {out}: not run again")
    if outcome.workers:
        print(f"  ran {len(outcome.ran)} case(s) on {where} ({outcome.workers} worker slot(s)) "
              f"in {outcome.seconds:.1f} s ({outcome.cases_per_minute:.1f} cases per minute)")
    elif outcome.ran:
        print(f"  {len(outcome.ran)} case(s) checked and recorded as bad before any solve")
    else:
        print("  nothing left to run")
    missing = outcome.total - sum(outcome.statuses.values())
    print(f"  {outcome.statuses.get('ok', 0)} ok, {outcome.failed} failed (see the status and "
          "error columns)" + (f", {missing} not run yet" if missing else ""))
    print(f"  results: {out / 'results.csv'}, {out / 'results.parquet'} (columns in "
          f"{out / 'README.txt'})")
    print(CAUTIONS)
    if outcome.interrupted:
        say_error(f"interrupted: {outcome.total - outcome.skipped - len(outcome.ran)} case(s) "
                   "not run; run the same command again to finish them")
        return 130
    broken = outcome.statuses.get("error", 0)
    if broken and outcome.failed != outcome.total:
        say_error(f"{broken} case(s) ended with status 'error' (an internal error, or the case "
                  "stopped its worker: killed or out of memory); see the error column")
        return EXIT_INTERNAL
    if outcome.total and outcome.failed == outcome.total:
        say_error(f"every case failed; the first: {outcome.first_error}")
        return EXIT_INPUT if set(outcome.statuses) == {"input-error"} else EXIT_SOLVE
    return EXIT_OK


def add_sweep(sub) -> None:
    """Add the ``sweep`` command (a sweep file solved case by case, resumable).

    Parameters
    ----------
    sub : argparse subparsers
        What ``add_subparsers()`` returned in :func:`~bridgeopt.cli.app.build_parser`.
    """
    p = sub.add_parser("sweep", help="solve every combination of a sweep file",
                       description="Solve every case of a sweep file (a scenario file in which "
                                   "any value may be a list; see docs/formats.md) and write one "
                                   "row per case to DIR/results.csv and DIR/results.parquet. "
                                   "Finished cases are kept: running the same command again "
                                   "solves only the missing ones.")
    p.add_argument("file", metavar="SWEEP.toml", help="sweep file")
    p.add_argument("-o", "--output", metavar="DIR", required=True,
                   help="output folder (created if missing; re-used to resume)")
    p.add_argument("--jobs", type=int, metavar="N",
                   help="local worker processes (default: one per CPU)")
    p.add_argument("--scheduler", metavar="ADDRESS",
                   help="run on a Dask distributed cluster (e.g. tcp://host:8786) instead of "
                        "local processes; needs the 'cluster' extra")
    p.add_argument("--retry-failed", action="store_true",
                   help="also run again the cases that failed in an earlier run")
    p.set_defaults(func=run_sweep_command)
