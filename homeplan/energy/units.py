"""Unit conversions used at the edges of the energy engine.

References
----------
NIST SP 811, Guide for the Use of the International System of Units (Btu, therm, kWh).
EIA, "Energy units and calculators" (fuel heat contents). EPA fuel economy label (33.7 kWh/gal).
"""

from __future__ import annotations

from typing import TypeVar

import numpy as np

from homeplan.energy._data import constant

__all__ = [
    "FUEL_UNITS",
    "btu_per_kwh",
    "btu_per_unit",
    "btu_to_kwh",
    "c_to_f",
    "ccf_to_therm",
    "f_to_c",
    "kwh_to_btu",
    "therm_to_kwh",
]

T = TypeVar("T", float, np.ndarray)

#: Trade unit of each fuel handled by the engine.
FUEL_UNITS: dict[str, str] = {
    "electricity": "kWh",
    "natural_gas": "therm",
    "propane": "gal",
    "heating_oil": "gal",
    "gasoline": "gal",
    "diesel": "gal",
}

_BTU_KEYS = {
    "electricity": "btu_per_kwh",
    "natural_gas": "btu_per_therm",
    "propane": "btu_per_gallon_propane",
    "heating_oil": "btu_per_gallon_heating_oil",
    "gasoline": "btu_per_gallon_gasoline",
    "diesel": "btu_per_gallon_diesel",
}


def c_to_f(temp_c: T) -> T:
    """Celsius to Fahrenheit.

    Parameters
    ----------
    temp_c : float or numpy.ndarray
        Temperature, C.

    Returns
    -------
    float or numpy.ndarray
        Temperature, F (same shape as ``temp_c``).
    """
    return temp_c * 1.8 + 32.0


def f_to_c(temp_f: T) -> T:
    """Fahrenheit to Celsius.

    Parameters
    ----------
    temp_f : float or numpy.ndarray
        Temperature, F.

    Returns
    -------
    float or numpy.ndarray
        Temperature, C (same shape as ``temp_f``).
    """
    return (temp_f - 32.0) / 1.8


def btu_per_kwh() -> float:
    """Btu in one kWh (International Table Btu).

    Returns
    -------
    float
        Conversion factor, Btu/kWh (from ``constants.csv``).
    """
    return constant("btu_per_kwh")


def btu_per_unit(fuel: str) -> float:
    """Heat content of one trade unit of ``fuel`` (kWh, therm or gallon) in Btu.

    Parameters
    ----------
    fuel : str
        Fuel name, a key of :data:`FUEL_UNITS` (e.g. ``natural_gas``).

    Returns
    -------
    float
        Heat content, Btu per trade unit (kWh, therm or gal).

    Raises
    ------
    KeyError
        If ``fuel`` is not a fuel of :data:`FUEL_UNITS`.

    References
    ----------
    EIA "Energy units and calculators"; EPA 33.7 kWh per gallon gasoline equivalent.
    """
    return constant(_BTU_KEYS[fuel])


def kwh_to_btu(kwh: T) -> T:
    """kWh to Btu.

    Parameters
    ----------
    kwh : float or numpy.ndarray
        Energy, kWh.

    Returns
    -------
    float or numpy.ndarray
        Energy, Btu.
    """
    return kwh * btu_per_kwh()


def btu_to_kwh(btu: T) -> T:
    """Btu to kWh.

    Parameters
    ----------
    btu : float or numpy.ndarray
        Energy, Btu.

    Returns
    -------
    float or numpy.ndarray
        Energy, kWh.
    """
    return btu / btu_per_kwh()


def therm_to_kwh(therm: T) -> T:
    """therm to kWh (1 therm = 100,000 Btu).

    Parameters
    ----------
    therm : float or numpy.ndarray
        Energy, therm.

    Returns
    -------
    float or numpy.ndarray
        Energy, kWh.
    """
    return therm * constant("btu_per_therm") / btu_per_kwh()


def ccf_to_therm(ccf: T, therm_per_ccf: float | None = None) -> T:
    """Hundred cubic feet of natural gas to therms (the bill prints the local factor).

    Parameters
    ----------
    ccf : float or numpy.ndarray
        Gas volume, ccf (hundred cubic feet).
    therm_per_ccf : float or None
        Heat content from the bill, therm/ccf; None uses the default in ``constants.csv``.

    Returns
    -------
    float or numpy.ndarray
        Energy, therm.
    """
    return ccf * (constant("therm_per_ccf") if therm_per_ccf is None else therm_per_ccf)
