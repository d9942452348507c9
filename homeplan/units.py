"""Unit conversions at the edges: plan files may use SI names, the core uses one set of units.

Exact definitions where they exist (international foot and gallon, thermochemical Btu
relations as used by the US EIA). Checked against pint in tests/test_units.py.

References
----------
NIST Special Publication 811 (2008), Appendix B: conversion factors.
US EIA, "Units and calculators explained": 1 therm = 100,000 Btu; 1 kWh = 3,412.14 Btu.
"""

from __future__ import annotations

from collections.abc import Callable

__all__ = [
    "BTUH_PER_TON",
    "BTU_PER_KWH",
    "FT2_PER_M2",
    "KWH_PER_THERM",
    "L_PER_GAL",
    "M_PER_MILE",
    "SI_KEYS",
    "c_from_f",
    "delta_c_from_f",
    "display_area",
    "display_heat",
    "display_size",
    "display_temp",
    "f_from_c",
    "heat_output_words",
]

FT_PER_M = 1 / 0.3048
FT2_PER_M2 = FT_PER_M**2
M_PER_MILE = 1609.344
L_PER_GAL = 3.785411784
BTU_PER_KWH = 3412.14
BTU_PER_THERM = 100_000.0
BTUH_PER_TON = 12_000.0  # NIST SP 811 (2008) Appendix B: 1 ton of refrigeration = 12,000 Btu(IT)/h
KWH_PER_THERM = BTU_PER_THERM / BTU_PER_KWH


def f_from_c(temp_c: float) -> float:
    return temp_c * 9.0 / 5.0 + 32.0


def c_from_f(temp_f: float) -> float:
    return (temp_f - 32.0) * 5.0 / 9.0


def delta_c_from_f(delta_f: float) -> float:
    return delta_f * 5.0 / 9.0


# SI key -> (internal key, converter). Applied by the loader before validation; the error
# messages still name the key the user wrote.
SI_KEYS: dict[str, tuple[str, Callable[[float], float]]] = {
    "floor_area_m2": ("floor_area_ft2", lambda v: v * FT2_PER_M2),
    "usable_area_m2": ("usable_area_ft2", lambda v: v * FT2_PER_M2),
    "elevation_m": ("elevation_ft", lambda v: v * FT_PER_M),
    "heating_design_c": ("heating_design_f", f_from_c),
    "cooling_design_c": ("cooling_design_f", f_from_c),
    "capacity_kw": ("capacity_btuh", lambda v: v * BTU_PER_KWH),
    "tank_l": ("tank_gal", lambda v: v / L_PER_GAL),
    "km_per_year": ("miles_per_year", lambda v: v * 1000 / M_PER_MILE),
    "kwh_per_km": ("kwh_per_mile", lambda v: v * M_PER_MILE / 1000),
    "l_per_100km": ("mpg", lambda v: (100 * 1000 / M_PER_MILE) / (v / L_PER_GAL)),
    "annual_l": ("annual_gal", lambda v: v / L_PER_GAL),
    "usd_per_l": ("usd_per_gal", lambda v: v * L_PER_GAL),
}


def display_temp(temp_f: float, units: str) -> str:
    return f"{c_from_f(temp_f):.0f} C" if units == "si" else f"{temp_f:.0f} F"


def display_area(area_ft2: float, units: str) -> str:
    return f"{area_ft2 / FT2_PER_M2:,.0f} m2" if units == "si" else f"{area_ft2:,.0f} ft2"


def display_heat(btuh: float, units: str) -> str:
    return f"{btuh / BTU_PER_KWH:,.1f} kW" if units == "si" else f"{btuh:,.0f} Btu/h"


def heat_output_words(btuh: float) -> str:
    """Heating or cooling output in plain units first: "12.3 kW (42,000 Btu/h)"."""
    return f"{btuh / BTU_PER_KWH:,.1f} kW ({btuh:,.0f} Btu/h)"


def display_size(size: float, unit: str) -> str:
    """A project's size as people read it: a heat pump's tons as kW and Btu/h (never tons),
    kW and kWh as they are, an area in ft2; "" for things counted one each."""
    if unit == "ton":
        return heat_output_words(size * BTUH_PER_TON)
    if unit in ("kw", "kwh"):
        return f"{size:g} {'kW' if unit == 'kw' else 'kWh'}"
    if unit == "ft2":
        return f"{size:,.0f} ft2"
    return ""
