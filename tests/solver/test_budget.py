"""Ground-structure budget: the candidate count against the exact count of the package's
own generator, and refusal of a grid that cannot fit in memory before it is built."""

from __future__ import annotations

import dataclasses
import logging

import pytest

from bridgeopt import PRESETS, BridgeScenario, Domain, InputError, PointLoad, Problem, Support
from bridgeopt.solver import budget
from bridgeopt.solver.ground import build_grid, candidate_pairs


@pytest.mark.parametrize("divisions", [20, 40])
def test_candidate_estimate_matches_the_generator(divisions):
    """6/pi^2 of all pairs are coprime offsets (Hardy & Wright, Thm. 332): within 3 %."""
    problem = BridgeScenario(span=1000.0, rise=500.0, depth=0.0, deck_load=2e5,
                             material=PRESETS["steel"], divisions=divisions).to_problem()
    a, _ = candidate_pairs(problem, build_grid(problem))
    assert budget.candidates(problem) == pytest.approx(len(a), rel=0.03)


def _square(n: float) -> Problem:
    return Problem(domain=Domain.rectangle((0.0, n), (0.0, n)), spacing=1.0,
                   material=PRESETS["steel"], supports=(Support((0.0, 0.0)), Support((0.0, n))),
                   loads=(PointLoad((n, n / 2), (0.0, -1e6)),))


def test_a_grid_that_cannot_fit_is_refused_with_the_spacing_that_fits(monkeypatch):
    from bridgeopt import optimize_layout

    monkeypatch.setattr(budget, "available_bytes", lambda: 2e9)   # a 2 GB machine
    with pytest.raises(InputError) as err:
        optimize_layout(_square(140.0))                            # 141 x 141 nodes
    assert err.value.field == "domain.spacing"
    text = str(err.value)
    assert "candidate members" in text and "GB" in text
    least = float(text.split("at least ")[1].split(" m")[0])
    budget.check_fits(dataclasses.replace(_square(140.0), spacing=least * 1.01))  # enough


def test_long_solves_say_what_they_will_take(caplog):
    with caplog.at_level(logging.INFO, logger="bridgeopt.progress"):
        budget.check_fits(_square(60.0))
    assert "expected about" in caplog.text


def test_member_adding_reports_its_rounds_on_long_solves(caplog, monkeypatch):
    from bridgeopt import optimize_layout
    from bridgeopt.solver import adding

    monkeypatch.setattr(adding, "PROGRESS_AFTER", 0.0)
    problem = BridgeScenario(span=1000.0, rise=500.0, depth=0.0, deck_load=2e5,
                             material=PRESETS["steel"], divisions=20).to_problem()
    with caplog.at_level(logging.INFO, logger="bridgeopt.progress"):
        design = optimize_layout(problem)
    rounds = [r for r in caplog.records if "member adding: round" in r.getMessage()]
    assert rounds and design.stats["rounds"] >= len(rounds)
    assert "proven gap" in rounds[-1].getMessage()
