"""Benchmark: the 200-case option sweep on the 30-division grid, local processes.

Runs ``bridgeopt sweep studies/sweeps/meeting_grid.toml -o bench/out/meeting_grid
--jobs N`` from scratch in a fresh process and reports its wall time and cases
per minute, then kills a second run part way and re-runs it to show that only
the missing cases run.  Record the figures in docs/benchmarks.md.

Usage: ``.venv/bin/python bench/bench_sweep.py [JOBS] [--dask]`` (default 2 jobs).  With
``--dask`` the same sweep also runs on a local Dask cluster of JOBS single-threaded worker
processes (``bridgeopt sweep ... --scheduler ADDRESS``), compared with the local run.
"""

from __future__ import annotations

import os
import shutil
import signal
import subprocess
import sys
import time
from pathlib import Path

import pandas as pd

ROOT = Path(__file__).resolve().parents[1]
SWEEP = ROOT / "studies" / "sweeps" / "meeting_grid.toml"
OUT = ROOT / "bench" / "out"


def sweep(out: Path, jobs: int, *extra: str) -> tuple[float, subprocess.CompletedProcess]:
    t0 = time.perf_counter()
    run = subprocess.run([sys.executable, "-m", "bridgeopt", "sweep", str(SWEEP), "-o",
                          str(out), "--jobs", str(jobs), *extra], capture_output=True, text=True)
    return time.perf_counter() - t0, run


def on_dask(jobs: int, local: pd.DataFrame) -> None:
    from distributed import LocalCluster

    out = OUT / "meeting_grid_dask"
    shutil.rmtree(out, ignore_errors=True)
    with LocalCluster(n_workers=jobs, threads_per_worker=1, processes=True,
                      dashboard_address=None) as cluster:
        seconds, run = sweep(out, jobs, "--scheduler", cluster.scheduler_address)
    if run.returncode != 0:
        sys.exit(run.stderr)
    df = pd.read_csv(out / "results.csv")
    change = (df["volume_m3"] - local["volume_m3"]).abs().fillna(0)
    same = (df["status"] == local["status"]).all() and (
        change <= 1e-9 * local["volume_m3"].abs().fillna(1)).all()
    print(f"Dask, {jobs} worker processes: {len(df)} cases in {seconds:.1f} s wall "
          f"(cluster already running): {60 * len(df) / seconds:.1f} cases per minute; "
          f"results equal the local run: {bool(same)}")


def main() -> None:
    args = [a for a in sys.argv[1:] if a != "--dask"]
    jobs = int(args[0]) if args else 2
    out = OUT / "meeting_grid"
    shutil.rmtree(out, ignore_errors=True)
    print(f"cpus {os.cpu_count()}, load average before {os.getloadavg()[0]:.2f}, jobs {jobs}")
    seconds, run = sweep(out, jobs)
    if run.returncode != 0:
        sys.exit(run.stderr)
    df = pd.read_csv(out / "results.csv")
    print(f"{len(df)} cases in {seconds:.1f} s wall: {60 * len(df) / seconds:.1f} cases per "
          f"minute; load average after {os.getloadavg()[0]:.2f}")
    print(df["status"].value_counts().to_string())
    print(f"sum of per-case solve times {df['seconds'].sum():.1f} s "
          f"(x{df['seconds'].sum() / seconds:.2f} of the wall time)")
    df["form"] = df["form.type"] + df["form.pattern"].fillna("").map(lambda p: f" {p}" if p else "")
    table = df.groupby("form").agg(cases=("case", "size"),
                                   ok=("status", lambda s: (s == "ok").sum()),
                                   median_ratio=("ratio", "median"),
                                   median_seconds=("seconds", "median"),
                                   max_seconds=("seconds", "max"))
    print(table.to_string(float_format=lambda v: f"{v:.3f}"))
    bad = df[df["status"] != "ok"]
    for _, row in bad.iterrows():
        print(f"  bad case {row['case']}: span {row['bridge.span']:g} rise {row['bridge.rise']:g} "
              f"{row['material.preset']} {row['form']}: {row['status']}: {row['error'][:140]}")

    # interrupt and resume
    killed = OUT / "meeting_grid_killed"
    shutil.rmtree(killed, ignore_errors=True)
    proc = subprocess.Popen([sys.executable, "-m", "bridgeopt", "sweep", str(SWEEP), "-o",
                             str(killed), "--jobs", str(jobs)], stdout=subprocess.DEVNULL,
                            stderr=subprocess.DEVNULL, start_new_session=True)
    journal = killed / "journal.jsonl"
    while proc.poll() is None:
        if journal.exists() and len(journal.read_text().splitlines()) >= 60:
            os.killpg(proc.pid, signal.SIGKILL)
            break
        time.sleep(0.05)
    proc.wait()
    before = len(journal.read_text().splitlines())
    seconds2, run2 = sweep(killed, jobs)
    last = [line for line in run2.stdout.splitlines() if "ran" in line or "already" in line]
    print(f"killed after {before} cases; re-run in {seconds2:.1f} s: " + "; ".join(
        s.strip() for s in last))
    again = pd.read_csv(killed / "results.csv")
    change = (again["volume_m3"] - df["volume_m3"]).abs().fillna(0)
    same = (again["status"] == df["status"]).all() and (
        change <= 1e-9 * df["volume_m3"].abs().fillna(1)).all()
    print(f"resumed results equal the uninterrupted run: {bool(same)}")
    if "--dask" in sys.argv:
        on_dask(jobs, df)


if __name__ == "__main__":
    main()
