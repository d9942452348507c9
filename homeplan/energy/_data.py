"""Cached readers for the built-in tables in ``homeplan/energy/data`` (every row has a source)."""

from __future__ import annotations

import csv
from functools import cache
from pathlib import Path
from types import MappingProxyType

__all__ = [
    "DATA_DIR",
    "calibration_setting",
    "table_value",
    "constant",
    "efficiency",
    "emission_factor",
    "heat_pump_class",
    "heat_pump_classes",
    "hourly_profile",
    "price_row",
    "read_table",
]

DATA_DIR = Path(__file__).parent / "data"


@cache
def read_table(name: str) -> tuple[MappingProxyType[str, str], ...]:
    """Rows of ``data/<name>.csv`` as read-only dicts of strings (cached).

    Parameters
    ----------
    name : str
        Table name without ``.csv``, e.g. ``prices``.

    Returns
    -------
    tuple of mapping of str to str
        The rows, values as text in the units the column names give.

    Raises
    ------
    FileNotFoundError
        If there is no such table.
    ValueError
        If a row has no source.
    """
    with (DATA_DIR / f"{name}.csv").open(newline="", encoding="utf-8") as fh:
        rows = tuple(MappingProxyType(dict(r)) for r in csv.DictReader(fh))
    for row in rows:
        if not row.get("source"):
            raise ValueError(f"{name}.csv: row without a source: {row}")
    return rows


@cache
def _keyed(name: str, column: str) -> MappingProxyType[str, float]:
    return MappingProxyType({r["key"]: float(r[column]) for r in read_table(name)})


def constant(key: str) -> float:
    """A physical constant or conversion factor from ``constants.csv``.

    Parameters
    ----------
    key : str
        Row key, e.g. ``btu_per_kwh``.

    Returns
    -------
    float
        The value, in the unit its key names.

    Raises
    ------
    KeyError
        If there is no such row.
    """
    return _keyed("constants", "value")[key]


def efficiency(key: str) -> float:
    """A typical efficiency or default from ``efficiencies.csv``.

    Parameters
    ----------
    key : str
        Row key, e.g. ``ev_charging_efficiency``.

    Returns
    -------
    float
        The value: a fraction for efficiencies, otherwise the unit its key names.

    Raises
    ------
    KeyError
        If there is no such row.
    """
    return _keyed("efficiencies", "value")[key]


def table_value(table: str, key: str) -> float:
    """The ``value`` of row ``key`` in a key/value table (``calibration``, ``design_loads``,
    ``peak_demand``...).

    Parameters
    ----------
    table : str
        Table name without ``.csv``.
    key : str
        Row key.

    Returns
    -------
    float
        The value, in the unit of its row.

    Raises
    ------
    KeyError
        If there is no such row.
    """
    return _keyed(table, "value")[key]


def calibration_setting(key: str) -> float:
    """A calibration limit or bound from ``calibration.csv`` (see :func:`table_value`)."""
    return table_value("calibration", key)


def emission_factor(key: str) -> float:
    """kg CO2 per trade unit from ``emission_factors.csv``.

    Parameters
    ----------
    key : str
        Row key: a fuel name or a grid row such as ``grid_us_eia_2023``.

    Returns
    -------
    float
        Emission factor, kg CO2 per trade unit (kWh, therm or gal).

    Raises
    ------
    KeyError
        If there is no such row.
    """
    return _keyed("emission_factors", "kg_co2_per_unit")[key]


@cache
def heat_pump_class(name: str) -> MappingProxyType[str, float]:
    """Typical ratings of a heat pump class from ``heat_pumps.csv`` (one row per class).

    Parameters
    ----------
    name : str
        Class name, one of :func:`heat_pump_classes`.

    Returns
    -------
    mapping of str to float
        Ratings by column, in the units the column names give (COP and capacity fractions
        dimensionless, ``cutout_f`` in F).

    Raises
    ------
    KeyError
        If there is no such class.
    """
    for r in read_table("heat_pumps"):
        if r["class"] == name:
            return MappingProxyType({k: float(v) for k, v in r.items() if k not in ("class", "source")})
    raise KeyError(name)


@cache
def heat_pump_classes() -> tuple[str, ...]:
    """The heat pump classes of ``heat_pumps.csv``.

    Returns
    -------
    tuple of str
        Class names, in table order.
    """
    return tuple(r["class"] for r in read_table("heat_pumps"))


@cache
def hourly_profile(column: str) -> tuple[float, ...]:
    """24 hourly shares (summing to 1) of a daily end-use profile from ``hourly_profiles.csv``.

    Parameters
    ----------
    column : str
        Profile column, e.g. ``water``.

    Returns
    -------
    tuple of float
        Share of the day's amount in each hour, fraction (24 values).

    Raises
    ------
    KeyError
        If there is no such column.
    """
    rows = sorted(read_table("hourly_profiles"), key=lambda r: int(r["hour"]))
    vals = [float(r[column]) for r in rows]
    total = sum(vals)
    return tuple(v / total for v in vals)


@cache
def price_row(fuel: str) -> tuple[float, float]:
    """(USD per trade unit, fixed USD per month) default for ``fuel`` from ``prices.csv``.

    Parameters
    ----------
    fuel : str
        Fuel name, e.g. ``electricity``.

    Returns
    -------
    usd_per_unit : float
        Price, USD per trade unit.
    fixed_usd_per_month : float
        Fixed charge, USD per month.

    Raises
    ------
    KeyError
        If the fuel has no row.
    """
    for r in read_table("prices"):
        if r["fuel"] == fuel:
            return float(r["usd_per_unit"]), float(r["fixed_usd_per_month"])
    raise KeyError(fuel)
