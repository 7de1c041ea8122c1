"""Running a sweep: local worker processes, or a Dask distributed cluster.

Cases run in parallel, at most one per worker slot at a time (so a killed run
loses only the cases in flight).  Cases that share a reference optimum (a bridge's
forms and its reference, see :func:`~bridgeopt.sweep.cases.reference_group`)
share one reference solve: the reference case (or, when it is not in the sweep
or already finished, a reference solve of its own) runs first and its design is
sent to the form cases of its group.
"""

from __future__ import annotations

import logging
import os
import re
import signal
import threading
import time
from collections import deque
from concurrent.futures import FIRST_COMPLETED, ProcessPoolExecutor, wait
from concurrent.futures.process import BrokenProcessPool
from dataclasses import dataclass, field
from pathlib import Path
from typing import Callable

from bridgeopt.errors import InputError, SolveError
from bridgeopt.files.scenario import parse_scenario
from bridgeopt.sweep.cases import error_row, reference_group, solve_case, solve_reference
from bridgeopt.sweep.expand import Case, Sweep
from bridgeopt.sweep.store import Journal, write_tables

__all__ = ["SweepOutcome", "run_sweep"]

log = logging.getLogger(__name__)

#: How long to try to reach a Dask scheduler. [s]
CONNECT_TIMEOUT = 30.0
#: Least time between rewrites of the result tables while a sweep runs. [s]
TABLE_INTERVAL = 2.0
#: How often a worker checks that the sweep that started it is still running. [s]
PARENT_CHECK = 0.5
#: How long a stopped sweep waits for a worker to end before killing it. [s]
WORKER_GRACE = 2.0
#: Dask scheduler addresses: ``protocol://host[:port]`` or ``host:port``.
SCHEDULER_ADDRESS = re.compile(r"^((tcp|tls|ucx|ws|wss|inproc)://[\w.\-\[\]:/]+|[\w.\-]+:\d{1,5})$")


@dataclass
class SweepOutcome:
    """What one run of a sweep did.

    Parameters
    ----------
    total : int
        Cases in the sweep. [-]
    skipped : int
        Cases already finished by an earlier run (not run again). [-]
    ran : list of str
        Keys of the cases finished in this run, in the order they finished.
    failed : int
        Cases of the sweep whose row is not ``ok`` (this run and earlier ones). [-]
    seconds : float
        Wall time of this run. [s]
    folder : Path
        The sweep's output folder.
    workers : int
        Worker slots used (processes, or Dask worker threads). [-]
    interrupted : bool
        Whether the run was stopped (Ctrl-C) before every case finished.
    statuses : dict
        Cases of the sweep per row status (``ok``, ``input-error`` ...).
    first_error : str
        The error of the first bad case in case order ("" when none).
    """

    total: int
    skipped: int
    ran: list = field(default_factory=list)
    failed: int = 0
    seconds: float = 0.0
    folder: Path = Path(".")
    workers: int = 0
    interrupted: bool = False
    statuses: dict = field(default_factory=dict)
    first_error: str = ""

    @property
    def cases_per_minute(self) -> float:
        """Cases finished in this run per minute of wall time. [1/min]"""
        return 60.0 * len(self.ran) / self.seconds if self.seconds > 0 else 0.0


class _Stopped(KeyboardInterrupt):
    """The sweep was asked to stop (SIGTERM): handled like Ctrl-C."""


def _stop_on_term(signum, frame) -> None:
    raise _Stopped()


def _watch_parent(parent: int) -> None:
    """End this worker when the sweep that started it is gone (killed with SIGKILL)."""
    while True:
        if os.getppid() != parent:
            os._exit(1)
        time.sleep(PARENT_CHECK)


def _start_worker(parent: int) -> None:
    """Set up a worker: Ctrl-C is the parent's to handle, and the worker never outlives it."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    signal.signal(signal.SIGTERM, signal.SIG_DFL)
    threading.Thread(target=_watch_parent, args=(parent,), daemon=True).start()


class _LocalPool:
    """Worker processes on this machine (concurrent.futures)."""

    def __init__(self, jobs: int) -> None:
        self.slots = jobs
        self._pool = self._start()

    def _start(self) -> ProcessPoolExecutor:
        return ProcessPoolExecutor(max_workers=self.slots, initializer=_start_worker,
                                   initargs=(os.getpid(),))

    def submit(self, fn, *args):
        try:
            return self._pool.submit(fn, *args)
        except BrokenProcessPool:  # a worker died earlier: start afresh
            self._end_workers()
            self._pool = self._start()
            return self._pool.submit(fn, *args)

    def _end_workers(self) -> None:
        """Cancel what has not started, then end the workers (terminate, then kill)."""
        # the executor keeps its processes in ``_processes``; it offers no public way to
        # stop a running case, and a stopped sweep must not leave workers behind
        procs = list((getattr(self._pool, "_processes", None) or {}).values())
        self._pool.shutdown(wait=False, cancel_futures=True)
        for proc in procs:
            if proc.is_alive():
                proc.terminate()
        for proc in procs:
            proc.join(WORKER_GRACE)
            if proc.is_alive():
                proc.kill()
                proc.join(WORKER_GRACE)

    @staticmethod
    def wait(futures):
        return wait(futures, return_when=FIRST_COMPLETED)[0]

    def close(self, *, cancel: bool = False) -> None:
        if cancel:
            self._end_workers()
        self._pool.shutdown(wait=True)


class _DaskPool:
    """Worker threads of a Dask distributed cluster (imported only when asked for)."""

    def __init__(self, address: str) -> None:
        check_scheduler(address)
        try:
            import distributed
        except ImportError:
            raise InputError("--scheduler", address, "used with Dask installed: pip install "
                             "'bridgeopt[cluster]'") from None
        self._wait = distributed.wait
        try:
            self._client = distributed.Client(address, timeout=CONNECT_TIMEOUT,
                                              set_as_default=False)
        except (OSError, TimeoutError, ValueError) as err:
            raise InputError("--scheduler", address, "the address of a running Dask scheduler, "
                             f"e.g. tcp://host:8786 ({type(err).__name__}: {err})") from None
        self.slots = max(1, sum(self._client.nthreads().values()))

    def submit(self, fn, *args):
        return self._client.submit(fn, *args, pure=False)

    def wait(self, futures):
        with self._client.as_current():
            return set(self._wait(list(futures), return_when="FIRST_COMPLETED").done)

    def close(self, *, cancel: bool = False) -> None:
        self._client.close()


def check_scheduler(address: str) -> str:
    """Check the form of a Dask scheduler address before anything is connected or written.

    Parameters
    ----------
    address : str
        ``tcp://host:port`` (or another Dask protocol), or ``host:port``.

    Raises
    ------
    InputError
        Naming ``--scheduler`` when the address is not of that form.
    """
    if not isinstance(address, str) or not SCHEDULER_ADDRESS.match(address.strip()):
        raise InputError("--scheduler", address, "the address of a running Dask scheduler, "
                         "protocol://host:port or host:port, e.g. tcp://127.0.0.1:8786")
    return address.strip()


def _plan(cases: list[Case], journal: Journal, outcome: SweepOutcome, progress, total, done):
    """Check each case and group them by the reference they share; bad cases are recorded."""
    groups: dict = {}
    alone: list[Case] = []
    for case in cases:
        try:
            scenario = parse_scenario(case.data)
            key, provides = reference_group(scenario)
        except Exception as err:  # a bad case is recorded, never raised
            if isinstance(err, InputError):
                row = error_row("input-error", str(err))
            elif isinstance(err, SolveError):
                row = error_row("solve-failed", f"{err.status}: {err.message}")
            else:
                row = error_row("error", f"{type(err).__name__}: {err}")
            journal.append(case.key, row)
            outcome.ran.append(case.key)
            done[0] += 1
            if progress:
                progress(done[0], total, case, row)
            continue
        if key is None:
            alone.append(case)
            continue
        group = groups.setdefault(key, {"provider": None, "waiting": [], "sample": case})
        if provides and group["provider"] is None:
            group["provider"] = case
        else:
            group["waiting"].append(case)
    return groups, alone


def run_sweep(sweep: Sweep, folder: str | os.PathLike, *, jobs: int | None = None,
              scheduler: str | None = None, retry_failed: bool = False,
              progress: Callable | None = None) -> SweepOutcome:
    """Run every case of ``sweep`` not yet finished in ``folder``; write the result tables.

    Parameters
    ----------
    sweep : Sweep
        From :func:`~bridgeopt.sweep.load_sweep` or :func:`~bridgeopt.sweep.expand_sweep`.
    folder : path
        Output folder: ``journal.jsonl``, ``results.csv``, ``results.parquet``,
        ``README.txt``.  Cases already in its journal are not run again.
    jobs : int, optional
        Local worker processes (default: the number of CPUs). [-]
    scheduler : str, optional
        Address of a Dask distributed scheduler (``tcp://host:8786``): run the
        cases on that cluster instead of local processes.
    retry_failed : bool
        Run again the cases whose earlier row is not ``ok``.
    progress : callable, optional
        ``progress(done, total, case, row)`` after each finished case (``done``
        counts earlier runs' cases too).

    Returns
    -------
    SweepOutcome
    """
    t0 = time.perf_counter()
    if scheduler is not None:
        scheduler = check_scheduler(scheduler)  # before the output folder is made
    journal = Journal(folder, lock=True)
    finished = journal.finished(failed_too=not retry_failed)
    todo = [c for c in sweep.cases if c.key not in finished]
    outcome = SweepOutcome(total=len(sweep), skipped=len(sweep) - len(todo),
                           folder=Path(folder))
    if journal.rejected:
        log.warning("%d line(s) of %s could not be trusted (not a finished case's row); "
                    "their cases run again", journal.rejected, journal.path)
    done = [outcome.skipped]
    pool = None
    main_thread = threading.current_thread() is threading.main_thread()
    if main_thread:
        old_int = signal.getsignal(signal.SIGINT)
        old_term = signal.signal(signal.SIGTERM, _stop_on_term)
    try:
        groups, alone = _plan(todo, journal, outcome, progress, len(sweep), done)
        ready: deque = deque()
        for gkey, group in groups.items():
            if group["provider"] is not None:
                ready.append(("case", group["provider"], gkey, None))
            elif group["waiting"]:
                ready.append(("reference", group["sample"], gkey, None))
        ready.extend(("case", c, None, None) for c in alone)
        if ready:
            if scheduler:
                pool = _DaskPool(scheduler)
            else:
                pool = _LocalPool(max(1, jobs or os.cpu_count() or 1))
            outcome.workers = pool.slots
        pending: dict = {}
        # cases in flight when a worker died: each runs again alone, so that only the case
        # that really stops its worker is recorded as failed
        suspects: deque = deque()
        alone_run = False
        last_write = time.monotonic()
        while ready or pending or suspects:
            if suspects and not pending:
                task = suspects.popleft()
                pending[_submit(pool, task)] = task
                alone_run = True
            while not suspects and ready and len(pending) < pool.slots:
                task = ready.popleft()
                pending[_submit(pool, task)] = task
                alone_run = False
            for future in pool.wait(pending):
                task = pending.pop(future)
                kind, case, gkey, _ = task
                try:
                    result = future.result()
                except BrokenProcessPool as err:
                    if not alone_run:
                        suspects.append(task)
                        continue
                    result = _worker_stopped(kind, err)
                except Exception as err:  # the worker itself failed (killed, out of memory)
                    result = _worker_stopped(kind, err)
                if kind == "case":
                    row, design = result
                    journal.append(case.key, row)
                    outcome.ran.append(case.key)
                    done[0] += 1
                    if progress:
                        progress(done[0], len(sweep), case, row)
                else:
                    design, error = result
                    if error:
                        log.warning("the shared reference could not be solved (%s); each form "
                                    "solves its own", error)
                if gkey is not None and (kind == "reference" or case is groups[gkey]["provider"]):
                    # release the group's forms, first in line, with the reference design
                    for c in reversed(groups[gkey]["waiting"]):
                        ready.appendleft(("case", c, None, design))
                    groups[gkey]["waiting"] = []
                if time.monotonic() - last_write > TABLE_INTERVAL:
                    write_tables(sweep, journal)
                    last_write = time.monotonic()
    except KeyboardInterrupt:  # Ctrl-C, or SIGTERM (_Stopped)
        outcome.interrupted = True
        if main_thread:  # a second Ctrl-C must not cut the clean-up short
            signal.signal(signal.SIGINT, signal.SIG_IGN)
            signal.signal(signal.SIGTERM, signal.SIG_IGN)
        if pool is not None:
            pool.close(cancel=True)
            pool = None
    finally:
        try:
            if pool is not None:
                pool.close()
            journal.close()
            write_tables(sweep, journal)
        finally:
            if main_thread:
                signal.signal(signal.SIGTERM, old_term if old_term is not None else signal.SIG_DFL)
                signal.signal(signal.SIGINT, old_int if old_int is not None
                              else signal.default_int_handler)
        outcome.seconds = time.perf_counter() - t0
        rows = [journal.rows[c.key] for c in sweep.cases if c.key in journal.rows]
        for row in rows:
            status = row.get("status", "error")
            outcome.statuses[status] = outcome.statuses.get(status, 0) + 1
            if status != "ok" and not outcome.first_error:
                outcome.first_error = row.get("error", "")
        outcome.failed = sum(n for k, n in outcome.statuses.items() if k != "ok")
    return outcome


def _submit(pool, task):
    kind, case, _, reference = task
    if kind == "case":
        return pool.submit(solve_case, case.data, reference)
    return pool.submit(solve_reference, case.data)


def _worker_stopped(kind: str, err: BaseException):
    """The result of a task whose worker stopped (killed, out of memory)."""
    text = f"the worker stopped while solving this case: {type(err).__name__}: {err}"
    return (error_row("error", text), None) if kind == "case" else (None, text)
