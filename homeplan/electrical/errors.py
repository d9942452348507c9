"""Errors raised for bad electrical input.

References
----------
None (project convention: bad input is a clear error, never a silent wrong answer).
"""

from __future__ import annotations

__all__ = ["ElectricalInputError", "MethodNotApplicableError"]


class ElectricalInputError(ValueError):
    """Bad electrical input; the message names the field and how to fix it.

    Parameters
    ----------
    field : str
        The input at fault (kept as :attr:`field`), e.g. ``service_amps``.
    message : str
        What is wrong and how to fix it.
    """

    def __init__(self, field: str, message: str) -> None:
        self.field = field
        super().__init__(f"{field}: {message}")


class MethodNotApplicableError(ElectricalInputError):
    """The chosen calculation method does not apply to this home (e.g. 220.87 with solar).

    Parameters
    ----------
    field : str
        The input that rules the method out, e.g. ``has_solar_or_battery``.
    message : str
        Why the method does not apply and what to use instead.
    """
