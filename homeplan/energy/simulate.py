"""Central entry point: simulate one typical year of a home in one plan state.

Build a :class:`HomeEnergySpec` per state (``dataclasses.replace`` swaps one part, e.g. the
heating system), one :class:`SiteCache` per home, and call :func:`simulate`.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import TYPE_CHECKING

import numpy as np

from homeplan.energy import timegrid
from homeplan.energy.appliances import (
    CookingSpec,
    DryerSpec,
    cooking_annual_input,
    dryer_annual_input,
    spread_daily,
)
from homeplan.energy.battery import BatterySpec, dispatch
from homeplan.energy.emissions import EmissionFactors, emissions_kg, fuel_money_out_usd
from homeplan.energy.heating import (
    CoolingSpec,
    FurnaceSpec,
    HeatingSpec,
    HeatPumpSpec,
    ResistanceHeatSpec,
    cooling_kwh,
    heating_hourly,
)
from homeplan.energy.rates import ElectricRate, FuelPrices, electric_bill, fuel_bill, hourly_price
from homeplan.energy.solar import ArrayKeeper, SolarArraySpec, SolarSite
from homeplan.energy.units import FUEL_UNITS, btu_to_kwh
from homeplan.energy.vehicles import VehicleSpec, ev_charging_hourly, vehicle_annual_input
from homeplan.energy.water import (
    WaterHeaterSpec,
    hot_water_gal_per_day,
    mains_temperature_f,
    water_heating_hourly,
)
from homeplan.energy.weather import Weather

if TYPE_CHECKING:
    import pandas as pd

FUELS: tuple[str, ...] = tuple(FUEL_UNITS)
END_USES = ("heating", "cooling", "water", "cooking", "drying", "vehicles", "plug")


@dataclass(frozen=True)
class HomeEnergySpec:
    """Everything the engine needs about one home in one plan state.

    ``ua_btuh_f`` comes from :mod:`homeplan.energy.calibrate`. ``heating`` None means no heating;
    ``cooling`` None means no cooling (use :func:`with_heat_pump` to install a heat pump that both
    heats and cools). ``plug_kwh_per_yr`` is every other electric use (lighting, fridge, plug loads
    - the bills' electric baseload minus the modelled end uses). ``gas_service_open`` keeps the gas
    fixed charge until the gas service is closed; gas use with a closed service is an error.
    ``fuel_accounts_open`` lists other fuels (``propane``, ``heating_oil``) whose fixed charge
    (tank lease, service contract) continues with zero use until the tank is removed.
    ``cooling_load_multiplier`` scales the sensible degree-hour cooling load for solar and latent
    gains (1.0 = none; calibrate it against summer electric bills).

    Attributes
    ----------
    weather : Weather
        Typical-year weather at the site.
    ua_btuh_f : float
        Heat-loss coefficient UA, Btu/h-F.
    heating : HeatingSpec or None
        Space heating system; None means no heating.
    cooling : CoolingSpec or None
        Cooling system; None means no cooling.
    water_heater : WaterHeaterSpec or None
        Water heater; None means none.
    cooking : CookingSpec or None
        Range or cooktop; None means none.
    dryer : DryerSpec or None
        Clothes dryer; None means none.
    vehicles : tuple of VehicleSpec
        The household's vehicles.
    plug_kwh_per_yr : float
        Every other electric use, kWh per year.
    solar : SolarArraySpec or None
        Rooftop solar array; None means none.
    battery : BatterySpec or None
        Home battery; None means none.
    electric_rate : ElectricRate
        Electric tariff.
    fuel_prices : FuelPrices
        Fossil fuel prices, USD per trade unit and USD per month.
    emission_factors : EmissionFactors
        Emission factors, kg CO2 per trade unit.
    occupants : float
        Number of occupants (sets the default hot water use).
    hot_water_gal_per_day : float or None
        Hot water use, gal/day; None derives it from ``occupants``.
    heating_balance_f : float
        Balance temperature of the heating degree-hours, F.
    cooling_balance_f : float
        Balance temperature of the cooling degree-hours, F.
    cooling_load_multiplier : float
        Multiplier on the sensible cooling load, dimensionless.
    gas_service_open : bool
        Whether the gas service, and its fixed charge, continues.
    fuel_accounts_open : tuple of str
        Other fuels whose fixed charge continues with zero use.
    label : str
        Name of the state in results.

    Raises
    ------
    ValueError
        If ``ua_btuh_f`` is negative, or gas appliances remain with the gas service closed.
    """

    weather: Weather
    ua_btuh_f: float
    heating: HeatingSpec | None = field(default_factory=FurnaceSpec)
    cooling: CoolingSpec | None = None
    water_heater: WaterHeaterSpec | None = field(default_factory=WaterHeaterSpec)
    cooking: CookingSpec | None = field(default_factory=CookingSpec)
    dryer: DryerSpec | None = field(default_factory=DryerSpec)
    vehicles: tuple[VehicleSpec, ...] = ()
    plug_kwh_per_yr: float = 5000.0
    solar: SolarArraySpec | None = None
    battery: BatterySpec | None = None
    electric_rate: ElectricRate = field(default_factory=ElectricRate)
    fuel_prices: FuelPrices = field(default_factory=FuelPrices)
    emission_factors: EmissionFactors = field(default_factory=EmissionFactors.default)
    occupants: float = 3.0
    hot_water_gal_per_day: float | None = None
    heating_balance_f: float = 65.0
    cooling_balance_f: float = 65.0
    cooling_load_multiplier: float = 1.0
    gas_service_open: bool = True
    fuel_accounts_open: tuple[str, ...] = ()
    label: str = ""

    def __post_init__(self) -> None:
        if self.ua_btuh_f < 0:
            raise ValueError("ua_btuh_f must be >= 0")
        if not isinstance(self.vehicles, tuple):
            object.__setattr__(self, "vehicles", tuple(self.vehicles))
        if not self.gas_service_open and "natural_gas" in self.fuels_used():
            raise ValueError(f"{self.label or 'home'}: natural gas appliances remain but the gas "
                             "service is closed")

    def fuels_used(self) -> set[str]:
        """Fuels burned by some appliance of this state (electricity excluded).

        Returns
        -------
        set of str
            Fuel names, e.g. ``{"natural_gas", "gasoline"}``.
        """
        fuels: set[str] = set()
        h = self.heating
        if isinstance(h, FurnaceSpec):
            fuels.add(h.fuel)
        elif isinstance(h, HeatPumpSpec) and h.backup not in ("resistance", "none"):
            fuels.add(h.backup)
        if self.water_heater and self.water_heater.fuel != "electricity":
            fuels.add(self.water_heater.fuel)
        if self.cooking and self.cooking.kind in ("natural_gas", "propane"):
            fuels.add(self.cooking.kind)
        if self.dryer and self.dryer.kind in ("natural_gas", "propane"):
            fuels.add(self.dryer.kind)
        fuels.update(v.fuel for v in self.vehicles if v.fuel != "electricity")
        return fuels

    @property
    def design_heating_load_btuh(self) -> float:
        """UA x (balance temperature - 99 % design temperature) (ACCA Manual J convention)."""
        return self.ua_btuh_f * max(self.heating_balance_f - float(self.weather.heating_design_f), 0.0)

    @property
    def gal_per_day(self) -> float:
        """Hot water use, gal/day (given, or from the number of occupants)."""
        if self.hot_water_gal_per_day is not None:
            return self.hot_water_gal_per_day
        return hot_water_gal_per_day(self.occupants)


def with_heat_pump(spec: HomeEnergySpec, hp: HeatPumpSpec) -> HomeEnergySpec:
    """The same home with ``hp`` heating and cooling (cooling at the heat pump's SEER2).

    Parameters
    ----------
    spec : HomeEnergySpec
        The home in one state.
    hp : HeatPumpSpec
        The heat pump.

    Returns
    -------
    HomeEnergySpec
        A copy of ``spec`` heated by ``hp`` and cooled at its SEER2 (its rated cooling capacity
        taken as its nominal 47 F heating capacity; modulating when it does not cycle).
    """
    return replace(spec, heating=hp, cooling=CoolingSpec(seer2=hp.seer2, capacity_btuh=hp.capacity_47_btuh,
                                                         variable_speed=hp.cycling_cd == 0.0))


class SiteCache:
    """Per-home cache of weather-only quantities: solar geometry and POA (via :class:`SolarSite`),
    degree-hour arrays, mains water temperature, hourly prices and daily profiles.

    Build once per home (``SiteCache(weather)``) and pass to every :func:`simulate` of that home.
    It memoises by value of small frozen specs; it is not thread-safe for concurrent first use.
    Homes of one location may share one :class:`~homeplan.energy.solar.SolarSite` (it depends on
    the weather only): pass it as ``solar``.

    Parameters
    ----------
    weather : Weather
        The home's typical-year weather.
    keep : ArrayKeeper or None
        Keeps weather-only hourly arrays (the solar output per kWdc) between runs; None keeps
        them in memory only.
    solar : SolarSite, optional
        The solar geometry of this weather, already built (default: a new one, with ``keep``).
    """

    def __init__(self, weather: Weather, keep: ArrayKeeper | None = None,
                 solar: SolarSite | None = None) -> None:
        if solar is not None and solar.weather is not weather:
            raise ValueError("a shared SolarSite must be built on this same weather")
        self.weather = weather
        self.solar = solar if solar is not None else SolarSite(weather, keep)
        self._memo: dict[tuple, object] = {}
        self.hour_of_day = timegrid.hour_of_day()
        self.month = timegrid.hour_month()
        self.winter_mask = np.isin(self.month, timegrid.WINTER_MONTHS)
        self.summer_mask = np.isin(self.month, timegrid.SUMMER_MONTHS)

    def _get(self, key: tuple, make):  # noqa: ANN001 - small private helper
        try:
            return self._memo[key]
        except KeyError:
            val = make()
            self._memo[key] = val
            return val

    def heating_degree_hours(self, balance_f: float) -> np.ndarray:
        """max(T_bal - T, 0) per hour (F).

        Parameters
        ----------
        balance_f : float
            Balance temperature, F.

        Returns
        -------
        numpy.ndarray
            Heating degree-hours of each hour, F-h (8760 values).
        """
        return self._get(("hdh", balance_f),
                         lambda: np.maximum(balance_f - self.weather.temp_f, 0.0))

    def cooling_degree_hours(self, balance_f: float) -> np.ndarray:
        """max(T - T_bal, 0) per hour (F).

        Parameters
        ----------
        balance_f : float
            Balance temperature, F.

        Returns
        -------
        numpy.ndarray
            Cooling degree-hours of each hour, F-h (8760 values).
        """
        return self._get(("cdh", balance_f),
                         lambda: np.maximum(self.weather.temp_f - balance_f, 0.0))

    def mains_f(self) -> np.ndarray:
        """Daily mains water temperature (Burch & Christensen 2007).

        Returns
        -------
        numpy.ndarray
            Mains water temperature of each day, F (365 values).
        """
        return self._get(("mains",), lambda: mains_temperature_f(self.weather.temp_f,
                                                                 self.weather.latitude_deg))

    def price(self, rate: ElectricRate) -> np.ndarray:
        """Hourly energy price of ``rate``.

        Parameters
        ----------
        rate : ElectricRate
            The tariff.

        Returns
        -------
        numpy.ndarray
            Energy price of each hour, USD/kWh (8760 values).
        """
        return self._get(("price", rate), lambda: hourly_price(rate))

    def water_hourly(self, spec: WaterHeaterSpec, gal_per_day: float) -> np.ndarray:
        """Hourly water heating input at this site (memoised).

        Parameters
        ----------
        spec : WaterHeaterSpec
            The water heater.
        gal_per_day : float
            Hot water use, gal/day.

        Returns
        -------
        numpy.ndarray
            Input of each hour, trade units (kWh, therm or gal; 8760 values).
        """
        return self._get(("water", spec, gal_per_day),
                         lambda: water_heating_hourly(spec, gal_per_day, self.mains_f()))

    def ev_hourly(self, spec: VehicleSpec) -> np.ndarray:
        """Hourly home charging of an electric vehicle (memoised).

        Parameters
        ----------
        spec : VehicleSpec
            The electric vehicle.

        Returns
        -------
        numpy.ndarray
            Charging energy of each hour, kWh from the wall (8760 values).
        """
        return self._get(("ev", spec), lambda: ev_charging_hourly(spec))

    def profile(self, name: str, annual: float) -> np.ndarray:
        """An annual amount spread over the hours by a daily profile (memoised).

        Parameters
        ----------
        name : str
            Column of ``data/hourly_profiles.csv``, e.g. ``plug``.
        annual : float
            Annual amount, trade units per year (e.g. kWh).

        Returns
        -------
        numpy.ndarray
            Amount in each hour, same unit (8760 values).
        """
        return self._get(("profile", name, annual), lambda: spread_daily(annual, name))

    def pv_ac_kw(self, spec: SolarArraySpec) -> np.ndarray:
        """Hourly AC output of a solar array at this site.

        Parameters
        ----------
        spec : SolarArraySpec
            The array.

        Returns
        -------
        numpy.ndarray
            AC output of each hour, kW (8760 values).
        """
        return self.solar.ac_kw(spec)


@dataclass(frozen=True, eq=False)
class EnergyResult:
    """One simulated typical year of one home state.

    Hourly arrays (8760, kW = kWh per hour): ``load_kw`` (site electric use), ``solar_kw``,
    ``grid_import_kw``, ``grid_export_kw``, ``battery_soc_kwh`` (None without a battery).
    ``monthly_units[fuel]`` (12 values) and ``end_use_units[end_use][fuel]`` (annual) are in each
    fuel's trade unit (:data:`homeplan.energy.units.FUEL_UNITS`); electricity there is site
    consumption. ``monthly_bills_usd[fuel]`` include fixed charges; electricity is billed on the
    grid imports/exports. Peaks are hourly-average kW of site load (``peak_*``) and grid import.
    Emissions: kg CO2 per fuel, electricity on grid imports.

    Attributes
    ----------
    load_kw : numpy.ndarray
        Site electric load of each hour, kW (8760 values).
    solar_kw : numpy.ndarray
        AC solar production of each hour, kW (8760 values).
    grid_import_kw : numpy.ndarray
        Grid import of each hour, kW (8760 values).
    grid_export_kw : numpy.ndarray
        Grid export of each hour, kW (8760 values).
    battery_soc_kwh : numpy.ndarray or None
        Battery state of charge at the end of each hour, kWh (8760 values).
    monthly_units : dict of str to numpy.ndarray
        Use of each month by fuel, trade units (12 values; electricity in site kWh).
    monthly_grid_import_kwh : numpy.ndarray
        Grid import of each month, kWh (12 values).
    monthly_grid_export_kwh : numpy.ndarray
        Grid export of each month, kWh (12 values).
    monthly_solar_kwh : numpy.ndarray
        Solar production of each month, kWh (12 values).
    monthly_end_use_units : dict of str to dict of str to numpy.ndarray
        Use of each month by end use and fuel, trade units (12 values).
    monthly_bills_usd : dict of str to numpy.ndarray
        Bill of each month by fuel, USD (12 values).
    peak_kw : float
        Highest hourly-average site load, kW.
    peak_winter_kw : float
        Highest hourly-average site load in December-February, kW.
    peak_summer_kw : float
        Highest hourly-average site load in June-August, kW.
    peak_import_kw : float
        Highest hourly-average grid import, kW.
    emissions_kg : dict of str to float
        Emissions by fuel, kg CO2 per year.
    backup_heat_hours : int
        Hours of the year with backup heat running, hours.
    heating_delivered_kwh : float
        Space heat delivered, kWh (thermal) per year.
    label : str
        Name of the state.
    """

    load_kw: np.ndarray
    solar_kw: np.ndarray
    grid_import_kw: np.ndarray
    grid_export_kw: np.ndarray
    battery_soc_kwh: np.ndarray | None
    monthly_units: dict[str, np.ndarray]
    monthly_grid_import_kwh: np.ndarray
    monthly_grid_export_kwh: np.ndarray
    monthly_solar_kwh: np.ndarray
    monthly_end_use_units: dict[str, dict[str, np.ndarray]]
    monthly_bills_usd: dict[str, np.ndarray]
    peak_kw: float
    peak_winter_kw: float
    peak_summer_kw: float
    peak_import_kw: float
    emissions_kg: dict[str, float]
    backup_heat_hours: int
    heating_delivered_kwh: float
    label: str = ""

    @property
    def end_use_units(self) -> dict[str, dict[str, float]]:
        """Annual use by end use and fuel, trade units per year."""
        return {u: {f: float(v.sum()) for f, v in by_fuel.items()}
                for u, by_fuel in self.monthly_end_use_units.items()}

    @property
    def annual_units(self) -> dict[str, float]:
        """Annual use by fuel (trade units; electricity = site kWh)."""
        return {f: float(v.sum()) for f, v in self.monthly_units.items()}

    @property
    def annual_bills_usd(self) -> dict[str, float]:
        """Annual bill by fuel, USD per year (fixed charges included)."""
        return {f: float(v.sum()) for f, v in self.monthly_bills_usd.items()}

    @property
    def total_bill_usd(self) -> float:
        """Sum of every annual bill, USD per year."""
        return float(sum(self.annual_bills_usd.values()))

    @property
    def total_emissions_kg(self) -> float:
        """Emissions of every fuel, kg CO2 per year."""
        return float(sum(self.emissions_kg.values()))

    @property
    def fossil_fuel_usd(self) -> float:
        """Money that leaves the household for fossil fuel each year (incl. fixed charges)."""
        return fuel_money_out_usd(self.annual_bills_usd)

    @property
    def grid_import_kwh(self) -> float:
        """Annual grid import, kWh."""
        return float(self.monthly_grid_import_kwh.sum())

    @property
    def grid_export_kwh(self) -> float:
        """Annual grid export, kWh."""
        return float(self.monthly_grid_export_kwh.sum())

    def summary(self) -> dict[str, float]:
        """Plain annual figures (JSON-friendly) for reports and the scheduler.

        Returns
        -------
        dict of str to float
            Annual figures, each key naming its unit (e.g. ``total_bill_usd``, ``peak_kW``).
        """
        out: dict[str, float] = {}
        for fuel, v in self.annual_units.items():
            out[f"{fuel}_{FUEL_UNITS[fuel]}"] = v
        for fuel, v in self.annual_bills_usd.items():
            out[f"bill_{fuel}_usd"] = v
        out.update({
            "total_bill_usd": self.total_bill_usd,
            "fossil_fuel_usd": self.fossil_fuel_usd,
            "grid_import_kWh": self.grid_import_kwh,
            "grid_export_kWh": self.grid_export_kwh,
            "solar_kWh": float(self.monthly_solar_kwh.sum()),
            "peak_kW": self.peak_kw,
            "peak_winter_kW": self.peak_winter_kw,
            "peak_summer_kW": self.peak_summer_kw,
            "peak_import_kW": self.peak_import_kw,
            "kg_co2": self.total_emissions_kg,
            "backup_heat_hours": float(self.backup_heat_hours),
        })
        return out

    def monthly_frame(self) -> pd.DataFrame:
        """Months x (use per fuel, grid import/export, solar, bill per fuel, peak load kW).

        Returns
        -------
        pandas.DataFrame
            12 rows indexed by month name; each column name ends in its unit (kWh, USD, kW or
            the fuel's trade unit).
        """
        import pandas as pd

        cols: dict[str, np.ndarray] = {}
        for fuel, v in self.monthly_units.items():
            cols[f"{fuel}_{FUEL_UNITS[fuel]}"] = v
        cols["grid_import_kWh"] = self.monthly_grid_import_kwh
        cols["grid_export_kWh"] = self.monthly_grid_export_kwh
        cols["solar_kWh"] = self.monthly_solar_kwh
        for fuel, v in self.monthly_bills_usd.items():
            cols[f"bill_{fuel}_usd"] = v
        cols["peak_load_kW"] = np.maximum.reduceat(self.load_kw, timegrid.month_start_hours())
        df = pd.DataFrame(cols, index=pd.Index(list(timegrid.MONTH_NAMES), name="month"))
        return df

    def annual_frame(self) -> pd.DataFrame:
        """Fuels x (use, unit, bill_usd, kg_co2).

        Returns
        -------
        pandas.DataFrame
            One row per fuel: ``use`` (trade units per year, named in ``unit``), ``bill_usd``
            (USD per year) and ``kg_co2`` (kg CO2 per year).
        """
        import pandas as pd

        units = self.annual_units
        bills = self.annual_bills_usd
        rows = [
            {"fuel": f, "use": units[f], "unit": FUEL_UNITS[f], "bill_usd": bills.get(f, 0.0),
             "kg_co2": self.emissions_kg.get(f, 0.0)}
            for f in units
        ]
        return pd.DataFrame(rows).set_index("fuel")


def _add(store: dict[str, np.ndarray], fuel: str, arr: np.ndarray) -> None:
    if fuel in store:
        store[fuel] = store[fuel] + arr
    else:
        store[fuel] = arr


def simulate(spec: HomeEnergySpec, cache: SiteCache | None = None) -> EnergyResult:
    """Simulate a typical year of ``spec`` hour by hour (numpy-vectorised).

    Parameters
    ----------
    spec : HomeEnergySpec
        The home in one plan state.
    cache : SiteCache or None
        The home's cache, built for ``spec.weather``; None builds a new one.

    Returns
    -------
    EnergyResult
        Hourly, monthly and annual energy (kW, kWh, trade units), bills (USD) and emissions
        (kg CO2).

    Raises
    ------
    ValueError
        If ``cache`` was built for a different :class:`Weather`.

    References
    ----------
    Each end use cites its method in its module: heating.py (degree-hour loads, AFUE, heat pump
    47/17/5 F model, SEER2), water.py (UEF), appliances.py (transfer efficiency, CEF),
    vehicles.py (EPA kWh/mile), solar.py (pvlib PVWatts), battery.py, rates.py, emissions.py.
    """
    if cache is None:
        cache = SiteCache(spec.weather)
    elif cache.weather is not spec.weather:
        raise ValueError("SiteCache was built for a different Weather")
    n = timegrid.HOURS_PER_YEAR
    zero = np.zeros(n)
    hourly_fuel: dict[str, np.ndarray] = {}  # hourly combustion fuel use, trade units
    annual_other: dict[str, float] = {}  # fuels without an hourly shape (vehicles)
    end_use: dict[str, dict[str, np.ndarray]] = {u: {} for u in END_USES}  # monthly, trade units
    starts = timegrid.month_start_hours()
    share = timegrid.month_days() / timegrid.DAYS_PER_YEAR

    def monthly_of(hourly: np.ndarray) -> np.ndarray:
        return np.add.reduceat(hourly, starts)

    # Space heating.
    backup_hours = 0
    heat_kwh = zero
    delivered_kwh = 0.0
    if spec.heating is not None and spec.ua_btuh_f > 0:
        load = spec.ua_btuh_f * cache.heating_degree_hours(spec.heating_balance_f)
        hh = heating_hourly(spec.heating, spec.weather.temp_f, load)
        heat_kwh = hh.electric_kwh
        if hh.fuel is not None:
            _add(hourly_fuel, hh.fuel, hh.fuel_units)
            end_use["heating"][hh.fuel] = monthly_of(hh.fuel_units)
        end_use["heating"]["electricity"] = monthly_of(heat_kwh)
        backup_hours = hh.backup_hours
        delivered_kwh = float(btu_to_kwh(load.sum()))

    # Cooling.
    cool_kwh = zero
    if spec.cooling is not None and spec.ua_btuh_f > 0:
        cool_load = (spec.ua_btuh_f * spec.cooling_load_multiplier
                     * cache.cooling_degree_hours(spec.cooling_balance_f))
        cool_kwh = cooling_kwh(spec.cooling.seer2, cool_load)
        end_use["cooling"]["electricity"] = monthly_of(cool_kwh)

    elec = heat_kwh + cool_kwh

    # Water heating.
    if spec.water_heater is not None:
        wh = cache.water_hourly(spec.water_heater, spec.gal_per_day)
        if spec.water_heater.fuel == "electricity":
            elec = elec + wh
        else:
            _add(hourly_fuel, spec.water_heater.fuel, wh)
        end_use["water"][spec.water_heater.fuel] = monthly_of(wh)

    # Cooking and drying.
    if spec.cooking is not None:
        fuel, units = cooking_annual_input(spec.cooking)
        prof = cache.profile("cooking", units)
        if fuel == "electricity":
            elec = elec + prof
        else:
            _add(hourly_fuel, fuel, prof)
        end_use["cooking"][fuel] = monthly_of(prof)
    if spec.dryer is not None:
        for fuel, units in dryer_annual_input(spec.dryer).items():
            prof = cache.profile("dryer", units)
            if fuel == "electricity":
                elec = elec + prof
            else:
                _add(hourly_fuel, fuel, prof)
            end_use["drying"][fuel] = monthly_of(prof)

    # Vehicles.
    for v in spec.vehicles:
        fuel, units = vehicle_annual_input(v)
        if fuel == "electricity":
            ev = cache.ev_hourly(v)
            elec = elec + ev
            months = monthly_of(ev)
        else:
            annual_other[fuel] = annual_other.get(fuel, 0.0) + units
            months = units * share
        end_use["vehicles"][fuel] = end_use["vehicles"].get(fuel, np.zeros(12)) + months

    # Other electric loads.
    if spec.plug_kwh_per_yr > 0:
        elec = elec + cache.profile("plug", spec.plug_kwh_per_yr)
        end_use["plug"]["electricity"] = monthly_of(cache.profile("plug", spec.plug_kwh_per_yr))

    # Solar and battery.
    solar = cache.pv_ac_kw(spec.solar) if spec.solar is not None and spec.solar.dc_kw > 0 else zero
    net = elec - solar
    soc = None
    if spec.battery is not None and spec.battery.capacity_kwh > 0:
        b = dispatch(spec.battery, net, cache.hour_of_day)
        net = net + b.charge_kwh - b.discharge_kwh
        soc = b.soc_kwh
    grid_import = np.maximum(net, 0.0)
    grid_export = np.maximum(-net, 0.0)

    # Monthly energy.
    monthly: dict[str, np.ndarray] = {"electricity": np.add.reduceat(elec, starts)}
    for fuel, arr in hourly_fuel.items():
        monthly[fuel] = np.add.reduceat(arr, starts)
    for fuel, units in annual_other.items():
        monthly[fuel] = monthly.get(fuel, np.zeros(12)) + units * share
    if spec.gas_service_open and "natural_gas" not in monthly:
        monthly["natural_gas"] = np.zeros(12)
    for fuel in spec.fuel_accounts_open:  # a leased tank is billed until it is removed
        monthly.setdefault(fuel, np.zeros(12))
    m_imp = np.add.reduceat(grid_import, starts)
    m_exp = np.add.reduceat(grid_export, starts)

    # Bills.
    bill = electric_bill(spec.electric_rate, grid_import, grid_export, cache.price(spec.electric_rate))
    bills: dict[str, np.ndarray] = {"electricity": bill.total_usd}
    for fuel, units in monthly.items():
        if fuel == "electricity":
            continue
        open_ = (spec.gas_service_open if fuel == "natural_gas"
                 else bool(units.sum() > 0) or fuel in spec.fuel_accounts_open)
        bills[fuel] = fuel_bill(spec.fuel_prices.get(fuel), units, open_)

    # Emissions: electricity on grid imports.
    annual = {f: float(v.sum()) for f, v in monthly.items()}
    # Grid electricity: imports less exports. Exported solar displaces grid generation, so a
    # battery that only shifts exports to later self-use saves no CO2 (it loses some to losses).
    annual["electricity"] = float(m_imp.sum() - m_exp.sum())
    co2 = emissions_kg(annual, spec.emission_factors)

    return EnergyResult(
        load_kw=elec,
        solar_kw=solar,
        grid_import_kw=grid_import,
        grid_export_kw=grid_export,
        battery_soc_kwh=soc,
        monthly_units=monthly,
        monthly_grid_import_kwh=m_imp,
        monthly_grid_export_kwh=m_exp,
        monthly_solar_kwh=np.add.reduceat(solar, starts),
        monthly_end_use_units=end_use,
        monthly_bills_usd=bills,
        peak_kw=float(elec.max()),
        peak_winter_kw=float(elec[cache.winter_mask].max()),
        peak_summer_kw=float(elec[cache.summer_mask].max()),
        peak_import_kw=float(grid_import.max()),
        emissions_kg=co2,
        backup_heat_hours=backup_hours,
        heating_delivered_kwh=delivered_kwh,
        label=spec.label,
    )


def plug_kwh_from_bills(spec: HomeEnergySpec, billed_site_kwh_per_yr: float,
                        cache: SiteCache | None = None) -> float:
    """Other electric use (lighting, refrigerator, plug loads) = the bills' annual site
    consumption minus every modelled end use of the current state (never negative).

    ``billed_site_kwh_per_yr`` is consumption: with existing solar add the self-consumed production
    back to the billed grid kWh first.

    Parameters
    ----------
    spec : HomeEnergySpec
        The home in its current state.
    billed_site_kwh_per_yr : float
        Annual site electricity consumption from the bills, kWh per year.
    cache : SiteCache or None
        The home's cache, built for ``spec.weather``; None builds a new one.

    Returns
    -------
    float
        Other electric use, kWh per year (never negative).

    Raises
    ------
    ValueError
        If ``cache`` was built for a different :class:`Weather`.

    References
    ----------
    Utility-bill disaggregation by subtraction (ASHRAE Guideline 14-2014 whole-building approach,
    from memory).
    """
    modelled = simulate(replace(spec, plug_kwh_per_yr=0.0), cache).annual_units["electricity"]
    return max(billed_site_kwh_per_yr - modelled, 0.0)


__all__ = [
    "END_USES", "FUELS",
    "BatterySpec", "CookingSpec", "CoolingSpec", "DryerSpec", "ElectricRate", "EmissionFactors",
    "EnergyResult", "FuelPrices", "FurnaceSpec", "HeatPumpSpec", "HomeEnergySpec",
    "ResistanceHeatSpec", "SiteCache", "SolarArraySpec", "VehicleSpec", "WaterHeaterSpec",
    "Weather", "plug_kwh_from_bills", "simulate", "with_heat_pump",
]
