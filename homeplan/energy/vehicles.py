"""Vehicles: gasoline/diesel fuel use and EV charging energy and schedules."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from homeplan.energy import timegrid
from homeplan.energy._data import constant, efficiency

__all__ = [
    "CHARGING_SCHEDULES",
    "VehicleSpec",
    "daily_charging_kw",
    "daily_charging_profile",
    "ev_charging_hourly",
    "ev_wall_kwh_per_mile",
    "mpge",
    "vehicle_annual_input",
]

CHARGING_SCHEDULES = ("overnight", "solar", "tou", "immediate")


@dataclass(frozen=True)
class VehicleSpec:
    """A vehicle driven ``miles_per_yr``.

    ``fuel`` is ``gasoline``, ``diesel`` or ``electricity``. EVs use ``kwh_per_mile`` (at the
    battery unless ``label_is_wall``: EPA label kWh/100 mi already includes charging losses).
    Charging happens ``schedule``: ``overnight`` (from ``plug_in_hour``), ``solar`` (from 10:00),
    ``tou`` (from ``window_start_hour``) or ``immediate`` (on arrival, 18:00).

    Attributes
    ----------
    fuel : str
        ``gasoline``, ``diesel`` or ``electricity``.
    miles_per_yr : float
        Distance driven, miles per year.
    mpg : float
        Fuel economy of a combustion vehicle, miles per gallon.
    kwh_per_mile : float
        EV consumption, kWh per mile.
    label_is_wall : bool
        True when ``kwh_per_mile`` is an EPA label value (charging losses included).
    charging_efficiency : float or None
        Wall-to-battery efficiency, fraction; None uses the default in ``data/efficiencies.csv``.
    charger_kw : float
        Charging power, kW.
    schedule : str
        One of :data:`CHARGING_SCHEDULES`.
    plug_in_hour : int
        Hour of day (0-23) overnight charging starts.
    window_start_hour : int
        Hour of day (0-23) the ``tou`` charging window starts.
    home_charging_share : float
        Share of the charging done at home, fraction.

    Raises
    ------
    ValueError
        If ``fuel`` or ``schedule`` is unknown.

    References
    ----------
    EPA fuel economy label (MPGe = 33.7 / kWh per mile); SAE J1772 Level 2 charging.
    """

    fuel: str = "gasoline"
    miles_per_yr: float = 11_000.0
    mpg: float = 28.0
    kwh_per_mile: float = 0.30
    label_is_wall: bool = False
    charging_efficiency: float | None = None
    charger_kw: float = 7.2
    schedule: str = "overnight"
    plug_in_hour: int = 22
    window_start_hour: int = 0
    home_charging_share: float = 1.0

    def __post_init__(self) -> None:
        if self.fuel not in ("gasoline", "diesel", "electricity"):
            raise ValueError("vehicle fuel must be gasoline, diesel or electricity")
        if self.schedule not in CHARGING_SCHEDULES:
            raise ValueError(f"schedule must be one of {CHARGING_SCHEDULES}")


def mpge(kwh_per_mile: float) -> float:
    """Miles per gallon equivalent = 33.7 / (kWh per mile).

    Parameters
    ----------
    kwh_per_mile : float
        EV consumption, kWh per mile.

    Returns
    -------
    float
        Miles per gallon of gasoline equivalent, MPGe.

    References
    ----------
    EPA fuel economy label: 33.7 kWh = 1 gallon gasoline equivalent.
    """
    return constant("kwh_per_gallon_gasoline_equivalent") / kwh_per_mile


def ev_wall_kwh_per_mile(spec: VehicleSpec) -> float:
    """Electricity from the wall per mile: battery kWh/mile / charging efficiency (unless the figure
    is already an EPA label value).

    Parameters
    ----------
    spec : VehicleSpec
        The electric vehicle.

    Returns
    -------
    float
        Electricity from the wall, kWh per mile.

    References
    ----------
    From memory: Level 2 charging efficiency 0.85-0.90. The EPA fuel economy label's kWh per
    100 miles is measured at the wall (40 CFR 600): do not count losses twice.
    """
    if spec.label_is_wall:
        return spec.kwh_per_mile
    eff = spec.charging_efficiency or efficiency("ev_charging_efficiency")
    return spec.kwh_per_mile / eff


def vehicle_annual_input(spec: VehicleSpec) -> tuple[str, float]:
    """(fuel, annual units): gallons for combustion vehicles, home kWh from the wall for EVs.

    Parameters
    ----------
    spec : VehicleSpec
        The vehicle.

    Returns
    -------
    fuel : str
        ``gasoline``, ``diesel`` or ``electricity``.
    units : float
        Annual use: gal per year, or kWh per year from the wall at home.

    References
    ----------
    EPA fuel economy label (mpg; kWh/mile).
    """
    if spec.fuel == "electricity":
        return "electricity", spec.miles_per_yr * ev_wall_kwh_per_mile(spec) * spec.home_charging_share
    return spec.fuel, spec.miles_per_yr / spec.mpg


def daily_charging_profile(daily_kwh: float, start_hour: int, charger_kw: float) -> np.ndarray:
    """24-hour profile: charge at ``charger_kw`` from ``start_hour`` until ``daily_kwh`` is in,
    wrapping past midnight (every day is the same, so the wrap lands on the same day's early hours).

    Parameters
    ----------
    daily_kwh : float
        Energy to charge each day, kWh.
    start_hour : int
        Hour of day (0-23) charging starts.
    charger_kw : float
        Charging power, kW.

    Returns
    -------
    numpy.ndarray
        Energy charged in each hour of the day, kWh (24 values).
    """
    order = (start_hour + np.arange(24)) % 24
    per_hour = np.minimum(charger_kw, np.maximum(daily_kwh - charger_kw * np.arange(24), 0.0))
    prof = np.zeros(24)
    prof[order] = per_hour
    if daily_kwh > charger_kw * 24:
        prof += (daily_kwh - charger_kw * 24) / 24.0
    return prof


def ev_charging_hourly(spec: VehicleSpec) -> np.ndarray:
    """Hourly home charging energy (kWh from the wall) for the whole year.

    Parameters
    ----------
    spec : VehicleSpec
        The electric vehicle.

    Returns
    -------
    numpy.ndarray
        Home charging energy of each hour, kWh from the wall (8760 values).
    """
    return np.tile(daily_charging_kw(spec), timegrid.DAYS_PER_YEAR)


def daily_charging_kw(spec: VehicleSpec) -> np.ndarray:
    """One day's home charging by hour of day (every day the same), kW = kWh per hour.

    Parameters
    ----------
    spec : VehicleSpec
        The electric vehicle.

    Returns
    -------
    numpy.ndarray
        Charging of each hour of the day, kW (24 values).
    """
    _, annual = vehicle_annual_input(spec)
    start = {"overnight": spec.plug_in_hour, "solar": 10, "tou": spec.window_start_hour,
             "immediate": 18}[spec.schedule]
    return daily_charging_profile(annual / timegrid.DAYS_PER_YEAR, start, spec.charger_kw)
