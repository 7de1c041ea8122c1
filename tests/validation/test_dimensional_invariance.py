"""Dimensional analysis of minimum-volume layouts with self-weight.

Source: dimensional analysis of rigid-plastic layouts (Buckingham's Pi theorem,
E. Buckingham (1914), Phys. Rev. 4:345-376), applied to the statics of
equal-strength elements, common practice.  The volume of a minimum-volume
layout depends on a load P, a length L, the design stresses sigma_t, sigma_c and
the weight per volume rho g only through

    V = (P L / sigma_t) f(k L, sigma_c/sigma_t, geometry ratios),  k = rho g / sigma_t,

because the LP is homogeneous in the forces (each element's weight is
proportional to its force variable) and only k L, stress ratios and shape
ratios are dimensionless.  Hence:

(a) lengths x lam, density x 1/lam, loads x mu  ->  V x lam mu   (k L unchanged);
(b) strengths and density x s                  ->  V x 1/s      (k unchanged);
(c) weightless: V linear in the load and in the length scale;
(d) the same problem in mm, N, N/mm2 (MPa) instead of m, N, Pa gives the same
    dimensionless answer: V[mm3] = 1e9 V[m3].  This guards the dimensionless
    scaling of the LP before HiGHS sees it (method notes, section 6).

Hypothesis draws the problems (small example counts, coarse grids).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import pytest
from bridgeopt import SolveError
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from bridgeopt import (GRAVITY, Domain, LineLoad, Material, PointLoad, Problem, Support,
                       optimize_layout)
from helpers import assert_equilibrium

SETTINGS = settings(max_examples=12, deadline=None, derandomize=True,
                    suppress_health_check=[HealthCheck.too_slow])
REL = 1e-6


@dataclass(frozen=True)
class Case:
    """A small problem in symbols: lengths in some unit, loads, stresses, density."""

    kind: str            # "cantilever" or "bridge"
    length: float        # cantilever length, or full span [length unit]
    shape: float         # depth/length (cantilever) or rise/span (bridge)
    load: float          # tip load, or total deck load [force unit]
    angle: float         # tip-load angle from the downward vertical (cantilever) [rad]
    sigma_t: float
    sigma_c: float
    density: float       # density argument (density * GRAVITY = weight per volume)

    def scaled(self, lam=1.0, mu=1.0, stress=1.0, rho=1.0) -> "Case":
        return Case(self.kind, self.length * lam, self.shape, self.load * mu, self.angle,
                    self.sigma_t * stress, self.sigma_c * stress, self.density * rho)

    def problem(self) -> Problem:
        L = self.length
        mat = Material("m", self.sigma_t, self.sigma_c, self.density)
        if self.kind == "cantilever":
            depth = self.shape * L
            cells_z = round(self.shape * 4)
            supports = tuple(Support((0.0, -depth / 2 + j * depth / cells_z), "xz")
                             for j in range(cells_z + 1))
            force = (self.load * math.sin(self.angle), -self.load * math.cos(self.angle))
            return Problem(domain=Domain.rectangle((0.0, L), (-depth / 2, depth / 2)),
                           spacing=L / 4, material=mat, supports=supports,
                           loads=(PointLoad((L, 0.0), force),))
        rise = self.shape * L
        return Problem(domain=Domain.rectangle((0.0, L / 2), (0.0, rise)), spacing=L / 8,
                       material=mat, supports=(Support((0.0, 0.0), "xz"),),
                       line_loads=(LineLoad((0.0, 0.0), (L / 2, 0.0), self.load / L),),
                       mirror_lines=(L / 2,), copies=2.0)

    def solve(self):
        return optimize_layout(self.problem())


@st.composite
def cases(draw, weightless=False):
    """Cantilevers (4 x 2 or 4 x 4 cells) and half bridges (4 x 2 or 4 x 4 cells).

    k L in [0.3, 1.0] so that self-weight is significant (it adds tens of per
    cent to the volume) but every element can still span (k lx < pi).
    """
    kind = draw(st.sampled_from(["cantilever", "bridge"]))
    length = draw(st.floats(10.0, 3000.0))
    shape = draw(st.sampled_from([0.5, 1.0])) if kind == "cantilever" else \
        draw(st.sampled_from([0.25, 0.5]))
    load = draw(st.floats(1e3, 1e8))
    angle = draw(st.floats(-0.6, 0.6))
    sigma_t = draw(st.floats(100e6, 1000e6))
    sigma_c = sigma_t * draw(st.floats(0.5, 2.0))
    if weightless:
        density = 0.0
    else:
        kl = draw(st.floats(0.3, 1.0))
        density = kl * sigma_t / (GRAVITY * length)
    return Case(kind, length, shape, load, angle, sigma_t, sigma_c, density)


def _same_feasibility(base_case, other_case):
    """Both designs, or None when both problems have no solution.

    Feasibility itself depends only on the dimensionless groups (k L and the
    geometry ratios), so a scaled problem must fail exactly when the base fails,
    with the same status.
    """
    try:
        base = base_case.solve()
    except SolveError as err:
        with pytest.raises(SolveError) as other_err:
            other_case.solve()
        assert other_err.value.status == err.status
        return None
    return base, other_case.solve()


@SETTINGS
@given(case=cases(), lam=st.floats(1e-2, 1e3), mu=st.floats(1e-3, 1e6))
def test_length_and_load_scaling(case, lam, mu):
    """(a) lengths x lam, density x 1/lam, loads x mu: V x lam mu, weight x mu.

    V = (P L/sigma) f(k L, ...) with k L = rho g L / sigma unchanged (Buckingham
    1914, common practice); weight rho g V scales by (1/lam)(lam mu) = mu.
    """
    pair = _same_feasibility(case, case.scaled(lam=lam, mu=mu, rho=1.0 / lam))
    if pair is None:
        return
    base, other = pair
    assert other.volume == pytest.approx(lam * mu * base.volume, rel=REL)
    assert other.weight == pytest.approx(mu * base.weight, rel=REL)
    # self-weight is significant (common practice threshold: > 5 % of the load)
    assert base.weight > 0.05 * case.load


@SETTINGS
@given(case=cases(), s=st.floats(0.1, 10.0))
def test_strength_and_density_scaling(case, s):
    """(b) strengths and density x s: k unchanged, V x 1/s (V = P L f / sigma)."""
    pair = _same_feasibility(case, case.scaled(stress=s, rho=s))
    if pair is None:
        return
    base, other = pair
    assert other.volume == pytest.approx(base.volume / s, rel=REL)
    # the weight rho g V does not change
    assert other.weight == pytest.approx(base.weight, rel=REL)


@SETTINGS
@given(case=cases(weightless=True), lam=st.floats(1e-2, 1e3), mu=st.floats(1e-3, 1e6))
def test_weightless_volume_is_linear_in_load_and_length(case, lam, mu):
    """(c) weightless: V(mu P) = mu V(P) and V(lam L) = lam V(L), weight 0.

    Without self-weight there is no length scale k, so V = (P L/sigma) f(ratios)
    (Maxwell/Michell statics, common practice).
    """
    base = case.solve()
    assert base.weight == 0.0
    assert case.scaled(mu=mu).solve().volume == pytest.approx(mu * base.volume, rel=REL)
    assert case.scaled(lam=lam).solve().volume == pytest.approx(lam * base.volume, rel=REL)


@SETTINGS
@given(case=cases())
def test_millimetre_units_give_the_same_answer(case):
    """(d) the problem in mm, N, N/mm2 gives V[mm3] = 1e9 V[m3] and the same weight.

    Units (common practice): lengths x 1e3 (m -> mm), stresses x 1e-6 (Pa ->
    N/mm2), line loads x 1e-3 (N/m -> N/mm, via the total load kept in N),
    weight per volume x 1e-9 (N/m3 -> N/mm3); bridgeopt multiplies the density
    argument by GRAVITY = 9.80665, so the density argument is scaled by 1e-9.
    """
    si = case.solve()
    mm = case.scaled(lam=1e3, stress=1e-6, rho=1e-9).solve()
    assert mm.volume == pytest.approx(1e9 * si.volume, rel=REL)
    assert mm.weight == pytest.approx(si.weight, rel=REL)
    assert_equilibrium(mm, rtol=1e-8)
    assert_equilibrium(si, rtol=1e-8)
