"""Errors raised by bridgeopt.

Two kinds of failure reach the user:

* :class:`InputError` -- a value the user gave is outside its valid range.  The
  message names the field, the value and the range, on one line.
* :class:`SolveError` -- the optimisation did not reach a proven optimum (the
  problem is infeasible, or HiGHS stopped early).  No design is returned.
"""

from __future__ import annotations

__all__ = ["BridgeoptError", "InputError", "SolveError"]


#: Longest name or value shown whole in a message; longer ones are cut (the rest is elided).
SHOWN = 80


def _shorter(text: str) -> str:
    return text if len(text) <= SHOWN else text[:SHOWN - 8] + " ...(" + str(len(text)) + " chars)"


class BridgeoptError(Exception):
    """Base class of every error bridgeopt raises on purpose."""


class InputError(BridgeoptError, ValueError):
    """A user-supplied value is invalid.

    Parameters
    ----------
    field : str
        Dotted name of the input, as written in a scenario file
        (``"bridge.span"``, ``"support[2].at"``).
    value : object
        The offending value.
    valid : str
        The valid range or choices, in words with units
        (``"> 0 m"``, ``"one of 'x', 'z', 'xz'"``).
    """

    #: The file the value was read from, when not the command's main input file.
    source: str | None = None

    def __init__(self, field: str, value: object, valid: str) -> None:
        self.field = field
        self.value = value
        self.valid = valid
        super().__init__(f"{_shorter(str(field))} = {_shorter(repr(value))} is invalid: "
                         f"valid is {valid}")


class SolveError(BridgeoptError, RuntimeError):
    """The solver did not return a proven optimum; no design exists.

    Parameters
    ----------
    status : str
        Short machine-readable status (``"infeasible"``, ``"span-limit"``,
        ``"solver"``).
    message : str
        A sentence for the engineer saying what went wrong and what to try.
    """

    def __init__(self, status: str, message: str) -> None:
        self.status = status
        self.message = message
        super().__init__(message)
