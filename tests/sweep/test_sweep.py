"""Sweeps: expansion of a sweep file, one row per case, bad cases, resuming, a Dask cluster.

Check values are counted by hand from the sweep files below (products of the
listed values), or are properties of layout optimization: the reference optimum
is a lower bound of any form on the same problem (W.S. Dorn, R.E. Gomory,
H.J. Greenberg 1964, J. de Mecanique 3:25-52), so every form's ratio is >= 1.
"""

from __future__ import annotations

import copy
import json
import os
import signal
import subprocess
import sys
import time

import numpy as np
import pandas as pd
import pytest

from bridgeopt import InputError, optimize_layout
from bridgeopt.cautions import CAUTION_LINES
from bridgeopt.files.scenario import parse_scenario
from bridgeopt.sweep import Journal, expand_sweep, load_sweep, run_sweep

BRIDGE = {"span": [400.0, 600.0], "rise": 120.0, "depth": 40.0, "deck_load": 1.0e5,
          "divisions": 8}
FORMS = [{"type": "reference"}, {"type": "cable-stayed", "pattern": ["fan", "harp"]}]

SWEEP_TOML = """
name = "Fernwick Reach options"   # a fictional crossing

[bridge]
span = [400.0, 600.0]
rise = 120.0
depth = 40.0
deck_load = 1.0e5
divisions = [8, 9]          # 9 is odd: those cases are bad

[material]
preset = "steel"

[[form]]
type = "reference"

[[form]]
type = "cable-stayed"
pattern = ["fan", "harp"]
"""


def sweep_dict(**bridge) -> dict:
    return copy.deepcopy({"name": "test", "bridge": {**BRIDGE, **bridge},
                          "material": {"preset": "steel"}, "form": FORMS})


# ---------------------------------------------------------------- expansion

def test_product_of_lists_and_alternatives():
    data = sweep_dict()
    data["material"] = {"preset": ["steel", "cfrp"]}
    sweep = expand_sweep(data)
    # 2 spans x 2 materials x (reference + 2 cable-stayed patterns), by hand
    assert len(sweep) == 2 * 2 * 3
    assert set(sweep.varied) == {"bridge.span", "material.preset", "form.type", "form.pattern"}
    spans = sorted({c.data["bridge"]["span"] for c in sweep.cases})
    assert spans == [400.0, 600.0]
    patterns = [c.data["form"].get("pattern") for c in sweep.cases]
    assert patterns.count("fan") == patterns.count("harp") == 4
    assert len({c.key for c in sweep.cases}) == len(sweep)  # keys tell cases apart


def test_values_that_are_lists_in_a_scenario_are_swept_by_lists_of_them():
    layout = {"domain": {"x": [0.0, 4.0], "z": [0.0, 2.0], "spacing": 0.5},
              "material": {"preset": "steel"},
              "support": [{"at": [0.0, 0.0]}, {"at": [[0.0, 2.0], [0.0, 1.5]]}],
              "load": [{"at": [4.0, 1.0], "force": [0.0, -1.0e6]}]}
    sweep = expand_sweep(layout)
    assert len(sweep) == 2     # the domain's x = [0, 4] is one value, not two cases
    assert sweep.varied == ("support[1].at",)
    assert {tuple(c.data["support"][1]["at"]) for c in sweep.cases} == {(0.0, 2.0), (0.0, 1.5)}
    for case in sweep.cases:
        parse_scenario(case.data)  # each case is a valid scenario


@pytest.mark.parametrize("change, field", [
    (lambda d: d["bridge"].update(spann=[1.0]), "bridge.spann"),
    (lambda d: d.update(materal={"preset": "steel"}), "materal"),
    (lambda d: d["form"][1].update(sag_ratio=0.1), "form.sag_ratio"),
    (lambda d: d["bridge"].update(span=[]), "bridge.span"),
    # a list of form types takes only the keys every listed type has
    (lambda d: d["form"][1].update(type=["cable-stayed", "arch"]), "form.pattern"),
])
def test_bad_keys_and_empty_lists_are_named(change, field):
    data = sweep_dict()
    change(data)
    with pytest.raises(InputError) as err:
        expand_sweep(data)
    assert err.value.field == field


def test_sweep_file_errors(tmp_path):
    with pytest.raises(InputError, match="file"):
        load_sweep(tmp_path / "missing.toml")
    bad = tmp_path / "bad.toml"
    bad.write_text("[bridge\nspan = 1")
    with pytest.raises(InputError, match="TOML"):
        load_sweep(bad)


# ---------------------------------------------------------------- running

@pytest.fixture(scope="module")
def finished(tmp_path_factory):
    """The 12-case sweep file run once locally (4 bad cases with 9 divisions)."""
    folder = tmp_path_factory.mktemp("sweep")
    path = folder / "options.toml"
    path.write_text(SWEEP_TOML)
    sweep = load_sweep(path)
    seen = []
    outcome = run_sweep(sweep, folder / "out", jobs=2,
                        progress=lambda done, total, case, row: seen.append((done, total)))
    return sweep, outcome, folder / "out", seen


def test_one_row_per_case_with_bad_cases_recorded(finished):
    sweep, outcome, out, seen = finished
    assert len(sweep) == 2 * 2 * 3          # by hand
    assert outcome.total == 12 and outcome.skipped == 0 and len(outcome.ran) == 12
    assert seen[-1] == (12, 12) and len(seen) == 12
    df = pd.read_csv(out / "results.csv")
    assert list(df["case"]) == list(range(12))
    for col in ("bridge.span", "form.type", "status", "error", "volume_m3",
                "reference_volume_m3", "ratio", "seconds"):
        assert col in df.columns
    bad = df[df["bridge.divisions"] == 9]
    assert len(bad) == 6 and (bad["status"] == "input-error").all()
    assert bad["error"].str.contains("bridge.divisions").all()
    assert outcome.failed == 6
    good = df[df["bridge.divisions"] == 8]
    assert (good["status"] == "ok").all()


def test_results_agree_with_direct_solves(finished):
    sweep, _, out, _ = finished
    df = pd.read_csv(out / "results.csv")
    good = df[df["status"] == "ok"]
    for span, rows in good.groupby("bridge.span"):
        case = next(c for c in sweep.cases if c.data["bridge"]["span"] == span
                    and c.data["bridge"]["divisions"] == 8)
        direct = optimize_layout(parse_scenario(case.data).problem)
        ref = rows[rows["form.type"] == "reference"]
        assert ref["volume_m3"].iloc[0] == pytest.approx(direct.volume, rel=1e-9)
        assert ref["ratio"].iloc[0] == 1.0
        forms = rows[rows["form.type"] == "cable-stayed"]
        assert len(forms) == 2
        # the forms share that reference, and it bounds them (lower-bound property)
        assert np.allclose(forms["reference_volume_m3"], direct.volume, rtol=1e-9)
        assert (forms["ratio"] >= 1 - 1e-9).all()
        assert np.allclose(forms["ratio"], forms["volume_m3"] / forms["reference_volume_m3"])


def test_a_case_that_cannot_stand_is_recorded_and_the_rest_run(tmp_path):
    # steel, 400 m span: a cable needs a sag above k L^2/8 = 7850 * 9.80665 / 355e6 * 400^2 / 8
    # = 4.3 m to carry its own weight (parabolic statics, common practice); a sag ratio of
    # 0.005 gives 2 m, 0.1 gives 40 m
    data = {"name": "sag check", "bridge": {**BRIDGE, "span": 400.0},
            "material": {"preset": "steel"},
            "form": {"type": "suspension", "sag_ratio": [0.005, 0.1]}}
    outcome = run_sweep(expand_sweep(data), tmp_path, jobs=2)
    df = pd.read_csv(tmp_path / "results.csv")
    assert list(df["form.sag_ratio"]) == [0.005, 0.1]
    assert list(df["status"]) == ["solve-failed", "ok"]
    assert "span-limit" in df["error"].iloc[0]
    assert outcome.failed == 1 and df["ratio"].iloc[1] >= 1


def test_parquet_matches_csv_and_tables_carry_the_cautions(finished):
    _, _, out, _ = finished
    csv = pd.read_csv(out / "results.csv")
    parquet = pd.read_parquet(out / "results.parquet")
    assert list(parquet.columns) == list(csv.columns)
    assert np.allclose(parquet["volume_m3"], csv["volume_m3"], equal_nan=True)
    assert list(parquet["status"]) == list(csv["status"])
    import pyarrow.parquet as pq

    meta = pq.read_schema(out / "results.parquet").metadata
    assert CAUTION_LINES[1] in meta[b"bridgeopt.cautions"].decode()
    readme = (out / "README.txt").read_text()
    assert all(line in readme for line in CAUTION_LINES)


@pytest.mark.slow
def test_rerun_runs_only_the_missing_cases(finished, tmp_path):
    sweep, _, out, _ = finished
    folder = tmp_path / "resume"
    folder.mkdir()
    lines = (out / "journal.jsonl").read_text().splitlines()
    kept = lines[:5]
    # as if killed while writing the sixth line: a half line at the end
    (folder / "journal.jsonl").write_text("\n".join(kept) + "\n" + lines[5][:17])
    kept_keys = {json.loads(line)["key"] for line in kept}
    outcome = run_sweep(sweep, folder, jobs=2)
    assert outcome.skipped == 5
    assert set(outcome.ran) == {c.key for c in sweep.cases} - kept_keys
    assert len(outcome.ran) == len(sweep) - 5
    again = run_sweep(sweep, folder, jobs=2)
    assert again.skipped == len(sweep) and again.ran == []
    first = pd.read_csv(out / "results.csv")
    second = pd.read_csv(folder / "results.csv")
    assert np.allclose(first["volume_m3"], second["volume_m3"], equal_nan=True)


@pytest.mark.slow
def test_a_second_run_on_the_same_folder_is_refused(finished, tmp_path):
    sweep = finished[0]
    # another process holds the folder, as a running sweep would
    holder = subprocess.Popen(
        [sys.executable, "-c", "import sys, time; from bridgeopt.sweep import Journal; "
         f"j = Journal({str(tmp_path / 'busy')!r}, lock=True); print('held', flush=True); "
         "sys.stdin.read()"], stdin=subprocess.PIPE, stdout=subprocess.PIPE, text=True)
    try:
        assert holder.stdout.readline().strip() == "held"
        with pytest.raises(InputError) as err:
            run_sweep(sweep, tmp_path / "busy", jobs=1)
        assert err.value.field == "--output"
    finally:
        holder.communicate("", timeout=30)
    assert len(run_sweep(sweep, tmp_path / "busy", jobs=2).ran) == len(sweep)  # free again


def test_retry_failed_runs_the_bad_cases_again(finished, tmp_path):
    sweep, _, out, _ = finished
    folder = tmp_path / "retry"
    folder.mkdir()
    (folder / "journal.jsonl").write_text((out / "journal.jsonl").read_text())
    outcome = run_sweep(sweep, folder, jobs=1, retry_failed=True)
    assert len(outcome.ran) == 6 and outcome.failed == 6   # the six 9-division cases


@pytest.mark.slow
def test_a_killed_run_keeps_its_finished_cases(tmp_path):
    """SIGKILL a running `bridgeopt sweep`, then finish it: only the missing cases run."""
    path = tmp_path / "slow.toml"
    path.write_text(SWEEP_TOML.replace("divisions = [8, 9]", "divisions = [16, 20]")
                    .replace("span = [400.0, 600.0]",
                             "span = [" + ", ".join(str(400.0 + 20 * i) for i in range(2)) + "]"))
    # 12 cases (as the resume test in test_reliability.py): about 5 s of solving left after
    # the first 2 rows, against a 10 ms poll before the kill; all of them are finished
    # below, so more cases only cost time (the assert after the kill fails if it ran out)
    sweep = load_sweep(path)
    out = tmp_path / "out"
    proc = subprocess.Popen([sys.executable, "-m", "bridgeopt", "sweep", str(path), "-o",
                             str(out), "--jobs", "2"], stdout=subprocess.DEVNULL,
                            stderr=subprocess.DEVNULL, start_new_session=True)
    journal = out / "journal.jsonl"
    deadline = time.monotonic() + 60
    try:
        while time.monotonic() < deadline and proc.poll() is None:
            if journal.exists() and len(journal.read_text().splitlines()) >= 2:
                break
            time.sleep(0.01)
    finally:
        if proc.poll() is None:
            os.killpg(proc.pid, signal.SIGKILL)   # the group this test started
        proc.wait(timeout=30)
    done_before = Journal(out).finished()
    assert 2 <= len(done_before) < len(sweep), "the run was to be killed part way"
    outcome = run_sweep(sweep, out, jobs=2)
    assert outcome.skipped == len(done_before)
    assert set(outcome.ran) == {c.key for c in sweep.cases} - done_before
    df = pd.read_csv(out / "results.csv")
    assert len(df) == len(sweep) and (df["status"] == "ok").all()


@pytest.mark.slow
def test_ctrl_c_stops_the_sweep_and_keeps_what_finished(tmp_path):
    path = tmp_path / "slow.toml"
    path.write_text(SWEEP_TOML.replace("divisions = [8, 9]", "divisions = [16, 20]")
                    .replace("span = [400.0, 600.0]",
                             "span = [" + ", ".join(str(400.0 + 20 * i) for i in range(12)) + "]"))
    # 72 cases, so that the sweep cannot finish between the first rows and the Ctrl-C
    out = tmp_path / "out"
    proc = subprocess.Popen([sys.executable, "-m", "bridgeopt", "sweep", str(path), "-o",
                             str(out), "--jobs", "2"], stdout=subprocess.PIPE,
                            stderr=subprocess.PIPE, text=True,
                            preexec_fn=lambda: signal.signal(signal.SIGINT, signal.SIG_DFL))
    journal = out / "journal.jsonl"
    deadline = time.monotonic() + 60
    while time.monotonic() < deadline and proc.poll() is None:
        if journal.exists() and len(journal.read_text().splitlines()) >= 2:
            proc.send_signal(signal.SIGINT)   # Ctrl-C, to the sweep's own process only
            break
        time.sleep(0.01)
    _, err = proc.communicate(timeout=60)
    assert proc.returncode == 130, err
    assert "interrupted" in err and "run the same command again" in err
    rows = pd.read_csv(out / "results.csv")
    assert len(rows) == len(Journal(out).finished()) >= 2


@pytest.mark.slow
def test_every_case_bad_is_an_input_error_exit(tmp_path):
    path = tmp_path / "bad.toml"
    path.write_text(SWEEP_TOML.replace("divisions = [8, 9]", "divisions = [7, 9]"))
    run = subprocess.run([sys.executable, "-m", "bridgeopt", "sweep", str(path), "-o",
                          str(tmp_path / "out")], capture_output=True, text=True, timeout=120)
    assert run.returncode == 2
    assert "every case failed" in run.stderr and "bridge.divisions" in run.stderr


@pytest.mark.slow
def test_dask_cluster_gives_the_local_results(finished, tmp_path):
    if os.environ.get("CI"):
        import distributed   # CI installs the test extra, which has it
    else:
        distributed = pytest.importorskip("distributed")
    sweep, _, out, _ = finished
    with distributed.LocalCluster(n_workers=1, threads_per_worker=2, processes=False,
                                  dashboard_address=None) as cluster:
        outcome = run_sweep(sweep, tmp_path / "dask", scheduler=cluster.scheduler_address)
    assert outcome.workers == 2 and len(outcome.ran) == len(sweep)
    local = pd.read_csv(out / "results.csv")
    remote = pd.read_csv(tmp_path / "dask" / "results.csv")
    assert list(remote["status"]) == list(local["status"])
    assert list(remote["key"]) == list(local["key"])
    for col in ("volume_m3", "reference_volume_m3", "ratio"):
        assert np.allclose(remote[col], local[col], rtol=1e-9, equal_nan=True), col


@pytest.mark.slow
def test_cli_scheduler_option(finished, tmp_path, capsys):
    if os.environ.get("CI"):
        import distributed
    else:
        distributed = pytest.importorskip("distributed")
    from bridgeopt.cli import main

    path = tmp_path / "options.toml"
    path.write_text(SWEEP_TOML.replace("divisions = [8, 9]", "divisions = 8")
                    .replace("span = [400.0, 600.0]", "span = 400.0"))
    with distributed.LocalCluster(n_workers=1, threads_per_worker=1, processes=False,
                                  protocol="tcp", dashboard_address=None) as cluster:
        status = main(["sweep", str(path), "-o", str(tmp_path / "out"), "--scheduler",
                       cluster.scheduler_address])
    out = capsys.readouterr().out
    assert status == 0
    assert f"Dask scheduler {cluster.scheduler_address}" in out and "3 ok, 0 failed" in out


@pytest.mark.slow
def test_bad_scheduler_address_is_an_input_error(finished, tmp_path, monkeypatch):
    pytest.importorskip("distributed")
    monkeypatch.setattr("bridgeopt.sweep.run.CONNECT_TIMEOUT", 1.0)
    sweep = finished[0]
    with pytest.raises(InputError) as err:
        run_sweep(sweep, tmp_path / "x", scheduler="tcp://127.0.0.1:9")
    assert err.value.field == "--scheduler"


@pytest.mark.slow
def test_cli_sweep(tmp_path):
    path = tmp_path / "options.toml"
    path.write_text(SWEEP_TOML.replace("divisions = [8, 9]", "divisions = 8"))
    run = subprocess.run([sys.executable, "-m", "bridgeopt", "sweep", str(path), "-o",
                          str(tmp_path / "out"), "--jobs", "2"], capture_output=True,
                         text=True, timeout=120)
    assert run.returncode == 0, run.stderr
    assert "6 cases" in run.stdout and "6 ok, 0 failed" in run.stdout
    assert CAUTION_LINES[0] in run.stdout
    assert "6/6 cases" in run.stderr          # the progress line
    again = subprocess.run([sys.executable, "-m", "bridgeopt", "sweep", str(path), "-o",
                            str(tmp_path / "out")], capture_output=True, text=True, timeout=120)
    assert "6 case(s) already finished" in again.stdout
    bad = subprocess.run([sys.executable, "-m", "bridgeopt", "sweep", str(path)],
                         capture_output=True, text=True, timeout=120)
    assert bad.returncode == 2


def test_sweep_over_a_load_case_study(tmp_path):
    """[[load_case]] entries all apply in every case (not alternatives); each row is compared
    with the heaviest case alone and says how many members each case governs."""
    data = {"name": "Tarnby Flats traffic options",   # a fictional crossing
            "bridge": {"span": [240.0, 300.0], "rise": 60.0, "depth": 0.0, "deck_load": 1.0e5,
                       "arrangement": "single", "divisions": 8},
            "material": {"preset": "weightless-steel"},
            "load_case": [{"name": "full", "pattern": "full", "intensity": 4.0e4},
                          {"name": "half", "pattern": "half", "side": "left",
                           "intensity": 4.0e4}]}
    sweep = expand_sweep(data)
    assert len(sweep.cases) == 2
    outcome = run_sweep(sweep, tmp_path, jobs=1)
    rows = pd.read_csv(tmp_path / "results.csv")
    assert (rows["status"] == "ok").all(), rows["error"].tolist()
    # weightless: carrying both cases needs at least the heaviest case alone (LP bound)
    assert (rows["ratio"] >= 1 - 1e-6).all()
    assert (rows["governs_full"] + rows["governs_half"] == rows["members"]).all()
    assert rows["cost"].notna().all()
    assert outcome is not None
