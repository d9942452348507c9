"""Heat-loss coefficient (UA) and design heating load from a household's own fuel bills.

Two methods, both from the utility-bill ("fuel use") approach: the summer-baseload split and the
degree-day regression; a floor-area fallback when there are no bills (flagged as estimated).
Then the model of the whole home is fitted to the bills (:func:`fit_scales`) and the fit is
graded the way ASHRAE Guideline 14 grades a calibrated simulation (:func:`fit_statistics`).
"""

from __future__ import annotations

import itertools
from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np

from homeplan.energy._data import calibration_setting, efficiency
from homeplan.energy.units import btu_to_kwh

__all__ = [
    "Calibration",
    "FitStatistics",
    "ScaleFit",
    "fit_scales",
    "fit_statistics",
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


# ------------------------------------------------------------------------------ fitting the model


@dataclass(frozen=True)
class FitStatistics:
    """How well modelled monthly use follows the bills (ASHRAE Guideline 14 measures).

    Attributes
    ----------
    n : int
        Number of bills compared.
    nmbe_pct : float
        Normalised mean bias error, % (positive: the model uses less than the bills).
    cv_rmse_pct : float
        Coefficient of variation of the root-mean-square error, %.
    r2 : float or None
        Coefficient of determination of modelled against billed use (None when the bills do not
        vary).
    """

    n: int
    nmbe_pct: float
    cv_rmse_pct: float
    r2: float | None

    @property
    def meets_monthly_criteria(self) -> bool:
        """True when NMBE and CV(RMSE) are within the Guideline 14 limits for monthly data.

        References
        ----------
        ASHRAE Guideline 14-2014, calibrated simulation with monthly data: NMBE within +/-5 %,
        CV(RMSE) at most 15 % (from memory; limits in ``data/calibration.csv``).
        """
        return (abs(self.nmbe_pct) <= calibration_setting("monthly_nmbe_limit_pct")
                and self.cv_rmse_pct <= calibration_setting("monthly_cv_rmse_limit_pct"))


def fit_statistics(measured: np.ndarray, modelled: np.ndarray, n_params: int = 1) -> FitStatistics:
    """NMBE, CV(RMSE) and R-squared of modelled against measured use.

    NMBE = sum(y - y_hat) / ((n - p) * mean(y)); CV(RMSE) = sqrt(sum((y - y_hat)^2) / (n - p)) /
    mean(y); both in %. R-squared = 1 - SS_res / SS_tot.

    Parameters
    ----------
    measured : numpy.ndarray
        Billed use of each period, trade units.
    modelled : numpy.ndarray
        Modelled use of the same periods, same unit.
    n_params : int
        Number of model parameters p (degrees of freedom taken by the fit).

    Returns
    -------
    FitStatistics
        The three measures.

    Raises
    ------
    ValueError
        If the arrays differ in length, there are not more periods than parameters, or the mean
        billed use is not positive.

    References
    ----------
    ASHRAE Guideline 14-2014, statistical indices of a calibrated model: NMBE and CV(RMSE) with
    n - p degrees of freedom (from memory).
    """
    y = np.asarray(measured, float)
    y_hat = np.asarray(modelled, float)
    if y.shape != y_hat.shape:
        raise ValueError("measured and modelled must have the same length")
    n = y.size
    dof = n - n_params
    if dof <= 0:
        raise ValueError("need more periods than parameters")
    mean = float(y.mean())
    if mean <= 0:
        raise ValueError("the billed use must be positive on average")
    resid = y - y_hat
    nmbe = float(resid.sum()) / (dof * mean) * 100.0
    cv = float(np.sqrt((resid ** 2).sum() / dof)) / mean * 100.0
    ss_tot = float(((y - mean) ** 2).sum())
    r2 = 1.0 - float((resid ** 2).sum()) / ss_tot if ss_tot > 0 else None
    return FitStatistics(n, nmbe, cv, r2)


@dataclass(frozen=True)
class ScaleFit:
    """Scale factors that make the modelled parts of a fuel's use add up to its bills.

    Attributes
    ----------
    scales : mapping of str to float
        One factor per modelled part, dimensionless.
    matches_total : bool
        True when the scaled parts reproduce the billed total exactly (False when a bound
        stopped it).
    """

    scales: Mapping[str, float]
    matches_total: bool


def _solve(a: np.ndarray, y: np.ndarray, t: np.ndarray | None, total: float) -> np.ndarray | None:
    """Least squares of ``a @ s = y``, with ``t @ s = total`` when ``t`` is given (KKT system)."""
    k = a.shape[1]
    ata = a.T @ a
    aty = a.T @ y
    if t is None:
        sol, *_ = np.linalg.lstsq(ata, aty, rcond=None)
        return sol
    kkt = np.zeros((k + 1, k + 1))
    kkt[:k, :k] = ata
    kkt[:k, k] = t
    kkt[k, :k] = t
    rhs = np.append(aty, total)
    try:
        sol = np.linalg.solve(kkt, rhs)
    except np.linalg.LinAlgError:
        sol, *_ = np.linalg.lstsq(kkt, rhs, rcond=None)
    return sol[:k]


def fit_scales(billed: np.ndarray, parts: Mapping[str, np.ndarray], fixed: np.ndarray | None = None,
               bounds: Mapping[str, tuple[float, float]] | None = None) -> ScaleFit:
    """Scale factors s_k, within bounds, so that sum_k s_k * part_k + fixed follows the bills.

    The billed total is matched exactly when the bounds allow it; among the factors that match
    it, those with the least squared monthly error are chosen (with a single billing period, as
    for an annual total, give a single part). Every combination of parts held at a bound is
    tried (a handful of parts: exact, no solver needed).

    Parameters
    ----------
    billed : numpy.ndarray
        Billed use of each period (12 months, or 1 for an annual total), trade units.
    parts : mapping of str to numpy.ndarray
        Modelled use of each part (e.g. ``heating``, ``base``) at scale 1, per period.
    fixed : numpy.ndarray or None
        Modelled use that is not scaled (e.g. an electric car's charging), per period.
    bounds : mapping of str to (float, float) or None
        Lowest and highest factor of each part; missing parts are unbounded above 0.

    Returns
    -------
    ScaleFit
        The factors and whether the billed total is met.

    Raises
    ------
    ValueError
        If there are no parts, or their lengths differ from the bills'.

    References
    ----------
    ASHRAE Guideline 14-2014, calibrated simulation: adjust uncertain model inputs until the
    model reproduces the bills (from memory); equality-constrained least squares by the
    Karush-Kuhn-Tucker system (Boyd & Vandenberghe, Convex Optimization, 2004, sec. 10.1.1).
    """
    names = list(parts)
    if not names:
        raise ValueError("nothing to fit")
    y = np.asarray(billed, float).ravel()
    a = np.column_stack([np.asarray(parts[k], float).ravel() for k in names])
    if a.shape[0] != y.size:
        raise ValueError("parts and bills must cover the same periods")
    f = np.zeros_like(y) if fixed is None else np.asarray(fixed, float).ravel()
    r = y - f
    total = float(r.sum())
    col_total = a.sum(axis=0)
    bounds = bounds or {}
    lo = np.array([bounds.get(k, (0.0, np.inf))[0] for k in names])
    hi = np.array([bounds.get(k, (0.0, np.inf))[1] for k in names])
    live = col_total > 0  # a part the model gives nothing for cannot be fitted
    best: tuple[float, np.ndarray, bool] | None = None
    for exact in (True, False):
        for states in itertools.product((0, 1, 2), repeat=len(names)):  # free, at low, at high
            if any(st == 2 and not np.isfinite(hi[i]) for i, st in enumerate(states)):
                continue
            s = np.where(np.array(states) == 1, lo, np.where(np.array(states) == 2, hi, 0.0))
            s = np.where(live, s, 1.0)
            free = [i for i, st in enumerate(states) if st == 0 and live[i]]
            rest = r - a @ np.where([i in free for i in range(len(names))], 0.0, s)
            if free:
                sol = _solve(a[:, free], rest, col_total[free] if exact else None,
                             float(rest.sum()))
                if sol is None:
                    continue
                s[free] = sol
            elif exact and abs(float((a @ s).sum()) - total) > 1e-9 * max(abs(total), 1.0):
                continue
            if np.any(s < lo - 1e-9) or np.any(s > hi + 1e-9):
                continue
            err = float(((r - a @ s) ** 2).sum())
            if best is None or err < best[0] - 1e-12:
                best = (err, s.copy(), exact)
        if best is not None:
            break
    if best is None:  # no combination fits: every part at its nearest bound to scale 1
        s = np.clip(np.ones(len(names)), lo, hi)
        return ScaleFit(dict(zip(names, map(float, s), strict=True)), False)
    return ScaleFit(dict(zip(names, map(float, best[1]), strict=True)), best[2])
