"""Domestic water heating by uniform energy factor (UEF)."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from homeplan.energy import timegrid
from homeplan.energy._data import constant, efficiency, hourly_profile
from homeplan.energy.units import btu_per_unit

__all__ = [
    "WATER_FUELS",
    "WaterHeaterSpec",
    "hot_water_delivered_btu_per_yr",
    "hot_water_gal_per_day",
    "mains_temperature_f",
    "water_heater_annual_input",
    "water_heating_hourly",
]

WATER_FUELS = ("electricity", "natural_gas", "propane", "heating_oil")


@dataclass(frozen=True)
class WaterHeaterSpec:
    """A water heater burning/using ``fuel`` at ``uef``; ``kind`` is informative
    (``storage``, ``tankless``, ``heat_pump``).

    Attributes
    ----------
    fuel : str
        One of :data:`WATER_FUELS`.
    uef : float
        Uniform energy factor, dimensionless (0.3-6).
    kind : str
        Informative type: ``storage``, ``tankless`` or ``heat_pump``.
    setpoint_f : float
        Delivery (tank) temperature, F.

    Raises
    ------
    ValueError
        If ``fuel`` is unknown or ``uef`` is outside 0.3-6.

    References
    ----------
    DOE 10 CFR 430 Subpart B Appendix E (uniform energy factor test procedure, 2017 on).
    """

    fuel: str = "natural_gas"
    uef: float = 0.62
    kind: str = "storage"
    setpoint_f: float = 125.0

    def __post_init__(self) -> None:
        if self.fuel not in WATER_FUELS:
            raise ValueError(f"water heater fuel must be one of {WATER_FUELS}")
        if not 0.3 <= self.uef <= 6.0:
            raise ValueError("uef must be between 0.3 and 6")

    @classmethod
    def heat_pump(cls, uef: float = 3.75) -> WaterHeaterSpec:
        """Heat pump water heater (typical UEF 2.0-4.0, from memory).

        Parameters
        ----------
        uef : float
            Uniform energy factor, dimensionless.

        Returns
        -------
        WaterHeaterSpec
            An electric heat pump water heater.
        """
        return cls("electricity", uef, "heat_pump")


def hot_water_gal_per_day(occupants: float) -> float:
    """Hot water use from household size (linear default through the DOE 55 gal/day medium draw).

    Parameters
    ----------
    occupants : float
        Number of occupants.

    Returns
    -------
    float
        Hot water use, gal/day.

    References
    ----------
    Common practice, no source (defaults in data/efficiencies.csv).
    """
    return efficiency("hot_water_gal_per_day_base") + efficiency(
        "hot_water_gal_per_day_per_occupant") * max(occupants, 0.0)


def hot_water_delivered_btu_per_yr(gal_per_day: float, rise_f: float) -> float:
    """Q_hw = gal/day * 8.34 lb/gal * rise * 365 (Btu/yr).

    Parameters
    ----------
    gal_per_day : float
        Hot water use, gal/day.
    rise_f : float
        Temperature rise from mains to delivery, F.

    Returns
    -------
    float
        Heat delivered to the water, Btu per year.

    References
    ----------
    Definition of the Btu (heat to raise 1 lb of water 1 F): Q = gal x 8.34 lb/gal x rise.
    """
    return gal_per_day * constant("lb_per_gallon_water") * rise_f * 365.0


def water_heater_annual_input(spec: WaterHeaterSpec, gal_per_day: float, rise_f: float) -> float:
    """Annual input in the fuel's trade unit (kWh, therm or gal) = Q_hw / UEF.

    Parameters
    ----------
    spec : WaterHeaterSpec
        The water heater.
    gal_per_day : float
        Hot water use, gal/day.
    rise_f : float
        Temperature rise from mains to delivery, F.

    Returns
    -------
    float
        Annual input, trade units per year (kWh, therm or gal).

    References
    ----------
    DOE 10 CFR 430 Subpart B Appendix E (UEF).
    """
    return hot_water_delivered_btu_per_yr(gal_per_day, rise_f) / spec.uef / btu_per_unit(spec.fuel)


def mains_temperature_f(temp_f: np.ndarray, latitude_deg: float = 40.0) -> np.ndarray:
    """Daily cold-water mains temperature (365 values) from the annual weather.

    T_mains = (T_avg + 6) + ratio * (dT_max / 2) * sin(0.986 (day - 15 - lag) - 90) degrees, with
    ratio = 0.4 + 0.01 (T_avg - 44) and lag = 35 - (T_avg - 44); southern sites shift 180 days.

    Parameters
    ----------
    temp_f : numpy.ndarray
        Outdoor dry-bulb temperature of each hour, F (8760 values).
    latitude_deg : float
        Site latitude, degrees (negative = southern hemisphere).

    Returns
    -------
    numpy.ndarray
        Mains water temperature of each day, F (365 values).

    References
    ----------
    Burch, J. & Christensen, C. (2007), "Towards development of an algorithm for mains water
    temperature", NREL (used in the Building America House Simulation Protocols), from memory.
    """
    monthly = np.add.reduceat(temp_f, timegrid.month_start_hours()) / (timegrid.month_days() * 24)
    t_avg = float(temp_f.mean())
    d_t = float(monthly.max() - monthly.min())
    ratio = 0.4 + 0.01 * (t_avg - 44.0)
    lag = 35.0 - (t_avg - 44.0)
    day = np.arange(1, timegrid.DAYS_PER_YEAR + 1, dtype=float)
    if latitude_deg < 0:
        day = day + 182.5
    arg = np.deg2rad(0.986 * (day - 15.0 - lag) - 90.0)
    return (t_avg + 6.0) + ratio * (d_t / 2.0) * np.sin(arg)


def water_heating_hourly(spec: WaterHeaterSpec, gal_per_day: float, mains_f: np.ndarray
                         ) -> np.ndarray:
    """Hourly input (fuel trade units) for a daily draw, the daily mains temperature and a draw
    profile (data/hourly_profiles.csv ``water``).

    Parameters
    ----------
    spec : WaterHeaterSpec
        The water heater.
    gal_per_day : float
        Hot water use, gal/day.
    mains_f : numpy.ndarray
        Mains water temperature of each day, F (365 values).

    Returns
    -------
    numpy.ndarray
        Input of each hour, trade units (kWh, therm or gal; 8760 values).

    References
    ----------
    Q_hw / UEF (DOE 10 CFR 430 Subpart B Appendix E); Burch & Christensen (2007) mains
    temperature (from memory).
    """
    rise = np.maximum(spec.setpoint_f - mains_f, 0.0)
    daily_units = (gal_per_day * constant("lb_per_gallon_water") * rise) / spec.uef / btu_per_unit(
        spec.fuel)
    profile = np.asarray(hourly_profile("water"))
    return (daily_units[:, None] * profile[None, :]).ravel()
