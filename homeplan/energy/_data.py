"""Cached readers for the built-in tables in ``homeplan/energy/data`` (every row has a source)."""

from __future__ import annotations

import csv
from functools import cache
from pathlib import Path
from types import MappingProxyType

DATA_DIR = Path(__file__).parent / "data"


@cache
def read_table(name: str) -> tuple[MappingProxyType[str, str], ...]:
    """Rows of ``data/<name>.csv`` as read-only dicts of strings (cached)."""
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
    """A physical constant or conversion factor from ``constants.csv``."""
    return _keyed("constants", "value")[key]


def efficiency(key: str) -> float:
    """A typical efficiency or default from ``efficiencies.csv``."""
    return _keyed("efficiencies", "value")[key]


def emission_factor(key: str) -> float:
    """kg CO2 per trade unit from ``emission_factors.csv``."""
    return _keyed("emission_factors", "kg_co2_per_unit")[key]


@cache
def heat_pump_class(name: str) -> MappingProxyType[str, float]:
    """Typical ratings of a heat pump class from ``heat_pumps.csv`` (one row per class)."""
    for r in read_table("heat_pumps"):
        if r["class"] == name:
            return MappingProxyType({k: float(v) for k, v in r.items() if k not in ("class", "source")})
    raise KeyError(name)


@cache
def heat_pump_classes() -> tuple[str, ...]:
    """The heat pump classes of ``heat_pumps.csv``."""
    return tuple(r["class"] for r in read_table("heat_pumps"))


@cache
def hourly_profile(column: str) -> tuple[float, ...]:
    """24 hourly shares (summing to 1) of a daily end-use profile from ``hourly_profiles.csv``."""
    rows = sorted(read_table("hourly_profiles"), key=lambda r: int(r["hour"]))
    vals = [float(r[column]) for r in rows]
    total = sum(vals)
    return tuple(v / total for v in vals)


@cache
def price_row(fuel: str) -> tuple[float, float]:
    """(USD per trade unit, fixed USD per month) default for ``fuel`` from ``prices.csv``."""
    for r in read_table("prices"):
        if r["fuel"] == fuel:
            return float(r["usd_per_unit"]), float(r["fixed_usd_per_month"])
    raise KeyError(fuel)
