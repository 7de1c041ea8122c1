"""Export of a solved design: CSV and JSON round-trips, SVG as XML, DXF re-read with ezdxf.

Checks compare the files with the in-memory design they were written from; the
drawing conventions (one layer or group per element group, curved members as
polylines) are this project's own (docs/formats.md).
"""

from __future__ import annotations

import json
import subprocess
import sys
import xml.etree.ElementTree as ET
from collections import defaultdict

import numpy as np
import pandas as pd
import pytest

from bridgeopt import InputError
from bridgeopt.cautions import CAUTION_LINES, CAUTIONS
from bridgeopt.files.drawing import NOTES_LAYER, layer_name
from bridgeopt.forms import solve_form
from bridgeopt.files.export import design_from_dict, export_design, read_design_json
from bridgeopt.files.scenario import parse_scenario

SCENARIO = {
    "name": "Orrin Gap suspension option",   # a fictional crossing
    "bridge": {"span": 800.0, "rise": 200.0, "depth": 40.0, "deck_load": 1.5e5,
               "divisions": 10},
    "material": {"preset": "steel"},
    "form": {"type": "suspension"},
}
SVG = "{http://www.w3.org/2000/svg}"


@pytest.fixture(scope="module")
def exported(tmp_path_factory):
    scenario = parse_scenario(SCENARIO)
    form = solve_form(scenario.bridge, scenario.form)
    folder = tmp_path_factory.mktemp("export")
    written = export_design(form.design, folder, scenario=scenario, form=form)
    return form.design, folder, written


def test_every_file_is_written(exported):
    _, folder, written = exported
    names = sorted(p.name for p in written)
    assert names == sorted(["members.csv", "nodes.csv", "design.json", "design.svg",
                            "design.dxf", "README.txt"])
    readme = (folder / "README.txt").read_text()
    assert all(line in readme for line in CAUTION_LINES)


def test_csv_round_trip(exported):
    design, folder, _ = exported
    members = pd.read_csv(folder / "members.csv")
    expected = design.to_frame()
    assert list(members["id"]) == list(range(len(expected)))
    pd.testing.assert_frame_equal(members.drop(columns="id"), expected, check_exact=False,
                                  rtol=1e-15, check_dtype=False)
    nodes = pd.read_csv(folder / "nodes.csv")
    pd.testing.assert_frame_equal(nodes.drop(columns="id"), design.nodes_frame(),
                                  check_exact=False, rtol=1e-15, check_dtype=False)


def test_json_round_trip(exported):
    design, folder, _ = exported
    back = read_design_json(folder / "design.json")
    assert back.volume == design.volume and back.weight == design.weight
    assert back.problem == design.problem
    np.testing.assert_array_equal(back.nodes, design.nodes)
    for name in ("start", "end", "sense", "group", "volume", "sag", "horizontal_force",
                 "force_start", "force_end"):
        np.testing.assert_array_equal(getattr(back.members, name),
                                      getattr(design.members, name), err_msg=name)
    for a, b in zip(back.members.curves, design.members.curves):
        np.testing.assert_array_equal(a, b)
    np.testing.assert_array_equal(back.loads, design.loads)
    data = json.loads((folder / "design.json").read_text())
    assert data["caution"] == CAUTIONS
    assert data["volume_ratio"] == pytest.approx(design.volume / data["reference_volume"])


def test_json_that_is_not_a_design_is_refused():
    with pytest.raises(InputError):
        design_from_dict({"nodes": [], "members": []})


def test_svg_is_valid_xml_with_one_polyline_per_member(exported):
    design, folder, _ = exported
    root = ET.parse(folder / "design.svg").getroot()
    assert root.tag == f"{SVG}svg"
    lines = root.findall(f".//{SVG}polyline")
    assert len(lines) == len(design.members)
    groups = {g.get("data-group") for g in root.findall(f"{SVG}g") if g.get("data-group")}
    assert groups == set(design.members.group.tolist())
    text = " ".join(t.text or "" for t in root.iter(f"{SVG}tspan"))
    assert "Not checked: buckling" in text


def _dxf_polylines(path):
    import ezdxf

    doc = ezdxf.readfile(path)
    out = defaultdict(list)
    notes = []
    for e in doc.modelspace():
        if e.dxftype() == "LINE":
            out[e.dxf.layer].append(np.array([tuple(e.dxf.start)[:2], tuple(e.dxf.end)[:2]]))
        elif e.dxftype() == "LWPOLYLINE":
            out[e.dxf.layer].append(np.array([p[:2] for p in e.get_points()]))
        elif e.dxftype() == "MTEXT":
            notes.append((e.dxf.layer, e.text))
    return doc, out, notes


def _key(points: np.ndarray) -> tuple:
    return tuple(np.round(points.ravel(), 6))


def test_dxf_round_trip_same_geometry_per_layer(exported):
    design, folder, _ = exported
    doc, layers, notes = _dxf_polylines(folder / "design.dxf")
    m = design.members
    expected = defaultdict(list)
    for i in range(len(m)):
        expected[layer_name(m.group[i])].append(np.asarray(m.curves[i]))
    assert set(layers) == set(expected)
    for layer, curves in expected.items():
        got = sorted(_key(c) for c in layers[layer])
        want = sorted(_key(c) for c in curves)
        assert len(got) == len(want), layer
        for g, w in zip(got, want):
            np.testing.assert_allclose(g, w, rtol=0, atol=1e-9 * 800)
    # the suspension cable sags under its own weight: drawn as polylines, not lines
    assert any(len(c) > 2 for c in layers[layer_name("cable")])
    assert any(layer == NOTES_LAYER and "Not checked: buckling" in text.replace("\\P", " ")
               for layer, text in notes)
    assert doc.header["$INSUNITS"] == 6   # metres


@pytest.mark.slow
def test_cli_export_from_a_scenario_and_from_json(tmp_path):
    scenario = tmp_path / "s.toml"
    scenario.write_text('name = "Orrin Gap"\n[bridge]\nspan = 400.0\nrise = 100.0\n'
                        'depth = 40.0\ndeck_load = 1.0e5\ndivisions = 8\n'
                        '[material]\npreset = "steel"\n')
    run = subprocess.run([sys.executable, "-m", "bridgeopt", "export", str(scenario), "-o",
                          str(tmp_path / "a")], capture_output=True, text=True, timeout=120)
    assert run.returncode == 0, run.stderr
    assert CAUTION_LINES[3] in run.stdout
    again = subprocess.run([sys.executable, "-m", "bridgeopt", "export",
                            str(tmp_path / "a" / "design.json"), "-o", str(tmp_path / "b"),
                            "--formats", "csv,svg"], capture_output=True, text=True, timeout=120)
    assert again.returncode == 0, again.stderr
    assert (tmp_path / "b" / "members.csv").read_text() == \
        (tmp_path / "a" / "members.csv").read_text()
    assert not (tmp_path / "b" / "design.dxf").exists()
    bad = subprocess.run([sys.executable, "-m", "bridgeopt", "export", str(scenario), "-o",
                          str(tmp_path / "c"), "--formats", "pdf"], capture_output=True,
                         text=True, timeout=120)
    assert bad.returncode == 2 and "--formats" in bad.stderr
