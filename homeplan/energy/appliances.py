"""Cooking (transfer efficiency) and clothes drying (combined energy factor)."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from homeplan.energy import timegrid
from homeplan.energy._data import efficiency, hourly_profile
from homeplan.energy.units import btu_per_kwh, btu_per_unit

__all__ = [
    "COOKING_KINDS",
    "DRYER_KINDS",
    "CookingSpec",
    "DryerSpec",
    "cooking_annual_input",
    "dryer_annual_input",
    "spread_daily",
    "transfer_efficiency",
    "useful_cooking_kwh_from_gas",
]

COOKING_KINDS = ("natural_gas", "propane", "resistance", "induction")
DRYER_KINDS = ("electric", "natural_gas", "propane", "heat_pump")


@dataclass(frozen=True)
class CookingSpec:
    """A range/cooktop of ``kind`` delivering ``useful_kwh_per_yr`` of heat into the food.

    Attributes
    ----------
    kind : str
        One of :data:`COOKING_KINDS`.
    useful_kwh_per_yr : float or None
        Useful heat into the food, kWh per year; None uses a typical gas range's use.

    Raises
    ------
    ValueError
        If ``kind`` is not one of :data:`COOKING_KINDS`.

    References
    ----------
    ENERGY STAR Emerging Technology Award 2021 (residential induction cooking: transfer
    efficiency gas ~32 %, electric resistance 75-80 %, induction ~85 %).
    """

    kind: str = "natural_gas"
    useful_kwh_per_yr: float | None = None

    def __post_init__(self) -> None:
        if self.kind not in COOKING_KINDS:
            raise ValueError(f"cooking kind must be one of {COOKING_KINDS}")

    @property
    def useful_kwh(self) -> float:
        """Useful cooking heat per year (default: a typical gas range's use, data table)."""
        if self.useful_kwh_per_yr is not None:
            return self.useful_kwh_per_yr
        return useful_cooking_kwh_from_gas(efficiency("cooking_gas_therm_per_yr_default"))


def transfer_efficiency(kind: str) -> float:
    """Cooking transfer efficiency of ``kind`` (ENERGY STAR ETA 2021 via data/efficiencies.csv).

    Parameters
    ----------
    kind : str
        One of :data:`COOKING_KINDS`.

    Returns
    -------
    float
        Share of the input energy that reaches the food, fraction.

    Raises
    ------
    KeyError
        If ``kind`` has no transfer efficiency in the data table.
    """
    key = {"natural_gas": "gas", "propane": "gas"}.get(kind, kind)
    return efficiency(f"cooking_transfer_{key}")


def useful_cooking_kwh_from_gas(therm_per_yr: float) -> float:
    """Useful heat of a gas range's annual use: therms * 29.307 kWh/therm * 0.32.

    Parameters
    ----------
    therm_per_yr : float
        Gas used by the range, therm per year.

    Returns
    -------
    float
        Useful cooking heat, kWh per year.

    References
    ----------
    ENERGY STAR Emerging Technology Award 2021 (gas transfer efficiency ~32 %).
    """
    return therm_per_yr * btu_per_unit("natural_gas") / btu_per_kwh() * transfer_efficiency("natural_gas")


def cooking_annual_input(spec: CookingSpec) -> tuple[str, float]:
    """(fuel, annual input in trade units) = useful / transfer efficiency.

    Parameters
    ----------
    spec : CookingSpec
        The range or cooktop.

    Returns
    -------
    fuel : str
        ``natural_gas``, ``propane`` or ``electricity``.
    units : float
        Annual input, trade units per year (therm, gal or kWh).

    References
    ----------
    ENERGY STAR Emerging Technology Award 2021 (cooking transfer efficiencies), so
    kWh_induction = therms * 29.307 * 0.32 / 0.85.
    """
    input_kwh = spec.useful_kwh / transfer_efficiency(spec.kind)
    if spec.kind in ("natural_gas", "propane"):
        return spec.kind, input_kwh * btu_per_kwh() / btu_per_unit(spec.kind)
    return "electricity", input_kwh


@dataclass(frozen=True)
class DryerSpec:
    """Clothes dryer of ``kind``; energy = loads * lb/load / CEF (lb/kWh).

    Attributes
    ----------
    kind : str
        One of :data:`DRYER_KINDS`.
    loads_per_yr : float or None
        Loads dried per year; None uses the default in ``data/efficiencies.csv``.

    Raises
    ------
    ValueError
        If ``kind`` is not one of :data:`DRYER_KINDS`.

    References
    ----------
    DOE 10 CFR 430 Subpart B Appendix D2 (combined energy factor); DOE 2015 dryer standards
    (from memory, values in data/efficiencies.csv).
    """

    kind: str = "electric"
    loads_per_yr: float | None = None

    def __post_init__(self) -> None:
        if self.kind not in DRYER_KINDS:
            raise ValueError(f"dryer kind must be one of {DRYER_KINDS}")

    @property
    def loads(self) -> float:
        """Loads dried per year (given, or the default in ``data/efficiencies.csv``)."""
        return efficiency("dryer_loads_per_yr") if self.loads_per_yr is None else self.loads_per_yr


def dryer_annual_input(spec: DryerSpec) -> dict[str, float]:
    """Annual dryer energy by fuel: {'electricity': kWh, fuel: units}.

    Parameters
    ----------
    spec : DryerSpec
        The dryer.

    Returns
    -------
    dict of str to float
        Annual input by fuel, trade units per year: electricity in kWh and, for a gas dryer,
        the gas in therm (natural gas) or gal (propane).

    References
    ----------
    DOE 10 CFR 430 Appendix D2 (CEF in lb/kWh; gas energy converted at 3412 Btu/kWh).
    """
    lb = spec.loads * efficiency("dryer_lb_per_load")
    if spec.kind in ("natural_gas", "propane"):
        total_kwh = lb / efficiency("dryer_cef_gas")
        share = efficiency("dryer_gas_share")
        return {
            "electricity": total_kwh * (1 - share),
            spec.kind: total_kwh * share * btu_per_kwh() / btu_per_unit(spec.kind),
        }
    cef = efficiency("dryer_cef_heat_pump" if spec.kind == "heat_pump" else "dryer_cef_electric")
    return {"electricity": lb / cef}


def spread_daily(annual_units: float, profile_name: str) -> np.ndarray:
    """Spread an annual amount evenly over days and by a 24-hour profile into 8760 hours.

    Parameters
    ----------
    annual_units : float
        Annual amount, any unit per year (e.g. kWh or therm).
    profile_name : str
        Column of ``data/hourly_profiles.csv``, e.g. ``cooking``, ``dryer`` or ``plug``.

    Returns
    -------
    numpy.ndarray
        Amount in each hour, same unit (8760 values).

    Raises
    ------
    KeyError
        If ``profile_name`` is not a column of the profile table.
    """
    profile = np.asarray(hourly_profile(profile_name))
    return np.tile(profile * (annual_units / timegrid.DAYS_PER_YEAR), timegrid.DAYS_PER_YEAR)
