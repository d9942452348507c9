"""Solar sizing helpers: array size for a share of annual use, and the monthly balance."""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from homeplan.energy import timegrid
from homeplan.energy.solar import SolarArraySpec

__all__ = ["MonthlyBalance", "array_kw_for_coverage", "monthly_balance", "size_array"]


def array_kw_for_coverage(annual_load_kwh: float, specific_yield_kwh_per_kwdc: float,
                          coverage: float = 1.0) -> float:
    """kWdc that produces ``coverage`` x the annual load: coverage * load / specific yield.

    Parameters
    ----------
    annual_load_kwh : float
        Annual electric load, kWh.
    specific_yield_kwh_per_kwdc : float
        Annual AC output per kW of DC nameplate, kWh/kWdc.
    coverage : float
        Share of the annual load to produce, fraction (1.0 = 100 %).

    Returns
    -------
    float
        Array size, kWdc.

    Raises
    ------
    ValueError
        If ``specific_yield_kwh_per_kwdc`` is not positive.

    References
    ----------
    NREL PVWatts (Dobos 2014, NREL/TP-6A20-62641): annual AC energy scales with kWdc for a
    fixed DC/AC ratio; common practice for net-metered sizing.
    """
    if specific_yield_kwh_per_kwdc <= 0:
        raise ValueError("specific yield must be positive")
    return coverage * annual_load_kwh / specific_yield_kwh_per_kwdc


@dataclass(frozen=True, eq=False)
class MonthlyBalance:
    """Monthly load and production (kWh), their difference and the coverage ratio.

    Attributes
    ----------
    load_kwh : numpy.ndarray
        Load of each month, kWh (12 values).
    production_kwh : numpy.ndarray
        Solar production of each month, kWh (12 values).
    """

    load_kwh: np.ndarray
    production_kwh: np.ndarray

    @property
    def net_kwh(self) -> np.ndarray:
        """Load minus production (positive: the month draws from the grid / banked credits)."""
        return self.load_kwh - self.production_kwh

    @property
    def coverage(self) -> np.ndarray:
        """Production / load per month."""
        return np.divide(self.production_kwh, self.load_kwh,
                         out=np.zeros(12), where=self.load_kwh > 0)

    @property
    def annual_coverage(self) -> float:
        """Annual production / annual load, fraction."""
        return float(self.production_kwh.sum() / max(self.load_kwh.sum(), 1e-9))

    @property
    def worst_month(self) -> str:
        """Name of the month with the lowest coverage (e.g. ``Dec``)."""
        return timegrid.MONTH_NAMES[int(np.argmin(self.coverage))]


def monthly_balance(load_kw: np.ndarray, solar_kw: np.ndarray) -> MonthlyBalance:
    """Monthly balance of hourly load against hourly production.

    Parameters
    ----------
    load_kw : numpy.ndarray
        Load of each hour, kW = kWh per hour (8760 values).
    solar_kw : numpy.ndarray
        AC solar production of each hour, kW (8760 values).

    Returns
    -------
    MonthlyBalance
        Monthly load and production, kWh.
    """
    starts = timegrid.month_start_hours()
    return MonthlyBalance(np.add.reduceat(load_kw, starts), np.add.reduceat(solar_kw, starts))


def size_array(load_kw: np.ndarray, ac_kw_per_kwdc: np.ndarray, coverage: float = 1.0,
               basis: str = "annual", shape: SolarArraySpec | None = None) -> SolarArraySpec:
    """Array (``shape`` with ``dc_kw`` set) covering ``coverage`` of the load.

    ``basis="annual"`` matches annual totals; ``basis="worst_month"`` makes the lowest
    month's production reach ``coverage`` x its load (winter-peaking homes need far more).

    Parameters
    ----------
    load_kw : numpy.ndarray
        Load of each hour, kW = kWh per hour (8760 values).
    ac_kw_per_kwdc : numpy.ndarray
        AC output of each hour per kW of DC nameplate, kW/kWdc (8760 values).
    coverage : float
        Share of the load to cover, fraction.
    basis : str
        ``annual`` or ``worst_month``.
    shape : SolarArraySpec or None
        Orientation and losses of the array; None uses :class:`SolarArraySpec` defaults.

    Returns
    -------
    SolarArraySpec
        ``shape`` with ``dc_kw`` set to the size found, kWdc.

    Raises
    ------
    ValueError
        If ``basis`` is unknown, or the annual specific yield is not positive.

    References
    ----------
    Common practice, no source: net-metered arrays are sized to 100-120 % of annual use; sizing
    to the winter months shows the seasonal mismatch.
    """
    starts = timegrid.month_start_hours()
    load_m = np.add.reduceat(load_kw, starts)
    prod_m = np.add.reduceat(ac_kw_per_kwdc, starts)
    if basis == "annual":
        kw = array_kw_for_coverage(float(load_m.sum()), float(prod_m.sum()), coverage)
    elif basis == "worst_month":
        kw = float(np.max(coverage * load_m / np.maximum(prod_m, 1e-9)))
    else:
        raise ValueError("basis must be annual or worst_month")
    return replace(shape or SolarArraySpec(dc_kw=1.0), dc_kw=kw)
