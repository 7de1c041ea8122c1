"""Names of the crossings a form stands on (issue 11): the scenario's own supports, piers
of intermediate pylons, pier foundations moved for a deck arch."""

from bridgeopt import BridgeScenario, PRESETS, study
from bridgeopt.forms import ArchForm, CableStayedForm, SuspensionForm, form_problem


def bridge(**changes):
    base = dict(span=600.0, rise=120.0, depth=60.0, deck_load=2.0e5, material=PRESETS["steel"],
                divisions=12)
    base.update(changes)
    return BridgeScenario(**base)


def test_crossing_names():
    b = bridge()
    plain = b.to_problem()
    name = study.crossing_name
    assert name(form_problem(b, SuspensionForm()), plain) == ""
    assert name(form_problem(b, CableStayedForm(pylons=1)), plain) == ""
    # 2 pylons per span: one pier at mid-span (on the mirror line); 3: two piers, one in
    # each half; 4: three (two in the half model's interior, one on the mirror line)
    assert name(form_problem(b, CableStayedForm(pylons=2)), plain) == "1 pier"
    assert name(form_problem(b, CableStayedForm(pylons=3)), plain) == "2 piers"
    assert name(form_problem(b, CableStayedForm(pylons=4)), plain) == "3 piers"
    # a deck arch springs from foundations at the envelope's bottom, 60 m down (one grid
    # step of 50 m: the depth clipped to whole steps)
    assert name(form_problem(b, ArchForm(variant="deck-arch")), plain) == \
        "foundations 50 m below the deck"
    assert name(form_problem(bridge(foundation_depth=60.0), ArchForm(variant="deck-arch")),
                bridge(foundation_depth=60.0).to_problem()) == ""
    s = bridge(arrangement="single")
    assert name(form_problem(s, CableStayedForm()), s.to_problem()) == ""
    assert study.series_name("cable-stayed fan", "2 piers") == "cable-stayed fan (2 piers)"
    assert study.series_name("cable-stayed fan", "") == "cable-stayed fan"
