"""Heat-loss coefficient (UA) and design heating load from a household's own fuel bills.

Two methods, both from the utility-bill ("fuel use") approach: the summer-baseload split and the
degree-day regression; a floor-area fallback when there are no bills (flagged as estimated).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from homeplan.energy._data import efficiency
from homeplan.energy.units import btu_to_kwh

__all__ = [
    "Calibration",
    "calibrate_annual",
    "calibrate_from_floor_area",
    "calibrate_regression",
    "calibrate_summer_baseload",
    "design_heating_load_btuh",
    "split_summer_baseload",
    "ua_from_heating_fuel",
]


@dataclass(frozen=True)
class Calibration:
    """Result of a bill calibration. ``estimated`` is True for the floor-area fallback.

    Attributes
    ----------
    ua_btuh_f : float
        Heat-loss coefficient UA, Btu/h-F.
    design_load_btuh : float
        Design heating load, Btu/h.
    baseload_per_day : float
        Non-heating use of the heating fuel, trade units per day (0 for the fallback).
    heating_fuel_per_yr : float
        Fuel used for space heating over the bills, trade units per year (NaN for the fallback).
    method : str
        Method used, e.g. ``summer baseload``.
    estimated : bool
        True for the floor-area fallback (no bills).
    r2 : float or None
        Coefficient of determination of the regression, dimensionless (None for other methods).
    """

    ua_btuh_f: float
    design_load_btuh: float
    baseload_per_day: float
    heating_fuel_per_yr: float
    method: str
    estimated: bool
    r2: float | None = None

    @property
    def design_load_kw(self) -> float:
        """Design heating load in kW (thermal)."""
        return btu_to_kwh(self.design_load_btuh)


def ua_from_heating_fuel(heating_fuel_units: float, btu_per_unit: float, efficiency_frac: float,
                         hdd65: float, distribution_eff: float = 1.0) -> float:
    """UA in Btu/h-F from a year's heating fuel: UA = F_h * Btu/unit * eff / (24 * HDD65).

    Parameters
    ----------
    heating_fuel_units : float
        Fuel used for space heating in the year, trade units (therm, gal or kWh).
    btu_per_unit : float
        Heat content of the fuel, Btu per trade unit.
    efficiency_frac : float
        Seasonal efficiency of the heating equipment (AFUE, or COP for electric), fraction.
    hdd65 : float
        Heating degree-days base 65 F of the same year, F-days.
    distribution_eff : float
        Distribution (duct or pipe) efficiency, fraction.

    Returns
    -------
    float
        UA, Btu/h-F.

    Raises
    ------
    ValueError
        If ``hdd65`` is not positive.

    References
    ----------
    ASHRAE Handbook - Fundamentals, ch. 19 "Energy Estimating and Modeling Methods"
    (degree-day method, Q = 24 UA HDD / efficiency).
    """
    if hdd65 <= 0:
        raise ValueError("hdd65 must be positive")
    delivered_btu = heating_fuel_units * btu_per_unit * efficiency_frac * distribution_eff
    return delivered_btu / (24.0 * hdd65)


def design_heating_load_btuh(ua_btuh_f: float, design_temp_f: float, indoor_f: float = 65.0) -> float:
    """Design heating load = UA * (T_base - T_99).

    Parameters
    ----------
    ua_btuh_f : float
        Heat-loss coefficient UA, Btu/h-F.
    design_temp_f : float
        99 % heating design dry-bulb temperature, F.
    indoor_f : float
        Base (balance) temperature, F.

    Returns
    -------
    float
        Design heating load, Btu/h (0 when ``design_temp_f`` is not below ``indoor_f``).

    References
    ----------
    ACCA Manual J (99 % heating design dry-bulb; 70 F indoor design, from memory); a 65 F base
    matches the degree days (70 F adds (70 - T) / (65 - T) - 1, about 8 % at 5 F).
    """
    return ua_btuh_f * max(indoor_f - design_temp_f, 0.0)


def split_summer_baseload(use_units: np.ndarray, days: np.ndarray, n_base_months: int = 3
                          ) -> tuple[float, np.ndarray]:
    """Baseload per day (mean use/day of the ``n_base_months`` lowest months) and monthly heating.

    Parameters
    ----------
    use_units : numpy.ndarray
        Fuel use of each bill, trade units (e.g. 12 monthly values).
    days : numpy.ndarray
        Days covered by each bill, days.
    n_base_months : int
        Number of lowest-use bills averaged for the baseload.

    Returns
    -------
    base : float
        Baseload, trade units per day.
    heating : numpy.ndarray
        Heating use of each bill, trade units (never negative).

    References
    ----------
    Utility-bill "fuel use" method: B = mean use/day in the lowest summer months;
    F_h,m = use_m - B * days_m (the PRISM-style baseload split, Fels 1986, from memory).
    """
    use = np.asarray(use_units, float)
    d = np.asarray(days, float)
    per_day = use / d
    base = float(np.sort(per_day)[:n_base_months].mean())
    heating = np.maximum(use - base * d, 0.0)
    return base, heating


def calibrate_summer_baseload(use_units: np.ndarray, days: np.ndarray, hdd65: float,
                              design_temp_f: float, efficiency_frac: float,
                              btu_per_unit: float = 100_000.0, n_base_months: int = 3,
                              distribution_eff: float = 1.0) -> Calibration:
    """UA and design load by the summer-baseload split of 12 monthly bills.

    Parameters
    ----------
    use_units : numpy.ndarray
        Fuel use of each monthly bill, trade units (12 values).
    days : numpy.ndarray
        Days covered by each bill, days (12 values).
    hdd65 : float
        Heating degree-days base 65 F of the billed year, F-days.
    design_temp_f : float
        99 % heating design dry-bulb temperature, F.
    efficiency_frac : float
        Seasonal efficiency of the heating equipment, fraction.
    btu_per_unit : float
        Heat content of the fuel, Btu per trade unit (default: one therm).
    n_base_months : int
        Number of lowest-use bills averaged for the baseload.
    distribution_eff : float
        Distribution efficiency, fraction.

    Returns
    -------
    Calibration
        UA, design load, baseload and heating fuel (method ``summer baseload``).

    Raises
    ------
    ValueError
        If ``hdd65`` is not positive.

    References
    ----------
    ASHRAE Handbook - Fundamentals, ch. 19 (degree-day method).
    """
    base, heating = split_summer_baseload(use_units, days, n_base_months)
    f_h = float(heating.sum())
    ua = ua_from_heating_fuel(f_h, btu_per_unit, efficiency_frac, hdd65, distribution_eff)
    return Calibration(ua, design_heating_load_btuh(ua, design_temp_f), base, f_h,
                       "summer baseload", False)


def calibrate_annual(annual_units: float, baseload_units_per_yr: float, hdd65: float,
                     design_temp_f: float, efficiency_frac: float,
                     btu_per_unit: float = 100_000.0, distribution_eff: float = 1.0) -> Calibration:
    """Annual form of the baseload split: F_h = annual - baseload.

    Parameters
    ----------
    annual_units : float
        Annual use of the heating fuel, trade units per year.
    baseload_units_per_yr : float
        Non-heating use of the same fuel, trade units per year.
    hdd65 : float
        Heating degree-days base 65 F of the year, F-days.
    design_temp_f : float
        99 % heating design dry-bulb temperature, F.
    efficiency_frac : float
        Seasonal efficiency of the heating equipment, fraction.
    btu_per_unit : float
        Heat content of the fuel, Btu per trade unit (default: one therm).
    distribution_eff : float
        Distribution efficiency, fraction.

    Returns
    -------
    Calibration
        UA, design load, baseload and heating fuel (method ``annual baseload``).

    Raises
    ------
    ValueError
        If ``hdd65`` is not positive.

    References
    ----------
    ASHRAE Handbook - Fundamentals, ch. 19 (degree-day method): F_h = annual - 365 B;
    UA = Q / (24 HDD65).
    """
    f_h = annual_units - baseload_units_per_yr
    ua = ua_from_heating_fuel(f_h, btu_per_unit, efficiency_frac, hdd65, distribution_eff)
    return Calibration(ua, design_heating_load_btuh(ua, design_temp_f),
                       baseload_units_per_yr / 365.0, f_h, "annual baseload", False)


def calibrate_regression(use_units: np.ndarray, days: np.ndarray, hdd65_by_bill: np.ndarray,
                         design_temp_f: float, efficiency_frac: float,
                         btu_per_unit: float = 100_000.0, min_hdd_per_day: float = 2.0,
                         distribution_eff: float = 1.0) -> Calibration:
    """Degree-day regression: use/day = b0 + b1 * HDD/day over bills with >= ``min_hdd_per_day``.

    UA = b1 * Btu/unit * efficiency / 24. The baseload per day is b0.

    Parameters
    ----------
    use_units : numpy.ndarray
        Fuel use of each bill, trade units.
    days : numpy.ndarray
        Days covered by each bill, days.
    hdd65_by_bill : numpy.ndarray
        Heating degree-days base 65 F in each bill period, F-days.
    design_temp_f : float
        99 % heating design dry-bulb temperature, F.
    efficiency_frac : float
        Seasonal efficiency of the heating equipment, fraction.
    btu_per_unit : float
        Heat content of the fuel, Btu per trade unit (default: one therm).
    min_hdd_per_day : float
        Bills with fewer heating degree-days per day are left out, F-days per day.
    distribution_eff : float
        Distribution efficiency, fraction.

    Returns
    -------
    Calibration
        UA, design load, baseload, heating fuel and ``r2`` (method ``degree-day regression``).

    Raises
    ------
    ValueError
        If fewer than 3 bills have at least ``min_hdd_per_day``.

    References
    ----------
    Fels, M. (1986), "PRISM: an introduction", Energy and Buildings 9:5-18;
    ASHRAE Guideline 14-2014, change-point models (from memory).
    """
    use = np.asarray(use_units, float)
    d = np.asarray(days, float)
    hdd = np.asarray(hdd65_by_bill, float)
    x = hdd / d
    y = use / d
    keep = x >= min_hdd_per_day
    if keep.sum() < 3:
        raise ValueError("need at least 3 bills with heating degree-days for the regression")
    b1, b0 = np.polyfit(x[keep], y[keep], 1)
    pred = b0 + b1 * x[keep]
    ss_res = float(((y[keep] - pred) ** 2).sum())
    ss_tot = float(((y[keep] - y[keep].mean()) ** 2).sum())
    r2 = 1.0 - ss_res / ss_tot if ss_tot > 0 else None
    ua = float(b1) * btu_per_unit * efficiency_frac * distribution_eff / 24.0
    heating = float(b1 * hdd.sum())
    return Calibration(ua, design_heating_load_btuh(ua, design_temp_f), float(b0), heating,
                       "degree-day regression", False, r2)


def calibrate_from_floor_area(floor_area_ft2: float, design_temp_f: float,
                              vintage: str = "1980_2000") -> Calibration:
    """Fallback without bills: UA from floor area and a vintage default. Flagged as estimated.

    ``vintage`` is one of ``pre1980``, ``1980_2000``, ``post2000``.

    Parameters
    ----------
    floor_area_ft2 : float
        Conditioned floor area, ft2.
    design_temp_f : float
        99 % heating design dry-bulb temperature, F.
    vintage : str
        Construction period of the house.

    Returns
    -------
    Calibration
        UA and design load with ``estimated=True``; no baseload or heating fuel.

    Raises
    ------
    KeyError
        If ``vintage`` has no default in ``data/efficiencies.csv``.

    References
    ----------
    Common practice, no source (defaults in data/efficiencies.csv, ``ua_per_ft2_*``).
    """
    ua = floor_area_ft2 * efficiency(f"ua_per_ft2_{vintage}")
    return Calibration(ua, design_heating_load_btuh(ua, design_temp_f), 0.0, float("nan"),
                       f"floor-area default ({vintage})", True)
