"""Errors raised for bad electrical input.

References
----------
None (project convention: bad input is a clear error, never a silent wrong answer).
"""

from __future__ import annotations


class ElectricalInputError(ValueError):
    """Bad electrical input; the message names the field and how to fix it."""

    def __init__(self, field: str, message: str) -> None:
        self.field = field
        super().__init__(f"{field}: {message}")


class MethodNotApplicableError(ElectricalInputError):
    """The chosen calculation method does not apply to this home (e.g. 220.87 with solar)."""
