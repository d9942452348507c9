"""Read the electrical data tables in ``homeplan/electrical/data``.

Every built-in number (code factors, section labels, nameplate defaults, standard breaker sizes)
lives in a CSV table with a ``source`` column; this module only reads them.

References
----------
NFPA 70 (NEC) 2020 and 2023 editions; the per-row sources are in the tables.
"""

from __future__ import annotations

import csv
from functools import cache
from importlib import resources
from types import MappingProxyType
from typing import Any

from homeplan.electrical.errors import ElectricalInputError

__all__ = [
    "EDITIONS",
    "check_edition",
    "factor",
    "nameplates",
    "practice",
    "section",
    "standard_ocpd_amps",
]

EDITIONS: tuple[int, ...] = (2020, 2023, 2026)


def _rows(filename: str) -> tuple[dict[str, str], ...]:
    text = resources.files("homeplan.electrical").joinpath("data", filename).read_text("utf-8")
    return tuple(dict(row) for row in csv.DictReader(text.splitlines()))


def check_edition(edition: int) -> int:
    """Return ``edition`` or raise :class:`ElectricalInputError` if it is not supported.

    Parameters
    ----------
    edition : int
        NEC edition year, one of :data:`EDITIONS`.

    Returns
    -------
    int
        The same edition year.

    Raises
    ------
    ElectricalInputError
        If the edition is not supported.
    """
    if edition not in EDITIONS:
        raise ElectricalInputError(
            "edition", f"NEC edition {edition!r} is not supported; use one of {list(EDITIONS)}"
        )
    return edition


@cache
def _by_edition(filename: str, key_col: str, value_col: str) -> MappingProxyType[Any, str]:
    out: dict[tuple[str, str], str] = {}
    for row in _rows(filename):
        out[(row["edition"], row[key_col])] = row[value_col]
    return MappingProxyType(out)


def factor(key: str, edition: int) -> float:
    """A numeric code factor for ``edition`` from ``code_factors.csv``.

    Parameters
    ----------
    key : str
        Row key in ``code_factors.csv``, e.g. ``continuous_factor``.
    edition : int
        NEC edition year.

    Returns
    -------
    float
        The factor, in the unit of its row (VA, VA/ft2, A, or a dimensionless multiplier).

    Raises
    ------
    ElectricalInputError
        If the edition is not supported.
    KeyError
        If the table has no such factor for the edition.
    """
    check_edition(edition)
    table = _by_edition("code_factors.csv", "key", "value")
    for ed in (str(edition), "all"):
        if (ed, key) in table:
            return float(table[(ed, key)])
    raise KeyError(f"code factor {key!r} missing for edition {edition}")


def section(rule: str, edition: int) -> str:
    """The NEC section label for ``rule`` in ``edition`` from ``code_sections.csv``.

    Parameters
    ----------
    rule : str
        Rule key in ``code_sections.csv``, e.g. ``existing_optional``.
    edition : int
        NEC edition year.

    Returns
    -------
    str
        Label such as ``NEC 2023 220.83``.

    Raises
    ------
    ElectricalInputError
        If the edition is not supported.
    KeyError
        If the table has no such rule for the edition.
    """
    check_edition(edition)
    table = _by_edition("code_sections.csv", "rule", "section")
    for ed in (str(edition), "all"):
        if (ed, rule) in table:
            return f"NEC {edition} {table[(ed, rule)]}"
    raise KeyError(f"code section {rule!r} missing for edition {edition}")


@cache
def standard_ocpd_amps() -> tuple[int, ...]:
    """Standard breaker and fuse ratings, ascending (NEC 2023 240.6(A)).

    Returns
    -------
    tuple of int
        Ratings, A.
    """
    return tuple(sorted(int(row["amps"]) for row in _rows("standard_ocpd.csv")))


@cache
def nameplates() -> MappingProxyType[str, MappingProxyType[str, str]]:
    """Nameplate defaults by key from ``nameplates.csv``.

    Returns
    -------
    mapping of str to mapping of str to str
        Rows by key, values as text (``va`` in VA, ``volts`` in V).
    """
    return MappingProxyType(
        {row["key"]: MappingProxyType(row) for row in _rows("nameplates.csv")}
    )


def practice(key: str) -> float:
    """A trade-practice number from ``practice.csv`` (marked 'common practice, no source').

    Parameters
    ----------
    key : str
        Row key in ``practice.csv``, e.g. ``ems_min_setpoint_amps``.

    Returns
    -------
    float
        The value, in the unit of its row.

    Raises
    ------
    KeyError
        If the table has no such row.
    """
    for row in _rows("practice.csv"):
        if row["key"] == key:
            return float(row["value"])
    raise KeyError(f"practice value {key!r} missing")
