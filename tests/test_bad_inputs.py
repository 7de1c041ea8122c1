"""Bad input, one row each: the error names the key, the value and the valid range.

The valid ranges are the project's own (bridgeopt.model.limits, docs/limits.md); each row
was a case that gave a wrong answer, a raw exception or no error before it was checked.
"""

from __future__ import annotations

import dataclasses
from pathlib import Path

import numpy as np
import pytest

from bridgeopt import PRESETS, BridgeScenario, InputError, Material
from bridgeopt.files.scenario import parse_scenario

STEEL = PRESETS["steel"]


def _bridge(**changes) -> BridgeScenario:
    base = dict(span=600.0, rise=150.0, depth=60.0, deck_load=1.8e5, material=STEEL,
                divisions=20)
    return BridgeScenario(**{**base, **changes})


def _channel(outline) -> None:
    parse_scenario({"name": "Orrin Cut (fictional)", "material": {"preset": "steel"},
                    "bridge": {"span": 600.0, "rise": 150.0, "depth": 60.0, "deck_load": 1.8e5,
                               "divisions": 20, "channel": [{"outline": outline}],
                               "foundation_depth": 60.0}})   # the pier feet at the bottom


BAD = [
    ("channel reaching above the deck",
     lambda: _channel([[60, -70], [540, -70], [540, 5], [60, 5]]), "bridge.channel[0].outline",
     "[[60.0, -70.0], [540.0, -70.0], [540.0, 5.0], [60.0, 5.0]]",
     "a polygon below the deck: every point at z <= 0 m (the deck is at z = 0; this one "
     "reaches z = 5 m)"),
    ("channel over the abutments",
     lambda: _channel([[-10, -70], [610, -70], [610, 0], [-10, 0]]), "bridge.channel[0].outline",
     "[-10.0, -70.0]", "a channel clear of the supports (it covers the support at [0, -60] m)"),
    # (what, build, field, value text, valid text)
    ("huge deck load", lambda: _bridge(deck_load=1e306), "bridge.deck_load", "1e+306",
     "a number from 1 to 1e+09 N/m"),
    ("vanishing deck load", lambda: _bridge(deck_load=5e-324), "bridge.deck_load", "5e-324",
     "a number from 1 to 1e+09 N/m"),
    ("negative span", lambda: _bridge(span=-5.0), "bridge.span", "-5.0",
     "a number from 1 to 100000 m"),
    ("nan span", lambda: _bridge(span=float("nan")), "bridge.span", "nan",
     "a number from 1 to 100000 m"),
    ("span beyond 100 km", lambda: _bridge(span=1e400), "bridge.span", "inf",
     "a number from 1 to 100000 m"),
    ("rise of many spans", lambda: _bridge(rise=1e7), "bridge.rise", "10000000.0",
     "a number from 0 to 6000 m (10 spans)"),
    ("material by name", lambda: _bridge(material="steel"), "material", "'steel'",
     "a Material, e.g. PRESETS['steel']"),
    ("no material", lambda: _bridge(material=None), "material", "None", "a Material"),
    ("feather-light material", lambda: _bridge(material=dataclasses.replace(STEEL, density=1e-300)),
     "material.density", "1e-300", "0 or a number from"),
    ("absurd strength", lambda: Material("x", 1e300, 355e6, 7850.0),
     "material.tension_strength", "1e+300", "a number from 0.001 to 1e+13 Pa"),
    ("bridge strength beyond practice", lambda: _bridge(material=Material("x", 1e12, 1e12, 7850.0)),
     "material.tension_strength", "1000000000000.0", "a number from 1e+06 to 1e+11 Pa"),
    ("odd divisions", lambda: _bridge(divisions=np.int64(21)), "bridge.divisions", "21",
     "an even whole number from 2 to 240"),
    ("divisions not whole", lambda: _bridge(divisions=20.0), "bridge.divisions", "20.0",
     "an even whole number from 2 to 240"),
]


@pytest.mark.parametrize("what,build,field,value,valid", BAD, ids=[b[0] for b in BAD])
def test_bad_input_names_key_value_and_range(what, build, field, value, valid):
    with pytest.raises(InputError) as err:
        build()
    message = str(err.value)
    assert err.value.field == field
    assert message.startswith(f"{field} = ") and value in message and valid in message
    assert "\n" not in message


def test_numpy_scalars_are_plain_numbers_inside():
    bridge = _bridge(span=np.int64(600), divisions=np.int64(20), deck_load=np.float32(1.8e5))
    assert type(bridge.span) is float and type(bridge.divisions) is int
    assert bridge == _bridge(span=600.0, divisions=20, deck_load=float(np.float32(1.8e5)))


@pytest.mark.parametrize("kind", ["device", "fifo", "huge"])
def test_input_files_that_are_not_plain_small_files_are_refused(tmp_path, kind):
    """`solve /dev/zero` read until MemoryError and a FIFO blocked for ever."""
    import os

    from bridgeopt.files.io import MAX_INPUT_BYTES
    from bridgeopt.files.scenario import load_scenario

    if kind == "device":
        path, valid = "/dev/zero", "a regular scenario file (.toml) (not a device, pipe or socket)"
    elif kind == "fifo":
        path = tmp_path / "pipe.toml"
        os.mkfifo(path)
        valid = "a regular scenario file (.toml) (not a device, pipe or socket)"
    else:
        path = tmp_path / "big.toml"
        with open(path, "wb") as fh:
            fh.truncate(MAX_INPUT_BYTES + 1)
        valid = "a scenario file (.toml) of at most 32 MiB"
    with pytest.raises(InputError) as err:
        load_scenario(path)
    assert err.value.field == "file" and str(path) in str(err.value)
    assert valid in str(err.value)


REPORT_PARAMS = [
    # (--param, valid text the one line must carry)
    ("span=-5", "span from 1 to 100000 m"),
    ("span=nan", "span from 1 to 100000 m"),
    ("span=inf", "span from 1 to 100000 m"),
    ("span=1e400", "span from 1 to 100000 m"),
    ("span=60000.5e1", "span from 1 to 100000 m"),
    ("divisions=2000", "divisions from 0 to 240"),
    ("divisions=31", "divisions an even whole number"),
    ("spann=2400", "a parameter of this notebook: span, rise, depth"),
    ("form=cable-stayed", "form one of 'cable-stayed fan'"),
    ("span=abc", "span a value like 1800.0"),
    ("material=unobtainium", "material one of 'steel'"),
]


EXPLORER = Path(__file__).resolve().parents[1] / "studies" / "explorer.ipynb"


@pytest.mark.parametrize("item,valid", REPORT_PARAMS, ids=[r[0] for r in REPORT_PARAMS])
def test_report_parameters_are_checked_before_the_notebook_runs(item, valid):
    """Each of these exited 0 with an error page, was ignored, or printed colour codes."""
    from bridgeopt.workbook.params import check_parameters

    name, _, text = item.partition("=")
    with pytest.raises(InputError) as err:
        check_parameters(EXPLORER, {name: text})
    assert str(err.value).startswith(f"--param = '{item}' is invalid") and valid in str(err.value)


@pytest.mark.slow
@pytest.mark.parametrize("item", ["span=abc", "spann=2400"])
def test_report_with_a_bad_parameter_exits_2_with_one_plain_line(tmp_path, item):
    import subprocess
    import sys

    out = tmp_path / "r.html"
    proc = subprocess.run([sys.executable, "-m", "bridgeopt", "report", str(EXPLORER), "-o",
                           str(out), "--param", item], capture_output=True, text=True,
                          timeout=120)
    assert proc.returncode == 2, proc.stderr
    assert proc.stderr.count("\n") == 1 and "\x1b" not in proc.stderr
    assert proc.stderr.startswith(f"bridgeopt: error: --param = '{item}' is invalid")
    assert not out.exists()


def test_far_proposal_nodes_are_refused_not_called_the_same_point():
    from bridgeopt.files.proposal import proposal_from_dict

    with pytest.raises(InputError) as err:
        proposal_from_dict({"nodes": [[1e300, 0.0], [1e300 + 10.0, 0.0], [0.0, 0.0]],
                            "members": [[0, 1]]})
    assert err.value.field == "nodes[0]" and "within +-1e+07 m" in str(err.value)


@pytest.mark.slow
def test_judge_names_the_layout_file_for_a_layout_error(tmp_path):
    import subprocess
    import sys

    scenario = tmp_path / "bracket.toml"
    scenario.write_text('name = "bracket"\n[domain]\nx = [0.0, 4.0]\nz = [0.0, 2.0]\n'
                        'spacing = 0.5\n[material]\npreset = "steel"\n[[support]]\n'
                        'at = [0.0, 0.0]\n[[load]]\nat = [4.0, 1.0]\nforce = [0.0, -1.0e6]\n')
    layout = tmp_path / "layout.json"
    layout.write_text('{"nodes": [[0, 0], [4, 1]], "members": [[0, 5]]}')
    proc = subprocess.run([sys.executable, "-m", "bridgeopt", "judge", str(scenario),
                           str(layout)], capture_output=True, text=True, timeout=120)
    assert proc.returncode == 2
    assert f"(in {layout})" in proc.stderr and "bracket.toml" not in proc.stderr


def test_a_huge_key_or_value_is_not_echoed_whole():
    with pytest.raises(InputError) as err:
        parse_scenario({"name": "t", "material": {"preset": "steel"}, "k" * 100_000: 1,
                        "bridge": {"span": 600.0, "rise": 150.0, "depth": 60.0,
                                   "deck_load": 1.8e5, "divisions": 20}})
    assert len(str(err.value)) < 1000 and "100000 chars" in str(err.value)
    assert err.value.field == "k" * 100_000       # the full name stays on the error
    with pytest.raises(InputError) as err:
        _bridge(name="x" * 100_000, span="y" * 100_000)
    assert len(str(err.value)) < 1000


def _bracket(**changes):
    from bridgeopt import Domain, PointLoad, Problem, Support

    base = dict(domain=Domain.rectangle((0.0, 4.0), (0.0, 2.0)), spacing=0.5, material=STEEL,
                supports=(Support((0.0, 0.0)), Support((0.0, 2.0))),
                loads=(PointLoad((4.0, 1.0), (0.0, -1.0e6)),))
    return Problem(**{**base, **changes})


@pytest.mark.parametrize("batch", [-5, 1.5, 0, True, "10"])
def test_optimize_layout_checks_batch(batch):
    from bridgeopt import optimize_layout

    with pytest.raises(InputError) as err:
        optimize_layout(_bracket(), batch=batch)
    assert err.value.field == "batch" and "a whole number >= 1" in str(err.value)


def test_optimize_layout_checks_its_problem_and_flags():
    from bridgeopt import optimize_layout

    with pytest.raises(InputError) as err:
        optimize_layout("bracket.toml")
    assert err.value.field == "problem" and "a bridgeopt Problem" in str(err.value)
    with pytest.raises(InputError) as err:
        optimize_layout(_bracket(), member_adding="yes")
    assert err.value.field == "member_adding" and "True or False" in str(err.value)


LOADS = [
    ("huge point load", lambda: _bracket(loads=(_point((0.0, -1e306)),)), "load.force",
     "magnitude 0.001 to 1e+15 N"),
    ("vanishing point load", lambda: _bracket(loads=(_point((0.0, -5e-324)),)), "load.force",
     "magnitude 0.001 to 1e+15 N"),
    ("huge line load", lambda: _line(1e306), "line_load.intensity", "magnitude 1e-06 to 1e+12"),
    ("text line load", lambda: _line("heavy"), "line_load.intensity", "magnitude"),
    ("point far away", lambda: _point((0.0, -1.0), at=(1e300, 0.0)), "load.at",
     "within +-1e+07 m"),
]


def _point(force, at=(4.0, 1.0)):
    from bridgeopt import PointLoad

    return PointLoad(at, force)


def _line(intensity):
    from bridgeopt import LineLoad

    return LineLoad((0.0, 0.0), (4.0, 0.0), intensity)


@pytest.mark.parametrize("what,build,field,valid", LOADS, ids=[r[0] for r in LOADS])
def test_loads_outside_the_solvers_range_are_refused(what, build, field, valid):
    with pytest.raises(InputError) as err:
        build()
    assert err.value.field == field and valid in str(err.value)


def test_supports_that_hold_x_only_say_why_nothing_carries_the_load():
    from bridgeopt import SolveError, Support, optimize_layout

    problem = _bracket(supports=(Support((0.0, 0.0), "x"), Support((0.0, 2.0), "x")))
    with pytest.raises(SolveError) as err:
        optimize_layout(problem)
    assert err.value.status == "infeasible"
    assert "no support (or mirror line) holds the structure in z" in err.value.message
    assert "fix z at one support at least" in err.value.message


def test_a_design_failing_the_equilibrium_check_is_never_returned():
    from bridgeopt import SolveError
    from bridgeopt.solver.design import accepted

    accepted(12.5, 1e-9)                    # a sound design passes
    for volume, error in [(float("inf"), 0.0), (0.0, 0.0), (10.0, 0.01), (10.0, float("nan"))]:
        with pytest.raises(SolveError) as err:
            accepted(volume, error)
        assert err.value.status == "numerical"


@pytest.mark.parametrize("layout,field", [
    ({"nodes": [{"id": 1, "x": 0.0}, [1.0, 1.0]], "members": [[0, 1]]}, "nodes[0].z"),
    ({"nodes": [[0.0, 0.0], [1.0, 1.0]], "members": [{"start": 0}]}, "members[0].end"),
])
def test_a_missing_key_reads_missing_not_none(layout, field):
    from bridgeopt.files.proposal import proposal_from_dict

    with pytest.raises(InputError) as err:
        proposal_from_dict(layout)
    assert err.value.field == field and str(err.value).startswith(f"{field} = <missing> is")


def test_an_unknown_form_name_in_a_study_says_so_with_the_known_names():
    from bridgeopt import study

    option = study.solve_option(_bridge(divisions=8), "cable staid fan")
    assert option.status == "unavailable"
    assert "not a form bridgeopt knows" in option.message
    assert "did you mean 'cable-stayed fan'?" in option.message


def test_the_least_sag_message_says_what_is_exact_and_what_is_margin():
    """The reach printed is pi*sigma/(rho*g) itself (14,487 m for S355 steel: 355e6 / (7850
    x 9.80665) x pi), not that figure divided by a hidden factor."""
    import math

    from bridgeopt import SolveError
    from bridgeopt.forms import SuspensionForm, solve_form

    steel = PRESETS["steel"]
    reach = math.pi * steel.tension_strength / (steel.density * 9.80665)
    bridge = BridgeScenario(span=12000.0, rise=3000.0, depth=0.0, deck_load=2e5, material=steel,
                            divisions=8)
    with pytest.raises(SolveError) as err:
        solve_form(bridge, SuspensionForm())
    text = err.value.message
    assert f"{reach:.6g} m" in text and "ln(sec(k L/2))/k" in text
    assert "kept 2% above it" in text and "\n" not in text
