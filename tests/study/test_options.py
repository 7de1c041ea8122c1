"""Option studies: the form registry, comparisons, sweeps and quantities (bridgeopt.study.options)."""

import dataclasses
import math

import numpy as np
import pytest

from bridgeopt import PRESETS, BridgeScenario, InputError, SolveError, optimize_layout, study
from bridgeopt.forms.quantities import on_mirror_line

STEEL = PRESETS["steel"]


def _bridge(**kw):
    base = dict(span=1200.0, rise=300.0, depth=100.0, deck_load=1.5e5, material=STEEL,
                arrangement="single", divisions=12, name="test crossing")
    base.update(kw)
    return BridgeScenario(**base)


@pytest.fixture
def registry():
    """Leave the registry as it was after the test."""
    study.available_forms()          # the package's forms are registered first
    saved = dict(study.FORM_SOLVERS)
    yield study
    study.FORM_SOLVERS.clear()
    study.FORM_SOLVERS.update(saved)


def _low_form(bridge, options):
    """A stand-in form: the optimum with half the rise (a subset of the reference's domain)."""
    with np.errstate(over="ignore"):
        return optimize_layout(dataclasses.replace(bridge, rise=bridge.rise / 2).to_problem())


def test_unregistered_form_is_unavailable_not_an_error(registry):
    registry.unregister_form("suspension")
    table = study.compare(_bridge(), ["suspension"])
    assert list(table["option"]) == [study.REFERENCE, "suspension"]
    ref, form = table.iloc[0], table.iloc[1]
    assert ref["status"] == "optimal" and ref["ratio_to_reference"] == pytest.approx(1.0)
    assert form["status"] == "unavailable" and math.isnan(form["volume_m3"])
    assert "not available" in form["message"]


def test_registered_form_is_compared_with_the_reference(registry):
    registry.register_form("low test form", _low_form)
    bridge = _bridge()
    table = study.compare(bridge, ["low test form"]).set_index("option")
    ref = optimize_layout(bridge.to_problem()).volume
    low = optimize_layout(dataclasses.replace(bridge, rise=150.0).to_problem()).volume
    assert table.loc[study.REFERENCE, "volume_m3"] == pytest.approx(ref, rel=1e-9)
    assert table.loc["low test form", "ratio_to_reference"] == pytest.approx(low / ref, rel=1e-9)
    # the reference is the least volume over a domain containing the form's
    assert table.loc["low test form", "ratio_to_reference"] >= 1 - 1e-7
    sigma = STEEL.tension_strength
    assert table.loc[study.REFERENCE, "normalised_volume"] == pytest.approx(
        ref * sigma / (bridge.deck_load * bridge.span ** 2), rel=1e-12)
    assert "low test form" in study.available_forms()


@pytest.mark.parametrize("error", [SolveError("infeasible", "no structure fits"),
                                   InputError("form.pylons", 9, "1 to 4")])
def test_failing_form_is_reported_and_the_rest_carries_on(registry, error):
    def broken(bridge, options):
        raise error

    registry.register_form("broken", broken)
    table = study.compare(_bridge(), ["broken"]).set_index("option")
    assert table.loc["broken", "status"] == "failed"
    assert math.isnan(table.loc["broken", "volume_m3"])
    expected = "infeasible" if isinstance(error, SolveError) else "form.pylons"
    assert expected in table.loc["broken", "message"]
    assert table.loc[study.REFERENCE, "status"] == "optimal"


def test_register_rejects_bad_names_and_solvers(registry):
    with pytest.raises(InputError):
        registry.register_form(study.REFERENCE, _low_form)
    with pytest.raises(InputError):
        registry.register_form("", _low_form)
    with pytest.raises(InputError):
        registry.register_form("x", "not callable")


def test_span_sweep_keeps_proportions_and_reports_progress():
    calls = []
    spans = [600.0, 1200.0, 2400.0]
    table = study.span_sweep(_bridge(), spans, ["not a form"],
                             progress=lambda done, total: calls.append((done, total)))
    assert calls == [(1, 3), (2, 3), (3, 3)]
    ref = table[table["option"] == study.REFERENCE]
    assert list(ref["span_m"]) == spans
    np.testing.assert_allclose(ref["rise_m"] / ref["span_m"], 0.25)
    np.testing.assert_allclose(ref["depth_m"] / ref["span_m"], 100.0 / 1200.0)
    length = STEEL.tension_strength / (STEEL.density * 9.80665)
    np.testing.assert_allclose(ref["normalised_span"], ref["span_m"] / length)
    assert set(table.loc[table["option"] == "not a form", "status"]) == {"unavailable"}
    # self-weight makes longer spans dearer per unit of deck_load span^2 / sigma
    assert np.all(np.diff(ref["normalised_volume"]) > 0)


def test_height_sweep_volume_does_not_fall_as_the_rise_is_cut():
    bridge = _bridge(divisions=16)
    rises = [600.0, 300.0, 150.0, 75.0]
    table = study.height_sweep(bridge, rises)
    ref = table[table["option"] == study.REFERENCE]
    assert list(ref["status"]) == ["optimal"] * 4
    # nested domains on one grid: less room can never need less material
    assert np.all(np.diff(ref["volume_m3"]) >= -1e-7 * ref["volume_m3"].iloc[0])
    np.testing.assert_allclose(ref["span_to_rise"], [2.0, 4.0, 8.0, 16.0])


def test_height_sweep_reports_a_refused_rise_as_failed():
    bridge = _bridge(depth=0.0)
    table = study.height_sweep(bridge, [300.0, 0.0])
    row = table[(table["rise_m"] == 0.0) & (table["option"] == study.REFERENCE)].iloc[0]
    assert row["status"] == "failed" and "bridge.rise" in row["message"]


def test_pylon_sweep_passes_the_pylon_count(registry):
    seen = []

    def form(bridge, options):
        seen.append(options["pylons"])
        return _low_form(bridge, options)

    registry.register_form("counting form", form)
    table = study.pylon_sweep(_bridge(), [1200.0], [1, 3], ["counting form"])
    assert sorted(seen) == [1, 3]
    assert sorted(table["pylons"].unique()) == [1, 3]
    assert len(table) == 4  # reference and form for each count


def test_quantities_add_up_to_the_design():
    bridge = _bridge()
    design = study.solve_reference(bridge)
    q = study.quantities(design)
    total = q[q["group"] == "total"].iloc[0]
    parts = q[q["group"] != "total"]
    assert total["volume_m3"] == pytest.approx(design.volume, rel=1e-12)
    assert total["weight_N"] == pytest.approx(design.weight, rel=1e-9)
    assert total["members"] == len(design.members)
    assert set(parts["sense"]) <= {"tension", "compression"}
    # centreline length is at least the chord length of every member; a member on a mirror
    # line is one member of the whole structure, counted once (issue 11: it was doubled)
    chords = np.hypot(*(design.nodes[design.members.end] - design.nodes[design.members.start]).T)
    copies = np.where(on_mirror_line(design), 1.0, design.copies)
    assert total["length_m"] >= (copies * chords).sum() * (1 - 1e-12)


def test_inputs_table_states_units():
    t = study.inputs_table(_bridge())
    units = dict(zip(t["input"], t["unit"]))
    assert units["span"] == "m" and units["deck load"] == "kN/m" and units["density"] == "kg/m3"


def test_forms_of_the_package_are_offered_and_judged_on_their_own_supports(registry):
    """A two-pylon cable-stayed form stands on an extra pier: its ratio is taken against the
    optimum with that pier too, which is the lower bound for it (LP optimum over a ground
    structure that contains the form's members on the same supports)."""
    from bridgeopt.forms import CableStayedForm, form_problem

    bridge = _bridge(arrangement="repeating", divisions=16)
    assert "cable-stayed fan" in study.available_forms()
    table = study.compare(bridge, ["cable-stayed fan"], {"pylons": 2}).set_index("option")
    row = table.loc["cable-stayed fan"]
    assert row["status"] == "optimal", row["message"]
    spec = CableStayedForm(pattern="fan", pylons=2)
    with np.errstate(over="ignore"):
        fair = optimize_layout(form_problem(bridge, spec)).volume
    assert row["reference_volume_m3"] == pytest.approx(fair, rel=1e-9)
    assert row["reference_volume_m3"] < table.loc[study.REFERENCE, "volume_m3"]  # the pier helps
    assert row["ratio_to_reference"] == pytest.approx(row["volume_m3"] / fair, rel=1e-12)
    assert row["ratio_to_reference"] >= 1 - 1e-7
