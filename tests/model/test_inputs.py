"""Model inputs: a bad bridge or material names its field, the value and the valid range."""

import pytest

from bridgeopt import PRESETS, BridgeScenario, InputError, Material

#: A valid bridge; each case below changes one field of it.
VALID = dict(span=1000.0, rise=250.0, depth=100.0, deck_load=2e5, material=PRESETS["steel"],
             arrangement="repeating", divisions=16)


@pytest.mark.parametrize("field,kw,valid", [
    ("bridge.span", dict(span=-5.0), "a number from 1 to 100000 m"),
    ("bridge.divisions", dict(divisions=7), "even"),
    ("bridge.arrangement", dict(arrangement="cantilever"), "repeating"),
    ("bridge.deck_load", dict(deck_load=0.0), "a number from 1 to 1e+09 N/m"),
])
def test_bad_bridge_input_names_field_value_and_range(field, kw, valid):
    with pytest.raises(InputError) as err:
        BridgeScenario(**{**VALID, **kw})
    msg = str(err.value)
    assert field in msg and valid in msg and repr(next(iter(kw.values()))) in msg


def test_material_rejects_bad_strength():
    with pytest.raises(InputError, match="material.tension_strength"):
        Material("x", -1.0, 1.0, 0.0)
