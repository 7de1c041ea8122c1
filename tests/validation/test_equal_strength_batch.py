"""The one-pass centrelines and sags of many elements agree with the integrated ODE.

:func:`bridgeopt.solver.elements.centrelines` and :func:`~bridgeopt.solver.elements.sags`
draw every member of a design in one pass per sense.  Checked here against the
same source as the one-element functions: the equal-strength curve's differential
equation z'' = +-k (1 + z'^2) (D. Gilbert 1826, Phil. Trans. R. Soc. 116:202-218),
integrated by scipy's solve_ivp with a shooting method in
``tests/validation/test_equal_strength_cable.py``.  Straight (k = 0) and vertical
elements in the same batch are two-point lines with no sag (common practice: a
weightless bar is straight; a vertical element here is a hanger or a post).
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.optimize import brentq

from bridgeopt.solver.elements import centrelines, sags
from tests.validation.test_equal_strength_cable import _shoot

#: Elements of one k (k lx = 2.5 and 0.5 on a unit or double span), rising, level, falling.
BATCHES = {2.5: [(1.0, 0.0), (1.0, 0.8), (1.0, -1.2)], 0.5: [(2.0, 0.7), (2.0, -1.5)]}


@pytest.mark.parametrize("sense", ["tension", "compression"])
@pytest.mark.parametrize("k", sorted(BATCHES))
def test_batch_matches_the_ode(k, sense):
    """Each element of a batch lies on its integrated curve (1e-8 of lx), with its sag."""
    shapes = BATCHES[k]
    # the elements start at different points, plus one vertical element in between
    p = np.array([[10.0 * i, 2.0 - i] for i in range(len(shapes) + 1)])
    q = p.copy()
    for i, (lx, dz) in enumerate(shapes):
        q[i] += (lx, dz)
    q[-1] += (0.0, 3.0)                              # vertical
    pts = centrelines(p, q, k, sense, n=17)
    sag = sags(p, q, k, sense)
    assert len(pts) == len(p) and sag.shape == (len(p),)
    assert pts[-1].shape == (2, 2) and sag[-1] == 0.0
    for i, (lx, dz) in enumerate(shapes):
        sol = _shoot(lx, dz, k, sense)
        assert pts[i].shape == (17, 2)
        assert np.allclose(pts[i][[0, -1]], [p[i], q[i]], rtol=0, atol=1e-12 * lx)
        x = pts[i][:, 0] - p[i, 0]
        assert np.allclose(pts[i][:, 1] - p[i, 1], sol.sol(x)[0], rtol=0, atol=1e-8 * lx)
        chord = dz / lx
        xs = brentq(lambda t, s=sol, c=chord: s.sol(t)[1] - c, 0.0, lx, xtol=1e-14 * lx)
        assert sag[i] == pytest.approx(abs(sol.sol(xs)[0] - chord * xs), rel=1e-7,
                                       abs=1e-11 * lx)


def test_weightless_batch_is_straight():
    """With k = 0 every element is its chord: two points, no sag."""
    p = np.array([[0.0, 0.0], [5.0, 1.0]])
    q = np.array([[2.0, 1.0], [6.0, -3.0]])
    for sense in ("tension", "compression"):
        pts = centrelines(p, q, 0.0, sense)
        assert [a.shape for a in pts] == [(2, 2), (2, 2)]
        assert np.array_equal(pts[1], np.vstack([p[1], q[1]]))
        assert np.array_equal(sags(p, q, 0.0, sense), [0.0, 0.0])


def test_empty_batch():
    """No elements: no centrelines, no sags (a sense a design does not use)."""
    none = np.zeros((0, 2))
    assert centrelines(none, none, 0.3, "tension") == []
    assert sags(none, none, 0.3, "compression").shape == (0,)
