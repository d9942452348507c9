"""Electric tariffs (flat or time-of-use, fixed charges, net metering or net billing) and fossil
fuel prices with fixed charges."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from homeplan.energy import timegrid
from homeplan.energy._data import price_row

__all__ = [
    "FOSSIL_FUELS",
    "ElectricBill",
    "ElectricRate",
    "FuelPrice",
    "FuelPrices",
    "TouPeriod",
    "electric_bill",
    "fuel_bill",
    "hourly_price",
]


@dataclass(frozen=True)
class TouPeriod:
    """A priced time-of-use period: ``hours`` (0-23) in ``months`` (1-12), optionally weekdays only.
    Later periods override earlier ones where they overlap.

    Attributes
    ----------
    name : str
        Period label, e.g. ``peak``.
    usd_per_kwh : float
        Energy price in the period, USD/kWh.
    hours : tuple of int
        Hours of day in the period, 0-23 (hour starting).
    months : tuple of int
        Months in the period, 1-12.
    weekdays_only : bool
        If True, the period applies Monday to Friday only.
    """

    name: str
    usd_per_kwh: float
    hours: tuple[int, ...]
    months: tuple[int, ...] = tuple(range(1, 13))
    weekdays_only: bool = False


@dataclass(frozen=True)
class ElectricRate:
    """A residential electric tariff.

    Defaults come from data/prices.csv. ``usd_per_kwh`` is the flat (or base, outside every TOU
    period) energy price. ``export`` is
    ``net_metering`` (exports credited at the retail price of their hour, monthly netting, credits
    carried to the annual true-up, where leftovers are paid at ``true_up_usd_per_kwh``),
    ``net_billing`` (exports credited at ``export_usd_per_kwh``, credits carried within the year)
    or ``none``. Credits never offset the fixed charge; ``min_bill_usd`` is a monthly minimum.

    Attributes
    ----------
    usd_per_kwh : float
        Flat (or base) energy price, USD/kWh.
    fixed_usd_per_month : float
        Fixed customer charge, USD per month.
    tou_periods : tuple of TouPeriod
        Time-of-use periods (empty = flat rate).
    export : str
        Export compensation: ``net_metering``, ``net_billing`` or ``none``.
    export_usd_per_kwh : float
        Export credit under net billing, USD/kWh.
    true_up_usd_per_kwh : float
        True-up payout for leftover net metering credit, USD per kWh of annual net export.
    min_bill_usd : float
        Minimum bill, USD per month.

    Raises
    ------
    ValueError
        If ``export`` is not one of the three designs.

    References
    ----------
    NREL (2017) "Net Metering", and Zinaman et al. (2017) "Grid-connected distributed generation:
    compensation mechanism basics", NREL/BR-6A20-68469 (net metering vs net billing).
    """

    usd_per_kwh: float = field(default_factory=lambda: price_row("electricity")[0])
    fixed_usd_per_month: float = field(default_factory=lambda: price_row("electricity")[1])
    tou_periods: tuple[TouPeriod, ...] = ()
    export: str = "net_metering"
    export_usd_per_kwh: float = 0.05
    true_up_usd_per_kwh: float = 0.03
    min_bill_usd: float = 0.0

    def __post_init__(self) -> None:
        if self.export not in ("net_metering", "net_billing", "none"):
            raise ValueError("export must be net_metering, net_billing or none")


@dataclass(frozen=True)
class FuelPrice:
    """Price per trade unit (therm, gal) and a fixed monthly charge (meter fee, tank rental).

    Attributes
    ----------
    usd_per_unit : float
        Price, USD per trade unit (therm or gal).
    fixed_usd_per_month : float
        Fixed charge, USD per month.
    """

    usd_per_unit: float
    fixed_usd_per_month: float = 0.0


FOSSIL_FUELS = ("natural_gas", "propane", "heating_oil", "gasoline", "diesel")


def _default_prices() -> dict[str, FuelPrice]:
    return {f: FuelPrice(*price_row(f)) for f in FOSSIL_FUELS}


@dataclass(frozen=True)
class FuelPrices:
    """Prices of every fossil fuel by name (``natural_gas``, ``propane``, ``heating_oil``,
    ``gasoline``, ``diesel``). Defaults: US averages in data/prices.csv (EIA 2023-25).

    Attributes
    ----------
    prices : dict of str to FuelPrice
        Price of each fossil fuel by name, USD per trade unit and USD per month.
    """

    prices: dict[str, FuelPrice] = field(default_factory=_default_prices)

    def __hash__(self) -> int:
        return hash(tuple(sorted(self.prices.items())))

    def get(self, fuel: str) -> FuelPrice:
        """Price of one fuel.

        Parameters
        ----------
        fuel : str
            Fuel name, e.g. ``propane``.

        Returns
        -------
        FuelPrice
            Price, USD per trade unit, and fixed charge, USD per month.

        Raises
        ------
        KeyError
            If ``fuel`` has no price.
        """
        return self.prices[fuel]


def hourly_price(rate: ElectricRate, weekday: np.ndarray | None = None) -> np.ndarray:
    """Energy price of every hour of the typical year (USD/kWh).

    Parameters
    ----------
    rate : ElectricRate
        The tariff.
    weekday : numpy.ndarray or None
        Day of week of every hour, 0 = Monday (8760 values); None uses
        :func:`homeplan.energy.timegrid.weekday`.

    Returns
    -------
    numpy.ndarray
        Energy price of each hour, USD/kWh (8760 values).
    """
    price = np.full(timegrid.HOURS_PER_YEAR, rate.usd_per_kwh)
    if not rate.tou_periods:
        return price
    hod = timegrid.hour_of_day()
    month = timegrid.hour_month()
    wd = timegrid.weekday() if weekday is None else weekday
    for period in rate.tou_periods:
        mask = np.isin(hod, period.hours) & np.isin(month, period.months)
        if period.weekdays_only:
            mask &= wd < 5
        price = np.where(mask, period.usd_per_kwh, price)
    return price


@dataclass(frozen=True, eq=False)
class ElectricBill:
    """Monthly electric bill pieces (12 values each, USD) and the annual true-up payout.

    Attributes
    ----------
    energy_usd : numpy.ndarray
        Energy charge of each month, USD (12 values).
    export_credit_usd : numpy.ndarray
        Export credit earned in each month, USD (12 values).
    fixed_usd : numpy.ndarray
        Fixed charge of each month, USD (12 values).
    total_usd : numpy.ndarray
        Amount billed each month after carried credits and the minimum bill, USD (12 values;
        December less the true-up payout).
    true_up_payout_usd : float
        Payout of leftover net metering credit at the true-up, USD.
    """

    energy_usd: np.ndarray
    export_credit_usd: np.ndarray
    fixed_usd: np.ndarray
    total_usd: np.ndarray
    true_up_payout_usd: float

    @property
    def annual_usd(self) -> float:
        """Total billed over the year, USD."""
        return float(self.total_usd.sum())


def electric_bill(rate: ElectricRate, import_kwh: np.ndarray, export_kwh: np.ndarray,
                  price: np.ndarray | None = None, connected: bool = True) -> ElectricBill:
    """Bill a year of hourly grid imports and exports under ``rate``.

    Each month: energy = sum(import x price); export credit at the hour's retail price (net
    metering) or the export rate (net billing); a credit larger than the month's energy charge is
    carried forward; the fixed charge is always paid. At the December true-up, leftover net
    metering credit is paid out at ``true_up_usd_per_kwh`` per kWh of annual net export; leftover
    net billing credit is forfeited.

    Parameters
    ----------
    rate : ElectricRate
        The tariff.
    import_kwh : numpy.ndarray
        Grid import of each hour, kWh (8760 values).
    export_kwh : numpy.ndarray
        Grid export of each hour, kWh (8760 values).
    price : numpy.ndarray or None
        Energy price of each hour, USD/kWh (8760 values); None computes :func:`hourly_price`.
    connected : bool
        False for a home off the grid: no fixed charge and no minimum bill.

    Returns
    -------
    ElectricBill
        Monthly bill pieces and the true-up payout, USD.

    References
    ----------
    Zinaman et al. (2017) NREL/BR-6A20-68469 (export credit designs).
    """
    p = hourly_price(rate) if price is None else price
    starts = timegrid.month_start_hours()
    energy = np.add.reduceat(import_kwh * p, starts)
    if rate.export == "net_metering":
        credit = np.add.reduceat(export_kwh * p, starts)
    elif rate.export == "net_billing":
        credit = np.add.reduceat(export_kwh * rate.export_usd_per_kwh, starts)
    else:
        credit = np.zeros(12)
    fixed = np.full(12, rate.fixed_usd_per_month if connected else 0.0)
    net = energy - credit
    # Carry credits forward month by month (12 steps: negligible cost).
    charged = np.empty(12)
    bank = 0.0
    for m in range(12):
        v = net[m] - bank
        if v < 0:
            bank = -v
            charged[m] = 0.0
        else:
            bank = 0.0
            charged[m] = v
    payout = 0.0
    if rate.export == "net_metering" and bank > 0:
        net_export = float(export_kwh.sum() - import_kwh.sum())
        payout = max(net_export, 0.0) * rate.true_up_usd_per_kwh
    total = np.maximum(charged + fixed, rate.min_bill_usd if connected else 0.0)
    total[-1] -= payout
    return ElectricBill(energy, credit, fixed, total, payout)


def fuel_bill(price: FuelPrice, monthly_units: np.ndarray, service_open: bool) -> np.ndarray:
    """Monthly fuel bill = units x price + fixed charge while the service/account is open.

    The gas fixed charge ends only when the gas service is closed, not when use reaches zero.

    Parameters
    ----------
    price : FuelPrice
        Price, USD per trade unit, and fixed charge, USD per month.
    monthly_units : numpy.ndarray
        Fuel use of each month, trade units (12 values).
    service_open : bool
        Whether the service or account is open (the fixed charge is billed).

    Returns
    -------
    numpy.ndarray
        Bill of each month, USD (12 values).

    References
    ----------
    Common practice, no source: a utility's fixed monthly charge is billed while the account is
    open, so closing the gas service saves it.
    """
    fixed = price.fixed_usd_per_month if service_open else 0.0
    return np.asarray(monthly_units, float) * price.usd_per_unit + fixed
