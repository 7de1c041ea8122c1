"""Where a sweep's results live: a journal, and the tables rewritten from it.

``DIR/journal.jsonl`` gets one JSON line per finished case, flushed and
fsync'ed as soon as the case finishes, so a killed run loses only the cases in
flight; a half-written last line (the run killed while writing) is ignored on
reading.  ``DIR/results.csv`` and ``DIR/results.parquet`` are rewritten from the
journal atomically (a temporary file, then a rename), one row per case of the
sweep in case order, and ``DIR/README.txt`` describes the columns and carries
the cautions.
"""

from __future__ import annotations

import json
import math
import os
import signal
import threading
from contextlib import contextmanager
from pathlib import Path
from typing import Any

from bridgeopt.cautions import CAUTION_LINES, CAUTIONS
from bridgeopt.errors import InputError
from bridgeopt.files.io import atomic_write
from bridgeopt.sweep.cases import RESULT_COLUMNS, STATUSES
from bridgeopt.sweep.expand import Sweep

__all__ = ["Journal", "write_tables", "results_frame", "JOURNAL", "CSV", "PARQUET", "README"]

JOURNAL, CSV, PARQUET, README = "journal.jsonl", "results.csv", "results.parquet", "README.txt"
LOCK = ".lock"


def _plain(value: Any) -> Any:
    if isinstance(value, float) and not math.isfinite(value):
        return None
    if hasattr(value, "item"):  # numpy scalars
        return _plain(value.item())
    return value


def _number_or_none(value: Any) -> bool:
    return value is None or (isinstance(value, (int, float)) and not isinstance(value, bool))


def _entry(line: bytes) -> tuple[str, dict] | None:
    """``(key, row)`` of one journal line, or None when it is not a finished case's row.

    A row is trusted only when it has every result column, a known status, numbers
    (or none) where numbers belong and, for an ``ok`` row, a finite positive volume.
    """
    try:
        entry = json.loads(line.decode("utf-8"))
    except (UnicodeDecodeError, ValueError):
        return None
    if not isinstance(entry, dict) or not isinstance(entry.get("key"), str):
        return None
    row = entry.get("row")
    if not isinstance(row, dict) or any(c not in row for c in RESULT_COLUMNS):
        return None
    if row["status"] not in STATUSES or not isinstance(row["error"], str):
        return None
    numbers = [c for c in RESULT_COLUMNS if c not in ("status", "error")]
    if not all(_number_or_none(row[c]) for c in numbers):
        return None
    if row["status"] == "ok":
        volume = row["volume_m3"]
        if volume is None or not (math.isfinite(volume) and volume > 0):
            return None
    return entry["key"], row


#: Signals held while a journal line and its in-memory row are written together.
_STOP_SIGNALS = (signal.SIGINT, signal.SIGTERM)


@contextmanager
def _stop_signals_held():
    """Hold Ctrl-C and SIGTERM for a few lines; act on them, as before, when done.

    Python runs signal handlers in the main thread, whichever thread the system gave
    the signal to, so swapping the handlers is enough (masking the main thread is not:
    the worker pool's threads would take the signal instead).
    """
    if threading.current_thread() is not threading.main_thread():
        yield
        return
    caught: list[int] = []
    old = {s: signal.signal(s, lambda signum, frame: caught.append(signum))
           for s in _STOP_SIGNALS}
    try:
        yield
    finally:
        for s, handler in old.items():
            signal.signal(s, handler)
        for signum in caught[:1]:
            handler = old[signum]
            if callable(handler):
                handler(signum, None)
            elif handler == signal.SIG_DFL:
                if signum == signal.SIGINT:
                    raise KeyboardInterrupt
                os.kill(os.getpid(), signum)


class Journal:
    """The append-only record of finished cases in ``DIR/journal.jsonl``.

    Parameters
    ----------
    folder : Path
        The sweep's output folder (created if missing).
    lock : bool
        Hold the folder's lock file while open, so that a second run writing to
        the same folder at the same time is refused (:class:`InputError`).
    """

    def __init__(self, folder: str | os.PathLike, *, lock: bool = False) -> None:
        self.folder = Path(folder)
        self._fh = None
        self._lock = None
        try:
            self.folder.mkdir(parents=True, exist_ok=True)
        except OSError as err:
            raise InputError("--output", str(folder), f"a folder that can be created "
                             f"({err.strerror})") from None
        self.path = self.folder / JOURNAL
        if self.path.exists() and not self.path.is_file():
            raise InputError("--output", str(folder), f"a sweep folder whose {JOURNAL} is a "
                             "file (found something else at that name)")
        if lock:
            self._take_lock()
        self.rows: dict[str, dict] = {}
        #: Lines of the journal not trusted as a finished case (their cases run again).
        self.rejected = 0
        if self.path.exists():
            try:
                data = self.path.read_bytes()
            except OSError as err:
                raise InputError("--output", str(folder), f"a folder whose {JOURNAL} can be "
                                 f"read ({err.strerror})") from None
            lines = data.split(b"\n")
            for i, line in enumerate(lines):
                if not line.strip():
                    continue
                entry = _entry(line)
                if entry is None:
                    if i < len(lines) - 1:  # the last line may be cut short by a killed run
                        self.rejected += 1
                    continue
                self.rows[entry[0]] = entry[1]

    def _take_lock(self) -> None:
        """Refuse a second run writing to the same folder at the same time."""
        import fcntl

        try:
            fh = open(self.folder / LOCK, "a")
        except OSError as err:
            raise InputError("--output", str(self.folder), f"a folder this sweep can write to "
                             f"({err.strerror})") from None
        try:
            # a POSIX record lock: held by this process only, not by the worker processes
            # it forks, so it ends with the process however it ends
            fcntl.lockf(fh.fileno(), fcntl.LOCK_EX | fcntl.LOCK_NB)
        except OSError:
            fh.close()
            raise InputError("--output", str(self.folder), "a folder no other sweep is "
                             "writing to (another run holds its lock)") from None
        self._lock = fh

    def finished(self, *, failed_too: bool = True) -> set[str]:
        """Keys of finished cases (with ``failed_too=False``, only those that succeeded).

        Parameters
        ----------
        failed_too : bool
            Count cases whose row is not ``ok`` as finished.
        """
        return {k for k, r in self.rows.items() if failed_too or r.get("status") == "ok"}

    def append(self, key: str, row: dict) -> None:
        """Record one finished case durably (flush and fsync before returning).

        Parameters
        ----------
        key : str
            The case's :func:`~bridgeopt.sweep.expand.case_key`.
        row : dict
            Its result columns (non-finite numbers are stored as null).
        """
        row = {k: _plain(v) for k, v in row.items()}
        # Ctrl-C between the write and the update of ``rows`` would leave a journal line the
        # result tables miss: hold the stop signals for these few lines (main thread only)
        with _stop_signals_held():
            self._append(key, row)

    def _append(self, key: str, row: dict) -> None:
        try:
            if self._fh is None:
                self._fh = open(self.path, "a", encoding="utf-8")
                if self._fh.tell() > 0:  # a previous run may have been cut mid-line
                    self._fh.write("\n")
            self._fh.write(json.dumps({"key": key, "row": row}, allow_nan=False) + "\n")
            self._fh.flush()
            os.fsync(self._fh.fileno())
        except OSError as err:
            raise InputError("--output", str(self.folder), f"a folder this sweep can write to "
                             f"({err.strerror})") from None
        self.rows[key] = row

    def close(self) -> None:
        """Close the journal and release the folder's lock."""
        if self._fh is not None:
            self._fh.close()
            self._fh = None
        if self._lock is not None:
            self._lock.close()
            self._lock = None


def results_frame(sweep: Sweep, rows: dict[str, dict]):
    """One row per finished case of ``sweep``, in case order: case, inputs, results.

    Parameters
    ----------
    sweep : Sweep
        The expanded sweep (gives the case order and inputs).
    rows : dict
        Result row per case key (:attr:`Journal.rows`), columns of
        ``RESULT_COLUMNS`` (volumes in m3, weights in N, times in s).

    Returns
    -------
    pandas.DataFrame
        Columns ``case``, ``key``, the dotted inputs, then the result columns.
    """
    import pandas as pd

    records = []
    for case in sweep.cases:
        if case.key in rows:
            records.append({"case": case.index, "key": case.key, **case.inputs,
                            **rows[case.key]})
    df = pd.DataFrame.from_records(records)
    if df.empty:
        names = ["case", "key", *RESULT_COLUMNS]
        return pd.DataFrame({n: pd.Series(dtype=object) for n in names})
    first = ["case", "key"]
    inputs = list(dict.fromkeys(k for c in sweep.cases for k in c.inputs))
    results = [c for c in RESULT_COLUMNS if c in df] + [c for c in df if c not in first
                                                        and c not in inputs
                                                        and c not in RESULT_COLUMNS]
    df = df[first + [c for c in inputs if c in df] + results]
    for col in df.columns[df.dtypes == object]:  # noqa: E721 (pandas dtype test)
        kinds = {type(v) for v in df[col] if v is not None and v == v}
        if len(kinds) > 1:  # mixed values in one swept key: keep them as text
            df[col] = [None if v is None or v != v else str(v) for v in df[col]]
    return df


def _readme(sweep: Sweep) -> str:
    lines = [f"bridgeopt sweep results: {sweep.name} ({len(sweep)} cases, from {sweep.source})",
             "", *CAUTION_LINES, "",
             f"{CSV} and {PARQUET}: one row per finished case, in case order.",
             "case: position of the case in the sweep (0-based); key: the case's identifier "
             "(a re-run skips finished keys).",
             "Input columns are the scenario-file keys, dotted as in docs/scenario.md "
             "(bridge.span [m], bridge.deck_load [N/m], material.preset, form.type ...); "
             "lists are written as JSON text.",
             "Swept here: " + (", ".join(sweep.varied) or "nothing"), ""]
    lines += [f"{name}: {text}" for name, text in RESULT_COLUMNS.items()]
    lines += ["pylon_height_m, tower_height_m, sag_m, rise_m, deck_panel_m: main dimensions of a "
              "solved form [m]", "span_to_height, span_to_sag, sag_ratio, rise_ratio, span_to_rise: "
              "final ratios of a form [-]; anchor_move_largest_m, anchor_move_mean_m, "
              "deck_point_move_largest_m: how far the optimized stay anchors moved from the "
              "starting pattern [m]; anchor_heights_m, stay_deck_x_m: per stay of the model, "
              "as JSON lists [m]; start_pattern: the stay pattern the anchors started from",
              "reference_crossing: for a form, how the crossing it and its "
              "reference stand on differs from the scenario's own (empty when the same)", "", f"{JOURNAL}: the running record the tables are rebuilt from "
              "(do not edit while a sweep runs).", ""]
    return "\n".join(lines)


def write_tables(sweep: Sweep, journal: Journal) -> None:
    """Rewrite ``results.csv``, ``results.parquet`` and ``README.txt`` from the journal.

    Parameters
    ----------
    sweep : Sweep
        The expanded sweep.
    journal : Journal
        The sweep folder's journal; the tables are written beside it, atomically.
    """
    import pyarrow as pa
    import pyarrow.parquet as pq

    df = results_frame(sweep, journal.rows)
    folder = journal.folder
    atomic_write(folder / CSV, lambda tmp: df.to_csv(tmp, index=False))
    table = pa.Table.from_pandas(df, preserve_index=False)
    meta = dict(table.schema.metadata or {})
    meta[b"bridgeopt.cautions"] = CAUTIONS.encode()
    meta[b"bridgeopt.sweep"] = json.dumps({"name": sweep.name, "source": sweep.source,
                                           "cases": len(sweep), "varied": sweep.varied}).encode()
    table = table.replace_schema_metadata(meta)
    atomic_write(folder / PARQUET, lambda tmp: pq.write_table(table, tmp))
    atomic_write(folder / README, lambda tmp: Path(tmp).write_text(_readme(sweep), encoding="utf-8"))
