"""A sweep that is interrupted, killed or handed a damaged journal: no process left behind,
no hang, no row lost or trusted without checking, and a clear line for a bad address.

These are checks of the program's own contract (the behaviour the sweep documents in
docs/formats.md), not of engineering values; the solves compared are the package's own
direct solves of the same cases.
"""

from __future__ import annotations

import json
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pandas as pd
import pytest

from bridgeopt import InputError
from bridgeopt.sweep import Journal, load_sweep, run_sweep
from bridgeopt.sweep.run import check_scheduler
from tests.sweep.test_sweep import SWEEP_TOML

pytestmark = pytest.mark.slow



def _sweep_file(tmp_path: Path, spans: int = 12) -> Path:
    path = tmp_path / "slow.toml"
    spans_text = ", ".join(str(400.0 + 20 * i) for i in range(spans))
    path.write_text(SWEEP_TOML.replace("divisions = [8, 9]", "divisions = [16, 20]")
                    .replace("span = [400.0, 600.0]", f"span = [{spans_text}]"))
    return path


def _children(pid: int) -> set[int]:
    """Processes whose parent is ``pid`` (from /proc; Linux)."""
    found = set()
    for entry in Path("/proc").iterdir():
        if entry.name.isdigit():
            try:
                stat = (entry / "stat").read_text()
            except OSError:
                continue
            fields = stat.rsplit(")", 1)[1].split()
            if int(fields[1]) == pid:
                found.add(int(entry.name))
    return found


def _alive(pid: int) -> bool:
    try:
        stat = Path(f"/proc/{pid}/stat").read_text()
    except OSError:
        return False
    return stat.rsplit(")", 1)[1].split()[0] != "Z"   # a zombie has ended


def _start(path: Path, out: Path) -> subprocess.Popen:
    return subprocess.Popen([sys.executable, "-m", "bridgeopt", "sweep", str(path), "-o",
                             str(out), "--jobs", "2"], stdout=subprocess.PIPE,
                            stderr=subprocess.PIPE, text=True, start_new_session=True,
                            preexec_fn=lambda: signal.signal(signal.SIGINT, signal.SIG_DFL))


def _wait_for_rows(proc, out: Path, rows: int = 2) -> set[int]:
    """Wait until the journal has ``rows`` lines; the worker processes seen by then."""
    journal = out / "journal.jsonl"
    deadline = time.monotonic() + 90
    workers: set[int] = set()
    while time.monotonic() < deadline and proc.poll() is None:
        workers |= _children(proc.pid)
        if journal.exists() and len(journal.read_text().splitlines()) >= rows:
            break
        time.sleep(0.02)
    workers |= _children(proc.pid)
    assert proc.poll() is None, "the sweep ended before it could be interrupted"
    return {w for w in workers if _alive(w)}


def _all_gone(pids: set[int], within: float) -> bool:
    deadline = time.monotonic() + within
    while time.monotonic() < deadline:
        if not any(_alive(p) for p in pids):
            return True
        time.sleep(0.05)
    return False


def _clean_up(proc, pids):
    for pid in [proc.pid, *pids]:
        try:
            os.kill(pid, signal.SIGKILL)
        except OSError:
            pass


def test_double_ctrl_c_ends_within_10_s_and_leaves_no_worker(tmp_path):
    proc = _start(_sweep_file(tmp_path), tmp_path / "out")
    workers = _wait_for_rows(proc, tmp_path / "out")
    assert workers, "the sweep should be running worker processes"
    try:
        t0 = time.monotonic()
        proc.send_signal(signal.SIGINT)
        time.sleep(0.1)
        proc.send_signal(signal.SIGINT)    # a second Ctrl-C while it shuts down
        _, err = proc.communicate(timeout=10)
        assert time.monotonic() - t0 < 10
        assert proc.returncode == 130, err
        assert "interrupted" in err and "Traceback" not in err
        assert _all_gone(workers, 5.0)
    finally:
        _clean_up(proc, workers)
    rows = pd.read_csv(tmp_path / "out" / "results.csv")
    assert len(rows) == len(Journal(tmp_path / "out").finished()) >= 2


@pytest.mark.parametrize("sig", [signal.SIGTERM, signal.SIGKILL])
def test_a_killed_sweep_leaves_no_worker(tmp_path, sig):
    proc = _start(_sweep_file(tmp_path), tmp_path / "out")
    workers = _wait_for_rows(proc, tmp_path / "out")
    try:
        os.kill(proc.pid, sig)             # the parent only, not its process group
        proc.communicate(timeout=10)
        assert _all_gone(workers, 10.0), "worker processes outlived the sweep"
    finally:
        _clean_up(proc, workers)
    if sig == signal.SIGTERM:
        assert proc.returncode == 130      # stopped like Ctrl-C: what finished is kept
        rows = pd.read_csv(tmp_path / "out" / "results.csv")
        assert len(rows) == len(Journal(tmp_path / "out").finished()) >= 2


def test_resume_after_interrupt_gives_the_clean_run_table(tmp_path):
    # 12 cases: about 5 s of solving left after the first 2 rows, against a 20 ms poll
    # before the Ctrl-C (_wait_for_rows fails if the run ended first); solved twice here
    path = _sweep_file(tmp_path, spans=2)
    sweep = load_sweep(path)
    run_sweep(sweep, tmp_path / "clean", jobs=2)
    proc = _start(path, tmp_path / "cut")
    _wait_for_rows(proc, tmp_path / "cut")
    proc.send_signal(signal.SIGINT)
    proc.communicate(timeout=30)
    outcome = run_sweep(sweep, tmp_path / "cut", jobs=2)
    assert outcome.skipped >= 2 and not outcome.interrupted
    clean = pd.read_csv(tmp_path / "clean" / "results.csv").drop(columns="seconds")
    cut = pd.read_csv(tmp_path / "cut" / "results.csv").drop(columns="seconds")
    pd.testing.assert_frame_equal(clean, cut)


def test_a_killed_worker_fails_no_innocent_case(tmp_path):
    """SIGKILL one worker mid-run: every case still ends ok, and the sweep exits 0."""
    # 12 cases: 11 or so still to run on the pool after the killed worker, every one checked
    proc = _start(_sweep_file(tmp_path, spans=2), tmp_path / "out")
    workers = _wait_for_rows(proc, tmp_path / "out", rows=1)
    os.kill(min(workers), signal.SIGKILL)
    try:
        out, err = proc.communicate(timeout=120)
    finally:
        _clean_up(proc, workers)
    assert proc.returncode == 0, err
    rows = pd.read_csv(tmp_path / "out" / "results.csv")
    assert len(rows) == 12 and (rows["status"] == "ok").all()    # 2 spans x 2 grids x 3 forms


def test_damaged_journal_rows_are_run_again_and_reported(tmp_path, caplog):
    path = _sweep_file(tmp_path, spans=1)
    sweep = load_sweep(path)
    out = tmp_path / "out"
    run_sweep(sweep, out, jobs=1)
    good = pd.read_csv(out / "results.csv").drop(columns="seconds")
    lines = (out / "journal.jsonl").read_bytes().splitlines()
    first = json.loads(lines[0])
    tampered = json.dumps({"key": first["key"], "row": {"status": "ok"}}).encode()
    damaged = [b"null", b'"a string"', b"\xff\xfe not utf-8", tampered, *lines[1:]]
    (out / "journal.jsonl").write_bytes(b"\n".join(damaged) + b"\n")
    with caplog.at_level("WARNING", logger="bridgeopt.sweep.run"):
        outcome = run_sweep(sweep, out, jobs=1)
    assert outcome.ran == [first["key"]]          # only the case of the untrusted row
    assert "4 line(s)" in caplog.text and "run again" in caplog.text
    again = pd.read_csv(out / "results.csv").drop(columns="seconds")
    pd.testing.assert_frame_equal(good, again)


def test_journal_that_is_a_folder_is_one_clear_error(tmp_path):
    (tmp_path / "out" / "journal.jsonl").mkdir(parents=True)
    with pytest.raises(InputError) as err:
        Journal(tmp_path / "out", lock=True)
    assert err.value.field == "--output" and "journal.jsonl" in str(err.value)


def test_unwritable_folder_is_one_clear_error(tmp_path):
    (tmp_path / "out" / ".lock").mkdir(parents=True)   # the lock cannot be opened
    proc = subprocess.run([sys.executable, "-m", "bridgeopt", "sweep",
                           str(_sweep_file(tmp_path, spans=1)), "-o", str(tmp_path / "out")],
                          capture_output=True, text=True, timeout=60)
    assert proc.returncode == 2
    assert proc.stderr.count("\n") == 1 and "--output" in proc.stderr
    assert "can write to" in proc.stderr


@pytest.mark.parametrize("address", ["nonsense", "tcp://", "http://host:8786", "host:port", ""])
def test_bad_scheduler_is_refused_before_anything_is_written(tmp_path, address):
    t0 = time.monotonic()
    proc = subprocess.run([sys.executable, "-m", "bridgeopt", "sweep",
                           str(_sweep_file(tmp_path, spans=1)), "-o", str(tmp_path / "out"),
                           "--scheduler", address], capture_output=True, text=True, timeout=60)
    assert time.monotonic() - t0 < 20
    assert proc.returncode == 2, proc.stderr
    assert proc.stderr.count("\n") == 1 and "--scheduler" in proc.stderr
    assert "protocol://host:port" in proc.stderr
    assert not (tmp_path / "out").exists()


@pytest.mark.parametrize("address", ["tcp://127.0.0.1:8786", "tls://scheduler.example:8786",
                                     "10.0.0.5:8786", "ws://[::1]:8786", "inproc://192.0.2.2/14897/1"])
def test_scheduler_addresses_of_the_documented_forms_pass_the_check(address):
    assert check_scheduler(address) == address
