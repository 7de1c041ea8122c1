"""Scenario files: every key into the right Problem / BridgeScenario field, and bad input."""

from __future__ import annotations

import copy
import math
import tomllib
from pathlib import Path

import pytest

from bridgeopt import PRESETS, BridgeScenario, InputError, Material, optimize_layout
from bridgeopt.cautions import CAUTION_LINES
from bridgeopt.files.design_json import design_to_dict, to_json
from bridgeopt.model.materials import GRAVITY
from bridgeopt.files.scenario import (KEYS, Scenario, SolveOptions, load_scenario,
                                      parse_scenario)
from bridgeopt.study.solve import solve_scenario

ROOT = Path(__file__).resolve().parents[2]
EXAMPLES = sorted((ROOT / "studies" / "scenarios").glob("*.toml"))

LAYOUT = """
name = "all layout keys"
description = "every key once"
copies = 2

[domain]
x = [0.0, 8.0]
z = [-2.0, 4.0]
spacing = 1.0

[[domain.excluded]]
outline = [[3.0, -2.0], [5.0, -2.0], [5.0, -1.0], [3.0, -1.0]]

[material]
name = "tension steel"
tension_strength = 300e6
compression_strength = 200e6
density = 7800.0

[compression_material]
name = "compression stuff"
strength = 50e6
density = 2400.0

[[support]]
at = [0.0, 0.0]
fix = "xz"

[[support]]
at = [0.0, -2.0]
fix = "x"

[[support]]
at = [0.0, 4.0]

[[load]]
at = [6.0, 1.0]
force = [1.0e5, -2.0e5]

[[line_load]]
from = [0.0, 0.0]
to = [8.0, 0.0]
intensity = 3.0e4

[[symmetry]]
x = 8.0

[solve]
member_adding = false
batch = 500
"""

BRIDGE = """
name = "test crossing"

[bridge]
span = 600.0
rise = 120.0
depth = 60.0
deck_load = 1.0e5
arrangement = "single"
divisions = 12

[material]
preset = "steel"
"""


def layout_dict() -> dict:
    return tomllib.loads(LAYOUT)


def bridge_dict() -> dict:
    return tomllib.loads(BRIDGE)


def small_layout() -> dict:
    """A small weightless layout problem, valid as it stands."""
    return {"domain": {"x": [0.0, 2.0], "z": [0.0, 1.0], "spacing": 0.5},
            "material": {"strength": 1.0e8, "density": 0.0},
            "support": [{"at": [0.0, 1.0]}, {"at": [2.0, 1.0]}],
            "load": [{"at": [1.0, 0.0], "force": [0.0, -1.0e5]}]}


# ---------------------------------------------------------------- example files

@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_every_example_parses_and_round_trips(path):
    s = load_scenario(path)
    assert isinstance(s, Scenario)
    assert s.kind in ("layout", "bridge")
    assert s.source == str(path)
    assert parse_scenario(s.to_dict()) == s
    assert s.problem.supports or s.problem.mirror_lines


def test_examples_exist_and_include_demo():
    names = {p.name for p in EXAMPLES}
    assert "demo.toml" in names
    assert len(names) >= 3


def test_packaged_demo_is_the_studies_demo():
    packaged = ROOT / "bridgeopt" / "data" / "demo.toml"
    assert packaged.read_bytes() == (ROOT / "studies" / "scenarios" / "demo.toml").read_bytes()


def test_demo_is_a_bridge_with_a_name():
    s = load_scenario(ROOT / "studies" / "scenarios" / "demo.toml")
    assert s.kind == "bridge"
    assert "crossing" in s.name


# ---------------------------------------------------------------- layout keys

def test_layout_keys_reach_the_problem_fields():
    s = parse_scenario(layout_dict(), source="inline")
    p = s.problem
    assert s.kind == "layout" and s.layout is p and s.bridge is None
    assert s.name == p.name == "all layout keys"
    assert s.description == "every key once"
    assert p.copies == 2.0
    assert p.domain.bounds == (0.0, 8.0, -2.0, 4.0)
    assert p.domain.outline == ((0.0, -2.0), (8.0, -2.0), (8.0, 4.0), (0.0, 4.0))
    assert p.domain.excluded == (((3.0, -2.0), (5.0, -2.0), (5.0, -1.0), (3.0, -1.0)),)
    assert p.spacing == 1.0
    assert p.material == Material("tension steel", 300e6, 200e6, 7800.0)
    assert p.compression_material == Material("compression stuff", 50e6, 50e6, 2400.0)
    assert p.strength("tension") == 300e6 and p.strength("compression") == 50e6
    assert p.density("compression") == 2400.0
    assert [(q.at, q.fix) for q in p.supports] == [((0.0, 0.0), "xz"), ((0.0, -2.0), "x"),
                                                 ((0.0, 4.0), "xz")]
    assert [(q.at, q.force) for q in p.loads] == [((6.0, 1.0), (1.0e5, -2.0e5))]
    (q,) = p.line_loads
    assert (q.start, q.end, q.intensity) == ((0.0, 0.0), (8.0, 0.0), 3.0e4)
    assert p.mirror_lines == (8.0,)
    assert s.solve == SolveOptions(member_adding=False, batch=500)


def test_layout_round_trip_through_to_dict():
    s = parse_scenario(layout_dict())
    again = parse_scenario(s.to_dict())
    assert again == s and again.problem == s.problem


def test_outline_polygon_instead_of_x_z():
    d = small_layout()
    d["domain"] = {"outline": [[0, 0], [2, 0], [2, 1], [1, 1.5], [0, 1]], "spacing": 0.5}
    p = parse_scenario(d).problem
    assert p.domain.outline == ((0.0, 0.0), (2.0, 0.0), (2.0, 1.0), (1.0, 1.5), (0.0, 1.0))
    assert not p.domain.is_box


def test_closed_ring_outline_drops_the_repeated_point():
    d = small_layout()
    d["domain"] = {"outline": [[0, 0], [2, 0], [2, 1], [0, 1], [0, 0]], "spacing": 0.5}
    assert len(parse_scenario(d).problem.domain.outline) == 4


def test_defaults():
    s = parse_scenario(small_layout())
    p = s.problem
    assert s.name == p.name == "layout problem"
    assert p.copies == 1.0
    assert all(q.fix == "xz" for q in p.supports)
    assert p.compression_material is None and p.line_loads == () and p.mirror_lines == ()
    assert p.material.name == "custom"
    assert s.solve == SolveOptions(member_adding=True, batch=None)


def test_material_strength_sets_both_and_density_zero_is_weightless():
    p = parse_scenario(small_layout()).problem
    assert p.material.tension_strength == p.material.compression_strength == 1.0e8
    assert p.weightless and p.k("tension") == 0.0


@pytest.mark.parametrize("preset", sorted(PRESETS))
def test_material_presets(preset):
    d = small_layout()
    d["material"] = {"preset": preset}
    assert parse_scenario(d).problem.material == PRESETS[preset]


def test_preset_values_can_be_overridden():
    d = small_layout()
    d["material"] = {"preset": "steel", "density": 0.0, "name": "weightless S355"}
    m = parse_scenario(d).problem.material
    assert m == Material("weightless S355", 355e6, 355e6, 0.0)


def test_tension_strength_alone_is_enough_with_a_compression_material():
    d = small_layout()
    d["material"] = {"tension_strength": 8e8, "density": 7850.0}
    d["compression_material"] = {"compression_strength": 3e7, "density": 2500.0}
    p = parse_scenario(d).problem
    assert p.strength("tension") == 8e8 and p.strength("compression") == 3e7
    assert p.k("compression") == pytest.approx(2500.0 * GRAVITY / 3e7, rel=1e-15)


# ---------------------------------------------------------------- bridge keys

def test_bridge_keys_reach_the_bridge_scenario():
    s = parse_scenario(bridge_dict())
    b = s.bridge
    assert s.kind == "bridge" and s.layout is None
    assert b == BridgeScenario(span=600.0, rise=120.0, depth=60.0, deck_load=1.0e5,
                               material=PRESETS["steel"], arrangement="single", divisions=12,
                               name="test crossing")
    assert s.problem == b.to_problem()
    assert s.problem.copies == 2.0


def test_bridge_defaults_and_name_inside_the_table():
    d = bridge_dict()
    del d["name"], d["bridge"]["arrangement"], d["bridge"]["divisions"]
    d["bridge"]["name"] = "inner name"
    b = parse_scenario(d).bridge
    assert (b.arrangement, b.divisions, b.name) == ("repeating", 30, "inner name")


def test_bridge_compression_material():
    d = bridge_dict()
    d["material"] = {"preset": "cable-wire"}
    d["compression_material"] = {"preset": "steel"}
    b = parse_scenario(d).bridge
    assert b.material == PRESETS["cable-wire"] and b.compression_material == PRESETS["steel"]
    assert b.to_problem().compression == PRESETS["steel"]


def test_bridge_round_trip():
    s = parse_scenario(bridge_dict())
    assert parse_scenario(s.to_dict()) == s


# ---------------------------------------------------------------- bad input

def _set(d: dict, dotted: str, value):
    """Set ``a.b[0].c`` in nested dict/list data; value None deletes the key."""
    parts = []
    for part in dotted.split("."):
        name, _, idx = part.partition("[")
        parts.append(name)
        if idx:
            parts.append(int(idx.rstrip("]")))
    node = d
    for p in parts[:-1]:
        node = node[p]
    if value is None:
        del node[parts[-1]]
    else:
        node[parts[-1]] = value


BAD_LAYOUT = [
    # (key, bad value, text expected in the message)
    ("domain.spacing", "abc", "> 0 m"),
    ("domain.spacing", -1.0, "> 0 m"),
    ("domain.spacing", 0.0001, "grid cells"),
    ("domain.spacing", 100.0, "m"),
    ("domain.spacing", None, "required"),
    ("domain.x", [8.0, 0.0], "x1 > x0"),
    ("domain.x", [0.0], "[x0, x1]"),
    ("domain.z", "tall", "[z0, z1]"),
    ("domain.z", [1.0, math.inf], "[z0, z1]"),
    ("domain.excluded[0].outline", [[0, 0], [1, 0]], "at least 3 points"),
    ("domain.excluded[0].outline", [[3, -2], [5, -1], [5, -2], [3, -1.5]], "simple polygon"),
    ("material.tension_strength", -5.0, "> 0 Pa"),
    ("material.compression_strength", True, "> 0 Pa"),
    ("material.density", -1.0, ">= 0 kg/m3"),
    ("material.density", "heavy", ">= 0 kg/m3"),
    ("material.name", 3, "text"),
    ("compression_material.strength", 0, "> 0 Pa"),
    ("compression_material.density", math.nan, ">= 0 kg/m3"),
    ("support[1].fix", "y", "'x', 'z', 'xz'"),
    ("support[0].at", [0.0, "a"], "pair [x, z]"),
    ("support[2].at", [0.5, 4.0], "grid node"),
    ("support[0].at", None, "required"),
    ("load[0].at", [6.0, 1.5], "grid node"),
    ("load[0].force", [0.0, 0.0], "not both 0"),
    ("load[0].force", 5.0, "[fx, fz]"),
    ("line_load[0].intensity", 0.0, "!= 0 in N/m"),
    ("line_load[0].intensity", "1e4", "N/m"),
    ("line_load[0].to", [8.0, 1.0], "same height"),
    ("line_load[0].from", [-1.0, 0.0], "grid nodes"),
    ("symmetry[0].x", 4.0, "edge of the domain"),
    ("symmetry[0].x", 20.0, "x in [0, 8]"),
    ("symmetry[0].x", "8", "a number in m"),
    ("copies", 0, "> 0"),
    ("copies", "two", "> 0"),
    ("name", "", "text"),
    ("solve.member_adding", "yes", "true or false"),
    ("solve.batch", 0, "whole number"),
    ("solve.batch", 2.5, "whole number"),
]


BAD_BRIDGE = [
    ("bridge.span", "abc", "a number from 1 to 100000 m"),
    ("bridge.span", -600.0, "a number from 1 to 100000 m"),
    ("bridge.span", True, "a number from 1 to 100000 m"),
    ("bridge.span", None, "required"),
    ("bridge.rise", -1.0, "from 0 to"),
    ("bridge.depth", [60.0], "from 0 to"),
    ("bridge.deck_load", 0.0, "from 1 to 1e+09 N/m"),
    ("bridge.arrangement", "double", "'repeating', 'single'"),
    ("bridge.divisions", 13, "even whole number"),
    ("bridge.divisions", 12.0, "even whole number"),
    ("bridge.divisions", 300, "from 2 to 240"),
    ("bridge.name", 5, "text"),
    ("material.preset", "stainless", "'steel'"),
    ("material", "steel", "table [material]"),
]


@pytest.mark.parametrize("build,key,value,expect",
                         [(layout_dict, *case) for case in BAD_LAYOUT]
                         + [(bridge_dict, *case) for case in BAD_BRIDGE],
                         ids=lambda v: getattr(v, "__name__", str(v))[:30])
def test_bad_values_name_the_key(build, key, value, expect):
    d = build()
    _set(d, key, value)
    with pytest.raises(InputError) as info:
        parse_scenario(d)
    msg = str(info.value)
    assert info.value.field == key
    assert msg.startswith(f"{key} = ")
    assert expect in msg
    assert "\n" not in msg


def test_wrong_type_message_is_exactly_one_clear_line():
    d = bridge_dict()
    d["bridge"]["span"] = "abc"
    with pytest.raises(InputError, match=r"^bridge\.span = 'abc' is invalid: valid is a number "
                                         r"from 1 to 100000 m$"):
        parse_scenario(d)


def test_rise_and_depth_below_one_grid_step_names_rise():
    d = bridge_dict()
    d["bridge"].update(rise=10.0, depth=10.0)
    with pytest.raises(InputError, match="grid step") as info:
        parse_scenario(d)
    assert info.value.field == "bridge.rise"


def test_too_many_divisions_for_the_domain_names_divisions():
    d = bridge_dict()
    d["bridge"].update(rise=6000.0, divisions=240)
    with pytest.raises(InputError) as info:
        parse_scenario(d)
    assert info.value.field == "bridge.divisions"
    assert "grid cells" in str(info.value)


UNKNOWN = [
    # (dict kind, table path or "" for top level, unknown key, valid key that must be listed)
    ("layout", "", "spacingg", "domain"),
    ("layout", "", "excluded", "symmetry"),
    ("layout", "domain", "spaceing", "spacing"),
    ("layout", "domain.excluded[0]", "outlines", "outline"),
    ("layout", "material", "strenght", "tension_strength"),
    ("layout", "compression_material", "densty", "density"),
    ("layout", "support[1]", "fixed", "fix"),
    ("layout", "load[0]", "forces", "force"),
    ("layout", "line_load[0]", "intensity_kN", "intensity"),
    ("layout", "symmetry[0]", "z", "x"),
    ("layout", "solve", "member_addin", "member_adding"),
    ("layout", "solve", "geometry_optimisation", "geometry_optimization"),
    ("bridge", "", "support", "bridge"),
    ("bridge", "", "copies", "material"),
    ("bridge", "bridge", "spam", "deck_load"),
    ("bridge", "bridge", "deckload", "deck_load"),
    ("bridge", "material", "presett", "preset"),
]


@pytest.mark.parametrize("kind,table,key,listed", UNKNOWN, ids=lambda v: str(v)[:24])
def test_unknown_keys_are_caught_and_valid_keys_listed(kind, table, key, listed):
    d = layout_dict() if kind == "layout" else bridge_dict()
    dotted = f"{table}.{key}" if table else key
    _set(d, dotted, 1)
    with pytest.raises(InputError) as info:
        parse_scenario(d)
    assert info.value.field == dotted
    msg = str(info.value)
    assert msg.startswith(dotted + " = ")
    assert listed in msg


def test_every_listed_key_is_accepted_somewhere():
    """KEYS is what the parser checks against: the big examples use every key of each table."""
    d = layout_dict()
    assert set(d) | {"load_case", "cost"} == set(KEYS["layout"])  # in solver/test_multicase.py
    assert set(d["domain"]) | {"outline"} == set(KEYS["domain"])
    assert set(d["material"]) | {"preset", "strength"} == set(KEYS["material"])


def test_array_of_tables_written_as_a_single_table():
    d = layout_dict()
    d["support"] = {"at": [0.0, 0.0]}
    with pytest.raises(InputError, match=r"\[\[support\]\]") as info:
        parse_scenario(d)
    assert info.value.field == "support"


def test_both_outline_and_x_is_refused():
    d = layout_dict()
    d["domain"]["outline"] = [[0, 0], [8, 0], [8, 4]]
    with pytest.raises(InputError) as info:
        parse_scenario(d)
    assert info.value.field == "domain.x"


def test_strength_together_with_tension_strength_is_refused():
    d = layout_dict()
    d["material"]["strength"] = 300e6
    with pytest.raises(InputError) as info:
        parse_scenario(d)
    assert info.value.field == "material.tension_strength"


def test_missing_tables():
    with pytest.raises(InputError) as info:
        parse_scenario({"name": "nothing"})
    assert info.value.field == "domain"
    d = small_layout()
    del d["material"]
    with pytest.raises(InputError) as info:
        parse_scenario(d)
    assert info.value.field == "material"
    d = small_layout()
    del d["load"]
    with pytest.raises(InputError) as info:
        parse_scenario(d)
    assert info.value.field == "load"


def test_bridge_and_domain_together_are_refused():
    d = bridge_dict()
    d["domain"] = small_layout()["domain"]
    with pytest.raises(InputError) as info:
        parse_scenario(d)
    assert info.value.field == "domain"


def test_load_scenario_file_errors(tmp_path):
    with pytest.raises(InputError) as info:
        load_scenario(tmp_path / "missing.toml")
    assert info.value.field == "file"
    bad = tmp_path / "bad.toml"
    bad.write_text("[bridge\nspan = 1\n")
    with pytest.raises(InputError, match="TOML") as info:
        load_scenario(bad)
    assert info.value.field == "file"
    with pytest.raises(InputError, match="directory"):
        load_scenario(tmp_path)


# ---------------------------------------------------------------- solving and physics

def test_hanging_bar_of_uniform_strength():
    """A bar hanging h below its support, carrying P at its foot, with self-weight.

    Bar of uniform strength: V = P (exp(k h) - 1) / (rho g), k = rho g / sigma
    (S.P. Timoshenko, Strength of Materials, Part I: bar of uniform strength);
    weightless, V = P h / sigma.
    """
    s = load_scenario(ROOT / "studies" / "scenarios" / "hanging_bar.toml")
    P, h = 1.0e6, 1000.0
    steel = PRESETS["steel"]
    rho, sigma = steel.density, steel.tension_strength
    k = rho * GRAVITY / sigma
    d = solve_scenario(s).design
    assert d.volume == pytest.approx(P * math.expm1(k * h) / (rho * GRAVITY), rel=1e-9)
    assert d.weight == pytest.approx(P * math.expm1(k * h), rel=1e-9)
    light = s.to_dict()
    light["material"]["density"] = 0.0
    light_volume = solve_scenario(parse_scenario(light)).design.volume
    assert light_volume == pytest.approx(P * h / sigma, rel=1e-9)


def test_two_bar_truss_weightless():
    """Load P at (1, 0) m between pins at (0, 1) and (2, 1) m: two bars at 45 degrees.

    Statics (method of joints): V = P (a^2 + h^2) / (h sigma) = 2 P a / sigma for
    a = h = 1 m.  No structure in the domain does better: the virtual displacement
    u = (0, 2|x - 1| - 2) is zero at the pins, -2 at the load, and a pure shear of
    principal strains +-1, so V >= 2 P / sigma (Michell's lower bound: A.G.M.
    Michell 1904, "The limits of economy of material in frame-structures", Phil.
    Mag. 8:589-597).
    """
    d = solve_scenario(parse_scenario(small_layout())).design
    P, a, sigma = 1.0e5, 1.0, 1.0e8
    assert d.volume == pytest.approx(2 * P * a / sigma, rel=1e-9)
    assert d.weight == 0.0


def test_solve_options_are_used_and_agree():
    d = small_layout()
    d["domain"]["spacing"] = 0.25
    base = parse_scenario(d)
    full = base.with_solve(member_adding=False)
    assert full.solve.member_adding is False and full.problem == base.problem
    v1, v2 = solve_scenario(base).design.volume, solve_scenario(full).design.volume
    assert v1 == pytest.approx(v2, rel=1e-7)
    assert solve_scenario(base, member_adding=False).design.stats["rounds"] == 1


def test_solve_scenario_equals_optimize_layout_for_a_bridge():
    s = parse_scenario(bridge_dict())
    d = solve_scenario(s).design
    assert d.volume == pytest.approx(optimize_layout(s.bridge.to_problem()).volume, rel=1e-12)
    assert d.copies == 2.0


def test_weightless_bridge_normalised_volume_does_not_depend_on_scale():
    """Without self-weight the optimum scales as q L^2 / sigma (dimensional analysis)."""
    vols = []
    for span, q in ((600.0, 1.0e5), (3000.0, 4.0e5)):
        d = bridge_dict()
        d["bridge"].update(span=span, rise=span / 5, depth=span / 10, deck_load=q)
        d["material"] = {"preset": "weightless-steel"}
        s = parse_scenario(d)
        vols.append(s.bridge.normalised_volume(solve_scenario(s).design.volume))
    assert vols[0] == pytest.approx(vols[1], rel=1e-8)


def test_export_dict_is_strict_json_with_cautions():
    s = parse_scenario(layout_dict())
    d = solve_scenario(s).design
    out = design_to_dict(d, scenario=s)
    to_json(out)  # raises on NaN / infinity
    assert out["volume"] == d.volume and out["weight"] == d.weight
    assert out["cautions"] == list(CAUTION_LINES)
    assert out["inputs"] == s.to_dict()
    assert parse_scenario(copy.deepcopy(out["inputs"])) == s
    assert len(out["members"]) == len(d.members)
    assert sum(m["volume"] for m in out["members"]) * d.copies == pytest.approx(d.volume)


def test_full_examples_in_the_documentation_parse():
    import re

    text = (ROOT / "docs" / "scenario.md").read_text()
    blocks = [b for b in re.findall(r"```toml\n(.*?)```", text, flags=re.S) if "[material]" in b]
    kinds = [parse_scenario(tomllib.loads(b), source="docs/scenario.md").kind for b in blocks]
    assert "layout" in kinds and "bridge" in kinds


def test_documentation_lists_every_key():
    text = (ROOT / "docs" / "scenario.md").read_text()
    for table, keys in KEYS.items():
        for key in keys:
            assert f"`{key}`" in text or f"[{key}]" in text or f"[[{key}]]" in text, (table, key)


def test_geometry_optimization_key():
    d = bridge_dict()
    d["solve"] = {"geometry_optimization": True}
    sc = parse_scenario(d)
    assert sc.solve.geometry_optimization is True
    assert parse_scenario(sc.to_dict()).solve.geometry_optimization is True
    d["solve"] = {"geometry_optimization": "yes"}
    with pytest.raises(InputError) as info:
        parse_scenario(d)
    assert info.value.field == "solve.geometry_optimization" and "true or false" in str(info.value)
