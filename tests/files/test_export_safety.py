"""Export never replaces a user's files and is all or nothing (the program's own contract)."""

from __future__ import annotations

import pytest

from bridgeopt import InputError
from bridgeopt.files import export as export_module
from bridgeopt.files.export import EXPORT_RECORD, export_design
from bridgeopt.files.scenario import parse_scenario
from bridgeopt.solver.layout import optimize_layout

SCENARIO = {"name": "Brackwater Ford (fictional)", "material": {"preset": "steel"},
            "bridge": {"span": 400.0, "rise": 100.0, "depth": 40.0, "deck_load": 1.0e5,
                       "divisions": 8}}


@pytest.fixture(scope="module")
def design():
    return optimize_layout(parse_scenario(SCENARIO).problem)


def test_a_users_file_at_an_export_name_is_kept(design, tmp_path):
    (tmp_path / "members.csv").write_text("my own table\n")
    with pytest.raises(InputError) as err:
        export_design(design, tmp_path)
    assert err.value.field == "--output" and "members.csv" in str(err.value)
    assert "--force" in str(err.value)
    assert (tmp_path / "members.csv").read_text() == "my own table\n"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["members.csv"]
    export_design(design, tmp_path, force=True)
    assert (tmp_path / "members.csv").read_text() != "my own table\n"


def test_an_earlier_export_is_replaced_without_force(design, tmp_path):
    first = export_design(design, tmp_path, ["csv"])
    again = export_design(design, tmp_path, ["csv", "svg"])
    assert [p.name for p in first] == ["members.csv", "nodes.csv", "README.txt"]
    assert {p.name for p in again} <= {p.name for p in tmp_path.iterdir()}
    assert "design.svg" in (tmp_path / EXPORT_RECORD).read_text().split()


def test_a_failed_write_leaves_the_folder_as_it_was(design, tmp_path, monkeypatch):
    export_design(design, tmp_path)
    before = {p.name: p.read_bytes() for p in tmp_path.iterdir()}

    def broken(*args, **kwargs):
        raise OSError(28, "No space left on device")

    other = optimize_layout(parse_scenario({**SCENARIO, "bridge": {**SCENARIO["bridge"],
                                                                   "span": 500.0}}).problem)
    monkeypatch.setattr(export_module, "write_dxf", broken)
    with pytest.raises(OSError):
        export_design(other, tmp_path)   # another design: its CSV and SVG would differ
    after = {p.name: p.read_bytes() for p in tmp_path.iterdir()}
    assert after == before          # nothing half-written, no temporary folder left


@pytest.mark.parametrize("edit,field,valid", [
    (lambda d: d["members"][0].update(start=10_000), "design JSON members[0].start",
     "a node index from 0 to"),
    (lambda d: d["members"][1].update(end=-1), "design JSON members[1].end", "a node index"),
    (lambda d: d["nodes"][2].update(x=float("nan")), "design JSON nodes[2]", "finite x and z"),
    (lambda d: d.pop("members"), "design JSON key 'members'", "present, as bridgeopt wrote it"),
    (lambda d: d["members"][0].pop("sense"), "design JSON key 'sense'", "present"),
], ids=["bad index", "negative index", "nan coordinate", "missing members", "missing sense"])
def test_a_hand_edited_design_json_is_one_clear_error(design, tmp_path, edit, field, valid):
    import json

    from bridgeopt.files.export import read_design_json

    export_design(design, tmp_path, ["json"])
    data = json.loads((tmp_path / "design.json").read_text())
    edit(data)
    (tmp_path / "edited.json").write_text(json.dumps(data))
    with pytest.raises(InputError) as err:
        read_design_json(tmp_path / "edited.json")
    assert err.value.field == field and valid in str(err.value)
