"""The ranges of input the solver is built and tested for, and the one check that holds them.

The LP is solved in dimensionless form, so any consistent set of values would do in
exact arithmetic; in floating point, loads, strengths and lengths many orders of
magnitude from practice give overflowing or vanishing coefficients.  The ranges below
cover every structure a concept study meets, with wide margins (docs/limits.md).
"""

from __future__ import annotations

import math
import numbers

from bridgeopt.errors import InputError

__all__ = ["SPAN", "DECK_LOAD", "STRENGTH", "DENSITY", "HEIGHT_PER_SPAN", "FORCE", "INTENSITY",
           "COORDINATE",
           "checked_number", "checked_whole"]

#: Span of a bridge scenario. [m]
SPAN = (1.0, 100_000.0)
#: Height allowed above or below the deck, as a multiple of the span. [-]
HEIGHT_PER_SPAN = 10.0
#: Uniform deck load. [N/m]
DECK_LOAD = (1.0, 1.0e9)
#: Design stress in tension or compression. [Pa]
STRENGTH = (1.0e6, 1.0e11)
#: Mass density, when not 0 (weightless). [kg/m3]
DENSITY = (1.0, 30_000.0)
#: Magnitude of a point load. [N]
FORCE = (1.0e-3, 1.0e15)
#: Magnitude of a line load's intensity. [N/m]
INTENSITY = (1.0e-6, 1.0e12)
#: Largest coordinate of a point of a problem (10,000 km). [m]
COORDINATE = 1.0e7


def checked_number(field: str, value: object, *, low: float, high: float, unit: str,
                   zero_ok: bool = False) -> float:
    """``value`` as a float when it is a real number in ``[low, high]`` (or 0 if allowed).

    Numpy scalars are accepted; bools, text, nan and infinities are not.

    Parameters
    ----------
    field : str
        Name of the input as the user writes it (``bridge.span``), for the message.
    value : object
        The value given.
    low, high : float
        Valid range, both ends included. [unit]
    unit : str
        Unit written after the range in the message (``m``, ``N/m``, ``Pa`` ...).
    zero_ok : bool
        Whether 0 is valid too (outside the range).

    Returns
    -------
    float

    Raises
    ------
    InputError
        Naming the field, the value and the valid range.
    """
    ok = isinstance(value, numbers.Real) and not isinstance(value, bool)
    number = float(value) if ok else math.nan
    if ok and math.isfinite(number) and (low <= number <= high or (zero_ok and number == 0)):
        return number
    valid = f"a number from {low:g} to {high:g} {unit}"
    raise InputError(field, value, f"0 or {valid}" if zero_ok else valid)


def checked_whole(field: str, value: object, *, low: int, high: int, even: bool = False) -> int:
    """``value`` as an int when it is a whole number in ``[low, high]`` (numpy ints accepted).

    Parameters
    ----------
    field : str
        Name of the input as the user writes it, for the message.
    value : object
        The value given.
    low, high : int
        Valid range, both ends included. [-]
    even : bool
        Whether the number must be even.

    Returns
    -------
    int

    Raises
    ------
    InputError
        Naming the field, the value and the valid range.
    """
    ok = isinstance(value, numbers.Integral) and not isinstance(value, bool)
    if ok and low <= int(value) <= high and not (even and int(value) % 2):
        return int(value)
    raise InputError(field, value, f"an {'even ' if even else ''}whole number from "
                     f"{low} to {high}")
