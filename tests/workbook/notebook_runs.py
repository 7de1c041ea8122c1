"""One kernel run per study notebook, shared by the notebook tests.

``test_notebooks``, ``test_notebook_numbers`` and ``test_notebook_crossings`` each used to
execute every study notebook at its fast defaults (``BRIDGEOPT_FAST=1``, not report mode),
with a probe cell of their own appended.  Those runs are the same notebook with the same
environment, so here each notebook is executed once with every test's probe cells appended,
in this order:

1. the probes that only read the notebook's state (``register_probe``: the number and
   table probes), each guarded so a failing probe fails only the test that reads it;
2. the probes that change the state (``register_probe(..., changes_state=True)``: the
   explorer's slider probe and the cell after it), always after every reading probe.

:func:`run` returns a :class:`Run`: the executed notebook, how many of its cells are the
notebook's own, and what each probe printed.  A notebook that fails to run raises the same
:class:`~bridgeopt.SolveError` in every test that asks for it, from one execution.
"""

from __future__ import annotations

import datetime
import json
import os
from dataclasses import dataclass, field
from pathlib import Path

import nbformat

from bridgeopt.workbook.report import execute_notebook

STUDIES = Path(__file__).resolve().parents[2] / "studies"
FAST = {"BRIDGEOPT_FAST": "1"}
#: Per-cell limit of the shared run [s]: the largest any of the three tests gave its own run
#: (the crossings test's 180 s); a test with a smaller limit checks it with :meth:`Run.slowest`.
TIMEOUT = 180

_PROBES: dict[str, dict[str, tuple[str, bool]]] = {}
_RUNS: dict[str, Run | BaseException] = {}


def register_probe(stem: str, key: str, source: str, *, changes_state: bool = False) -> None:
    """Ask for ``source`` to run as a cell after notebook ``stem``'s own cells.

    Call at import time of the test module (before any test runs the notebook).  A reading
    probe (``changes_state=False``) is wrapped so an exception in it is printed as
    ``PROBE-FAILED:<key>`` instead of stopping the notebook; a state-changing probe runs as
    written, after every reading probe.
    """
    probes = _PROBES.setdefault(stem, {})
    if key in probes and probes[key] != (source, changes_state):
        raise ValueError(f"probe {key!r} for {stem} registered twice with different cells")
    if stem in _RUNS and key not in probes:
        raise RuntimeError(f"probe {key!r} registered after {stem} already ran")
    probes[key] = (source, changes_state)


def _guarded(key: str, source: str) -> str:
    body = "\n".join("    " + line for line in source.strip("\n").splitlines())
    return (f"try:\n{body}\nexcept Exception as _probe_error:\n"
            f"    print({'PROBE-FAILED:' + key!r}, repr(_probe_error))\n")


@dataclass
class Run:
    """One executed study notebook with its appended probe cells."""

    nb: nbformat.NotebookNode
    own: int  # cells of the notebook itself, before the probes
    cells: dict[str, int] = field(default_factory=dict)  # probe key -> cell index

    @property
    def own_cells(self) -> list:
        """The notebook's own cells, executed (no probe cell)."""
        return self.nb.cells[:self.own]

    def text(self, key: str) -> str:
        """What probe ``key``'s cell printed (stdout); fails the test if the probe failed."""
        cell = self.nb.cells[self.cells[key]]
        text = "".join(o.get("text", "") for o in cell.outputs if o.output_type == "stream")
        if f"PROBE-FAILED:{key}" in text:
            raise AssertionError(f"probe {key!r} failed in the kernel: {text.strip()}")
        return text

    def upto(self, key: str) -> list:
        """The cells up to and including probe ``key``'s (what a run ending there held)."""
        return self.nb.cells[:self.cells[key] + 1]

    def slowest(self, *keys: str) -> float:
        """Longest execution [s] of the notebook's own cells and probes ``keys`` (nbclient's
        timing): what a run of those cells alone would have been held to by its limit."""
        longest = 0.0
        for cell in self.own_cells + [self.nb.cells[self.cells[k]] for k in keys]:
            t = cell.get("metadata", {}).get("execution", {})
            start, end = t.get("iopub.execute_input"), t.get("shell.execute_reply")
            if cell.cell_type == "code" and start and end:
                seconds = (_stamp(end) - _stamp(start)).total_seconds()
                longest = max(longest, seconds)
        return longest


def _stamp(text: str) -> datetime.datetime:
    return datetime.datetime.fromisoformat(text)


def run(stem: str) -> Run:
    """``studies/<stem>.ipynb`` executed once (per test session) with every registered probe."""
    if stem not in _RUNS:
        try:
            _RUNS[stem] = _execute(stem)
        except Exception as err:  # noqa: BLE001 -- kept: the same failure for every test
            _RUNS[stem] = err
    got = _RUNS[stem]
    if isinstance(got, BaseException):
        raise got
    return got


def _execute(stem: str) -> Run:
    path = STUDIES / f"{stem}.ipynb"
    nb = nbformat.read(path, as_version=4)
    own = len(nb.cells)
    probes = _PROBES.get(stem, {})
    order = [k for k, (_, changes) in probes.items() if not changes] + \
            [k for k, (_, changes) in probes.items() if changes]
    cells = {}
    for key in order:
        source, changes = probes[key]
        cells[key] = len(nb.cells)
        nb.cells.append(nbformat.v4.new_code_cell(source if changes else _guarded(key, source)))
    tmp = path.with_name(f".test_run_{os.getpid()}_{path.name}")
    nbformat.write(nb, tmp)
    try:
        done = execute_notebook(tmp, report=False, timeout=TIMEOUT, extra_env=FAST)
    finally:
        tmp.unlink()
    return Run(done, own, cells)


def probe_json(run_: Run, key: str, marker: str):
    """The JSON probe ``key`` printed after ``marker``."""
    return json.loads(run_.text(key).split(marker, 1)[1])
