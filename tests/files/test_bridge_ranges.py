"""A [bridge] file states the same valid ranges as BridgeScenario itself (model/limits.py).

A value the model refuses must be refused by the file reader with the same range in the
message, so that a user reading the error from a file learns the range the solver holds
(a span of 0.5 m used to pass the reader's "> 0" and fail later with another text).
"""

from __future__ import annotations

import pytest

from bridgeopt import PRESETS, BridgeScenario, InputError
from bridgeopt.files.bridge_table import parse_bridge

BASE = {"span": 1000.0, "rise": 300.0, "depth": 0.0, "deck_load": 2e5}


def _file(**bridge):
    return {"bridge": {**BASE, **bridge}, "material": {"preset": "steel"}}


def _model_message(**kw) -> str:
    args = {**BASE, **kw}
    with pytest.raises(InputError) as info:
        BridgeScenario(material=PRESETS["steel"], **args)
    return str(info.value)


@pytest.mark.parametrize("key, value", [
    ("span", 0.5), ("span", 2e5), ("deck_load", 0.5), ("deck_load", 2e9),
    ("rise", 20_000.0), ("depth", 10_001.0),
])
def test_file_reader_refuses_what_the_model_refuses_with_the_same_range(key, value):
    model = _model_message(**{key: value})
    with pytest.raises(InputError) as info:
        parse_bridge(_file(**{key: value}), "ranges")
    text = str(info.value)
    assert text.startswith(f"bridge.{key} = ")
    # the valid range is the model's, word for word
    assert text.split("valid is ", 1)[1] == model.split("valid is ", 1)[1]


@pytest.mark.parametrize("values", [{"span": 1.0, "rise": 1.0}, {"span": 100_000.0, "rise": 30_000.0},
                                    {"deck_load": 1.0}, {"deck_load": 1e9}, {"rise": 10_000.0}])
def test_range_ends_are_accepted_by_both(values):
    parse_bridge(_file(**values), "ranges")
    BridgeScenario(material=PRESETS["steel"], **{**BASE, **values})
