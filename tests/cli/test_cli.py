"""The command line: ``python -m bridgeopt solve|demo|check`` in a subprocess (and in-process)."""

from __future__ import annotations

import json
import math
import subprocess
import sys
from pathlib import Path

import pytest

from bridgeopt import PRESETS, optimize_layout
from bridgeopt.cautions import CAUTION_LINES, CAUTIONS
from bridgeopt.cli import main
from bridgeopt.model.materials import GRAVITY
from bridgeopt.files.scenario import load_scenario

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "studies" / "scenarios" / "demo.toml"
HANGING = ROOT / "studies" / "scenarios" / "hanging_bar.toml"

SMALL = """
name = "small bracket"

[domain]
x = [0.0, 4.0]
z = [0.0, 2.0]
spacing = 0.5

[material]
preset = "steel"

[[support]]
at = [0.0, 0.0]

[[support]]
at = [0.0, 2.0]

[[load]]
at = [4.0, 1.0]
force = [0.0, -1.0e6]
"""

REQUIRED = ("status", "volume", "weight", "nodes", "members", "reactions", "stats", "inputs",
            "units", "cautions")
MEMBER_KEYS = ("start", "end", "sense", "horizontal_force", "volume", "sag", "curve")


def run(*args: str, cwd: Path | None = None) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "bridgeopt", *args], capture_output=True,
                          text=True, timeout=120, cwd=cwd)


@pytest.fixture
def small(tmp_path) -> Path:
    path = tmp_path / "small.toml"
    path.write_text(SMALL)
    return path


def write(tmp_path: Path, text: str, name: str = "case.toml") -> Path:
    path = tmp_path / name
    path.write_text(text)
    return path


def assert_one_error_line(proc, *parts: str) -> str:
    assert proc.stdout == ""
    lines = proc.stderr.strip().splitlines()
    assert len(lines) == 1, proc.stderr
    assert lines[0].startswith("bridgeopt: error: ")
    assert "Traceback" not in proc.stderr
    for part in parts:
        assert part in lines[0]
    return lines[0]


# ---------------------------------------------------------------- solve

@pytest.mark.slow
def test_solve_writes_json_equal_to_optimize_layout(small, tmp_path):
    out = tmp_path / "out.json"
    proc = run("solve", str(small), "--json", str(out))
    assert proc.returncode == 0, proc.stderr
    assert proc.stderr == ""
    data = json.loads(out.read_text())
    for key in REQUIRED:
        assert key in data, key
    direct = optimize_layout(load_scenario(small).problem)
    assert data["status"] == "optimal"
    assert data["volume"] == pytest.approx(direct.volume, rel=1e-9)
    assert data["weight"] == pytest.approx(direct.weight, rel=1e-9)
    assert len(data["members"]) == len(direct.members)
    assert len(data["nodes"]) == len(direct.nodes)
    for m in data["members"]:
        for key in MEMBER_KEYS:
            assert key in m
        assert m["sense"] in ("tension", "compression")
        assert len(m["curve"]) >= 2
        assert 0 <= m["start"] < len(data["nodes"]) and 0 <= m["end"] < len(data["nodes"])
    node = data["nodes"][0]
    assert set(node) == {"x", "z"}
    assert data["cautions"] == list(CAUTION_LINES)
    assert data["units"]["volume"] == "m3" and data["units"]["force"] == "N"
    assert data["inputs"]["name"] == "small bracket"
    # reactions balance the applied load (vertical), self-weight included
    rz = sum(r["rz"] for r in data["reactions"])
    assert rz == pytest.approx(1.0e6 + data["weight"], rel=1e-7)
    assert not list(tmp_path.glob("*.tmp"))


@pytest.mark.slow
def test_solve_summary_has_inputs_results_and_cautions(small):
    proc = run("solve", str(small))
    assert proc.returncode == 0, proc.stderr
    text = proc.stdout
    for part in ("small bracket", "spacing", "0.5 m", "355 MPa", "7,850 kg/m3", "volume",
                 " m3", "weight", " N", " kN", " t)", "members", "nodes", "solve", " s"):
        assert part in text, part
    assert CAUTIONS in text
    for line in CAUTION_LINES:
        assert line in text
    direct = optimize_layout(load_scenario(small).problem)
    assert f"{direct.volume:,.5g} m3" in text


@pytest.mark.slow
def test_full_ground_structure_gives_the_same_volume(small, tmp_path):
    a, b = tmp_path / "a.json", tmp_path / "b.json"
    assert run("solve", str(small), "--json", str(a)).returncode == 0
    proc = run("solve", str(small), "--json", str(b), "--full-ground-structure")
    assert proc.returncode == 0, proc.stderr
    va, vb = json.loads(a.read_text()), json.loads(b.read_text())
    assert vb["volume"] == pytest.approx(va["volume"], rel=1e-7)
    assert vb["stats"]["rounds"] == 1
    assert vb["stats"]["columns"] == vb["stats"]["candidates"]
    assert va["stats"]["columns"] < va["stats"]["candidates"]


@pytest.mark.slow
def test_hanging_bar_through_the_cli(tmp_path):
    """V = P (exp(k h) - 1) / (rho g), k = rho g / sigma (S.P. Timoshenko, Strength of
    Materials, Part I, bar of uniform strength); P = 1 MN, h = 1000 m, S355 steel."""
    out = tmp_path / "bar.json"
    proc = run("solve", str(HANGING), "--json", str(out))
    assert proc.returncode == 0, proc.stderr
    steel = PRESETS["steel"]
    k = steel.density * GRAVITY / steel.tension_strength
    expected = 1.0e6 * math.expm1(k * 1000.0) / (steel.density * GRAVITY)
    assert json.loads(out.read_text())["volume"] == pytest.approx(expected, rel=1e-9)


@pytest.mark.slow
def test_json_replaces_an_existing_file_atomically(small, tmp_path):
    out = tmp_path / "out.json"
    out.write_text("old contents")
    assert run("solve", str(small), "--json", str(out), "--force").returncode == 0
    assert json.loads(out.read_text())["status"] == "optimal"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["out.json", "small.toml"]


@pytest.mark.slow
def test_json_never_replaces_a_file_bridgeopt_did_not_write(small, tmp_path):
    notes = tmp_path / "notes.json"
    notes.write_text('{"meeting": "keep me"}')
    proc = run("solve", str(small), "--json", str(notes))
    assert proc.returncode == 2 and proc.stderr.count("\n") == 1
    assert "--json" in proc.stderr and "--force" in proc.stderr
    assert notes.read_text() == '{"meeting": "keep me"}'
    ours = tmp_path / "ours.json"
    assert run("solve", str(small), "--json", str(ours)).returncode == 0
    assert run("solve", str(small), "--json", str(ours)).returncode == 0   # its own output


@pytest.mark.slow
def test_bridge_json_and_normalised_volume(tmp_path):
    out = tmp_path / "demo.json"
    proc = run("solve", str(DEMO), "--json", str(out))
    assert proc.returncode == 0, proc.stderr
    data = json.loads(out.read_text())
    s = load_scenario(DEMO)
    b = s.bridge
    direct = optimize_layout(b.to_problem())
    assert data["volume"] == pytest.approx(direct.volume, rel=1e-9)
    nv = direct.volume * b.material.tension_strength / (b.deck_load * b.span ** 2)
    assert data["normalised_volume"] == pytest.approx(nv, rel=1e-9)
    assert data["copies"] == 2.0
    assert "normalised volume" in proc.stdout and "whole span" in proc.stdout


# ---------------------------------------------------------------- demo and check

@pytest.mark.slow
def test_demo_subcommand(tmp_path):
    out = tmp_path / "demo.json"
    proc = run("demo", "--json", str(out), cwd=tmp_path)
    assert proc.returncode == 0, proc.stderr
    name = load_scenario(DEMO).name
    assert name in proc.stdout
    assert CAUTIONS in proc.stdout
    for line in CAUTION_LINES:
        assert line in proc.stdout
    data = json.loads(out.read_text())
    assert data["name"] == name
    assert data["volume"] == pytest.approx(optimize_layout(load_scenario(DEMO).problem).volume,
                                           rel=1e-9)


@pytest.mark.slow
def test_check_subcommand(small):
    proc = run("check", str(small))
    assert proc.returncode == 0, proc.stderr
    assert "inputs are valid" in proc.stdout and CAUTIONS in proc.stdout


# ---------------------------------------------------------------- failures

@pytest.mark.slow
def test_bad_value_exits_2_with_one_line_naming_the_key(tmp_path):
    path = write(tmp_path, SMALL.replace("spacing = 0.5", "spacing = 'half'"))
    proc = run("solve", str(path))
    assert proc.returncode == 2
    assert_one_error_line(proc, "domain.spacing", "'half'", "> 0 m")


@pytest.mark.slow
def test_unknown_key_exits_2_and_lists_valid_keys(tmp_path):
    path = write(tmp_path, SMALL + "\n[solve]\nmember_adding = true\nmember_addng = false\n")
    proc = run("solve", str(path))
    assert proc.returncode == 2
    assert_one_error_line(proc, "solve.member_addng", "member_adding")


@pytest.mark.slow
def test_bridge_wrong_type_exits_2(tmp_path):
    text = DEMO.read_text().replace("span = 1800.0", "span = 'abc'")
    proc = run("solve", str(write(tmp_path, text)))
    assert proc.returncode == 2
    assert_one_error_line(proc, "bridge.span = 'abc' is invalid: valid is a number from 1 to 100000 m")


@pytest.mark.slow
def test_load_off_the_grid_exits_2(tmp_path):
    path = write(tmp_path, SMALL.replace("at = [4.0, 1.0]", "at = [4.0, 1.25]"))
    proc = run("solve", str(path))
    assert proc.returncode == 2
    assert_one_error_line(proc, "load[0].at", "grid node")


@pytest.mark.slow
def test_missing_file_and_bad_toml_exit_2(tmp_path):
    proc = run("solve", str(tmp_path / "nothere.toml"))
    assert proc.returncode == 2
    assert_one_error_line(proc, "nothere.toml")
    proc = run("solve", str(write(tmp_path, "[domain\nx = 1\n")))
    assert proc.returncode == 2
    assert_one_error_line(proc, "TOML")


@pytest.mark.slow
def test_unwritable_json_target_exits_2_before_solving(small, tmp_path):
    proc = run("solve", str(small), "--json", str(tmp_path / "no" / "such" / "dir.json"))
    assert proc.returncode == 2
    assert_one_error_line(proc, "--json")


@pytest.mark.slow
def test_solve_error_exits_3(tmp_path):
    # only horizontal restraint: nothing can carry the vertical load to the supports
    text = SMALL.replace("at = [0.0, 0.0]", "at = [0.0, 0.0]\nfix = \"x\"").replace(
        "at = [0.0, 2.0]", "at = [0.0, 2.0]\nfix = \"x\"")
    out = tmp_path / "never.json"
    proc = run("solve", str(write(tmp_path, text)), "--json", str(out))
    assert proc.returncode == 3
    assert_one_error_line(proc, "solve failed", "infeasible")
    assert not out.exists()


@pytest.mark.slow
def test_span_limit_solve_error_exits_3_with_one_line(tmp_path):
    """Equal-strength elements reach at most pi sigma / (rho g) horizontally (catenary of
    equal strength, D. Gilbert 1826, Phil. Trans. R. Soc. 116:202-218): 40.8 m here."""
    text = """
[domain]
x = [0.0, 100000.0]
z = [-10000.0, 0.0]
spacing = 10000.0
[material]
strength = 1.0e6
density = 7850.0
[[support]]
at = [0.0, 0.0]
[[load]]
at = [100000.0, 0.0]
force = [0.0, -1.0]
"""
    proc = run("solve", str(write(tmp_path, text)))
    assert proc.returncode == 3
    line = assert_one_error_line(proc, "span-limit", "pi*sigma/(rho*g)")
    assert f"{math.pi * 1.0e6 / (7850.0 * GRAVITY):.6g} m" in line


@pytest.mark.slow
def test_usage_errors_exit_2_with_one_line():
    proc = run()
    assert proc.returncode == 2
    assert_one_error_line(proc, "command")
    proc = run("solve")
    assert proc.returncode == 2
    assert_one_error_line(proc, "FILE.toml")
    proc = run("frobnicate")
    assert proc.returncode == 2
    assert_one_error_line(proc, "frobnicate")


@pytest.mark.slow
def test_version_and_help():
    proc = run("--version")
    assert proc.returncode == 0 and "bridgeopt" in proc.stdout
    proc = run("solve", "--help")
    assert proc.returncode == 0 and "--full-ground-structure" in proc.stdout


# ---------------------------------------------------------------- in-process main()

def test_main_returns_exit_codes(small, tmp_path, capsys):
    assert main(["solve", str(small)]) == 0
    assert CAUTION_LINES[-1] in capsys.readouterr().out
    bad = write(tmp_path, SMALL.replace('preset = "steel"', 'preset = "unobtainium"'), "bad.toml")
    assert main(["solve", str(bad)]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "material.preset" in err and "'steel'" in err


@pytest.mark.slow
def test_solve_with_geometry_optimization(small, tmp_path):
    out = tmp_path / "go.json"
    plain = run("solve", str(small), "--json", str(tmp_path / "plain.json"))
    proc = run("solve", str(small), "--geometry-optimization", "--json", str(out))
    assert proc.returncode == 0, proc.stderr
    assert "geometry optimization" in proc.stdout and "CAUTION" in proc.stdout
    data = json.loads(out.read_text())
    before = json.loads((tmp_path / "plain.json").read_text())
    assert plain.returncode == 0
    assert data["volume"] <= before["volume"] * (1 + 1e-12)
    assert data["stats"]["history"][0]["volume"] == pytest.approx(before["volume"], rel=1e-9)


@pytest.mark.slow
def test_a_form_on_extra_piers_names_its_crossing_in_the_text_and_the_json(tmp_path):
    scenario = tmp_path / "piers.toml"
    scenario.write_text('name = "Ashgrove Narrows (fictional)"\n[bridge]\nspan = 1200.0\n'
                        'rise = 300.0\ndepth = 60.0\ndeck_load = 1.8e5\ndivisions = 12\n'
                        'foundation_depth = 60.0\n[material]\npreset = "steel"\n'
                        '[form]\ntype = "cable-stayed"\npylons = 2\n')
    out = tmp_path / "piers.json"
    proc = run("solve", str(scenario), "--json", str(out))
    assert proc.returncode == 0, proc.stderr
    assert "reference optimum (1 pier)" in proc.stdout    # two pylons a span: one pier inside
    assert json.loads(out.read_text())["reference_crossing"] == "1 pier"
